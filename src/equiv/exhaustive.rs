//! Exhaustive proof for miters with few inputs.
//!
//! With few shared inputs (`EquivOptions::enumerate_up_to`, 16 by default), simulating every input pattern
//! (64 a word) is a complete proof and often far cheaper than SAT: small
//! multipliers built from different adder trees share almost no internal
//! nodes, which is the worst case for SAT sweeping but costs exhaustive
//! simulation only `2^n / 64` passes over the miter.

use super::miter::Miter;
use crate::network::{exhaustive_word, lit_word};

/// Largest `passes * nodes` product spent on enumeration.
const MAX_WORK: u64 = 1 << 28;

/// Outcome of enumerating all patterns.
pub(crate) enum Enumerated {
    /// Every pair agrees on every pattern.
    Equal,
    /// A pattern (one value per miter input) on which some pair differs.
    Differ(Vec<bool>),
}

/// Enumerates every input pattern of a small miter, or returns `None` when
/// the miter is too wide or too large for it.
pub(crate) fn enumerate(miter: &Miter, max_inputs: usize) -> Option<Enumerated> {
    let n = miter.network.inputs().len();
    if n > max_inputs.min(26) {
        return None;
    }
    let passes: u64 = if n <= 6 { 1 } else { 1 << (n - 6) };
    if passes * miter.network.num_nodes() as u64 > MAX_WORK {
        return None;
    }
    let valid = if n >= 6 {
        u64::MAX
    } else {
        (1u64 << (1u32 << n)) - 1
    };
    let mut values = Vec::new();
    for block in 0..passes {
        let words: Vec<u64> = (0..n).map(|k| exhaustive_word(k, block)).collect();
        miter.network.simulate_into(&words, &mut values);
        for pair in &miter.pairs {
            let diff = (lit_word(&values, pair.a) ^ lit_word(&values, pair.b)) & valid;
            if diff != 0 {
                let row = block * 64 + diff.trailing_zeros() as u64;
                return Some(Enumerated::Differ(
                    (0..n).map(|k| (row >> k) & 1 == 1).collect(),
                ));
            }
        }
    }
    Some(Enumerated::Equal)
}
