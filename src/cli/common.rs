//! Pieces several commands share: output formats, loading a library named on
//! the command line, reading a netlist with the common reader options.

use super::CliError;
use crate::library::Library;

/// Output format of a report.
#[derive(clap::ValueEnum, Clone, Copy, Debug, PartialEq, Eq)]
pub enum Format {
    /// Aligned text for a terminal.
    Text,
    /// JSON (fields as DESIGN.md fixes).
    Json,
    /// Comma-separated values.
    Csv,
    /// A Markdown table.
    Markdown,
    /// A LaTeX booktabs table.
    Latex,
}

/// Loads a library given as a built-in name or a file path.
pub fn load_library(spec: &str) -> Result<Library, CliError> {
    Err(CliError::Input(format!(
        "cannot load library '{spec}': library loading is not built yet"
    )))
}
