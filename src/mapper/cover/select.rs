//! The choice of one node's two phases by a rank (least arrival, or least
//! area flow), within the phases' required times: the step shared by the
//! delay pass and the area-flow pass.

use super::{Cover, PhaseCost, Rank, CANDIDATE_BITS, EPS, FREE, INVERT, NONE};
use crate::mapper::matches::NO_SLOT;
use crate::mapper::MapError;
use crate::network::NodeId;

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

impl Cover<'_> {
    /// Sets the phases of a combinational input or constant.
    pub(super) fn map_source(&mut self, node: usize) {
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

    /// Arrival and area flow of `node` implemented by digest `d` over `cut`.
    #[inline]
    pub(super) fn evaluate(&self, node: usize, cut: usize, d: u32) -> (f32, f32) {
        self.evaluate_with(node, &self.leaf_costs(cut), d)
    }

    /// The costs of both phases of every leaf of `cut`, indexed by
    /// `2 * leaf position + complemented`, read once for all the
    /// implementations tried on the cut.
    #[inline]
    pub(super) fn leaf_costs(&self, cut: usize) -> [PhaseCost; 12] {
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
    pub(super) fn evaluate_with(
        &self,
        node: usize,
        leaf_costs: &[PhaseCost; 12],
        d: u32,
    ) -> (f32, f32) {
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

    /// Arrival and area flow of `choice` for `node`'s `phase`.
    pub(super) fn cost_of(&self, node: usize, phase: usize, choice: u32, d: u32) -> (f32, f32) {
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
            c => self.evaluate(node, (c >> CANDIDATE_BITS) as usize, d),
        }
    }

    /// Arrival of the current choice of `node`'s `phase`.
    pub(super) fn current_arrival(&self, node: usize, phase: usize) -> f32 {
        let state = self.phases[2 * node + phase];
        self.cost_of(node, phase, state.choice, state.digest).0
    }

    /// Chooses both phases of gate `node` by `rank` within required times.
    pub(super) fn select(&mut self, node: usize, rank: Rank) -> Result<(), MapError> {
        let mut best = [Pick::EMPTY; 2];
        let req = [self.required[2 * node], self.required[2 * node + 1]];
        for cut in self.cuts.cuts(node) {
            let slot = self.cuts.slot(cut);
            if slot == NO_SLOT {
                continue;
            }
            let leaf_costs = self.leaf_costs(cut);
            for (phase, best_phase) in best.iter_mut().enumerate() {
                for (ci, &imp) in self.candidates(slot ^ phase as u32).iter().enumerate() {
                    let d = self.digest(imp);
                    let (arrival, flow) = self.evaluate_with(node, &leaf_costs, d);
                    let pick = Pick {
                        choice: ((cut as u32) << CANDIDATE_BITS) | ci as u32,
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
}
