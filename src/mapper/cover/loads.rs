//! Load-aware delay mapping: the delay pass first guesses every node's load
//! from its fanout in the subject network, which is not the fanout of the
//! cover it ends up choosing (a cut absorbs readers; a shared leaf gains
//! them). Here the loads are re-estimated from the previous cover's
//! references (each reading pin at the library's mean input load, each
//! primary output at the output load), arrivals are recomputed for that
//! cover under its own loads, and the delay pass chooses again under the
//! new loads; the rounds stop when the cover's own delay no longer improves
//! (or after [`LOAD_ROUNDS`]), and the cover with the least self-consistent
//! delay is kept.

use super::{Cover, PhaseCost, PhaseState, Rank, INVERT};
use crate::mapper::MapError;

/// Most delay passes re-run with re-estimated loads.
pub const LOAD_ROUNDS: usize = 4;

/// Relative improvement below which the arrival times count as settled.
const SETTLED: f32 = 1e-3;

/// What is kept of the best cover found so far.
struct Snapshot {
    phases: Vec<PhaseState>,
    cost: Vec<PhaseCost>,
    load: Vec<f32>,
}

impl Cover<'_> {
    /// Sets every node's load from the references of the current cover
    /// (call [`Cover::mark`] first): per phase, reading pins at the mean
    /// input load and primary outputs at the output load; a node's load is
    /// its heavier phase's, at least one mean input load.
    fn loads_from_cover(&mut self) {
        let typical = self.table.typical_load;
        let po_load = self.lib.primary_output_load as f32;
        let mut po_refs = vec![0u32; self.phases.len()];
        for l in self.net.outputs().values() {
            po_refs[l.raw() as usize] += 1;
        }
        for node in 0..self.net.num_nodes() {
            let mut load = typical;
            for phase in 0..2 {
                let i = 2 * node + phase;
                let refs = self.phases[i].refs;
                let po = po_refs[i].min(refs);
                load = load.max((refs - po) as f32 * typical + po as f32 * po_load);
            }
            self.load[node] = load;
        }
    }

    /// Recomputes the arrival and area flow of every node phase under its
    /// current choice and the current loads; returns the latest output
    /// arrival.
    fn retime(&mut self) -> f32 {
        for id in self.net.node_ids() {
            let node = id.index();
            if !self.net.is_gate(id) {
                self.map_source(node);
                continue;
            }
            let order = if self.phases[2 * node].choice == INVERT {
                [1, 0]
            } else {
                [0, 1]
            };
            for phase in order {
                let state = self.phases[2 * node + phase];
                let (arrival, flow) = self.cost_of(node, phase, state.choice, state.digest);
                self.cost[2 * node + phase] = PhaseCost { arrival, flow };
            }
        }
        self.net
            .combinational_outputs()
            .iter()
            .map(|l| self.cost[l.raw() as usize].arrival)
            .fold(0.0, f32::max)
    }

    /// Re-runs the delay pass with loads from the previous cover until the
    /// cover's own delay settles; keeps the fastest cover under its own
    /// loads and returns its delay (references marked).
    pub fn settle_loads(&mut self) -> Result<f32, MapError> {
        let mut best: Option<(f32, Snapshot)> = None;
        for _ in 0..LOAD_ROUNDS {
            self.mark();
            self.loads_from_cover();
            let delay = self.retime();
            let improved = best
                .as_ref()
                .is_none_or(|(d, _)| delay < *d * (1.0 - SETTLED));
            if !improved {
                break;
            }
            best = Some((
                delay,
                Snapshot {
                    phases: self.phases.clone(),
                    cost: self.cost.clone(),
                    load: self.load.clone(),
                },
            ));
            self.required.fill(f32::INFINITY);
            self.reselect(Rank::Delay)?;
        }
        if let Some((_, s)) = best {
            self.phases = s.phases;
            self.cost = s.cost;
            self.load = s.load;
        }
        Ok(self.mark())
    }
}
