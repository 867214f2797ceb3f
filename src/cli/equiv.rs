//! `ribbonmap equiv`: prove two netlists equivalent or show an input that
//! tells them apart.
//!
//! Exit codes (docs/exit-codes.md): 0 equivalent, 1 different (with a
//! counterexample), 3 undecided, 2 bad input.

use std::path::{Path, PathBuf};

use serde_json::{json, Map, Value};

use super::common::{load_library, ReportFormat};
use super::netlist_args::{library_for, NetlistArgs};
use super::{CliError, CmdResult, EXIT_NEGATIVE, EXIT_OK, EXIT_UNDECIDED};
use crate::equiv::algebra::DEFAULT_TERM_LIMIT;
use crate::equiv::{
    check_with_stats, parse_port_map, AlgebraOptions, ArithSpec, Counterexample, EquivError,
    EquivOptions, EquivReport, PortMatching, Verdict,
};

/// Arguments of `ribbonmap equiv`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// The first netlist (its port names are the ones reported).
    pub netlist_a: PathBuf,
    /// The second netlist.
    pub netlist_b: PathBuf,
    /// Cell library for mapped netlists that instantiate its cells (built-in
    /// name or file; default: the library a netlist's header records, else
    /// ribbon3).
    #[arg(long, value_name = "LIB")]
    pub lib: Option<String>,
    /// How ports are paired: `name`, `order`, or a port-map file with one
    /// `name_in_a name_in_b` pair a line (`#` comments; unlisted ports pair
    /// by name).
    #[arg(long, value_name = "name|order|PORTMAP", default_value = "name")]
    pub ports: String,
    /// Work limit of one SAT call in conflicts (0: none).
    #[arg(long, value_name = "N", default_value_t = EquivOptions::default().conflict_limit)]
    pub conflict_limit: u64,
    /// Prove each netlist against this word-level function by algebraic
    /// rewriting (multipliers, adders, multiply-accumulate); the input words
    /// follow --ports (`order`: the generated-circuit order, otherwise bus
    /// names). See docs/equiv-spec.md.
    #[arg(long, value_name = "mul|add|mac")]
    pub spec: Option<ArithSpec>,
    /// Monomials at most in the polynomial of a --spec proof (0: none).
    #[arg(long, value_name = "N", default_value_t = DEFAULT_TERM_LIMIT)]
    pub term_limit: usize,
    /// Report format.
    #[arg(long, value_enum, default_value = "text")]
    pub format: ReportFormat,
    /// Reader options shared by the commands that read netlists.
    #[command(flatten)]
    pub netlist: NetlistArgs,
}

fn port_matching(spec: &str) -> Result<PortMatching, CliError> {
    match spec {
        "name" => Ok(PortMatching::ByName),
        "order" => Ok(PortMatching::ByOrder),
        file => {
            let bytes = std::fs::read(file)
                .map_err(|e| CliError::Input(format!("{file}: cannot read the port map: {e}")))?;
            let text = crate::diag::utf8_text(file, bytes)?;
            Ok(PortMatching::Map(parse_port_map(&text, file)?))
        }
    }
}

/// Runs the command.
pub fn run(args: Args) -> CmdResult {
    let ports = port_matching(&args.ports)?;
    let library = match library_for(args.lib.as_deref(), &[&args.netlist_a, &args.netlist_b])? {
        Some(library) => library,
        None => load_library("ribbon3")?,
    };
    let a = args.netlist.read(&args.netlist_a, Some(&library))?;
    let b = args.netlist.read(&args.netlist_b, Some(&library))?;
    let opts = EquivOptions {
        ports,
        conflict_limit: args.conflict_limit,
        spec: args.spec,
        algebra: AlgebraOptions {
            term_limit: args.term_limit,
            ..AlgebraOptions::default()
        },
        ..EquivOptions::default()
    };
    // Long proofs show progress on a terminal (nothing in pipes or CI).
    crate::equiv::show_progress();
    let report = check_with_stats(&a, &b, &opts).map_err(|e| match e {
        EquivError::Internal(m) => CliError::Internal(m),
        other => CliError::Input(format!(
            "cannot compare {} with {}: {other}",
            args.netlist_a.display(),
            args.netlist_b.display()
        )),
    })?;
    match args.format {
        ReportFormat::Json => outln!(
            "{}",
            serde_json::to_string_pretty(&to_json(&report)).expect("JSON values serialise")
        ),
        _ => out!("{}", to_text(&report, &args.netlist_a, &args.netlist_b)),
    }
    Ok(match report.verdict {
        Verdict::Equivalent { .. } => EXIT_OK,
        Verdict::Different { .. } => EXIT_NEGATIVE,
        Verdict::Undecided { .. } => EXIT_UNDECIDED,
    })
}

/// What to try when a limit stopped the proof: the option that sets the
/// limit, and the algebraic route for arithmetic circuits.
fn limit_hint(report: &EquivReport) -> String {
    match (report.stats.stopped_by.as_deref(), &report.stats.spec) {
        (Some("--term-limit"), Some(spec)) => format!(
            "the polynomial of the --spec {} proof outgrew --term-limit (first netlist {}, second {}); raise --term-limit N (0: none)\n",
            spec.spec, spec.a, spec.b
        ),
        (Some(option), _) => format!(
            "raise {option} N (0: none); for multipliers and adders, --spec mul|add|mac proves each side against the integer function instead\n"
        ),
        (None, _) => String::new(),
    }
}

fn counterexample_json(cex: &Counterexample) -> Value {
    let inputs: Map<String, Value> = cex
        .inputs
        .iter()
        .map(|(n, &v)| (n.clone(), json!(v as u8)))
        .collect();
    let values: Map<String, Value> = cex
        .differing_outputs
        .iter()
        .zip(&cex.output_values)
        .map(|(n, &(x, y))| (n.clone(), json!({"a": x as u8, "b": y as u8})))
        .collect();
    json!({
        "inputs": inputs,
        "differing_outputs": cex.differing_outputs,
        "output_values": values,
    })
}

/// The JSON report (fields `verdict`, `outputs_checked`, `counterexample`
/// are documented in docs/json-output.md; `undecided_outputs` and `stats` are extras).
pub fn to_json(report: &EquivReport) -> Value {
    let mut obj = Map::new();
    obj.insert("verdict".into(), json!(report.verdict.name()));
    obj.insert(
        "outputs_checked".into(),
        json!(report.verdict.outputs_checked()),
    );
    match &report.verdict {
        Verdict::Different { counterexample, .. } => {
            obj.insert("counterexample".into(), counterexample_json(counterexample));
        }
        Verdict::Undecided { outputs, .. } => {
            obj.insert("undecided_outputs".into(), json!(outputs));
        }
        Verdict::Equivalent { .. } => {}
    }
    obj.insert(
        "stats".into(),
        serde_json::to_value(&report.stats).expect("stats serialise"),
    );
    Value::Object(obj)
}

/// The text report: the verdict, and for a difference a table of the input
/// values and of each differing output's value in A and in B.
pub fn to_text(report: &EquivReport, a: &Path, b: &Path) -> String {
    let mut s = String::new();
    let checked = report.verdict.outputs_checked();
    match &report.verdict {
        Verdict::Equivalent { .. } => {
            s += &format!(
                "equivalent: {} of {} and {} {} proven equal\n",
                if checked == 1 {
                    "the 1 output".to_string()
                } else {
                    format!("all {checked} outputs")
                },
                a.display(),
                b.display(),
                if checked == 1 { "is" } else { "are" }
            );
        }
        Verdict::Undecided { outputs, .. } => {
            s += &format!(
                "undecided: the work limit stopped the proof of {} of {} (no difference found)\n",
                outputs.len(),
                super::common::counted(checked as u64, "output")
            );
            for o in outputs {
                s += &format!("  {o}\n");
            }
            s += &limit_hint(report);
        }
        Verdict::Different { counterexample, .. } => {
            let cex = counterexample;
            s += &format!(
                "different: {} of {} {} on this input assignment\n\n",
                cex.differing_outputs.len(),
                super::common::counted(checked as u64, "output"),
                if cex.differing_outputs.len() == 1 {
                    "differs"
                } else {
                    "differ"
                }
            );
            let width = cex
                .inputs
                .keys()
                .chain(&cex.differing_outputs)
                .map(|n| n.chars().count())
                .max()
                .unwrap_or(0)
                .max(6);
            s += &format!("  {:<width$}  value\n", "input");
            for (name, &v) in &cex.inputs {
                s += &format!("  {name:<width$}  {}\n", v as u8);
            }
            s += &format!("\n  {:<width$}  A  B\n", "output");
            for (name, &(x, y)) in cex.differing_outputs.iter().zip(&cex.output_values) {
                s += &format!("  {name:<width$}  {}  {}\n", x as u8, y as u8);
            }
            s += &format!("\n  A = {}\n  B = {}\n", a.display(), b.display());
        }
    }
    s
}
