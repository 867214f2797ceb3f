//! `ribbonmap tabulate`: combine study result files (for example the shards of
//! a job array), drop duplicate plan keys and print the comparison tables.

use super::common::Format;
use super::compare::print_table;
use super::{CliError, CmdResult, EXIT_OK};
use crate::study::units::{LibraryScale, TableUnits};
use crate::study::{read_results, Metric, StudyRecord};
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
    #[arg(
        long = "chart-metric",
        value_name = "METRIC",
        value_enum,
        default_value = "cells"
    )]
    chart_metric: Metric,
    /// Also write the combined, duplicate-free result lines to this file.
    #[arg(short = 'o', long = "output", value_name = "RESULTS.jsonl")]
    output: Option<PathBuf>,
    /// Compare in each library's yardsticks (FO4 delays, NAND2-equivalents,
    /// inverter switchings), so different unit systems can be compared.
    #[arg(long, long_help = super::compare::NORMALIZE_HELP)]
    normalize: bool,
}

/// Units and yardsticks of each library in `records`. A built-in library
/// of the same name and units gives its yardsticks (and says whether it
/// models energy); otherwise the units come from the result lines alone,
/// which is enough to refuse mixed units but not to normalise.
fn library_scales(records: &[StudyRecord], normalize: bool) -> Result<TableUnits, CliError> {
    let mut scales = indexmap::IndexMap::new();
    for r in records {
        if scales.contains_key(&r.library) {
            continue;
        }
        let recorded = LibraryScale::from_record(r);
        let scale = match crate::library::Library::builtin(&r.library) {
            Some(lib)
                if (recorded.area_unit.is_empty() || recorded.area_unit == lib.units.area)
                    && (recorded.delay_unit.is_empty()
                        || recorded.delay_unit == lib.units.delay) =>
            {
                LibraryScale::of(&lib)
            }
            _ if normalize => {
                return Err(CliError::Input(format!(
                    "--normalize: library '{}' of the result lines is not a built-in library, \
                     so its FO4 delay and NAND2 area are unknown",
                    r.library
                )))
            }
            _ => recorded,
        };
        scales.insert(r.library.clone(), scale);
    }
    TableUnits::new(scales, normalize).map_err(CliError::Input)
}

/// Runs the command.
pub fn run(args: Args) -> CmdResult {
    super::compare::check_chart(args.chart.as_deref())?;
    if let Some(path) = &args.output {
        crate::fsutil::check_writable(path).map_err(CliError::Input)?;
    }
    let merged = read_results(&args.results)?;
    if merged.records.is_empty() {
        return Err(CliError::Input(format!(
            "{}: no result lines to tabulate (expected lines written by `ribbonmap study`)",
            args.results
                .iter()
                .map(|p| p.display().to_string())
                .collect::<Vec<_>>()
                .join(", ")
        )));
    }
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
    let units = library_scales(&merged.records, args.normalize)?;
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
        units,
    )?;
    Ok(EXIT_OK)
}
