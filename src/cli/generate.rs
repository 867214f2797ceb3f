//! `ribbonmap generate`: writes a parameterised benchmark circuit.
//!
//! The command parses the family, width, style and carry-in, calls
//! [`crate::generate::write_circuit`], and writes the text to the `-o` file
//! (atomically; the format follows the extension) or to standard output
//! (BLIF unless `--output-format` says otherwise). `--list` prints every
//! family with its styles and width range.

use super::{CliError, CmdResult, EXIT_OK};
use crate::generate::{check_params, write_circuit, Family, Params};
use crate::io::NetlistFormat;
use std::io::Write;
use std::path::PathBuf;

/// Arguments of `ribbonmap generate`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// Circuit family: adder, multiplier, parity, majority, popcount,
    /// comparator, mux, decoder, barrel-shifter (or shifter), hamming, alu.
    family: Option<String>,
    /// Width: bits per operand (mux: select bits; decoder: input bits;
    /// hamming: data bits; parity, majority, popcount: inputs).
    #[arg(long, short = 'w', value_name = "N")]
    width: Option<u32>,
    /// Architecture (see --list); each family has a default.
    #[arg(long, short = 's', value_name = "STYLE")]
    style: Option<String>,
    /// Adders: add a carry input `cin`, declared last.
    #[arg(long)]
    carry_in: bool,
    /// Output file (.blif, .v, or AIGER .aag / .aig); standard output when
    /// absent.
    #[arg(long, short = 'o', value_name = "OUT.v|OUT.blif|OUT.aig")]
    output: Option<PathBuf>,
    /// Output format; overrides the -o extension (default BLIF on standard
    /// output).
    #[arg(long, value_enum, value_name = "FORMAT")]
    output_format: Option<WriterFormat>,
    /// List the families with their styles and widths, and exit.
    #[arg(long)]
    list: bool,
}

/// The netlist formats generated circuits are written in (only those with a
/// writer, so `--help` lists exactly what works).
#[derive(clap::ValueEnum, Clone, Copy, Debug, PartialEq, Eq)]
pub enum WriterFormat {
    /// Berkeley Logic Interchange Format.
    Blif,
    /// Structural Verilog.
    Verilog,
    /// AIGER, ASCII encoding.
    Aag,
    /// AIGER, binary encoding.
    Aig,
}

impl From<WriterFormat> for NetlistFormat {
    fn from(f: WriterFormat) -> NetlistFormat {
        match f {
            WriterFormat::Blif => NetlistFormat::Blif,
            WriterFormat::Verilog => NetlistFormat::Verilog,
            WriterFormat::Aag => NetlistFormat::Aag,
            WriterFormat::Aig => NetlistFormat::Aig,
        }
    }
}

/// The family table printed by `--list`.
pub fn family_table() -> String {
    let mut out = String::new();
    for f in Family::ALL {
        let (lo, hi) = f.width_range();
        out.push_str(&format!(
            "{:<15} widths {lo}..{hi:<6} styles: {}\n",
            f.name(),
            f.styles().join(", ")
        ));
    }
    out
}

/// Runs the command.
pub fn run(args: Args) -> CmdResult {
    if args.list {
        out!("{}", family_table());
        return Ok(EXIT_OK);
    }
    let family: Family = match &args.family {
        Some(name) => name.parse().map_err(|e| CliError::Input(format!("{e}")))?,
        None => {
            return Err(CliError::Input(
                "generate needs a circuit family (e.g. 'ribbonmap generate adder --width 8'; --list shows them)".into(),
            ))
        }
    };
    let width = args
        .width
        .ok_or_else(|| CliError::Input(format!("generate {family} needs --width N")))?;
    let params = Params {
        width,
        style: args.style.clone(),
        carry_in: args.carry_in,
    };
    check_params(family, &params).map_err(|e| CliError::Input(e.to_string()))?;
    let format = match (args.output_format, &args.output) {
        (Some(f), _) => f.into(),
        (None, None) => NetlistFormat::Blif,
        (None, Some(path)) => match NetlistFormat::from_path(path) {
            Some(NetlistFormat::Bench) => {
                return Err(CliError::Input(format!(
                    "{}: BENCH files are read, not written (expected .blif, .v, .aag or .aig, or --output-format)",
                    path.display()
                )))
            }
            Some(format) => format,
            None => {
                return Err(CliError::Input(format!(
                    "{}: cannot tell the output format from the file name (expected .blif, .v, .aag or .aig, or --output-format)",
                    path.display()
                )))
            }
        },
    };
    // The largest circuits (a mux of 20 select bits, a 512-bit multiplier)
    // take seconds: a spinner on a terminal.
    let progress = super::progress::spinner(&format!("generate: {family} width {width}"));
    let text = if format.is_aiger() {
        // AIGER keeps the description in its comment section.
        let err = |e: crate::generate::GenerateError| CliError::Input(e.to_string());
        let net = crate::generate::generate(family, &params).map_err(err)?;
        let comment = format!(
            "{}\n{}\n",
            crate::generate::describe(family, &params).map_err(err)?,
            crate::generate::command_line(family, &params).map_err(err)?
        );
        crate::io::write_aiger(&net, format == NetlistFormat::Aig, Some(&comment))
    } else {
        write_circuit(family, &params, format)
            .map_err(|e| CliError::Input(e.to_string()))?
            .into_bytes()
    };
    if let Some(p) = progress {
        p.finish_and_clear();
    }
    match &args.output {
        Some(path) => crate::fsutil::write_atomic(path, &text)
            .map_err(|e| CliError::Input(format!("{}: cannot write: {e}", path.display())))?,
        None => {
            let mut stdout = std::io::stdout().lock();
            // A closed pipe (e.g. `| head`) is not an error worth reporting.
            let _ = stdout.write_all(&text).and_then(|_| stdout.flush());
        }
    }
    Ok(EXIT_OK)
}
