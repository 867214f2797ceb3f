//! Pieces several commands share: output formats, loading a library named on
//! the command line, reading a netlist with the common reader options.

use super::CliError;
use crate::library::Library;

/// Output format of a report.
#[derive(clap::ValueEnum, Clone, Copy, Debug, PartialEq, Eq)]
pub enum Format {
    /// Aligned text for a terminal.
    Text,
    /// JSON (fields in docs/json-output.md).
    Json,
    /// Comma-separated values.
    Csv,
    /// A Markdown table.
    Markdown,
    /// A LaTeX booktabs table.
    Latex,
}

/// Output format of a command that prints one report (not a table): the
/// only values such a command accepts are the ones it prints.
#[derive(clap::ValueEnum, Clone, Copy, Debug, PartialEq, Eq)]
pub enum ReportFormat {
    /// Aligned text for a terminal.
    Text,
    /// JSON (fields in docs/json-output.md).
    Json,
}

/// `n` and the noun, singular for one and plural otherwise ("1 job",
/// "2 jobs", "3 classes").
pub fn counted(n: impl Into<u64>, noun: &str) -> String {
    let n = n.into();
    if n == 1 {
        format!("1 {noun}")
    } else if noun.ends_with('s') || noun.ends_with('x') {
        format!("{n} {noun}es")
    } else {
        format!("{n} {noun}s")
    }
}

/// Loads a library given as a built-in name or a file path.
///
/// A built-in name (see [`Library::builtin_names`]) wins; anything else is
/// read as a library file. Every failure is bad input (exit code 2), with
/// the first problem's file, line and column.
pub fn load_library(spec: &str) -> Result<Library, CliError> {
    if let Some(lib) = Library::builtin(spec) {
        return Ok(lib);
    }
    let path = std::path::Path::new(spec);
    if !path.exists() && !spec.contains('/') && !spec.contains('.') {
        return Err(CliError::Input(format!(
            "unknown library '{spec}': not a built-in ({}) and no such file",
            Library::builtin_names().join(", ")
        )));
    }
    Library::load(path).map_err(|e| CliError::Input(e.to_string()))
}
