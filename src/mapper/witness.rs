//! What the mapper records so that its output can be proven correct in
//! linear time (see [`crate::proof`]).
//!
//! A general equivalence proof of a mapped netlist against its input must
//! rediscover which net of the netlist corresponds to which node of the
//! input; on deep arithmetic that search is what makes the proof slow. The
//! mapper knows the answer: every net it creates for a node phase carries
//! that node phase of the network it covered, and was built from the nets
//! of one cut's leaves. The witness keeps those claims, plus the
//! correspondence between the input network and the covered network when
//! balancing rebuilt it, and nothing else: it is plain data, checked by
//! [`crate::proof`] without trusting the mapper.
//!
//! One net may carry several literals: extraction merges cells that compute
//! the same function of the same nets, so the cells made for two node
//! phases (functionally equal, or one a duplicate of a cell inside the
//! other's match) can end on one net. Each literal is a claim of its own,
//! with the cut it was built from.

use crate::network::{Lit, Network};
use std::collections::HashMap;

/// Marks a net or node without a recorded counterpart.
pub const NO_LIT: u32 = u32::MAX;

/// Most leaves of a claim's cut (the widest cut the mapper enumerates).
pub const CLAIM_LEAVES: usize = 6;

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

/// One claim: a net carries a literal of the covered network, computed by
/// the cells below the net from the nets of a cut's leaves.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Claim {
    /// Raw [`Lit`] of the covered network.
    pub lit: u32,
    /// The cut's leaf nodes, padded with [`NO_LIT`]; all [`NO_LIT`] for a
    /// net driven by a port or a constant.
    pub leaves: [u32; CLAIM_LEAVES],
}

impl Claim {
    /// The claim that a port- or constant-driven net carries `lit`.
    pub fn port(lit: u32) -> Claim {
        Claim {
            lit,
            leaves: [NO_LIT; CLAIM_LEAVES],
        }
    }

    /// The claim that a cell-driven net carries `lit`, built over the cut
    /// `leaves` (at most [`CLAIM_LEAVES`]; more are cut off, which can
    /// only make the check refuse).
    pub fn cell(lit: u32, leaves: &[u32]) -> Claim {
        let mut padded = [NO_LIT; CLAIM_LEAVES];
        for (slot, &l) in padded.iter_mut().zip(leaves) {
            *slot = l;
        }
        Claim {
            lit,
            leaves: padded,
        }
    }

    /// The covered literal claimed.
    pub fn literal(&self) -> Lit {
        Lit::from_raw(self.lit)
    }

    /// The cut's leaf nodes.
    pub fn leaf_nodes(&self) -> impl Iterator<Item = u32> + '_ {
        self.leaves.iter().copied().take_while(|&l| l != NO_LIT)
    }
}

/// The claims of every net of a mapped netlist, grouped by net.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct NetClaims {
    /// `claims[start[n]..start[n + 1]]` are net `n`'s claims.
    start: Vec<u32>,
    claims: Vec<Claim>,
}

impl NetClaims {
    /// Groups `(net, claim)` pairs over `nets` nets (nets without a pair
    /// carry no literal: nets inside a multi-cell match).
    pub fn new(nets: usize, mut pairs: Vec<(u32, Claim)>) -> NetClaims {
        pairs.sort_by_key(|&(net, c)| (net, c.lit));
        let mut start = Vec::with_capacity(nets + 1);
        let mut at = 0;
        for n in 0..nets as u32 {
            start.push(at as u32);
            while at < pairs.len() && pairs[at].0 == n {
                at += 1;
            }
        }
        start.push(at as u32);
        pairs.truncate(at);
        NetClaims {
            start,
            claims: pairs.into_iter().map(|(_, c)| c).collect(),
        }
    }

    /// Number of nets.
    pub fn len(&self) -> usize {
        self.start.len().saturating_sub(1)
    }

    /// True when there is no net.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// Total number of claims.
    pub fn count(&self) -> usize {
        self.claims.len()
    }

    /// The claims of `net` (empty for an unknown net).
    pub fn of(&self, net: u32) -> &[Claim] {
        match (
            self.start.get(net as usize),
            self.start.get(net as usize + 1),
        ) {
            (Some(&a), Some(&b)) => &self.claims[a as usize..b as usize],
            _ => &[],
        }
    }

    /// Mutable claims of `net`, for tests that forge a witness.
    pub fn of_mut(&mut self, net: u32) -> &mut [Claim] {
        match (
            self.start.get(net as usize),
            self.start.get(net as usize + 1),
        ) {
            (Some(&a), Some(&b)) => &mut self.claims[a as usize..b as usize],
            _ => &mut [],
        }
    }
}

/// The mapper's record of what every net of its netlist implements.
#[derive(Clone, Debug)]
pub struct CoverWitness {
    /// Where the covered network came from (shared by every run of one
    /// mapping call, see [`super::runs`]).
    pub origin: std::sync::Arc<CoveredOrigin>,
    /// Per net of the mapped netlist: the covered literals it carries, each
    /// with its cut (none for a net inside a multi-cell match).
    pub net_lits: NetClaims,
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

    /// The covered literals net `net` carries, if the mapper recorded any.
    pub fn lits_of_net(&self, net: u32) -> impl Iterator<Item = Lit> + '_ {
        self.net_lits.of(net).iter().map(Claim::literal)
    }

    /// Whether net `net` carries covered literal `lit`.
    pub fn net_carries(&self, net: u32, lit: Lit) -> bool {
        self.lits_of_net(net).any(|l| l == lit)
    }

    /// Extends the witness over buffers added after covering: the netlist
    /// now has `nets` nets, and each `(copy, source)` (in the order the
    /// buffers were added, so a source may be an earlier copy) is a net
    /// driven by a buffer that reads `source`. The copy carries each literal
    /// of its source over that literal's own node as the only leaf (a buffer
    /// is the identity), which the local check proves like any other cut.
    pub fn extend_with_copies(&mut self, nets: usize, copies: &[(u32, u32)]) {
        self.extend_with(nets, copies.iter().map(|&(c, s)| (c, s, false)));
    }

    /// [`CoverWitness::extend_with_copies`] where each `(copy, source,
    /// duplicate)` is either a buffer reading `source` or, when `duplicate`
    /// is set, a duplicate of `source`'s driver over the same input nets:
    /// such a copy carries its source's claims unchanged (the same cells
    /// over the same leaves).
    pub fn extend_with(&mut self, nets: usize, copies: impl IntoIterator<Item = (u32, u32, bool)>) {
        let mut pairs: Vec<(u32, Claim)> = (0..self.net_lits.len() as u32)
            .flat_map(|n| self.net_lits.of(n).iter().map(move |c| (n, *c)))
            .collect();
        let mut copied: HashMap<u32, Vec<Claim>> = HashMap::new();
        for (copy, source, duplicate) in copies {
            let from: Vec<Claim> = match copied.get(&source) {
                Some(claims) => claims.clone(),
                None => self.net_lits.of(source).to_vec(),
            };
            let claims: Vec<Claim> = if duplicate {
                from
            } else {
                from.iter()
                    .map(|c| Claim::cell(c.lit, &[c.literal().node().0]))
                    .collect()
            };
            pairs.extend(claims.iter().map(|c| (copy, *c)));
            copied.insert(copy, claims);
        }
        self.net_lits = NetClaims::new(nets, pairs);
    }
}
