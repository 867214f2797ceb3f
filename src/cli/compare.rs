//! `ribbonmap compare`: map netlists on several libraries and print the
//! results side by side, with ratios to the first library.

use super::common::{load_library, Format};
use super::netlist_args::NetlistArgs;
use super::{CliError, CmdResult, EXIT_OK};
use crate::study::evaluate::{compare_with_levels, EvaluateOptions, LibraryLevels};
use crate::study::power::Stimulus;
use crate::study::table::{render, ComparisonTable, Metric, TableFormat};
use crate::study::units::{LibraryScale, TableUnits};
use crate::study::{render_svg, Goal, StudyError, StudyRecord, VerifyMode};
use std::path::{Path, PathBuf};

/// Arguments of `ribbonmap compare`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// Netlists to map (.blif, .v, .bench, .aag, .aig).
    #[arg(required = true, value_name = "NETLIST")]
    netlists: Vec<PathBuf>,
    /// A library (built-in name or file); repeat for each library. Ratios
    /// are relative to the first. Default: ribbon3.
    #[arg(long = "lib", value_name = "LIB")]
    libs: Vec<String>,
    /// Mapping goal, the same for every library.
    #[arg(long, value_enum, default_value = "balanced")]
    goal: Goal,
    /// How each mapping is checked: a proof (full), random simulation (sim)
    /// or not at all (none). The table says which was done.
    #[arg(long, value_enum, default_value = "full")]
    verify: VerifyMode,
    /// Largest cut of the mapper (2 to 6; default 4).
    #[arg(long = "cut-size", value_name = "N", value_parser = clap::value_parser!(u32).range(2..=6))]
    cut_size: Option<u32>,
    /// Priority cuts kept per node (1 to 64).
    #[arg(long = "cuts-per-node", value_name = "N", value_parser = clap::value_parser!(u32).range(1..=64))]
    cuts_per_node: Option<u32>,
    /// Probability that an input is 1 in the energy simulation.
    #[arg(long = "input-probability", default_value_t = 0.5, value_name = "P")]
    input_probability: f64,
    /// Random patterns simulated for energy (2 to 16,777,216).
    #[arg(long, value_name = "N", default_value_t = crate::study::power::DEFAULT_PATTERNS,
          value_parser = clap::value_parser!(u64).range(2..=16_777_216))]
    patterns: u64,
    /// Map margin-aware, as `map --min-margin MV`: every net keeps MV
    /// millivolts of noise margin (characterised libraries only).
    #[arg(long = "min-margin", value_name = "MV")]
    min_margin: Option<f64>,
    /// Table format.
    #[arg(long, value_enum, default_value = "text")]
    format: Format,
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
    /// Worker threads, 1 to 1024 (default: one per core).
    #[arg(long, value_name = "N", value_parser = clap::builder::RangedU64ValueParser::<usize>::new().range(1..=1024))]
    jobs: Option<usize>,
    /// Compare in each library's yardsticks (FO4 delays, NAND2-equivalents,
    /// inverter switchings), so different unit systems can be compared.
    #[arg(long, long_help = NORMALIZE_HELP)]
    normalize: bool,
    #[command(flatten)]
    read: NetlistArgs,
}

/// Help of `--normalize`, shared by `compare` and `tabulate`.
pub(super) const NORMALIZE_HELP: &str =
    "Show delay, area and energy in yardsticks of each library, so \
libraries of different unit systems can be compared: delay in FO4 delays (the library's inverter \
driving four inverters, intrinsic + per_load × 4 × input_load), area in NAND2-equivalents (its \
two-input NAND's area, or AND2's where it has no NAND) and energy in its inverter's switching \
energy (all common practice). Without it, libraries whose units differ are refused (exit 2).";

/// The table format for a command-line format.
pub(super) fn table_format(format: Format) -> TableFormat {
    match format {
        Format::Text => TableFormat::Text,
        Format::Json => TableFormat::Json,
        Format::Csv => TableFormat::Csv,
        Format::Markdown => TableFormat::Markdown,
        Format::Latex => TableFormat::Latex,
    }
}

/// A study error as a command error (input → exit 2, internal → 70).
pub(super) fn cli_error(e: StudyError) -> CliError {
    match e {
        StudyError::Input(m) => CliError::Input(m),
        StudyError::Internal(m) => CliError::Internal(m),
    }
}

/// Checks a `--chart` file name before any work: it must end in `.svg` (the
/// only chart format written) and its folder must take a new file.
pub(super) fn check_chart(chart: Option<&Path>) -> Result<(), CliError> {
    let Some(path) = chart else { return Ok(()) };
    let is_svg = path
        .extension()
        .and_then(|e| e.to_str())
        .is_some_and(|e| e.eq_ignore_ascii_case("svg"));
    if !is_svg {
        return Err(CliError::Input(format!(
            "--chart {}: charts are written as SVG; give a file name ending in .svg",
            path.display()
        )));
    }
    crate::fsutil::check_writable(path).map_err(CliError::Input)
}

/// Prints the table of `records` and writes the chart if asked.
pub(super) fn print_table(
    records: &[StudyRecord],
    baseline: Option<&str>,
    format: Format,
    chart: Option<&Path>,
    metric: Metric,
    units: TableUnits,
) -> Result<(), CliError> {
    let table = ComparisonTable::build_in_units(records, baseline, units);
    out!("{}", render(&table, table_format(format)));
    if let Some(path) = chart {
        crate::fsutil::write_atomic(path, render_svg(&table, metric).as_bytes())
            .map_err(|e| CliError::Input(format!("cannot write {}: {e}", path.display())))?;
    }
    Ok(())
}

/// Runs the command.
pub fn run(args: Args) -> CmdResult {
    check_chart(args.chart.as_deref())?;
    let specs = if args.libs.is_empty() {
        vec!["ribbon3".to_string()]
    } else {
        args.libs.clone()
    };
    let mut libraries = Vec::new();
    for spec in &specs {
        libraries.push(load_library(spec)?);
    }
    for (i, lib) in libraries.iter().enumerate() {
        if libraries[..i].iter().any(|l| l.name == lib.name) {
            return Err(CliError::Input(format!(
                "library '{}' is given twice",
                lib.name
            )));
        }
    }
    let scales = libraries
        .iter()
        .map(|l| (l.name.clone(), LibraryScale::of(l)))
        .collect();
    let units = TableUnits::new(scales, args.normalize).map_err(CliError::Input)?;
    if !(0.0..=1.0).contains(&args.input_probability) {
        return Err(CliError::Input(format!(
            "--input-probability {} is not between 0 and 1",
            args.input_probability
        )));
    }
    let mut levels = Vec::new();
    if let Some(mv) = args.min_margin {
        if !mv.is_finite() {
            return Err(CliError::Input(format!(
                "--min-margin {mv}: expected a number of millivolts"
            )));
        }
        for (spec, lib) in specs.iter().zip(&libraries) {
            levels.push(Some(LibraryLevels::load(lib, spec).map_err(|e| {
                CliError::Input(format!("--min-margin: library '{spec}': {e}"))
            })?));
        }
    }
    let mut benchmarks = Vec::new();
    for path in &args.netlists {
        let network = args.read.read(path, None)?;
        let name = path
            .file_stem()
            .map(|s| s.to_string_lossy().to_string())
            .unwrap_or_else(|| path.display().to_string());
        benchmarks.push((name, network));
    }
    let options = EvaluateOptions {
        goal: args.goal,
        cut_size: args.cut_size,
        cuts_per_node: args.cuts_per_node,
        verify: args.verify,
        stimulus: Stimulus::Random {
            probability: args.input_probability,
            patterns: args.patterns,
            seed: 1,
        },
        min_margin_mv: args.min_margin,
    };
    let mut pool = rayon::ThreadPoolBuilder::new();
    if let Some(n) = args.jobs {
        pool = pool.num_threads(n.max(1));
    }
    let pool = pool
        .build()
        .map_err(|e| CliError::Internal(format!("cannot start worker threads: {e}")))?;
    let progress = super::progress::bar(
        (benchmarks.len() * libraries.len()) as u64,
        "compare: mappings",
    );
    let records = pool
        .install(|| {
            compare_with_levels(&benchmarks, &libraries, &levels, &options, || {
                if let Some(p) = &progress {
                    p.inc(1);
                }
            })
        })
        .map_err(cli_error);
    if let Some(p) = progress {
        p.finish_and_clear();
    }
    let records = records?;
    print_table(
        &records,
        None,
        args.format,
        args.chart.as_deref(),
        args.chart_metric,
        units,
    )?;
    Ok(EXIT_OK)
}
