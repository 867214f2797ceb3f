//! Pass 3, exact area: with the reference counts of the current cover, each
//! used node phase takes the match that adds the least area once its own
//! cone is released, within its required time.

use super::{Cover, Rank, CANDIDATE_BITS, EPS, INVERT, NONE};
use crate::mapper::matches::NO_SLOT;

/// Most node phases one trial of the exact-area pass walks.
const TRIAL_LIMIT: usize = 24;

impl Cover<'_> {
    /// Like [`Cover::reference`] for a trial: records every reference it
    /// adds in `touched` (to be undone by the caller) and walks at most
    /// [`TRIAL_LIMIT`] phases; a cone left unwalked is charged its area flow.
    pub(super) fn reference_trial(
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

    /// One exact-area pass over the current cover (call [`Cover::mark`] and
    /// [`Cover::set_required`] first).
    pub fn exact_area_pass(&mut self) {
        let mut stack = Vec::new();
        let mut touched = Vec::new();
        let mut options: Vec<(u32, u32, f32, f32)> = Vec::new();
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
                    for (ci, &id) in self.candidates(slot ^ phase as u32).iter().enumerate() {
                        let opt = ((cut as u32) << CANDIDATE_BITS) | ci as u32;
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
