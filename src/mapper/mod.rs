//! Technology mapping: from a [`Network`] of AND/XOR/MAJ nodes to a
//! [`MappedNetlist`] of library cells.
//!
//! The stages, each in its own module:
//! 1. [`balance`]: collapse single-fanout AND/OR/XOR trees and rebuild them
//!    for the library's widest cells, so the input's tree shape does not
//!    decide the result;
//! 2. [`matches`] (with [`supergate`] and [`implementation`]): once per
//!    library, a table from cut functions to cells and small cell networks
//!    that realise them, both output phases side by side;
//! 3. [`cuts`]: priority cuts, with truth tables computed from the fanins';
//! 4. [`cover`]: the delay-oriented cover, then area recovery by area flow
//!    and exact area within the required times, then extraction of the
//!    netlist.
//!
//! With [`MapOptions::optimum`], [`optimum`] adds exact minimum networks of
//! the cut functions of up to four leaves (from the exact-synthesis
//! database) to a copy of the match table before step 3.
//!
//! Mapping is deterministic: the same network, library and options give the
//! same netlist.

pub mod balance;
pub mod cover;
pub mod cuts;
pub mod implementation;
pub mod matches;
pub mod optimum;
pub mod small_truth;
pub mod supergate;
pub mod table_cache;
pub mod witness;

pub use matches::MatchTable;

use crate::library::Library;
use crate::netlist::MappedNetlist;
use crate::network::Network;
use balance::BalanceOptions;
use cover::{Cover, Rank};
use indexmap::IndexMap;
use small_truth::{majority, var};
use std::sync::{Arc, Mutex, OnceLock};
use std::time::Instant;
use witness::{CoverWitness, CoveredOrigin};

/// What the cover optimises.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default, serde::Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Goal {
    /// Least area; delay is ignored.
    Area,
    /// Least delay, then least area at that delay.
    Delay,
    /// Least area within `delay_slack` of the least delay.
    #[default]
    Balanced,
}

impl Goal {
    /// The lower-case name used on the command line and in reports.
    pub fn name(self) -> &'static str {
        match self {
            Goal::Area => "area",
            Goal::Delay => "delay",
            Goal::Balanced => "balanced",
        }
    }
}

/// Mapping options.
#[derive(Clone, Debug, PartialEq)]
pub struct MapOptions {
    /// What to optimise.
    pub goal: Goal,
    /// Largest cut (2 to 6).
    pub cut_size: usize,
    /// Priority cuts kept per node, besides the trivial cut (1 to 64).
    pub cuts_per_node: usize,
    /// For [`Goal::Balanced`]: allowed delay over the best, as a fraction.
    pub delay_slack: f64,
    /// Exact-area passes after the area-flow pass.
    pub area_passes: usize,
    /// Rebuild AND/OR/XOR trees before covering.
    pub balance: bool,
    /// Also match the exact minimum network of every cut function of up to
    /// four leaves (see [`optimum`]); synthesised on first use and cached.
    pub optimum: bool,
    /// Optimise the logic before mapping (SAT sweeping and DAG-aware cut
    /// rewriting, see [`crate::optimize`]), keeping the candidate network
    /// that maps to the least area (the network is mapped once per pass);
    /// XOR and majority nodes are lowered to ANDs only when the library
    /// has no such cell.
    pub optimize: bool,
}

impl Default for MapOptions {
    fn default() -> Self {
        MapOptions {
            goal: Goal::Balanced,
            cut_size: 4,
            cuts_per_node: 8,
            delay_slack: 0.10,
            area_passes: 2,
            balance: true,
            optimum: false,
            optimize: false,
        }
    }
}

/// Why mapping failed.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum MapError {
    /// The options are out of range.
    #[error("invalid mapping options: {0}")]
    InvalidOptions(String),
    /// The library cannot implement some node.
    #[error("{0}")]
    Unmappable(String),
}

/// A mapped netlist with the time spent in each phase.
#[derive(Clone, Debug)]
pub struct MapOutcome {
    /// The netlist.
    pub netlist: MappedNetlist,
    /// Seconds per phase: `match` (table build, zero when cached),
    /// `restructure` (zero when off), `balance`, `cuts` (cut enumeration with the delay cover), `cover`
    /// (area recovery and extraction).
    pub seconds: IndexMap<String, f64>,
    /// Nodes of the network that was covered (after balancing).
    pub covered_nodes: usize,
    /// Cuts stored.
    pub cuts: usize,
    /// Peak heap bytes of the cover state (the cut store at its largest and
    /// the per-node arrays).
    pub cover_bytes: usize,
    /// What every net implements, for the linear-time proof
    /// ([`crate::proof::prove`]).
    pub witness: CoverWitness,
}

/// Maps `net` onto `lib`.
pub fn map(net: &Network, lib: &Library, opts: &MapOptions) -> Result<MappedNetlist, MapError> {
    map_detailed(net, lib, opts).map(|o| o.netlist)
}

/// The match table of `lib`, built once per process and library and shared
/// (and kept on disk between processes, see [`table_cache`]).
pub fn match_table(lib: &Library) -> Arc<MatchTable> {
    type Cache = Mutex<Vec<(Library, Arc<MatchTable>)>>;
    static CACHE: OnceLock<Cache> = OnceLock::new();
    let cache = CACHE.get_or_init(|| Mutex::new(Vec::new()));
    {
        let guard = cache.lock().unwrap_or_else(|e| e.into_inner());
        if let Some((_, t)) = guard.iter().find(|(l, _)| l == lib) {
            return t.clone();
        }
    }
    let table = Arc::new(table_cache::load_or_build(lib));
    let mut guard = cache.lock().unwrap_or_else(|e| e.into_inner());
    if guard.len() >= 8 {
        guard.remove(0);
    }
    guard.push((lib.clone(), table.clone()));
    table
}

/// Widest cell whose function is an AND (in any input and output phase),
/// and widest whose function is a parity, over at most `limit` inputs.
fn tree_widths(lib: &Library, limit: usize) -> (usize, usize) {
    let mut and_w = 2;
    let mut xor_w = 2;
    for c in &lib.cells {
        let a = c.arity();
        if a < 2 || a > limit || a > 6 {
            continue;
        }
        let rows = 1u64 << a;
        let mask = if a == 6 { u64::MAX } else { (1u64 << rows) - 1 };
        let t = c.truth & mask;
        let ones = t.count_ones() as u64;
        if ones == 1 || ones == rows - 1 {
            and_w = and_w.max(a);
        }
        let parity = (0..rows).fold(0u64, |acc, r| acc | (((r.count_ones() & 1) as u64) << r));
        if t == parity || t == (!parity & mask) {
            xor_w = xor_w.max(a);
        }
    }
    (and_w, xor_w)
}

/// Maps `net` onto `lib`, returning phase timings and sizes too.
pub fn map_detailed(
    net: &Network,
    lib: &Library,
    opts: &MapOptions,
) -> Result<MapOutcome, MapError> {
    if !(2..=6).contains(&opts.cut_size) {
        return Err(MapError::InvalidOptions(format!(
            "cut size {} is outside 2..=6",
            opts.cut_size
        )));
    }
    if !(1..=64).contains(&opts.cuts_per_node) {
        return Err(MapError::InvalidOptions(format!(
            "cuts per node {} is outside 1..=64",
            opts.cuts_per_node
        )));
    }
    if opts.delay_slack.is_nan() || opts.delay_slack < 0.0 {
        return Err(MapError::InvalidOptions(
            "delay slack must be non-negative".into(),
        ));
    }
    let mut seconds = IndexMap::new();
    let t = Instant::now();
    let table = match_table(lib);
    seconds.insert("match".to_string(), t.elapsed().as_secs_f64());

    let t = Instant::now();
    if !table.has_function(var(0) & var(1)) {
        return Err(MapError::Unmappable(format!(
            "library '{}' cannot realise a two-input AND in any phase",
            lib.name
        )));
    }
    let keep_xor = table.has_function(var(0) ^ var(1));
    let keep_maj = table.has_function(majority(var(0), var(1), var(2)));
    let mut optimized: Option<Network> = None;
    if opts.optimize {
        // Candidates are scored by the area the mapper gives them.
        let plain = MapOptions {
            optimize: false,
            ..opts.clone()
        };
        let score = |n: &Network| map(n, lib, &plain).map_or(f64::INFINITY, |m| m.area(lib));
        let oopts = crate::optimize::OptimizeOptions::for_library(lib);
        optimized = Some(crate::optimize::optimize_scored(net, &oopts, score).0);
    }
    let net = optimized.as_ref().unwrap_or(net);
    seconds.insert("restructure".to_string(), t.elapsed().as_secs_f64());
    let t = Instant::now();
    let (and_width, xor_width) = tree_widths(lib, opts.cut_size);
    let mut balanced: Option<(Network, Vec<u32>)> = None;
    if opts.balance || !keep_xor || !keep_maj {
        let bopts = BalanceOptions {
            and_width: if opts.balance { and_width } else { 2 },
            xor_width: if opts.balance { xor_width } else { 2 },
            keep_xor,
            keep_maj,
        };
        balanced = Some(balance::balance_with_map(net, &bopts));
    }
    let subject = balanced.as_ref().map_or(net, |(b, _)| b);
    seconds.insert("balance".to_string(), t.elapsed().as_secs_f64());

    let first = if opts.goal == Goal::Area {
        Rank::AreaFlow
    } else {
        Rank::Delay
    };
    let augmented;
    let table: &MatchTable = if opts.optimum {
        let t = Instant::now();
        let mut probe = Cover::new(subject, lib, &table, opts.cut_size)?;
        let functions = probe.enumerate_and_collect(opts.cuts_per_node, first)?;
        drop(probe);
        augmented = optimum::augmented_table(&table, lib, functions).0;
        seconds.insert("exact_cuts".to_string(), t.elapsed().as_secs_f64());
        &augmented
    } else {
        &table
    };

    let t = Instant::now();
    let mut cover = Cover::new(subject, lib, table, opts.cut_size)?;
    cover.enumerate_and_map(opts.cuts_per_node, first)?;
    seconds.insert("cuts".to_string(), t.elapsed().as_secs_f64());

    let t = Instant::now();
    let best_delay = cover.mark();
    let target = match opts.goal {
        Goal::Area => f32::INFINITY,
        Goal::Delay => best_delay,
        Goal::Balanced => best_delay * (1.0 + opts.delay_slack as f32),
    };
    cover.set_required(target);
    cover.update_fanout_estimate();
    cover.reselect(Rank::AreaFlow)?;
    for _ in 0..opts.area_passes {
        cover.mark();
        cover.set_required(target);
        cover.exact_area_pass();
    }
    cover.mark();
    let cover_bytes = cover.memory_bytes();
    let cuts = cover.cuts.len();
    let covered_nodes = subject.num_nodes();
    let (netlist, net_lits) = cover.into_netlist_with_witness();
    seconds.insert("cover".to_string(), t.elapsed().as_secs_f64());
    let origin = match (optimized, balanced) {
        (None, None) => CoveredOrigin::Input,
        (None, Some((covered, map))) => CoveredOrigin::Balanced { covered, map },
        (Some(covered), None) | (Some(_), Some((covered, _))) => {
            CoveredOrigin::Restructured { covered }
        }
    };
    Ok(MapOutcome {
        netlist,
        seconds,
        covered_nodes,
        cuts,
        cover_bytes,
        witness: CoverWitness { origin, net_lits },
    })
}
