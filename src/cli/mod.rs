//! The command line: one file per command.
//!
//! Each command file defines its clap `Args` and a `run` function that calls
//! the library, prints, and returns an exit code. Errors of every layer are
//! turned into a [`CliError`] here, which fixes the exit code (docs/exit-codes.md:
//! 2 bad usage or input, 70 internal error) and prints one `error:` line.
//! Commands print through [`out!`]/[`outln!`], which end the process quietly
//! when the reader of standard output has gone (`ribbonmap map x | head`).

/// Writes to standard output like `print!`; a closed pipe ends the process
/// with exit code 0 instead of a panic.
macro_rules! out {
    ($($arg:tt)*) => {
        $crate::cli::write_stdout(format_args!($($arg)*))
    };
}

/// [`out!`] with a newline.
macro_rules! outln {
    () => {
        $crate::cli::write_stdout(format_args!("\n"))
    };
    ($($arg:tt)*) => {{
        $crate::cli::write_stdout(format_args!($($arg)*));
        $crate::cli::write_stdout(format_args!("\n"));
    }};
}

mod characterize;
pub mod common;
mod compare;
mod coverage;
mod equiv;
mod exact;
mod generate;
mod inspect;
mod levels;
mod library;
mod map;
mod margin;
pub mod netlist_args;
mod progress;
mod spice;
mod study;
mod tabulate;

use clap::{Parser, Subcommand};
use std::process::ExitCode;

/// Exit code: success (for `equiv`, proven equivalent).
pub const EXIT_OK: u8 = 0;
/// Exit code: a negative answer (not equivalent; library has errors).
pub const EXIT_NEGATIVE: u8 = 1;
/// Exit code: bad usage or bad input.
pub const EXIT_BAD_INPUT: u8 = 2;
/// Exit code: undecided (a resource limit stopped a proof).
pub const EXIT_UNDECIDED: u8 = 3;
/// Exit code: internal error (a bug; please report it).
pub const EXIT_INTERNAL: u8 = 70;

/// An error that ends a command.
#[derive(Debug, thiserror::Error)]
pub enum CliError {
    /// Bad usage or bad input: exit code 2.
    #[error("{0}")]
    Input(String),
    /// A bug in ribbonmap: exit code 70.
    #[error("internal error: {0} (this is a bug in ribbonmap; please report it with the input that caused it)")]
    Internal(String),
}

impl CliError {
    /// The process exit code for this error.
    pub fn exit_code(&self) -> u8 {
        match self {
            CliError::Input(_) => EXIT_BAD_INPUT,
            CliError::Internal(_) => EXIT_INTERNAL,
        }
    }
}

impl From<crate::diag::SourceError> for CliError {
    fn from(e: crate::diag::SourceError) -> Self {
        CliError::Input(e.to_string())
    }
}

/// Result of a command: the exit code to return.
pub type CmdResult = Result<u8, CliError>;

/// Technology mapping and evaluation for libraries of multi-input
/// conductance gates.
#[derive(Parser, Debug)]
#[command(
    name = "ribbonmap",
    version,
    about,
    long_about = None,
    after_help = "Formats, JSON fields and exit codes: the docs/ folder of the source (docs/README.md)."
)]
pub struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand, Debug)]
enum Command {
    /// Summarise a netlist: ports, storage, node counts, depth.
    Inspect(inspect::Args),
    /// Map a netlist onto a cell library and report its costs.
    Map(map::Args),
    /// Prove two netlists equivalent or find an input that tells them apart.
    Equiv(equiv::Args),
    /// Find a provably smallest network of library cells for a small function.
    Exact(exact::Args),
    /// Tabulate how many cells every small function needs on each library.
    Coverage(coverage::Args),
    /// Map netlists on several libraries and compare the results side by side.
    Compare(compare::Args),
    /// Run every job of a study plan and append the results to a file.
    #[command(after_help = "Plans and result lines: docs/study.md.")]
    Study(study::Args),
    /// Combine study result files and print comparison tables.
    #[command(after_help = "Result lines: docs/study.md; JSON tables: docs/json-output.md.")]
    Tabulate(tabulate::Args),
    /// Old name of `study` (hidden alias, kept one release).
    #[command(hide = true)]
    Sweep(study::Args),
    /// Old name of `tabulate` (hidden alias, kept one release).
    #[command(hide = true)]
    Merge(tabulate::Args),
    /// Write a parameterised benchmark circuit.
    #[command(after_help = "Port order and names: docs/generated-circuits.md.")]
    Generate(generate::Args),
    /// List, show or check cell libraries.
    #[command(after_help = "The library file format: docs/library-format.md.")]
    Library(library::Args),
    /// Derive a cell library from a device kit's conductance tables.
    Characterize(characterize::Args),
    /// Write a SPICE deck of a netlist mapped on a characterised library.
    Spice(spice::Args),
    /// Check the static logic levels of a netlist mapped on a characterised library.
    Levels(levels::Args),
}

/// Writes `text` to standard output. When the reader has closed the pipe
/// there is nobody left to tell, so the process ends with exit code 0.
pub(crate) fn write_stdout(text: std::fmt::Arguments) {
    use std::io::Write;
    let mut stdout = std::io::stdout().lock();
    if let Err(e) = stdout.write_fmt(text) {
        if e.kind() == std::io::ErrorKind::BrokenPipe {
            std::process::exit(0);
        }
    }
}

/// Parses the command line, runs the command and maps errors to exit codes.
pub fn main() -> ExitCode {
    crate::mapper::table_cache::use_user_cache_folder();
    let cli = match Cli::try_parse() {
        Ok(cli) => cli,
        Err(e) => {
            let code = match e.kind() {
                clap::error::ErrorKind::DisplayHelp | clap::error::ErrorKind::DisplayVersion => 0,
                _ => EXIT_BAD_INPUT,
            };
            let _ = e.print();
            return ExitCode::from(code);
        }
    };
    let result = match cli.command {
        Command::Inspect(a) => inspect::run(a),
        Command::Map(a) => map::run(a),
        Command::Equiv(a) => equiv::run(a),
        Command::Exact(a) => exact::run(a),
        Command::Coverage(a) => coverage::run(a),
        Command::Compare(a) => compare::run(a),
        Command::Study(a) => study::run(a),
        Command::Tabulate(a) => tabulate::run(a),
        Command::Sweep(a) => {
            eprintln!("note: 'ribbonmap sweep' is now called 'ribbonmap study'; the old name will be removed in the next release");
            study::run(a)
        }
        Command::Merge(a) => {
            eprintln!("note: 'ribbonmap merge' is now called 'ribbonmap tabulate'; the old name will be removed in the next release");
            tabulate::run(a)
        }
        Command::Generate(a) => generate::run(a),
        Command::Library(a) => library::run(a),
        Command::Characterize(a) => characterize::run(a),
        Command::Spice(a) => spice::run(a),
        Command::Levels(a) => levels::run(a),
    };
    match result {
        Ok(code) => ExitCode::from(code),
        Err(e) => {
            eprintln!("error: {e}");
            ExitCode::from(e.exit_code())
        }
    }
}
