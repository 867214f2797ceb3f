//! Cheap refutation by simulation against the word-level specification.
//!
//! Why: backward rewriting proves a correct circuit quickly, but on a wrong
//! one the remainder polynomial can grow towards the term limit before the
//! counterexample shows, which takes minutes on a 64 x 64 multiplier. Almost
//! every wrong circuit, though, gives a wrong word on some random or corner
//! pattern, and 64 patterns cost one pass over the network. So the circuit is
//! simulated 64 patterns a word, and the specification is computed on the
//! same 64 patterns by bit-sliced integer arithmetic (word k of a vector holds
//! bit k of the 64 integers: ripple addition, shift-and-add multiplication;
//! common practice). A lane whose output word differs is a counterexample;
//! it is confirmed once more on big integers
//! ([`super::simulate_against_spec`]) before it is reported.
//!
//! Patterns: first corner patterns (all zeros, all ones, each one-hot bit of
//! one word against an all-ones other word), then random words of varying
//! density (one half, one quarter, three quarters, one eighth, seven eighths
//! of the bits set), which reach carries that uniform patterns rarely set.
//! Deterministic for a given seed.

use super::{words::Words, ArithSpec};
use crate::network::{lit_word, Network, SplitMix64};

/// Rounds of 64 patterns tried before rewriting starts.
pub(crate) const ROUNDS_BEFORE_REWRITING: usize = 64;

/// Node evaluations at most in the longer search run when rewriting blows
/// up (each round costs one evaluation per node).
pub(crate) const SEARCH_NODE_BUDGET: usize = 1 << 24;

/// `x + y` over bit-sliced words, truncated to `width` bits (missing bits
/// are zero).
fn sliced_add(x: &[u64], y: &[u64], width: usize) -> Vec<u64> {
    let mut carry = 0u64;
    let mut out = Vec::with_capacity(width);
    for k in 0..width {
        let a = x.get(k).copied().unwrap_or(0);
        let b = y.get(k).copied().unwrap_or(0);
        let half = a ^ b;
        out.push(half ^ carry);
        carry = (a & b) | (half & carry);
    }
    out
}

/// `spec(a, b, c)` over bit-sliced words, truncated to `width` bits.
pub(crate) fn sliced_spec(
    spec: ArithSpec,
    a: &[u64],
    b: &[u64],
    c: &[u64],
    width: usize,
) -> Vec<u64> {
    match spec {
        ArithSpec::Add => {
            let sum = sliced_add(a, b, width);
            sliced_add(&sum, c, width)
        }
        ArithSpec::Mul | ArithSpec::Mac => {
            let mut acc = vec![0u64; width];
            for (j, &bj) in b.iter().enumerate().take(width) {
                // Row j: A shifted by j, masked by bit j of B.
                let mut row = vec![0u64; width];
                for (k, &ak) in a.iter().enumerate() {
                    if j + k < width {
                        row[j + k] = ak & bj;
                    }
                }
                acc = sliced_add(&acc, &row, width);
            }
            sliced_add(&acc, c, width)
        }
    }
}

/// Input words of the corner patterns, 64 lanes per entry.
fn corner_rounds(n_inputs: usize, words: &Words) -> Vec<Vec<u64>> {
    let mut patterns: Vec<Vec<bool>> = vec![vec![false; n_inputs], vec![true; n_inputs]];
    let groups = [&words.a, &words.b, &words.c];
    for (g, word) in groups.iter().enumerate() {
        for &hot in word.iter() {
            // One bit of this word set, every other word all ones.
            let mut p = vec![true; n_inputs];
            for &q in word.iter() {
                p[q] = q == hot;
            }
            patterns.push(p);
            // And the same bit alone among zeros, with the next word all ones.
            let mut p = vec![false; n_inputs];
            p[hot] = true;
            for &q in groups[(g + 1) % groups.len()].iter() {
                p[q] = true;
            }
            patterns.push(p);
        }
    }
    patterns
        .chunks(64)
        .map(|chunk| {
            let mut ci = vec![0u64; n_inputs];
            for (lane, p) in chunk.iter().enumerate() {
                for (i, &bit) in p.iter().enumerate() {
                    if bit {
                        ci[i] |= 1 << lane;
                    }
                }
            }
            ci
        })
        .collect()
}

/// Random input words of round `round`, of a density that cycles through
/// 1/2, 1/4, 3/4, 1/8 and 7/8.
fn random_round(rng: &mut SplitMix64, n_inputs: usize, round: usize) -> Vec<u64> {
    (0..n_inputs)
        .map(|_| {
            let x = rng.next();
            match round % 5 {
                0 => x,
                1 => x & rng.next(),
                2 => x | rng.next(),
                3 => x & rng.next() & rng.next(),
                _ => x | rng.next() | rng.next(),
            }
        })
        .collect()
}

/// Searches `rounds` rounds of 64 patterns (corner patterns first) for an
/// input pattern on which the output word of `net` differs from `spec`;
/// returns it in [`Network::combinational_inputs`] order. Cost: one
/// simulation of `net` per round plus `O(|A| * W)` word operations for the
/// specification.
pub(crate) fn search(
    net: &Network,
    spec: ArithSpec,
    words: &Words,
    rounds: usize,
    seed: u64,
) -> Option<Vec<bool>> {
    let n_inputs = net.combinational_inputs().len();
    let outs = net.combinational_outputs();
    let width = words.outputs.len();
    let mut rng = SplitMix64::new(seed);
    let corners = corner_rounds(n_inputs, words);
    let mut values = Vec::new();
    for round in 0..rounds {
        let ci = match corners.get(round) {
            Some(c) => c.clone(),
            None => random_round(&mut rng, n_inputs, round),
        };
        net.simulate_into(&ci, &mut values);
        let word = |w: &[usize]| -> Vec<u64> { w.iter().map(|&p| ci[p]).collect() };
        let want = sliced_spec(
            spec,
            &word(&words.a),
            &word(&words.b),
            &word(&words.c),
            width,
        );
        let mut diff = 0u64;
        for (k, &p) in words.outputs.iter().enumerate() {
            diff |= lit_word(&values, outs[p]) ^ want[k];
        }
        if diff != 0 {
            let lane = diff.trailing_zeros();
            return Some(ci.iter().map(|&x| (x >> lane) & 1 == 1).collect());
        }
    }
    None
}

/// Rounds that fit [`SEARCH_NODE_BUDGET`] for `net` (at least one).
pub(crate) fn rounds_within_budget(net: &Network) -> usize {
    (SEARCH_NODE_BUDGET / net.num_nodes().max(1)).max(1)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Bit-sliced arithmetic agrees with machine integers on random lanes
    /// (integer multiplication and addition of u64, common practice).
    #[test]
    fn sliced_arithmetic_matches_integers() {
        let mut rng = SplitMix64::new(5);
        let slice = |xs: &[u64], bits: usize| -> Vec<u64> {
            (0..bits)
                .map(|k| {
                    xs.iter()
                        .enumerate()
                        .fold(0u64, |w, (lane, &x)| w | (((x >> k) & 1) << lane))
                })
                .collect()
        };
        let xs: Vec<u64> = (0..64).map(|_| rng.next() & 0xFFFF_FFFF).collect();
        let ys: Vec<u64> = (0..64).map(|_| rng.next() & 0xFFFF_FFFF).collect();
        let cs: Vec<u64> = (0..64).map(|_| rng.next() & 1).collect();
        let (a, b, c) = (slice(&xs, 32), slice(&ys, 32), slice(&cs, 1));
        let product = sliced_spec(ArithSpec::Mul, &a, &b, &[], 64);
        let sum = sliced_spec(ArithSpec::Add, &a, &b, &c, 33);
        for lane in 0..64 {
            let read = |v: &[u64]| {
                v.iter()
                    .enumerate()
                    .fold(0u64, |x, (k, &w)| x | (((w >> lane) & 1) << k))
            };
            assert_eq!(read(&product), xs[lane] * ys[lane]);
            assert_eq!(read(&sum), xs[lane] + ys[lane] + cs[lane]);
        }
    }
}
