//! What can be wrong with a library file.
//!
//! Loading collects every problem it finds rather than stopping at the first,
//! so `ribbonmap library check` can list them all; each [`LibraryProblem`]
//! names the cell and the field it concerns and, where known, the line and
//! column in the file.

use std::fmt;

/// One thing wrong with a library.
#[derive(Clone, Debug, PartialEq)]
pub struct LibraryProblem {
    /// The cell concerned, if any.
    pub cell: Option<String>,
    /// The field concerned (e.g. `area`, `delay.intrinsic`), if any.
    pub field: Option<String>,
    /// 1-based line in the file (0 when unknown).
    pub line: u32,
    /// 1-based column in the file (0 when unknown).
    pub column: u32,
    /// What is wrong and what was expected.
    pub message: String,
}

impl LibraryProblem {
    /// Formats the problem as `file:line:column: cell 'x', field 'y': message`.
    pub fn describe(&self, file: &str) -> String {
        let mut s = String::from(file);
        if self.line > 0 {
            s.push_str(&format!(":{}:{}", self.line, self.column));
        }
        s.push_str(": ");
        match (&self.cell, &self.field) {
            (Some(c), Some(f)) => s.push_str(&format!("cell '{c}', field '{f}': ")),
            (Some(c), None) => s.push_str(&format!("cell '{c}': ")),
            (None, Some(f)) => s.push_str(&format!("field '{f}': ")),
            (None, None) => {}
        }
        s.push_str(&self.message);
        s
    }
}

/// A library that could not be loaded, with every problem found.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[error("{}", summary(.file, .problems))]
pub struct LibraryError {
    /// The file as the user named it (or `<builtin:NAME>`).
    pub file: String,
    /// True when the file could not be read at all (as opposed to read and
    /// found wrong).
    pub unreadable: bool,
    /// Every problem found, in file order as far as possible.
    pub problems: Vec<LibraryProblem>,
}

fn summary(file: &str, problems: &[LibraryProblem]) -> String {
    match problems {
        [] => format!("{file}: invalid library"),
        [one] => one.describe(file),
        [first, rest @ ..] => format!(
            "{} (and {} more problem{}; run `ribbonmap library check {file}` to list them)",
            first.describe(file),
            rest.len(),
            if rest.len() == 1 { "" } else { "s" }
        ),
    }
}

impl LibraryError {
    /// Every problem as one line each.
    pub fn lines(&self) -> Vec<String> {
        self.problems
            .iter()
            .map(|p| p.describe(&self.file))
            .collect()
    }
}

impl fmt::Display for LibraryProblem {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.describe("library"))
    }
}
