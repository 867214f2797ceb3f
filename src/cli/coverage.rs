//! `ribbonmap coverage`: how many cells every function of three or four
//! inputs needs on each library, side by side.

use super::common::{load_library, Format};
use super::{CliError, CmdResult, EXIT_OK};
use crate::exact::{coverage_of_library, Coverage, CoverageOptions, ExactError};
use std::collections::BTreeSet;

/// Arguments of `ribbonmap coverage`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// Library: a built-in name or a library file; repeat to compare
    /// (default: ribbon3).
    #[arg(long = "lib", value_name = "LIB")]
    pub libs: Vec<String>,
    /// Number of inputs of the functions tabulated (3 or 4).
    #[arg(long, value_name = "N", default_value_t = 4, value_parser = clap::value_parser!(u8).range(3..=4))]
    pub inputs: u8,
    /// Input and output complements are free (costs then depend only on
    /// the NPN class).
    #[arg(long)]
    pub free_complements: bool,
    /// Stop each SAT call after about this many conflicts (the function is
    /// then counted as unproven or unsolved).
    #[arg(long, value_name = "N")]
    pub conflict_limit: Option<u64>,
    /// Recompute instead of reading the cache.
    #[arg(long)]
    pub no_cache: bool,
    /// Output format.
    #[arg(long, value_enum, default_value = "text")]
    pub format: Format,
}

/// Runs the command.
pub fn run(args: Args) -> CmdResult {
    let specs = if args.libs.is_empty() {
        vec!["ribbon3".to_string()]
    } else {
        args.libs.clone()
    };
    let opts = CoverageOptions {
        inputs: args.inputs as usize,
        free_complements: args.free_complements,
        conflict_limit: args.conflict_limit,
        use_cache: !args.no_cache,
        ..CoverageOptions::default()
    };
    let mut tables = Vec::with_capacity(specs.len());
    for spec in &specs {
        let library = load_library(spec)?;
        let progress = super::progress::spinner(&format!(
            "coverage: {}-input functions on {}",
            opts.inputs, library.name
        ));
        let table = coverage_of_library(&library, &opts);
        if let Some(p) = progress {
            p.finish_and_clear();
        }
        let table = table.map_err(|e| match e {
            ExactError::Internal(m) => CliError::Internal(m),
            other => CliError::Input(other.to_string()),
        })?;
        tables.push(table);
    }
    let text = match args.format {
        Format::Json => render_json(&tables)?,
        Format::Text => render_text(&tables),
        Format::Csv => render_rows(&tables, RowStyle::Csv),
        Format::Markdown => render_rows(&tables, RowStyle::Markdown),
        Format::Latex => render_rows(&tables, RowStyle::Latex),
    };
    out!("{text}");
    Ok(EXIT_OK)
}

fn render_json(tables: &[Coverage]) -> Result<String, CliError> {
    let libraries: Vec<serde_json::Value> = tables
        .iter()
        .map(|t| {
            let histogram: serde_json::Map<String, serde_json::Value> = t
                .histogram
                .iter()
                .map(|(c, n)| (c.to_string(), serde_json::json!(n)))
                .collect();
            let npn: Vec<serde_json::Value> = t
                .npn_classes
                .iter()
                .map(|c| {
                    serde_json::json!({
                        "representative": format!("0x{:X}", c.representative),
                        "functions": c.functions,
                        "min_cells": c.min_cells,
                        "max_cells": c.max_cells,
                    })
                })
                .collect();
            serde_json::json!({
                "name": t.name,
                "inputs": t.inputs,
                "functions": t.functions,
                "histogram": histogram,
                "one_cell": t.one_cell,
                "mean_cells": t.mean_cells,
                "unsolved": t.unsolved,
                "unproven": t.unproven,
                "free_complements": t.free_complements,
                "classes_solved": t.classes.len(),
                "npn_classes": npn,
                "library_hash": t.library_hash,
                "cached": t.cached,
                "seconds": t.seconds,
                "slowest_class": t.slowest_class().map(|c| serde_json::json!({
                    "representative": format!("0x{:X}", c.representative),
                    "cells": c.cells,
                    "seconds": c.seconds,
                })),
            })
        })
        .collect();
    let mut s = serde_json::to_string_pretty(&serde_json::json!({ "libraries": libraries }))
        .map_err(|e| CliError::Internal(e.to_string()))?;
    s.push('\n');
    Ok(s)
}

/// Rows of the side-by-side table: a label and one value per library.
fn table_rows(tables: &[Coverage]) -> Vec<(String, Vec<String>)> {
    let counts: BTreeSet<usize> = tables
        .iter()
        .flat_map(|t| t.histogram.keys().copied())
        .collect();
    let mut rows = Vec::new();
    for c in counts {
        rows.push((
            super::common::counted(c as u64, "cell"),
            tables
                .iter()
                .map(|t| t.histogram.get(&c).copied().unwrap_or(0).to_string())
                .collect(),
        ));
    }
    let stat = |label: &str, f: &dyn Fn(&Coverage) -> String| {
        (label.to_string(), tables.iter().map(f).collect::<Vec<_>>())
    };
    rows.push(stat("functions", &|t| t.functions.to_string()));
    rows.push(stat("one cell", &|t| t.one_cell.to_string()));
    rows.push(stat("mean cells", &|t| format!("{:.3}", t.mean_cells)));
    rows.push(stat("unsolved", &|t| t.unsolved.to_string()));
    rows.push(stat("unproven", &|t| t.unproven.to_string()));
    rows
}

fn render_text(tables: &[Coverage]) -> String {
    let mut out = String::new();
    let first = &tables[0];
    out.push_str(&format!(
        "cells needed by each of the {} functions of {} inputs ({}; constants and literals cost 0)\n",
        first.functions,
        first.inputs,
        if first.free_complements {
            "complements free"
        } else {
            "inverters cost a cell"
        }
    ));
    let rows = table_rows(tables);
    let label_width = rows.iter().map(|r| r.0.len()).max().unwrap_or(0).max(10);
    let widths: Vec<usize> = tables
        .iter()
        .enumerate()
        .map(|(i, t)| {
            rows.iter()
                .map(|r| r.1[i].len())
                .max()
                .unwrap_or(0)
                .max(t.name.len())
        })
        .collect();
    out.push_str(&format!("{:<label_width$}", ""));
    for (t, w) in tables.iter().zip(&widths) {
        out.push_str(&format!("  {:>w$}", t.name, w = *w));
    }
    out.push('\n');
    for (label, values) in &rows {
        out.push_str(&format!("{label:<label_width$}"));
        for (v, w) in values.iter().zip(&widths) {
            out.push_str(&format!("  {v:>w$}", w = *w));
        }
        out.push('\n');
    }
    for t in tables {
        let slowest = t
            .slowest_class()
            .map(|c| {
                format!(
                    "; slowest class 0x{:X} took {:.2} s",
                    c.representative, c.seconds
                )
            })
            .unwrap_or_default();
        out.push_str(&format!(
            "{}: {}{slowest}\n",
            t.name,
            if t.cached {
                "from cache".to_string()
            } else {
                format!(
                    "computed in {:.2} s ({})",
                    t.seconds,
                    super::common::counted(t.classes.len() as u64, "class")
                )
            }
        ));
    }
    out
}

#[derive(Clone, Copy, PartialEq)]
enum RowStyle {
    Csv,
    Markdown,
    Latex,
}

fn render_rows(tables: &[Coverage], style: RowStyle) -> String {
    let rows = table_rows(tables);
    let names: Vec<&str> = tables.iter().map(|t| t.name.as_str()).collect();
    let mut out = String::new();
    match style {
        RowStyle::Csv => {
            out.push_str(&format!("row,{}\n", names.join(",")));
            for (label, values) in &rows {
                out.push_str(&format!("{label},{}\n", values.join(",")));
            }
        }
        RowStyle::Markdown => {
            out.push_str(&format!("| | {} |\n", names.join(" | ")));
            out.push_str(&format!("|---|{}\n", "---:|".repeat(names.len())));
            for (label, values) in &rows {
                out.push_str(&format!("| {label} | {} |\n", values.join(" | ")));
            }
        }
        RowStyle::Latex => {
            out.push_str(&format!(
                "\\begin{{tabular}}{{l{}}}\n\\toprule\n",
                "r".repeat(names.len())
            ));
            let escaped: Vec<String> = names.iter().map(|n| n.replace('_', "\\_")).collect();
            out.push_str(&format!(" & {} \\\\\n\\midrule\n", escaped.join(" & ")));
            for (label, values) in &rows {
                out.push_str(&format!("{label} & {} \\\\\n", values.join(" & ")));
            }
            out.push_str("\\bottomrule\n\\end{tabular}\n");
        }
    }
    out
}
