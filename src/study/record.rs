//! One study result: a benchmark mapped on a library with a goal.
//!
//! A [`StudyRecord`] carries every number the tables and charts need and is
//! also the line format of study result files: it serialises to the `map`
//! report fields (docs/study.md: `design`, `library`, `goal`, `cells`,
//! `cell_count`, `area`, `depth`, `delay`, `devices`, `verified`, `seconds`)
//! plus `benchmark`, `plan_key` and the energy figures. Fields this crate
//! does not know (added by later versions of the map report) are kept in
//! `extra` and written back unchanged, so merging never loses data.

use indexmap::IndexMap;
use serde::{Deserialize, Serialize};

/// Errors of the study layer, split by who is to blame.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum StudyError {
    /// Bad input: a plan, netlist, library or result file is wrong.
    #[error("{0}")]
    Input(String),
    /// A bug: a mapped circuit failed its own check, or a mapper error that
    /// should not happen.
    #[error("{0}")]
    Internal(String),
}

impl From<crate::diag::SourceError> for StudyError {
    fn from(e: crate::diag::SourceError) -> Self {
        StudyError::Input(e.to_string())
    }
}

/// The results of one benchmark × library × goal.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct StudyRecord {
    /// Benchmark name (file stem or generator label).
    pub benchmark: String,
    /// Design name inside the netlist.
    #[serde(default)]
    pub design: String,
    /// Library name.
    pub library: String,
    /// Mapping goal (`area`, `delay` or `balanced`).
    pub goal: String,
    /// Stable key of the study job, when the record came from a study run.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub plan_key: Option<String>,
    /// Cell name to instance count.
    #[serde(default)]
    pub cells: IndexMap<String, u64>,
    /// Number of cell instances.
    pub cell_count: u64,
    /// Total area in the library's unit.
    pub area: f64,
    /// Cells on the longest path.
    pub depth: u64,
    /// Longest path delay in the library's unit.
    pub delay: f64,
    /// Total devices.
    pub devices: u64,
    /// How the mapping was checked: `proven`, `simulated` or `skipped`.
    pub verified: String,
    /// Dynamic energy per operation in the library's energy unit.
    #[serde(default)]
    pub energy_per_op: f64,
    /// Static power in the library's power unit.
    #[serde(default)]
    pub static_power: f64,
    /// Instances of cells whose function is in the NPN class of maj3.
    #[serde(default)]
    pub majority_cells: u64,
    /// Other fields of the map report, kept as they are.
    #[serde(flatten)]
    pub extra: serde_json::Map<String, serde_json::Value>,
}

impl StudyRecord {
    /// Reads a record from one JSON object (a result line), naming the
    /// missing or mistyped field on error.
    pub fn from_json(value: serde_json::Value) -> Result<StudyRecord, String> {
        serde_json::from_value(value).map_err(|e| e.to_string())
    }

    /// The record as one JSON line (no trailing newline).
    pub fn to_json_line(&self) -> String {
        serde_json::to_string(self).unwrap_or_else(|e| format!("{{\"error\":\"{e}\"}}"))
    }
}

/// True when a `arity`-input function `truth` is in the NPN class of
/// three-input majority: some negation of inputs and output of maj3 (maj3 is
/// symmetric, so permutations add nothing).
pub fn is_majority_class(truth: u64, arity: usize) -> bool {
    if arity != 3 {
        return false;
    }
    let truth = truth & 0xFF;
    (0..8u32).any(|negate| {
        let mut t = 0u64;
        for row in 0..8u32 {
            let x = row ^ negate;
            let ones = x.count_ones();
            if ones >= 2 {
                t |= 1 << row;
            }
        }
        t == truth || (!t & 0xFF) == truth
    })
}

/// Counts instances of majority-class cells in a cell-name → count map.
pub fn count_majority_cells(
    cells: &IndexMap<String, u64>,
    library: &crate::library::Library,
) -> u64 {
    cells
        .iter()
        .filter(|(name, _)| {
            library
                .cell(name)
                .is_some_and(|c| is_majority_class(c.truth, c.arity()))
        })
        .map(|(_, &n)| n)
        .sum()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn majority_class_has_eight_members() {
        // maj3 is self-dual and symmetric: its NPN class is the 8 functions
        // maj(a^x, b^y, c^z) (output negation equals negating all inputs).
        // (common practice)
        let members: Vec<u64> = (0..256u64).filter(|&t| is_majority_class(t, 3)).collect();
        assert_eq!(members.len(), 8);
        assert!(members.contains(&0xE8));
        assert!(members.contains(&0x17)); // minority
        assert!(!is_majority_class(0x96, 3));
        assert!(!is_majority_class(0x80, 3));
        assert!(!is_majority_class(0xE8, 4));
    }

    #[test]
    fn record_round_trips_with_unknown_fields() {
        let line = r#"{"benchmark":"b","design":"d","library":"l","goal":"area","cells":{"maj3":2},"cell_count":2,"area":1.5,"depth":1,"delay":2.0,"devices":4,"verified":"simulated","seconds":{"map":0.1}}"#;
        let r = StudyRecord::from_json(serde_json::from_str(line).unwrap()).unwrap();
        assert_eq!(r.cell_count, 2);
        assert!(r.extra.contains_key("seconds"));
        let back: serde_json::Value = serde_json::from_str(&r.to_json_line()).unwrap();
        assert_eq!(back["seconds"]["map"], 0.1);
    }
}
