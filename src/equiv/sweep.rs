//! SAT sweeping: proving the miter's internal equivalences bottom-up.
//!
//! The miter is rebuilt node by node in topological order into a *reduced*
//! network. Each node is built from the reduced images of its fanins, so any
//! equivalence already proven below it is already substituted; structural
//! hashing then often finds the node identical to its class representative
//! with no SAT call at all. Otherwise the oracle is asked whether the node
//! equals its representative (up to complement):
//!
//! - proven: the node's image becomes the representative's, so everything
//!   above it is built on the merged node and later queries see smaller,
//!   shared cones;
//! - refuted: the counterexample is added to a word of patterns, the miter is
//!   simulated on that word and the classes are split; the node then tries
//!   its new representative, if any;
//! - stopped by the work limit: the node keeps its own image.
//!
//! Proving the many small internal equivalences first is what turns the
//! final output queries (on multipliers hopeless for plain SAT) into easy
//! ones, or into identical literals.

use super::classes::Classes;
use super::oracle::{Answer, Oracle};
use super::progress::Progress;
use super::window::{WindowAnswer, WindowProver};
use crate::network::{Lit, Network, NodeId, NodeKind};

/// Counters of one sweep.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, serde::Serialize)]
pub struct SweepStats {
    /// Candidate pairs found identical by structural hashing alone.
    pub merged_by_hashing: u64,
    /// Candidate pairs proven by a window query (a small local solver).
    pub merged_by_window: u64,
    /// Candidate pairs proven by the global SAT solver.
    pub merged_by_sat: u64,
    /// Candidate pairs refuted by a counterexample.
    pub refuted: u64,
    /// Candidate pairs left open by the work limit.
    pub stopped: u64,
    /// Times the classes were refined with counterexample patterns.
    pub refinements: u64,
}

/// Patterns from counterexamples, packed 64 to a word per input.
pub(crate) struct PatternWord {
    words: Vec<u64>,
    count: u32,
}

impl PatternWord {
    pub fn new(inputs: usize) -> PatternWord {
        PatternWord {
            words: vec![0; inputs],
            count: 0,
        }
    }

    /// Adds one pattern; starts a fresh word when the current one is full.
    pub fn push(&mut self, pattern: &[bool]) {
        if self.count == 64 {
            self.words.iter_mut().for_each(|w| *w = 0);
            self.count = 0;
        }
        for (w, &bit) in self.words.iter_mut().zip(pattern) {
            if bit {
                *w |= 1 << self.count;
            }
        }
        self.count += 1;
    }

    /// Mask of the bits in use.
    pub fn valid(&self) -> u64 {
        if self.count >= 64 {
            u64::MAX
        } else {
            (1u64 << self.count) - 1
        }
    }
}

/// The result of sweeping a miter.
pub(crate) struct Swept {
    /// The reduced network (same inputs as the miter, in the same order).
    pub reduced: Network,
    /// Image in `reduced` of every miter node.
    pub image: Vec<Lit>,
}

impl Swept {
    /// Image in the reduced network of miter literal `lit`.
    pub fn lit(&self, lit: Lit) -> Lit {
        self.image[lit.node().index()].xor(lit.is_complemented())
    }
}

/// Sweeps `miter` bottom-up, merging every candidate pair the oracle proves.
pub(crate) fn sweep(
    miter: &Network,
    classes: &mut Classes,
    window: &mut WindowProver,
    oracle: &mut Oracle,
    stats: &mut SweepStats,
) -> Swept {
    let mut reduced = Network::new(format!("{}_reduced", miter.name()));
    reduced.reserve(miter.num_nodes());
    let mut image = vec![Lit::FALSE; miter.num_nodes()];
    for (name, &id) in miter.inputs() {
        image[id.index()] = reduced.add_input(name.clone()).expect("unique names");
    }
    let mut patterns = PatternWord::new(miter.inputs().len());
    let mut values = Vec::new();
    let map = |image: &[Lit], l: Lit| image[l.node().index()].xor(l.is_complemented());
    let progress = Progress::new("SAT sweeping", miter.num_nodes() as u64);
    for id in miter.node_ids() {
        if id.index() % 256 == 0 {
            progress.advance(256.min(miter.num_nodes() - id.index()) as u64);
        }
        let f = miter.fanins(id);
        let mut own = match miter.kind(id) {
            NodeKind::Const | NodeKind::Input => continue,
            NodeKind::And => reduced.and(map(&image, f[0]), map(&image, f[1])),
            NodeKind::Xor => reduced.xor(map(&image, f[0]), map(&image, f[1])),
            NodeKind::Maj => reduced.maj(map(&image, f[0]), map(&image, f[1]), map(&image, f[2])),
        };
        // Try representatives until one is proven, none is left, or the
        // limit stops a proof. Each refutation splits the node off its
        // representative, so the loop ends; the guard is a second safety.
        let mut last_refuted: Option<NodeId> = None;
        while let Some((rep, complement)) = classes.representative(id) {
            if last_refuted == Some(rep) {
                break;
            }
            let target = image[rep.index()].xor(complement);
            if own == target {
                stats.merged_by_hashing += 1;
                break;
            }
            if window.prove(&reduced, own, target) == WindowAnswer::Proven {
                stats.merged_by_window += 1;
                own = target;
                break;
            }
            match oracle.equal(&reduced, own, target) {
                Answer::Equal => {
                    stats.merged_by_sat += 1;
                    own = target;
                    break;
                }
                Answer::Unknown => {
                    stats.stopped += 1;
                    break;
                }
                Answer::Differ(pattern) => {
                    stats.refuted += 1;
                    stats.refinements += 1;
                    patterns.push(&pattern);
                    miter.simulate_into(&patterns.words, &mut values);
                    classes.refine(&values, patterns.valid(), id);
                    last_refuted = Some(rep);
                }
            }
        }
        image[id.index()] = own;
    }
    progress.finish();
    Swept { reduced, image }
}
