//! `ribbonmap spice`: write a SPICE deck (ngspice XSPICE table models, tables
//! beside the deck) with a DC pattern or a step stimulus, of a netlist of the
//! characterised library's cells as it stands, or (`--map`) of any netlist
//! after mapping it onto the library.

use super::common::load_library;
use super::{CliError, CmdResult, EXIT_OK};
use crate::cli::netlist_args::NetlistArgs;
use crate::device::spice::{write_deck, DeckModels, Stimulus};
use crate::library::electrical::ElectricalData;
use crate::library::Library;
use crate::mapper::{map, MapOptions};
use crate::netlist::MappedNetlist;
use std::path::{Path, PathBuf};

/// Arguments of `ribbonmap spice`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// The netlist: structural Verilog of the library's cells (as `map -o
    /// x.v` writes), or with `--map` any netlist (.blif, .v, .bench, ...).
    pub netlist: PathBuf,
    /// Map the netlist onto the library first (otherwise its instances
    /// must already be the library's cells).
    #[arg(long)]
    pub map: bool,
    /// A characterised library file (written by `ribbonmap characterize`).
    #[arg(long, value_name = "LIB")]
    pub lib: String,
    /// Write the deck here; the table files go beside it.
    #[arg(short = 'o', long = "output", value_name = "DECK.cir")]
    pub output: PathBuf,
    /// Input values for a DC operating point, one 0/1 per primary input in
    /// netlist order (default: all 0).
    #[arg(long, value_name = "BITS", conflicts_with = "stimulus")]
    pub pattern: Option<String>,
    /// A step for a transient: FROM:TO, two patterns of input bits; the
    /// inputs switch at 10 ps with 0.1 ps ramps.
    #[arg(long, value_name = "FROM:TO")]
    pub stimulus: Option<String>,
    /// End of the transient in picoseconds (after the step's end at
    /// 10.1 ps, at most 1,000,000).
    #[arg(long, value_name = "PS", default_value_t = 200.0)]
    pub stop_ps: f64,
    /// How to read the netlist.
    #[command(flatten)]
    pub reading: NetlistArgs,
}

/// When the inputs of a `--stimulus` step switch, picoseconds.
const STEP_PS: f64 = 10.0;
/// How long the step's ramps take, picoseconds.
const RAMP_PS: f64 = 0.1;
/// The latest `--stop-ps` (a microsecond): transients of logic cells settle
/// in picoseconds, and much longer ones only fill the simulator's output.
const MAX_STOP_PS: f64 = 1e6;

/// Parses a string of 0/1 characters.
pub fn parse_bits(text: &str, what: &str) -> Result<Vec<bool>, CliError> {
    text.chars()
        .map(|c| match c {
            '0' => Ok(false),
            '1' => Ok(true),
            _ => Err(CliError::Input(format!(
                "{what} '{text}': expected only 0 and 1, found '{c}'"
            ))),
        })
        .collect()
}

/// Loads the tables and electrical data of the characterised library `lib`
/// (loaded from `lib_spec`, a file or a built-in name); shared with
/// `ribbonmap levels`.
pub fn load_library_models(
    lib: &Library,
    lib_spec: &str,
) -> Result<(DeckModels, ElectricalData), CliError> {
    crate::device::spice::load_spec_models(lib, lib_spec).map_err(CliError::Input)
}

/// Writes the deck of `netlist` on `lib` (loaded from `lib_spec`) to
/// `output`; shared with `map -o OUT.cir`.
pub fn write_deck_file(
    netlist: &MappedNetlist,
    lib: &Library,
    lib_spec: &str,
    stimulus: &Stimulus,
    output: &Path,
) -> Result<(), CliError> {
    let (models, _) = load_library_models(lib, lib_spec)?;
    let stem = output
        .file_stem()
        .and_then(|s| s.to_str())
        .unwrap_or("deck")
        .to_string();
    let deck = write_deck(netlist, lib, &models, stimulus, &stem, &[]).map_err(CliError::Input)?;
    deck.save(output)
        .map_err(|e| CliError::Input(format!("{}: cannot write: {e}", output.display())))
}

/// Reads `args.netlist` as a netlist of `lib`'s cells, without mapping.
fn read_mapped(args: &Args, lib: &Library) -> Result<MappedNetlist, CliError> {
    let shown = args.netlist.display().to_string();
    let verilog = match args.reading.input_format {
        Some(f) => f == crate::io::NetlistFormat::Verilog,
        None => args.netlist.extension().is_some_and(|e| e == "v"),
    };
    if !verilog {
        return Err(CliError::Input(format!(
            "{shown}: a netlist of library cells is read from structural Verilog (.v, as `map -o x.v` writes); give --map to map this netlist first"
        )));
    }
    let bytes = std::fs::read(&args.netlist)
        .map_err(|e| CliError::Input(format!("{shown}: cannot read: {e}")))?;
    let text = crate::diag::utf8_text(&shown, bytes)?;
    crate::netlist::read_mapped_verilog(&text, &shown, lib, args.reading.top.as_deref())
        .map_err(CliError::from)
}

/// Runs the command.
pub fn run(args: Args) -> CmdResult {
    if !(args.stop_ps > STEP_PS + RAMP_PS && args.stop_ps <= MAX_STOP_PS) {
        return Err(CliError::Input(format!(
            "--stop-ps {:?}: expected a time after the step ends ({} ps) and at most {MAX_STOP_PS} ps",
            args.stop_ps,
            STEP_PS + RAMP_PS
        )));
    }
    let lib = load_library(&args.lib)?;
    let netlist = if args.map {
        let net = args.reading.read(&args.netlist, Some(&lib))?;
        map(&net, &lib, &MapOptions::default())
            .map_err(|e| CliError::Input(format!("{}: cannot map: {e}", args.netlist.display())))?
    } else {
        read_mapped(&args, &lib)?
    };
    let width = netlist.inputs.len();
    let stimulus = match (&args.pattern, &args.stimulus) {
        (_, Some(step)) => {
            let Some((from, to)) = step.split_once(':') else {
                return Err(CliError::Input(format!(
                    "--stimulus '{step}': expected FROM:TO, two patterns of input bits"
                )));
            };
            Stimulus::Step {
                from: parse_bits(from, "--stimulus")?,
                to: parse_bits(to, "--stimulus")?,
                step_ps: STEP_PS,
                ramp_ps: RAMP_PS,
                stop_ps: args.stop_ps,
            }
        }
        (Some(bits), None) => Stimulus::Pattern(parse_bits(bits, "--pattern")?),
        (None, None) => Stimulus::Pattern(vec![false; width]),
    };
    write_deck_file(&netlist, &lib, &args.lib, &stimulus, &args.output)?;
    outln!(
        "deck      {} ({}, {}: {}; tables beside it)\nrun       ngspice -b {}",
        args.output.display(),
        super::common::counted(netlist.instances.len() as u64, "cell"),
        super::common::counted(width as u64, "input"),
        netlist
            .inputs
            .iter()
            .map(|p| p.name.as_str())
            .collect::<Vec<_>>()
            .join(" "),
        args.output.display()
    );
    Ok(EXIT_OK)
}
