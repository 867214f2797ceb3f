//! Pass 2, area flow: every gate is chosen again for least area flow
//! within the required times of the previous cover, with a fanout estimate
//! blended towards that cover's reference counts.

use super::{Cover, Rank};
use crate::mapper::MapError;

impl Cover<'_> {
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

    /// Blends the fanout estimate towards the reference counts of the current
    /// cover (call [`Cover::mark`] first).
    pub fn update_fanout_estimate(&mut self) {
        for node in 0..self.net.num_nodes() {
            let r = (self.phases[2 * node].refs + self.phases[2 * node + 1].refs) as f32;
            let e = &mut self.fanout_estimate[node];
            *e = ((*e + r) / 2.0).max(1.0);
        }
    }
}
