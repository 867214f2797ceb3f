//! `ribbonmap map` (not built yet).

use super::{CliError, CmdResult};

/// Arguments of `ribbonmap map`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// Arguments (placeholder until the command is built).
    rest: Vec<String>,
}

/// Runs the command.
pub fn run(args: Args) -> CmdResult {
    let _ = args.rest;
    Err(CliError::Input("'map' is not built yet".into()))
}
