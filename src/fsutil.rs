//! Writing output files atomically.
//!
//! Every file ribbonmap writes goes to a temporary file in the same folder
//! first and is renamed over the target, so an interrupted run never leaves a
//! half-written netlist or result file behind. Errors never name the
//! temporary file (the user never asked for it): they carry only what went
//! wrong, and callers add the file the user named.

use std::io::Write;
use std::path::Path;

/// The folder a file at `path` is written in.
fn folder_of(path: &Path) -> &Path {
    match path.parent() {
        Some(p) if !p.as_os_str().is_empty() => p,
        _ => Path::new("."),
    }
}

/// The error without any file name in it (tempfile adds the temporary
/// file's path to its errors).
fn plain(e: std::io::Error) -> std::io::Error {
    let message = match e.raw_os_error() {
        Some(code) => std::io::Error::from_raw_os_error(code).to_string(),
        None => e.kind().to_string(),
    };
    std::io::Error::new(e.kind(), message)
}

/// Checks, before long work, that [`write_atomic`] can write `path`: its
/// folder exists and takes a new file, and `path` is not a folder. The
/// message names the folder or the file, never a temporary file.
pub fn check_writable(path: &Path) -> Result<(), String> {
    let dir = folder_of(path);
    if path.is_dir() {
        return Err(format!("{}: is a folder, not a file name", path.display()));
    }
    if !dir.is_dir() {
        return Err(format!(
            "{}: cannot write: the folder {} does not exist",
            path.display(),
            dir.display()
        ));
    }
    tempfile::NamedTempFile::new_in(dir).map(drop).map_err(|e| {
        format!(
            "{}: cannot write in the folder {}: {}",
            path.display(),
            dir.display(),
            plain(e)
        )
    })
}

/// Writes `contents` to `path` atomically (temporary file, then rename).
pub fn write_atomic(path: &Path, contents: &[u8]) -> std::io::Result<()> {
    write_atomic_inner(path, contents).map_err(plain)
}

fn write_atomic_inner(path: &Path, contents: &[u8]) -> std::io::Result<()> {
    let dir = folder_of(path);
    let mut tmp = tempfile::NamedTempFile::new_in(dir)?;
    tmp.write_all(contents)?;
    tmp.flush()?;
    // A temporary file is created private (0600); give the result the mode
    // the target already has, or the usual 0644 for a new file.
    #[cfg(unix)]
    {
        use std::os::unix::fs::PermissionsExt;
        let mode = std::fs::metadata(path)
            .map(|m| m.permissions().mode())
            .unwrap_or(0o644);
        tmp.as_file()
            .set_permissions(std::fs::Permissions::from_mode(mode))?;
    }
    tmp.persist(path).map_err(|e| e.error)?;
    Ok(())
}

#[cfg(test)]
mod tests {
    #[test]
    fn writes_and_replaces() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("x.txt");
        super::write_atomic(&p, b"one").unwrap();
        super::write_atomic(&p, b"two").unwrap();
        assert_eq!(std::fs::read_to_string(&p).unwrap(), "two");
        assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 1);
        #[cfg(unix)]
        {
            use std::os::unix::fs::PermissionsExt;
            let mode = std::fs::metadata(&p).unwrap().permissions().mode();
            assert_eq!(mode & 0o777, 0o644, "new files are world-readable");
        }
    }
}
