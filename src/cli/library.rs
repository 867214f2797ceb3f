//! `ribbonmap library list | show NAME|FILE | check FILE`.
//!
//! `list` names the built-in libraries; `show` prints every cell with its
//! function, truth table, NPN class and costs; `check` validates a file and
//! lists every problem (exit 1 when there are any, 2 when the file cannot be
//! read at all).

use super::{CliError, CmdResult, EXIT_NEGATIVE, EXIT_OK};
use crate::library::{builtin_text, function_texts, Leakage, Library};
use crate::truth::TruthTable;
use serde_json::json;
use std::fmt::Write as _;
use std::io::Write as _;

/// Writes a command's output to standard output; a closed pipe (`| head`)
/// is not an error worth a panic, so write failures are ignored.
fn emit(text: &str) {
    let mut stdout = std::io::stdout().lock();
    let _ = stdout.write_all(text.as_bytes());
    let _ = stdout.flush();
}

/// Output format of the `library` subcommands.
#[derive(clap::ValueEnum, Clone, Copy, Debug, PartialEq, Eq, Default)]
pub enum LibraryFormat {
    /// Aligned text.
    #[default]
    Text,
    /// JSON.
    Json,
}

/// Arguments of `ribbonmap library`.
#[derive(clap::Args, Debug)]
pub struct Args {
    #[command(subcommand)]
    action: Action,
}

#[derive(clap::Subcommand, Debug)]
enum Action {
    /// List the built-in libraries.
    List {
        /// Output format.
        #[arg(long, value_enum, default_value_t = LibraryFormat::Text)]
        format: LibraryFormat,
    },
    /// Print every cell of a library with its function, truth table, NPN class and costs.
    Show {
        /// A built-in library name or a library file.
        #[arg(value_name = "LIB")]
        library: String,
        /// Output format.
        #[arg(long, value_enum, default_value_t = LibraryFormat::Text)]
        format: LibraryFormat,
    },
    /// Check a library file and list every problem (exit 1 if there are any).
    Check {
        /// The library file.
        #[arg(value_name = "LIB")]
        file: String,
        /// Output format.
        #[arg(long, value_enum, default_value_t = LibraryFormat::Text)]
        format: LibraryFormat,
    },
}

/// Runs the command.
pub fn run(args: Args) -> CmdResult {
    match args.action {
        Action::List { format } => list(format),
        Action::Show { library, format } => show(&library, format),
        Action::Check { file, format } => check(&file, format),
    }
}

fn first_sentence(text: &str) -> &str {
    match text.find(". ") {
        Some(i) => &text[..=i],
        None => text,
    }
}

fn list(format: LibraryFormat) -> CmdResult {
    let mut out = String::new();
    let libs: Vec<Library> = Library::builtin_names()
        .iter()
        .filter_map(|n| Library::builtin(n))
        .collect();
    match format {
        LibraryFormat::Json => {
            let items: Vec<_> = libs
                .iter()
                .map(|l| {
                    json!({
                        "name": l.name,
                        "default": l.name == Library::DEFAULT_BUILTIN,
                        "cells": l.cells.len(),
                        "storage": l.storage.len(),
                        "description": l.description,
                    })
                })
                .collect();
            let _ = writeln!(
                out,
                "{}",
                serde_json::to_string_pretty(&json!({ "libraries": items })).unwrap_or_default()
            );
        }
        LibraryFormat::Text => {
            let width = libs.iter().map(|l| l.name.len()).max().unwrap_or(0) + 2;
            for l in &libs {
                let mark = if l.name == Library::DEFAULT_BUILTIN {
                    " (default)"
                } else {
                    ""
                };
                let _ = writeln!(
                    out,
                    "{:<width$}{:>3} cells  {}{}",
                    l.name,
                    l.cells.len(),
                    first_sentence(&l.description),
                    mark
                );
            }
        }
    }
    emit(&out);
    Ok(EXIT_OK)
}

/// The library and its source text (for the function expressions as written).
fn read_library(spec: &str) -> Result<(Library, String), CliError> {
    if let Some(text) = builtin_text(spec) {
        let lib = Library::from_json_str(text, &format!("<builtin:{spec}>"))
            .map_err(|e| CliError::Internal(format!("built-in library is broken: {e}")))?;
        return Ok((lib, text.to_string()));
    }
    let bytes = std::fs::read(spec).map_err(|e| {
        CliError::Input(format!(
            "{spec}: cannot read the library ({e}); built-in libraries are {}",
            Library::builtin_names().join(", ")
        ))
    })?;
    let text = crate::diag::utf8_text(spec, bytes)?;
    let lib = Library::from_json_str(&text, spec).map_err(|e| CliError::Input(e.to_string()))?;
    Ok((lib, text))
}

/// A number for a table: whole numbers as such, others to four decimals.
fn num(v: f64) -> String {
    if v.fract() == 0.0 && v.abs() < 1e15 {
        format!("{v:.0}")
    } else {
        let s = format!("{v:.4}");
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    }
}

fn leakage_text(l: &Leakage) -> String {
    match l {
        Leakage::Constant(v) => num(*v),
        Leakage::PerRow(rows) => {
            let mean = rows.iter().sum::<f64>() / rows.len().max(1) as f64;
            format!("{} (mean of {} rows)", num(mean), rows.len())
        }
    }
}

fn show(spec: &str, format: LibraryFormat) -> CmdResult {
    let mut out = String::new();
    let (lib, text) = read_library(spec)?;
    let functions = function_texts(&text);
    let function_of = |name: &str| -> String {
        functions
            .iter()
            .find(|(n, _)| n == name)
            .map(|(_, f)| f.clone())
            .unwrap_or_default()
    };
    match format {
        LibraryFormat::Json => {
            let cells: Vec<_> = lib
                .cells
                .iter()
                .map(|c| {
                    let (canon, _) = c.npn();
                    json!({
                        "name": c.name,
                        "inputs": c.inputs,
                        "output": c.output,
                        "function": function_of(&c.name),
                        "truth": TruthTable::from_u64(c.truth, c.arity()).to_hex(),
                        "npn_class": TruthTable::from_u64(canon, c.arity()).to_hex(),
                        "area": c.area,
                        "delay": { "intrinsic": c.delay.intrinsic, "per_load": c.delay.per_load },
                        "input_load": c.input_load,
                        "switch_energy": c.switch_energy,
                        "switch_energy_per_load": c.switch_energy_per_load,
                        "leakage": c.leakage,
                        "devices": c.devices,
                    })
                })
                .collect();
            let report = json!({
                "name": lib.name,
                "description": lib.description,
                "units": lib.units,
                "supply_v": lib.supply_v,
                "primary_output_load": lib.primary_output_load,
                "content_hash": format!("{:016x}", lib.content_hash()),
                "cells": cells,
                "storage": lib.storage,
            });
            let _ = writeln!(
                out,
                "{}",
                serde_json::to_string_pretty(&report).unwrap_or_default()
            );
        }
        LibraryFormat::Text => {
            let _ = writeln!(out, "library {}", lib.name);
            if !lib.description.is_empty() {
                let _ = writeln!(out, "  {}", lib.description);
            }
            let u = &lib.units;
            let _ = writeln!(
                out,
                "  units: area {}, delay {}, energy {}, power {}; primary output load {}{}",
                u.area,
                u.delay,
                u.energy,
                u.power,
                lib.primary_output_load,
                lib.supply_v
                    .map(|v| format!("; supply {v} V"))
                    .unwrap_or_default()
            );
            let _ = writeln!(out, "  content hash {:016x}", lib.content_hash());
            let _ = writeln!(out);
            let rows: Vec<[String; 11]> = lib
                .cells
                .iter()
                .map(|c| {
                    let (canon, _) = c.npn();
                    [
                        c.name.clone(),
                        format!("{} = f({})", c.output, c.inputs.join(", ")),
                        function_of(&c.name),
                        TruthTable::from_u64(c.truth, c.arity()).to_hex(),
                        TruthTable::from_u64(canon, c.arity()).to_hex(),
                        num(c.area),
                        format!(
                            "{} + {}*load",
                            num(c.delay.intrinsic),
                            num(c.delay.per_load)
                        ),
                        num(c.input_load),
                        if c.switch_energy_per_load > 0.0 {
                            format!(
                                "{} + {}*load",
                                num(c.switch_energy),
                                num(c.switch_energy_per_load)
                            )
                        } else {
                            num(c.switch_energy)
                        },
                        leakage_text(&c.leakage),
                        format!("{}", c.devices),
                    ]
                })
                .collect();
            let header = [
                "cell", "pins", "function", "truth", "npn", "area", "delay", "in load", "energy",
                "leakage", "devices",
            ];
            let mut widths: Vec<usize> = header.iter().map(|h| h.len()).collect();
            for r in &rows {
                for (w, cell) in widths.iter_mut().zip(r.iter()) {
                    *w = (*w).max(cell.chars().count());
                }
            }
            let line = |cols: Vec<&str>| -> String {
                let parts: Vec<String> = cols
                    .iter()
                    .zip(widths.iter())
                    .map(|(c, w)| format!("{c:<w$}"))
                    .collect();
                parts.join("  ").trim_end().to_string()
            };
            let _ = writeln!(out, "{}", line(header.to_vec()));
            for r in &rows {
                let _ = writeln!(out, "{}", line(r.iter().map(String::as_str).collect()));
            }
            for s in &lib.storage {
                let _ = writeln!(out);
                let _ = writeln!(
                    out,
                    "storage {}: d {}, q {}, clock {}, area {}",
                    s.name, s.d, s.q, s.clock, s.area
                );
            }
        }
    }
    emit(&out);
    Ok(EXIT_OK)
}

fn check(file: &str, format: LibraryFormat) -> CmdResult {
    let mut out = String::new();
    let result = Library::load(std::path::Path::new(file));
    match (result, format) {
        (Err(e), _) if e.unreadable => Err(CliError::Input(e.to_string())),
        (Ok(lib), LibraryFormat::Text) => {
            let _ = writeln!(
                out,
                "{file}: library '{}' is sound: {}, {}",
                lib.name,
                super::common::counted(lib.cells.len() as u64, "cell"),
                super::common::counted(lib.storage.len() as u64, "storage cell")
            );
            emit(&out);
            Ok(EXIT_OK)
        }
        (Ok(lib), LibraryFormat::Json) => {
            let report = json!({ "file": file, "sound": true, "name": lib.name, "cells": lib.cells.len(), "problems": [] });
            let _ = writeln!(
                out,
                "{}",
                serde_json::to_string_pretty(&report).unwrap_or_default()
            );
            emit(&out);
            Ok(EXIT_OK)
        }
        (Err(e), LibraryFormat::Text) => {
            for line in e.lines() {
                let _ = writeln!(out, "{line}");
            }
            let _ = writeln!(
                out,
                "{file}: {} problem{} found",
                e.problems.len(),
                if e.problems.len() == 1 { "" } else { "s" }
            );
            emit(&out);
            Ok(EXIT_NEGATIVE)
        }
        (Err(e), LibraryFormat::Json) => {
            let problems: Vec<_> = e
                .problems
                .iter()
                .map(|p| {
                    json!({
                        "cell": p.cell, "field": p.field, "line": p.line,
                        "column": p.column, "message": p.message,
                    })
                })
                .collect();
            let report = json!({ "file": file, "sound": false, "problems": problems });
            let _ = writeln!(
                out,
                "{}",
                serde_json::to_string_pretty(&report).unwrap_or_default()
            );
            emit(&out);
            Ok(EXIT_NEGATIVE)
        }
    }
}
