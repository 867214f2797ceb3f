//! Diagnostics that point into a source file.
//!
//! Readers and loaders report bad input as a [`SourceError`]: the file, a
//! 1-based line and column, and a message that says what was found and what
//! was expected. The command line prints it on one line and exits with 2.

use std::fmt;

/// An error located in an input file.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct SourceError {
    /// File name as the user gave it (or `<stdin>`, `<builtin:NAME>`).
    pub file: String,
    /// 1-based line (0 when the error concerns the whole file).
    pub line: u32,
    /// 1-based column (0 when unknown).
    pub column: u32,
    /// What was found and what was expected.
    pub message: String,
}

impl SourceError {
    /// An error at `line`:`column` of `file`.
    pub fn new(
        file: impl Into<String>,
        line: u32,
        column: u32,
        message: impl Into<String>,
    ) -> Self {
        SourceError {
            file: file.into(),
            line,
            column,
            message: message.into(),
        }
    }
}

impl fmt::Display for SourceError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.line == 0 {
            write!(f, "{}: {}", self.file, self.message)
        } else {
            write!(
                f,
                "{}:{}:{}: {}",
                self.file, self.line, self.column, self.message
            )
        }
    }
}

impl std::error::Error for SourceError {}
