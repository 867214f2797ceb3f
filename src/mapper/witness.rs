//! What the mapper records so that its output can be proven correct in
//! linear time (see [`crate::proof`]).
//!
//! A general equivalence proof of a mapped netlist against its input must
//! rediscover which net of the netlist corresponds to which node of the
//! input; on deep arithmetic that search is what makes the proof slow. The
//! mapper knows the answer: every net it creates for a node phase carries
//! that node phase of the network it covered. The witness keeps that
//! correspondence, plus the correspondence between the input network and
//! the covered network when balancing rebuilt it, and nothing else: it is
//! plain data, checked by [`crate::proof`] without trusting the mapper.

use crate::network::{Lit, Network};

/// Marks a net or node without a recorded counterpart.
pub const NO_LIT: u32 = u32::MAX;

/// How the network the mapper covered relates to the network it was given.
#[derive(Clone, Debug)]
pub enum CoveredOrigin {
    /// The covered network is the input itself.
    Input,
    /// Balancing rebuilt the input: `map[node]` is the raw literal of the
    /// covered network that input node `node` became, or [`NO_LIT`] for a
    /// node folded into a tree (or not reachable from an output).
    Balanced {
        /// The covered network.
        covered: Network,
        /// Per input node, its literal in `covered`.
        map: Vec<u32>,
    },
    /// Logic optimisation (and maybe balancing) changed the network in ways
    /// the mapper does not witness; only a general proof relates the two.
    Restructured {
        /// The covered network.
        covered: Network,
    },
}

/// The mapper's record of what every net of its netlist implements.
#[derive(Clone, Debug)]
pub struct CoverWitness {
    /// Where the covered network came from (shared by every run of one
    /// mapping call, see [`super::runs`]).
    pub origin: std::sync::Arc<CoveredOrigin>,
    /// Per net of the mapped netlist: the raw [`Lit`] of the covered network
    /// it carries, or [`NO_LIT`] for a net inside a multi-cell match.
    pub net_lits: Vec<u32>,
}

impl CoverWitness {
    /// The network the mapper covered: the balanced or restructured one, or
    /// `input` itself.
    pub fn covered<'a>(&'a self, input: &'a Network) -> &'a Network {
        match self.origin.as_ref() {
            CoveredOrigin::Input => input,
            CoveredOrigin::Balanced { covered, .. } | CoveredOrigin::Restructured { covered } => {
                covered
            }
        }
    }

    /// The covered literal net `net` carries, if the mapper recorded one.
    pub fn lit_of_net(&self, net: u32) -> Option<Lit> {
        match self.net_lits.get(net as usize) {
            Some(&raw) if raw != NO_LIT => Some(Lit::from_raw(raw)),
            _ => None,
        }
    }
}
