//! Cover selection: which match implements each node phase.
//!
//! Every node has two phases (the node and its complement), each with its
//! own choice: a match (a cut and an implementation of the cut function or
//! its complement), an inverter on the other phase (charged only where a
//! phase has no cheaper match of its own), or nothing to pay for (an input's
//! true phase, a constant). Passes over the nodes in topological order:
//!
//! 1. delay: cut enumeration and, per phase, the match with the least
//!    arrival time (library delays with a load estimated from the fanout),
//!    ties broken by area flow;
//! 2. area flow: the match with the least area flow among those that meet
//!    the required time of the phase (from the previous cover);
//! 3. exact area: with reference counts of the current cover, the match that
//!    adds the least area when the node's own cone is released, again within
//!    the required time.
//!
//! Required times come from the outputs' target (the best delay, the best
//! delay plus the allowed slack, or none for pure area), propagated backwards
//! through the current cover. Everything iterates in index order and breaks
//! ties by position, so the result is deterministic.
//!
//! Why the state is shaped as it is (mapping speed is memory traffic):
//! - one record per node phase holds the choice, its reference count and the
//!   digest of its implementation, so a cone walk touches one place per
//!   phase; arrival and area flow sit side by side in a second array;
//! - implementations in use are digested on first use (area, load term,
//!   leaf uses packed as `2 * position + complemented`), so walks and cost
//!   evaluation do not chase the match table's nested vectors;
//! - the exact-area pass first computes every option's arrival and area
//!   flow, walks no cone when at most one option meets the required time,
//!   and otherwise walks only options that can still win (in time, and
//!   whose own cells do not already cost more than the best cone so far).
//!   These shortcuts skip only work whose outcome is known, so the choices
//!   are exactly those of the plain pass.
//!
//! The passes live in one file each around the state type [`Cover`]:
//! `select` (the per-node choice shared by the first two passes), `delay`,
//! `loads` (delay passes repeated with loads from the previous cover),
//! `area_flow`, `exact_area`, `timing` (reference counts and required
//! times), `extract` and `dedup` (no two cells of the netlist compute the
//! same function of the same nets).

mod area_flow;
mod dedup;
mod delay;
mod exact_area;
mod extract;
mod loads;
mod select;
mod timing;

use super::cuts::CutStore;
use super::matches::{MatchTable, CANDIDATE_BITS};
use super::MapError;
use crate::library::Library;
use crate::network::Network;

const NONE: u32 = u32::MAX;
const INVERT: u32 = u32::MAX - 1;
const FREE: u32 = u32::MAX - 2;
const EPS: f32 = 1e-4;

/// What a selection pass optimises.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Rank {
    /// Least arrival, then least area flow.
    Delay,
    /// Least area flow, then least arrival.
    AreaFlow,
}

/// The covering state of one mapping run (cloned to try several area
/// recoveries after one delay pass).
#[derive(Clone)]
pub struct Cover<'a> {
    net: &'a Network,
    lib: &'a Library,
    table: &'a MatchTable,
    /// Cuts of every node.
    pub cuts: CutStore,
    /// Per node phase (`2 * node + phase`): the choice and its reference
    /// count side by side, as the cone walks read both.
    phases: Vec<PhaseState>,
    /// Per node phase: arrival and area flow of the choice.
    cost: Vec<PhaseCost>,
    required: Vec<f32>,
    load: Vec<f32>,
    fanout_estimate: Vec<f32>,
    inverter: u32,
    inverter_area: f32,
    /// Per match-table implementation id: its index in `digests`, or `NONE`
    /// before first use.
    digest_of: Vec<u32>,
    /// What the passes read of the implementations in use, packed.
    digests: Vec<Digest>,
    /// Leaf uses of the digests, in the implementations' order.
    digest_uses: Vec<DigestUse>,
    /// Every delay read as one level (see [`Cover::blind_to_delays`]).
    delay_blind: bool,
}

/// The part of an [`super::implementation::Implementation`] the passes
/// read, kept densely so a cone walk does not chase the table's vectors.
#[derive(Clone, Copy, Debug)]
struct Digest {
    area: f32,
    root_per_load: f32,
    first_use: u32,
    uses: u32,
}

/// One leaf phase read by an implementation.
#[derive(Clone, Copy, Debug)]
struct DigestUse {
    /// `2 * leaf position + complemented`.
    code: u32,
    /// Delay from the leaf to the output, load term excluded.
    delay: f32,
}

/// The choice of one node phase and how often the current cover reads it.
#[derive(Clone, Copy, Debug)]
struct PhaseState {
    /// `cut << CANDIDATE_BITS | candidate`, or `NONE`, `INVERT`, `FREE`.
    choice: u32,
    /// References by the current cover (outputs and chosen matches).
    refs: u32,
    /// For a match: the digest of its implementation.
    digest: u32,
}

/// Arrival time and area flow of one node phase's choice.
#[derive(Clone, Copy, Debug)]
struct PhaseCost {
    arrival: f32,
    flow: f32,
}

impl<'a> Cover<'a> {
    /// Prepares the cover of `net`; cuts are enumerated by
    /// [`Cover::enumerate_and_map`].
    pub fn new(
        net: &'a Network,
        lib: &'a Library,
        table: &'a MatchTable,
        cut_size: usize,
    ) -> Result<Cover<'a>, MapError> {
        let inverter = table.inverter().ok_or_else(|| {
            MapError::Unmappable(format!(
                "library '{}' has no way to complement a signal",
                lib.name
            ))
        })?;
        let n = net.num_nodes();
        let fanout = net.fanout_counts();
        let mut po_refs = vec![0u32; n];
        for l in net.outputs().values() {
            po_refs[l.node().index()] += 1;
        }
        let typical = table.typical_load;
        let load: Vec<f32> = (0..n)
            .map(|i| {
                let gate_fanout = fanout[i].saturating_sub(po_refs[i]) as f32;
                (gate_fanout * typical + po_refs[i] as f32 * lib.primary_output_load as f32)
                    .max(typical)
            })
            .collect();
        let fanout_estimate = fanout.iter().map(|&f| (f as f32).max(1.0)).collect();
        Ok(Cover {
            net,
            lib,
            table,
            cuts: CutStore::new(cut_size, n),
            phases: vec![
                PhaseState {
                    choice: NONE,
                    refs: 0,
                    digest: NONE,
                };
                2 * n
            ],
            cost: vec![
                PhaseCost {
                    arrival: 0.0,
                    flow: 0.0
                };
                2 * n
            ],
            required: vec![f32::INFINITY; 2 * n],
            load,
            fanout_estimate,
            inverter,
            inverter_area: table.implementation(inverter).area as f32,
            digest_of: vec![NONE; table.implementations.len()],
            digests: Vec::new(),
            digest_uses: Vec::new(),
            delay_blind: false,
        })
    }

    /// Peak heap bytes held by the cover: the cut store at its largest
    /// (truth tables included, before they are released) plus the per-node
    /// arrays.
    pub fn memory_bytes(&self) -> usize {
        self.cuts.peak_memory_bytes()
            + self.phases.capacity() * std::mem::size_of::<PhaseState>()
            + self.cost.capacity() * std::mem::size_of::<PhaseCost>()
            + (self.required.capacity() + self.load.capacity() + self.fanout_estimate.capacity())
                * 4
    }

    /// Makes the cover read no library delays, before the first pass: every
    /// match and inverter counts as one level and loads count nothing. For
    /// the least-area cover, which has no delay bound, so that ties in area
    /// flow and area go to the shallower choice, then by position (cut rank,
    /// then the table's order), and two libraries with the same cell areas
    /// give the same cover whatever their delays.
    pub fn blind_to_delays(&mut self) {
        debug_assert!(self.digests.is_empty(), "before the first pass");
        self.delay_blind = true;
    }

    /// The candidates of `slot` this cover reads: for a delay-blind cover
    /// only those kept for area (see [`MatchTable::area_candidates`]), so
    /// that an implementation kept only for being the fastest cannot decide
    /// a tie in the least-area cover.
    #[inline]
    pub(super) fn candidates(&self, slot: u32) -> &'a [u32] {
        if self.delay_blind {
            self.table.area_candidates(slot)
        } else {
            self.table.candidates(slot)
        }
    }

    fn inverter_delay(&self, node: usize) -> f32 {
        if self.delay_blind {
            return 1.0;
        }
        self.table
            .implementation(self.inverter)
            .delay(self.load[node])
    }

    /// Implementation id of a match choice for phase `phase`.
    #[inline]
    fn implementation_of(&self, choice: u32, phase: usize) -> u32 {
        let cut = (choice >> CANDIDATE_BITS) as usize;
        let slot = self.cuts.slot(cut) ^ phase as u32;
        self.table.candidates(slot)[(choice & ((1 << CANDIDATE_BITS) - 1)) as usize]
    }

    /// The digest of table implementation `id`, made on first use.
    #[inline]
    fn digest(&mut self, id: u32) -> u32 {
        let d = self.digest_of[id as usize];
        if d != NONE {
            return d;
        }
        let m = self.table.implementation(id);
        let d = self.digests.len() as u32;
        let blind = self.delay_blind;
        self.digests.push(Digest {
            area: m.area as f32,
            root_per_load: if blind { 0.0 } else { m.root_per_load },
            first_use: self.digest_uses.len() as u32,
            uses: m.leaf_uses.len() as u32,
        });
        self.digest_uses
            .extend(m.leaf_uses.iter().map(|u| DigestUse {
                code: 2 * u.var as u32 + u.complemented as u32,
                delay: if blind { 1.0 } else { u.delay },
            }));
        self.digest_of[id as usize] = d;
        d
    }

    #[inline]
    fn uses_of(&self, digest: &Digest) -> &[DigestUse] {
        &self.digest_uses[digest.first_use as usize..(digest.first_use + digest.uses) as usize]
    }

    /// Area of a choice whose implementation (for a match) has digest `d`.
    #[inline]
    fn area_of(&self, choice: u32, d: u32) -> f32 {
        match choice {
            NONE | FREE => 0.0,
            INVERT => self.inverter_area,
            _ => self.digests[d as usize].area,
        }
    }
}
