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
use sweep::{sweep, SweepOptions};

/// Settings of [`optimize`].
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct OptimizeOptions {
    /// Rewriting passes (each followed by a sweep).
    pub passes: usize,
    /// Settings of the sweeps.
    pub sweep: SweepOptions,
    /// Settings of the rewriting passes.
    pub rewrite: RewriteOptions,
}

impl Default for OptimizeOptions {
    fn default() -> Self {
        OptimizeOptions {
            passes: 6,
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
}

/// Optimises `net` for size: a sweep, then `passes` rounds of rewriting
/// and sweeping. Stops early when a round changes nothing. The result has
/// the ports and storage elements of `net` and the same output functions.
pub fn optimize(net: &Network, opts: &OptimizeOptions) -> (Network, OptimizeCounts) {
    let mut counts = OptimizeCounts {
        nodes_before: net.gate_count(),
        ..OptimizeCounts::default()
    };
    let (mut current, swept) = sweep(net, &opts.sweep);
    counts.merged += swept.merged_by_hashing + swept.merged_by_proof;
    for _ in 0..opts.passes {
        let (rewritten, done) = rewrite(&current, &opts.rewrite);
        counts.replaced += done.replaced;
        let (next, swept) = sweep(&rewritten, &opts.sweep);
        counts.merged += swept.merged_by_hashing + swept.merged_by_proof;
        let unchanged = done.replaced == 0 && next.gate_count() == current.gate_count();
        current = next;
        if unchanged {
            break;
        }
    }
    counts.nodes_after = current.gate_count();
    (current, counts)
}
