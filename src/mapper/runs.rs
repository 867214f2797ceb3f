//! The runs a goal chooses from, and the choice.
//!
//! One mapping call covers the subject several ways ("runs"): for least
//! area (area flow first, no delay bound, reading no delays), and after one delay-oriented pass,
//! area recovery within a range of delay bounds (the least delay, then
//! a few fractions over it). When a built-in library's cells, with the same
//! numbers, are all cells of the library being mapped, the runs of that
//! smaller library (found the same way, recursively) join the pool,
//! translated to the larger library's cell indices.
//!
//! Every goal picks from the same pool by its own figure, each measured on
//! the extracted netlist by static timing:
//! - `area`: least area, then least delay;
//! - `delay`: least delay, then least area;
//! - `balanced`: least area among the runs whose area × delay (a common
//!   figure of merit) is within [`BALANCED_TOLERANCE`] of the least, then
//!   least area × delay. A run that buys a 3 % faster circuit with 3 % more
//!   area has about the same area × delay; the tolerance, far below the
//!   precision of the library's delay numbers (two or three significant
//!   digits), keeps the smaller circuit in such a near-tie.
//!
//! When a run's netlist has nets whose load makes them critical, the
//! fastest run and the least-area run are also offered with fanout trees
//! of buffers and duplicated drivers ([`super::fanout`]), named
//! `RUN+buffers`, and with the trees cut back to the splits that give the
//! least area × delay, `RUN+buffers-trimmed`. The latter is the trade
//! `balanced` wants where one heavily loaded net makes a small cover slow:
//! the small cover stays, only its critical loads are split.
//!
//! So by construction the delay goal is never slower than the other goals'
//! results, the area goal never larger, balanced never more than the
//! tolerance worse in area × delay, and a library never loses on the goal's
//! figure to a built-in library it contains (balanced: beyond the
//! tolerance).

use super::witness::CoverWitness;
use super::Goal;
use crate::library::Library;
use crate::netlist::{analyze_timing, MappedNetlist};

/// One complete mapping in the pool.
#[derive(Clone, Debug)]
pub struct Run {
    /// How it was made: `area`, `delay`, `delay+P%` (area recovery within
    /// P % over the least delay), `delay/loads`, each maybe followed by
    /// `+buffers` or `+buffers-trimmed` (fanout trees), prefixed by `LIB:`
    /// for a sub-library.
    pub name: String,
    /// The netlist, in the cells of the library being mapped.
    pub netlist: MappedNetlist,
    /// Its area, in the library's area unit.
    pub area: f64,
    /// Its delay by static timing, in the library's delay unit.
    pub delay: f64,
    /// What every net implements, for the linear-time proof.
    pub witness: CoverWitness,
    /// Buffers and duplicated drivers added by fanout trees (see
    /// [`super::fanout`]).
    pub buffers: usize,
}

impl Run {
    /// Measures `netlist` on `lib`.
    pub fn measure(
        name: String,
        netlist: MappedNetlist,
        witness: CoverWitness,
        lib: &Library,
    ) -> Run {
        let area = netlist.area(lib);
        let delay = analyze_timing(&netlist, lib).delay;
        Run {
            name,
            netlist,
            area,
            delay,
            witness,
            buffers: 0,
        }
    }

    /// The figure `goal` minimises.
    pub fn figure(&self, goal: Goal) -> f64 {
        match goal {
            Goal::Area => self.area,
            Goal::Delay => self.delay,
            Goal::Balanced => self.area * self.delay,
        }
    }

    /// The tie-break after the goal's figure.
    fn second(&self, goal: Goal) -> f64 {
        match goal {
            Goal::Area => self.delay,
            Goal::Delay | Goal::Balanced => self.area,
        }
    }
}

/// Relative amount by which a run's area × delay may exceed the least of
/// the pool and still be picked by `balanced` for a smaller area (0.5 %).
pub const BALANCED_TOLERANCE: f64 = 0.005;

/// Index of the run `goal` picks: least figure, then least second figure,
/// then the earliest run; for `balanced`, least area among the runs within
/// [`BALANCED_TOLERANCE`] of the least area × delay.
pub fn pick(runs: &[Run], goal: Goal) -> usize {
    if goal == Goal::Balanced {
        let least = runs
            .iter()
            .map(|r| r.figure(goal))
            .fold(f64::INFINITY, f64::min);
        let bound = least * (1.0 + BALANCED_TOLERANCE);
        let mut best: Option<usize> = None;
        for (i, r) in runs.iter().enumerate() {
            if r.figure(goal) > bound {
                continue;
            }
            let better = best.is_none_or(|b| {
                let b = &runs[b];
                r.area < b.area || (r.area == b.area && r.figure(goal) < b.figure(goal))
            });
            if better {
                best = Some(i);
            }
        }
        return best.unwrap_or(0);
    }
    let mut best = 0;
    for (i, r) in runs.iter().enumerate().skip(1) {
        let b = &runs[best];
        let (f, fb) = (r.figure(goal), b.figure(goal));
        if f < fb || (f == fb && r.second(goal) < b.second(goal)) {
            best = i;
        }
    }
    best
}

/// The largest built-in library, other than `lib`, whose every cell is a
/// cell of `lib` with the same numbers (and with the same units and output
/// load), if there is one.
pub fn largest_builtin_subset(lib: &Library) -> Option<Library> {
    Library::builtin_names()
        .iter()
        .filter_map(|name| Library::builtin(name))
        .filter(|s| {
            s.name != lib.name
                && s.cells.len() < lib.cells.len()
                && s.units == lib.units
                && s.primary_output_load == lib.primary_output_load
                && s.cells.iter().all(|c| lib.cells.contains(c))
        })
        .max_by_key(|s| s.cells.len())
}

/// `netlist`, mapped on `sub`, rewritten with the cell indices of `lib`
/// (every cell of `sub` is a cell of `lib`).
pub fn translate(mut netlist: MappedNetlist, sub: &Library, lib: &Library) -> MappedNetlist {
    let index: Vec<u32> = sub
        .cells
        .iter()
        .map(|c| lib.cells.iter().position(|d| d == c).unwrap_or(0) as u32)
        .collect();
    for inst in &mut netlist.instances {
        inst.cell = index[inst.cell as usize];
    }
    for s in &mut netlist.storage {
        s.cell = lib.storage.first().map(|_| 0u32);
    }
    netlist.library = lib.name.clone();
    netlist
}
