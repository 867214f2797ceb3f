//! Exact minimum implementations of cut functions, from the library's
//! optimum database, as extra matches.
//!
//! Supergates are trees of a few cells; the smallest network of a function
//! of four inputs is often a DAG (a two-input XOR from four NANDs, a full
//! adder's sum sharing its carry). With [`MapOptions::optimum`] the mapper
//! therefore
//! 1. enumerates cuts once with the ordinary match table,
//! 2. collects the distinct functions of the stored cuts with two to four
//!    leaves, with their complements (both output phases are mapped),
//! 3. asks the library's [`OptimumDatabase`] for a least-area network of
//!    each (exact synthesis with inverters as cells, computed on first use
//!    in parallel, kept in memory for the process and in the disk cache),
//! 4. adds every network as an [`Implementation`] to a copy of the match
//!    table, and maps with that copy.
//!
//! A function whose exact synthesis exceeds the conflict limit keeps the
//! best network found (it is still correct, only not proven minimal) or
//! none. The database is shared per library content by every mapping in
//! the process.
//!
//! [`MapOptions::optimum`]: super::MapOptions::optimum

use super::implementation::{ImplGate, Implementation, Source};
use super::MatchTable;
use crate::exact::{
    gates_from_library, ExactOptions, ExactResult, Objective, OptimumDatabase, DATABASE_MAX_INPUTS,
};
use crate::library::Library;
use rayon::prelude::*;
use std::collections::{BTreeSet, HashMap};
use std::sync::{Arc, Mutex, OnceLock};

/// Conflicts allowed per SAT call of the database's exact synthesis, so a
/// hard function cannot stall a mapping (deterministic, unlike a time
/// limit).
pub const OPTIMUM_CONFLICT_LIMIT: u64 = 200_000;

/// What the optimum step did.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct OptimumStats {
    /// Distinct cut functions (both phases) looked up.
    pub functions: usize,
    /// Of those, how many have a network in the database.
    pub found: usize,
    /// Networks that became new matches (cheaper or faster than the table's).
    pub added: usize,
}

/// The optimum database of `lib`, shared by the whole process; created on
/// first use with the entries of the disk cache.
pub fn database(lib: &Library) -> Arc<OptimumDatabase> {
    type Registry = Mutex<HashMap<u64, Arc<OptimumDatabase>>>;
    static REGISTRY: OnceLock<Registry> = OnceLock::new();
    let registry = REGISTRY.get_or_init(|| Mutex::new(HashMap::new()));
    let mut guard = registry.lock().unwrap_or_else(|e| e.into_inner());
    guard
        .entry(lib.content_hash())
        .or_insert_with(|| {
            let db = OptimumDatabase::new(
                &lib.name,
                gates_from_library(lib),
                ExactOptions {
                    objective: Objective::Area,
                    free_complements: false,
                    conflict_limit: Some(OPTIMUM_CONFLICT_LIMIT),
                    time_limit: None,
                    max_steps: 10,
                },
            );
            db.load_from_cache();
            Arc::new(db)
        })
        .clone()
}

/// The exact network `result` (over leaves `0..inputs`) as a mapper
/// implementation, or `None` when it is a constant, a plain leaf, or uses a
/// cell the library lacks.
pub fn implementation_from_exact(lib: &Library, result: &ExactResult) -> Option<Implementation> {
    use crate::exact::Source as ExactSource;
    let output = result.outputs.first()?;
    if output.complemented || output.source != ExactSource::Step(result.steps.len().checked_sub(1)?)
    {
        return None;
    }
    let mut gates = Vec::with_capacity(result.steps.len());
    for step in &result.steps {
        let cell = lib.cell_index(&step.cell)? as u32;
        let mut inputs = Vec::with_capacity(step.fanins.len());
        for f in &step.fanins {
            inputs.push(match f.source {
                ExactSource::Constant => Source::Constant(f.complemented),
                ExactSource::Input(k) if k < 6 => Source::Leaf {
                    var: k as u8,
                    complemented: f.complemented,
                },
                ExactSource::Input(_) => return None,
                ExactSource::Step(j) if j < gates.len() => Source::Gate(j as u8),
                ExactSource::Step(_) => return None,
            });
        }
        gates.push(ImplGate { cell, inputs });
    }
    Implementation::new(lib, gates)
}

/// A copy of `table` with the optimum networks of `functions` (replicated
/// six-variable tables whose support is `0..m`, paired with `m`) and of
/// their complements added. Functions of more than four or fewer than two
/// leaves are skipped. New database entries are written to the disk cache.
pub fn augmented_table(
    table: &MatchTable,
    lib: &Library,
    functions: impl IntoIterator<Item = (u64, usize)>,
) -> (MatchTable, OptimumStats) {
    let mut wanted: BTreeSet<(u64, usize)> = BTreeSet::new();
    for (f, m) in functions {
        if (2..=DATABASE_MAX_INPUTS).contains(&m) {
            let mask = (1u64 << (1usize << m)) - 1;
            wanted.insert((f & mask, m));
            wanted.insert((!f & mask, m));
        }
    }
    let db = database(lib);
    let before = db.len();
    let wanted: Vec<(u64, usize)> = wanted.into_iter().collect();
    let results: Vec<Option<Arc<ExactResult>>> = wanted
        .par_iter()
        .map(|&(f, m)| db.implementation(f, m))
        .collect();
    if db.len() > before {
        // A cache that cannot be written only costs time on the next run.
        let _ = db.save_to_cache();
    }
    let mut stats = OptimumStats {
        functions: wanted.len(),
        ..OptimumStats::default()
    };
    let mut out = table.clone();
    let count_before = out.implementations.len();
    for result in results.iter().flatten() {
        stats.found += 1;
        if let Some(imp) = implementation_from_exact(lib, result) {
            let size = out.implementations.len();
            out.add(imp);
            if out.implementations.len() > size {
                stats.added += 1;
            }
        }
    }
    debug_assert!(out.implementations.len() >= count_before);
    (out, stats)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::mapper::small_truth::var;

    #[test]
    fn optimum_xor_on_nand_nor_library_beats_four_nands() {
        // Keep the disk cache out of the user's cache folder.
        let cache = tempfile::tempdir().expect("temporary folder");
        std::env::set_var("RIBBONMAP_CACHE_DIR", cache.path());
        // Four NAND2 make a two-input XOR (common practice), 16 transistors
        // with the library's areas; the optimum may not be larger.
        let lib = Library::builtin("nand-nor-inv").expect("built-in");
        let db = database(&lib);
        let xor = db.implementation(0x6, 2).expect("xor has a network");
        assert!(xor.optimal);
        let imp = implementation_from_exact(&lib, &xor).expect("converts");
        assert_eq!(imp.function, var(0) ^ var(1));
        assert_eq!(imp.area, xor.area);
        assert!(imp.area <= 16.0);
        let (table, stats) =
            augmented_table(&MatchTable::build(&lib), &lib, [(var(0) ^ var(1), 2)]);
        assert_eq!((stats.functions, stats.found), (2, 2));
        let slot = table.slot(var(0) ^ var(1));
        assert!(table
            .candidates(slot)
            .iter()
            .all(|&i| table.implementation(i).function == var(0) ^ var(1)));
    }
}
