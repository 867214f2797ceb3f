//! Writing a characterised kit as a `ribbonmap-library/1` file.
//!
//! Each cell gets the usual fields, derived rather than typed in: function
//! (as a truth table), area and devices from the kit, the delay model
//! `intrinsic + per_load · load` fitted to the slowest arc driven by the
//! reference edges (see [`super::characterize`]),
//! input load in units of the kit's gate capacitance, switching energy
//! `½·C_own·Vdd²` and per unit load `½·C_gate·Vdd²`, and per-row leakage
//! `Vdd · I` — plus the `electrical`
//! block and a library-level `derived_from` record. Numbers are rounded to
//! six significant digits so the file reads well and is stable.

use super::characterize::{CellCharacter, Characterization};
use crate::library::electrical::{CurveRecord, DelayInput, DerivedFrom, Electrical, TableRecord};
use serde_json::{json, Value};
use std::path::{Component, Path, PathBuf};

/// Units of a characterised library (fixed by the characterisation).
pub const DELAY_UNIT: &str = "ps";
/// Energy unit of a characterised library.
pub const ENERGY_UNIT: &str = "aJ";
/// Power unit of a characterised library.
pub const POWER_UNIT: &str = "nW";

/// Rounds to six significant digits.
pub fn round6(x: f64) -> f64 {
    if x == 0.0 || !x.is_finite() {
        return x;
    }
    format!("{x:.5e}").parse().unwrap_or(x)
}

/// `target` relative to folder `base`, when both resolve; else `target` as
/// an absolute path (or as given).
pub fn relative_path(target: &Path, base: &Path) -> String {
    let resolve = |p: &Path| std::fs::canonicalize(p).ok();
    let base = if base.as_os_str().is_empty() {
        Path::new(".")
    } else {
        base
    };
    let (Some(t), Some(b)) = (resolve(target), resolve(base)) else {
        return target.display().to_string();
    };
    let tc: Vec<Component> = t.components().collect();
    let bc: Vec<Component> = b.components().collect();
    let common = tc.iter().zip(&bc).take_while(|(x, y)| x == y).count();
    let mut out = PathBuf::new();
    for _ in common..bc.len() {
        out.push("..");
    }
    for c in &tc[common..] {
        out.push(c.as_os_str());
    }
    out.to_string_lossy().replace('\\', "/")
}

/// The electrical block of a characterised cell; table paths relative to
/// `library_dir`.
pub fn electrical_block(c: &CellCharacter, library_dir: &Path) -> Electrical {
    Electrical {
        vol_v: round6(c.vol),
        voh_v: round6(c.voh),
        vil_v: round6(c.vil),
        vih_v: round6(c.vih),
        vm_v: round6(c.vm),
        nml_v: round6(round6(c.vil) - round6(c.vol)),
        nmh_v: round6(round6(c.voh) - round6(c.vih)),
        restoring: c.restoring,
        pull_up_on_off: round6(c.pull_up_on_off),
        pull_down_on_off: round6(c.pull_down_on_off),
        row_output_v: c.rows.iter().map(|r| round6(r.output_v)).collect(),
        row_static_current_na: c.rows.iter().map(|r| round6(r.current_a * 1e9)).collect(),
        output_capacitance_af: c.kit_cell.output_capacitance_af,
        gate_capacitance_af: c.kit_cell.gate_capacitance_af,
        curves: c
            .curves
            .iter()
            .map(|k| CurveRecord {
                input: c.kit_cell.inputs[k.input].clone(),
                row: k.row as u32,
                vil_v: round6(k.vil),
                vih_v: round6(k.vih),
                vm_v: round6(k.vm),
                max_gain: round6(k.max_gain),
            })
            .collect(),
        pull_up: TableRecord {
            file: relative_path(&c.kit_cell.pull_up.path, library_dir),
            sha256: c.pull_up_sha256.clone(),
        },
        pull_down: TableRecord {
            file: relative_path(&c.kit_cell.pull_down.path, library_dir),
            sha256: c.pull_down_sha256.clone(),
        },
    }
}

/// The library as a JSON value; `library_dir` is the folder the library file
/// will be written to (table and kit paths are made relative to it).
pub fn library_json(ch: &Characterization, library_dir: &Path) -> Value {
    let whole = LibraryChoice {
        name: &ch.kit.name,
        description: &ch.kit.description,
        keep: &|_| true,
    };
    library_json_of(ch, library_dir, &whole)
}

/// Which cells of a characterised kit make a library, and what it is called.
pub struct LibraryChoice<'a> {
    /// The library's name.
    pub name: &'a str,
    /// The library's description.
    pub description: &'a str,
    /// Keeps a cell (by its characterisation) in the library.
    pub keep: &'a dyn Fn(&CellCharacter) -> bool,
}

/// The library made of the cells `choice` keeps, in kit order, as a JSON
/// value; `library_dir` as in [`library_json`].
pub fn library_json_of(ch: &Characterization, library_dir: &Path, choice: &LibraryChoice) -> Value {
    let kit = &ch.kit;
    let vdd = kit.supply_v;
    let cells: Vec<Value> = ch
        .cells
        .iter()
        .filter(|c| (choice.keep)(c))
        .map(|c| {
            let n = c.kit_cell.inputs.len();
            let digits = (1usize << n).div_ceil(4);
            let leakage: Vec<f64> = c
                .rows
                .iter()
                .map(|r| round6(r.power_w(vdd) * 1e9))
                .collect();
            // The kit's declared function when it has one (characterisation
            // checked that the tables compute it), else the derived table.
            let (key, function) = match &c.kit_cell.declared {
                Some((text, _)) => ("function", text.clone()),
                None => ("truth", format!("0x{:0digits$X}", c.truth)),
            };
            let mut cell = json!({
                "name": c.kit_cell.name,
                "inputs": c.kit_cell.inputs,
                "output": c.kit_cell.output,
                "area": c.kit_cell.area,
                "delay": {"intrinsic": round6(c.intrinsic_ps), "per_load": round6(c.per_load_ps)},
                "input_load": round6(c.input_load),
                "switch_energy": round6(c.switch_energy_aj),
                "switch_energy_per_load": round6(c.switch_energy_per_load_aj),
                "leakage": leakage,
                "devices": c.kit_cell.devices,
            });
            if let Value::Object(map) = &mut cell {
                // Keep the usual field order: the function right after the pins.
                let mut ordered = serde_json::Map::new();
                for (k, v) in std::mem::take(map) {
                    let after_output = k == "output";
                    ordered.insert(k, v);
                    if after_output {
                        ordered.insert(key.into(), Value::from(function.clone()));
                    }
                }
                *map = ordered;
                map.insert(
                    "electrical".into(),
                    serde_json::to_value(electrical_block(c, library_dir)).unwrap_or(Value::Null),
                );
            }
            cell
        })
        .collect();
    let derived_from = DerivedFrom {
        kit: relative_path(Path::new(&kit.file), library_dir),
        kit_sha256: ch.kit_sha256.clone(),
        tool: format!("ribbonmap {} characterize", env!("CARGO_PKG_VERSION")),
        logic_low_v: kit.logic_low_v,
        logic_high_v: kit.logic_high_v,
        unit_load_af: kit.gate_capacitance_af,
        delay_input: ch.reference.as_ref().map(|r| DelayInput {
            cell: r.cell.clone(),
            fanout: r.fanout,
            stage_delay: round6(r.stage_delay_ps),
        }),
    };
    let mut root = json!({
        "format": crate::library::FORMAT,
        "name": choice.name,
        "description": choice.description,
        "units": {"area": kit.area_unit, "delay": DELAY_UNIT, "energy": ENERGY_UNIT, "power": POWER_UNIT},
        "supply_v": vdd,
        "primary_output_load": kit.primary_output_load,
        "cells": cells,
    });
    if let Value::Object(map) = &mut root {
        if !kit.storage.is_empty() {
            map.insert(
                "storage".into(),
                serde_json::to_value(&kit.storage).unwrap_or(Value::Null),
            );
        }
        map.insert(
            "derived_from".into(),
            serde_json::to_value(derived_from).unwrap_or(Value::Null),
        );
    }
    root
}

/// The library file's text (pretty JSON with a final newline).
pub fn library_text(ch: &Characterization, library_dir: &Path) -> String {
    json_text(&library_json(ch, library_dir))
}

/// A library value as file text (pretty JSON with a final newline).
pub fn json_text(value: &Value) -> String {
    let mut text = serde_json::to_string_pretty(value).unwrap_or_else(|_| "{}".into());
    text.push('\n');
    text
}
