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
    /// unterminated last line left by an interrupted run. Complete lines that
    /// are not JSON objects are an error naming their line (the file is not
    /// one of ours, or was edited by hand).
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
            if complete < bytes.len() {
                let f = OpenOptions::new().write(true).open(path).map_err(io_err)?;
                f.set_len(complete as u64).map_err(io_err)?;
                f.sync_all().map_err(io_err)?;
                existing.repaired_bytes = (bytes.len() - complete) as u64;
            }
            let text = String::from_utf8_lossy(&bytes[..complete]);
            for (i, line) in text.lines().enumerate() {
                if line.trim().is_empty() {
                    continue;
                }
                let value: serde_json::Value = serde_json::from_str(line).map_err(|e| {
                    SourceError::new(
                        &name,
                        i as u32 + 1,
                        e.column() as u32,
                        format!("not a result line: {}", strip_position(&e)),
                    )
                })?;
                existing.lines += 1;
                if let Some(k) = value.get("plan_key").and_then(|k| k.as_str()) {
                    existing.keys.insert(k.to_string());
                }
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
            let mut s = String::new();
            std::io::Read::read_to_string(&mut std::io::stdin(), &mut s)
                .map_err(|e| SourceError::new("<stdin>", 0, 0, e.to_string()))?;
            s
        } else {
            std::fs::read_to_string(path)
                .map_err(|e| SourceError::new(&name, 0, 0, format!("cannot read: {e}")))?
        };
        let ends_cleanly = text.is_empty() || text.ends_with('\n');
        let lines: Vec<&str> = text.lines().collect();
        for (i, line) in lines.iter().enumerate() {
            if line.trim().is_empty() {
                continue;
            }
            let last = i + 1 == lines.len();
            let value: serde_json::Value = match serde_json::from_str(line) {
                Ok(v) => v,
                Err(_) if last && !ends_cleanly => {
                    merged.truncated.push(name.clone());
                    continue;
                }
                Err(e) => {
                    return Err(SourceError::new(
                        &name,
                        i as u32 + 1,
                        e.column() as u32,
                        format!("not a result line: {}", strip_position(&e)),
                    ))
                }
            };
            let record = StudyRecord::from_json(value).map_err(|m| {
                SourceError::new(&name, i as u32 + 1, 1, format!("bad result line: {m}"))
            })?;
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
        std::fs::write(&p, "{\"plan_key\":\"a\"}\n{\"plan_key\":\"b\"}\n{\"plan_ke").unwrap();
        let (file, existing) = ResultsFile::open(&p).unwrap();
        assert_eq!(existing.lines, 2);
        assert_eq!(existing.repaired_bytes, 9);
        assert!(existing.keys.contains("a") && existing.keys.contains("b"));
        file.append("{\"plan_key\":\"c\"}").unwrap();
        let text = std::fs::read_to_string(&p).unwrap();
        assert_eq!(
            text,
            "{\"plan_key\":\"a\"}\n{\"plan_key\":\"b\"}\n{\"plan_key\":\"c\"}\n"
        );
    }

    #[test]
    fn garbage_line_is_located() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("r.jsonl");
        std::fs::write(&p, "{\"plan_key\":\"a\"}\nnot json\n").unwrap();
        let e = ResultsFile::open(&p).unwrap_err();
        assert_eq!(e.line, 2);
    }
}
