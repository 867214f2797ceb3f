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
//! 4. [`cover`]: covers of the subject, each a delay-oriented or area-flow
//!    pass, then area recovery by area flow and exact area within the
//!    required times, then extraction of the netlist (cells merged where
//!    two would compute the same function of the same nets);
//! 5. [`runs`]: the covers made (least area; least delay; area recovery
//!    within several delay bounds), plus those of the largest built-in
//!    library this one contains, measured by static timing; the goal picks
//!    the run with the least area, delay, or area × delay (within a
//!    tolerance that keeps the smaller circuit in a near-tie). One of the
//!    runs repeats the delay pass with loads from its own previous cover
//!    (`cover::loads`), and the fastest and the least-area runs are also
//!    offered with fanout trees of buffers and duplicated drivers on their
//!    critical nets ([`fanout`]).
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
pub mod fanout;
pub mod implementation;
pub mod matches;
pub mod optimum;
pub mod runs;
pub mod small_truth;
pub mod supergate;
pub mod table_cache;
pub mod witness;

pub use matches::MatchTable;
pub use runs::Run;

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
    /// Least area, then least delay, over the runs of [`runs`].
    Area,
    /// Least delay, then least area, over the runs of [`runs`].
    Delay,
    /// Least area among the runs of [`runs`] whose area × delay is within
    /// [`runs::BALANCED_TOLERANCE`] of the least:
    /// area recovery within several delay bounds (the least delay, 10 %,
    /// 25 % and 50 % over it, and `delay_slack` over it) and the area run,
    /// the fastest and the area run also with fanout trees.
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
    /// One more delay bound to explore, as a fraction over the least delay.
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
    /// The netlist (the chosen run's).
    pub netlist: MappedNetlist,
    /// Name of the run the goal chose (see [`runs`]).
    pub run: String,
    /// Every run considered, in the order made.
    pub runs: Vec<Run>,
    /// Seconds per phase: `match` (table build, zero when cached),
    /// `restructure` (zero when off), `balance`, `cuts` (cut enumeration with the delay cover), `cover`
    /// (area recovery and extraction), `subset` (the runs of a contained
    /// built-in library, when there is one), `fanout` (fanout trees).
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
    /// Buffers and duplicated drivers the chosen run's fanout trees added
    /// ([`fanout`]).
    pub buffers: usize,
}

/// Maps `net` onto `lib`.
pub fn map(net: &Network, lib: &Library, opts: &MapOptions) -> Result<MappedNetlist, MapError> {
    map_detailed(net, lib, opts).map(|o| o.netlist)
}

/// One library's match table, made once: callers asking while another
/// thread makes it wait for that one.
type TableCell = Arc<OnceLock<Arc<MatchTable>>>;

/// The cell of `lib`'s table in the process-wide list, and whether it was
/// just added (nobody has started making the table yet).
fn table_cell(lib: &Library) -> (TableCell, bool) {
    type Cache = Mutex<Vec<(Library, TableCell)>>;
    static CACHE: OnceLock<Cache> = OnceLock::new();
    let cache = CACHE.get_or_init(|| Mutex::new(Vec::new()));
    let mut guard = cache.lock().unwrap_or_else(|e| e.into_inner());
    if let Some((_, cell)) = guard.iter().find(|(l, _)| l == lib) {
        return (cell.clone(), false);
    }
    if guard.len() >= 8 {
        guard.remove(0);
    }
    let cell = TableCell::default();
    guard.push((lib.clone(), cell.clone()));
    (cell, true)
}

/// The match table of `lib`, built once per process and library and shared
/// (and kept on disk between processes, see [`table_cache`]).
pub fn match_table(lib: &Library) -> Arc<MatchTable> {
    let (cell, _) = table_cell(lib);
    cell.get_or_init(|| Arc::new(table_cache::load_or_build(lib)))
        .clone()
}

/// Starts making, on a thread of its own, the tables of the built-in
/// libraries inside `lib` whose runs join the pool ([`runs`]), so that
/// they are read or built while this thread makes `lib`'s own table and
/// maps with it. Tables already made or started are left alone, and a
/// thread that cannot be started only means they are made when asked for.
fn start_sub_library_tables(lib: &Library) {
    let mut fresh = Vec::new();
    let mut outer = lib.clone();
    while let Some(sub) = runs::largest_builtin_subset(&outer) {
        let (cell, new) = table_cell(&sub);
        if new {
            fresh.push((sub.clone(), cell));
        }
        outer = sub;
    }
    if fresh.is_empty() {
        return;
    }
    let _ = std::thread::Builder::new()
        .name("sub-library tables".into())
        .spawn(move || {
            for (sub, cell) in fresh {
                cell.get_or_init(|| Arc::new(table_cache::load_or_build(&sub)));
            }
        });
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

/// Delay bounds explored after the delay pass, as fractions over the least
/// delay (0 is the delay goal's own run).
const DELAY_BOUNDS: [f64; 4] = [0.0, 0.1, 0.25, 0.5];

/// Area recovery of a delay-mapped `cover` within `target` at the outputs:
/// area flow, then `area_passes` exact-area passes, then extraction (with
/// the witness of every net, see [`witness`]).
fn recover(
    mut cover: Cover,
    target: f32,
    area_passes: usize,
) -> (MappedNetlist, witness::NetClaims) {
    cover.mark();
    cover.set_required(target);
    cover.update_fanout_estimate();
    if cover.reselect(Rank::AreaFlow).is_err() {
        unreachable!("a node mapped once always has a match");
    }
    for _ in 0..area_passes {
        cover.mark();
        cover.set_required(target);
        cover.exact_area_pass();
    }
    cover.mark();
    cover.into_netlist_with_witness()
}

/// `run` with fanout trees ([`fanout`]): all the splits that lower its
/// delay (`RUN+buffers`) and, when fewer give a lower area × delay, those
/// (`RUN+buffers-trimmed`).
fn buffered_runs(run: &Run, lib: &Library) -> Vec<Run> {
    let Some(full) = fanout::split_critical_loads(&run.netlist, lib) else {
        return Vec::new();
    };
    let trimmed = full.trimmed(&run.netlist, lib);
    let mut out = Vec::new();
    for (suffix, b) in [("+buffers", Some(full)), ("+buffers-trimmed", trimmed)] {
        let Some(b) = b else {
            continue;
        };
        let mut witness = run.witness.clone();
        witness.extend_with(
            b.netlist.nets.len(),
            b.copies
                .iter()
                .map(|c| (c.net, c.source, c.kind == fanout::CopyKind::Duplicate)),
        );
        let mut r = Run::measure(format!("{}{suffix}", run.name), b.netlist, witness, lib);
        // A run may have had trees already (a sub-library's `+buffers`).
        r.buffers = run.buffers + b.copies.len();
        out.push(r);
    }
    out
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
    start_sub_library_tables(lib);
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

    let augmented;
    let table: &MatchTable = if opts.optimum {
        let t = Instant::now();
        let mut probe = Cover::new(subject, lib, &table, opts.cut_size)?;
        let functions = probe.enumerate_and_collect(opts.cuts_per_node, Rank::Delay)?;
        drop(probe);
        augmented = optimum::augmented_table(&table, lib, functions).0;
        seconds.insert("exact_cuts".to_string(), t.elapsed().as_secs_f64());
        &augmented
    } else {
        &table
    };

    // Run 1: area flow from the start, no delay bound.
    let t = Instant::now();
    let mut area_cover = Cover::new(subject, lib, table, opts.cut_size)?;
    area_cover.blind_to_delays();
    area_cover.enumerate_and_map(opts.cuts_per_node, Rank::AreaFlow)?;
    let mut cover = Cover::new(subject, lib, table, opts.cut_size)?;
    cover.enumerate_and_map(opts.cuts_per_node, Rank::Delay)?;
    seconds.insert("cuts".to_string(), t.elapsed().as_secs_f64());

    let t = Instant::now();
    // The runs of this library, measured once the covered network's origin
    // (which owns the balanced network the covers borrow) is known.
    let mut own: Vec<(String, (MappedNetlist, witness::NetClaims))> = vec![(
        "area".to_string(),
        recover(area_cover, f32::INFINITY, opts.area_passes),
    )];
    // Runs 2 and on: one delay pass, then area recovery within each bound.
    let best_delay = cover.mark();
    let cover_bytes = cover.memory_bytes();
    let cuts = cover.cuts.len();
    let covered_nodes = subject.num_nodes();
    let mut slacks = DELAY_BOUNDS.to_vec();
    slacks.push(opts.delay_slack);
    slacks.sort_by(f64::total_cmp);
    slacks.dedup();
    for slack in slacks {
        let name = if slack == 0.0 {
            "delay".to_string()
        } else {
            format!("delay+{:.0}%", slack * 100.0)
        };
        let target = best_delay * (1.0 + slack as f32);
        own.push((name, recover(cover.clone(), target, opts.area_passes)));
    }
    // The delay pass repeated with the loads of its own cover until its
    // delay settles, then area recovery within that delay.
    let settled = cover.settle_loads()?;
    own.push((
        "delay/loads".to_string(),
        recover(cover, settled, opts.area_passes),
    ));
    seconds.insert("cover".to_string(), t.elapsed().as_secs_f64());

    // The runs of the largest built-in library this one contains (each
    // with its own witness: the sub-library covered its own network).
    let mut sub_runs = Vec::new();
    if let Some(sub) = runs::largest_builtin_subset(lib) {
        let t = Instant::now();
        let sub_outcome = map_detailed(net, &sub, opts)?;
        for r in sub_outcome.runs {
            let name = format!("{}:{}", sub.name, r.name);
            let netlist = runs::translate(r.netlist, &sub, lib);
            let mut run = Run::measure(name, netlist, r.witness, lib);
            run.buffers = r.buffers;
            sub_runs.push(run);
        }
        seconds.insert("subset".to_string(), t.elapsed().as_secs_f64());
    }
    let origin = Arc::new(match (optimized, balanced) {
        (None, None) => CoveredOrigin::Input,
        (None, Some((covered, map))) => CoveredOrigin::Balanced { covered, map },
        (Some(covered), None) | (Some(_), Some((covered, _))) => {
            CoveredOrigin::Restructured { covered }
        }
    });
    let mut runs: Vec<Run> = own
        .into_iter()
        .map(|(name, (netlist, net_lits))| {
            let witness = CoverWitness {
                origin: origin.clone(),
                net_lits,
            };
            Run::measure(name, netlist, witness, lib)
        })
        .collect();
    runs.extend(sub_runs);
    // Fanout trees on the critical nets of the fastest run and of the
    // least-area run (the latter is what `balanced` often wants: the small
    // cover with its few heavy loads split).
    let fastest = runs::pick(&runs, Goal::Delay);
    let mut bases = vec![fastest];
    if let Some(area_run) = runs.iter().position(|r| r.name == "area") {
        if area_run != fastest {
            bases.push(area_run);
        }
    }
    let t = Instant::now();
    for base in bases {
        // A sub-library's run with trees already had its splitting.
        if !runs[base].name.contains("+buffers") {
            runs.extend(buffered_runs(&runs[base], lib));
        }
    }
    seconds.insert("fanout".to_string(), t.elapsed().as_secs_f64());
    let won = runs::pick(&runs, opts.goal);
    let netlist = runs[won].netlist.clone();
    let witness = runs[won].witness.clone();
    let run = runs[won].name.clone();
    let buffers = runs[won].buffers;
    Ok(MapOutcome {
        netlist,
        run,
        runs,
        seconds,
        covered_nodes,
        cuts,
        cover_bytes,
        witness,
        buffers,
    })
}
