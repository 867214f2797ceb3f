//! `ribbonmap levels`: map a netlist onto a characterised library and check
//! that every net keeps its logic level (static voltages from the cells'
//! conductance tables, margins to the receivers' thresholds).

use super::common::{counted, load_library};
use super::spice::load_library_models;
use super::{CliError, CmdResult, EXIT_NEGATIVE, EXIT_OK};
use crate::cli::netlist_args::NetlistArgs;
use crate::device::levels::{analyze_levels, LevelModel, LevelOptions, LevelReport};
use crate::library::Library;
use crate::mapper::{map, MapOptions};
use crate::netlist::MappedNetlist;
use std::fmt::Write;
use std::path::PathBuf;

/// Nets listed in the text report.
const WEAKEST_SHOWN: usize = 10;

/// Report format of `ribbonmap levels`.
#[derive(clap::ValueEnum, Clone, Copy, Debug, PartialEq, Eq)]
pub enum LevelsFormat {
    /// Aligned text for a terminal.
    Text,
    /// JSON (fields in docs/device-data.md).
    Json,
}

/// Arguments of `ribbonmap levels`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// The netlist (.blif, .v, .bench, .aag, .aig); it is mapped onto the library first.
    pub netlist: PathBuf,
    /// A characterised library file (written by `ribbonmap characterize`).
    #[arg(long, value_name = "LIB")]
    pub lib: String,
    /// Random patterns when the netlist has more than 16 inputs (1 to
    /// 16,777,216); with 16 or fewer every pattern is analysed.
    #[arg(long, value_name = "N", default_value_t = 65_536,
          value_parser = clap::value_parser!(u64).range(1..=16_777_216))]
    pub patterns: u64,
    /// Seed of the random patterns.
    #[arg(long, value_name = "N", default_value_t = 1)]
    pub seed: u64,
    /// Exit 1 unless every net keeps at least this margin, millivolts.
    #[arg(
        long,
        value_name = "MV",
        default_value_t = 0.0,
        allow_negative_numbers = true
    )]
    pub min_margin: f64,
    /// Report format.
    #[arg(long, value_enum, default_value_t = LevelsFormat::Text)]
    pub format: LevelsFormat,
    /// How to read the netlist.
    #[command(flatten)]
    pub reading: NetlistArgs,
}

/// Level analysis of `netlist`, already mapped on the characterised
/// library `lib` (loaded from `lib_spec`); shared with `map --levels`.
pub fn analyze_mapped(
    netlist: &MappedNetlist,
    lib: &Library,
    lib_spec: &str,
    options: &LevelOptions,
) -> Result<LevelReport, CliError> {
    let (models, data) = load_library_models(lib, lib_spec)?;
    let model = LevelModel::new(lib, &models, &data);
    analyze_levels(netlist, lib, &model, options).map_err(CliError::Input)
}

/// Runs the command.
pub fn run(args: Args) -> CmdResult {
    if !args.min_margin.is_finite() {
        return Err(CliError::Input(format!(
            "--min-margin {}: expected a number of millivolts",
            args.min_margin
        )));
    }
    let lib = load_library(&args.lib)?;
    let (models, data) = load_library_models(&lib, &args.lib)?;
    let net = args.reading.read(&args.netlist, Some(&lib))?;
    let netlist = map(&net, &lib, &MapOptions::default())
        .map_err(|e| CliError::Input(format!("{}: cannot map: {e}", args.netlist.display())))?;
    let model = LevelModel::new(&lib, &models, &data);
    let options = LevelOptions {
        patterns: args.patterns,
        seed: args.seed,
    };
    // Random patterns and the worst-pattern search can take minutes on a
    // large netlist; a spinner on a terminal only (progress::spinner).
    let progress = super::progress::spinner(&format!(
        "levels: {} ({})",
        args.netlist.display(),
        counted(netlist.instances.len() as u64, "cell")
    ));
    let report = analyze_levels(&netlist, &lib, &model, &options);
    if let Some(p) = progress {
        p.finish_and_clear();
    }
    let report = report.map_err(|e| CliError::Input(format!("{}: {e}", args.netlist.display())))?;
    let min_margin_v = args.min_margin / 1e3;
    let holds = report
        .worst_margin_v()
        .is_none_or(|worst| worst >= min_margin_v);
    match args.format {
        LevelsFormat::Json => {
            let mut value = serde_json::to_value(&report)
                .map_err(|e| CliError::Internal(format!("cannot encode the report: {e}")))?;
            value["library"] = serde_json::Value::from(lib.name.clone());
            value["cells"] = serde_json::Value::from(netlist.instances.len());
            value["min_margin_mv"] = serde_json::Value::from(args.min_margin);
            value["holds"] = serde_json::Value::from(holds);
            let text = serde_json::to_string_pretty(&value)
                .map_err(|e| CliError::Internal(format!("cannot encode the report: {e}")))?;
            outln!("{text}");
        }
        LevelsFormat::Text => out!(
            "{}",
            text_report(
                &report,
                &lib.name,
                netlist.instances.len(),
                args.min_margin,
                holds
            )
        ),
    }
    Ok(if holds { EXIT_OK } else { EXIT_NEGATIVE })
}

/// One line summing up a level analysis, for `map --levels`.
pub fn summary_line(report: &LevelReport) -> String {
    match report.nets.first() {
        Some(w) => format!(
            "levels    worst margin {:.3} mV on net {}, {} (net-patterns) over {}, static {:.3} nW\n",
            w.worst_margin_v * 1e3,
            w.net,
            counted(report.logic_failures, "logic failure"),
            counted(report.patterns, "pattern"),
            report.average_static_power_nw
        ),
        None => "levels    no net is read\n".to_string(),
    }
}

/// The text report; every figure names its unit.
fn text_report(
    report: &LevelReport,
    library: &str,
    cells: usize,
    min_margin_mv: f64,
    holds: bool,
) -> String {
    let mut t = String::new();
    let _ = writeln!(
        t,
        "levels          {} on {library}: {}, {} read",
        report.design,
        counted(cells as u64, "cell"),
        counted(report.nets.len() as u64, "net")
    );
    let _ = writeln!(
        t,
        "patterns        {} ({})",
        report.patterns,
        if report.exhaustive {
            "every pattern"
        } else {
            "random"
        }
    );
    let _ = writeln!(t, "supply          {} V", report.supply_v);
    match report.nets.first() {
        Some(w) => {
            let _ = writeln!(
                t,
                "worst margin    {:.3} mV on net {} (logic {}, {:.6} V; thresholds VIL {:.4} V, VIH {:.4} V; pattern {})",
                w.worst_margin_v * 1e3,
                w.net,
                u8::from(w.worst_value),
                w.worst_voltage_v,
                w.vil_v,
                w.vih_v,
                w.worst_pattern
            );
        }
        None => {
            let _ = writeln!(t, "worst margin    none (no net is read)");
        }
    }
    if let Some(w) = report.nets.first().filter(|w| !w.path.is_empty()) {
        let _ = writeln!(t, "weakest path    {}", w.path.join(" > "));
    }
    if !report.exhaustive {
        let _ = writeln!(
            t,
            "search          {} of single-input flips from the weakest nets' worst patterns",
            counted(report.search_evaluations, "evaluation")
        );
    }
    let _ = writeln!(
        t,
        "logic failures  {} on {}",
        counted(report.logic_failures, "net-pattern"),
        counted(report.failing_patterns, "pattern")
    );
    let _ = writeln!(
        t,
        "static power    {:.3} nW (mean over the patterns)",
        report.average_static_power_nw
    );
    let _ = writeln!(
        t,
        "required        margin >= {min_margin_mv} mV: {}",
        if holds { "holds" } else { "FAILS" }
    );
    let _ = writeln!(t, "\nweakest nets");
    let _ = writeln!(
        t,
        "  {:<16} {:>11} {:>11} {:>9} {:>9}  {:>8}  pattern",
        "net", "margin mV", "voltage V", "VIL V", "VIH V", "failures"
    );
    for n in report.nets.iter().take(WEAKEST_SHOWN) {
        let _ = writeln!(
            t,
            "  {:<16} {:>11.3} {:>11.6} {:>9.4} {:>9.4}  {:>8}  {}",
            n.net,
            n.worst_margin_v * 1e3,
            n.worst_voltage_v,
            n.vil_v,
            n.vih_v,
            n.failures,
            n.worst_pattern
        );
    }
    let _ = writeln!(t, "\nmargin histogram (nets per 10 mV bin)");
    for b in &report.histogram {
        let _ = writeln!(
            t,
            "  [{:>6.0} mV, {:>6.0} mV) {:>6}",
            b.from_mv, b.to_mv, b.nets
        );
    }
    t
}
