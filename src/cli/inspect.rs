//! `ribbonmap inspect`: reads a netlist and prints a summary (ports,
//! storage, node counts by kind, depth, largest output support, largest
//! fanout) as text or JSON. The numbers come from [`crate::io::summarize`].

use super::common::ReportFormat;
use super::netlist_args::{library_for, NetlistArgs};
use super::{CliError, CmdResult, EXIT_OK};
use crate::io::{summarize, Summary};
use std::path::PathBuf;

/// Arguments of `ribbonmap inspect`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// The netlist to read: a .blif, .v, .bench, .aag or .aig file, or '-' for standard
    /// input (then give --input-format).
    #[arg(value_name = "NETLIST")]
    pub netlist: PathBuf,
    /// Report format: 'text' (aligned lines) or 'json' (fields inputs,
    /// outputs, storage, nodes {and, xor, maj}, depth and more).
    #[arg(long, value_enum, default_value = "text", value_name = "FORMAT")]
    pub format: ReportFormat,
    /// Cell library (built-in name or JSON file) whose cells the netlist
    /// instantiates, for reading mapped netlists. Not needed otherwise, nor
    /// for netlists whose header records their library.
    #[arg(long, value_name = "LIB")]
    pub lib: Option<String>,
    #[command(flatten)]
    pub read: NetlistArgs,
}

/// Runs the command.
pub fn run(args: Args) -> CmdResult {
    let library = library_for(args.lib.as_deref(), &[&args.netlist])?;
    let net = args.read.read(&args.netlist, library.as_ref())?;
    let summary = summarize(&net);
    match args.format {
        ReportFormat::Json => {
            let text = serde_json::to_string_pretty(&summary)
                .map_err(|e| CliError::Internal(format!("cannot encode the summary: {e}")))?;
            outln!("{text}");
        }
        _ => out!(
            "{}",
            text_report(&summary, &args.netlist.display().to_string())
        ),
    }
    Ok(EXIT_OK)
}

/// The text report.
pub fn text_report(s: &Summary, file: &str) -> String {
    let mut lines = vec![
        format!("design                  {} ({file})", s.design),
        format!("inputs                  {}", s.inputs),
        format!("outputs                 {}", s.outputs),
        format!("storage elements        {}", s.storage),
        format!(
            "logic nodes             {} (and {}, xor {}, maj {})",
            s.gates, s.nodes.and, s.nodes.xor, s.nodes.maj
        ),
        format!("depth                   {}", s.depth),
    ];
    if let Some(e) = &s.largest_output_support {
        let inputs = if e.inputs == 1 { "input" } else { "inputs" };
        lines.push(if s.storage > 0 {
            format!(
                "largest output support  {} {inputs} ({}; storage next states count as outputs, storage outputs as inputs)",
                e.inputs, e.output
            )
        } else {
            format!("largest output support  {} {inputs} ({})", e.inputs, e.output)
        });
    }
    if let Some(e) = &s.largest_fanout {
        lines.push(format!("largest fanout          {} ({})", e.fanout, e.node));
    }
    let mut out = lines.join("\n");
    out.push('\n');
    out
}
