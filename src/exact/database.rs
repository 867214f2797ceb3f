//! The optimum database: exact minimum implementations of small functions
//! on one library, for the mapper.
//!
//! Keyed by the gate set's content hash and the function's permutation
//! class: a query permutes the truth table to the smallest member of its
//! class, looks that up (synthesising it on first use), and renames the
//! inputs of the stored network back, so one SAT run serves every input
//! order. Entries live in memory behind a lock (the database is `Sync`; many
//! mapper threads may query it at once; synthesis runs outside the lock) and
//! can be saved to and loaded from the coverage cache folder.
//!
//! ```
//! use ribbonmap::exact::{GateSpec, OptimumDatabase, ExactOptions};
//! let gates = vec![GateSpec::new("nand2", 2, 0x7, 1.0), GateSpec::new("inv", 1, 0x1, 1.0)];
//! let db = OptimumDatabase::new("nand-inv", gates, ExactOptions::default());
//! // AND is a NAND followed by an inverter: two cells.
//! let and2 = db.implementation(0x8, 2).unwrap();
//! assert_eq!(and2.cells, 2);
//! ```

use super::cache;
use super::gates::{row_mask, GateSpec};
use super::synthesize::{synthesize, ExactOptions, ExactResult, Objective, Source};
use crate::truth::p_canon;
use rayon::prelude::*;
use serde::{Deserialize, Serialize};
use std::collections::HashMap;
use std::path::{Path, PathBuf};
use std::sync::{Arc, RwLock};

/// Largest number of inputs the database serves.
pub const DATABASE_MAX_INPUTS: usize = 4;

/// Exact minimum implementations of functions of up to four inputs on one
/// gate set, computed on demand and kept.
pub struct OptimumDatabase {
    name: String,
    gates: Vec<GateSpec>,
    hash: String,
    options: ExactOptions,
    /// (inputs, class representative) to its implementation (`None`: none
    /// within the limits).
    entries: RwLock<EntryMap>,
}

/// (inputs, class representative) to the stored implementation.
type EntryMap = HashMap<(usize, u64), Option<Arc<ExactResult>>>;

#[derive(Serialize, Deserialize)]
struct DatabaseFile {
    format: String,
    library_hash: String,
    objective: Objective,
    free_complements: bool,
    entries: Vec<(usize, u64, Option<ExactResult>)>,
}

impl OptimumDatabase {
    /// An empty database for `gates` (named `name`), synthesising with
    /// `options` (its objective decides what "optimum" means).
    pub fn new(name: &str, gates: Vec<GateSpec>, options: ExactOptions) -> OptimumDatabase {
        OptimumDatabase {
            name: name.to_string(),
            hash: cache::gate_set_hash(&gates),
            gates,
            options,
            entries: RwLock::new(HashMap::new()),
        }
    }

    /// Library name given at creation.
    pub fn name(&self) -> &str {
        &self.name
    }

    /// Content hash of the gate set (the key of the disk cache).
    pub fn library_hash(&self) -> &str {
        &self.hash
    }

    /// The gates the stored networks' `Step::gate` indices refer to.
    pub fn gates(&self) -> &[GateSpec] {
        &self.gates
    }

    /// Number of classes stored.
    pub fn len(&self) -> usize {
        self.entries.read().map(|e| e.len()).unwrap_or(0)
    }

    /// Whether nothing is stored yet.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// The minimum implementation of `truth` over `inputs` inputs (at most
    /// four): steps over the function's own inputs, checked by simulation.
    /// `None` when `inputs` is too large, the table does not fit, or no
    /// network exists within the options' limits.
    pub fn implementation(&self, truth: u64, inputs: usize) -> Option<Arc<ExactResult>> {
        if inputs > DATABASE_MAX_INPUTS || truth & !row_mask(inputs) != 0 {
            return None;
        }
        // The class key is the numerically smallest table over all input
        // permutations. Input `transform.perm[j]` of that table is input `j`
        // of `truth`; `perm` is the inverse: its input `k` is `perm[k]` here.
        let (representative, transform) = p_canon(truth, inputs);
        let mut perm = vec![0usize; inputs];
        for (j, &k) in transform.perm[..inputs].iter().enumerate() {
            perm[k as usize] = j;
        }
        let stored = self.class_implementation(inputs, representative)?;
        if perm.iter().enumerate().all(|(k, &p)| k == p) {
            return Some(stored);
        }
        let mut renamed = (*stored).clone();
        let rename = |source: &mut Source| {
            if let Source::Input(k) = source {
                *k = perm[*k];
            }
        };
        for step in &mut renamed.steps {
            for f in &mut step.fanins {
                rename(&mut f.source);
            }
        }
        for o in &mut renamed.outputs {
            rename(&mut o.source);
        }
        debug_assert_eq!(renamed.simulate(&self.gates), vec![truth]);
        Some(Arc::new(renamed))
    }

    /// Synthesises every permutation class of `inputs` inputs not yet stored,
    /// in parallel.
    pub fn precompute(&self, inputs: usize) {
        if inputs > DATABASE_MAX_INPUTS {
            return;
        }
        let (_, classes) =
            super::classes::enumerate_classes(inputs, super::classes::Transforms::Permutation);
        classes.par_iter().for_each(|c| {
            let _ = self.class_implementation(inputs, c.representative);
        });
    }

    /// Synthesises again every stored entry that is not proven minimal, in
    /// parallel: first with the database's own options (a lower bound from
    /// the relaxed basis is only tried when a limit stops a proof), then,
    /// where that is not enough, with `options` (typically without a
    /// conflict limit). Keeps a new result where it is proven, storing each
    /// as soon as it is. Returns how many entries became proven.
    pub fn reprove(&self, options: &ExactOptions) -> usize {
        let pending: Vec<(usize, u64)> = match self.entries.read() {
            Ok(e) => e
                .iter()
                .filter(|(_, r)| r.as_ref().is_none_or(|r| !r.optimal))
                .map(|(&key, _)| key)
                .collect(),
            Err(_) => return 0,
        };
        pending
            .par_iter()
            .filter(|&&(inputs, rep)| {
                let proven = [&self.options, options].into_iter().find_map(|opts| {
                    synthesize(&[rep], inputs, &self.gates, opts)
                        .ok()
                        .filter(|r| r.optimal)
                });
                match (proven, self.entries.write()) {
                    (Some(result), Ok(mut entries)) => {
                        entries.insert((inputs, rep), Some(Arc::new(result)));
                        true
                    }
                    _ => false,
                }
            })
            .count()
    }

    fn class_implementation(&self, inputs: usize, representative: u64) -> Option<Arc<ExactResult>> {
        if let Ok(entries) = self.entries.read() {
            if let Some(found) = entries.get(&(inputs, representative)) {
                return found.clone();
            }
        }
        let computed = synthesize(&[representative], inputs, &self.gates, &self.options)
            .ok()
            .map(Arc::new);
        if let Ok(mut entries) = self.entries.write() {
            entries
                .entry((inputs, representative))
                .or_insert_with(|| computed.clone());
        }
        computed
    }

    fn file_path(&self) -> Option<PathBuf> {
        cache::cache_dir().map(|d| {
            d.join(format!(
                "optimum-{}-{:?}{}.json",
                self.hash,
                self.options.objective,
                if self.options.free_complements {
                    "-free"
                } else {
                    ""
                }
            ))
        })
    }

    /// Adds the entries saved in the cache folder for this gate set and
    /// objective; returns how many were read.
    pub fn load_from_cache(&self) -> usize {
        match self.file_path() {
            Some(path) => self.load_file(&path),
            None => 0,
        }
    }

    /// Saves all entries to the cache folder (atomically).
    pub fn save_to_cache(&self) -> std::io::Result<()> {
        match self.file_path() {
            Some(path) => self.save_file(&path),
            None => Ok(()),
        }
    }

    /// Adds the entries of a database file written by [`Self::save_file`]
    /// (or found in the cache folder) for the same gate set and options.
    /// Every entry is checked by simulation; entries that fail, and files
    /// for another gate set, objective or complement mode, are ignored.
    /// Returns how many entries were added.
    pub fn load_file(&self, path: &Path) -> usize {
        let Some(file) = cache::read_json::<DatabaseFile>(path) else {
            return 0;
        };
        if file.format != cache::format_tag()
            || file.library_hash != self.hash
            || file.objective != self.options.objective
            || file.free_complements != self.options.free_complements
        {
            return 0;
        }
        let mut count = 0;
        if let Ok(mut entries) = self.entries.write() {
            for (inputs, rep, result) in file.entries {
                let valid = inputs <= DATABASE_MAX_INPUTS
                    && result.as_ref().is_none_or(|r| {
                        r.inputs == inputs
                            && r.is_well_formed(&self.gates)
                            && r.simulate(&self.gates) == vec![rep]
                    });
                if valid {
                    entries.insert((inputs, rep), result.map(Arc::new));
                    count += 1;
                }
            }
        }
        count
    }

    /// Writes all entries to `path` (atomically, creating its folder).
    pub fn save_file(&self, path: &Path) -> std::io::Result<()> {
        let mut entries: Vec<(usize, u64, Option<ExactResult>)> = match self.entries.read() {
            Ok(e) => e
                .iter()
                .map(|(&(i, rep), r)| (i, rep, r.as_ref().map(|r| (**r).clone())))
                .collect(),
            Err(_) => return Ok(()),
        };
        entries.sort_by_key(|e| (e.0, e.1));
        cache::write_json(
            path,
            &DatabaseFile {
                format: cache::format_tag().to_string(),
                library_hash: self.hash.clone(),
                objective: self.options.objective,
                free_complements: self.options.free_complements,
                entries,
            },
        )
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn permuted_queries_share_one_entry_and_simulate() {
        let gates = vec![
            GateSpec::new("and2", 2, 0x8, 1.0),
            GateSpec::new("inv", 1, 0x1, 1.0),
        ];
        let db = OptimumDatabase::new("t", gates.clone(), ExactOptions::default());
        // x0 & !x1 and x1 & !x0 are one permutation class.
        let a = db.implementation(0b0010, 2).unwrap();
        let b = db.implementation(0b0100, 2).unwrap();
        assert_eq!(db.len(), 1);
        assert_eq!(a.simulate(&gates), vec![0b0010]);
        assert_eq!(b.simulate(&gates), vec![0b0100]);
        assert_eq!(a.cells, 2);
        // Every 3-input function with an asymmetric order.
        for t in [0xCAu64, 0xD8, 0xB1] {
            let r = db.implementation(t, 3).unwrap();
            assert_eq!(r.simulate(&gates), vec![t]);
        }
        assert!(db.implementation(0x1_0000, 4).is_none());
        assert!(db.implementation(0x3, 5).is_none());
    }
}
