//! Priority cuts: the few best k-feasible cuts of every node.
//!
//! A cut of node `n` is a set of at most `k` nodes (leaves) such that every
//! path from a combinational input to `n` passes through a leaf. Enumerating
//! all cuts grows exponentially, so each node keeps only the `C` best
//! (priority cuts) under the cost measure of the current pass: for delay,
//! the latest leaf arrival, then the summed leaf area flow; for area the
//! other way round. Candidates come from merging one cut (or the trivial
//! cut) of every fanin; a candidate that contains an already kept cut is
//! dominated and dropped. The trivial cut `{n}` is implicit and always
//! available to the fanouts.
//!
//! Storage is flat: one record of `k + 1` words per cut (the match-table
//! slot of its function and its leaf count, then the leaves, `u32`) and the
//! cut's truth table (replicated `u64`, computed from the fanins' tables by
//! stretching them onto the merged leaves and applying the node's AND, XOR or
//! majority), which is dropped once enumeration is over.

use super::matches::{MatchTable, NO_SLOT};
use super::small_truth::{majority, minimise_support, stretch, var};
use crate::network::{Network, NodeId, NodeKind};

const TRIVIAL: u32 = u32::MAX;

/// Bits of a record header holding the match-table slot.
const SLOT_BITS: u32 = 28;
const SLOT_MASK: u32 = (1 << SLOT_BITS) - 1;

/// The kept cuts of every node, in flat arrays.
///
/// Each cut is one record of `k + 1` words in `records`: a header (leaf
/// count in the top four bits, match-table slot below) followed by `k` leaf
/// slots, so the walks of the cover read a cut's slot and leaves from one
/// place. Truth tables sit in their own array, needed only while fanouts
/// are still being enumerated ([`CutStore::release_truths`]).
#[derive(Clone, Debug, Default)]
pub struct CutStore {
    k: usize,
    start: Vec<u32>,
    records: Vec<u32>,
    truths: Vec<u64>,
    /// Bytes held just before the truth tables were released.
    peak_bytes: usize,
}

/// A candidate cut while a node's cuts are being selected.
#[derive(Clone, Copy, Debug)]
struct Candidate {
    leaves: [u32; 6],
    size: u8,
    sign: u64,
    from: [u32; 3],
    key: (f32, f32),
}

/// Reusable buffers for enumeration.
#[derive(Default)]
pub struct Scratch {
    kept: Vec<Candidate>,
    /// Per fanin: cut index (or the trivial marker) and leaf signature.
    fanin_cuts: [Vec<(u32, u64)>; 3],
}

#[inline]
fn signature(leaves: &[u32]) -> u64 {
    leaves.iter().fold(0, |s, &l| s | 1u64 << (l & 63))
}

/// Merges two sorted leaf lists; `None` when the union exceeds `k`.
#[inline]
fn merge(a: &[u32], b: &[u32], k: usize, out: &mut [u32; 6]) -> Option<usize> {
    let (mut i, mut j, mut n) = (0, 0, 0);
    while i < a.len() || j < b.len() {
        let x = if j == b.len() || (i < a.len() && a[i] < b[j]) {
            i += 1;
            a[i - 1]
        } else if i == a.len() || b[j] < a[i] {
            j += 1;
            b[j - 1]
        } else {
            i += 1;
            j += 1;
            a[i - 1]
        };
        if n == k {
            return None;
        }
        out[n] = x;
        n += 1;
    }
    Some(n)
}

#[inline]
fn is_subset(small: &[u32], big: &[u32]) -> bool {
    let mut j = 0;
    for &x in small {
        while j < big.len() && big[j] < x {
            j += 1;
        }
        if j == big.len() || big[j] != x {
            return false;
        }
        j += 1;
    }
    true
}

impl CutStore {
    /// An empty store for cuts of at most `k` leaves.
    pub fn new(k: usize, nodes: usize) -> CutStore {
        let mut s = CutStore {
            k,
            ..CutStore::default()
        };
        s.start.reserve(nodes + 1);
        s.start.push(0);
        s
    }

    /// Range of global cut indices of `node` (nodes must be added in order).
    #[inline]
    pub fn cuts(&self, node: usize) -> std::ops::Range<usize> {
        self.start[node] as usize..self.start[node + 1] as usize
    }

    /// Leaves of cut `c`, sorted.
    #[inline]
    pub fn leaves(&self, c: usize) -> &[u32] {
        let at = c * (self.k + 1);
        let size = (self.records[at] >> SLOT_BITS) as usize;
        &self.records[at + 1..at + 1 + size]
    }

    /// Truth table of cut `c` over its leaves (until
    /// [`CutStore::release_truths`]).
    #[inline]
    pub fn truth(&self, c: usize) -> u64 {
        self.truths[c]
    }

    /// Match-table slot of cut `c` (`NO_SLOT` of the match table when unmatched).
    #[inline]
    pub fn slot(&self, c: usize) -> u32 {
        let slot = self.records[c * (self.k + 1)] & SLOT_MASK;
        if slot == SLOT_MASK {
            NO_SLOT
        } else {
            slot
        }
    }

    /// Match-table slot and leaves of cut `c` in one read.
    #[inline]
    pub fn slot_and_leaves(&self, c: usize) -> (u32, &[u32]) {
        let at = c * (self.k + 1);
        let header = self.records[at];
        let size = (header >> SLOT_BITS) as usize;
        let slot = header & SLOT_MASK;
        let slot = if slot == SLOT_MASK { NO_SLOT } else { slot };
        (slot, &self.records[at + 1..at + 1 + size])
    }

    /// Total number of stored cuts.
    pub fn len(&self) -> usize {
        self.records.len() / (self.k + 1)
    }

    /// True when no cut is stored.
    pub fn is_empty(&self) -> bool {
        self.records.is_empty()
    }

    /// Frees the truth tables (once every node is enumerated, nothing reads
    /// them) and the growth slack of the other arrays.
    pub fn release_truths(&mut self) {
        self.peak_bytes = self.peak_bytes.max(self.memory_bytes());
        self.truths = Vec::new();
        self.records.shrink_to_fit();
        self.start.shrink_to_fit();
    }

    /// Heap bytes held now.
    pub fn memory_bytes(&self) -> usize {
        self.start.capacity() * 4 + self.records.capacity() * 4 + self.truths.capacity() * 8
    }

    /// Most heap bytes held at any time (before the truth tables were
    /// released, or now).
    pub fn peak_memory_bytes(&self) -> usize {
        self.peak_bytes.max(self.memory_bytes())
    }

    /// Enumerates and stores the cuts of `node` (which must be the next node
    /// in index order). `leaf_cost(l)` gives the arrival and area flow of
    /// leaf node `l`; `area_first` ranks by area flow before arrival.
    #[allow(clippy::too_many_arguments)]
    pub fn enumerate(
        &mut self,
        net: &Network,
        node: NodeId,
        limit: usize,
        area_first: bool,
        table: &MatchTable,
        leaf_cost: impl Fn(u32) -> (f32, f32),
        scratch: &mut Scratch,
    ) {
        let kind = net.kind(node);
        if !net.is_gate(node) {
            self.start.push(self.len() as u32);
            return;
        }
        let fanins = net.fanins(node);
        let k = self.k;
        let kept = &mut scratch.kept;
        kept.clear();
        let consider =
            |kept: &mut Vec<Candidate>, leaves: [u32; 6], size: usize, from: [u32; 3]| {
                let ls = &leaves[..size];
                let mut arrival = 0f32;
                let mut flow = 0f32;
                for &l in ls {
                    let (a, f) = leaf_cost(l);
                    arrival = arrival.max(a);
                    flow += f;
                }
                let key = if area_first {
                    (flow, arrival)
                } else {
                    (arrival, flow)
                };
                let worse = |x: &Candidate| {
                    (x.key.0, x.key.1, x.size)
                        .partial_cmp(&(key.0, key.1, size as u8))
                        .is_some_and(|o| o.is_gt())
                };
                if kept.len() >= limit && !worse(kept.last().expect("full")) {
                    return;
                }
                let sign = signature(ls);
                for x in kept.iter() {
                    if x.sign & !sign == 0
                        && x.size as usize <= size
                        && is_subset(&x.leaves[..x.size as usize], ls)
                    {
                        return;
                    }
                }
                kept.retain(|x| {
                    !(sign & !x.sign == 0
                        && size <= x.size as usize
                        && is_subset(ls, &x.leaves[..x.size as usize]))
                });
                let pos = kept.iter().position(worse).unwrap_or(kept.len());
                kept.insert(
                    pos,
                    Candidate {
                        leaves,
                        size: size as u8,
                        sign,
                        from,
                        key,
                    },
                );
                kept.truncate(limit);
            };
        // Per fanin: its cuts (the trivial one first) with their leaf
        // signatures, so merges whose union is certainly too large are
        // skipped without walking the leaves (a signature folds leaves onto
        // 64 bits, so its population count never exceeds the leaf count).
        let arity = if kind == NodeKind::Maj { 3 } else { 2 };
        let lists = &mut scratch.fanin_cuts;
        for (f, list) in fanins.iter().zip(lists.iter_mut()).take(arity) {
            let n = f.node().0;
            list.clear();
            list.push((TRIVIAL, 1u64 << (n & 63)));
            for c in self.cuts(n as usize) {
                list.push((c as u32, signature(self.leaves(c))));
            }
        }
        fn leaves_of<'s>(store: &'s CutStore, c: u32, triv: &'s [u32; 1]) -> &'s [u32] {
            if c == TRIVIAL {
                &triv[..]
            } else {
                store.leaves(c as usize)
            }
        }
        let f0 = fanins[0].node().0;
        let f1 = fanins[1].node().0;
        let triv0 = [f0];
        let triv1 = [f1];
        let triv2 = [fanins[arity - 1].node().0];
        let mut pair = [0u32; 6];
        let mut out = [0u32; 6];
        let k_bits = k as u32;
        for &(c0, s0) in &lists[0] {
            let a = leaves_of(self, c0, &triv0);
            for &(c1, s1) in &lists[1] {
                let s01 = s0 | s1;
                if s01.count_ones() > k_bits {
                    continue;
                }
                let b = leaves_of(self, c1, &triv1);
                let Some(n) = merge(a, b, k, &mut pair) else {
                    continue;
                };
                if arity == 3 {
                    for &(c2, s2) in &lists[2] {
                        if (s01 | s2).count_ones() > k_bits {
                            continue;
                        }
                        let c = leaves_of(self, c2, &triv2);
                        if let Some(m) = merge(&pair[..n], c, k, &mut out) {
                            consider(kept, out, m, [c0, c1, c2]);
                        }
                    }
                } else {
                    consider(kept, pair, n, [c0, c1, TRIVIAL]);
                }
            }
        }
        // The cut of the fanins is always kept: its function is the node's
        // own AND, XOR or majority, which the library is known to match.
        let mut direct = [0u32; 6];
        let mut size = 0;
        for f in fanins {
            direct[size] = f.node().0;
            size += 1;
        }
        direct[..size].sort_unstable();
        let present = kept
            .iter()
            .any(|c| c.size as usize == size && c.leaves[..size] == direct[..size]);
        if !present {
            kept.push(Candidate {
                leaves: direct,
                size: size as u8,
                sign: signature(&direct[..size]),
                from: [TRIVIAL; 3],
                key: (0.0, 0.0),
            });
        }
        // Truth tables, support minimisation and matching of the kept cuts.
        for cand in kept.iter() {
            let size = cand.size as usize;
            let to = &cand.leaves[..size];
            let mut tables = [0u64; 3];
            for (i, f) in fanins.iter().enumerate() {
                let c = cand.from[i];
                let t = if c == TRIVIAL {
                    stretch(var(0), &[f.node().0], to)
                } else {
                    stretch(self.truths[c as usize], self.leaves(c as usize), to)
                };
                tables[i] = if f.is_complemented() { !t } else { t };
            }
            let mut t = match kind {
                NodeKind::And => tables[0] & tables[1],
                NodeKind::Xor => tables[0] ^ tables[1],
                _ => majority(tables[0], tables[1], tables[2]),
            };
            let mut leaves = cand.leaves;
            let size = minimise_support(&mut t, &mut leaves, size);
            if size <= 1 {
                continue;
            }
            let slot = table.slot(t);
            let slot = if slot == NO_SLOT || slot >= SLOT_MASK {
                SLOT_MASK
            } else {
                slot
            };
            self.records.push(((size as u32) << SLOT_BITS) | slot);
            self.records.extend_from_slice(&leaves[..size]);
            self.records.extend(std::iter::repeat_n(0, k - size));
            self.truths.push(t);
        }
        self.start.push(self.len() as u32);
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::library::Library;
    use crate::mapper::match_table;
    use crate::network::exhaustive_word;

    /// Every stored cut's truth table agrees with exhaustive simulation of
    /// the network (all 64 patterns of six inputs): on each pattern, the
    /// node's value is the table's bit at the row formed by its leaves'
    /// values. Records keep slot and leaves after the tables are released.
    #[test]
    fn cut_truth_tables_agree_with_exhaustive_simulation() {
        let mut net = Network::new("mixed");
        let x: Vec<_> = (0..6)
            .map(|i| net.add_input(format!("x{i}")).expect("fresh name"))
            .collect();
        let s0 = net.xor(x[0], x[1]);
        let c0 = net.and(x[0], x[1]);
        let p = net_xor3(&mut net, x[2], x[3], c0);
        let s1 = net.xor(p, s0);
        let m = net.maj(x[2], !x[3], c0);
        let a = net.and(!m, x[4]);
        let o = net.or(a, s1);
        let t = net.maj(o, x[5], !s0);
        let v = net.and(x[4], !x[5]);
        let u = net.xor(t, v);
        net.add_output("u", u).expect("fresh output");
        net.add_output("m", m).expect("fresh output");

        let lib = Library::builtin("nand-nor-inv").expect("built-in library");
        let table = match_table(&lib);
        let words: Vec<u64> = (0..6).map(|k| exhaustive_word(k, 0)).collect();
        let values = net.simulate(&words);
        for k in [3, 4] {
            let mut store = CutStore::new(k, net.num_nodes());
            let mut scratch = Scratch::default();
            for id in net.node_ids() {
                store.enumerate(&net, id, 6, false, &table, |_| (0.0, 0.0), &mut scratch);
            }
            let mut records = Vec::new();
            let mut checked = 0;
            for id in net.node_ids() {
                for c in store.cuts(id.index()) {
                    let leaves = store.leaves(c);
                    assert!(leaves.len() <= k && leaves.windows(2).all(|w| w[0] < w[1]));
                    let truth = store.truth(c);
                    for p in 0..64 {
                        let row = leaves
                            .iter()
                            .enumerate()
                            .fold(0, |r, (v, &l)| r | ((values[l as usize] >> p) & 1) << v);
                        assert_eq!((truth >> row) & 1, (values[id.index()] >> p) & 1);
                    }
                    assert_eq!(store.slot_and_leaves(c), (store.slot(c), leaves));
                    records.push((store.slot(c), leaves.to_vec()));
                    checked += 1;
                }
            }
            assert!(checked > net.gate_count());
            store.release_truths();
            let after: Vec<_> = (0..store.len())
                .map(|c| (store.slot(c), store.leaves(c).to_vec()))
                .collect();
            assert_eq!(after, records);
        }
    }

    fn net_xor3(
        net: &mut Network,
        a: crate::network::Lit,
        b: crate::network::Lit,
        c: crate::network::Lit,
    ) -> crate::network::Lit {
        let ab = net.xor(a, b);
        net.xor(ab, c)
    }
}
