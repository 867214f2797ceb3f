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

/// The 1-based line and column (in characters) of byte offset `at` in
/// `text`, which must be valid UTF-8 up to `at`.
pub fn line_column(text: &[u8], at: usize) -> (u32, u32) {
    let before = &text[..at.min(text.len())];
    let line_start = before
        .iter()
        .rposition(|&b| b == b'\n')
        .map_or(0, |i| i + 1);
    let line = before.iter().filter(|&&b| b == b'\n').count() + 1;
    let column = String::from_utf8_lossy(&before[line_start..])
        .chars()
        .count()
        + 1;
    (line as u32, column as u32)
}

/// Turns the bytes of an input file into text, or names the line and column
/// of the first byte that is not UTF-8 (every text format ribbonmap reads is
/// UTF-8, and a binary or wrongly encoded file is bad input, not a crash).
pub fn utf8_text(file: &str, bytes: Vec<u8>) -> Result<String, SourceError> {
    String::from_utf8(bytes).map_err(|e| {
        let at = e.utf8_error().valid_up_to();
        let bytes = e.as_bytes();
        let (line, column) = line_column(bytes, at);
        SourceError::new(
            file,
            line,
            column,
            format!(
                "byte 0x{:02X} is not UTF-8 text (is this a binary file or another encoding?)",
                bytes[at]
            ),
        )
    })
}

/// Reads the file at `path` as UTF-8 text; a missing or unreadable file is
/// an error about the whole file, a byte that is not UTF-8 an error at its
/// line and column.
pub fn read_utf8_file(path: &std::path::Path) -> Result<String, SourceError> {
    let file = path.display().to_string();
    let bytes = std::fs::read(path)
        .map_err(|e| SourceError::new(&file, 0, 0, format!("cannot read: {e}")))?;
    utf8_text(&file, bytes)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bad_bytes_are_located_by_line_and_character_column() {
        // "é" is two bytes but one character: the bad byte 0xFF on line 2
        // follows "xé", so it is column 3.
        let e = utf8_text("f", b"ok\nx\xC3\xA9\xFF\n".to_vec()).unwrap_err();
        assert_eq!((e.line, e.column), (2, 3));
        assert!(e.message.contains("0xFF"));
        assert_eq!(utf8_text("f", b"fine".to_vec()).unwrap(), "fine");
    }
}
