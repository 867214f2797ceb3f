//! The library a mapped netlist records in its header.
//!
//! The writers of mapped netlists put `# mapped onto library NAME` (BLIF)
//! or `// mapped onto library NAME` (Verilog) on the first line, so that a
//! command reading the netlist back can find the cells without `--lib`.
//! This module reads that line; it looks only at the first few lines of the
//! file and never fails (a file without the line simply records nothing).

use std::io::Read;
use std::path::Path;

/// The words that introduce the library name in a header comment.
const MARK: &str = "mapped onto library ";

/// How much of the file is searched.
const HEAD_BYTES: u64 = 4096;

/// The library name recorded in the header of the netlist at `path`, if
/// the file starts with such a comment line (blank and other comment lines
/// may come before it). Standard input (`-`) records nothing.
pub fn recorded_library(path: &Path) -> Option<String> {
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
pub fn recorded_library_in(text: &str) -> Option<String> {
    for line in text.lines().take(8) {
        let line = line.trim();
        if line.is_empty() {
            continue;
        }
        let comment = line.strip_prefix("//").or_else(|| line.strip_prefix('#'))?;
        if let Some(name) = comment.trim().strip_prefix(MARK) {
            let name = name.trim();
            return (!name.is_empty()).then(|| name.to_string());
        }
    }
    None
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn both_comment_styles_are_read() {
        assert_eq!(
            recorded_library_in("# mapped onto library ribbon3\n.model m\n").as_deref(),
            Some("ribbon3")
        );
        assert_eq!(
            recorded_library_in("\n// mapped onto library my cells \nmodule m;").as_deref(),
            Some("my cells")
        );
    }

    #[test]
    fn files_without_the_line_record_nothing() {
        assert_eq!(
            recorded_library_in(".model m\n# mapped onto library x\n"),
            None
        );
        assert_eq!(recorded_library_in("// mapped onto library \n"), None);
        assert_eq!(recorded_library_in(""), None);
    }
}
