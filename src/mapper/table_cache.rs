//! The match table of a library, kept on disk between processes.
//!
//! Building the table (supergate enumeration) costs a few hundred
//! milliseconds, which dominated mapping small circuits. The table is
//! written once per library to a cache folder under a name made of the
//! library's content hash and this format's version, and read back by later
//! processes. The folder is `$RIBBONMAP_CACHE_DIR` when set; otherwise the
//! user's cache folder (`$XDG_CACHE_HOME/ribbonmap`, else
//! `$HOME/.cache/ribbonmap`), but only in a process that asked for it with
//! [`use_user_cache_folder`] (the command line does), so library users and
//! test suites never touch a cache folder they did not name. A non-empty
//! `$RIBBONMAP_NO_CACHE` turns the cache off. Reading checks the file: a checksum over its bytes, the
//! library hash inside it, and every implementation rebuilt from its gates
//! by [`Implementation::new`] with the stored function compared, so a
//! stale, truncated or edited file is ignored and the table rebuilt.
//!
//! Format `ribbonmap-match-table/3` (little-endian): the 8-byte tag
//! `RMMATCH3` (version 3: each function's list holds the implementations
//! kept for area first, the fastest last), the library hash (u64), the typical load (f32 bits), the
//! inverter and buffer ids (u32, `u32::MAX` for none), the inverter area
//! (f64 bits), the index (count, then key u64 and slot u32 pairs), the
//! slots (count, then per slot a count and implementation ids u32), the
//! implementations (count, then per implementation its function u64 and
//! gates: count, then per gate the cell u32 and its sources: count, then
//! per source a tag byte and a value byte), and last an FNV-1a checksum
//! (u64) of everything before it.

use super::implementation::{ImplGate, Implementation, Source};
use super::matches::MatchTable;
use crate::library::Library;
use std::path::PathBuf;
use std::sync::atomic::{AtomicBool, Ordering};

const TAG: &[u8; 8] = b"RMMATCH3";
/// Most entries of any list a cache file may declare (bounds allocation).
const MAX_ENTRIES: usize = 1 << 24;

/// The table of `lib`: read from the cache when a valid file is there,
/// else built and (best effort) written for the next process.
pub fn load_or_build(lib: &Library) -> MatchTable {
    let path = cache_path(lib);
    if let Some(path) = &path {
        if let Ok(bytes) = std::fs::read(path) {
            if let Some(table) = decode(&bytes, lib) {
                return table;
            }
        }
    }
    let table = MatchTable::build(lib);
    if let Some(path) = &path {
        if let Some(dir) = path.parent() {
            if std::fs::create_dir_all(dir).is_ok() {
                // A cache that cannot be written only costs time later.
                let _ = crate::fsutil::write_atomic(path, &encode(&table, lib));
            }
        }
    }
    table
}

/// Whether this process keeps match tables in the user's cache folder when
/// `$RIBBONMAP_CACHE_DIR` is not set.
static USER_FOLDER: AtomicBool = AtomicBool::new(false);

/// Lets this process keep match tables in the user's cache folder when
/// `$RIBBONMAP_CACHE_DIR` is not set (see the module comment); the command
/// line calls it at start-up.
pub fn use_user_cache_folder() {
    USER_FOLDER.store(true, Ordering::Relaxed);
}

/// The folder match tables are kept in, if any (see the module comment).
pub fn cache_folder() -> Option<PathBuf> {
    let non_empty = |v: &str| std::env::var_os(v).filter(|s| !s.is_empty());
    if non_empty("RIBBONMAP_NO_CACHE").is_some() {
        return None;
    }
    if let Some(dir) = non_empty("RIBBONMAP_CACHE_DIR") {
        return Some(PathBuf::from(dir));
    }
    if !USER_FOLDER.load(Ordering::Relaxed) {
        return None;
    }
    if let Some(dir) = non_empty("XDG_CACHE_HOME") {
        return Some(PathBuf::from(dir).join("ribbonmap"));
    }
    non_empty("HOME").map(|h| PathBuf::from(h).join(".cache").join("ribbonmap"))
}

/// Where the table of `lib` is kept: in [`cache_folder`], named by the
/// library's content hash.
pub fn cache_path(lib: &Library) -> Option<PathBuf> {
    cache_folder().map(|d| d.join(format!("match-table-{:016x}-v1.bin", lib.content_hash())))
}

/// The file contents for `table` of `lib`.
pub fn encode(table: &MatchTable, lib: &Library) -> Vec<u8> {
    let mut out = Vec::new();
    out.extend_from_slice(TAG);
    put64(&mut out, lib.content_hash());
    put32(&mut out, table.typical_load.to_bits());
    put32(&mut out, table.inverter.unwrap_or(u32::MAX));
    put32(&mut out, table.buffer.unwrap_or(u32::MAX));
    put64(&mut out, table.inverter_area.to_bits());
    let mut index: Vec<(u64, u32)> = table.index.iter().map(|(&k, &v)| (k, v)).collect();
    index.sort_unstable();
    put32(&mut out, index.len() as u32);
    for (k, v) in index {
        put64(&mut out, k);
        put32(&mut out, v);
    }
    put32(&mut out, table.slots.len() as u32);
    for slot in &table.slots {
        put32(&mut out, slot.len() as u32);
        for &id in slot {
            put32(&mut out, id);
        }
    }
    put32(&mut out, table.implementations.len() as u32);
    for imp in &table.implementations {
        put64(&mut out, imp.function);
        put32(&mut out, imp.gates.len() as u32);
        for gate in &imp.gates {
            put32(&mut out, gate.cell);
            put32(&mut out, gate.inputs.len() as u32);
            for s in &gate.inputs {
                let (tag, value) = match *s {
                    Source::Leaf { var, complemented } => (complemented as u8, var),
                    Source::Gate(j) => (2, j),
                    Source::Constant(c) => (3, c as u8),
                };
                out.push(tag);
                out.push(value);
            }
        }
    }
    let sum = fnv1a(&out);
    put64(&mut out, sum);
    out
}

/// The table stored in `bytes` for `lib`, or `None` when the file is not a
/// valid table of this library (see the module comment).
pub fn decode(bytes: &[u8], lib: &Library) -> Option<MatchTable> {
    if bytes.len() < TAG.len() + 8 {
        return None;
    }
    let (body, sum) = bytes.split_at(bytes.len() - 8);
    if fnv1a(body) != u64::from_le_bytes(sum.try_into().ok()?) {
        return None;
    }
    let mut r = Reader { bytes: body, at: 0 };
    if r.take(8)? != TAG || r.u64()? != lib.content_hash() {
        return None;
    }
    let typical_load = f32::from_bits(r.u32()?);
    let inverter = Some(r.u32()?).filter(|&v| v != u32::MAX);
    let buffer = Some(r.u32()?).filter(|&v| v != u32::MAX);
    let inverter_area = f64::from_bits(r.u64()?);
    let n = r.count()?;
    let mut index = rustc_hash::FxHashMap::default();
    index.reserve(n);
    for _ in 0..n {
        let k = r.u64()?;
        index.insert(k, r.u32()?);
    }
    let n = r.count()?;
    let mut slots = Vec::with_capacity(n);
    for _ in 0..n {
        let m = r.count()?;
        let mut slot = Vec::with_capacity(m);
        for _ in 0..m {
            slot.push(r.u32()?);
        }
        slots.push(slot);
    }
    let n = r.count()?;
    let mut implementations = Vec::with_capacity(n);
    for _ in 0..n {
        let function = r.u64()?;
        let g = r.count()?;
        let mut gates = Vec::with_capacity(g);
        for _ in 0..g {
            let cell = r.u32()?;
            let p = r.count()?;
            let mut inputs = Vec::with_capacity(p);
            for _ in 0..p {
                let tag = r.take(1)?[0];
                let value = r.take(1)?[0];
                inputs.push(match tag {
                    0 | 1 => Source::Leaf {
                        var: value,
                        complemented: tag == 1,
                    },
                    2 => Source::Gate(value),
                    3 => Source::Constant(value == 1),
                    _ => return None,
                });
            }
            gates.push(ImplGate { cell, inputs });
        }
        // Checked on load: the gates must still compute the function.
        let imp = Implementation::new(lib, gates)?;
        if imp.function != function {
            return None;
        }
        implementations.push(imp);
    }
    if r.at != body.len() {
        return None;
    }
    let count = implementations.len() as u32;
    let ids_ok = slots.iter().flatten().all(|&id| id < count)
        && index.values().all(|&s| (s as usize) < slots.len())
        && inverter.is_none_or(|v| v < count)
        && buffer.is_none_or(|v| v < count);
    if !ids_ok {
        return None;
    }
    let mut table = MatchTable {
        index,
        slots,
        area_kept: Vec::new(),
        implementations,
        typical_load,
        inverter,
        buffer,
        inverter_area,
    };
    table.recount_area_kept();
    Some(table)
}

/// 64-bit FNV-1a (Fowler, Noll and Vo; the published offset and prime).
fn fnv1a(bytes: &[u8]) -> u64 {
    bytes.iter().fold(0xcbf2_9ce4_8422_2325, |h, &b| {
        (h ^ b as u64).wrapping_mul(0x0000_0100_0000_01b3)
    })
}

fn put32(out: &mut Vec<u8>, v: u32) {
    out.extend_from_slice(&v.to_le_bytes());
}

fn put64(out: &mut Vec<u8>, v: u64) {
    out.extend_from_slice(&v.to_le_bytes());
}

struct Reader<'b> {
    bytes: &'b [u8],
    at: usize,
}

impl Reader<'_> {
    fn take(&mut self, n: usize) -> Option<&[u8]> {
        let s = self.bytes.get(self.at..self.at.checked_add(n)?)?;
        self.at += n;
        Some(s)
    }

    fn u32(&mut self) -> Option<u32> {
        Some(u32::from_le_bytes(self.take(4)?.try_into().ok()?))
    }

    fn u64(&mut self) -> Option<u64> {
        Some(u64::from_le_bytes(self.take(8)?.try_into().ok()?))
    }

    fn count(&mut self) -> Option<usize> {
        let n = self.u32()? as usize;
        (n <= MAX_ENTRIES && n <= self.bytes.len()).then_some(n)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A table read back from its file equals the table built in memory:
    /// the same lookups, implementations and inverter.
    #[test]
    fn a_written_table_reads_back_equal() {
        for name in ["ribbon3", "nand-nor-inv", "cmos-le"] {
            let lib = Library::builtin(name).unwrap();
            let table = MatchTable::build(&lib);
            let bytes = encode(&table, &lib);
            let back = decode(&bytes, &lib).expect("valid file");
            assert_eq!(back.implementations, table.implementations, "{name}");
            assert_eq!(back.slots, table.slots);
            assert_eq!(back.index, table.index);
            assert_eq!(back.inverter, table.inverter);
            assert_eq!(back.buffer, table.buffer);
        }
    }

    #[test]
    fn damaged_or_foreign_files_are_refused() {
        let lib = Library::builtin("ribbon3").unwrap();
        let other = Library::builtin("nand-nor-inv").unwrap();
        let bytes = encode(&MatchTable::build(&lib), &lib);
        assert!(decode(&bytes, &other).is_none(), "another library's file");
        let mut flipped = bytes.clone();
        let middle = flipped.len() / 2;
        flipped[middle] ^= 1;
        assert!(decode(&flipped, &lib).is_none(), "checksum");
        assert!(
            decode(&bytes[..bytes.len() / 2], &lib).is_none(),
            "truncated"
        );
    }
}
