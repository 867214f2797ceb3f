//! Result files: one JSON object per line, appended as jobs finish.
//!
//! A study run must survive being killed at any moment and lose no finished job.
//! So the file is opened in append mode and each result is written as one
//! complete line (text and newline in a single `write` call, then synced);
//! a kill can at worst leave one unterminated last line. [`ResultsFile::open`]
//! repairs exactly that case by cutting the file back to its last newline,
//! and reports the plan keys already present so a rerun skips finished jobs.
//! [`read_results`] reads one or more files for merging, tolerating an
//! unterminated last line the same way.

use super::record::StudyRecord;
use crate::diag::SourceError;
use std::collections::HashSet;
use std::fs::{File, OpenOptions};
use std::io::Write;
use std::path::{Path, PathBuf};
use std::sync::Mutex;

/// A results file open for appending.
#[derive(Debug)]
pub struct ResultsFile {
    path: PathBuf,
    file: Mutex<File>,
}

/// What [`ResultsFile::open`] found in an existing file.
#[derive(Debug, Default)]
pub struct ExistingResults {
    /// Plan keys of the complete result lines.
    pub keys: HashSet<String>,
    /// Complete lines found.
    pub lines: usize,
    /// Bytes of an unterminated last line that were cut off.
    pub repaired_bytes: u64,
}

impl ResultsFile {
    /// Opens (creating if needed) `path` for appending, first cutting off an
    /// unterminated last line left by an interrupted run. Every complete
    /// line is checked as strictly as [`read_results`] checks it: a result
    /// line (see [`check_result_line`]) with a `plan_key`; any other line is
    /// an error naming its line and column (the file is not one of ours, or
    /// was edited by hand), and nothing is cut or appended then.
    pub fn open(path: &Path) -> Result<(ResultsFile, ExistingResults), SourceError> {
        let name = path.display().to_string();
        let io_err = |e: std::io::Error| SourceError::new(&name, 0, 0, e.to_string());
        let mut existing = ExistingResults::default();
        if path.exists() {
            let bytes = std::fs::read(path).map_err(io_err)?;
            let complete = match bytes.iter().rposition(|&b| b == b'\n') {
                Some(i) => i + 1,
                None => 0,
            };
            let text = crate::diag::utf8_text(&name, bytes[..complete].to_vec())?;
            for (i, line) in text.lines().enumerate() {
                if line.trim().is_empty() {
                    continue;
                }
                let record = check_result_line(&name, i, line)?;
                let Some(key) = record.plan_key else {
                    return Err(SourceError::new(
                        &name,
                        i as u32 + 1,
                        1,
                        "bad result line: no 'plan_key' (a study results file holds only lines written by `ribbonmap study`)",
                    ));
                };
                existing.lines += 1;
                existing.keys.insert(key);
            }
            if complete < bytes.len() {
                let f = OpenOptions::new().write(true).open(path).map_err(io_err)?;
                f.set_len(complete as u64).map_err(io_err)?;
                f.sync_all().map_err(io_err)?;
                existing.repaired_bytes = (bytes.len() - complete) as u64;
            }
        }
        let file = OpenOptions::new()
            .create(true)
            .append(true)
            .open(path)
            .map_err(io_err)?;
        Ok((
            ResultsFile {
                path: path.to_path_buf(),
                file: Mutex::new(file),
            },
            existing,
        ))
    }

    /// Appends one result line. The line and its newline go out in a single
    /// write, followed by a sync, so a finished result is on disk before the
    /// next job's result is written. Safe to call from several threads.
    pub fn append(&self, line: &str) -> std::io::Result<()> {
        let mut buffer = Vec::with_capacity(line.len() + 1);
        buffer.extend_from_slice(line.trim_end_matches('\n').as_bytes());
        buffer.push(b'\n');
        let mut file = self.file.lock().unwrap_or_else(|p| p.into_inner());
        file.write_all(&buffer)?;
        file.flush()?;
        file.sync_data()
    }

    /// The file's path.
    pub fn path(&self) -> &Path {
        &self.path
    }
}

fn strip_position(e: &serde_json::Error) -> String {
    let text = e.to_string();
    match text.rfind(" at line ") {
        Some(i) => text[..i].to_string(),
        None => text,
    }
}

/// Parses line `index` (0-based) of result file `name` as a result line: a
/// JSON object with the fields of a [`StudyRecord`]. Errors name the line
/// and column.
pub fn check_result_line(name: &str, index: usize, line: &str) -> Result<StudyRecord, SourceError> {
    let value: serde_json::Value = serde_json::from_str(line).map_err(|e| {
        SourceError::new(
            name,
            index as u32 + 1,
            (e.column() as u32).max(1),
            format!("not a result line: {}", strip_position(&e)),
        )
    })?;
    if !value.is_object() {
        return Err(SourceError::new(
            name,
            index as u32 + 1,
            1,
            "not a result line: expected a JSON object",
        ));
    }
    StudyRecord::from_json(value)
        .map_err(|m| SourceError::new(name, index as u32 + 1, 1, format!("bad result line: {m}")))
}

/// Records read from result files.
#[derive(Debug, Default)]
pub struct MergedResults {
    /// Records in file order, first occurrence of each plan key kept.
    pub records: Vec<StudyRecord>,
    /// Lines dropped because their plan key was seen before.
    pub duplicates: usize,
    /// Files whose unterminated last line was ignored.
    pub truncated: Vec<String>,
}

/// Reads result files and drops duplicate plan keys (the first line with a
/// key wins; lines without a key are all kept). An unterminated last line
/// (an interrupted write) is ignored and reported in
/// [`MergedResults::truncated`]; any other bad line is an error at its line
/// and column.
pub fn read_results(paths: &[PathBuf]) -> Result<MergedResults, SourceError> {
    let mut merged = MergedResults::default();
    let mut seen = HashSet::new();
    for path in paths {
        let name = path.display().to_string();
        let text = if name == "-" {
            let mut bytes = Vec::new();
            std::io::Read::read_to_end(&mut std::io::stdin(), &mut bytes)
                .map_err(|e| SourceError::new("<stdin>", 0, 0, e.to_string()))?;
            crate::diag::utf8_text("<stdin>", bytes)?
        } else {
            crate::diag::read_utf8_file(path)?
        };
        let ends_cleanly = text.is_empty() || text.ends_with('\n');
        let lines: Vec<&str> = text.lines().collect();
        for (i, line) in lines.iter().enumerate() {
            if line.trim().is_empty() {
                continue;
            }
            let last = i + 1 == lines.len();
            if last && !ends_cleanly && serde_json::from_str::<serde_json::Value>(line).is_err() {
                merged.truncated.push(name.clone());
                continue;
            }
            let record = check_result_line(&name, i, line)?;
            if let Some(k) = &record.plan_key {
                if !seen.insert(k.clone()) {
                    merged.duplicates += 1;
                    continue;
                }
            }
            merged.records.push(record);
        }
    }
    sort_by_plan_position(&mut merged.records);
    Ok(merged)
}

/// Puts study records back in plan order (benchmark, library, goal as the
/// plan lists them; a study run writes them in completion order), so tables show
/// libraries in plan order with the plan's first library as baseline.
/// Records without a `plan_position` keep their order, after the others.
pub fn sort_by_plan_position(records: &mut [StudyRecord]) {
    let position = |r: &StudyRecord| -> (u8, u64, u64, u64) {
        match r.extra.get("plan_position").and_then(|p| p.as_array()) {
            Some(p) if p.len() == 3 => {
                let at = |i: usize| p[i].as_u64().unwrap_or(u64::MAX);
                (0, at(0), at(2), at(1))
            }
            _ => (1, 0, 0, 0),
        }
    };
    records.sort_by_key(position);
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn truncated_last_line_is_cut_and_keys_found() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("r.jsonl");
        std::fs::write(&p, format!("{}\n{}\n{{\"plan_ke", line("a"), line("b"))).unwrap();
        let (file, existing) = ResultsFile::open(&p).unwrap();
        assert_eq!(existing.lines, 2);
        assert_eq!(existing.repaired_bytes, 9);
        assert!(existing.keys.contains("a") && existing.keys.contains("b"));
        file.append(&line("c")).unwrap();
        let text = std::fs::read_to_string(&p).unwrap();
        assert_eq!(
            text,
            format!("{}\n{}\n{}\n", line("a"), line("b"), line("c"))
        );
    }

    /// A complete result line with plan key `key`.
    fn line(key: &str) -> String {
        format!(
            "{{\"benchmark\":\"b\",\"library\":\"ribbon3\",\"goal\":\"area\",\"plan_key\":\"{key}\",\
             \"cell_count\":1,\"area\":1.0,\"depth\":1,\"delay\":1.0,\"devices\":2,\"verified\":\"proven\"}}"
        )
    }

    #[test]
    fn lines_a_study_cannot_use_are_located_before_anything_is_cut() {
        // As strict as `tabulate`: an object with the record's fields and a
        // plan key; the error names the line, and the file is left as it was.
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("r.jsonl");
        for (bad, column) in [
            ("[1, 2]", 1),
            ("{\"plan_key\":\"x\"}", 1),
            ("{\"benchmark\":\"b\"", 16),
        ] {
            let text = format!("{}\n{bad}\n{}\n{{\"unfinis", line("a"), line("b"));
            std::fs::write(&p, &text).unwrap();
            let e = ResultsFile::open(&p).unwrap_err();
            assert_eq!((e.line, e.column), (2, column), "{bad}: {e}");
            assert_eq!(std::fs::read_to_string(&p).unwrap(), text);
        }
        let mut without_key = line("a").replace(",\"plan_key\":\"a\"", "");
        without_key.push('\n');
        std::fs::write(&p, &without_key).unwrap();
        let e = ResultsFile::open(&p).unwrap_err();
        assert!(e.message.contains("plan_key"), "{e}");
        std::fs::write(&p, b"\xFF\n").unwrap();
        let e = ResultsFile::open(&p).unwrap_err();
        assert_eq!((e.line, e.column), (1, 1), "{e}");
    }

    #[test]
    fn garbage_line_is_located() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("r.jsonl");
        std::fs::write(&p, format!("{}\nnot json\n", line("a"))).unwrap();
        let e = ResultsFile::open(&p).unwrap_err();
        assert_eq!(e.line, 2);
    }
}
