//! Reading and validating `ribbonmap-library/1` files.
//!
//! The text is parsed with `serde_json` into a value tree, then each field is
//! read on its own (with serde, into its Rust type) so that every problem can
//! name its cell and field; [`Positions`] supplies the line and column that a
//! value tree forgets. All problems are collected before failing. The checks
//! follow docs/library-format.md: unknown fields, duplicate names, functions that ignore an
//! input, negative costs, missing delay models, more than six inputs, and a
//! cell set that is not functionally complete with free constants.

use super::completeness::{missing_basics, SmallFunction};
use super::electrical::{check_electrical, DerivedFrom, Electrical};
use super::error::{LibraryError, LibraryProblem};
use super::positions::Positions;
use super::{Cell, DelayModel, Leakage, Library, StorageCell, Units};
use crate::truth::table::{parse_truth_word, support_word};
use crate::truth::{parse_expression, TruthTable};
use serde::de::DeserializeOwned;
use serde_json::{Map, Value};
use std::collections::HashSet;
use std::path::Path;

/// The format tag every library file carries.
pub const FORMAT: &str = "ribbonmap-library/1";

/// Most inputs a cell may have (its truth table is one `u64`).
pub const MAX_CELL_INPUTS: usize = 6;

const LIBRARY_FIELDS: &[&str] = &[
    "format",
    "name",
    "description",
    "units",
    "supply_v",
    "primary_output_load",
    "cells",
    "storage",
    "derived_from",
];
const CELL_FIELDS: &[&str] = &[
    "name",
    "inputs",
    "output",
    "function",
    "truth",
    "area",
    "delay",
    "input_load",
    "switch_energy",
    "switch_energy_per_load",
    "leakage",
    "devices",
    "electrical",
];
const DELAY_FIELDS: &[&str] = &["intrinsic", "per_load"];
const UNITS_FIELDS: &[&str] = &["area", "delay", "energy", "power"];
const STORAGE_FIELDS: &[&str] = &["name", "d", "q", "clock", "area"];

impl Library {
    /// Parses and validates a library from JSON text; `file_name` is used in
    /// messages only. Returns every problem found when the library is wrong.
    pub fn from_json_str(text: &str, file_name: &str) -> Result<Library, LibraryError> {
        let mut reader = Reader {
            positions: Positions::default(),
            problems: Vec::new(),
            supply_v: None,
            limit_problem: None,
        };
        let root: Value = match serde_json::from_str(text) {
            Ok(v) => v,
            Err(e) => {
                let message = strip_position(&e.to_string());
                return Err(LibraryError {
                    file: file_name.to_string(),
                    unreadable: false,
                    problems: vec![LibraryProblem {
                        cell: None,
                        field: None,
                        line: (e.line() as u32).max(1),
                        column: (e.column() as u32).max(1),
                        message: format!("not valid JSON: {message}"),
                    }],
                });
            }
        };
        reader.positions = Positions::scan(text);
        let library = reader.library(&root);
        match library {
            Some(lib) if reader.problems.is_empty() => Ok(lib),
            _ => Err(LibraryError {
                file: file_name.to_string(),
                unreadable: reader.limit_problem.is_some(),
                problems: match reader.limit_problem {
                    Some(index) => vec![reader.problems.swap_remove(index)],
                    None => reader.problems,
                },
            }),
        }
    }

    /// Reads and validates the library file at `path`.
    ///
    /// A file that cannot be read, is not UTF-8 text or is empty is
    /// `unreadable` (bad input, like an unreadable netlist); the latter two
    /// name the line and column.
    pub fn load(path: &Path) -> Result<Library, LibraryError> {
        let file = path.display().to_string();
        let unreadable = |line: u32, column: u32, message: String| LibraryError {
            file: file.clone(),
            unreadable: true,
            problems: vec![LibraryProblem {
                cell: None,
                field: None,
                line,
                column,
                message,
            }],
        };
        let bytes = std::fs::read(path)
            .map_err(|e| unreadable(0, 0, format!("cannot read the library file: {e}")))?;
        let text = crate::diag::utf8_text(&file, bytes)
            .map_err(|e| unreadable(e.line, e.column, e.message))?;
        if text.trim().is_empty() {
            let (line, column) = crate::diag::line_column(text.as_bytes(), text.len());
            return Err(unreadable(
                line,
                column,
                "the library file is empty: expected a ribbonmap-library/1 JSON object".into(),
            ));
        }
        Library::from_json_str(&text, &file)
    }
}

/// `text` itself when it has at most `keep` characters, else its first
/// `keep` characters and an ellipsis (so a message stays one short line).
fn shortened(text: &str, keep: usize) -> String {
    match text.char_indices().nth(keep) {
        Some((cut, _)) => format!("{}…", &text[..cut]),
        None => text.to_string(),
    }
}

/// serde_json appends " at line L column C"; positions are reported separately.
fn strip_position(message: &str) -> String {
    match message.rfind(" at line ") {
        Some(i) => message[..i].to_string(),
        None => message.to_string(),
    }
}

fn is_identifier(name: &str) -> bool {
    let mut chars = name.chars();
    matches!(chars.next(), Some(c) if c.is_ascii_alphabetic() || c == '_')
        && chars.all(|c| c.is_ascii_alphanumeric() || c == '_')
}

struct Reader {
    positions: Positions,
    problems: Vec<LibraryProblem>,
    /// The library's supply (electrical blocks are checked against it).
    supply_v: Option<f64>,
    /// A value broke a reader limit (an expression nested too deep): the
    /// file is refused as unreadable input, not listed as a wrong library.
    limit_problem: Option<usize>,
}

/// Where a value sits: its path in the document, the cell it belongs to and
/// the field name to print.
#[derive(Clone)]
struct Site<'a> {
    path: String,
    cell: Option<&'a str>,
    field: String,
}

impl Reader {
    fn problem(&mut self, site: &Site, message: impl Into<String>) {
        let (line, column) = self.positions.key_or_value(&site.path).unwrap_or((0, 0));
        self.problems.push(LibraryProblem {
            cell: site.cell.map(str::to_string),
            field: if site.field.is_empty() {
                None
            } else {
                Some(site.field.clone())
            },
            line,
            column,
            message: message.into(),
        });
    }

    fn problem_at_value(&mut self, site: &Site, column_offset: usize, message: impl Into<String>) {
        let (line, column) = match self.positions.value(&site.path) {
            // +1 skips the opening quote of the string value.
            Some((l, c)) => (l, c + 1 + column_offset as u32),
            None => (0, 0),
        };
        self.problems.push(LibraryProblem {
            cell: site.cell.map(str::to_string),
            field: Some(site.field.clone()),
            line,
            column,
            message: message.into(),
        });
    }

    fn object<'v>(
        &mut self,
        value: &'v Value,
        site: &Site,
        known: &[&str],
    ) -> Option<&'v Map<String, Value>> {
        let Some(map) = value.as_object() else {
            self.problem(site, format!("expected an object, found {}", kind(value)));
            return None;
        };
        for key in map.keys() {
            if !known.contains(&key.as_str()) {
                let child = Site {
                    path: format!("{}/{key}", site.path),
                    cell: site.cell,
                    field: join_field(&site.field, key),
                };
                self.problem(
                    &child,
                    format!(
                        "unknown field '{key}': expected one of {}",
                        known.join(", ")
                    ),
                );
            }
        }
        Some(map)
    }

    /// Reads an optional field with serde; a wrong type is a problem.
    fn field<T: DeserializeOwned>(
        &mut self,
        map: &Map<String, Value>,
        parent: &Site,
        key: &str,
        expected: &str,
    ) -> Option<T> {
        let value = map.get(key)?;
        match serde_json::from_value::<T>(value.clone()) {
            Ok(v) => Some(v),
            Err(_) => {
                let site = child(parent, key);
                self.problem(&site, format!("expected {expected}, found {}", kind(value)));
                None
            }
        }
    }

    fn required<T: DeserializeOwned>(
        &mut self,
        map: &Map<String, Value>,
        parent: &Site,
        key: &str,
        expected: &str,
    ) -> Option<T> {
        if !map.contains_key(key) {
            let mut site = child(parent, key);
            site.path = parent.path.clone();
            self.problem(&site, format!("missing: expected {expected}"));
            return None;
        }
        self.field(map, parent, key, expected)
    }

    fn non_negative(&mut self, value: f64, site: &Site) -> bool {
        if !value.is_finite() || value < 0.0 {
            self.problem(
                site,
                format!("{value} is negative: costs must be zero or more"),
            );
            false
        } else {
            true
        }
    }

    fn library(&mut self, root: &Value) -> Option<Library> {
        let top = Site {
            path: String::new(),
            cell: None,
            field: String::new(),
        };
        let map = self.object(root, &top, LIBRARY_FIELDS)?;
        let format: Option<String> =
            self.required(map, &top, "format", "the string \"ribbonmap-library/1\"");
        if let Some(f) = &format {
            if f != FORMAT {
                self.problem(
                    &child(&top, "format"),
                    format!("unsupported format '{f}': expected \"{FORMAT}\""),
                );
            }
        }
        let name: Option<String> = self.required(map, &top, "name", "a string");
        if let Some(n) = &name {
            if n.trim().is_empty() {
                self.problem(&child(&top, "name"), "the library name is empty");
            }
        }
        let description: String = self
            .field(map, &top, "description", "a string")
            .unwrap_or_default();
        let units = self.units(map, &top);
        let supply_v: Option<f64> = self.field(map, &top, "supply_v", "a number");
        if let Some(v) = supply_v {
            if !(v.is_finite() && v > 0.0) {
                self.problem(
                    &child(&top, "supply_v"),
                    format!("{v}: the supply voltage must be positive"),
                );
            }
        }
        let primary_output_load: f64 =
            match self.field::<f64>(map, &top, "primary_output_load", "a number") {
                Some(v) => {
                    self.non_negative(v, &child(&top, "primary_output_load"));
                    v
                }
                None => 1.0,
            };

        if let Some(value) = map.get("derived_from") {
            if let Err(e) = serde_json::from_value::<DerivedFrom>(value.clone()) {
                self.problem(
                    &child(&top, "derived_from"),
                    format!("not a derived_from record (kit, kit_sha256, tool, logic_low_v, logic_high_v, unit_load_af, optional delay_input {{cell, fanout, stage_delay}}): {e}"),
                );
            }
        }
        self.supply_v = supply_v;

        let mut cells = Vec::new();
        let mut names: HashSet<String> = HashSet::new();
        match map.get("cells") {
            None => self.problem(
                &Site {
                    field: "cells".into(),
                    ..top.clone()
                },
                "missing: expected a list of cells",
            ),
            Some(Value::Array(list)) => {
                if list.is_empty() {
                    self.problem(&child(&top, "cells"), "the library has no cells");
                }
                for (i, value) in list.iter().enumerate() {
                    if let Some(cell) = self.cell(value, i) {
                        if !names.insert(cell.name.clone()) {
                            let site = Site {
                                path: format!("/cells/{i}/name"),
                                cell: Some(&cell.name),
                                field: "name".into(),
                            };
                            self.problem(&site, format!("duplicate cell name '{}'", cell.name));
                        }
                        cells.push(cell);
                    }
                }
            }
            Some(other) => self.problem(
                &child(&top, "cells"),
                format!("expected a list of cells, found {}", kind(other)),
            ),
        }

        let mut storage = Vec::new();
        match map.get("storage") {
            None => {}
            Some(Value::Array(list)) => {
                for (i, value) in list.iter().enumerate() {
                    if let Some(s) = self.storage_cell(value, i) {
                        if !names.insert(s.name.clone()) {
                            let site = Site {
                                path: format!("/storage/{i}/name"),
                                cell: Some(&s.name),
                                field: "name".into(),
                            };
                            self.problem(&site, format!("duplicate cell name '{}'", s.name));
                        }
                        storage.push(s);
                    }
                }
            }
            Some(other) => self.problem(
                &child(&top, "storage"),
                format!("expected a list of storage cells, found {}", kind(other)),
            ),
        }

        if self.problems.is_empty() && !cells.is_empty() {
            let functions: Vec<SmallFunction> = cells
                .iter()
                .map(|c| SmallFunction {
                    truth: c.truth,
                    inputs: c.inputs.len(),
                })
                .collect();
            for reason in missing_basics(&functions, true) {
                self.problem(
                    &Site {
                        path: "/cells".into(),
                        cell: None,
                        field: "cells".into(),
                    },
                    format!("the library is not functionally complete (constants free): {reason}"),
                );
            }
        }

        Some(Library {
            name: name?,
            description,
            units: units?,
            supply_v,
            primary_output_load,
            cells,
            storage,
        })
    }

    fn units(&mut self, map: &Map<String, Value>, top: &Site) -> Option<Units> {
        let Some(value) = map.get("units") else {
            self.problem(
                &Site {
                    field: "units".into(),
                    ..top.clone()
                },
                "missing: expected {\"area\", \"delay\", \"energy\", \"power\"} unit names",
            );
            return None;
        };
        let site = child(top, "units");
        let umap = self.object(value, &site, UNITS_FIELDS)?;
        let mut get =
            |key: &str| -> Option<String> { self.required(umap, &site, key, "a unit name string") };
        let area = get("area");
        let delay = get("delay");
        let energy = get("energy");
        let power = get("power");
        Some(Units {
            area: area?,
            delay: delay?,
            energy: energy?,
            power: power?,
        })
    }

    fn cell(&mut self, value: &Value, index: usize) -> Option<Cell> {
        let path = format!("/cells/{index}");
        let label = format!("#{}", index + 1);
        let name_owned = value
            .get("name")
            .and_then(Value::as_str)
            .map(str::to_string)
            .unwrap_or(label);
        let site = Site {
            path: path.clone(),
            cell: Some(&name_owned),
            field: String::new(),
        };
        let map = self.object(value, &site, CELL_FIELDS)?;
        let before = self.problems.len();

        let name: Option<String> = self.required(map, &site, "name", "a string");
        if let Some(n) = &name {
            if !is_identifier(n) {
                self.problem(&child(&site, "name"), format!("'{n}' is not a valid name: use letters, digits and '_', starting with a letter or '_'"));
            }
        }
        let inputs: Vec<String> = self
            .required(map, &site, "inputs", "a list of input pin names")
            .unwrap_or_default();
        let mut seen = HashSet::new();
        for (k, pin) in inputs.iter().enumerate() {
            let pin_site = Site {
                path: format!("{path}/inputs/{k}"),
                cell: Some(&name_owned),
                field: "inputs".into(),
            };
            if !is_identifier(pin) {
                self.problem(&pin_site, format!("'{pin}' is not a valid pin name"));
            } else if !seen.insert(pin.as_str()) {
                self.problem(&pin_site, format!("input '{pin}' is listed twice"));
            }
        }
        if map.contains_key("inputs") && inputs.is_empty() && self.problems.len() == before {
            self.problem(
                &child(&site, "inputs"),
                "a cell needs at least one input (constants are free)",
            );
        }
        if inputs.len() > MAX_CELL_INPUTS {
            self.problem(
                &child(&site, "inputs"),
                format!(
                    "{} inputs: a cell may have at most {MAX_CELL_INPUTS}",
                    inputs.len()
                ),
            );
        }
        let output: Option<String> = self.required(map, &site, "output", "the output pin name");
        if let Some(o) = &output {
            if !is_identifier(o) {
                self.problem(
                    &child(&site, "output"),
                    format!("'{o}' is not a valid pin name"),
                );
            } else if inputs.contains(o) {
                self.problem(
                    &child(&site, "output"),
                    format!("the output '{o}' has the name of an input"),
                );
            }
        }

        let truth = self.cell_function(map, &site, &inputs);

        let area: Option<f64> = self.required(map, &site, "area", "a number");
        if let Some(a) = area {
            self.non_negative(a, &child(&site, "area"));
        }
        let delay = self.delay(map, &site);
        let input_load: f64 = self
            .field(map, &site, "input_load", "a number")
            .unwrap_or(1.0);
        self.non_negative(input_load, &child(&site, "input_load"));
        let switch_energy: f64 = self
            .field(map, &site, "switch_energy", "a number")
            .unwrap_or(0.0);
        self.non_negative(switch_energy, &child(&site, "switch_energy"));
        let switch_energy_per_load: f64 = self
            .field(map, &site, "switch_energy_per_load", "a number")
            .unwrap_or(0.0);
        self.non_negative(
            switch_energy_per_load,
            &child(&site, "switch_energy_per_load"),
        );
        let leakage: Leakage = self
            .field(
                map,
                &site,
                "leakage",
                "a number or a list of numbers, one per input row",
            )
            .unwrap_or_default();
        match &leakage {
            Leakage::Constant(v) => {
                self.non_negative(*v, &child(&site, "leakage"));
            }
            Leakage::PerRow(rows) => {
                let expected = 1usize << inputs.len().min(MAX_CELL_INPUTS);
                if rows.len() != expected {
                    self.problem(
                        &child(&site, "leakage"),
                        format!(
                            "{} values: a cell of {} inputs has {expected} input rows",
                            rows.len(),
                            inputs.len()
                        ),
                    );
                }
                for (r, v) in rows.iter().enumerate() {
                    let row_site = Site {
                        path: format!("{path}/leakage/{r}"),
                        cell: Some(&name_owned),
                        field: "leakage".into(),
                    };
                    self.non_negative(*v, &row_site);
                }
            }
        }
        let devices: u32 = self
            .field(
                map,
                &site,
                "devices",
                "a whole number of devices, zero or more",
            )
            .unwrap_or(0);
        if let Some(value) = map.get("electrical") {
            let esite = child(&site, "electrical");
            match serde_json::from_value::<Electrical>(value.clone()) {
                Ok(e) => {
                    for p in check_electrical(&e, &inputs, self.supply_v) {
                        self.problem(&esite, p);
                    }
                }
                Err(e) => self.problem(&esite, format!("not an electrical block: {e}")),
            }
        }

        if self.problems.len() != before {
            return None;
        }
        Some(Cell {
            name: name?,
            inputs,
            output: output?,
            truth: truth?,
            area: area?,
            delay: delay?,
            input_load,
            switch_energy,
            switch_energy_per_load,
            leakage,
            devices,
        })
    }

    fn cell_function(
        &mut self,
        map: &Map<String, Value>,
        site: &Site,
        inputs: &[String],
    ) -> Option<u64> {
        if inputs.len() > MAX_CELL_INPUTS {
            return None;
        }
        let function: Option<String> = self.field(map, site, "function", "an expression string");
        let truth_text: Option<String> =
            self.field(map, site, "truth", "a truth table string such as \"0xE8\"");
        let truth = match (function, truth_text) {
            (Some(_), Some(_)) => {
                self.problem(
                    &child(site, "truth"),
                    "give either 'function' or 'truth', not both",
                );
                return None;
            }
            (None, None) => {
                if !map.contains_key("function") && !map.contains_key("truth") {
                    self.problem(
                        &Site {
                            field: "function".into(),
                            ..site.clone()
                        },
                        "missing: expected 'function' (an expression) or 'truth' (a table)",
                    );
                }
                return None;
            }
            (Some(text), None) => {
                let fsite = child(site, "function");
                match parse_expression(&text, inputs) {
                    Ok(expr) => expr.truth(inputs.len()),
                    Err(e) => {
                        self.problem_at_value(
                            &fsite,
                            e.column - 1,
                            format!(
                                "bad expression \"{}\" at column {}: {}",
                                shortened(&text, 60),
                                e.column,
                                e.message
                            ),
                        );
                        if e.limit_exceeded && self.limit_problem.is_none() {
                            self.limit_problem = Some(self.problems.len() - 1);
                        }
                        return None;
                    }
                }
            }
            (None, Some(text)) => match parse_truth_word(&text, inputs.len()) {
                Ok(t) => t,
                Err(e) => {
                    self.problem(&child(site, "truth"), e);
                    return None;
                }
            },
        };
        let support = support_word(truth, inputs.len());
        let field = if map.contains_key("function") {
            "function"
        } else {
            "truth"
        };
        for (k, pin) in inputs.iter().enumerate() {
            if support & (1 << k) == 0 {
                self.problem(
                    &child(site, field),
                    format!(
                    "input '{pin}' is not used by the function {} (every listed input must matter)",
                    TruthTable::from_u64(truth, inputs.len())
                ),
                );
            }
        }
        Some(truth)
    }

    fn delay(&mut self, map: &Map<String, Value>, site: &Site) -> Option<DelayModel> {
        let Some(value) = map.get("delay") else {
            self.problem(
                &Site {
                    field: "delay".into(),
                    ..site.clone()
                },
                "missing delay model: expected {\"intrinsic\": number, \"per_load\": number}",
            );
            return None;
        };
        let dsite = child(site, "delay");
        let dmap = self.object(value, &dsite, DELAY_FIELDS)?;
        let intrinsic: Option<f64> = self.required(dmap, &dsite, "intrinsic", "a number");
        let per_load: Option<f64> = self.required(dmap, &dsite, "per_load", "a number");
        if let Some(v) = intrinsic {
            self.non_negative(v, &child(&dsite, "intrinsic"));
        }
        if let Some(v) = per_load {
            self.non_negative(v, &child(&dsite, "per_load"));
        }
        Some(DelayModel {
            intrinsic: intrinsic?,
            per_load: per_load?,
        })
    }

    fn storage_cell(&mut self, value: &Value, index: usize) -> Option<StorageCell> {
        let name_owned = value
            .get("name")
            .and_then(Value::as_str)
            .map(str::to_string)
            .unwrap_or(format!("storage #{}", index + 1));
        let site = Site {
            path: format!("/storage/{index}"),
            cell: Some(&name_owned),
            field: String::new(),
        };
        let map = self.object(value, &site, STORAGE_FIELDS)?;
        let before = self.problems.len();
        let name: Option<String> = self.required(map, &site, "name", "a string");
        let d: Option<String> = self.required(map, &site, "d", "the data pin name");
        let q: Option<String> = self.required(map, &site, "q", "the output pin name");
        let clock: Option<String> = self.required(map, &site, "clock", "the clock pin name");
        for (key, pin) in [("name", &name), ("d", &d), ("q", &q), ("clock", &clock)] {
            if let Some(p) = pin {
                if !is_identifier(p) {
                    self.problem(&child(&site, key), format!("'{p}' is not a valid name"));
                }
            }
        }
        let area: f64 = self.field(map, &site, "area", "a number").unwrap_or(0.0);
        self.non_negative(area, &child(&site, "area"));
        if self.problems.len() != before {
            return None;
        }
        Some(StorageCell {
            name: name?,
            d: d?,
            q: q?,
            clock: clock?,
            area,
        })
    }
}

fn child<'a>(parent: &Site<'a>, key: &str) -> Site<'a> {
    Site {
        path: format!("{}/{key}", parent.path),
        cell: parent.cell,
        field: join_field(&parent.field, key),
    }
}

fn join_field(parent: &str, key: &str) -> String {
    if parent.is_empty() {
        key.to_string()
    } else {
        format!("{parent}.{key}")
    }
}

fn kind(value: &Value) -> &'static str {
    match value {
        Value::Null => "null",
        Value::Bool(_) => "a boolean",
        Value::Number(_) => "a number",
        Value::String(_) => "a string",
        Value::Array(_) => "a list",
        Value::Object(_) => "an object",
    }
}

/// The function of each cell as the file writes it (`function` text, or
/// `truth` text), by cell name, in file order; cells without either are
/// left out. For display (`ribbonmap library show`); the text should be a
/// library that [`Library::from_json_str`] accepted.
pub fn function_texts(text: &str) -> Vec<(String, String)> {
    let Ok(root) = serde_json::from_str::<Value>(text) else {
        return Vec::new();
    };
    let Some(cells) = root.get("cells").and_then(Value::as_array) else {
        return Vec::new();
    };
    cells
        .iter()
        .filter_map(|c| {
            let name = c.get("name")?.as_str()?.to_string();
            let function = c
                .get("function")
                .and_then(Value::as_str)
                .map(str::to_string)
                .or_else(|| {
                    c.get("truth")
                        .and_then(Value::as_str)
                        .map(|t| format!("truth {t}"))
                })?;
            Some((name, function))
        })
        .collect()
}
