//! `ribbonmap exact` (not built yet).

use super::{CliError, CmdResult};

/// Arguments of `ribbonmap exact`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// Arguments (placeholder until the command is built).
    rest: Vec<String>,
}

/// Runs the command.
pub fn run(args: Args) -> CmdResult {
    let _ = args.rest;
    Err(CliError::Input("'exact' is not built yet".into()))
}
