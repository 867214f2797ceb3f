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
//! `$RIBBONMAP_NO_CACHE` turns the cache off.
//!
//! Reading checks the whole file before any of it is used: a checksum over
//! its bytes, the tag (format version), the library hash inside it, every
//! implementation's gates well formed for the library and evaluated to the
//! stored function, and every id in range; a stale, truncated or edited
//! file is ignored and the table rebuilt (and the file rewritten). The
//! check allocates nothing per implementation, and the implementations
//! themselves (areas, pin delays) are built only when the mapper first asks
//! for them ([`super::matches::StoredGates`]): a small design touches a few
//! hundred of the tens of thousands in a table, so reading costs a few
//! milliseconds instead of the build's hundreds.
//!
//! Format `ribbonmap-match-table/4` (little-endian): the 8-byte tag
//! `RMMATCH4`, the library hash (u64), the typical load (f32 bits), the
//! inverter and buffer ids (u32, `u32::MAX` for none), the inverter area
//! (f64 bits), the index (count, then key u64 and slot u32 pairs), the
//! slots (count, then per slot a count, the number of leading ids kept for
//! area and the implementation ids, all u32), the
//! implementations (count, then per implementation its function u64 and
//! gates: count, then per gate the cell u32 and its sources: count, then
//! per source a tag byte and a value byte), and last a checksum (u64) of
//! everything before it: 64-bit FNV-1a's offset and prime applied to
//! 8-byte little-endian words (the last one padded with zero bytes)
//! instead of single bytes, eight times fewer steps. Version 3 changed the
//! checksum from version 2's byte-wise FNV-1a; version 4 orders each list
//! with the implementations kept for area first and stores their number.

use super::implementation::{evaluate_cell, ImplGate, Source};
use super::matches::{MatchTable, StoredGates};
use super::small_truth::VAR_MASKS;
use crate::library::Library;
use std::path::PathBuf;
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::{Arc, OnceLock};

const TAG: &[u8; 8] = b"RMMATCH4";
/// The format version, also in the file name so that processes of other
/// versions keep their own files.
const VERSION: u32 = 4;
/// Most entries of any list a cache file may declare (bounds allocation).
const MAX_ENTRIES: usize = 1 << 24;

/// The table of `lib`: read from the cache when a valid file is there,
/// else built and (best effort) written for the next process.
pub fn load_or_build(lib: &Library) -> MatchTable {
    let path = cache_path(lib);
    if let Some(path) = &path {
        if let Ok(bytes) = std::fs::read(path) {
            if let Some(table) = decode(bytes, lib) {
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
    let hash = lib.content_hash();
    cache_folder().map(|d| d.join(format!("match-table-{hash:016x}-v{VERSION}.bin")))
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
    for (slot, &area_kept) in table.slots.iter().zip(&table.area_kept) {
        put32(&mut out, slot.len() as u32);
        put32(&mut out, area_kept as u32);
        for &id in slot {
            put32(&mut out, id);
        }
    }
    put32(&mut out, table.implementations.len() as u32);
    for id in 0..table.num_implementations() as u32 {
        let imp = table.implementation(id);
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
    let sum = checksum(&out);
    put64(&mut out, sum);
    out
}

/// The table stored in `bytes` for `lib`, or `None` when the file is not a
/// valid table of this library (see the module comment).
pub fn decode(mut bytes: Vec<u8>, lib: &Library) -> Option<MatchTable> {
    if bytes.len() < TAG.len() + 8 {
        return None;
    }
    let body_len = bytes.len() - 8;
    let sum = u64::from_le_bytes(bytes[body_len..].try_into().ok()?);
    bytes.truncate(body_len);
    if checksum(&bytes) != sum {
        return None;
    }
    let mut r = Reader {
        bytes: &bytes,
        at: 0,
    };
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
    let mut area_kept = Vec::with_capacity(n);
    for _ in 0..n {
        let m = r.count()?;
        let kept = r.u32()?;
        if kept as usize > m || kept > u8::MAX as u32 {
            return None;
        }
        area_kept.push(kept as u8);
        let mut slot = Vec::with_capacity(m);
        for _ in 0..m {
            slot.push(r.u32()?);
        }
        slots.push(slot);
    }
    let n = r.count()?;
    let mut offsets = Vec::with_capacity(n);
    let mut tables = Vec::new();
    for _ in 0..n {
        let function = r.u64()?;
        offsets.push(u32::try_from(r.at).ok()?);
        // Checked on load: the gates must still compute the function.
        if check_gates(&mut r, lib, &mut tables)? != function {
            return None;
        }
    }
    if r.at != bytes.len() {
        return None;
    }
    let count = n as u32;
    let ids_ok = slots.iter().flatten().all(|&id| id < count)
        && index.values().all(|&s| (s as usize) < slots.len())
        && inverter.is_none_or(|v| v < count)
        && buffer.is_none_or(|v| v < count);
    ids_ok.then(|| MatchTable {
        index,
        slots,
        area_kept,
        implementations: (0..n).map(|_| OnceLock::new()).collect(),
        stored: Some(Arc::new(StoredGates {
            lib: lib.clone(),
            bytes,
            offsets,
        })),
        typical_load,
        inverter,
        buffer,
        inverter_area,
    })
}

/// Reads one source (tag and value bytes), `None` for an unknown tag.
fn read_source(r: &mut Reader) -> Option<Source> {
    let tv = r.take(2)?;
    let (tag, value) = (tv[0], tv[1]);
    Some(match tag {
        0 | 1 => Source::Leaf {
            var: value,
            complemented: tag == 1,
        },
        2 => Source::Gate(value),
        3 => Source::Constant(value == 1),
        _ => return None,
    })
}

/// The function of the gate list at the reader, which must be one that
/// [`super::implementation::Implementation::new`] accepts for `lib` (at
/// least one gate; cells of `lib` with as many sources as pins; leaves
/// below 6; gate sources earlier gates); `None` otherwise. `tables` is
/// scratch space.
fn check_gates(r: &mut Reader, lib: &Library, tables: &mut Vec<u64>) -> Option<u64> {
    let g = r.count()?;
    if g == 0 {
        return None;
    }
    tables.clear();
    for _ in 0..g {
        let cell = lib.cells.get(r.u32()? as usize)?;
        let p = r.count()?;
        if p != cell.arity() || p > VAR_MASKS.len() {
            return None;
        }
        let mut ins = [0u64; 6];
        for slot in ins.iter_mut().take(p) {
            *slot = match read_source(r)? {
                Source::Leaf { var, complemented } => {
                    let v = *VAR_MASKS.get(var as usize)?;
                    if complemented {
                        !v
                    } else {
                        v
                    }
                }
                Source::Gate(j) => *tables.get(j as usize)?,
                Source::Constant(c) => {
                    if c {
                        u64::MAX
                    } else {
                        0
                    }
                }
            };
        }
        tables.push(evaluate_cell(cell.truth, &ins[..p]));
    }
    tables.last().copied()
}

/// The gate list stored at `*at` in `bytes` (a file body that
/// [`decode`] accepted), moving `*at` past it.
pub(super) fn read_gates(bytes: &[u8], at: &mut usize) -> Option<Vec<ImplGate>> {
    let mut r = Reader { bytes, at: *at };
    let g = r.count()?;
    let mut gates = Vec::with_capacity(g);
    for _ in 0..g {
        let cell = r.u32()?;
        let p = r.count()?;
        let mut inputs = Vec::with_capacity(p);
        for _ in 0..p {
            inputs.push(read_source(&mut r)?);
        }
        gates.push(ImplGate { cell, inputs });
    }
    *at = r.at;
    Some(gates)
}

/// The file checksum: 64-bit FNV-1a's offset basis and prime (Fowler, Noll
/// and Vo) over 8-byte little-endian words, the last padded with zeros.
fn checksum(bytes: &[u8]) -> u64 {
    let step = |h: u64, w: u64| (h ^ w).wrapping_mul(0x0000_0100_0000_01b3);
    let mut words = bytes.chunks_exact(8);
    let mut h = 0xcbf2_9ce4_8422_2325;
    for w in &mut words {
        h = step(h, u64::from_le_bytes(w.try_into().expect("8 bytes")));
    }
    let rest = words.remainder();
    if !rest.is_empty() {
        let mut last = [0u8; 8];
        last[..rest.len()].copy_from_slice(rest);
        h = step(h, u64::from_le_bytes(last));
    }
    h
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

    fn all(table: &MatchTable) -> Vec<super::super::implementation::Implementation> {
        (0..table.num_implementations() as u32)
            .map(|id| table.implementation(id).clone())
            .collect()
    }

    /// A table read back from its file equals the table built in memory:
    /// the same lookups, implementations and inverter.
    #[test]
    fn a_written_table_reads_back_equal() {
        for name in ["ribbon3", "nand-nor-inv", "cmos-le"] {
            let lib = Library::builtin(name).unwrap();
            let table = MatchTable::build(&lib);
            let bytes = encode(&table, &lib);
            let back = decode(bytes, &lib).expect("valid file");
            assert_eq!(all(&back), all(&table), "{name}");
            assert_eq!(back.slots, table.slots);
            assert_eq!(back.index, table.index);
            assert_eq!(back.inverter, table.inverter);
            assert_eq!(back.buffer, table.buffer);
        }
    }

    /// `bytes` with its checksum recomputed, as an edited file would be.
    fn resealed(mut bytes: Vec<u8>) -> Vec<u8> {
        let body = bytes.len() - 8;
        let sum = checksum(&bytes[..body]);
        bytes[body..].copy_from_slice(&sum.to_le_bytes());
        bytes
    }

    #[test]
    fn damaged_or_foreign_files_are_refused() {
        let lib = Library::builtin("ribbon3").unwrap();
        let other = Library::builtin("nand-nor-inv").unwrap();
        let bytes = encode(&MatchTable::build(&lib), &lib);
        assert!(decode(bytes.clone(), &lib).is_some());
        assert!(
            decode(bytes.clone(), &other).is_none(),
            "another library's file"
        );
        let mut flipped = bytes.clone();
        let middle = flipped.len() / 2;
        flipped[middle] ^= 1;
        assert!(decode(flipped, &lib).is_none(), "checksum");
        for cut in [
            0,
            7,
            8,
            100,
            bytes.len() / 2,
            bytes.len() - 9,
            bytes.len() - 1,
        ] {
            assert!(
                decode(bytes[..cut].to_vec(), &lib).is_none(),
                "truncated to {cut}"
            );
        }
        let mut old = bytes.clone();
        old[..8].copy_from_slice(b"RMMATCH2");
        assert!(
            decode(resealed(old), &lib).is_none(),
            "another format version"
        );
    }

    /// A file whose checksum is right but whose contents are not a table
    /// of the library is refused: the checks after the checksum catch what
    /// an edited (or wrongly written) file could carry.
    #[test]
    fn well_sealed_but_wrong_contents_are_refused() {
        let lib = Library::builtin("ribbon2").unwrap();
        let table = MatchTable::build(&lib);
        let bytes = encode(&table, &lib);
        // The first implementation record: after the header (44 bytes),
        // the index, the slots and the implementation count.
        let mut at = 8 + 8 + 4 + 4 + 4 + 8;
        at += 4 + 12 * table.index.len();
        at += 4 + table.slots.iter().map(|s| 8 + 4 * s.len()).sum::<usize>();
        at += 4;
        let function = u64::from_le_bytes(bytes[at..at + 8].try_into().unwrap());
        assert_eq!(function, table.implementation(0).function);
        // A stored function that the gates do not compute.
        let mut wrong = bytes.clone();
        wrong[at..at + 8].copy_from_slice(&(!function).to_le_bytes());
        assert!(decode(resealed(wrong), &lib).is_none(), "wrong function");
        // A cell index past the library's cells.
        let mut wrong = bytes.clone();
        wrong[at + 12..at + 16].copy_from_slice(&u32::MAX.to_le_bytes());
        assert!(decode(resealed(wrong), &lib).is_none(), "unknown cell");
        // A slot naming an implementation that is not there.
        let mut wrong = bytes.clone();
        let slots = 8 + 8 + 4 + 4 + 4 + 8 + 4 + 12 * table.index.len();
        let first_id = slots + 4 + 4 + 4;
        wrong[first_id..first_id + 4].copy_from_slice(&u32::MAX.to_le_bytes());
        assert!(decode(resealed(wrong), &lib).is_none(), "id out of range");
    }

    /// The word-wise checksum sees a change in any byte, including the
    /// bytes of a last partial word.
    #[test]
    fn the_checksum_sees_every_byte() {
        let bytes: Vec<u8> = (0..21u8).collect();
        let sum = checksum(&bytes);
        for i in 0..bytes.len() {
            let mut b = bytes.clone();
            b[i] ^= 0x10;
            assert_ne!(checksum(&b), sum, "byte {i}");
        }
        // Offset basis for no bytes, as byte-wise FNV-1a (from memory).
        assert_eq!(checksum(&[]), 0xcbf2_9ce4_8422_2325);
    }
}
