//! A stable fingerprint of what a library can build and what it costs.
//!
//! Exact synthesis caches its results per library; the key must change when
//! any cell's function or cost changes and must not depend on the library's
//! name, description, field order in the file, or the Rust version. So the
//! cells are written in a fixed textual form (floats by their bit patterns)
//! and hashed with 64-bit FNV-1a.

use super::{Leakage, Library};
use std::fmt::Write;

const FNV_OFFSET: u64 = 0xcbf2_9ce4_8422_2325;
const FNV_PRIME: u64 = 0x0000_0100_0000_01b3;

/// 64-bit FNV-1a of `bytes`.
pub fn fnv1a(bytes: &[u8]) -> u64 {
    bytes
        .iter()
        .fold(FNV_OFFSET, |h, &b| (h ^ b as u64).wrapping_mul(FNV_PRIME))
}

impl Library {
    /// The canonical text the content hash is taken over: one line per cell
    /// (name, pins, truth table, costs with floats as bit patterns), the
    /// primary output load and the storage cells.
    pub fn canonical_text(&self) -> String {
        let mut s = String::new();
        for c in &self.cells {
            let leakage = match &c.leakage {
                Leakage::Constant(v) => format!("{:016x}", v.to_bits()),
                Leakage::PerRow(rows) => rows
                    .iter()
                    .map(|v| format!("{:016x}", v.to_bits()))
                    .collect::<Vec<_>>()
                    .join(","),
            };
            let _ = writeln!(
                s,
                "cell {} ({}) {} truth={:016x} area={:016x} delay={:016x}+{:016x} load={:016x} energy={:016x} leakage=[{}] devices={}",
                c.name,
                c.inputs.join(","),
                c.output,
                c.truth,
                c.area.to_bits(),
                c.delay.intrinsic.to_bits(),
                c.delay.per_load.to_bits(),
                c.input_load.to_bits(),
                c.switch_energy.to_bits(),
                leakage,
                c.devices
            );
            // Only when given, so libraries without it keep their hashes.
            if c.switch_energy_per_load != 0.0 {
                let _ = writeln!(
                    s,
                    "energy_per_load={:016x}",
                    c.switch_energy_per_load.to_bits()
                );
            }
        }
        let _ = writeln!(
            s,
            "primary_output_load={:016x}",
            self.primary_output_load.to_bits()
        );
        for st in &self.storage {
            let _ = writeln!(
                s,
                "storage {} d={} q={} clock={} area={:016x}",
                st.name,
                st.d,
                st.q,
                st.clock,
                st.area.to_bits()
            );
        }
        s
    }

    /// Stable 64-bit FNV-1a hash of [`Library::canonical_text`].
    pub fn content_hash(&self) -> u64 {
        fnv1a(self.canonical_text().as_bytes())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn fnv1a_known_values() {
        // FNV-1a 64 test vectors (Fowler, Noll and Vo; from memory):
        // "" -> offset basis, "a" -> 0xaf63dc4c8601ec8c.
        assert_eq!(fnv1a(b""), 0xcbf29ce484222325);
        assert_eq!(fnv1a(b"a"), 0xaf63dc4c8601ec8c);
    }
}
