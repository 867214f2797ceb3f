//! Coverage tables: how many cells each small function needs on a library.
//!
//! Method. Cell counts never change when the inputs are permuted (relabel
//! the inputs of a network), so functions are solved one per permutation
//! class and weighted by the class size. With free complements the counts
//! also do not change under input and output negation, and one function per
//! NPN class suffices (222 classes for four inputs). Without free
//! complements an inverter costs a cell, so `f` and `!f` may differ and the
//! permutation classes are solved (80 for three inputs, 3984 for four); the
//! report then also lists, for every NPN class, the fewest and the most
//! cells among its members, which shows where negations cost cells.
//!
//! The histogram always counts all `2^(2^n)` functions. Constants and
//! literals (a plain input, or a complemented one when complements are free)
//! cost 0 cells. Classes are solved in parallel (rayon). Results are cached
//! on disk per library content hash (see [`super::cache`]).

use super::cache::{self, CachedClass};
use super::classes::{enumerate_classes, Transforms};
use super::gates::{gates_from_library, GateSpec};
use super::synthesize::{synthesize, ExactError, ExactOptions, Objective};
use crate::library::Library;
use rayon::prelude::*;
use serde::Serialize;
use std::collections::BTreeMap;
use std::time::Instant;

/// Options of [`coverage`].
#[derive(Clone, Debug)]
pub struct CoverageOptions {
    /// Number of inputs: 2, 3 or 4.
    pub inputs: usize,
    /// Complements of inputs and outputs are free.
    pub free_complements: bool,
    /// Conflict limit per SAT call (unlimited when `None`).
    pub conflict_limit: Option<u64>,
    /// Largest step count tried per function.
    pub max_steps: usize,
    /// Read and write the on-disk cache.
    pub use_cache: bool,
}

impl Default for CoverageOptions {
    fn default() -> Self {
        CoverageOptions {
            inputs: 4,
            free_complements: false,
            conflict_limit: None,
            max_steps: 10,
            use_cache: true,
        }
    }
}

/// The cost of one solved class.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct ClassCost {
    /// Smallest function of the class.
    pub representative: u64,
    /// Number of functions in the class.
    pub functions: u64,
    /// Fewest cells found (`None`: no network within the limits).
    pub cells: Option<usize>,
    /// Whether `cells` is proven minimal.
    pub optimal: bool,
    /// Seconds its synthesis took (as recorded when it was computed, also
    /// for a cached table).
    pub seconds: f64,
}

/// Cell counts over one NPN class (only without free complements).
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct NpnSummary {
    /// Smallest function of the NPN class.
    pub representative: u64,
    /// Number of functions in the class.
    pub functions: u64,
    /// Fewest cells of any member.
    pub min_cells: Option<usize>,
    /// Most cells of any member.
    pub max_cells: Option<usize>,
}

/// A coverage table for one library.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Coverage {
    /// Library name.
    pub name: String,
    /// Content hash of the gate set (cache key).
    pub library_hash: String,
    /// Number of inputs.
    pub inputs: usize,
    /// Whether complements were free.
    pub free_complements: bool,
    /// Number of functions the histogram counts (`2^(2^inputs)`).
    pub functions: u64,
    /// Cell count to number of functions.
    pub histogram: BTreeMap<usize, u64>,
    /// Number of functions one cell realises.
    pub one_cell: u64,
    /// Functions without a network within the limits.
    pub unsolved: u64,
    /// Functions whose count is not proven minimal.
    pub unproven: u64,
    /// Mean cells per function over the solved ones.
    pub mean_cells: f64,
    /// The solved classes.
    pub classes: Vec<ClassCost>,
    /// Per NPN class, the range of cell counts (without free complements).
    pub npn_classes: Vec<NpnSummary>,
    /// Whether the table came from the cache.
    pub cached: bool,
    /// Seconds spent computing (0 when cached).
    pub seconds: f64,
}

impl Coverage {
    /// The class whose synthesis took longest, with its seconds.
    pub fn slowest_class(&self) -> Option<&ClassCost> {
        self.classes
            .iter()
            .max_by(|a, b| a.seconds.total_cmp(&b.seconds))
    }
}

/// Computes the coverage table of `gates` (named `name`) for all functions
/// of `opts.inputs` inputs, counting cells.
///
/// The cache key is a content hash of `gates` ([`cache::gate_set_hash`]).
pub fn coverage(
    name: &str,
    gates: &[GateSpec],
    opts: &CoverageOptions,
) -> Result<Coverage, ExactError> {
    coverage_keyed(name, gates, cache::gate_set_hash(gates), opts)
}

/// [`coverage`] of a library's cells, cached under the library's
/// [`Library::content_hash`].
pub fn coverage_of_library(lib: &Library, opts: &CoverageOptions) -> Result<Coverage, ExactError> {
    coverage_keyed(
        &lib.name,
        &gates_from_library(lib),
        format!("lib{:016x}", lib.content_hash()),
        opts,
    )
}

fn coverage_keyed(
    name: &str,
    gates: &[GateSpec],
    hash: String,
    opts: &CoverageOptions,
) -> Result<Coverage, ExactError> {
    if !(1..=4).contains(&opts.inputs) {
        return Err(ExactError::TooManyInputs(opts.inputs));
    }
    let transforms = if opts.free_complements {
        Transforms::Npn
    } else {
        Transforms::Permutation
    };
    let (class_of, classes) = enumerate_classes(opts.inputs, transforms);
    let start = Instant::now();
    let key = cache::CoverageKey {
        library_hash: hash.clone(),
        inputs: opts.inputs,
        free_complements: opts.free_complements,
        max_steps: opts.max_steps,
    };
    let cached = if opts.use_cache {
        cache::load_coverage(&key).filter(|c| c.len() == classes.len())
    } else {
        None
    };
    let from_cache = cached.is_some();
    let solved: Vec<CachedClass> = match cached {
        Some(c) => c,
        None => {
            let exact = ExactOptions {
                objective: Objective::Cells,
                free_complements: opts.free_complements,
                conflict_limit: opts.conflict_limit,
                time_limit: None,
                max_steps: opts.max_steps,
            };
            let results: Vec<Result<CachedClass, ExactError>> = classes
                .par_iter()
                .map(|class| {
                    let started = Instant::now();
                    let found = synthesize(&[class.representative], opts.inputs, gates, &exact);
                    let seconds = started.elapsed().as_secs_f64();
                    match found {
                        Ok(r) => Ok(CachedClass {
                            representative: class.representative,
                            cells: Some(r.cells),
                            optimal: r.optimal,
                            seconds,
                        }),
                        Err(ExactError::NotFound(_)) | Err(ExactError::LimitReached) => {
                            Ok(CachedClass {
                                representative: class.representative,
                                cells: None,
                                optimal: false,
                                seconds,
                            })
                        }
                        Err(e) => Err(e),
                    }
                })
                .collect();
            let solved = results.into_iter().collect::<Result<Vec<_>, _>>()?;
            if opts.use_cache {
                // A cache that cannot be written only costs time next run.
                let _ = cache::store_coverage(&key, &solved);
            }
            solved
        }
    };
    let seconds = if from_cache {
        0.0
    } else {
        start.elapsed().as_secs_f64()
    };

    let mut histogram = BTreeMap::new();
    let (mut unsolved, mut unproven, mut total_cells, mut counted) = (0u64, 0u64, 0u64, 0u64);
    let mut costs = Vec::with_capacity(classes.len());
    for (class, solved) in classes.iter().zip(&solved) {
        match solved.cells {
            Some(c) => {
                *histogram.entry(c).or_insert(0) += class.size;
                total_cells += c as u64 * class.size;
                counted += class.size;
            }
            None => unsolved += class.size,
        }
        if !solved.optimal {
            unproven += class.size;
        }
        costs.push(ClassCost {
            representative: class.representative,
            functions: class.size,
            cells: solved.cells,
            optimal: solved.optimal,
            seconds: solved.seconds,
        });
    }
    let npn_classes = if opts.free_complements {
        Vec::new()
    } else {
        npn_summaries(opts.inputs, &class_of, &costs)
    };
    Ok(Coverage {
        name: name.to_string(),
        library_hash: hash,
        inputs: opts.inputs,
        free_complements: opts.free_complements,
        functions: class_of.len() as u64,
        one_cell: histogram.get(&1).copied().unwrap_or(0),
        histogram,
        unsolved,
        unproven,
        mean_cells: if counted == 0 {
            0.0
        } else {
            total_cells as f64 / counted as f64
        },
        classes: costs,
        npn_classes,
        cached: from_cache,
        seconds,
    })
}

/// Groups permutation-class costs by NPN class.
fn npn_summaries(inputs: usize, p_class_of: &[u32], costs: &[ClassCost]) -> Vec<NpnSummary> {
    let (npn_of, npn_classes) = enumerate_classes(inputs, Transforms::Npn);
    let mut out: Vec<NpnSummary> = npn_classes
        .iter()
        .map(|c| NpnSummary {
            representative: c.representative,
            functions: c.size,
            min_cells: None,
            max_cells: None,
        })
        .collect();
    for (f, &p) in p_class_of.iter().enumerate() {
        let entry = &mut out[npn_of[f] as usize];
        if let Some(c) = costs[p as usize].cells {
            entry.min_cells = Some(entry.min_cells.map_or(c, |m| m.min(c)));
            entry.max_cells = Some(entry.max_cells.map_or(c, |m| m.max(c)));
        }
    }
    out
}
