//! Logic optimisation before technology mapping.
//!
//! The mapper covers the network it is given: redundant or badly factored
//! logic in the input costs cells however good the cover is. This module
//! shrinks the network first while keeping every output function. The
//! parts:
//! - [`sweep`]: functional reduction by SAT sweeping (merges nodes equal up
//!   to complement and replaces nodes proven constant), reusing the
//!   equivalence checker's simulation classes and SAT oracle;
//! - [`factor`]: small AND structures for four-input functions from an
//!   irredundant sum of products and algebraic factoring;
//! - [`rewrite`]: DAG-aware cut rewriting with those structures, counting
//!   what a replacement frees against what it cannot share.
//!
//! [`optimize`] runs a sweep, then alternates rewriting and sweeping for a
//! number of passes. Every step keeps the ports, storage elements and
//! output functions; the mapper's verification checks the final netlist
//! against the original network as before.

pub mod factor;
pub mod rewrite;
pub mod sweep;

use crate::library::Library;
use crate::network::Network;
use rewrite::{rewrite, RewriteOptions};
use sweep::{sweep, SweepCounts, SweepOptions};

/// Settings of [`optimize`].
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct OptimizeOptions {
    /// Rewriting passes (each followed by a sweep).
    pub passes: usize,
    /// Stop after this many passes in a row that did not improve the
    /// score.
    pub patience: usize,
    /// Let every second pass apply replacements that save nothing: they
    /// restructure the logic so that the next pass finds new savings.
    pub alternate_zero_gain: bool,
    /// Settings of the sweeps.
    pub sweep: SweepOptions,
    /// Settings of the rewriting passes (`zero_gain` is set per pass when
    /// `alternate_zero_gain` is on).
    pub rewrite: RewriteOptions,
}

impl Default for OptimizeOptions {
    fn default() -> Self {
        OptimizeOptions {
            passes: 10,
            patience: 8,
            alternate_zero_gain: true,
            sweep: SweepOptions::default(),
            rewrite: RewriteOptions::default(),
        }
    }
}

impl OptimizeOptions {
    /// The default settings for mapping onto `lib`: XOR and majority
    /// nodes are lowered to ANDs unless a single cell of the library
    /// realises them (in some input and output phase).
    pub fn for_library(lib: &Library) -> OptimizeOptions {
        let mut opts = OptimizeOptions::default();
        opts.rewrite.lower_xor = !has_cell(lib, 2, &[0x6]);
        opts.rewrite.lower_maj = !has_cell(lib, 3, &[0xE8, 0xD4, 0xB2, 0x8E]);
        opts
    }
}

/// True when a cell of `arity` inputs computes one of `truths` or its
/// complement (majority's four entries are its input phases up to
/// complement).
fn has_cell(lib: &Library, arity: usize, truths: &[u64]) -> bool {
    let mask = (1u64 << (1 << arity)) - 1;
    lib.cells.iter().any(|c| {
        c.arity() == arity && {
            let t = c.truth & mask;
            truths.iter().any(|&f| t == f || t == !f & mask)
        }
    })
}

/// What [`optimize`] did.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct OptimizeCounts {
    /// Logic nodes before.
    pub nodes_before: usize,
    /// Logic nodes after.
    pub nodes_after: usize,
    /// Nodes merged or made constant by the sweeps.
    pub merged: u64,
    /// Replacements applied by rewriting.
    pub replaced: u64,
    /// Passes run.
    pub passes: usize,
}

/// Optimises `net` for size: a sweep, then up to `passes` rounds of
/// rewriting and sweeping; returns the network with the fewest logic nodes
/// seen. See [`optimize_scored`].
pub fn optimize(net: &Network, opts: &OptimizeOptions) -> (Network, OptimizeCounts) {
    optimize_scored(net, opts, |n| n.gate_count() as f64)
}

/// Like [`optimize`], but keeps the network with the least `score` among
/// `net` itself, the sweep's result and every pass's (ties: the earlier),
/// so the result never scores worse than the input. The mapper
/// scores by mapped area, so a pass that shrinks the node count but maps
/// worse is never taken. Stops early when a pass without zero-gain
/// replacements changes nothing, or after `patience` passes in a row
/// without a better score. Nothing is scored while no candidate differs
/// from the input. The result has the ports and storage
/// elements of `net` and the same output functions.
pub fn optimize_scored(
    net: &Network,
    opts: &OptimizeOptions,
    mut score: impl FnMut(&Network) -> f64,
) -> (Network, OptimizeCounts) {
    let mut counts = OptimizeCounts {
        nodes_before: net.gate_count(),
        ..OptimizeCounts::default()
    };
    // The input is scored only once some candidate differs from it.
    let mut best: Option<(Network, f64)> = None;
    let (mut current, swept) = sweep(net, &opts.sweep);
    counts.merged += swept.merged_by_hashing + swept.merged_by_proof;
    if swept != SweepCounts::default() {
        let s = score(&current);
        let input = score(net);
        best = Some(if s < input {
            (current.clone(), s)
        } else {
            (net.cleanup(), input)
        });
    }
    let mut since_better = 0;
    for pass in 0..opts.passes {
        let mut ropts = opts.rewrite;
        if opts.alternate_zero_gain {
            ropts.zero_gain = pass % 2 == 1;
        }
        let (rewritten, done) = rewrite(&current, &ropts);
        counts.replaced += done.replaced;
        counts.passes += 1;
        let (next, swept) = sweep(&rewritten, &opts.sweep);
        counts.merged += swept.merged_by_hashing + swept.merged_by_proof;
        let unchanged = !ropts.zero_gain && done.replaced == 0 && swept == SweepCounts::default();
        current = next;
        if unchanged {
            break;
        }
        let s = score(&current);
        let best_score = match &best {
            Some((_, b)) => *b,
            None => score(net),
        };
        if s < best_score {
            best = Some((current.clone(), s));
            since_better = 0;
        } else {
            if best.is_none() {
                best = Some((net.cleanup(), best_score));
            }
            since_better += 1;
            if since_better >= opts.patience {
                break;
            }
        }
    }
    let best = best.map_or_else(|| net.cleanup(), |(n, _)| n);
    counts.nodes_after = best.gate_count();
    (best, counts)
}
