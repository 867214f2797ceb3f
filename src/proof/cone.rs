//! Truth tables of small cones, the arithmetic of every local check.
//!
//! A local check compares two functions over the same at most six leaves by
//! computing both as 64-bit truth tables (one bit per assignment of the
//! leaves, the six-variable pattern of each leaf repeated over the word), so
//! one comparison covers every assignment: an exhaustive proof over the
//! leaves.

use crate::network::{Lit, Network, NodeKind};

/// Most leaves a cone may have (a truth table is one `u64`).
pub const MAX_LEAVES: usize = 6;

/// Most nodes one cone walk may visit before the check gives up.
pub const MAX_CONE: usize = 512;

const VAR_WORDS: [u64; MAX_LEAVES] = [
    0xAAAA_AAAA_AAAA_AAAA,
    0xCCCC_CCCC_CCCC_CCCC,
    0xF0F0_F0F0_F0F0_F0F0,
    0xFF00_FF00_FF00_FF00,
    0xFFFF_0000_FFFF_0000,
    0xFFFF_FFFF_0000_0000,
];

/// The word of a literal whose node has word `node_word`.
#[inline]
pub fn with_phase(node_word: u64, complemented: bool) -> u64 {
    if complemented {
        !node_word
    } else {
        node_word
    }
}

/// The output word of a cell with table `truth` (bit `r` is the output on
/// row `r`; pin `k` is bit `k` of the row) whose pins carry `inputs`.
pub fn cell_word(truth: u64, inputs: &[u64]) -> u64 {
    let rows = 1usize << inputs.len();
    let mut out = 0u64;
    for r in 0..rows {
        if (truth >> r) & 1 == 0 {
            continue;
        }
        let mut term = u64::MAX;
        for (k, &w) in inputs.iter().enumerate() {
            term &= if (r >> k) & 1 == 1 { w } else { !w };
        }
        out |= term;
    }
    out
}

/// The leaves of one cone: distinct nodes, each given one variable, or
/// tied to another leaf's variable (in either phase) when both are known to
/// be equal.
#[derive(Clone, Debug, Default)]
pub struct Leaves {
    nodes: Vec<u32>,
    /// Per node: its variable and whether it is that variable's complement.
    vars: Vec<(u8, bool)>,
    /// Number of variables given out.
    count: usize,
}

impl Leaves {
    /// Forgets every leaf.
    pub fn clear(&mut self) {
        self.nodes.clear();
        self.vars.clear();
        self.count = 0;
    }

    /// The word of `node`, giving it the next variable when it is new;
    /// `None` past [`MAX_LEAVES`] variables.
    pub fn word(&mut self, node: u32) -> Option<u64> {
        if let Some(w) = self.find(node) {
            return Some(w);
        }
        if self.count == MAX_LEAVES {
            return None;
        }
        self.nodes.push(node);
        self.vars.push((self.count as u8, false));
        self.count += 1;
        Some(VAR_WORDS[self.count - 1])
    }

    /// Ties the new leaf `node` to the variable of the leaf `to`, as its
    /// complement when `complemented`: the caller knows that `node` equals
    /// `to` (or its complement) as functions of the primary inputs, so the
    /// substitution keeps every check sound. False when `node` is already a
    /// leaf or `to` is not.
    pub fn tie(&mut self, node: u32, to: u32, complemented: bool) -> bool {
        if self.nodes.contains(&node) {
            return false;
        }
        let Some(at) = self.nodes.iter().position(|&n| n == to) else {
            return false;
        };
        let (v, c) = self.vars[at];
        self.nodes.push(node);
        self.vars.push((v, c ^ complemented));
        true
    }

    /// The word of `node` if it is a leaf.
    pub fn find(&self, node: u32) -> Option<u64> {
        self.nodes.iter().position(|&n| n == node).map(|at| {
            let (v, c) = self.vars[at];
            with_phase(VAR_WORDS[v as usize], c)
        })
    }

    /// Number of variables.
    pub fn len(&self) -> usize {
        self.count
    }

    /// True when there is no leaf.
    pub fn is_empty(&self) -> bool {
        self.nodes.is_empty()
    }
}

/// Most nodes the second, wider walk of [`cone_equals`] explores.
const EXPLORE: usize = 256;

/// Most variables of the second walk (leaves and frontier together).
const MAX_WIDE_VARS: usize = 14;

/// Scratch space of [`cone_equals`].
#[derive(Default)]
pub struct ConeScratch {
    memo: Vec<(u32, u64)>,
    /// Explored nodes: (node, expanded).
    explored: Vec<(u32, bool)>,
    /// Multi-word values of the explored nodes, `words` each.
    values: Vec<u64>,
}

/// Whether the cone of `net` below `root`, with the nodes of `leaves` as
/// variables, computes `expected` (a word over the leaves' variables).
///
/// The cut a match was made for may have had leaves its function does not
/// depend on (the mapper drops those, also in the cuts it builds on), so
/// the cone can pass below the leaves. Then a wider walk explores the cone
/// breadth first and gives every unexplored node on its frontier a free
/// variable of its own: replacing subfunctions by free variables keeps the
/// check sound (an identity that holds for every value of the variables
/// holds for the subfunctions' values), and the cone's function must then
/// equal `expected` for every value of those variables, exhaustively over
/// up to fourteen variables. `None` when the cone is too large for that, or
/// when the wider walk finds a difference (a free variable may stand for a
/// node that depends on a leaf, so such a difference is no verdict).
pub fn cone_equals(
    net: &Network,
    root: Lit,
    leaves: &Leaves,
    scratch: &mut ConeScratch,
    expected: u64,
) -> Option<bool> {
    scratch.memo.clear();
    if let Some(w) = node_word(net, root.node().0, leaves, &mut scratch.memo) {
        return Some(with_phase(w, root.is_complemented()) == expected);
    }
    if let Some(w) = parity_word(net, root, leaves) {
        return Some(w == expected);
    }
    // Breadth first, so nodes near the root are explored before the
    // budget runs out below a dropped leaf.
    let explored = &mut scratch.explored;
    explored.clear();
    explored.push((root.node().0, false));
    let mut next = 0;
    while next < explored.len() {
        let node = explored[next].0;
        next += 1;
        let id = crate::network::NodeId(node);
        if leaves.find(node).is_some() || !net.is_gate(id) {
            continue;
        }
        let fanins = net.fanins(id);
        let fresh = fanins
            .iter()
            .filter(|f| !explored.iter().any(|e| e.0 == f.node().0))
            .count();
        if explored.len() + fresh > EXPLORE {
            continue;
        }
        for f in fanins {
            if !explored.iter().any(|e| e.0 == f.node().0) {
                explored.push((f.node().0, false));
            }
        }
        explored[next - 1].1 = true;
    }
    // Fanins have smaller indices: ascending index order is bottom up.
    explored.sort_unstable_by_key(|e| e.0);
    let frontier: Vec<u32> = explored
        .iter()
        .filter(|&&(n, expanded)| !expanded && n != 0 && leaves.find(n).is_none())
        .map(|e| e.0)
        .collect();
    let vars = (leaves.len() + frontier.len()).max(MAX_LEAVES);
    if vars > MAX_WIDE_VARS {
        return None;
    }
    let words = 1usize << (vars - MAX_LEAVES);
    // Variable `v` at word `j`: the six-variable pattern inside a word,
    // the word index's bits beyond.
    let var_word = |v: usize, j: usize| -> u64 {
        if v < MAX_LEAVES {
            VAR_WORDS[v]
        } else if (j >> (v - MAX_LEAVES)) & 1 == 1 {
            u64::MAX
        } else {
            0
        }
    };
    let values = &mut scratch.values;
    values.clear();
    values.resize(explored.len() * words, 0);
    let position = |explored: &[(u32, bool)], n: u32| -> usize {
        explored
            .binary_search_by_key(&n, |e| e.0)
            .expect("explored fanin")
    };
    for i in 0..explored.len() {
        let (node, expanded) = explored[i];
        let id = crate::network::NodeId(node);
        // Leaves first (at most six variables, the same in every word),
        // frontier variables after them (past six they index the words).
        let leaf = leaves.find(node);
        let var = frontier
            .iter()
            .position(|&f| f == node)
            .map(|p| leaves.len() + p);
        for j in 0..words {
            let w = if let Some(w) = leaf {
                w
            } else if let Some(v) = var {
                var_word(v, j)
            } else if node == 0 || !expanded {
                0
            } else {
                let f = net.fanins(id);
                let mut ins = [0u64; 3];
                for (slot, l) in ins.iter_mut().zip(f) {
                    let k = position(explored, l.node().0);
                    *slot = with_phase(values[k * words + j], l.is_complemented());
                }
                match net.kind(id) {
                    NodeKind::And => ins[0] & ins[1],
                    NodeKind::Xor => ins[0] ^ ins[1],
                    NodeKind::Maj => (ins[0] & ins[1]) | (ins[0] & ins[2]) | (ins[1] & ins[2]),
                    NodeKind::Const | NodeKind::Input => 0,
                }
            };
            values[i * words + j] = w;
        }
    }
    let r = position(explored, root.node().0);
    let equal =
        (0..words).all(|j| with_phase(values[r * words + j], root.is_complemented()) == expected);
    // A free variable on the frontier may stand for a node that depends on
    // a leaf, so a difference here proves nothing.
    equal.then_some(true)
}

/// Most nodes [`parity_word`] visits.
const PARITY_BUDGET: usize = 4096;

/// The word of `root` when the cone down to the leaves is XOR nodes only,
/// counted modulo two: a node reached an even number of times cancels, so
/// the walk also stops at leaves the mapper dropped from an XOR cut. Nodes
/// are visited from the highest index down (fanins have smaller indices),
/// so each node's count is complete before it is expanded.
fn parity_word(net: &Network, root: Lit, leaves: &Leaves) -> Option<u64> {
    use std::collections::BinaryHeap;
    let mut odd: rustc_hash::FxHashMap<u32, bool> = rustc_hash::FxHashMap::default();
    let mut queue = BinaryHeap::new();
    let mut word = with_phase(0, root.is_complemented());
    odd.insert(root.node().0, true);
    queue.push(root.node().0);
    let mut visited = 0;
    while let Some(node) = queue.pop() {
        visited += 1;
        if visited > PARITY_BUDGET {
            return None;
        }
        if !odd.remove(&node).unwrap_or(false) {
            continue;
        }
        if let Some(w) = leaves.find(node) {
            word ^= w;
            continue;
        }
        let id = crate::network::NodeId(node);
        if node == 0 {
            continue;
        }
        if net.kind(id) != NodeKind::Xor {
            return None;
        }
        for f in net.fanins(id) {
            word ^= with_phase(0, f.is_complemented());
            let slot = odd.entry(f.node().0).or_insert_with(|| {
                queue.push(f.node().0);
                false
            });
            *slot = !*slot;
        }
    }
    Some(word)
}

fn node_word(net: &Network, node: u32, leaves: &Leaves, memo: &mut Vec<(u32, u64)>) -> Option<u64> {
    if let Some(w) = leaves.find(node) {
        return Some(w);
    }
    if let Some(&(_, w)) = memo.iter().find(|(n, _)| *n == node) {
        return Some(w);
    }
    if memo.len() >= MAX_CONE {
        return None;
    }
    let id = crate::network::NodeId(node);
    let f = net.fanins(id);
    let mut word = |l: Lit| -> Option<u64> {
        Some(with_phase(
            node_word(net, l.node().0, leaves, memo)?,
            l.is_complemented(),
        ))
    };
    let w = match net.kind(id) {
        NodeKind::Const => 0,
        NodeKind::Input => return None,
        NodeKind::And => word(f[0])? & word(f[1])?,
        NodeKind::Xor => word(f[0])? ^ word(f[1])?,
        NodeKind::Maj => {
            let (a, b, c) = (word(f[0])?, word(f[1])?, word(f[2])?);
            (a & b) | (a & c) | (b & c)
        }
    };
    memo.push((node, w));
    Some(w)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Integer arithmetic: a cell's word is its table applied row by row.
    #[test]
    fn cell_word_applies_the_table_row_by_row() {
        // aoi21 = !((a & b) | c) over three pins (common-practice definition).
        let mut truth = 0u64;
        for r in 0..8 {
            let (a, b, c) = (r & 1 == 1, r & 2 == 2, r & 4 == 4);
            if !((a && b) || c) {
                truth |= 1 << r;
            }
        }
        let w = cell_word(truth, &[VAR_WORDS[0], VAR_WORDS[1], VAR_WORDS[2]]);
        assert_eq!(w, !((VAR_WORDS[0] & VAR_WORDS[1]) | VAR_WORDS[2]));
        // Pins swapped: a different word.
        let s = cell_word(truth, &[VAR_WORDS[2], VAR_WORDS[1], VAR_WORDS[0]]);
        assert_ne!(s, w);
    }

    #[test]
    fn cones_below_their_leaves_get_free_variables() {
        let mut net = Network::new("t");
        let a = net.add_input("a").unwrap();
        let b = net.add_input("b").unwrap();
        let c = net.add_input("c").unwrap();
        let ab = net.and(a, !b);
        let m = net.maj(ab, b, c);
        let mut leaves = Leaves::default();
        for l in [a, b, c] {
            leaves.word(l.node().0).unwrap();
        }
        let mut scratch = ConeScratch::default();
        let (x, y, z) = (VAR_WORDS[0], VAR_WORDS[1], VAR_WORDS[2]);
        let abw = x & !y;
        let expected = !((abw & y) | (abw & z) | (y & z));
        assert_eq!(
            cone_equals(&net, !m, &leaves, &mut scratch, expected),
            Some(true)
        );
        assert_eq!(
            cone_equals(&net, m, &leaves, &mut scratch, expected),
            Some(false)
        );
        // Leaves b and c only: a is a free variable, and the majority does
        // depend on it, so no function of b and c alone is accepted (a
        // difference found with free variables is no verdict: `None`).
        let mut two = Leaves::default();
        two.word(b.node().0).unwrap();
        two.word(c.node().0).unwrap();
        for t in 0..16u64 {
            let w = crate::mapper::small_truth::replicate(t, 2);
            assert_eq!(cone_equals(&net, m, &two, &mut scratch, w), None);
        }
        // (a ^ b) ^ a over leaf b alone: a cancels, the cone equals b.
        let ax = net.xor(a, b);
        let bx = net.xor(ax, a);
        let mut one = Leaves::default();
        one.word(b.node().0).unwrap();
        assert_eq!(
            cone_equals(&net, bx, &one, &mut scratch, VAR_WORDS[0]),
            Some(true)
        );
    }
}
