//! Reading a device kit (`ribbonmap-devices/1`): what a device group hands
//! over — supply and logic voltages, capacitances, and per cell its inputs,
//! its pull-up and pull-down conductance tables, area and device count.
//!
//! Table paths are relative to the kit file. Every problem is a
//! [`SourceError`] naming the kit's line and column (found with the library
//! module's JSON position scanner).

use crate::diag::SourceError;
use crate::library::positions::Positions;
use crate::library::StorageCell;
use crate::truth::parse_expression;
use serde_json::{Map, Value};
use std::path::{Path, PathBuf};

/// The format tag of a device kit.
pub const KIT_FORMAT: &str = "ribbonmap-devices/1";

/// Most cells a kit may list.
pub const MAX_KIT_CELLS: usize = 1000;

/// Most inputs a kit cell may have.
pub const MAX_KIT_CELL_INPUTS: usize = 4;

const KIT_FIELDS: &[&str] = &[
    "format",
    "name",
    "description",
    "supply_v",
    "logic_low_v",
    "logic_high_v",
    "gate_capacitance_af",
    "output_capacitance_af",
    "area_unit",
    "primary_output_load",
    "cells",
    "storage",
];
const CELL_FIELDS: &[&str] = &[
    "name",
    "inputs",
    "output",
    "function",
    "pull_up",
    "pull_down",
    "area",
    "devices",
    "gate_capacitance_af",
    "output_capacitance_af",
];

/// A device kit as read.
#[derive(Clone, Debug, PartialEq)]
pub struct DeviceKit {
    /// The kit file as given (for messages and the `derived_from` record).
    pub file: String,
    /// Folder the table paths are relative to.
    pub dir: PathBuf,
    /// Name of the library the kit characterises into.
    pub name: String,
    /// Description (carried into the library).
    pub description: String,
    /// Supply voltage in volts.
    pub supply_v: f64,
    /// Input voltage of logic 0, in volts.
    pub logic_low_v: f64,
    /// Input voltage of logic 1, in volts.
    pub logic_high_v: f64,
    /// Gate capacitance of one input in attofarads: the unit of load.
    pub gate_capacitance_af: f64,
    /// Area unit of the cells' areas.
    pub area_unit: String,
    /// Load of each primary output in gate capacitances.
    pub primary_output_load: f64,
    /// The cells.
    pub cells: Vec<KitCell>,
    /// Storage cells, passed to the library unchanged.
    pub storage: Vec<StorageCell>,
}

/// One cell of a kit.
#[derive(Clone, Debug, PartialEq)]
pub struct KitCell {
    /// Cell name.
    pub name: String,
    /// Line of the cell's entry in the kit.
    pub line: u32,
    /// Input pin names.
    pub inputs: Vec<String>,
    /// Output pin name (default `y`).
    pub output: String,
    /// The function the kit declares, if it does: text and truth table.
    pub declared: Option<(String, u64)>,
    /// Pull-up table path as written in the kit, and its line.
    pub pull_up: TableRef,
    /// Pull-down table path as written in the kit, and its line.
    pub pull_down: TableRef,
    /// Area in the kit's area unit.
    pub area: f64,
    /// Device count.
    pub devices: u32,
    /// Gate capacitance of each input in attofarads.
    pub gate_capacitance_af: f64,
    /// Capacitance of the output node itself in attofarads.
    pub output_capacitance_af: f64,
}

/// A table file named by a kit.
#[derive(Clone, Debug, PartialEq)]
pub struct TableRef {
    /// The path as written in the kit (relative to the kit's folder).
    pub written: String,
    /// The path to open.
    pub path: PathBuf,
    /// Kit line and column where the path is written.
    pub line: u32,
    /// Column.
    pub column: u32,
}

/// Reads the kit at `path`.
pub fn read_kit(path: &Path) -> Result<DeviceKit, SourceError> {
    let shown = path.display().to_string();
    let bytes = std::fs::read(path)
        .map_err(|e| SourceError::new(&shown, 0, 0, format!("cannot read the device kit: {e}")))?;
    let text = crate::diag::utf8_text(&shown, bytes)?;
    let dir = path.parent().map(Path::to_path_buf).unwrap_or_default();
    parse_kit(&text, &shown, &dir)
}

/// Parses kit text; `file` names it in messages, `dir` is the folder table
/// paths are relative to.
pub fn parse_kit(text: &str, file: &str, dir: &Path) -> Result<DeviceKit, SourceError> {
    let root: Value = serde_json::from_str(text).map_err(|e| {
        let message = e.to_string();
        let message = message
            .rfind(" at line ")
            .map_or(message.as_str(), |i| &message[..i]);
        SourceError::new(
            file,
            e.line() as u32,
            e.column() as u32,
            format!("not valid JSON: {message}"),
        )
    })?;
    let reader = KitReader {
        file,
        positions: Positions::scan(text),
    };
    reader.kit(&root, dir)
}

struct KitReader<'a> {
    file: &'a str,
    positions: Positions,
}

impl KitReader<'_> {
    fn error(&self, path: &str, message: impl Into<String>) -> SourceError {
        let (line, column) = self.positions.key_or_value(path).unwrap_or((1, 1));
        SourceError::new(self.file, line, column, message)
    }

    fn object<'v>(
        &self,
        value: &'v Value,
        path: &str,
        known: &[&str],
    ) -> Result<&'v Map<String, Value>, SourceError> {
        let map = value
            .as_object()
            .ok_or_else(|| self.error(path, "expected an object"))?;
        for key in map.keys() {
            if !known.contains(&key.as_str()) {
                return Err(self.error(
                    &format!("{path}/{key}"),
                    format!(
                        "unknown field '{key}': expected one of {}",
                        known.join(", ")
                    ),
                ));
            }
        }
        Ok(map)
    }

    fn number(
        &self,
        map: &Map<String, Value>,
        path: &str,
        key: &str,
        default: Option<f64>,
    ) -> Result<f64, SourceError> {
        match map.get(key) {
            None => default.ok_or_else(|| {
                self.error(path, format!("missing field '{key}': expected a number"))
            }),
            Some(v) => match v.as_f64() {
                Some(x) if x.is_finite() && x >= 0.0 => Ok(x),
                Some(x) => Err(self.error(
                    &format!("{path}/{key}"),
                    format!("'{key}' is {x}: expected zero or more"),
                )),
                None => Err(self.error(
                    &format!("{path}/{key}"),
                    format!("'{key}': expected a number"),
                )),
            },
        }
    }

    fn string(
        &self,
        map: &Map<String, Value>,
        path: &str,
        key: &str,
        default: Option<&str>,
    ) -> Result<String, SourceError> {
        match map.get(key) {
            None => default.map(str::to_string).ok_or_else(|| {
                self.error(path, format!("missing field '{key}': expected a string"))
            }),
            Some(Value::String(s)) => Ok(s.clone()),
            Some(_) => Err(self.error(
                &format!("{path}/{key}"),
                format!("'{key}': expected a string"),
            )),
        }
    }

    fn kit(&self, root: &Value, dir: &Path) -> Result<DeviceKit, SourceError> {
        let map = self.object(root, "", KIT_FIELDS)?;
        let format = self.string(map, "", "format", None)?;
        if format != KIT_FORMAT {
            return Err(self.error(
                "/format",
                format!("unsupported format '{format}': expected \"{KIT_FORMAT}\""),
            ));
        }
        let name = self.string(map, "", "name", None)?;
        let description = self.string(map, "", "description", Some(""))?;
        let supply_v = self.number(map, "", "supply_v", None)?;
        if supply_v <= 0.0 {
            return Err(self.error("/supply_v", "the supply voltage must be positive"));
        }
        let logic_low_v = self.number(map, "", "logic_low_v", Some(0.0))?;
        let logic_high_v = self.number(map, "", "logic_high_v", Some(supply_v))?;
        if logic_low_v >= logic_high_v {
            return Err(self.error(
                "/logic_high_v",
                format!("logic-high input {logic_high_v} V is not above logic-low {logic_low_v} V"),
            ));
        }
        let gate_capacitance_af = self.number(map, "", "gate_capacitance_af", None)?;
        if gate_capacitance_af <= 0.0 {
            return Err(self.error(
                "/gate_capacitance_af",
                "the gate capacitance is the unit of load and must be positive",
            ));
        }
        let output_capacitance_af = self.number(map, "", "output_capacitance_af", Some(0.0))?;
        let area_unit = self.string(map, "", "area_unit", Some("nm2"))?;
        let primary_output_load = self.number(map, "", "primary_output_load", Some(1.0))?;
        let Some(Value::Array(list)) = map.get("cells") else {
            return Err(self.error("/cells", "expected a list of cells"));
        };
        if list.is_empty() || list.len() > MAX_KIT_CELLS {
            return Err(self.error(
                "/cells",
                format!(
                    "a kit lists 1 to {MAX_KIT_CELLS} cells, found {}",
                    list.len()
                ),
            ));
        }
        let mut cells: Vec<KitCell> = Vec::new();
        for (i, value) in list.iter().enumerate() {
            let cell = self.cell(value, i, dir, gate_capacitance_af, output_capacitance_af)?;
            if cells.iter().any(|c| c.name == cell.name) {
                return Err(self.error(
                    &format!("/cells/{i}/name"),
                    format!("duplicate cell name '{}'", cell.name),
                ));
            }
            cells.push(cell);
        }
        let storage = match map.get("storage") {
            None => Vec::new(),
            Some(v) => serde_json::from_value::<Vec<StorageCell>>(v.clone()).map_err(|e| {
                self.error(
                    "/storage",
                    format!("expected a list of storage cells (name, d, q, clock, area): {e}"),
                )
            })?,
        };
        Ok(DeviceKit {
            file: self.file.to_string(),
            dir: dir.to_path_buf(),
            name,
            description,
            supply_v,
            logic_low_v,
            logic_high_v,
            gate_capacitance_af,
            area_unit,
            primary_output_load,
            cells,
            storage,
        })
    }

    fn cell(
        &self,
        value: &Value,
        index: usize,
        dir: &Path,
        gate_default: f64,
        output_default: f64,
    ) -> Result<KitCell, SourceError> {
        let path = format!("/cells/{index}");
        let map = self.object(value, &path, CELL_FIELDS)?;
        let name = self.string(map, &path, "name", None)?;
        let inputs: Vec<String> = match map.get("inputs") {
            Some(Value::Array(list)) if !list.is_empty() && list.len() <= MAX_KIT_CELL_INPUTS => {
                let mut names: Vec<String> = Vec::new();
                for (k, v) in list.iter().enumerate() {
                    match v.as_str() {
                        Some(s) if !s.is_empty() && !names.iter().any(|n| n == s) => {
                            names.push(s.to_string())
                        }
                        _ => {
                            return Err(self.error(
                                &format!("{path}/inputs/{k}"),
                                "expected a distinct input name",
                            ))
                        }
                    }
                }
                names
            }
            _ => {
                return Err(self.error(
                    &format!("{path}/inputs"),
                    format!(
                        "cell '{name}': expected a list of 1 to {MAX_KIT_CELL_INPUTS} input names"
                    ),
                ))
            }
        };
        let output = self.string(map, &path, "output", Some("y"))?;
        let declared = match map.get("function") {
            None => None,
            Some(Value::String(text)) => match parse_expression(text, &inputs) {
                Ok(expr) => Some((text.clone(), expr.truth(inputs.len()))),
                Err(e) => {
                    return Err(self.error(
                        &format!("{path}/function"),
                        format!(
                            "cell '{name}': bad function \"{text}\" at column {}: {}",
                            e.column, e.message
                        ),
                    ))
                }
            },
            Some(_) => {
                return Err(self.error(
                    &format!("{path}/function"),
                    "expected a function expression string",
                ))
            }
        };
        let table = |key: &str| -> Result<TableRef, SourceError> {
            let written = self.string(map, &path, key, None)?;
            let (line, column) = self
                .positions
                .value(&format!("{path}/{key}"))
                .unwrap_or((1, 1));
            Ok(TableRef {
                path: dir.join(&written),
                written,
                line,
                column,
            })
        };
        let pull_up = table("pull_up")?;
        let pull_down = table("pull_down")?;
        let area = self.number(map, &path, "area", None)?;
        let devices = self.number(map, &path, "devices", Some(2.0))?;
        if devices.fract() != 0.0 || devices > u32::MAX as f64 {
            return Err(self.error(
                &format!("{path}/devices"),
                "expected a whole number of devices",
            ));
        }
        let gate_capacitance_af =
            self.number(map, &path, "gate_capacitance_af", Some(gate_default))?;
        let output_capacitance_af =
            self.number(map, &path, "output_capacitance_af", Some(output_default))?;
        let line = self.positions.value(&path).map_or(1, |p| p.0);
        Ok(KitCell {
            name,
            line,
            inputs,
            output,
            declared,
            pull_up,
            pull_down,
            area,
            devices: devices as u32,
            gate_capacitance_af,
            output_capacitance_af,
        })
    }
}
