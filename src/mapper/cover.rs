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

use super::cuts::{CutStore, Scratch};
use super::implementation::Source;
use super::matches::{MatchTable, NO_SLOT};
use super::MapError;
use crate::library::Library;
use crate::netlist::{Driver, MappedNetlist, NetId, Port, StorageInstance};
use crate::network::{Network, NodeId, NodeKind};
use std::collections::HashSet;

const NONE: u32 = u32::MAX;
const INVERT: u32 = u32::MAX - 1;
const FREE: u32 = u32::MAX - 2;
const EPS: f32 = 1e-4;
/// Most node phases one trial of the exact-area pass walks.
const TRIAL_LIMIT: usize = 24;

/// Names for generated nets and instances that avoid the netlist's own
/// port and storage names.
struct FreshNames<'n> {
    reserved: HashSet<&'n str>,
    /// False when no reserved name has the shape of a generated one.
    clash_possible: bool,
}

impl FreshNames<'_> {
    /// `prefix` and `i`, with underscores appended while that is taken.
    fn fresh(&self, prefix: &str, i: usize) -> String {
        let mut name = format!("{prefix}{i}");
        if self.clash_possible {
            while self.reserved.contains(name.as_str()) {
                name.push('_');
            }
        }
        name
    }
}

/// What a selection pass optimises.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Rank {
    /// Least arrival, then least area flow.
    Delay,
    /// Least area flow, then least arrival.
    AreaFlow,
}

/// The covering state of one mapping run.
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
    /// `cut << 2 | candidate`, or `NONE`, `INVERT`, `FREE`.
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

#[derive(Clone, Copy)]
struct Pick {
    choice: u32,
    digest: u32,
    arrival: f32,
    flow: f32,
}

impl Pick {
    const EMPTY: Pick = Pick {
        choice: NONE,
        digest: NONE,
        arrival: f32::INFINITY,
        flow: f32::INFINITY,
    };
}

/// True when `a` is preferred over `b` for a phase with required time `req`.
#[inline]
fn better(a: &Pick, b: &Pick, req: f32, rank: Rank) -> bool {
    if b.choice == NONE {
        return true;
    }
    let fa = a.arrival <= req + EPS;
    let fb = b.arrival <= req + EPS;
    if fa != fb {
        return fa;
    }
    if !fa {
        return a.arrival < b.arrival - EPS;
    }
    match rank {
        Rank::Delay => {
            a.arrival < b.arrival - EPS || (a.arrival <= b.arrival + EPS && a.flow < b.flow - EPS)
        }
        Rank::AreaFlow => {
            a.flow < b.flow - EPS || (a.flow <= b.flow + EPS && a.arrival < b.arrival - EPS)
        }
    }
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

    fn inverter_delay(&self, node: usize) -> f32 {
        self.table
            .implementation(self.inverter)
            .delay(self.load[node])
    }

    /// Implementation id of a match choice for phase `phase`.
    #[inline]
    fn implementation_of(&self, choice: u32, phase: usize) -> u32 {
        let cut = (choice >> 2) as usize;
        let slot = self.cuts.slot(cut) ^ phase as u32;
        self.table.candidates(slot)[(choice & 3) as usize]
    }

    /// Sets the phases of a combinational input or constant.
    fn map_source(&mut self, node: usize) {
        let i = 2 * node;
        self.phases[i].choice = FREE;
        self.cost[i].arrival = 0.0;
        self.cost[i].flow = 0.0;
        if node == 0 {
            self.phases[i + 1].choice = FREE;
            self.cost[i + 1].arrival = 0.0;
            self.cost[i + 1].flow = 0.0;
        } else {
            self.phases[i + 1].choice = INVERT;
            self.cost[i + 1].arrival = self.inverter_delay(node);
            self.cost[i + 1].flow = self.inverter_area / self.fanout_estimate[node];
        }
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
        self.digests.push(Digest {
            area: m.area as f32,
            root_per_load: m.root_per_load,
            first_use: self.digest_uses.len() as u32,
            uses: m.leaf_uses.len() as u32,
        });
        self.digest_uses
            .extend(m.leaf_uses.iter().map(|u| DigestUse {
                code: 2 * u.var as u32 + u.complemented as u32,
                delay: u.delay,
            }));
        self.digest_of[id as usize] = d;
        d
    }

    #[inline]
    fn uses_of(&self, digest: &Digest) -> &[DigestUse] {
        &self.digest_uses[digest.first_use as usize..(digest.first_use + digest.uses) as usize]
    }

    /// Arrival and area flow of `node` implemented by digest `d` over `cut`.
    #[inline]
    fn evaluate(&self, node: usize, cut: usize, d: u32) -> (f32, f32) {
        self.evaluate_with(node, &self.leaf_costs(cut), d)
    }

    /// The costs of both phases of every leaf of `cut`, indexed by
    /// `2 * leaf position + complemented`, read once for all the
    /// implementations tried on the cut.
    #[inline]
    fn leaf_costs(&self, cut: usize) -> [PhaseCost; 12] {
        let mut out = [PhaseCost {
            arrival: 0.0,
            flow: 0.0,
        }; 12];
        for (v, &l) in self.cuts.leaves(cut).iter().enumerate() {
            out[2 * v] = self.cost[2 * l as usize];
            out[2 * v + 1] = self.cost[2 * l as usize + 1];
        }
        out
    }

    /// [`Cover::evaluate`] with the leaf costs already gathered.
    #[inline]
    fn evaluate_with(&self, node: usize, leaf_costs: &[PhaseCost; 12], d: u32) -> (f32, f32) {
        let m = &self.digests[d as usize];
        let mut arrival = 0f32;
        let mut flow = m.area;
        for u in self.uses_of(m) {
            let c = &leaf_costs[u.code as usize];
            arrival = arrival.max(c.arrival + u.delay);
            flow += c.flow;
        }
        (
            arrival + m.root_per_load * self.load[node],
            flow / self.fanout_estimate[node],
        )
    }

    /// Chooses both phases of gate `node` by `rank` within required times.
    fn select(&mut self, node: usize, rank: Rank) -> Result<(), MapError> {
        let mut best = [Pick::EMPTY; 2];
        let req = [self.required[2 * node], self.required[2 * node + 1]];
        let table = self.table;
        for cut in self.cuts.cuts(node) {
            let slot = self.cuts.slot(cut);
            if slot == NO_SLOT {
                continue;
            }
            let leaf_costs = self.leaf_costs(cut);
            for (phase, best_phase) in best.iter_mut().enumerate() {
                for (ci, &imp) in table.candidates(slot ^ phase as u32).iter().enumerate() {
                    let d = self.digest(imp);
                    let (arrival, flow) = self.evaluate_with(node, &leaf_costs, d);
                    let pick = Pick {
                        choice: ((cut as u32) << 2) | ci as u32,
                        digest: d,
                        arrival,
                        flow,
                    };
                    if better(&pick, best_phase, req[phase], rank) {
                        *best_phase = pick;
                    }
                }
            }
        }
        let inv_delay = self.inverter_delay(node);
        let inv_flow = self.inverter_area / self.fanout_estimate[node];
        for phase in 0..2 {
            let other = best[1 - phase];
            if other.choice == NONE || other.choice == INVERT {
                continue;
            }
            let alt = Pick {
                choice: INVERT,
                digest: NONE,
                arrival: other.arrival + inv_delay,
                flow: other.flow + inv_flow,
            };
            if better(&alt, &best[phase], req[phase], rank) {
                best[phase] = alt;
            }
        }
        if best[0].choice == NONE || best[1].choice == NONE {
            return Err(MapError::Unmappable(format!(
                "no cell or cell combination of library '{}' matches node {} ({:?})",
                self.lib.name,
                node,
                self.net.kind(NodeId(node as u32))
            )));
        }
        for (phase, pick) in best.iter().enumerate() {
            self.phases[2 * node + phase].choice = pick.choice;
            self.phases[2 * node + phase].digest = pick.digest;
            self.cost[2 * node + phase].arrival = pick.arrival;
            self.cost[2 * node + phase].flow = pick.flow;
        }
        Ok(())
    }

    /// Pass 1: enumerates priority cuts node by node and maps each node for
    /// `rank` (delay, or area flow for the area goal).
    pub fn enumerate_and_map(&mut self, cut_limit: usize, rank: Rank) -> Result<(), MapError> {
        self.enumerate_keeping_truths(cut_limit, rank)?;
        self.cuts.release_truths();
        Ok(())
    }

    /// [`Cover::enumerate_and_map`], returning the function and leaf count
    /// of every stored cut (for the optimum database) before the truth
    /// tables are freed.
    pub fn enumerate_and_collect(
        &mut self,
        cut_limit: usize,
        rank: Rank,
    ) -> Result<Vec<(u64, usize)>, MapError> {
        self.enumerate_keeping_truths(cut_limit, rank)?;
        let functions = (0..self.cuts.len())
            .map(|c| (self.cuts.truth(c), self.cuts.leaves(c).len()))
            .collect();
        self.cuts.release_truths();
        Ok(functions)
    }

    fn enumerate_keeping_truths(&mut self, cut_limit: usize, rank: Rank) -> Result<(), MapError> {
        let mut scratch = Scratch::default();
        let net = self.net;
        for id in net.node_ids() {
            let node = id.index();
            let cost = &self.cost;
            let fanout = &self.fanout_estimate;
            self.cuts.enumerate(
                net,
                id,
                cut_limit,
                rank == Rank::AreaFlow,
                self.table,
                |l| {
                    let i = 2 * l as usize;
                    (
                        cost[i].arrival.min(cost[i + 1].arrival),
                        cost[i].flow.min(cost[i + 1].flow) * fanout[l as usize],
                    )
                },
                &mut scratch,
            );
            if net.is_gate(id) {
                self.select(node, rank)?;
            } else {
                self.map_source(node);
            }
        }
        Ok(())
    }

    /// Re-selects every gate for `rank` with the current required times.
    pub fn reselect(&mut self, rank: Rank) -> Result<(), MapError> {
        for id in self.net.node_ids() {
            if self.net.is_gate(id) {
                self.select(id.index(), rank)?;
            } else {
                self.map_source(id.index());
            }
        }
        Ok(())
    }

    /// Phases of `node` in the order their references must be propagated
    /// backwards (a phase derived by an inverter before its source).
    #[inline]
    fn backward_order(&self, node: usize) -> [usize; 2] {
        if self.phases[2 * node + 1].choice == INVERT {
            [1, 0]
        } else {
            [0, 1]
        }
    }

    /// Calls `f(leaf_index, delay_through)` for each leaf phase the choice of
    /// `node`'s `phase` reads.
    #[inline]
    fn for_each_leaf(&self, node: usize, phase: usize, mut f: impl FnMut(usize, f32)) {
        let c = self.phases[2 * node + phase].choice;
        match c {
            NONE | FREE => {}
            INVERT => f(2 * node + (1 - phase), self.inverter_delay(node)),
            _ => {
                let m = &self.digests[self.phases[2 * node + phase].digest as usize];
                let leaves = self.cuts.leaves((c >> 2) as usize);
                let tail = m.root_per_load * self.load[node];
                for u in self.uses_of(m) {
                    f(
                        2 * leaves[(u.code >> 1) as usize] as usize + (u.code & 1) as usize,
                        u.delay + tail,
                    );
                }
            }
        }
    }

    /// Counts references of the current cover; returns the latest output
    /// arrival.
    pub fn mark(&mut self) -> f32 {
        for p in &mut self.phases {
            p.refs = 0;
        }
        let mut worst = 0f32;
        for l in self.net.combinational_outputs() {
            self.phases[l.raw() as usize].refs += 1;
            worst = worst.max(self.cost[l.raw() as usize].arrival);
        }
        let mut leaves = [0u32; 12];
        for node in (0..self.net.num_nodes()).rev() {
            for phase in self.backward_order(node) {
                let i = 2 * node + phase;
                if self.phases[i].refs > 0 {
                    let (_, count) = self.cone_step(i, &mut leaves);
                    for &leaf in &leaves[..count] {
                        self.phases[leaf as usize].refs += 1;
                    }
                }
            }
        }
        worst
    }

    /// Propagates required times from `target` at every output through the
    /// current cover (call [`Cover::mark`] first). Phases outside the cover
    /// get no requirement.
    pub fn set_required(&mut self, target: f32) {
        let mut required = std::mem::take(&mut self.required);
        required.fill(f32::INFINITY);
        for l in self.net.combinational_outputs() {
            let i = l.raw() as usize;
            required[i] = required[i].min(target);
        }
        for node in (0..self.net.num_nodes()).rev() {
            for phase in self.backward_order(node) {
                let i = 2 * node + phase;
                if self.phases[i].refs > 0 {
                    let r = required[i];
                    self.for_each_leaf(node, phase, |leaf, d| {
                        required[leaf] = required[leaf].min(r - d);
                    });
                }
            }
        }
        self.required = required;
    }

    /// Blends the fanout estimate towards the reference counts of the current
    /// cover (call [`Cover::mark`] first).
    pub fn update_fanout_estimate(&mut self) {
        for node in 0..self.net.num_nodes() {
            let r = (self.phases[2 * node].refs + self.phases[2 * node + 1].refs) as f32;
            let e = &mut self.fanout_estimate[node];
            *e = ((*e + r) / 2.0).max(1.0);
        }
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

    /// Area of the choice of phase index `i` and the phase indices of the
    /// leaves it reads (written to `out`, count returned).
    #[inline]
    fn cone_step(&self, i: usize, out: &mut [u32; 12]) -> (f32, usize) {
        let state = self.phases[i];
        match state.choice {
            NONE | FREE => (0.0, 0),
            INVERT => {
                out[0] = (i ^ 1) as u32;
                (self.inverter_area, 1)
            }
            c => {
                let leaves = self.cuts.leaves((c >> 2) as usize);
                let m = &self.digests[state.digest as usize];
                let mut count = 0;
                for u in self.uses_of(m) {
                    out[count] = 2 * leaves[(u.code >> 1) as usize] + (u.code & 1);
                    count += 1;
                }
                (m.area, count)
            }
        }
    }

    /// References the cone of `node`/`phase` under its current choice;
    /// returns the area newly referenced.
    fn reference(&mut self, node: usize, phase: usize, stack: &mut Vec<u32>) -> f32 {
        let mut area = 0.0;
        let mut leaves = [0u32; 12];
        stack.clear();
        stack.push((2 * node + phase) as u32);
        while let Some(i) = stack.pop() {
            let (a, count) = self.cone_step(i as usize, &mut leaves);
            area += a;
            for &leaf in &leaves[..count] {
                let r = &mut self.phases[leaf as usize].refs;
                *r += 1;
                if *r == 1 {
                    stack.push(leaf);
                }
            }
        }
        area
    }

    /// Like [`Cover::reference`] for a trial: records every reference it
    /// adds in `touched` (to be undone by the caller) and walks at most
    /// [`TRIAL_LIMIT`] phases; a cone left unwalked is charged its area flow.
    fn reference_trial(
        &mut self,
        node: usize,
        phase: usize,
        stack: &mut Vec<u32>,
        touched: &mut Vec<u32>,
    ) -> f32 {
        let mut area = 0.0;
        let mut walked = 0;
        let mut leaves = [0u32; 12];
        stack.clear();
        touched.clear();
        stack.push((2 * node + phase) as u32);
        while let Some(i) = stack.pop() {
            if walked >= TRIAL_LIMIT {
                area += self.cost[i as usize].flow;
                continue;
            }
            walked += 1;
            let (a, count) = self.cone_step(i as usize, &mut leaves);
            area += a;
            for &leaf in &leaves[..count] {
                let r = &mut self.phases[leaf as usize].refs;
                *r += 1;
                touched.push(leaf);
                if *r == 1 {
                    stack.push(leaf);
                }
            }
        }
        area
    }

    /// Releases the cone of `node`/`phase` under its current choice; returns
    /// the area released.
    fn dereference(&mut self, node: usize, phase: usize, stack: &mut Vec<u32>) -> f32 {
        let mut area = 0.0;
        let mut leaves = [0u32; 12];
        stack.clear();
        stack.push((2 * node + phase) as u32);
        while let Some(i) = stack.pop() {
            let (a, count) = self.cone_step(i as usize, &mut leaves);
            area += a;
            for &leaf in &leaves[..count] {
                let r = &mut self.phases[leaf as usize].refs;
                *r -= 1;
                if *r == 0 {
                    stack.push(leaf);
                }
            }
        }
        area
    }

    /// Arrival of the current choice of `node`'s `phase`.
    fn current_arrival(&self, node: usize, phase: usize) -> f32 {
        let state = self.phases[2 * node + phase];
        self.cost_of(node, phase, state.choice, state.digest).0
    }

    /// Arrival and area flow of `choice` for `node`'s `phase`.
    fn cost_of(&self, node: usize, phase: usize, choice: u32, d: u32) -> (f32, f32) {
        match choice {
            NONE => (f32::INFINITY, f32::INFINITY),
            FREE => (0.0, 0.0),
            INVERT => {
                let o = 2 * node + 1 - phase;
                (
                    self.cost[o].arrival + self.inverter_delay(node),
                    self.cost[o].flow + self.inverter_area / self.fanout_estimate[node],
                )
            }
            c => self.evaluate(node, (c >> 2) as usize, d),
        }
    }

    /// One exact-area pass over the current cover (call [`Cover::mark`] and
    /// [`Cover::set_required`] first).
    pub fn exact_area_pass(&mut self) {
        let mut stack = Vec::new();
        let mut touched = Vec::new();
        let mut options: Vec<(u32, u32, f32, f32)> = Vec::new();
        let table = self.table;
        for id in self.net.node_ids() {
            let node = id.index();
            if !self.net.is_gate(id) {
                continue;
            }
            // A node outside the cover is re-chosen by area flow with the
            // current leaf costs, so a fanout that later picks it finds a
            // good cone (its exact area would need its whole unreferenced
            // cone to be walked).
            if self.phases[2 * node].refs == 0 && self.phases[2 * node + 1].refs == 0 {
                if self.select(node, Rank::AreaFlow).is_err() {
                    unreachable!("a node mapped once always has a match");
                }
                continue;
            }
            // Real matches first, so an inverter is judged against them.
            let order = if self.phases[2 * node].choice == INVERT {
                [1, 0]
            } else {
                [0, 1]
            };
            for phase in order {
                let i = 2 * node + phase;
                let referenced = self.phases[i].refs > 0;
                if !referenced {
                    continue;
                }
                let current = self.phases[i].choice;
                let current_digest = self.phases[i].digest;
                let req = self.required[i];
                options.clear();
                let mut feasible_count = 0;
                for cut in self.cuts.cuts(node) {
                    let slot = self.cuts.slot(cut);
                    if slot == NO_SLOT {
                        continue;
                    }
                    let leaf_costs = self.leaf_costs(cut);
                    for (ci, &id) in table.candidates(slot ^ phase as u32).iter().enumerate() {
                        let opt = ((cut as u32) << 2) | ci as u32;
                        let d = self.digest(id);
                        let (arrival, flow) = self.evaluate_with(node, &leaf_costs, d);
                        feasible_count += (arrival <= req + EPS) as usize;
                        options.push((opt, d, arrival, flow));
                    }
                }
                let other = self.phases[2 * node + 1 - phase].choice;
                if other != INVERT && other != NONE {
                    let (arrival, flow) = self.cost_of(node, phase, INVERT, NONE);
                    feasible_count += (arrival <= req + EPS) as usize;
                    options.push((INVERT, NONE, arrival, flow));
                }
                let mut best = current;
                let mut best_digest = current_digest;
                let mut best_area = f32::INFINITY;
                let mut best_arrival = f32::INFINITY;
                let mut best_flow = f32::INFINITY;
                let mut best_gates = usize::MAX;
                // With at most one option in time the choice needs no
                // areas: the one in time, or else the earliest.
                let walk = feasible_count > 1;
                if walk {
                    self.dereference(node, phase, &mut stack);
                }
                for &(opt, d, arrival, flow) in &options {
                    let feasible = arrival <= req + EPS;
                    let best_feasible = best_arrival <= req + EPS;
                    // Options that cannot win are not walked: an infeasible
                    // one is judged by arrival alone, and a feasible one
                    // whose own cells already cost more than the best cone
                    // cannot undercut it (a cone's area is at least its
                    // root's).
                    if !feasible {
                        if !best_feasible && arrival < best_arrival - EPS {
                            best = opt;
                            best_digest = d;
                            best_area = f32::INFINITY;
                            best_arrival = arrival;
                            best_flow = flow;
                        }
                        continue;
                    }
                    if !walk {
                        best = opt;
                        best_digest = d;
                        best_arrival = arrival;
                        best_flow = flow;
                        continue;
                    }
                    if best_feasible && self.area_of(opt, d) > best_area + EPS {
                        continue;
                    }
                    self.phases[i].choice = opt;
                    self.phases[i].digest = d;
                    let area = self.reference_trial(node, phase, &mut stack, &mut touched);
                    for &t in &touched {
                        self.phases[t as usize].refs -= 1;
                    }
                    // Ties in area and flow go to the implementation with
                    // fewer cells of its own: the same area then comes from
                    // shared nodes, which later fanouts can reuse for free
                    // (a cell folded into a supergate cannot be shared).
                    let gates = match opt {
                        INVERT => 1,
                        _ => self
                            .table
                            .implementation(self.implementation_of(opt, phase))
                            .gates
                            .len(),
                    };
                    let take = !best_feasible
                        || preferred(
                            (area, flow, gates, arrival),
                            (best_area, best_flow, best_gates, best_arrival),
                        );
                    if take {
                        best = opt;
                        best_digest = d;
                        best_area = area;
                        best_arrival = arrival;
                        best_flow = flow;
                        best_gates = gates;
                    }
                }
                if walk {
                    self.phases[i].choice = best;
                    self.phases[i].digest = best_digest;
                    self.reference(node, phase, &mut stack);
                } else if best != current {
                    self.dereference(node, phase, &mut stack);
                    self.phases[i].choice = best;
                    self.phases[i].digest = best_digest;
                    self.reference(node, phase, &mut stack);
                }
                self.cost[i].arrival = best_arrival;
                self.cost[i].flow = best_flow;
            }
            // Keep the arrival of an unreferenced or derived phase current.
            for phase in 0..2 {
                let i = 2 * node + phase;
                if self.phases[i].refs == 0 || self.phases[i].choice == INVERT {
                    self.cost[i].arrival = self.current_arrival(node, phase);
                }
            }
        }
    }

    /// Area of the current cover (call [`Cover::mark`] first).
    pub fn cover_area(&self) -> f64 {
        let mut area = 0.0;
        for node in 0..self.net.num_nodes() {
            for phase in 0..2 {
                if self.phases[2 * node + phase].refs > 0 {
                    let state = self.phases[2 * node + phase];
                    area += self.area_of(state.choice, state.digest) as f64;
                }
            }
        }
        area
    }

    /// Builds the mapped netlist of the current cover (call [`Cover::mark`]
    /// first), freeing the timing and area state beforehand so the netlist
    /// does not come on top of it.
    pub fn into_netlist(mut self) -> MappedNetlist {
        self.cost = Vec::new();
        self.required = Vec::new();
        self.fanout_estimate = Vec::new();
        self.load = Vec::new();
        self.extract()
    }

    /// Builds the mapped netlist of the current cover (call [`Cover::mark`]
    /// first).
    pub fn extract(&self) -> MappedNetlist {
        let net = self.net;
        let lib = self.lib;
        let mut out = MappedNetlist {
            name: net.name().to_string(),
            library: lib.name.clone(),
            ..MappedNetlist::default()
        };
        let mut reserved: HashSet<&str> = HashSet::new();
        for name in net.inputs().keys() {
            reserved.insert(name);
        }
        for name in net.outputs().keys() {
            reserved.insert(name);
        }
        for name in net.storage().keys() {
            reserved.insert(name);
        }
        for s in net.storage().values() {
            if let Some(c) = s.clock.as_deref() {
                reserved.insert(c);
            }
        }
        // Generated names are a letter, digits and maybe underscores; when
        // no port or storage name has that shape, none can clash and the
        // lookups are skipped.
        let clash_possible = reserved.iter().any(|r| {
            let core = r.trim_end_matches('_');
            core.len() > 1
                && (core.starts_with('n') || core.starts_with('g'))
                && core[1..].bytes().all(|b| b.is_ascii_digit())
        });
        let names = FreshNames {
            reserved,
            clash_possible,
        };
        // Exact capacities: the netlist is the largest thing alive at the
        // end of mapping, and growth by doubling would leave up to half of
        // it unused.
        let mut cells = 0;
        for node in 0..net.num_nodes() {
            if net.kind(NodeId(node as u32)) == NodeKind::Const {
                continue;
            }
            for phase in 0..2 {
                let i = 2 * node + phase;
                if self.phases[i].refs == 0 {
                    continue;
                }
                cells += match self.phases[i].choice {
                    NONE | FREE => 0,
                    INVERT => self.table.implementation(self.inverter).gates.len(),
                    c => self
                        .table
                        .implementation(self.implementation_of(c, phase))
                        .gates
                        .len(),
                };
            }
        }
        out.instances.reserve_exact(cells);
        out.nets
            .reserve_exact(cells + net.inputs().len() + net.storage().len() + 2);
        let mut net_of = vec![NONE; 2 * net.num_nodes()];
        for (i, (name, id)) in net.inputs().iter().enumerate() {
            let n = out.add_net(name.clone(), Driver::Input(i as u32));
            net_of[2 * id.index()] = n;
            out.inputs.push(Port {
                name: name.clone(),
                net: n,
            });
        }
        for (i, (name, s)) in net.storage().iter().enumerate() {
            let n = out.add_net(name.clone(), Driver::Storage(i as u32));
            net_of[2 * s.output.index()] = n;
        }
        let mut constants = [NONE; 2];
        let mut constant = |out: &mut MappedNetlist, c: bool| {
            if constants[c as usize] == NONE {
                let name = if c { "$true" } else { "$false" };
                constants[c as usize] = out.add_net(name.to_string(), Driver::Constant(c));
            }
            constants[c as usize]
        };
        let mut local: Vec<NetId> = Vec::new();
        for node in 0..net.num_nodes() {
            if net.kind(NodeId(node as u32)) == NodeKind::Const {
                for phase in 0..2 {
                    if self.phases[2 * node + phase].refs > 0 {
                        net_of[2 * node + phase] = constant(&mut out, phase == 1);
                    }
                }
                continue;
            }
            let order = if self.phases[2 * node].choice == INVERT {
                [1, 0]
            } else {
                [0, 1]
            };
            for phase in order {
                let i = 2 * node + phase;
                if self.phases[i].refs == 0 {
                    continue;
                }
                match self.phases[i].choice {
                    NONE | FREE => {}
                    INVERT => {
                        let src = net_of[2 * node + 1 - phase];
                        debug_assert!(src != NONE);
                        net_of[i] = self.instantiate(
                            &mut out,
                            self.inverter,
                            &[src],
                            &mut local,
                            &mut constant,
                            &names,
                        );
                    }
                    c => {
                        let leaves = self.cuts.leaves((c >> 2) as usize);
                        let mut leaf_nets = [NONE; 12];
                        let imp = self.implementation_of(c, phase);
                        for u in &self.table.implementation(imp).leaf_uses {
                            leaf_nets[2 * u.var as usize + u.complemented as usize] = net_of
                                [2 * leaves[u.var as usize] as usize + u.complemented as usize];
                        }
                        net_of[i] = self.instantiate(
                            &mut out,
                            imp,
                            &leaf_nets,
                            &mut local,
                            &mut constant,
                            &names,
                        );
                    }
                }
            }
        }
        // Primary outputs keep their names. An output whose net already has
        // another name (an input, another output, a constant, a storage
        // output) becomes an alias: no buffer cell is spent on it.
        let mut claimed: Vec<bool> = vec![false; out.nets.len()];
        for (name, lit) in net.outputs() {
            let n = net_of[lit.raw() as usize];
            if n as usize >= claimed.len() {
                claimed.resize(out.nets.len(), false);
            }
            let is_cell = matches!(out.nets[n as usize].driver, Driver::Cell(_));
            if is_cell && !claimed[n as usize] {
                out.nets[n as usize].name = name.clone();
                claimed[n as usize] = true;
            }
            out.outputs.push(Port {
                name: name.clone(),
                net: n,
            });
        }
        for (name, s) in net.storage() {
            let cell = lib.storage.first().map(|_| 0u32);
            out.storage.push(StorageInstance {
                name: name.clone(),
                cell,
                data: net_of[s.next.raw() as usize],
                output: net_of[2 * s.output.index()],
                clock: s.clock.clone(),
                init: s.init,
                kind: s.kind.clone(),
            });
        }
        out
    }

    /// Instantiates implementation `imp`; `leaf_nets[2 * var + complemented]`
    /// gives the net of each leaf phase (the inverter and the buffer read
    /// only leaf 0 uncomplemented, so `[net]` suffices). Returns the output
    /// net.
    fn instantiate(
        &self,
        out: &mut MappedNetlist,
        imp: u32,
        leaf_nets: &[NetId],
        local: &mut Vec<NetId>,
        constant: &mut impl FnMut(&mut MappedNetlist, bool) -> NetId,
        names: &FreshNames,
    ) -> NetId {
        let m = self.table.implementation(imp);
        local.clear();
        for gate in &m.gates {
            let inputs: Vec<NetId> = gate
                .inputs
                .iter()
                .map(|s| match *s {
                    Source::Leaf { var, complemented } => {
                        leaf_nets[2 * var as usize + complemented as usize]
                    }
                    Source::Gate(j) => local[j as usize],
                    Source::Constant(c) => constant(out, c),
                })
                .collect();
            let name = names.fresh("n", out.nets.len());
            let n = out.add_instance(gate.cell, inputs, name);
            if names.clash_possible {
                let idx = out.instances.len() - 1;
                out.instances[idx].name = names.fresh("g", idx);
            }
            local.push(n);
        }
        *local.last().expect("implementations have gates")
    }
}

/// Exact-area order: less area, then less area flow, then fewer cells of
/// the implementation's own, then earlier arrival (areas, flows and
/// arrivals compared with `EPS` tolerance).
fn preferred(a: (f32, f32, usize, f32), b: (f32, f32, usize, f32)) -> bool {
    if (a.0 - b.0).abs() > EPS {
        return a.0 < b.0;
    }
    if (a.1 - b.1).abs() > EPS {
        return a.1 < b.1;
    }
    if a.2 != b.2 {
        return a.2 < b.2;
    }
    a.3 < b.3 - EPS
}
