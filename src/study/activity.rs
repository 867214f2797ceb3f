//! The simulation kernel of the energy model: toggles and input rows of
//! every gate over a fixed list of input words.
//!
//! Why it is shaped as it is (the estimate was once the slowest phase of
//! `map`): patterns are simulated 64 to a machine word and [`BATCH`] words
//! at a time per gate, so the per-gate work (fanin lookup, cell table) is
//! paid once per 256 patterns; toggles are counted with popcount on the
//! word XOR-ed with itself shifted by one pattern; and the pattern sequence
//! is cut into one contiguous range per thread. Each range counts the
//! toggles inside it and remembers its first and last value per gate, so
//! the toggles across a cut are added when the ranges are joined: the
//! counts are exactly those of one pass over the whole sequence.

use super::power::{SwitchingCircuit, NET_TRUE};
use rayon::prelude::*;

/// Words simulated together per gate.
pub const BATCH: usize = 4;

/// What the kernel counts, for the gates of one circuit.
pub struct Counts {
    /// Output toggles of each gate.
    pub toggles: Vec<u64>,
    /// Per gate with `per_row` set, how often each input row occurred.
    pub row_counts: Vec<Vec<u64>>,
}

/// One thread's share: counts inside its range of words and its first and
/// last output value per gate.
struct Part {
    toggles: Vec<u64>,
    row_counts: Vec<Vec<u64>>,
    first: Vec<bool>,
    last: Vec<bool>,
}

/// Simulates `circuit` (gate `g` computing table `truths[g]`) on the input
/// words `inputs` (`blocks` words per input, block-major: word `b` of input
/// `i` at `b * input_count + i`) of which the first `patterns` bits count.
/// Rows are counted for gates with `per_row[g]`.
pub fn simulate(
    circuit: &SwitchingCircuit,
    truths: &[u64],
    per_row: &[bool],
    inputs: &[u64],
    patterns: u64,
) -> Counts {
    let gates = circuit.gate_count();
    let blocks = patterns.div_ceil(64) as usize;
    if blocks == 0 {
        return Counts {
            toggles: vec![0; gates],
            row_counts: empty_rows(circuit, per_row),
        };
    }
    let batches = blocks.div_ceil(BATCH);
    let threads = rayon::current_num_threads().clamp(1, batches);
    let per_thread = batches.div_ceil(threads) * BATCH;
    let ranges: Vec<(usize, usize)> = (0..blocks)
        .step_by(per_thread)
        .map(|lo| (lo, (lo + per_thread).min(blocks)))
        .collect();
    let parts: Vec<Part> = ranges
        .par_iter()
        .map(|&(lo, hi)| simulate_range(circuit, truths, per_row, inputs, patterns, lo, hi))
        .collect();
    let mut parts = parts.into_iter();
    let first = parts.next().expect("at least one range");
    let mut toggles = first.toggles;
    let mut row_counts = first.row_counts;
    let mut last = first.last;
    for part in parts {
        for g in 0..gates {
            toggles[g] += part.toggles[g] + u64::from(last[g] != part.first[g]);
            for (c, p) in row_counts[g].iter_mut().zip(&part.row_counts[g]) {
                *c += p;
            }
        }
        last = part.last;
    }
    Counts {
        toggles,
        row_counts,
    }
}

fn empty_rows(circuit: &SwitchingCircuit, per_row: &[bool]) -> Vec<Vec<u64>> {
    (0..circuit.gate_count())
        .map(|g| {
            if per_row[g] {
                vec![0; 1 << circuit.gate_fanins(g).len()]
            } else {
                Vec::new()
            }
        })
        .collect()
}

/// The valid-pattern mask of block `block`.
#[inline]
fn valid_bits(patterns: u64, block: usize) -> u32 {
    (patterns - block as u64 * 64).min(64) as u32
}

fn simulate_range(
    circuit: &SwitchingCircuit,
    truths: &[u64],
    per_row: &[bool],
    inputs: &[u64],
    patterns: u64,
    lo: usize,
    hi: usize,
) -> Part {
    let gates = circuit.gate_count();
    let input_count = circuit.input_count() as usize;
    let first_gate = 2 + input_count;
    let mut values = vec![0u64; circuit.net_count() as usize * BATCH];
    for w in 0..BATCH {
        values[NET_TRUE as usize * BATCH + w] = u64::MAX;
    }
    let mut part = Part {
        toggles: vec![0; gates],
        row_counts: empty_rows(circuit, per_row),
        first: vec![false; gates],
        last: vec![false; gates],
    };
    let mut fanin_words = [0u64; 6];
    let mut valid = [0u64; BATCH];
    let mut inner = [0u64; BATCH];
    let mut top = [0u32; BATCH];
    let mut start = lo;
    while start < hi {
        let count = BATCH.min(hi - start);
        for w in 0..count {
            let bits = valid_bits(patterns, start + w);
            valid[w] = if bits == 64 {
                u64::MAX
            } else {
                (1u64 << bits) - 1
            };
            // Transitions inside the block: bit j to j + 1 for j + 1 < bits.
            inner[w] = valid[w] >> 1;
            top[w] = bits - 1;
            let row = &inputs[(start + w) * input_count..(start + w + 1) * input_count];
            for (i, &word) in row.iter().enumerate() {
                values[(2 + i) * BATCH + w] = word;
            }
        }
        for g in 0..gates {
            let fanins = circuit.gate_fanins(g);
            let truth = truths[g];
            let mut prev = part.last[g];
            let mut toggles = 0u64;
            for w in 0..count {
                for (slot, &f) in fanin_words.iter_mut().zip(fanins) {
                    *slot = values[f as usize * BATCH + w];
                }
                let ins = &fanin_words[..fanins.len()];
                let word = eval_truth(truth, ins);
                values[(first_gate + g) * BATCH + w] = word;
                toggles += u64::from(((word ^ (word >> 1)) & inner[w]).count_ones());
                let bit0 = word & 1 == 1;
                if start + w == lo {
                    part.first[g] = bit0;
                } else {
                    toggles += u64::from(bit0 != prev);
                }
                prev = (word >> top[w]) & 1 == 1;
                if per_row[g] {
                    count_rows(ins, valid[w], &mut part.row_counts[g]);
                }
            }
            part.toggles[g] += toggles;
            part.last[g] = prev;
        }
        start += count;
    }
    part
}

/// Evaluates a truth table on fanin words (Shannon expansion, variable 0
/// first), with a table sized for the fanin count so nothing is cleared
/// that is not used.
#[inline]
pub fn eval_truth(truth: u64, inputs: &[u64]) -> u64 {
    match inputs.len() {
        0 => 0u64.wrapping_sub(truth & 1),
        1 => shannon::<2>(truth, inputs),
        2 => shannon::<4>(truth, inputs),
        3 => shannon::<8>(truth, inputs),
        4 => shannon::<16>(truth, inputs),
        5 => shannon::<32>(truth, inputs),
        _ => shannon::<64>(truth, inputs),
    }
}

#[inline(always)]
fn shannon<const ROWS: usize>(truth: u64, inputs: &[u64]) -> u64 {
    let mut v = [0u64; ROWS];
    for (r, slot) in v.iter_mut().enumerate() {
        *slot = 0u64.wrapping_sub((truth >> r) & 1);
    }
    let mut len = ROWS;
    for &x in inputs {
        len /= 2;
        for j in 0..len {
            v[j] = (x & v[2 * j + 1]) | (!x & v[2 * j]);
        }
    }
    v[0]
}

/// Adds to `counts[r]` how many valid patterns put row r on the inputs.
pub fn count_rows(inputs: &[u64], valid: u64, counts: &mut [u64]) {
    let mut minterms = [0u64; 64];
    minterms[0] = valid;
    let mut len = 1usize;
    for (i, &x) in inputs.iter().enumerate() {
        for r in 0..len {
            let m = minterms[r];
            minterms[r] = m & !x;
            minterms[r | (1 << i)] = m & x;
        }
        len *= 2;
    }
    for (c, m) in counts.iter_mut().zip(&minterms[..len]) {
        *c += u64::from(m.count_ones());
    }
}
