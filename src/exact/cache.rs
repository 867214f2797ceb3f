//! The on-disk cache of coverage tables and optimum databases.
//!
//! Files live in `$RIBBONMAP_CACHE_DIR`, else `$XDG_CACHE_HOME/ribbonmap`,
//! else `$HOME/.cache/ribbonmap`, and are keyed by a content hash of the
//! gate set (names, arities, truth tables, areas and delays), so editing a
//! library invalidates its entries. Files are JSON, written atomically; an
//! unreadable or mismatching file is ignored and recomputed.

use super::gates::GateSpec;
use serde::{Deserialize, Serialize};
use std::path::PathBuf;

/// Version tag of the cache files; bump when their meaning changes.
const CACHE_FORMAT: &str = "ribbonmap-exact-cache/1";

/// The cache folder, if one can be determined.
pub fn cache_dir() -> Option<PathBuf> {
    let non_empty = |v: &str| std::env::var_os(v).filter(|s| !s.is_empty());
    if let Some(dir) = non_empty("RIBBONMAP_CACHE_DIR") {
        return Some(PathBuf::from(dir));
    }
    if let Some(dir) = non_empty("XDG_CACHE_HOME") {
        return Some(PathBuf::from(dir).join("ribbonmap"));
    }
    non_empty("HOME").map(|h| PathBuf::from(h).join(".cache").join("ribbonmap"))
}

/// A stable content hash of a gate set (FNV-1a, 64 bits, as 16 hex digits).
pub fn gate_set_hash(gates: &[GateSpec]) -> String {
    let mut text = String::new();
    for g in gates {
        text.push_str(&format!(
            "{}|{}|{:x}|{:?}|{:?};",
            g.name, g.arity, g.truth, g.area, g.delay
        ));
    }
    format!("{:016x}", fnv1a(text.as_bytes()))
}

fn fnv1a(bytes: &[u8]) -> u64 {
    let mut h: u64 = 0xcbf2_9ce4_8422_2325;
    for &b in bytes {
        h ^= b as u64;
        h = h.wrapping_mul(0x0000_0100_0000_01b3);
    }
    h
}

/// What a coverage table depends on.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub(crate) struct CoverageKey {
    pub library_hash: String,
    pub inputs: usize,
    pub free_complements: bool,
    pub max_steps: usize,
}

/// The stored answer for one class.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub(crate) struct CachedClass {
    pub representative: u64,
    pub cells: Option<usize>,
    pub optimal: bool,
    /// Seconds the synthesis took when the class was computed.
    #[serde(default)]
    pub seconds: f64,
}

#[derive(Serialize, Deserialize)]
struct CoverageFile {
    format: String,
    key: CoverageKey,
    classes: Vec<CachedClass>,
}

fn coverage_path(key: &CoverageKey) -> Option<PathBuf> {
    cache_dir().map(|d| {
        d.join(format!(
            "coverage-{}-{}in{}-{}steps.json",
            key.library_hash,
            key.inputs,
            if key.free_complements { "-free" } else { "" },
            key.max_steps
        ))
    })
}

/// The cached classes for `key`, if present and valid.
pub(crate) fn load_coverage(key: &CoverageKey) -> Option<Vec<CachedClass>> {
    let text = std::fs::read_to_string(coverage_path(key)?).ok()?;
    let file: CoverageFile = serde_json::from_str(&text).ok()?;
    (file.format == CACHE_FORMAT && file.key == *key).then_some(file.classes)
}

/// Stores the classes for `key`.
pub(crate) fn store_coverage(key: &CoverageKey, classes: &[CachedClass]) -> std::io::Result<()> {
    let Some(path) = coverage_path(key) else {
        return Ok(());
    };
    let file = CoverageFile {
        format: CACHE_FORMAT.to_string(),
        key: key.clone(),
        classes: classes.to_vec(),
    };
    write_json(&path, &file)
}

/// Writes `value` as JSON to `path` atomically, creating the folder.
pub(crate) fn write_json<T: Serialize>(path: &std::path::Path, value: &T) -> std::io::Result<()> {
    if let Some(dir) = path.parent() {
        std::fs::create_dir_all(dir)?;
    }
    let bytes = serde_json::to_vec(value).map_err(std::io::Error::other)?;
    crate::fsutil::write_atomic(path, &bytes)
}

/// Reads JSON from `path`, or `None`.
pub(crate) fn read_json<T: for<'de> Deserialize<'de>>(path: &std::path::Path) -> Option<T> {
    serde_json::from_str(&std::fs::read_to_string(path).ok()?).ok()
}

/// The format tag cache files carry.
pub(crate) fn format_tag() -> &'static str {
    CACHE_FORMAT
}
