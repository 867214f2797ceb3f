//! Units a conductance table may be written in, and the conductance quantum.
//!
//! Device simulators print conductance in siemens or a decimal multiple, or as
//! a transmission (conductance in units of the quantum G0). Every table is
//! turned into siemens on reading, so nothing downstream sees a unit again.

/// The conductance quantum G0 = 2e²/h in siemens. With e and h exact in the
/// 2019 SI, 2e²/h = 7.748091729...×10⁻⁵ S (CODATA 2018 recommended values).
pub const CONDUCTANCE_QUANTUM_S: f64 = 7.748_091_729_863_649e-5;

/// A unit of conductance accepted in table headers (`g[uS]`) and JSON tables.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum ConductanceUnit {
    /// Siemens.
    Siemens,
    /// Millisiemens.
    Millisiemens,
    /// Microsiemens.
    Microsiemens,
    /// Nanosiemens.
    Nanosiemens,
    /// Transmission: multiples of the conductance quantum G0 = 2e²/h.
    Quantum,
}

impl ConductanceUnit {
    /// The unit a header names (`S`, `mS`, `uS`, `µS`, `nS`, `G0`), if known.
    pub fn parse(text: &str) -> Option<ConductanceUnit> {
        match text.trim() {
            "S" => Some(ConductanceUnit::Siemens),
            "mS" => Some(ConductanceUnit::Millisiemens),
            "uS" | "µS" | "μS" => Some(ConductanceUnit::Microsiemens),
            "nS" => Some(ConductanceUnit::Nanosiemens),
            "G0" => Some(ConductanceUnit::Quantum),
            _ => None,
        }
    }

    /// How many siemens one of this unit is.
    pub fn siemens(self) -> f64 {
        match self {
            ConductanceUnit::Siemens => 1.0,
            ConductanceUnit::Millisiemens => 1e-3,
            ConductanceUnit::Microsiemens => 1e-6,
            ConductanceUnit::Nanosiemens => 1e-9,
            ConductanceUnit::Quantum => CONDUCTANCE_QUANTUM_S,
        }
    }

    /// The names [`ConductanceUnit::parse`] accepts, for messages.
    pub const NAMES: &'static str = "S, mS, uS, nS, G0";
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The conductance quantum from the exact SI values of the elementary
    /// charge and the Planck constant (2019 SI; CODATA 2018 lists
    /// 7.748091729e-5 S for 2e²/h).
    #[test]
    fn quantum_from_exact_si_constants() {
        let e = 1.602_176_634e-19_f64;
        let h = 6.626_070_15e-34_f64;
        let g0 = 2.0 * e * e / h;
        assert!((g0 - CONDUCTANCE_QUANTUM_S).abs() / g0 < 1e-12);
        assert!((CONDUCTANCE_QUANTUM_S - 7.748_091_729e-5).abs() < 1e-14);
    }

    #[test]
    fn unit_names() {
        assert_eq!(
            ConductanceUnit::parse("uS"),
            Some(ConductanceUnit::Microsiemens)
        );
        assert_eq!(
            ConductanceUnit::parse("G0").unwrap().siemens(),
            CONDUCTANCE_QUANTUM_S
        );
        assert_eq!(ConductanceUnit::parse("kS"), None);
    }
}
