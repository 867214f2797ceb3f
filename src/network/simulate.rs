//! 64-bit word-parallel simulation and a small deterministic random source.
//!
//! One `u64` per node carries 64 input patterns at once; a node's word is
//! computed from its fanins' words in index (topological) order. Callers that
//! need more patterns call [`Network::simulate_into`] again with a reused
//! buffer.

use super::{Lit, Network, NodeKind};

/// SplitMix64: a tiny, fast, well-mixed generator. It is used so that every
/// random simulation in the project is reproducible from a seed and identical
/// on every platform and crate version.
#[derive(Clone, Debug)]
pub struct SplitMix64(u64);

impl SplitMix64 {
    /// A generator started from `seed`.
    pub fn new(seed: u64) -> SplitMix64 {
        SplitMix64(seed)
    }

    /// The next 64 random bits.
    #[inline]
    #[allow(clippy::should_implement_trait)]
    pub fn next(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }

    /// A uniform number below `bound` (which must be positive).
    pub fn below(&mut self, bound: u64) -> u64 {
        ((self.next() as u128 * bound as u128) >> 64) as u64
    }
}

/// The word of literal `lit` given the node words `values`.
#[inline]
pub fn lit_word(values: &[u64], lit: Lit) -> u64 {
    let w = values[lit.node().index()];
    if lit.is_complemented() {
        !w
    } else {
        w
    }
}

impl Network {
    /// Simulates 64 patterns: `ci_words[i]` holds the values of the i-th
    /// combinational input ([`Network::combinational_inputs`] order). Returns
    /// one word per node.
    pub fn simulate(&self, ci_words: &[u64]) -> Vec<u64> {
        let mut values = Vec::new();
        self.simulate_into(ci_words, &mut values);
        values
    }

    /// Like [`Network::simulate`], reusing `values` as the output buffer.
    pub fn simulate_into(&self, ci_words: &[u64], values: &mut Vec<u64>) {
        values.clear();
        values.resize(self.num_nodes(), 0);
        for (id, &w) in self.combinational_inputs().iter().zip(ci_words) {
            values[id.index()] = w;
        }
        for (i, kind) in self.kinds.iter().enumerate() {
            let f = &self.fanins[i];
            values[i] = match kind {
                NodeKind::Const | NodeKind::Input => continue,
                NodeKind::And => lit_word(values, f[0]) & lit_word(values, f[1]),
                NodeKind::Xor => lit_word(values, f[0]) ^ lit_word(values, f[1]),
                NodeKind::Maj => {
                    let (a, b, c) = (
                        lit_word(values, f[0]),
                        lit_word(values, f[1]),
                        lit_word(values, f[2]),
                    );
                    (a & b) | (a & c) | (b & c)
                }
            };
        }
    }

    /// Words of the combinational outputs for 64 patterns.
    pub fn simulate_outputs(&self, ci_words: &[u64]) -> Vec<u64> {
        let values = self.simulate(ci_words);
        self.combinational_outputs()
            .iter()
            .map(|&l| lit_word(&values, l))
            .collect()
    }

    /// The complete truth table of every combinational output when the
    /// network has at most six combinational inputs (bit r = value on row r,
    /// input k = bit k of r). `None` for wider networks.
    pub fn output_truth_tables(&self) -> Option<Vec<u64>> {
        let n = self.combinational_inputs().len();
        if n > 6 {
            return None;
        }
        let words: Vec<u64> = (0..n).map(|k| exhaustive_word(k, 0)).collect();
        let mask = if n == 6 {
            u64::MAX
        } else {
            (1u64 << (1 << n)) - 1
        };
        Some(
            self.simulate_outputs(&words)
                .into_iter()
                .map(|w| w & mask)
                .collect(),
        )
    }
}

/// The word of input `k` for exhaustive simulation: pattern `64 * block + j`
/// gives input k the value of bit k of that pattern number.
pub fn exhaustive_word(k: usize, block: u64) -> u64 {
    const MASKS: [u64; 6] = [
        0xAAAA_AAAA_AAAA_AAAA,
        0xCCCC_CCCC_CCCC_CCCC,
        0xF0F0_F0F0_F0F0_F0F0,
        0xFF00_FF00_FF00_FF00,
        0xFFFF_0000_FFFF_0000,
        0xFFFF_FFFF_0000_0000,
    ];
    if k < 6 {
        MASKS[k]
    } else if (block >> (k - 6)) & 1 == 1 {
        u64::MAX
    } else {
        0
    }
}
