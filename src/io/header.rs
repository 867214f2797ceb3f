//! The library a mapped netlist records in its header.
//!
//! The writers of mapped netlists put `# mapped onto library NAME` (BLIF)
//! or `// mapped onto library NAME` (Verilog) on the first line, so that a
//! command reading the netlist back can find the cells without `--lib`.
//! A library loaded from a file also has its file recorded on the next
//! line (`# library file PATH`, relative to the netlist's folder or
//! absolute), since its name alone cannot be loaded.
//! This module reads those lines; it looks only at the first few lines of
//! the file and never fails (a file without them simply records nothing).

use std::io::Read;
use std::path::Path;

/// The words that introduce the library name in a header comment.
const MARK: &str = "mapped onto library ";

/// The words that introduce the library's file in a header comment.
const FILE_MARK: &str = "library file ";

/// How much of the file is searched.
const HEAD_BYTES: u64 = 4096;

/// The library a mapped netlist's header records.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct RecordedLibrary {
    /// The library's name.
    pub name: String,
    /// The file it was loaded from, when the header records one: as written
    /// (relative to the netlist's folder, or absolute).
    pub file: Option<String>,
}

/// The library recorded in the header of the netlist at `path`, if the
/// file starts with such a comment line (blank and other comment lines
/// may come before it). Standard input (`-`) records nothing.
pub fn recorded_library(path: &Path) -> Option<RecordedLibrary> {
    if path.as_os_str() == "-" {
        return None;
    }
    let mut head = Vec::new();
    std::fs::File::open(path)
        .ok()?
        .take(HEAD_BYTES)
        .read_to_end(&mut head)
        .ok()?;
    recorded_library_in(&String::from_utf8_lossy(&head))
}

/// [`recorded_library`] on the text of a file.
pub fn recorded_library_in(text: &str) -> Option<RecordedLibrary> {
    let comment = |line: &str| {
        let line = line.trim();
        line.strip_prefix("//")
            .or_else(|| line.strip_prefix('#'))
            .map(|c| c.trim().to_string())
    };
    let mut lines = text.lines().take(8).filter(|l| !l.trim().is_empty());
    while let Some(line) = lines.next() {
        let text = comment(line)?;
        if let Some(name) = text.strip_prefix(MARK) {
            let name = name.trim();
            if name.is_empty() {
                return None;
            }
            let file = lines
                .next()
                .and_then(comment)
                .and_then(|c| c.strip_prefix(FILE_MARK).map(|f| f.trim().to_string()))
                .filter(|f| !f.is_empty());
            return Some(RecordedLibrary {
                name: name.to_string(),
                file,
            });
        }
    }
    None
}

/// The header line recording the library's file, `library file PATH`
/// behind `marker` (`#` or `//`), with a newline.
pub fn library_file_line(marker: &str, file: &str) -> String {
    format!("{marker} {FILE_MARK}{file}\n")
}

#[cfg(test)]
mod tests {
    use super::*;

    fn name(text: &str) -> Option<String> {
        recorded_library_in(text).map(|r| r.name)
    }

    #[test]
    fn both_comment_styles_are_read() {
        assert_eq!(
            name("# mapped onto library ribbon3\n.model m\n").as_deref(),
            Some("ribbon3")
        );
        assert_eq!(
            name("\n// mapped onto library my cells \nmodule m;").as_deref(),
            Some("my cells")
        );
    }

    #[test]
    fn the_library_file_follows_the_name() {
        let text = format!(
            "// mapped onto library mine\n{}module m;",
            library_file_line("//", "libs/my cells.json")
        );
        assert_eq!(
            recorded_library_in(&text),
            Some(RecordedLibrary {
                name: "mine".into(),
                file: Some("libs/my cells.json".into())
            })
        );
        assert_eq!(
            recorded_library_in("# mapped onto library ribbon3\n.model m\n# library file x\n")
                .and_then(|r| r.file),
            None
        );
    }

    #[test]
    fn files_without_the_line_record_nothing() {
        assert_eq!(name(".model m\n# mapped onto library x\n"), None);
        assert_eq!(name("// mapped onto library \n"), None);
        assert_eq!(name(""), None);
    }
}
