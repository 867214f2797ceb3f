//! Checking a mapped netlist against its original.
//!
//! The mapped netlist is turned back into a network
//! ([`super::MappedNetlist::to_network`]) and compared with the original,
//! ports matched by name. [`VerifyMode::Sim`] simulates 10,048 random input
//! patterns (157 words of 64, SplitMix64 from a fixed seed).
//! [`VerifyMode::Full`] runs the same simulation, then the equivalence
//! checker ([`crate::equiv::check`]): `proven` when it proves every output,
//! a mismatch when it finds a counterexample, and `simulated` when a work
//! limit leaves some output undecided.

use crate::network::{lit_word, Network, SplitMix64};

/// How thoroughly to check.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum VerifyMode {
    /// A proof of equivalence.
    Full,
    /// Random simulation.
    Sim,
    /// No check.
    None,
}

/// What the check established.
#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Verified {
    /// Proven equivalent.
    Proven,
    /// Equal on every simulated pattern.
    Simulated,
    /// Not checked.
    Skipped,
}

impl Verified {
    /// The lower-case name used in reports.
    pub fn name(self) -> &'static str {
        match self {
            Verified::Proven => "proven",
            Verified::Simulated => "simulated",
            Verified::Skipped => "skipped",
        }
    }
}

/// Why the check failed.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
pub enum VerifyError {
    /// The two networks do not have the same port names.
    #[error("port mismatch: {0}")]
    Ports(String),
    /// An output differs on some input pattern.
    #[error("output '{output}' differs from the original on some input pattern")]
    Mismatch {
        /// Name of the first differing output (or storage element).
        output: String,
        /// The input values of the pattern, by name.
        inputs: Vec<(String, bool)>,
    },
}

/// Simulation words used by [`VerifyMode::Sim`] (157 x 64 = 10,048 patterns).
pub const SIM_WORDS: usize = 157;

/// Checks `mapped` against `original` in `mode`.
pub fn verify(
    original: &Network,
    mapped: &Network,
    mode: VerifyMode,
) -> Result<Verified, VerifyError> {
    match mode {
        VerifyMode::None => Ok(Verified::Skipped),
        VerifyMode::Sim => {
            simulate_against(original, mapped, SIM_WORDS, 0x005E_ED0F_4A11)?;
            Ok(Verified::Simulated)
        }
        VerifyMode::Full => {
            simulate_against(original, mapped, SIM_WORDS, 0x005E_ED0F_4A11)?;
            let opts = crate::equiv::EquivOptions::default();
            match crate::equiv::check(original, mapped, &opts) {
                Ok(crate::equiv::Verdict::Equivalent { .. }) => Ok(Verified::Proven),
                Ok(crate::equiv::Verdict::Undecided { .. }) => Ok(Verified::Simulated),
                Ok(crate::equiv::Verdict::Different { counterexample, .. }) => {
                    Err(VerifyError::Mismatch {
                        output: counterexample
                            .differing_outputs
                            .first()
                            .cloned()
                            .unwrap_or_default(),
                        inputs: counterexample.inputs.into_iter().collect(),
                    })
                }
                Err(e) => Err(VerifyError::Ports(e.to_string())),
            }
        }
    }
}

/// Compares the combinational outputs of two networks, matched by name, on
/// `words * 64` random patterns from `seed`.
pub fn simulate_against(
    a: &Network,
    b: &Network,
    words: usize,
    seed: u64,
) -> Result<(), VerifyError> {
    let names_a = a.combinational_input_names();
    let names_b = b.combinational_input_names();
    // Position in b's input order of each of a's inputs.
    let mut pos = Vec::with_capacity(names_a.len());
    for name in &names_a {
        match names_b.iter().position(|n| n == name) {
            Some(p) => pos.push(p),
            None => return Err(VerifyError::Ports(format!("input '{name}' is missing"))),
        }
    }
    if names_a.len() != names_b.len() {
        return Err(VerifyError::Ports("the input counts differ".into()));
    }
    let out_names: Vec<String> = a
        .outputs()
        .keys()
        .chain(a.storage().keys())
        .cloned()
        .collect();
    let lits_a = a.combinational_outputs();
    let mut lits_b = Vec::with_capacity(lits_a.len());
    for name in a.outputs().keys() {
        match b.outputs().get(name) {
            Some(&l) => lits_b.push(l),
            None => return Err(VerifyError::Ports(format!("output '{name}' is missing"))),
        }
    }
    for name in a.storage().keys() {
        match b.storage().get(name) {
            Some(s) => lits_b.push(s.next),
            None => return Err(VerifyError::Ports(format!("storage '{name}' is missing"))),
        }
    }
    let mut rng = SplitMix64::new(seed);
    let mut wa = vec![0u64; names_a.len()];
    let mut wb = vec![0u64; names_a.len()];
    let (mut va, mut vb) = (Vec::new(), Vec::new());
    for _ in 0..words {
        for (i, w) in wa.iter_mut().enumerate() {
            *w = rng.next();
            wb[pos[i]] = *w;
        }
        a.simulate_into(&wa, &mut va);
        b.simulate_into(&wb, &mut vb);
        for (k, (&la, &lb)) in lits_a.iter().zip(&lits_b).enumerate() {
            let diff = lit_word(&va, la) ^ lit_word(&vb, lb);
            if diff != 0 {
                let bit = diff.trailing_zeros();
                let inputs = names_a
                    .iter()
                    .zip(&wa)
                    .map(|(n, w)| (n.to_string(), (w >> bit) & 1 == 1))
                    .collect();
                return Err(VerifyError::Mismatch {
                    output: out_names[k].clone(),
                    inputs,
                });
            }
        }
    }
    Ok(())
}
