//! `ribbonmap tabulate`: combine study result files (for example the shards of
//! a job array), drop duplicate plan keys and print the comparison tables.

use super::common::Format;
use super::compare::print_table;
use super::{CliError, CmdResult, EXIT_OK};
use crate::study::{read_results, Metric};
use std::path::PathBuf;

/// Arguments of `ribbonmap tabulate`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// Result files written by `ribbonmap study` ('-' reads standard input).
    #[arg(required = true, value_name = "RESULTS.jsonl")]
    results: Vec<PathBuf>,
    /// Table format.
    #[arg(long, value_enum, default_value = "text")]
    format: Format,
    /// Library the ratios are relative to (default: the first one found).
    #[arg(long, value_name = "LIB")]
    baseline: Option<String>,
    /// Also write a grouped bar chart of the ratios to this SVG file.
    #[arg(long, value_name = "OUT.svg")]
    chart: Option<PathBuf>,
    /// Metric the chart shows.
    #[arg(long = "chart-metric", value_enum, default_value = "cells")]
    chart_metric: Metric,
    /// Also write the combined, duplicate-free result lines to this file.
    #[arg(short = 'o', long = "output", value_name = "RESULTS.jsonl")]
    output: Option<PathBuf>,
}

/// Runs the command.
pub fn run(args: Args) -> CmdResult {
    super::compare::check_chart(args.chart.as_deref())?;
    if let Some(path) = &args.output {
        crate::fsutil::check_writable(path).map_err(CliError::Input)?;
    }
    let merged = read_results(&args.results)?;
    for file in &merged.truncated {
        eprintln!("note: {file}: ignored an unfinished last line (an interrupted study run)");
    }
    if merged.duplicates > 0 {
        eprintln!(
            "note: dropped {} (same plan_key)",
            super::common::counted(merged.duplicates as u64, "duplicate result line")
        );
    }
    if let Some(b) = &args.baseline {
        if !merged.records.iter().any(|r| r.library == *b) {
            return Err(CliError::Input(format!(
                "baseline library '{b}' occurs in no result line"
            )));
        }
    }
    if let Some(path) = &args.output {
        let mut text = String::new();
        for r in &merged.records {
            text.push_str(&r.to_json_line());
            text.push('\n');
        }
        crate::fsutil::write_atomic(path, text.as_bytes())
            .map_err(|e| CliError::Input(format!("cannot write {}: {e}", path.display())))?;
    }
    print_table(
        &merged.records,
        args.baseline.as_deref(),
        args.format,
        args.chart.as_deref(),
        args.chart_metric,
    )?;
    Ok(EXIT_OK)
}
