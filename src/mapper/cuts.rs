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
//! Storage is flat: leaves in one slab with `k` slots per cut (`u32`), the
//! cut's truth table (replicated `u64`, computed from the fanins' tables by
//! stretching them onto the merged leaves and applying the node's AND, XOR or
//! majority), and the match-table slot of its function.

use super::matches::MatchTable;
use super::small_truth::{majority, minimise_support, stretch, var};
use crate::network::{Network, NodeId, NodeKind};

const TRIVIAL: u32 = u32::MAX;

/// The kept cuts of every node, in flat arrays.
#[derive(Clone, Debug, Default)]
pub struct CutStore {
    k: usize,
    start: Vec<u32>,
    leaves: Vec<u32>,
    sizes: Vec<u8>,
    truths: Vec<u64>,
    slots: Vec<u32>,
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
        &self.leaves[c * self.k..c * self.k + self.sizes[c] as usize]
    }

    /// Truth table of cut `c` over its leaves.
    #[inline]
    pub fn truth(&self, c: usize) -> u64 {
        self.truths[c]
    }

    /// Match-table slot of cut `c` (`NO_SLOT` of the match table when unmatched).
    #[inline]
    pub fn slot(&self, c: usize) -> u32 {
        self.slots[c]
    }

    /// Total number of stored cuts.
    pub fn len(&self) -> usize {
        self.sizes.len()
    }

    /// True when no cut is stored.
    pub fn is_empty(&self) -> bool {
        self.sizes.is_empty()
    }

    /// Heap bytes held.
    pub fn memory_bytes(&self) -> usize {
        self.start.capacity() * 4
            + self.leaves.capacity() * 4
            + self.sizes.capacity()
            + self.truths.capacity() * 8
            + self.slots.capacity() * 4
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
            self.start.push(self.sizes.len() as u32);
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
        let with_trivial = |f: u32, store: &CutStore| {
            std::iter::once(TRIVIAL).chain(store.cuts(f as usize).map(|c| c as u32))
        };
        let f0 = fanins[0].node().0;
        let f1 = fanins[1].node().0;
        let triv0 = [f0];
        let triv1 = [f1];
        let mut pair = [0u32; 6];
        let mut out = [0u32; 6];
        for c0 in with_trivial(f0, self) {
            let a: &[u32] = if c0 == TRIVIAL {
                &triv0
            } else {
                self.leaves(c0 as usize)
            };
            for c1 in with_trivial(f1, self) {
                let b: &[u32] = if c1 == TRIVIAL {
                    &triv1
                } else {
                    self.leaves(c1 as usize)
                };
                let Some(n) = merge(a, b, k, &mut pair) else {
                    continue;
                };
                if kind == NodeKind::Maj {
                    let f2 = fanins[2].node().0;
                    let triv2 = [f2];
                    for c2 in with_trivial(f2, self) {
                        let c: &[u32] = if c2 == TRIVIAL {
                            &triv2
                        } else {
                            self.leaves(c2 as usize)
                        };
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
            self.leaves.extend_from_slice(&leaves[..size]);
            self.leaves.extend(std::iter::repeat_n(0, k - size));
            self.sizes.push(size as u8);
            self.truths.push(t);
            self.slots.push(table.slot(t));
        }
        self.start.push(self.sizes.len() as u32);
    }
}
