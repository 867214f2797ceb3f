//! The optional electrical data of a characterised library: per cell an
//! `electrical` block (output levels, input thresholds, noise margins,
//! restoring or not, on/off ratios, per-row output voltage and static
//! current, the table files it came from) and, per library, a
//! `derived_from` record naming the device kit.
//!
//! These blocks are written by `ribbonmap characterize` (module `device`).
//! The loader checks them (types, row counts, level order, digests) but keeps
//! them out of [`super::Cell`]: only the stages that work with voltages (the
//! SPICE writer, level analysis) read them, through [`read_electrical`].

use serde::{Deserialize, Serialize};
use serde_json::Value;

/// A table file a cell was characterised from.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct TableRecord {
    /// Path relative to the library file's folder.
    pub file: String,
    /// SHA-256 of the file, 64 hex digits.
    pub sha256: String,
}

/// One transfer curve's thresholds: input `input` swept with the others at
/// the logic levels of `row`.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct CurveRecord {
    /// Swept input pin.
    pub input: String,
    /// Row of the other inputs (bit k is input k; the swept bit is 0).
    pub row: u32,
    /// VIL of this curve, volts.
    pub vil_v: f64,
    /// VIH of this curve, volts.
    pub vih_v: f64,
    /// Switching threshold of this curve, volts.
    pub vm_v: f64,
    /// Largest |dV/dVin| along the curve.
    pub max_gain: f64,
}

/// A cell's electrical block.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Electrical {
    /// Highest output on a 0 row, volts.
    pub vol_v: f64,
    /// Lowest output on a 1 row, volts.
    pub voh_v: f64,
    /// Input low threshold (|gain| = 1), volts; VM when not restoring.
    pub vil_v: f64,
    /// Input high threshold, volts; VM when not restoring.
    pub vih_v: f64,
    /// Mean switching threshold (output = Vdd/2), volts.
    pub vm_v: f64,
    /// Low noise margin VIL − VOL, volts.
    pub nml_v: f64,
    /// High noise margin VOH − VIH, volts.
    pub nmh_v: f64,
    /// Whether the gain reaches 1 on every transfer curve.
    pub restoring: bool,
    /// Pull-up on/off conductance ratio.
    pub pull_up_on_off: f64,
    /// Pull-down on/off conductance ratio.
    pub pull_down_on_off: f64,
    /// Output voltage per input row, volts.
    pub row_output_v: Vec<f64>,
    /// Static supply current per input row, nanoamperes.
    pub row_static_current_na: Vec<f64>,
    /// Capacitance of the output node itself, attofarads.
    pub output_capacitance_af: f64,
    /// Gate capacitance of each input, attofarads.
    pub gate_capacitance_af: f64,
    /// Transfer curves.
    pub curves: Vec<CurveRecord>,
    /// Pull-up table.
    pub pull_up: TableRecord,
    /// Pull-down table.
    pub pull_down: TableRecord,
}

/// Where a characterised library came from.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct DerivedFrom {
    /// The kit file, relative to the library file's folder.
    pub kit: String,
    /// SHA-256 of the kit file.
    pub kit_sha256: String,
    /// Program and version that derived the library.
    pub tool: String,
    /// Logic-low input voltage, volts.
    pub logic_low_v: f64,
    /// Logic-high input voltage, volts.
    pub logic_high_v: f64,
    /// Gate capacitance that is one unit of load, attofarads.
    pub unit_load_af: f64,
    /// The input edges the delay model was characterised with; absent in
    /// files whose delays are step-input figures (older files).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub delay_input: Option<DelayInput>,
}

/// How the delay of every arc was measured: its input driven by the
/// steady-state edge of a chain of `cell`, each driving `fanout` unit
/// loads (docs/device-data.md, "Delay").
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct DelayInput {
    /// The reference cell (the kit's inverter).
    pub cell: String,
    /// Its load in unit loads.
    pub fanout: f64,
    /// Delay of one reference stage in the settled chain (mean of rise and
    /// fall), in the library's delay unit.
    pub stage_delay: f64,
}

/// The electrical data of a library: its `derived_from` record and the
/// electrical block of each cell that has one, by cell name.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct ElectricalData {
    /// The library's `derived_from` record.
    pub derived_from: Option<DerivedFrom>,
    /// Cell name and its block, in file order.
    pub cells: Vec<(String, Electrical)>,
}

impl ElectricalData {
    /// The block of cell `name`.
    pub fn cell(&self, name: &str) -> Option<&Electrical> {
        self.cells.iter().find(|(n, _)| n == name).map(|(_, e)| e)
    }
}

/// Reads the electrical data of library text the loader has accepted
/// ([`super::Library::from_json_str`]); text it rejects gives empty data.
pub fn read_electrical(text: &str) -> ElectricalData {
    let Ok(root) = serde_json::from_str::<Value>(text) else {
        return ElectricalData::default();
    };
    let derived_from = root
        .get("derived_from")
        .and_then(|v| serde_json::from_value(v.clone()).ok());
    let cells = root
        .get("cells")
        .and_then(Value::as_array)
        .map(|list| {
            list.iter()
                .filter_map(|c| {
                    let name = c.get("name")?.as_str()?.to_string();
                    let e = serde_json::from_value(c.get("electrical")?.clone()).ok()?;
                    Some((name, e))
                })
                .collect()
        })
        .unwrap_or_default();
    ElectricalData {
        derived_from,
        cells,
    }
}

/// Problems with a cell's electrical block, given its input count and the
/// library's supply; empty when the block is sound.
pub fn check_electrical(e: &Electrical, inputs: &[String], supply_v: Option<f64>) -> Vec<String> {
    let mut problems = Vec::new();
    let rows = 1usize << inputs.len().min(16);
    let volts = [
        ("vol_v", e.vol_v),
        ("voh_v", e.voh_v),
        ("vil_v", e.vil_v),
        ("vih_v", e.vih_v),
        ("vm_v", e.vm_v),
    ];
    for (name, v) in volts {
        if !v.is_finite() || v < 0.0 || supply_v.is_some_and(|s| v > s * (1.0 + 1e-9)) {
            problems.push(format!("{name} {v} V lies outside 0 V to the supply"));
        }
    }
    if e.vol_v >= e.voh_v {
        problems.push(format!(
            "vol_v {} V is not below voh_v {} V",
            e.vol_v, e.voh_v
        ));
    }
    if e.vil_v > e.vih_v {
        problems.push(format!("vil_v {} V is above vih_v {} V", e.vil_v, e.vih_v));
    }
    if (e.nml_v - (e.vil_v - e.vol_v)).abs() > 1e-6 || (e.nmh_v - (e.voh_v - e.vih_v)).abs() > 1e-6
    {
        problems.push("nml_v and nmh_v must equal vil_v − vol_v and voh_v − vih_v".into());
    }
    for (name, ratio) in [
        ("pull_up_on_off", e.pull_up_on_off),
        ("pull_down_on_off", e.pull_down_on_off),
    ] {
        if !ratio.is_finite() || ratio <= 0.0 {
            problems.push(format!("{name} {ratio} must be a positive ratio"));
        }
    }
    for (name, list) in [
        ("row_output_v", &e.row_output_v),
        ("row_static_current_na", &e.row_static_current_na),
    ] {
        if list.len() != rows {
            problems.push(format!(
                "{name} has {} values: a cell of {} inputs has {rows} rows",
                list.len(),
                inputs.len()
            ));
        }
        if list.iter().any(|v| !v.is_finite() || *v < 0.0) {
            problems.push(format!("{name} holds a negative or non-finite value"));
        }
    }
    for (name, c) in [
        ("output_capacitance_af", e.output_capacitance_af),
        ("gate_capacitance_af", e.gate_capacitance_af),
    ] {
        if !c.is_finite() || c < 0.0 {
            problems.push(format!("{name} {c} must be zero or more"));
        }
    }
    for curve in &e.curves {
        if !inputs.contains(&curve.input) {
            problems.push(format!(
                "curve input '{}' is not a pin of the cell",
                curve.input
            ));
        }
        if curve.row as usize >= rows {
            problems.push(format!("curve row {} is not a row of the cell", curve.row));
        }
    }
    for (name, t) in [("pull_up", &e.pull_up), ("pull_down", &e.pull_down)] {
        if t.sha256.len() != 64 || !t.sha256.chars().all(|c| c.is_ascii_hexdigit()) {
            problems.push(format!("{name}.sha256 must be 64 hex digits"));
        }
        if t.file.is_empty() {
            problems.push(format!("{name}.file is empty"));
        }
    }
    problems
}
