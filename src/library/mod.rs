//! Cell libraries: the data model every later stage reads.
//!
//! A [`Library`] is a list of combinational [`Cell`]s, each with its Boolean
//! function as a truth table and its costs, plus optional storage cells. The
//! on-disk format is `ribbonmap-library/1` (JSON, see docs/library-format.md).
//!
//! The children split the work: `load` reads and checks a file
//! ([`Library::from_json_str`], [`Library::load`]) and collects every problem
//! into a [`LibraryError`]; `positions` finds lines and columns for those
//! problems; [`completeness`] applies Post's criteria; `builtin` embeds the
//! libraries in `libraries/` ([`Library::builtin`]); `hash` fingerprints a
//! library's cells and costs ([`Library::content_hash`]); [`electrical`]
//! checks and reads the optional electrical data of characterised libraries.

mod builtin;
pub mod completeness;
pub mod electrical;
mod error;
mod hash;
mod load;
pub(crate) mod positions;

pub use builtin::builtin_text;
pub use error::{LibraryError, LibraryProblem};
pub use hash::fnv1a;
pub use load::{function_texts, FORMAT, MAX_CELL_INPUTS};

use serde::{Deserialize, Serialize};

/// Units the library's numbers are given in; reports print them.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Units {
    /// Unit of area (e.g. "nm2", "transistors").
    pub area: String,
    /// Unit of delay (e.g. "ps", "tau").
    pub delay: String,
    /// Unit of switching energy (e.g. "aJ").
    pub energy: String,
    /// Unit of static power (e.g. "nW").
    pub power: String,
}

/// Load-dependent delay: `intrinsic + per_load * load`.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct DelayModel {
    /// Delay with no load.
    pub intrinsic: f64,
    /// Delay per unit of driven input load.
    pub per_load: f64,
}

/// Static leakage of a cell: one value, or one value per input row.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(untagged)]
pub enum Leakage {
    /// The same leakage whatever the inputs.
    Constant(f64),
    /// Leakage on each input row (row r gives input k bit k of r).
    PerRow(Vec<f64>),
}

impl Default for Leakage {
    fn default() -> Self {
        Leakage::Constant(0.0)
    }
}

/// A combinational cell.
#[derive(Clone, Debug, PartialEq)]
pub struct Cell {
    /// Cell name, unique in the library.
    pub name: String,
    /// Input pin names; input k is bit k of a truth-table row.
    pub inputs: Vec<String>,
    /// Output pin name.
    pub output: String,
    /// The function: bit r is the output on row r. At most six inputs.
    pub truth: u64,
    /// Area in the library's unit.
    pub area: f64,
    /// Delay model.
    pub delay: DelayModel,
    /// Load each input pin presents.
    pub input_load: f64,
    /// Energy per output transition, without load.
    pub switch_energy: f64,
    /// Energy per output transition per unit of driven load (input-load
    /// units), e.g. `½·C_in·Vdd²`; 0 when the library gives none.
    pub switch_energy_per_load: f64,
    /// Static leakage.
    pub leakage: Leakage,
    /// Device count (e.g. ribbons or transistors).
    pub devices: u32,
}

impl Cell {
    /// Number of inputs.
    pub fn arity(&self) -> usize {
        self.inputs.len()
    }

    /// NPN canonical form of the cell's function and the transformation that
    /// reaches it (see [`crate::truth::npn`] for what the transformation means).
    pub fn npn(&self) -> (u64, crate::truth::NpnTransform) {
        crate::truth::npn_canon(self.truth, self.arity())
    }

    /// Delay when the output drives `load` (sum of driven input loads plus
    /// primary output loads): `intrinsic + per_load * load`.
    pub fn delay_for_load(&self, load: f64) -> f64 {
        self.delay.intrinsic + self.delay.per_load * load
    }

    /// Mean leakage over all input rows (or the constant leakage).
    pub fn mean_leakage(&self) -> f64 {
        match &self.leakage {
            Leakage::Constant(v) => *v,
            Leakage::PerRow(rows) if !rows.is_empty() => {
                rows.iter().sum::<f64>() / rows.len() as f64
            }
            Leakage::PerRow(_) => 0.0,
        }
    }
}

/// A storage cell (flip-flop or latch) the mapper can emit for storage
/// elements.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct StorageCell {
    /// Cell name.
    pub name: String,
    /// Data pin.
    pub d: String,
    /// Output pin.
    pub q: String,
    /// Clock pin.
    pub clock: String,
    /// Area.
    #[serde(default)]
    pub area: f64,
}

/// A validated cell library.
#[derive(Clone, Debug, PartialEq)]
pub struct Library {
    /// Library name.
    pub name: String,
    /// One-line description.
    pub description: String,
    /// Units of the numbers.
    pub units: Units,
    /// Supply voltage in volts, if given.
    pub supply_v: Option<f64>,
    /// Load of each primary output, in input-load units.
    pub primary_output_load: f64,
    /// Combinational cells.
    pub cells: Vec<Cell>,
    /// Storage cells.
    pub storage: Vec<StorageCell>,
}

impl Library {
    /// The cell named `name`.
    pub fn cell(&self, name: &str) -> Option<&Cell> {
        self.cells.iter().find(|c| c.name == name)
    }

    /// Index of the cell named `name`.
    pub fn cell_index(&self, name: &str) -> Option<usize> {
        self.cells.iter().position(|c| c.name == name)
    }

    /// The storage cell named `name`.
    pub fn storage_cell(&self, name: &str) -> Option<&StorageCell> {
        self.storage.iter().find(|c| c.name == name)
    }
}
