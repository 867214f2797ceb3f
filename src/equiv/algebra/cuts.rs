//! Cuts with truth tables, for finding full and half adders in a network.
//!
//! Why a module of its own: a full adder's carry is a majority of three
//! signals only if those three signals are the leaves of some cut of the
//! carry node. A mapper on two-input cells often computes the carry from
//! the *parts* of one of them: with `s = x OR y` (a cell of its own, used by
//! the sum), the carry `maj(s, p, q)` may be built from `x`, `y`, `p` and `q`
//! directly, so no cut of the carry has `s` as a leaf and structural cut
//! enumeration never sees the majority.
//!
//! So cuts go up to four leaves (truth tables of sixteen rows), and every
//! cut is also tried against the nodes already built over two of its
//! leaves: when the node's function `F(x, y, z, w)` equals `H(g(x, y), z, w)`
//! for an existing node `g` computing `g(x, y)`, the cut `{g, z, w}` with
//! function `H` is added. This is the simple disjoint decomposition of
//! Ashenhurst ("The decomposition of switching functions", 1957) with the
//! bound set `{x, y}` and the decomposition function restricted to a node
//! that exists; `F` has it exactly when all rows that agree on `z`, `w` and
//! `g(x, y)` agree on `F`. A node's function over any cut, derived or not,
//! is its exact function of those leaves, so gates recovered over derived
//! cuts compute what the network computes.

use rustc_hash::FxHashMap;

use crate::network::{Network, NodeKind};

/// Cuts kept per node (XOR and majority functions first, then smallest).
const CUTS_PER_NODE: usize = 24;

/// Most leaves of a cut.
const MAX_LEAVES: usize = 4;

/// Nodes remembered per pair of leaves for decomposition.
const NODES_PER_PAIR: usize = 4;

/// Two-input XOR, as a four-row table (common practice).
pub(crate) const XOR2: u16 = 0b0110;
/// Three-input XOR, as an eight-row table (common practice).
pub(crate) const XOR3: u16 = 0x96;

/// A cut: sorted leaves (node indices) and the function over them (bit r:
/// the value when leaf k has bit k of r).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) struct Cut {
    /// Leaves, the first `size` used, the rest zero.
    pub leaves: [u32; MAX_LEAVES],
    /// Number of leaves.
    pub size: u8,
    /// Truth table over `2^size` rows.
    pub truth: u16,
}

impl Cut {
    /// The leaves in use.
    pub fn leaves(&self) -> &[u32] {
        &self.leaves[..self.size as usize]
    }

    fn new(leaves: &[u32], truth: u16) -> Cut {
        let mut arr = [0u32; MAX_LEAVES];
        arr[..leaves.len()].copy_from_slice(leaves);
        Cut {
            leaves: arr,
            size: leaves.len() as u8,
            truth: truth & row_mask(leaves.len() as u8),
        }
    }
}

/// The rows of a table over `leaves` leaves, as a mask.
pub(crate) fn row_mask(leaves: u8) -> u16 {
    ((1u32 << (1usize << leaves)) - 1) as u16
}

/// The truth table of a cut function moved onto a superset of its leaves.
fn expand(truth: u16, from: &[u32], to: &[u32]) -> u16 {
    let positions: Vec<usize> = from
        .iter()
        .map(|l| to.iter().position(|t| t == l).expect("superset"))
        .collect();
    let mut out = 0u16;
    for row in 0..(1usize << to.len()) {
        let mut index = 0;
        for (k, &p) in positions.iter().enumerate() {
            index |= ((row >> p) & 1) << k;
        }
        if (truth >> index) & 1 == 1 {
            out |= 1 << row;
        }
    }
    out
}

fn merged_leaves(cuts: &[&Cut]) -> Option<Vec<u32>> {
    let mut leaves: Vec<u32> = cuts
        .iter()
        .flat_map(|c| c.leaves().iter().copied())
        .collect();
    leaves.sort_unstable();
    leaves.dedup();
    (leaves.len() <= MAX_LEAVES).then_some(leaves)
}

/// The three-input majority with input phases `phases` (bit k: leaf k
/// complemented), as an eight-row table.
pub(crate) fn majority_table(phases: u8) -> u16 {
    let mut t = 0u16;
    for row in 0..8u8 {
        if (row ^ phases).count_ones() >= 2 {
            t |= 1 << row;
        }
    }
    t
}

/// The leaf phases under which an eight-row table is a majority, if it is
/// one.
pub(crate) fn majority_phases(truth: u16) -> Option<[bool; 3]> {
    (0..8u8).find_map(|phases| {
        let m = majority_table(phases);
        // maj(x', y', z') complemented = maj of the complements.
        let ph = if truth == m {
            phases
        } else if truth == !m & 0xFF {
            phases ^ 7
        } else {
            return None;
        };
        Some([ph & 1 != 0, ph & 2 != 0, ph & 4 != 0])
    })
}

/// Whether a cut's function is an XOR of all its two or three leaves, in
/// either phase.
pub(crate) fn is_xor(cut: &Cut) -> bool {
    match cut.size {
        2 => cut.truth == XOR2 || cut.truth == !XOR2 & 0xF,
        3 => cut.truth == XOR3 || cut.truth == !XOR3 & 0xFF,
        _ => false,
    }
}

/// 0 for a cut whose function is an XOR or a majority, 1 for other cuts of
/// at most two leaves, 2 for the rest.
fn rank(cut: &Cut) -> u8 {
    if is_xor(cut) || (cut.size == 3 && majority_phases(cut.truth).is_some()) {
        0
    } else if cut.size <= 2 {
        1
    } else {
        2
    }
}

/// Whether a four-row table depends on both of its leaves.
fn depends_on_both(t2: u16) -> bool {
    let t = t2 & 0xF;
    let on_first = (t & 0b0101) != ((t >> 1) & 0b0101);
    let on_second = (t & 0b0011) != ((t >> 2) & 0b0011);
    on_first && on_second
}

/// The cut of `cut`'s function with leaves `p` and `q` (positions) replaced
/// by node `g`, whose function of those two leaves is the four-row `t2`; `None`
/// when the function does not decompose through `g`.
fn substitute(cut: &Cut, p: usize, q: usize, g: u32, t2: u16) -> Option<Cut> {
    let leaves = cut.leaves();
    if leaves.contains(&g) {
        return None;
    }
    let mut rest: Vec<u32> = leaves
        .iter()
        .enumerate()
        .filter(|&(k, _)| k != p && k != q)
        .map(|(_, &l)| l)
        .collect();
    rest.push(g);
    rest.sort_unstable();
    // Position of each old leaf (other than p, q) and of g in the new cut.
    let at = |l: u32| rest.iter().position(|&r| r == l).expect("present");
    let g_at = at(g);
    let mut truth = 0u16;
    let mut seen = 0u16;
    for row in 0..(1usize << leaves.len()) {
        let gv = (t2 >> (((row >> p) & 1) | (((row >> q) & 1) << 1))) & 1;
        let mut index = (gv as usize) << g_at;
        for (k, &l) in leaves.iter().enumerate() {
            if k != p && k != q {
                index |= ((row >> k) & 1) << at(l);
            }
        }
        let value = (cut.truth >> row) & 1;
        if (seen >> index) & 1 == 1 {
            if (truth >> index) & 1 != value {
                return None;
            }
        } else {
            seen |= 1 << index;
            truth |= value << index;
        }
    }
    // g depends on both leaves, so every row of the new cut is reached.
    Some(Cut::new(&rest, truth))
}

/// Nodes by the pair of leaves of one of their two-leaf cuts, with the
/// function over that pair.
type PairIndex = FxHashMap<(u32, u32), Vec<(u32, u16)>>;

/// Computes up to [`CUTS_PER_NODE`] cuts of every node of `net` with
/// `needed` set, derived cuts included. With `forward`, a cut may also go
/// through a node built later than the node itself, when that node is a
/// gate whose fanins are exactly the two leaves it replaces (the caller
/// must then check that its choices form no cycle); otherwise every leaf
/// precedes its node.
pub(crate) fn enumerate_cuts(net: &Network, needed: &[bool], forward: bool) -> Vec<Vec<Cut>> {
    let (cuts, index) = cut_pass(net, needed, MAX_LEAVES, None);
    if forward {
        cut_pass(net, needed, MAX_LEAVES, Some(&index)).0
    } else {
        cuts
    }
}

/// Cuts of at most three leaves, without substitution: structural cut
/// enumeration only.
pub(crate) fn enumerate_plain_cuts(net: &Network, needed: &[bool]) -> Vec<Vec<Cut>> {
    cut_pass(net, needed, 3, None).0
}

/// Whether node `g`'s fanins are exactly the nodes `x` and `y`.
fn over_exactly(net: &Network, g: u32, x: u32, y: u32) -> bool {
    let f = net.fanins(crate::network::NodeId(g));
    f.len() == 2 && {
        let (a, b) = (f[0].node().0, f[1].node().0);
        (a, b) == (x, y) || (a, b) == (y, x)
    }
}

/// One pass of cut enumeration in node order; substitutions use the nodes
/// indexed so far, and with `later` also the later nodes of that index
/// that [`over_exactly`] the replaced pair.
fn cut_pass(
    net: &Network,
    needed: &[bool],
    max_leaves: usize,
    later: Option<&PairIndex>,
) -> (Vec<Vec<Cut>>, PairIndex) {
    let substituting = max_leaves == MAX_LEAVES;
    let mut cuts: Vec<Vec<Cut>> = vec![Vec::new(); net.num_nodes()];
    let mut by_pair = PairIndex::default();
    for id in net.node_ids() {
        let i = id.index();
        if !needed[i] {
            continue;
        }
        let trivial = Cut::new(&[i as u32], 0b10);
        if !net.is_gate(id) {
            cuts[i] = vec![trivial];
            continue;
        }
        let fanins = net.fanins(id);
        let kind = net.kind(id);
        let mut found: Vec<Cut> = Vec::new();
        let mut combine = |chosen: &[&Cut]| {
            let Some(leaves) = merged_leaves(chosen).filter(|l| l.len() <= max_leaves) else {
                return;
            };
            let mask = row_mask(leaves.len() as u8);
            let t: Vec<u16> = chosen
                .iter()
                .zip(fanins)
                .map(|(c, f)| {
                    let e = expand(c.truth, c.leaves(), &leaves);
                    if f.is_complemented() {
                        !e & mask
                    } else {
                        e
                    }
                })
                .collect();
            let truth = match kind {
                NodeKind::And => t[0] & t[1],
                NodeKind::Xor => t[0] ^ t[1],
                NodeKind::Maj => (t[0] & t[1]) | (t[0] & t[2]) | (t[1] & t[2]),
                NodeKind::Const | NodeKind::Input => unreachable!("gates only"),
            };
            let cut = Cut::new(&leaves, truth);
            if !found.iter().any(|c| c.leaves() == cut.leaves()) {
                found.push(cut);
            }
        };
        let c0 = &cuts[fanins[0].node().index()];
        let c1 = &cuts[fanins[1].node().index()];
        if kind == NodeKind::Maj {
            let c2 = &cuts[fanins[2].node().index()];
            for x in c0 {
                for y in c1 {
                    for z in c2 {
                        combine(&[x, y, z]);
                    }
                }
            }
        } else {
            for x in c0 {
                for y in c1 {
                    combine(&[x, y]);
                }
            }
        }
        // Cuts through nodes that already exist over two of the leaves.
        let mut derived = Vec::new();
        for cut in found.iter().filter(|c| substituting && c.size >= 3) {
            let l = cut.leaves();
            for p in 0..l.len() {
                for q in p + 1..l.len() {
                    let earlier = by_pair.get(&(l[p], l[q])).into_iter().flatten();
                    let after = later
                        .and_then(|index| index.get(&(l[p], l[q])))
                        .into_iter()
                        .flatten()
                        .filter(|&&(g, _)| g as usize > i && over_exactly(net, g, l[p], l[q]));
                    for &(g, t2) in earlier.chain(after) {
                        if let Some(d) = substitute(cut, p, q, g, t2) {
                            derived.push(d);
                        }
                    }
                }
            }
        }
        for d in derived {
            if !found.iter().any(|c| c.leaves() == d.leaves()) {
                found.push(d);
            }
        }
        found.sort_by_key(|c| (rank(c), c.size));
        found.truncate(CUTS_PER_NODE - 1);
        found.push(trivial);
        for c in found.iter().filter(|c| c.size == 2) {
            if depends_on_both(c.truth) {
                let nodes = by_pair.entry((c.leaves[0], c.leaves[1])).or_default();
                if nodes.len() < NODES_PER_PAIR {
                    nodes.push((i as u32, c.truth));
                }
            }
        }
        cuts[i] = found;
    }
    (cuts, by_pair)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Majority tables: maj(x, y, z) = 0xE8 (common practice); a
    /// complemented majority is a majority of complemented leaves.
    #[test]
    fn majority_tables() {
        assert_eq!(majority_table(0), 0xE8);
        assert_eq!(majority_phases(0xE8), Some([false; 3]));
        assert_eq!(majority_phases(!0xE8 & 0xFF), Some([true; 3]));
        assert_eq!(majority_phases(XOR3), None);
    }

    /// F(x, y, z, w) = maj(x OR y, z, w) decomposes through g = x OR y
    /// (four-row table 0b1110) into the majority over {g, z, w}; the XOR of
    /// all four leaves does not decompose through an OR.
    #[test]
    fn majority_through_an_existing_or_is_found() {
        let mut f = 0u16;
        let mut x4 = 0u16;
        for row in 0..16u16 {
            let (x, y, z, w) = (row & 1, (row >> 1) & 1, (row >> 2) & 1, (row >> 3) & 1);
            if (x | y) + z + w >= 2 {
                f |= 1 << row;
            }
            if (x ^ y ^ z ^ w) == 1 {
                x4 |= 1 << row;
            }
        }
        // Leaves 10, 11 (x, y), 12, 13 (z, w); g is node 20.
        let cut = Cut::new(&[10, 11, 12, 13], f);
        let d = substitute(&cut, 0, 1, 20, 0b1110).expect("decomposes");
        assert_eq!(d.leaves(), &[12, 13, 20]);
        assert_eq!(majority_phases(d.truth), Some([false; 3]));
        assert!(substitute(&Cut::new(&[10, 11, 12, 13], x4), 0, 1, 20, 0b1110).is_none());
        assert!(depends_on_both(0b1110) && !depends_on_both(0b1010));
    }
}
