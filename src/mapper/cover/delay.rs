//! Pass 1, delay: priority cuts are enumerated node by node in topological
//! order and each node is chosen for least arrival (or, for the area goal,
//! least area flow) as soon as its cuts are known.

use super::{Cover, Rank, CANDIDATE_BITS};

/// Most cuts a cover holds: a choice packs the cut index above
/// [`CANDIDATE_BITS`] bits, below the markers `NONE`, `INVERT` and `FREE`.
const MAX_CUTS: usize = (1 << (32 - CANDIDATE_BITS)) - 4;
use crate::mapper::cuts::Scratch;
use crate::mapper::MapError;

impl Cover<'_> {
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
            if self.cuts.len() >= MAX_CUTS {
                return Err(MapError::Unmappable(format!(
                    "more than {MAX_CUTS} cuts: the network is too large to map"
                )));
            }
            if net.is_gate(id) {
                self.select(node, rank)?;
            } else {
                self.map_source(node);
            }
        }
        Ok(())
    }
}
