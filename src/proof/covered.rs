//! Covered network equals input network, when balancing rebuilt the input.
//!
//! Balancing maps every input node that is not folded into a tree to a
//! literal of the covered network. For each such node, the input's cone
//! below it down to the nearest mapped nodes (its tree's leaves) must
//! compute the same function as the covered network below the node's image
//! down to the leaves' images:
//! - with at most six distinct leaf images, both cones are evaluated
//!   exhaustively as truth tables (this also covers XOR and majority nodes
//!   lowered to AND/OR logic);
//! - a wider AND tree (through uncomplemented edges) or XOR tree (through
//!   any edges) is compared as what it is, an operator over a set of leaves:
//!   both sides are flattened to their leaves and the sets (for XOR, the
//!   leaves counted modulo two and the complements' parity) must agree, as
//!   AND is associative, commutative and idempotent and XOR is associative,
//!   commutative and self-cancelling.
//!
//! Ports and outputs tie the ends together by name; induction over the
//! input's topological order then proves every output equal. Work is linear
//! in the two networks.

use super::cells::Refused;
use super::cone::{cone_equals, with_phase, ConeScratch, Leaves, MAX_CONE};
use crate::mapper::witness::NO_LIT;
use crate::network::{Lit, Network, NodeId, NodeKind};
use rayon::prelude::*;

fn refuse<T>(msg: impl Into<String>) -> Result<T, Refused> {
    Err(Refused(msg.into()))
}

/// Checks that `covered` computes the functions of `input`, given the
/// balancing map `map` (per input node, the raw literal of its image in
/// `covered`, or [`NO_LIT`]).
pub fn check_balanced(input: &Network, covered: &Network, map: &[u32]) -> Result<(), Refused> {
    if map.len() != input.num_nodes() {
        return refuse("the balancing map does not cover the input network");
    }
    let image = |l: Lit| -> Option<Lit> {
        let raw = map[l.node().index()];
        (raw != NO_LIT && (raw >> 1) < covered.num_nodes() as u32)
            .then(|| Lit::from_raw(raw).xor(l.is_complemented()))
    };
    if input.inputs().len() != covered.inputs().len()
        || input.outputs().len() != covered.outputs().len()
        || input.storage().len() != covered.storage().len()
    {
        return refuse("port counts differ");
    }
    for (name, id) in input.inputs() {
        let theirs = covered.inputs().get(name).map(|id| id.lit());
        if theirs.is_none() || image(id.lit()) != theirs {
            return refuse(format!("input '{name}' is not mapped to its namesake"));
        }
    }
    for (name, s) in input.storage() {
        let Some(theirs) = covered.storage().get(name) else {
            return refuse(format!("storage '{name}' is missing"));
        };
        if image(s.output.lit()) != Some(theirs.output.lit()) || image(s.next) != Some(theirs.next)
        {
            return refuse(format!("storage '{name}' is not mapped to its namesake"));
        }
    }
    for (name, &lit) in input.outputs() {
        if image(lit).is_none() || covered.outputs().get(name) != image(lit).as_ref() {
            return refuse(format!("output '{name}' is not mapped to its namesake"));
        }
    }
    if map[0] != Lit::FALSE.raw() && map[0] != NO_LIT {
        return refuse("the constant is not mapped to the constant");
    }
    let gates: Vec<u32> = input
        .node_ids()
        .filter(|&id| input.is_gate(id) && map[id.index()] != NO_LIT)
        .map(|id| id.0)
        .collect();
    gates
        .par_chunks(4096)
        .try_for_each_init(NodeCheck::default, |check, chunk| {
            for &node in chunk {
                check.node(input, covered, map, node)?;
            }
            Ok(())
        })
}

/// Scratch space of the per-node checks.
#[derive(Default)]
struct NodeCheck {
    leaves: Leaves,
    memo: Vec<(u32, u64)>,
    cone: ConeScratch,
    stack: Vec<Lit>,
    tree: Vec<Lit>,
    seen: Vec<u8>,
}

impl NodeCheck {
    fn node(
        &mut self,
        input: &Network,
        covered: &Network,
        map: &[u32],
        node: u32,
    ) -> Result<(), Refused> {
        let root = Lit::from_raw(map[node as usize]);
        self.leaves.clear();
        self.memo.clear();
        if let Some(mine) = self.input_word(input, map, node, true) {
            let equal = cone_equals(covered, root, &self.leaves, &mut self.cone, mine);
            return if equal == Some(true) {
                Ok(())
            } else {
                refuse(format!("input node {node} and its image {root} differ"))
            };
        }
        self.tree_check(input, covered, map, node, root)
    }

    /// The word of input node `node` over the images of its tree's leaves,
    /// or `None` past six leaves (or a too large cone).
    fn input_word(&mut self, input: &Network, map: &[u32], node: u32, root: bool) -> Option<u64> {
        if !root {
            let raw = map[node as usize];
            if raw != NO_LIT {
                let image = Lit::from_raw(raw);
                if image.node().0 == 0 {
                    return Some(with_phase(0, image.is_complemented()));
                }
                let w = self.leaves.word(image.node().0)?;
                return Some(with_phase(w, image.is_complemented()));
            }
            if let Some(&(_, w)) = self.memo.iter().find(|(n, _)| *n == node) {
                return Some(w);
            }
            if self.memo.len() >= MAX_CONE {
                return None;
            }
        }
        let id = NodeId(node);
        let f = input.fanins(id);
        let word = |this: &mut Self, l: Lit| -> Option<u64> {
            Some(with_phase(
                this.input_word(input, map, l.node().0, false)?,
                l.is_complemented(),
            ))
        };
        let w = match input.kind(id) {
            NodeKind::Const => 0,
            NodeKind::Input => return None,
            NodeKind::And => word(self, f[0])? & word(self, f[1])?,
            NodeKind::Xor => word(self, f[0])? ^ word(self, f[1])?,
            NodeKind::Maj => {
                let (a, b, c) = (word(self, f[0])?, word(self, f[1])?, word(self, f[2])?);
                (a & b) | (a & c) | (b & c)
            }
        };
        if !root {
            self.memo.push((node, w));
        }
        Some(w)
    }

    /// A wide AND or XOR tree: leaf sets compared (see the module comment).
    fn tree_check(
        &mut self,
        input: &Network,
        covered: &Network,
        map: &[u32],
        node: u32,
        root: Lit,
    ) -> Result<(), Refused> {
        let kind = input.kind(NodeId(node));
        let is_xor = match kind {
            NodeKind::And => false,
            NodeKind::Xor => true,
            _ => return refuse(format!("input node {node} has a cone too wide to check")),
        };
        // The input tree's leaves, as images.
        self.tree.clear();
        self.stack.clear();
        self.stack.extend_from_slice(input.fanins(NodeId(node)));
        let mut parity = false;
        while let Some(l) = self.stack.pop() {
            let raw = map[l.node().index()];
            if raw != NO_LIT {
                let image = Lit::from_raw(raw).xor(l.is_complemented());
                if is_xor {
                    parity ^= image.is_complemented();
                    self.tree.push(image.regular());
                } else {
                    self.tree.push(image);
                }
            } else if input.kind(l.node()) == kind && (is_xor || !l.is_complemented()) {
                parity ^= is_xor && l.is_complemented();
                self.stack.extend_from_slice(input.fanins(l.node()));
            } else {
                return refuse(format!("input node {node} has a mixed tree"));
            }
            if self.tree.len() + self.stack.len() > input.num_nodes() + 2 {
                return refuse("tree walk does not end");
            }
        }
        self.tree.sort_unstable();
        let expected_const = if is_xor {
            let mut kept: Vec<Lit> = Vec::with_capacity(self.tree.len());
            for &l in &self.tree {
                if kept.last() == Some(&l) {
                    kept.pop();
                } else {
                    kept.push(l);
                }
            }
            kept.retain(|&l| l != Lit::FALSE);
            self.tree = kept;
            self.tree.is_empty().then_some(Lit::FALSE.xor(parity))
        } else {
            self.tree.dedup();
            let contradiction = self.tree.windows(2).any(|w| w[0] == !w[1]);
            if contradiction || self.tree.contains(&Lit::FALSE) {
                Some(Lit::FALSE)
            } else {
                self.tree.retain(|&l| l != Lit::TRUE);
                self.tree.is_empty().then_some(Lit::TRUE)
            }
        };
        if let Some(c) = expected_const {
            return if root == c {
                Ok(())
            } else {
                refuse(format!("input node {node} should be constant"))
            };
        }
        if self.tree.len() == 1 {
            return if root == self.tree[0].xor(is_xor && parity) {
                Ok(())
            } else {
                refuse(format!("input node {node} should be its one leaf"))
            };
        }
        // Flatten the image and compare leaf sets.
        self.seen.clear();
        self.seen.resize(self.tree.len(), 0);
        self.stack.clear();
        let mut acc = false;
        if is_xor {
            acc = root.is_complemented();
            self.stack.push(root.regular());
        } else {
            self.stack.push(root);
        }
        let mut steps = 0usize;
        while let Some(l) = self.stack.pop() {
            steps += 1;
            if steps > 4 * self.tree.len() + 8 {
                return refuse(format!("the image of input node {node} is not its tree"));
            }
            if let Ok(k) = self.tree.binary_search(&l) {
                self.seen[k] ^= 1;
                if !is_xor && self.seen[k] == 0 {
                    self.seen[k] = 1;
                }
                continue;
            }
            let id = l.node();
            if covered.kind(id) != kind || (!is_xor && l.is_complemented()) {
                return refuse(format!("the image of input node {node} is not its tree"));
            }
            for &f in covered.fanins(id) {
                if is_xor {
                    acc ^= f.is_complemented();
                    self.stack.push(f.regular());
                } else {
                    self.stack.push(f);
                }
            }
        }
        if self.seen.iter().all(|&s| s == 1) && (!is_xor || acc == parity) {
            Ok(())
        } else {
            refuse(format!("the image of input node {node} has other leaves"))
        }
    }
}
