//! `ribbonmap map`: read a netlist, map it onto a library, verify the result
//! against the original, write it, and report cells, area, depth and delay.
//!
//! A mapped netlist that fails its own verification is a bug: the command
//! says so and exits 70.

use super::common::{load_library, ReportFormat};
use super::{CliError, CmdResult, EXIT_NEGATIVE, EXIT_OK};
use crate::cli::netlist_args::NetlistArgs;
use crate::mapper::{map_detailed, Goal, MapOptions};
use crate::netlist::{analyze_timing, verify, Report, VerifyMode};
use std::path::{Path, PathBuf};
use std::time::Instant;

/// Mapping goal on the command line.
#[derive(clap::ValueEnum, Clone, Copy, Debug, PartialEq, Eq)]
pub enum GoalArg {
    /// Least area (then least delay) of the runs tried.
    Area,
    /// Least delay (then least area) of the runs tried.
    Delay,
    /// Least area × delay of the runs tried (area recovery within 0, 10, 25
    /// and 50 % over the least delay, and the least-area run; the fastest
    /// and the least-area run also with fanout trees on their critical
    /// nets), keeping the smallest run within 0.5 % of the least
    /// area × delay.
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
    /// The netlist to map (.blif, .v, .bench, .aag, .aig; `-` with
    /// --input-format).
    pub netlist: PathBuf,
    /// Cell library: a built-in name or a library file.
    #[arg(long, value_name = "LIB", default_value = "ribbon3")]
    pub lib: String,
    /// What to optimise.
    #[arg(long, value_enum, default_value = "balanced")]
    pub goal: GoalArg,
    /// Write the mapped netlist here (.v or .blif; .aag or .aig writes its
    /// logic as an AIGER And-Inverter Graph), or a SPICE deck of it (.cir,
    /// characterised libraries only; all inputs 0, tables beside it).
    #[arg(
        short = 'o',
        long = "output",
        value_name = "OUT.v|OUT.blif|OUT.aig|OUT.cir"
    )]
    pub output: Option<PathBuf>,
    /// How to check the result against the input.
    #[arg(long, value_enum, default_value = "full")]
    pub verify: VerifyArg,
    /// Largest cut (2 to 6).
    #[arg(long, value_name = "N", default_value_t = 4,
          value_parser = clap::builder::RangedU64ValueParser::<usize>::new().range(2..=6))]
    pub cut_size: usize,
    /// Priority cuts kept per node (1 to 64).
    #[arg(long, value_name = "N", default_value_t = 8,
          value_parser = clap::builder::RangedU64ValueParser::<usize>::new().range(1..=64))]
    pub cuts_per_node: usize,
    /// Also match provably smallest networks (exact synthesis over the
    /// library) for cut functions of up to four inputs. Each new function
    /// costs a SAT search the first time; results are cached on disk
    /// (RIBBONMAP_CACHE_DIR, else the user cache folder).
    #[arg(long = "exact-cuts")]
    pub exact_cuts: bool,
    /// Old name of --exact-cuts (hidden alias, kept one release).
    #[arg(long = "optimum", hide = true)]
    pub old_optimum: bool,
    /// Optimise the logic before mapping: SAT sweeping merges nodes that
    /// are equal up to complement and DAG-aware cut rewriting shrinks small
    /// cones; of the networks this produces, the one that maps to the
    /// least area is mapped (the report's `restructure` phase gives the time).
    #[arg(long)]
    pub restructure: bool,
    /// Old name of --restructure (hidden alias, kept one release).
    #[arg(long = "optimize", hide = true)]
    pub old_optimize: bool,
    /// Also check the static logic levels (characterised libraries only;
    /// as `ribbonmap levels` with its defaults): the report gains the worst
    /// margin, the logic failures and the static power from the voltages.
    #[arg(long)]
    pub levels: bool,
    /// Require every net to keep this noise margin, millivolts
    /// (characterised libraries only): cells whose own margins are lower
    /// are left out, restoring stages are added where levels degrade, and
    /// the command exits 1 naming the nets that still fail.
    #[arg(long, value_name = "MV")]
    pub min_margin: Option<f64>,
    /// Report format.
    #[arg(long, value_enum, default_value = "text")]
    pub format: ReportFormat,
    /// How to read the netlist.
    #[command(flatten)]
    pub reading: NetlistArgs,
}

/// Runs the command.
pub fn run(args: Args) -> CmdResult {
    if args.old_optimum {
        eprintln!("note: --optimum is now called --exact-cuts; the old name will be removed in the next release");
    }
    if args.old_optimize {
        eprintln!("note: --optimize is now called --restructure; the old name will be removed in the next release");
    }
    let lib = load_library(&args.lib)?;
    let out_kind = match &args.output {
        None => None,
        Some(p) => match p.extension().and_then(|e| e.to_str()) {
            Some(e @ ("v" | "blif" | "aag" | "aig")) => Some(e.to_string()),
            // A SPICE deck (characterised libraries only), written below.
            Some("cir") => None,
            _ => {
                return Err(CliError::Input(format!(
                    "{}: cannot tell the output format (expected a .v, .blif, .aag, .aig or .cir file name)",
                    p.display()
                )))
            }
        },
    };
    if let Some(path) = &args.output {
        crate::fsutil::check_writable(path).map_err(CliError::Input)?;
    }
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
        optimum: args.exact_cuts || args.old_optimum,
        optimize: args.restructure || args.old_optimize,
        ..MapOptions::default()
    };
    // Exact cuts, restructuring and margin-aware mapping (rounds of level
    // analysis) can take minutes.
    let progress = if opts.optimum || opts.optimize || args.min_margin.is_some() {
        super::progress::spinner(&format!("map: {} on {}", args.netlist.display(), lib.name))
    } else {
        None
    };
    let (outcome, margin) = match args.min_margin {
        None => {
            let outcome = map_detailed(&net, &lib, &opts);
            if let Some(p) = progress {
                p.finish_and_clear();
            }
            let outcome = outcome.map_err(|e| match e {
                crate::mapper::MapError::InvalidOptions(m) => CliError::Input(m),
                crate::mapper::MapError::Unmappable(m) => CliError::Input(m),
            })?;
            (outcome, None)
        }
        Some(mv) => {
            let m = super::margin::map_with_margin(&net, &lib, &args.lib, &opts, mv);
            if let Some(p) = progress {
                p.finish_and_clear();
            }
            let m = m?;
            (m.outcome.clone(), Some(m))
        }
    };
    let mut seconds = indexmap::IndexMap::new();
    seconds.insert("read".to_string(), read_seconds);
    for (k, v) in &outcome.seconds {
        seconds.insert(k.clone(), *v);
    }
    let mut netlist = outcome.netlist;
    // Testability hook for the exit code of an internal error (used by
    // tests/cli_behaviour.rs): swap the first instance's cell for another
    // cell of the same arity with a different function, so verification
    // must fail.
    if std::env::var_os("RIBBONMAP_TEST_BREAK_MAPPING").is_some() {
        if let Some(first) = netlist.instances.first_mut() {
            let cell = &lib.cells[first.cell as usize];
            if let Some(other) = lib
                .cells
                .iter()
                .position(|c| c.arity() == cell.arity() && c.truth != cell.truth)
            {
                first.cell = other as u32;
            }
        }
    }
    // The runs the goal chose from (mapper::runs), for the report.
    let run_points: Vec<serde_json::Value> = outcome
        .runs
        .iter()
        .map(|r| {
            serde_json::json!({"name": r.name, "area": r.area, "delay": r.delay, "buffers": r.buffers})
        })
        .collect();
    let run_line = format!(
        "run       {} (best of {})\nbuffers   {} (fanout trees)\n",
        outcome.run,
        outcome.runs.len(),
        outcome.buffers
    );

    let t = Instant::now();
    let mode = match args.verify {
        VerifyArg::Full => VerifyMode::Full,
        VerifyArg::Sim => VerifyMode::Sim,
        VerifyArg::None => VerifyMode::None,
    };
    let verified = match mode {
        VerifyMode::None => Ok(crate::netlist::Verified::Skipped),
        // The mapper's witness proves its own output in linear time; the
        // general checker steps in only where the witness does not decide.
        VerifyMode::Full => crate::proof::prove(&net, &netlist, &lib, &outcome.witness)
            .map(|(verified, _)| verified),
        VerifyMode::Sim => verify(&net, &netlist.to_network(&lib), mode),
    }
    .map_err(|e| CliError::Internal(format!("the mapped netlist fails verification: {e}")))?;
    seconds.insert("verify".to_string(), t.elapsed().as_secs_f64());

    let t = Instant::now();
    if let (Some(path), Some(ext)) = (&args.output, &out_kind) {
        let bytes = match ext.as_str() {
            "blif" => with_library_file(netlist.write_blif(&lib), "#", &args.lib, path),
            "v" => with_library_file(netlist.write_verilog(&lib), "//", &args.lib, path),
            // AIGER holds only AND gates: the mapped cells' logic, with
            // the library named in the comment section.
            aiger => crate::io::write_aiger(
                &netlist.to_network(&lib),
                aiger == "aig",
                Some(&format!("mapped onto library {}\n", netlist.library)),
            ),
        };
        crate::fsutil::write_atomic(path, &bytes)
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
    let levels = if let Some(m) = &margin {
        Some(m.levels.clone())
    } else if args.levels {
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
        ReportFormat::Json => {
            let mut value = serde_json::to_value(&report)
                .map_err(|e| CliError::Internal(format!("cannot encode the report: {e}")))?;
            if let serde_json::Value::Object(m) = &mut value {
                m.insert("energy_per_op".into(), energy.energy_per_op.into());
                m.insert("static_power".into(), energy.static_power.into());
                m.insert("run".into(), outcome.run.clone().into());
                m.insert("runs".into(), run_points.into());
                m.insert("buffers".into(), outcome.buffers.into());
                if let Some(levels) = &levels {
                    let v = serde_json::to_value(levels).map_err(|e| {
                        CliError::Internal(format!("cannot encode the report: {e}"))
                    })?;
                    m.insert("levels".into(), v);
                }
                if let Some(margin) = &margin {
                    m.insert("margin".into(), super::margin::json(margin, &lib));
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
                "energy    {:.4} {} per operation\nstatic    {:.4} {}\n{run_line}",
                energy.energy_per_op, lib.units.energy, energy.static_power, lib.units.power
            );
            if let Some(levels) = &levels {
                energy_lines += &super::levels::summary_line(levels);
            }
            if let Some(margin) = &margin {
                energy_lines += &super::margin::text(margin, &lib);
            }
            let text = report.to_text();
            match text.find("verified  ") {
                Some(at) => out!("{}{energy_lines}{}", &text[..at], &text[at..]),
                None => out!("{text}{energy_lines}"),
            }
        }
    }
    match &margin {
        Some(m) if !m.holds => {
            eprintln!(
                "ribbonmap: {} less than {} mV: {}",
                match m.failing_nets.len() {
                    1 => "1 net keeps".to_string(),
                    n => format!("{n} nets keep"),
                },
                m.min_margin_v * 1e3,
                super::margin::list(&m.failing_nets)
            );
            Ok(EXIT_NEGATIVE)
        }
        _ => Ok(EXIT_OK),
    }
}

/// `text` (a mapped netlist whose first line records the library's name)
/// with a second header line recording the library's file when `lib_spec`
/// is a file rather than a built-in name, so `inspect` and `equiv` can read
/// the netlist back without `--lib` (docs/netlist-formats.md). The file is
/// written relative to the netlist's folder when it lies below it, else as
/// an absolute path.
fn with_library_file(text: String, marker: &str, lib_spec: &str, output: &Path) -> Vec<u8> {
    if crate::library::Library::builtin_names().contains(&lib_spec) {
        return text.into_bytes();
    }
    let lib_path = Path::new(lib_spec);
    let absolute = std::fs::canonicalize(lib_path).unwrap_or_else(|_| lib_path.to_path_buf());
    let folder = output
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    let shown = std::fs::canonicalize(folder)
        .ok()
        .and_then(|f| absolute.strip_prefix(f).ok().map(Path::to_path_buf))
        .unwrap_or(absolute);
    let line = crate::io::library_file_line(marker, &shown.to_string_lossy());
    let at = text.find('\n').map_or(text.len(), |i| i + 1);
    let mut out = String::with_capacity(text.len() + line.len());
    out.push_str(&text[..at]);
    out.push_str(&line);
    out.push_str(&text[at..]);
    out.into_bytes()
}
