//! Exhaustive proof for miters with few inputs.
//!
//! With few shared inputs (`EquivOptions::enumerate_up_to`, 24 by default),
//! simulating every input pattern (64 a word) is a complete proof and often
//! far cheaper than SAT: small multipliers built from different adder trees
//! share almost no internal nodes, which is the worst case for SAT sweeping
//! but costs exhaustive simulation only `2^n / 64` passes over the miter.
//!
//! How it stays fast and small: the output pairs are split into groups whose
//! logic cones hold at most [`CONE_BLOCK_NODES`] nodes; each group's cone is
//! compiled once into a flat list of operations over local slots, and the
//! pattern blocks of that group are spread over all cores with rayon, each
//! worker with one value buffer the size of the cone. The first differing
//! pattern (lowest pattern number among the groups' first differences) is the
//! counterexample, so the answer does not depend on thread timing.

use std::sync::atomic::{AtomicU64, Ordering};

use rayon::prelude::*;

use super::miter::{ComparedPair, Miter};
use super::progress::Progress;
use crate::network::{exhaustive_word, Lit, Network, NodeKind};

/// Largest `passes * cone nodes` product spent on enumeration (a few
/// seconds of simulation on two cores).
const MAX_WORK: u64 = 1 << 32;

/// Widest miter ever enumerated, whatever the options say.
pub(crate) const MAX_INPUTS: usize = 30;

/// Nodes at most in the cone of one group of output pairs (8 MiB of values
/// per worker).
const CONE_BLOCK_NODES: usize = 1 << 20;

/// Pattern blocks (64 patterns each) handed to a worker at a time.
const BLOCKS_PER_TASK: u64 = 64;

/// Outcome of enumerating all patterns.
pub(crate) enum Enumerated {
    /// Every pair agrees on every pattern.
    Equal,
    /// A pattern (one value per miter input) on which some pair differs.
    Differ(Vec<bool>),
}

/// One operation of a compiled cone: the slot it writes is its position in
/// the list plus the number of inputs; fanins are local literals (slot << 1
/// | complement).
#[derive(Clone, Copy)]
enum Op {
    And(u32, u32),
    Xor(u32, u32),
    Maj(u32, u32, u32),
}

/// The logic cone of a group of output pairs, over local slots: slot 0 is
/// constant false, slots `1..=inputs` the miter inputs, then one slot per
/// operation.
struct Cone {
    inputs: usize,
    ops: Vec<Op>,
    /// Local literals of each compared pair.
    pairs: Vec<(u32, u32)>,
}

#[inline]
fn word(values: &[u64], local: u32) -> u64 {
    let w = values[(local >> 1) as usize];
    if local & 1 == 1 {
        !w
    } else {
        w
    }
}

impl Cone {
    /// Compiles the cone of `pairs` in `network` (whose inputs are the miter
    /// inputs in order).
    fn compile(network: &Network, pairs: &[&ComparedPair]) -> Cone {
        let n = network.num_nodes();
        let mut needed = vec![false; n];
        let mut stack: Vec<usize> = pairs
            .iter()
            .flat_map(|p| [p.a.node().index(), p.b.node().index()])
            .collect();
        while let Some(i) = stack.pop() {
            if std::mem::replace(&mut needed[i], true) {
                continue;
            }
            for f in network.fanins(crate::network::NodeId(i as u32)) {
                stack.push(f.node().index());
            }
        }
        let inputs = network.inputs();
        let mut slot = vec![0u32; n];
        for (k, id) in inputs.values().enumerate() {
            slot[id.index()] = k as u32 + 1;
        }
        let local =
            |slot: &[u32], l: Lit| (slot[l.node().index()] << 1) | l.is_complemented() as u32;
        let mut ops = Vec::new();
        for (i, &need) in needed.iter().enumerate() {
            let id = crate::network::NodeId(i as u32);
            if !need || !network.is_gate(id) {
                continue;
            }
            let f = network.fanins(id);
            let op = match network.kind(id) {
                NodeKind::And => Op::And(local(&slot, f[0]), local(&slot, f[1])),
                NodeKind::Xor => Op::Xor(local(&slot, f[0]), local(&slot, f[1])),
                NodeKind::Maj => {
                    Op::Maj(local(&slot, f[0]), local(&slot, f[1]), local(&slot, f[2]))
                }
                NodeKind::Const | NodeKind::Input => continue,
            };
            slot[i] = (inputs.len() + 1 + ops.len()) as u32;
            ops.push(op);
        }
        let pairs = pairs
            .iter()
            .map(|p| (local(&slot, p.a), local(&slot, p.b)))
            .collect();
        Cone {
            inputs: inputs.len(),
            ops,
            pairs,
        }
    }

    fn slots(&self) -> usize {
        1 + self.inputs + self.ops.len()
    }

    /// Simulates pattern block `block` and returns the mask of patterns on
    /// which some pair differs (restricted to `valid`).
    fn differences(&self, block: u64, valid: u64, values: &mut Vec<u64>) -> u64 {
        values.clear();
        values.resize(self.slots(), 0);
        for k in 0..self.inputs {
            values[k + 1] = exhaustive_word(k, block);
        }
        let base = 1 + self.inputs;
        for (i, op) in self.ops.iter().enumerate() {
            values[base + i] = match *op {
                Op::And(x, y) => word(values, x) & word(values, y),
                Op::Xor(x, y) => word(values, x) ^ word(values, y),
                Op::Maj(x, y, z) => {
                    let (a, b, c) = (word(values, x), word(values, y), word(values, z));
                    (a & b) | (a & c) | (b & c)
                }
            };
        }
        self.pairs
            .iter()
            .fold(0, |acc, &(a, b)| acc | (word(values, a) ^ word(values, b)))
            & valid
    }
}

/// Splits the pairs into groups whose cones stay under
/// [`CONE_BLOCK_NODES`] nodes (a pair whose own cone is larger forms a group
/// alone) and compiles each group.
fn cones(miter: &Miter) -> Vec<Cone> {
    let pairs: Vec<&ComparedPair> = miter.pairs.iter().filter(|p| p.a != p.b).collect();
    if pairs.is_empty() {
        return Vec::new();
    }
    if miter.network.num_nodes() <= CONE_BLOCK_NODES {
        return vec![Cone::compile(&miter.network, &pairs)];
    }
    let mut groups = Vec::new();
    let mut start = 0;
    while start < pairs.len() {
        // Grow the group while its cone fits (doubling, then the last fit).
        let mut end = start + 1;
        let mut cone = Cone::compile(&miter.network, &pairs[start..end]);
        while end < pairs.len() {
            let next = (end + (end - start)).min(pairs.len());
            let bigger = Cone::compile(&miter.network, &pairs[start..next]);
            if bigger.slots() > CONE_BLOCK_NODES {
                break;
            }
            cone = bigger;
            end = next;
        }
        groups.push(cone);
        start = end;
    }
    groups
}

/// Whether enumeration would be tried on `miter` with this input bound.
#[cfg(test)]
fn applies(miter: &Miter, max_inputs: usize) -> bool {
    let n = miter.network.inputs().len();
    n <= max_inputs.min(MAX_INPUTS) && passes(n) * miter.network.num_nodes() as u64 <= MAX_WORK
}

fn passes(n: usize) -> u64 {
    if n <= 6 {
        1
    } else {
        1 << (n - 6)
    }
}

/// Enumerates every input pattern of a small miter, or returns `None` when
/// the miter is too wide or too large for it. Uses every rayon worker; the
/// counterexample is the lowest differing pattern number (input k = bit k).
pub(crate) fn enumerate(miter: &Miter, max_inputs: usize) -> Option<Enumerated> {
    let n = miter.network.inputs().len();
    if n > max_inputs.min(MAX_INPUTS) {
        return None;
    }
    let passes = passes(n);
    let groups = cones(miter);
    let work: u64 = groups.iter().map(|c| c.slots() as u64 * passes).sum();
    if work > MAX_WORK {
        return None;
    }
    let valid = if n >= 6 {
        u64::MAX
    } else {
        (1u64 << (1u32 << n)) - 1
    };
    let progress = Progress::new("exhaustive simulation", passes * groups.len() as u64);
    // Lowest differing pattern found so far (u64::MAX: none).
    let first = AtomicU64::new(u64::MAX);
    for cone in &groups {
        let tasks = passes.div_ceil(BLOCKS_PER_TASK);
        (0..tasks)
            .into_par_iter()
            .for_each_init(Vec::new, |values, task| {
                let start = task * BLOCKS_PER_TASK;
                let end = (start + BLOCKS_PER_TASK).min(passes);
                for block in start..end {
                    if block * 64 >= first.load(Ordering::Relaxed) {
                        return;
                    }
                    let diff = cone.differences(block, valid, values);
                    if diff != 0 {
                        let row = block * 64 + diff.trailing_zeros() as u64;
                        first.fetch_min(row, Ordering::Relaxed);
                        return;
                    }
                }
                progress.advance(end - start);
            });
    }
    progress.finish();
    let row = first.into_inner();
    Some(if row == u64::MAX {
        Enumerated::Equal
    } else {
        Enumerated::Differ((0..n).map(|k| (row >> k) & 1 == 1).collect())
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::equiv::ports::pair_ports;
    use crate::equiv::PortMatching;

    /// A 12-input parity against a wrong one whose last XOR is an OR: they
    /// differ exactly when x0..x10 have odd parity and x11 is 1, so the
    /// lowest differing pattern number is 2^11 + 1 (worked by hand).
    #[test]
    fn first_difference_is_the_lowest_pattern_number() {
        let mut chain = Network::new("chain");
        let mut tree = Network::new("tree");
        let xs: Vec<Lit> = (0..12)
            .map(|k| chain.add_input(format!("x{k}")).unwrap())
            .collect();
        let ys: Vec<Lit> = (0..12)
            .map(|k| tree.add_input(format!("x{k}")).unwrap())
            .collect();
        let c = chain.xor_many(&xs);
        chain.add_output("p", c).unwrap();
        let low = tree.xor_many(&ys[..11]);
        let t = tree.or(low, ys[11]);
        tree.add_output("p", t).unwrap();
        let ports = pair_ports(&chain, &tree, &PortMatching::ByName).unwrap();
        let miter = Miter::build(&chain, &tree, &ports);
        match enumerate(&miter, 24) {
            Some(Enumerated::Differ(p)) => {
                let row = p
                    .iter()
                    .enumerate()
                    .fold(0u64, |acc, (k, &b)| acc | ((b as u64) << k));
                // The lowest row where x0..x10 have odd parity and x11 = 1.
                assert_eq!(row, (1 << 11) | 1);
            }
            _ => panic!("the difference must be found"),
        }
        assert!(applies(&miter, 24));
        assert!(!applies(&miter, 11));
    }
}
