//! Functional reduction by SAT sweeping: nodes that compute the same
//! function up to complement are merged into one.
//!
//! Random simulation groups the nodes into candidate classes (the
//! equivalence checker's [`Classes`]); the network is then copied node by
//! node in topological order, and each copied node is compared with the
//! image of its class representative by the incremental SAT [`Oracle`].
//! A proven pair is merged (the node takes the representative's image, so
//! everything above is built on it and structural hashing finds further
//! merges for free); a refuted pair refines the classes with the
//! counterexample; a query stopped by the work limit keeps both nodes.
//! Nodes proven constant are replaced by the constant, which is how
//! redundant logic disappears.

use crate::equiv::classes::{random_signatures, Classes};
use crate::equiv::oracle::{Answer, Oracle};
use crate::network::{Lit, Network, NodeId, NodeKind};

/// Settings of [`sweep`].
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct SweepOptions {
    /// Work limit of one SAT query, in approximate conflicts (0: none).
    pub conflict_limit: u64,
    /// 64-pattern words of random simulation seeding the classes.
    pub sim_words: usize,
    /// Seed of the random patterns.
    pub seed: u64,
}

impl Default for SweepOptions {
    fn default() -> Self {
        SweepOptions {
            conflict_limit: 100,
            sim_words: 8,
            seed: 0x0D7E_5EED,
        }
    }
}

/// Counters of one sweep.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct SweepCounts {
    /// Nodes merged because the copy hashed onto the representative.
    pub merged_by_hashing: u64,
    /// Nodes merged by a SAT proof.
    pub merged_by_proof: u64,
    /// Candidate pairs refuted by a counterexample.
    pub refuted: u64,
    /// Candidate pairs left open by the work limit.
    pub stopped: u64,
}

/// Counterexample patterns packed 64 to a word per combinational input.
struct Patterns {
    words: Vec<u64>,
    count: u32,
}

impl Patterns {
    fn push(&mut self, pattern: &[bool]) {
        if self.count == 64 {
            self.words.iter_mut().for_each(|w| *w = 0);
            self.count = 0;
        }
        for (w, &bit) in self.words.iter_mut().zip(pattern) {
            *w |= (bit as u64) << self.count;
        }
        self.count += 1;
    }

    fn valid(&self) -> u64 {
        if self.count >= 64 {
            u64::MAX
        } else {
            (1u64 << self.count) - 1
        }
    }
}

/// Returns a copy of `net` (same ports and storage elements) in which every
/// pair of nodes proven equal up to complement is one node, and nodes
/// proven constant are constants.
pub fn sweep(net: &Network, opts: &SweepOptions) -> (Network, SweepCounts) {
    let mut counts = SweepCounts::default();
    let words = opts.sim_words.max(1);
    let signatures = random_signatures(net, words, opts.seed);
    let mut classes = Classes::from_signatures(&signatures, words);
    drop(signatures);
    let mut out = net.empty_like();
    out.reserve(net.num_nodes());
    let mut image = vec![Lit::FALSE; net.num_nodes()];
    for (id, lit) in net
        .combinational_inputs()
        .into_iter()
        .zip(net.port_map_into(&out))
    {
        image[id.index()] = lit;
    }
    let reach = net.reachable();
    let mut oracle = Oracle::new(opts.conflict_limit);
    let mut patterns = Patterns {
        words: vec![0; net.combinational_inputs().len()],
        count: 0,
    };
    let mut values = Vec::new();
    let map = |image: &[Lit], l: Lit| image[l.node().index()].xor(l.is_complemented());
    for id in net.node_ids() {
        if !reach[id.index()] {
            continue;
        }
        let f = net.fanins(id);
        let mut own = match net.kind(id) {
            NodeKind::Const | NodeKind::Input => continue,
            NodeKind::And => out.and(map(&image, f[0]), map(&image, f[1])),
            NodeKind::Xor => out.xor(map(&image, f[0]), map(&image, f[1])),
            NodeKind::Maj => out.maj(map(&image, f[0]), map(&image, f[1]), map(&image, f[2])),
        };
        let mut last_refuted: Option<NodeId> = None;
        while let Some((rep, complement)) = classes.representative(id) {
            if last_refuted == Some(rep) || (!reach[rep.index()] && rep.index() != 0) {
                break;
            }
            let target = image[rep.index()].xor(complement);
            if own == target {
                counts.merged_by_hashing += 1;
                break;
            }
            match oracle.equal(&out, own, target) {
                Answer::Equal => {
                    counts.merged_by_proof += 1;
                    own = target;
                    break;
                }
                Answer::Unknown => {
                    counts.stopped += 1;
                    break;
                }
                Answer::Differ(pattern) => {
                    counts.refuted += 1;
                    patterns.push(&pattern);
                    net.simulate_into(&patterns.words, &mut values);
                    classes.refine(&values, patterns.valid(), id);
                    last_refuted = Some(rep);
                }
            }
        }
        image[id.index()] = own;
    }
    out.connect_outputs_from(net, &image);
    (out.cleanup(), counts)
}
