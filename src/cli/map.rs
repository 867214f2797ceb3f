//! `ribbonmap map`: read a netlist, map it onto a library, verify the result
//! against the original, write it, and report cells, area, depth and delay.
//!
//! A mapped netlist that fails its own verification is a bug: the command
//! says so and exits 70.

use super::common::{load_library, Format};
use super::{CliError, CmdResult, EXIT_OK};
use crate::cli::netlist_args::NetlistArgs;
use crate::mapper::{map_detailed, Goal, MapOptions};
use crate::netlist::{analyze_timing, verify, Report, VerifyMode};
use std::path::PathBuf;
use std::time::Instant;

/// Mapping goal on the command line.
#[derive(clap::ValueEnum, Clone, Copy, Debug, PartialEq, Eq)]
pub enum GoalArg {
    /// Least area.
    Area,
    /// Least delay.
    Delay,
    /// Least area within 10 % of the least delay.
    Balanced,
}

/// Verification mode on the command line.
#[derive(clap::ValueEnum, Clone, Copy, Debug, PartialEq, Eq)]
pub enum VerifyArg {
    /// Prove equivalence.
    Full,
    /// Random simulation (10,048 patterns).
    Sim,
    /// No check.
    None,
}

/// Arguments of `ribbonmap map`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// The netlist to map (.blif, .v, .bench; `-` with --input-format).
    pub netlist: PathBuf,
    /// Cell library: a built-in name or a library file.
    #[arg(long, value_name = "NAME|FILE", default_value = "ribbon3")]
    pub lib: String,
    /// What to optimise.
    #[arg(long, value_enum, default_value = "balanced")]
    pub goal: GoalArg,
    /// Write the mapped netlist here (.v or .blif), or a SPICE deck of it
    /// (.cir, characterised libraries only; all inputs 0, tables beside it).
    #[arg(short = 'o', long = "output", value_name = "OUT.v|OUT.blif|OUT.cir")]
    pub output: Option<PathBuf>,
    /// How to check the result against the input.
    #[arg(long, value_enum, default_value = "full")]
    pub verify: VerifyArg,
    /// Largest cut (2 to 6).
    #[arg(long, value_name = "K", default_value_t = 4)]
    pub cut_size: usize,
    /// Priority cuts kept per node.
    #[arg(long, value_name = "C", default_value_t = 8)]
    pub cuts_per_node: usize,
    /// Also match provably smallest networks (exact synthesis over the
    /// library) for cut functions of up to four inputs. Each new function
    /// costs a SAT search the first time; results are cached on disk
    /// (RIBBONMAP_CACHE_DIR, else the user cache folder).
    #[arg(long)]
    pub optimum: bool,
    /// Optimise the logic before mapping: SAT sweeping merges nodes that
    /// are equal up to complement and DAG-aware cut rewriting shrinks small
    /// cones; of the networks this produces, the one that maps to the
    /// least area is mapped (the report's `optimize` phase gives the time).
    #[arg(long)]
    pub optimize: bool,
    /// Also check the static logic levels (characterised libraries only;
    /// as `ribbonmap levels` with its defaults): the report gains the worst
    /// margin, the logic failures and the static power from the voltages.
    #[arg(long)]
    pub levels: bool,
    /// Report format.
    #[arg(long, value_enum, default_value = "text")]
    pub format: Format,
    /// How to read the netlist.
    #[command(flatten)]
    pub reading: NetlistArgs,
}

/// Runs the command.
pub fn run(args: Args) -> CmdResult {
    let lib = load_library(&args.lib)?;
    let out_kind = match &args.output {
        None => None,
        Some(p) => match p.extension().and_then(|e| e.to_str()) {
            Some("v") => Some(false),
            Some("blif") => Some(true),
            // A SPICE deck (characterised libraries only), written below.
            Some("cir") => None,
            _ => {
                return Err(CliError::Input(format!(
                    "{}: cannot tell the output format (expected a .v, .blif or .cir file name)",
                    p.display()
                )))
            }
        },
    };
    let t = Instant::now();
    let net = args.reading.read(&args.netlist, Some(&lib))?;
    let read_seconds = t.elapsed().as_secs_f64();
    let goal = match args.goal {
        GoalArg::Area => Goal::Area,
        GoalArg::Delay => Goal::Delay,
        GoalArg::Balanced => Goal::Balanced,
    };
    let opts = MapOptions {
        goal,
        cut_size: args.cut_size,
        cuts_per_node: args.cuts_per_node,
        optimum: args.optimum,
        optimize: args.optimize,
        ..MapOptions::default()
    };
    let outcome = map_detailed(&net, &lib, &opts).map_err(|e| match e {
        crate::mapper::MapError::InvalidOptions(m) => CliError::Input(m),
        crate::mapper::MapError::Unmappable(m) => CliError::Input(m),
    })?;
    let mut seconds = indexmap::IndexMap::new();
    seconds.insert("read".to_string(), read_seconds);
    for (k, v) in &outcome.seconds {
        seconds.insert(k.clone(), *v);
    }
    let netlist = outcome.netlist;

    let t = Instant::now();
    let mode = match args.verify {
        VerifyArg::Full => VerifyMode::Full,
        VerifyArg::Sim => VerifyMode::Sim,
        VerifyArg::None => VerifyMode::None,
    };
    let verified = if mode == VerifyMode::None {
        crate::netlist::Verified::Skipped
    } else {
        verify(&net, &netlist.to_network(&lib), mode).map_err(|e| {
            CliError::Internal(format!("the mapped netlist fails verification: {e}"))
        })?
    };
    seconds.insert("verify".to_string(), t.elapsed().as_secs_f64());

    let t = Instant::now();
    if let (Some(path), Some(blif)) = (&args.output, out_kind) {
        let text = if blif {
            netlist.write_blif(&lib)
        } else {
            netlist.write_verilog(&lib)
        };
        crate::fsutil::write_atomic(path, text.as_bytes())
            .map_err(|e| CliError::Input(format!("{}: cannot write: {e}", path.display())))?;
    }
    if let Some(path) = args.output.as_ref().filter(|_| out_kind.is_none()) {
        let inputs = vec![false; netlist.inputs.len()];
        super::spice::write_deck_file(
            &netlist,
            &lib,
            &args.lib,
            &crate::device::spice::Stimulus::Pattern(inputs),
            path,
        )?;
    }
    seconds.insert("write".to_string(), t.elapsed().as_secs_f64());

    let timing = analyze_timing(&netlist, &lib);
    // Switching-activity energy and static power (study::mapped_energy).
    let t = Instant::now();
    let energy =
        crate::study::mapped_energy(&netlist, &lib, &crate::study::power::Stimulus::default())
            .map_err(|e| CliError::Internal(format!("cannot estimate energy: {e}")))?;
    seconds.insert("energy".to_string(), t.elapsed().as_secs_f64());
    let levels = if args.levels {
        let t = Instant::now();
        let report = super::levels::analyze_mapped(
            &netlist,
            &lib,
            &args.lib,
            &crate::device::levels::LevelOptions::default(),
        )?;
        seconds.insert("levels".to_string(), t.elapsed().as_secs_f64());
        Some(report)
    } else {
        None
    };
    let report = Report::new(&netlist, &lib, goal.name(), &timing, verified, seconds);
    match args.format {
        Format::Json => {
            let mut value = serde_json::to_value(&report)
                .map_err(|e| CliError::Internal(format!("cannot encode the report: {e}")))?;
            if let serde_json::Value::Object(m) = &mut value {
                m.insert("energy_per_op".into(), energy.energy_per_op.into());
                m.insert("static_power".into(), energy.static_power.into());
                if let Some(levels) = &levels {
                    let v = serde_json::to_value(levels).map_err(|e| {
                        CliError::Internal(format!("cannot encode the report: {e}"))
                    })?;
                    m.insert("levels".into(), v);
                }
                if let Some(serde_json::Value::Object(units)) = m.get_mut("units") {
                    units.insert("energy".into(), lib.units.energy.clone().into());
                    units.insert("power".into(), lib.units.power.clone().into());
                }
            }
            let text = serde_json::to_string_pretty(&value)
                .map_err(|e| CliError::Internal(format!("cannot encode the report: {e}")))?;
            outln!("{text}");
        }
        _ => {
            let mut energy_lines = format!(
                "energy    {:.4} {} per operation\nstatic    {:.4} {}\n",
                energy.energy_per_op, lib.units.energy, energy.static_power, lib.units.power
            );
            if let Some(levels) = &levels {
                energy_lines += &super::levels::summary_line(levels);
            }
            let text = report.to_text();
            match text.find("verified  ") {
                Some(at) => out!("{}{energy_lines}{}", &text[..at], &text[at..]),
                None => out!("{text}{energy_lines}"),
            }
        }
    }
    Ok(EXIT_OK)
}
