//! `ribbonmap exact`: a provably smallest network of library cells for a
//! small function, printed as a small netlist with its costs.

use super::common::{load_library, ReportFormat};
use super::{CliError, CmdResult, EXIT_NEGATIVE, EXIT_OK, EXIT_UNDECIDED};
use crate::exact::{gates_from_library, synthesize, ExactError, ExactOptions, Objective};
use std::time::{Duration, Instant};

/// The longest `--time-limit`, seconds (a year); longer values, like
/// infinity, are refused rather than overflowing the timer.
const MAX_TIME_LIMIT_SECONDS: f64 = 31_536_000.0;

/// What `--objective` minimises.
#[derive(clap::ValueEnum, Clone, Copy, Debug, PartialEq, Eq)]
pub enum ObjectiveArg {
    /// Fewest cells.
    Cells,
    /// Least total area.
    Area,
    /// Fewest levels, then fewest cells.
    Depth,
}

/// Arguments of `ribbonmap exact`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// Truth table in hex (0xE8) or binary (0b11101000); a comma-separated
    /// list for several outputs (0x96,0xE8 is a full adder).
    pub truth: String,
    /// Number of inputs (0 to 5).
    #[arg(long, value_name = "N")]
    pub inputs: usize,
    /// Library: a built-in name or a library file.
    #[arg(long, value_name = "LIB", default_value = "ribbon3")]
    pub lib: String,
    /// What to minimise.
    #[arg(long, value_enum, default_value = "cells")]
    pub objective: ObjectiveArg,
    /// Both phases of every input, and complemented outputs, are free.
    #[arg(long)]
    pub free_complements: bool,
    /// Stop each SAT call after about this many conflicts.
    #[arg(long, value_name = "N")]
    pub conflict_limit: Option<u64>,
    /// Stop the search after this many seconds (above 0, at most a year:
    /// 31,536,000).
    #[arg(long, value_name = "SECONDS")]
    pub time_limit: Option<f64>,
    /// Largest number of cells to try (1 to 16).
    #[arg(long, value_name = "N", default_value_t = 10,
          value_parser = clap::builder::RangedU64ValueParser::<usize>::new().range(1..=16))]
    pub max_steps: usize,
    /// Output format: text or json.
    #[arg(long, value_enum, default_value = "text")]
    pub format: ReportFormat,
}

/// A signal of the found network as JSON (docs/json-output.md):
/// `{"from": "input"|"step"|"constant", "index": k, "complemented": b}`.
fn operand_json(op: &crate::exact::Operand) -> serde_json::Value {
    use crate::exact::Source;
    let (from, index) = match op.source {
        Source::Constant => ("constant", 0),
        Source::Input(k) => ("input", k),
        Source::Step(i) => ("step", i),
    };
    serde_json::json!({ "from": from, "index": index, "complemented": op.complemented })
}

/// The objective's name in reports, as `--objective` spells it and
/// docs/json-output.md documents it.
fn objective_name(objective: ObjectiveArg) -> &'static str {
    match objective {
        ObjectiveArg::Cells => "cells",
        ObjectiveArg::Area => "area",
        ObjectiveArg::Depth => "depth",
    }
}

/// Runs the command.
pub fn run(args: Args) -> CmdResult {
    if args.inputs > 5 {
        return Err(CliError::Input(format!(
            "--inputs {}: exact synthesis supports at most 5 inputs",
            args.inputs
        )));
    }
    let functions = args
        .truth
        .split(',')
        .map(|t| crate::truth::parse_truth_word(t, args.inputs).map_err(CliError::Input))
        .collect::<Result<Vec<u64>, CliError>>()?;
    let time_limit = match args.time_limit {
        Some(s) if !(s > 0.0 && s <= MAX_TIME_LIMIT_SECONDS) => {
            return Err(CliError::Input(format!(
                "--time-limit {s:?}: expected a number of seconds above 0 and at most {MAX_TIME_LIMIT_SECONDS} (a year)"
            )))
        }
        Some(s) => Some(Duration::from_secs_f64(s)),
        None => None,
    };
    let library = load_library(&args.lib)?;
    let gates = gates_from_library(&library);
    let objective = match args.objective {
        ObjectiveArg::Cells => Objective::Cells,
        ObjectiveArg::Area => Objective::Area,
        ObjectiveArg::Depth => Objective::Depth,
    };
    let opts = ExactOptions {
        objective,
        free_complements: args.free_complements,
        conflict_limit: args.conflict_limit,
        time_limit,
        max_steps: args.max_steps,
    };
    let start = Instant::now();
    // A five-input search can run for minutes: a spinner on a terminal.
    let progress = super::progress::spinner(&format!(
        "exact: {} over {} on {}",
        args.truth,
        super::common::counted(args.inputs as u64, "input"),
        library.name
    ));
    let searched = synthesize(&functions, args.inputs, &gates, &opts);
    if let Some(p) = progress {
        p.finish_and_clear();
    }
    let result = match searched {
        Ok(r) => r,
        Err(ExactError::NotFound(n)) => {
            eprintln!(
                "error: no network of at most {} of '{}' realises the function",
                super::common::counted(n as u64, "cell"),
                library.name
            );
            return Ok(EXIT_NEGATIVE);
        }
        Err(ExactError::LimitReached) => {
            eprintln!(
                "undecided: a resource limit stopped the search before any network was found"
            );
            if args.format == ReportFormat::Json {
                // A JSON reader still gets one object: the question, no network.
                let value = serde_json::json!({
                    "function": functions.iter().map(|f| format!("0x{f:X}")).collect::<Vec<_>>(),
                    "inputs": args.inputs,
                    "library": library.name,
                    "objective": objective_name(args.objective),
                    "free_complements": args.free_complements,
                    "found": false,
                    "optimal": false,
                });
                outln!(
                    "{}",
                    serde_json::to_string_pretty(&value)
                        .map_err(|e| CliError::Internal(e.to_string()))?
                );
            }
            return Ok(EXIT_UNDECIDED);
        }
        Err(ExactError::Internal(m)) => return Err(CliError::Internal(m)),
        Err(e) => return Err(CliError::Input(e.to_string())),
    };
    let seconds = start.elapsed().as_secs_f64();
    let tables: Vec<String> = functions.iter().map(|f| format!("0x{f:X}")).collect();
    let objective_name = objective_name(args.objective);
    match args.format {
        ReportFormat::Json => {
            let value = serde_json::json!({
                "function": tables,
                "inputs": args.inputs,
                "library": library.name,
                "objective": objective_name,
                "free_complements": args.free_complements,
                "found": true,
                "cells": result.cells,
                "area": result.area,
                "depth": result.depth,
                "optimal": result.optimal,
                "netlist": result.netlist(),
                "steps": result.steps.iter().map(|s| serde_json::json!({
                    "cell": s.cell,
                    "fanins": s.fanins.iter().map(operand_json).collect::<Vec<_>>(),
                })).collect::<Vec<_>>(),
                "outputs": result.outputs.iter().map(operand_json).collect::<Vec<_>>(),
                "sat_calls": result.sat_calls,
                "seconds": seconds,
            });
            outln!(
                "{}",
                serde_json::to_string_pretty(&value)
                    .map_err(|e| CliError::Internal(e.to_string()))?
            );
        }
        _ => {
            outln!(
                "function   {} over {}",
                tables.join(","),
                super::common::counted(args.inputs as u64, "input")
            );
            outln!("library    {}", library.name);
            outln!("objective  {objective_name}");
            outln!(
                "cells      {}{}",
                result.cells,
                if result.optimal {
                    "  (proven minimal)"
                } else {
                    "  (not proven minimal: a limit stopped the proof)"
                }
            );
            outln!("area       {} {}", result.area, library.units.area);
            outln!("depth      {}", result.depth);
            outln!(
                "time       {seconds:.3} s, {}",
                super::common::counted(result.sat_calls as u64, "SAT call")
            );
            outln!("netlist");
            for line in result.netlist() {
                outln!("  {line}");
            }
        }
    }
    Ok(if result.optimal {
        EXIT_OK
    } else {
        EXIT_UNDECIDED
    })
}
