//! Tree balancing before covering: the shape of AND, OR and XOR trees in the
//! input must not decide the mapped result.
//!
//! A maximal tree of one associative operator whose internal nodes have a
//! single fanout (AND over uncomplemented edges, which also covers OR trees
//! through complemented leaves and root; XOR through any edges) is collapsed
//! into its list of leaves, and rebuilt as a tree of groups of `width`
//! leaves, where `width` is the widest cell of that operator class in the
//! library (three with `and3`/`xor3`). Each group becomes a chain of binary
//! nodes with single-fanout internal nodes, so the cut enumerator sees it as
//! one `width`-leaf cut. Groups are formed shallowest-first (Huffman
//! style on levels counted in groups), so late-arriving leaves enter near
//! the root, and the first group takes the remainder, so `n` leaves need
//! `ceil((n - 1) / (width - 1))` groups.
//!
//! The same pass lowers node kinds the library cannot match at all: XOR into
//! AND/OR and majority into AND/OR, so every node has a match.

use crate::network::{Lit, Network, NodeId, NodeKind};
use std::cmp::Reverse;
use std::collections::BinaryHeap;

/// How trees are rebuilt.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct BalanceOptions {
    /// Leaves per group of AND/OR trees (at least 2).
    pub and_width: usize,
    /// Leaves per group of XOR trees (at least 2).
    pub xor_width: usize,
    /// When false, XOR nodes are rebuilt as AND/OR logic.
    pub keep_xor: bool,
    /// When false, majority nodes are rebuilt as AND/OR logic.
    pub keep_maj: bool,
}

struct Builder {
    out: Network,
    /// Level of every node of `out`, counted in groups.
    level: Vec<u32>,
    keep_xor: bool,
    /// The tree builder's queue, kept to reuse its buffer.
    heap: BinaryHeap<Reverse<(u32, u32, u32)>>,
}

impl Builder {
    fn level_of(&self, l: Lit) -> u32 {
        self.level.get(l.node().index()).copied().unwrap_or(0)
    }

    fn note(&mut self, l: Lit, level: u32) {
        let i = l.node().index();
        if self.level.len() <= i {
            self.level.resize(i + 1, level);
        }
    }

    fn and(&mut self, a: Lit, b: Lit) -> Lit {
        let lv = self.level_of(a).max(self.level_of(b)) + 1;
        let r = self.out.and(a, b);
        self.note(r, lv);
        r
    }

    fn xor(&mut self, a: Lit, b: Lit) -> Lit {
        if self.keep_xor {
            let lv = self.level_of(a).max(self.level_of(b)) + 1;
            let r = self.out.xor(a, b);
            self.note(r, lv);
            r
        } else {
            let p = self.and(a, !b);
            let q = self.and(!a, b);
            !self.and(!p, !q)
        }
    }

    /// Builds the operator over `leaves` as groups of `width`.
    fn tree(&mut self, leaves: &[Lit], width: usize, is_xor: bool) -> Lit {
        let width = width.max(2);
        let mut heap = std::mem::take(&mut self.heap);
        heap.clear();
        for (seq, &l) in leaves.iter().enumerate() {
            heap.push(Reverse((self.level_of(l), seq as u32, l.raw())));
        }
        let mut seq = leaves.len() as u32;
        let m = leaves.len();
        let rem = (m - 1) % (width - 1);
        let mut group = if rem == 0 { width } else { rem + 1 };
        while heap.len() > 1 {
            let take = group.min(heap.len());
            let before = self.out.num_nodes();
            let mut acc: Option<Lit> = None;
            let mut top = 0;
            for _ in 0..take {
                let Reverse((lv, _, raw)) = heap.pop().expect("counted");
                let l = Lit::from_raw(raw);
                top = top.max(lv);
                acc = Some(match acc {
                    None => l,
                    Some(a) if is_xor => self.xor(a, l),
                    Some(a) => self.and(a, l),
                });
            }
            let r = acc.expect("group is not empty");
            let i = r.node().index();
            if i >= before && i < self.level.len() {
                // A new group output sits one group above its deepest leaf.
                self.level[i] = top + 1;
            }
            heap.push(Reverse((self.level_of(r), seq, r.raw())));
            seq += 1;
            group = width;
        }
        let Reverse((_, _, raw)) = heap.pop().expect("one left");
        self.heap = heap;
        Lit::from_raw(raw)
    }
}

/// Rebuilds `net` with balanced operator trees (see the module comment).
/// Ports and storage are kept by name; the result computes the same
/// functions.
pub fn balance(net: &Network, opts: &BalanceOptions) -> Network {
    balance_with_map(net, opts).0
}

/// [`balance`], also returning for every node of `net` the raw literal of
/// the balanced network it became: the witness the proof checks (see
/// [`crate::proof`]). Nodes folded into a tree, and nodes no output reads,
/// get [`super::witness::NO_LIT`].
pub fn balance_with_map(net: &Network, opts: &BalanceOptions) -> (Network, Vec<u32>) {
    let n = net.num_nodes();
    let fanout = net.fanout_counts();
    let reach = net.reachable();
    let mut absorbed = vec![false; n];
    for id in net.node_ids() {
        let kind = net.kind(id);
        if !matches!(kind, NodeKind::And | NodeKind::Xor) || !reach[id.index()] {
            continue;
        }
        for &f in net.fanins(id) {
            let c = f.node();
            if net.kind(c) == kind
                && fanout[c.index()] == 1
                && (kind == NodeKind::Xor || !f.is_complemented())
            {
                absorbed[c.index()] = true;
            }
        }
    }
    let mut b = Builder {
        out: net.empty_like(),
        level: Vec::new(),
        keep_xor: opts.keep_xor,
        heap: BinaryHeap::new(),
    };
    b.out.reserve(n);
    b.level.resize(b.out.num_nodes(), 0);
    let mut map = vec![Lit::FALSE; n];
    for (id, lit) in net
        .combinational_inputs()
        .iter()
        .zip(net.port_map_into(&b.out))
    {
        map[id.index()] = lit;
    }
    let m = |map: &Vec<Lit>, l: Lit| map[l.node().index()].xor(l.is_complemented());
    let mut stack: Vec<Lit> = Vec::new();
    let mut leaves: Vec<Lit> = Vec::new();
    let mut kept: Vec<Lit> = Vec::new();
    for id in net.node_ids() {
        let i = id.index();
        if !reach[i] || absorbed[i] {
            continue;
        }
        match net.kind(id) {
            NodeKind::Const | NodeKind::Input => {}
            NodeKind::Maj => {
                let f = net.fanins(id);
                let (x, y, z) = (m(&map, f[0]), m(&map, f[1]), m(&map, f[2]));
                map[i] = if opts.keep_maj {
                    let lv = b.level_of(x).max(b.level_of(y)).max(b.level_of(z)) + 1;
                    let r = b.out.maj(x, y, z);
                    b.note(r, lv);
                    r
                } else {
                    let xy = b.and(x, y);
                    let o = !b.and(!x, !y);
                    let zo = b.and(z, o);
                    !b.and(!xy, !zo)
                };
            }
            kind @ (NodeKind::And | NodeKind::Xor) => {
                let is_xor = kind == NodeKind::Xor;
                leaves.clear();
                let mut parity = false;
                stack.clear();
                stack.extend_from_slice(net.fanins(id));
                while let Some(l) = stack.pop() {
                    let c = l.node();
                    if absorbed[c.index()] {
                        if is_xor {
                            parity ^= l.is_complemented();
                        }
                        stack.extend_from_slice(net.fanins(c));
                    } else {
                        let mapped = m(&map, l);
                        if is_xor {
                            parity ^= mapped.is_complemented();
                            leaves.push(mapped.regular());
                        } else {
                            leaves.push(mapped);
                        }
                    }
                }
                leaves.sort_unstable();
                let value = if is_xor {
                    // Pairs cancel.
                    kept.clear();
                    for &l in &leaves {
                        if kept.last() == Some(&l) {
                            kept.pop();
                        } else {
                            kept.push(l);
                        }
                    }
                    kept.retain(|&l| l != Lit::FALSE);
                    if kept.is_empty() {
                        Lit::FALSE
                    } else {
                        b.tree(&kept, opts.xor_width, true)
                    }
                    .xor(parity)
                } else {
                    leaves.dedup();
                    let contradiction = leaves.windows(2).any(|w| w[0] == !w[1]);
                    if contradiction || leaves.contains(&Lit::FALSE) {
                        Lit::FALSE
                    } else {
                        leaves.retain(|&l| l != Lit::TRUE);
                        if leaves.is_empty() {
                            Lit::TRUE
                        } else {
                            b.tree(&leaves, opts.and_width, false)
                        }
                    }
                };
                map[i] = value;
            }
        }
    }
    let mut out = b.out;
    out.connect_outputs_from(net, &map);
    let mut witness: Vec<u32> = map.iter().map(|l| l.raw()).collect();
    for (i, w) in witness.iter_mut().enumerate() {
        let source = matches!(
            net.kind(NodeId(i as u32)),
            NodeKind::Const | NodeKind::Input
        );
        if !source && (!reach[i] || absorbed[i]) {
            *w = super::witness::NO_LIT;
        }
    }
    (out, witness)
}
