//! Candidate equivalence classes from simulation.
//!
//! Every node of the miter gets a signature: its values on a few thousand
//! random input patterns. Nodes with the same signature up to complement are
//! candidates for being the same function. Signatures are normalised so that
//! the first pattern's bit is 0 (the node's *phase* records whether it was
//! complemented), so `f` and `!f` fall into one class. The first member of a
//! class in index (topological) order is its representative; the sweep tries
//! to prove every later member equal to it.
//!
//! Counterexamples from the SAT solver are new patterns: [`Classes::refine`]
//! splits classes by the values the nodes take on them, which is what keeps
//! the number of failed proofs small.

use crate::network::{Network, NodeId, SplitMix64};

const NO_CLASS: u32 = u32::MAX;

/// Candidate equivalence classes of miter nodes, up to complement.
pub(crate) struct Classes {
    /// Value of each node on the first pattern (the normalisation phase).
    phase: Vec<bool>,
    /// Class of each node, or `NO_CLASS` for nodes alone in theirs.
    class_of: Vec<u32>,
    /// Members of each class in increasing index order.
    members: Vec<Vec<u32>>,
}

/// The random input words of simulation word `w` (one word per
/// combinational input), as [`random_signatures`] draws them.
pub(crate) fn random_input_words(network: &Network, seed: u64, w: usize) -> Vec<u64> {
    let ci = network.combinational_inputs().len();
    let mut rng = SplitMix64::new(seed);
    for _ in 0..w * ci {
        rng.next();
    }
    (0..ci).map(|_| rng.next()).collect()
}

/// Simulates `network` on `words` words of random patterns and returns the
/// flat signature table (`words` values a node, node-major).
pub(crate) fn random_signatures(network: &Network, words: usize, seed: u64) -> Vec<u64> {
    let n = network.num_nodes();
    let ci = network.combinational_inputs().len();
    let mut rng = SplitMix64::new(seed);
    let mut table = vec![0u64; n * words];
    let mut values = Vec::new();
    for w in 0..words {
        let ci_words: Vec<u64> = (0..ci).map(|_| rng.next()).collect();
        network.simulate_into(&ci_words, &mut values);
        for (node, &v) in values.iter().enumerate() {
            table[node * words + w] = v;
        }
    }
    table
}

impl Classes {
    /// No candidates at all (every node alone).
    pub fn none(nodes: usize) -> Classes {
        Classes {
            phase: vec![false; nodes],
            class_of: vec![NO_CLASS; nodes],
            members: Vec::new(),
        }
    }

    /// Groups the nodes of a network by signature (`words` words a node in
    /// `signatures`), up to complement.
    pub fn from_signatures(signatures: &[u64], words: usize) -> Classes {
        let n = signatures.len() / words.max(1);
        let words = words.max(1);
        let phase: Vec<bool> = (0..n).map(|i| signatures[i * words] & 1 == 1).collect();
        let normalised = |i: usize, w: usize| {
            let v = signatures[i * words + w];
            if phase[i] {
                !v
            } else {
                v
            }
        };
        let mut order: Vec<u32> = (0..n as u32).collect();
        order.sort_unstable_by(|&x, &y| {
            let (x, y) = (x as usize, y as usize);
            for w in 0..words {
                let c = normalised(x, w).cmp(&normalised(y, w));
                if c != std::cmp::Ordering::Equal {
                    return c;
                }
            }
            x.cmp(&y)
        });
        let mut class_of = vec![NO_CLASS; n];
        let mut members = Vec::new();
        let mut start = 0;
        while start < order.len() {
            let first = order[start] as usize;
            let mut end = start + 1;
            while end < order.len()
                && (0..words).all(|w| normalised(order[end] as usize, w) == normalised(first, w))
            {
                end += 1;
            }
            if end - start >= 2 {
                let id = members.len() as u32;
                let group: Vec<u32> = order[start..end].to_vec();
                for &m in &group {
                    class_of[m as usize] = id;
                }
                members.push(group);
            }
            start = end;
        }
        Classes {
            phase,
            class_of,
            members,
        }
    }

    /// The representative of `node`'s class when it is an earlier node, with
    /// the complement relating them (`node == representative ^ complement` is
    /// the candidate equivalence).
    pub fn representative(&self, node: NodeId) -> Option<(NodeId, bool)> {
        let class = self.class_of[node.index()];
        if class == NO_CLASS {
            return None;
        }
        let first = self.members[class as usize][0];
        if first >= node.0 {
            return None;
        }
        Some((
            NodeId(first),
            self.phase[node.index()] ^ self.phase[first as usize],
        ))
    }

    /// Number of classes with at least two members.
    pub fn count(&self) -> usize {
        self.members.iter().filter(|m| m.len() >= 2).count()
    }

    /// Splits classes by new patterns: `values` holds one word per node, of
    /// which the bits in `valid` are meaningful. Only classes with a member at
    /// or after `from` are looked at (earlier ones are settled). Returns how
    /// many classes were split off.
    pub fn refine(&mut self, values: &[u64], valid: u64, from: NodeId) -> usize {
        let mut created = 0;
        let mut groups: Vec<(u64, Vec<u32>)> = Vec::new();
        for class in 0..self.members.len() {
            let group = &self.members[class];
            if group.len() < 2 || *group.last().expect("non-empty") < from.0 {
                continue;
            }
            let key = |m: u32| {
                let v = values[m as usize];
                (if self.phase[m as usize] { !v } else { v }) & valid
            };
            let first_key = key(group[0]);
            if group.iter().all(|&m| key(m) == first_key) {
                continue;
            }
            groups.clear();
            for &m in group {
                let k = key(m);
                match groups.iter_mut().find(|(g, _)| *g == k) {
                    Some((_, list)) => list.push(m),
                    None => groups.push((k, vec![m])),
                }
            }
            let mut iter = std::mem::take(&mut groups).into_iter();
            let (_, kept) = iter.next().expect("first member's group");
            for (_, list) in iter {
                if list.len() >= 2 {
                    let id = self.members.len() as u32;
                    for &m in &list {
                        self.class_of[m as usize] = id;
                    }
                    self.members.push(list);
                    created += 1;
                } else {
                    self.class_of[list[0] as usize] = NO_CLASS;
                }
            }
            if kept.len() < 2 {
                self.class_of[kept[0] as usize] = NO_CLASS;
            }
            self.members[class] = kept;
        }
        created
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn classes_group_up_to_complement_and_split_on_new_patterns() {
        // Node words: 0 const, 1 = 0b0110, 2 = !1, 3 = 0b0010, 4 = 0b0110.
        let sig = [0u64, 0b0110, !0b0110, 0b0010, 0b0110];
        let mut c = Classes::from_signatures(&sig, 1);
        assert_eq!(c.representative(NodeId(2)), Some((NodeId(1), true)));
        assert_eq!(c.representative(NodeId(4)), Some((NodeId(1), false)));
        assert_eq!(c.representative(NodeId(1)), None);
        assert_eq!(c.representative(NodeId(3)), None);
        // A new pattern on which node 4 differs from node 1.
        let new = [0u64, 1, 0, 0, 0];
        assert_eq!(c.refine(&new, 1, NodeId(0)), 0);
        assert_eq!(c.representative(NodeId(4)), None);
        assert_eq!(c.representative(NodeId(2)), Some((NodeId(1), true)));
    }
}
