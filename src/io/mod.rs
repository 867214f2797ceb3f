//! Netlist readers and writers: BLIF, structural Verilog, BENCH and AIGER.
//!
//! Every reader turns text into a [`Network`] in two steps: it records nets
//! and their drivers in a flat netlist (`flat`), flattening hierarchy on the
//! way, and then builds the network by an iterative depth-first search from
//! the outputs and storage inputs. That order lets files use nets before they
//! are driven, reports undriven nets, multiple drivers and combinational
//! loops with positions, and keeps the stack flat on million-node files.
//! Bad input of any kind (including binary garbage and text that is not
//! UTF-8) comes back as a [`SourceError`] with file, line and column; a
//! reader never panics.
//!
//! Cells the file does not define are looked up in [`ReadOptions`]: storage
//! cells named with [`StorageCellSpec`] (`--storage ff:D:Q:CK`) or declared by
//! the library become storage elements, combinational library cells become
//! logic through their truth tables (this is how mapped netlists are read
//! back).
//!
//! The writers ([`write_blif`], [`write_verilog`]) produce text the readers
//! read back to the same function, deterministically.
//!
//! ```
//! use ribbonmap::io::{read_netlist_str, write_blif, NetlistFormat, ReadOptions};
//! let text = "module m(a, b, y); input a, b; output y; nand g (y, a, b); endmodule\n";
//! let net = read_netlist_str(text, "m.v", NetlistFormat::Verilog, &ReadOptions::default()).unwrap();
//! assert_eq!(net.gate_count(), 1);
//! let again = read_netlist_str(&write_blif(&net), "m.blif", NetlistFormat::Blif, &ReadOptions::default()).unwrap();
//! assert_eq!(again.gate_count(), 1);
//! ```

mod aiger_read;
mod aiger_write;
mod bench_read;
mod blif_read;
mod blif_write;
mod flat;
mod header;
mod limits;
mod names;
mod summary;
mod verilog_lex;
pub(crate) mod verilog_parse;
mod verilog_read;
mod verilog_write;

pub use aiger_write::write_aiger;
pub use blif_read::IGNORED_COMMANDS as BLIF_IGNORED_COMMANDS;
pub use blif_write::write_blif;
pub use header::{library_file_line, recorded_library, recorded_library_in, RecordedLibrary};
pub use limits::{DEFAULT_MAX_NETS, MAX_EXPRESSION_WIDTH};
pub use summary::{output_supports, summarize, FanoutEntry, Summary, SupportEntry};
pub use verilog_write::{identifier as verilog_identifier, write_verilog};

use crate::diag::SourceError;
use crate::library::{Cell, Library};
use crate::network::Network;
use std::io::Read;
use std::path::Path;

/// A netlist file format.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, clap::ValueEnum)]
pub enum NetlistFormat {
    /// Berkeley Logic Interchange Format (`.blif`).
    Blif,
    /// Structural Verilog (`.v`).
    Verilog,
    /// ISCAS BENCH (`.bench`).
    Bench,
    /// AIGER, ASCII encoding (`.aag`). The reader accepts either encoding.
    Aag,
    /// AIGER, binary encoding (`.aig`). The reader accepts either encoding.
    Aig,
}

impl NetlistFormat {
    /// The format a file name's extension implies (`.blif`, `.v`, `.bench`,
    /// `.aag`, `.aig`; case-insensitive), if any.
    pub fn from_path(path: &Path) -> Option<NetlistFormat> {
        let ext = path.extension()?.to_str()?.to_ascii_lowercase();
        match ext.as_str() {
            "blif" => Some(NetlistFormat::Blif),
            "v" | "vg" | "sv" => Some(NetlistFormat::Verilog),
            "bench" => Some(NetlistFormat::Bench),
            "aag" => Some(NetlistFormat::Aag),
            "aig" => Some(NetlistFormat::Aig),
            _ => None,
        }
    }

    /// The usual file extension, without the dot.
    pub fn extension(self) -> &'static str {
        match self {
            NetlistFormat::Blif => "blif",
            NetlistFormat::Verilog => "v",
            NetlistFormat::Bench => "bench",
            NetlistFormat::Aag => "aag",
            NetlistFormat::Aig => "aig",
        }
    }

    /// True for the AIGER encodings, which are read as bytes.
    pub fn is_aiger(self) -> bool {
        matches!(self, NetlistFormat::Aag | NetlistFormat::Aig)
    }
}

/// A storage cell the user names on the command line: cell name and its
/// data, output and clock pins (`ff:D:Q:CK`).
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct StorageCellSpec {
    /// Cell (module) name.
    pub cell: String,
    /// Data input pin.
    pub d: String,
    /// Output pin.
    pub q: String,
    /// Clock pin.
    pub clock: String,
}

impl std::str::FromStr for StorageCellSpec {
    type Err = String;

    /// Parses `CELL:D:Q:CLOCK`.
    fn from_str(s: &str) -> Result<Self, String> {
        let parts: Vec<&str> = s.split(':').collect();
        match parts.as_slice() {
            [cell, d, q, clock] if parts.iter().all(|p| !p.trim().is_empty()) => {
                Ok(StorageCellSpec {
                    cell: cell.trim().to_string(),
                    d: d.trim().to_string(),
                    q: q.trim().to_string(),
                    clock: clock.trim().to_string(),
                })
            }
            _ => Err(format!(
                "'{s}' is not a storage cell (expected CELL:D:Q:CLOCK, e.g. ff:D:Q:CK)"
            )),
        }
    }
}

/// Options of the readers. `Default` reads by extension, takes the default
/// top model, and knows no cells.
#[derive(Clone, Debug, Default)]
pub struct ReadOptions<'a> {
    /// Format; `None` follows the file extension.
    pub format: Option<NetlistFormat>,
    /// Top model or module; `None` picks the first BLIF model or the Verilog
    /// module no other module instantiates.
    pub top: Option<String>,
    /// Storage cells the file instantiates without defining them.
    pub storage_cells: Vec<StorageCellSpec>,
    /// Library whose cells instances may refer to (mapped netlists).
    pub library: Option<&'a Library>,
    /// The most one-bit nets the flattened design may have (named nets and
    /// intermediate expression values; gate input connections may number
    /// four times as many). `None` means [`DEFAULT_MAX_NETS`]. Files that
    /// would flatten past it are refused before they are flattened.
    pub max_nets: Option<u64>,
}

impl ReadOptions<'_> {
    /// The bound on one-bit nets in force.
    pub fn max_nets(&self) -> u64 {
        self.max_nets.unwrap_or(DEFAULT_MAX_NETS)
    }
}

/// Reads the netlist at `path` (`-` reads standard input, whose format must
/// then be given in `opts.format`).
pub fn read_netlist(path: &Path, opts: &ReadOptions) -> Result<Network, SourceError> {
    let shown = path.display().to_string();
    let stdin = shown == "-";
    let file_name = if stdin { "<stdin>".to_string() } else { shown };
    let format = match opts.format.or_else(|| NetlistFormat::from_path(path)) {
        Some(f) => f,
        None => {
            return Err(SourceError::new(
                file_name,
                0,
                0,
                "cannot tell the netlist format from the file name (expected a .blif, .v, .bench, .aag or .aig extension, or --input-format)",
            ))
        }
    };
    let mut bytes = Vec::new();
    let result = if stdin {
        std::io::stdin().lock().read_to_end(&mut bytes).map(|_| ())
    } else {
        std::fs::File::open(path).and_then(|mut f| f.read_to_end(&mut bytes).map(|_| ()))
    };
    if let Err(e) = result {
        return Err(SourceError::new(
            file_name,
            0,
            0,
            format!("cannot read: {e}"),
        ));
    }
    read_netlist_bytes(&bytes, &file_name, format, opts)
}

/// Reads a netlist from the bytes of a file: text formats must be UTF-8,
/// AIGER may be binary. `file_name` is used in error messages (and, for
/// BENCH and AIGER, as the design name).
pub fn read_netlist_bytes(
    bytes: &[u8],
    file_name: &str,
    format: NetlistFormat,
    opts: &ReadOptions,
) -> Result<Network, SourceError> {
    if format.is_aiger() {
        return aiger_read::read(bytes, file_name, design_name(file_name), opts);
    }
    let text = decode(bytes, file_name)?;
    read_netlist_str(text, file_name, format, opts)
}

/// The design name of formats without one: the file name's stem.
fn design_name(file_name: &str) -> &str {
    Path::new(file_name)
        .file_stem()
        .and_then(|s| s.to_str())
        .unwrap_or("top")
}

/// Checks that `bytes` are UTF-8 text; the error points at the first bad byte.
fn decode<'b>(bytes: &'b [u8], file: &str) -> Result<&'b str, SourceError> {
    match std::str::from_utf8(bytes) {
        Ok(t) => Ok(t),
        Err(e) => {
            let at = e.valid_up_to();
            let line = bytes[..at].iter().filter(|&&b| b == b'\n').count() as u32 + 1;
            let col = (at
                - bytes[..at]
                    .iter()
                    .rposition(|&b| b == b'\n')
                    .map_or(0, |p| p + 1)) as u32
                + 1;
            Err(SourceError::new(
                file,
                line,
                col,
                format!(
                    "byte 0x{:02x} is not UTF-8 text (expected a text netlist)",
                    bytes[at]
                ),
            ))
        }
    }
}

/// Reads a netlist from `text`; `file_name` is used in error messages (and,
/// for BENCH, as the design name).
pub fn read_netlist_str(
    text: &str,
    file_name: &str,
    format: NetlistFormat,
    opts: &ReadOptions,
) -> Result<Network, SourceError> {
    if format.is_aiger() {
        return aiger_read::read(text.as_bytes(), file_name, design_name(file_name), opts);
    }
    if let Some(pos) = text.find('\0') {
        let line = text[..pos].matches('\n').count() as u32 + 1;
        let col = (pos - text[..pos].rfind('\n').map_or(0, |p| p + 1)) as u32 + 1;
        return Err(SourceError::new(
            file_name,
            line,
            col,
            "NUL byte in the file (expected a text netlist)",
        ));
    }
    match format {
        NetlistFormat::Blif => blif_read::read(text, file_name, opts),
        NetlistFormat::Verilog => verilog_read::read(text, file_name, opts),
        NetlistFormat::Bench => bench_read::read(text, file_name, design_name(file_name)),
        NetlistFormat::Aag | NetlistFormat::Aig => {
            aiger_read::read(text.as_bytes(), file_name, design_name(file_name), opts)
        }
    }
}

/// Where readers look up cells a file uses without defining them.
pub(crate) struct CellLookup<'o> {
    specs: &'o [StorageCellSpec],
    library: Option<&'o Library>,
}

impl<'o> CellLookup<'o> {
    fn new(opts: &'o ReadOptions<'o>) -> Self {
        CellLookup {
            specs: &opts.storage_cells,
            library: opts.library,
        }
    }

    /// A combinational library cell.
    fn cell(&self, name: &str) -> Option<&'o Cell> {
        self.library.and_then(|l| l.cell(name))
    }

    /// A storage cell named by the user or declared by the library.
    fn storage(&self, name: &str) -> Option<StorageCellSpec> {
        if let Some(s) = self.specs.iter().find(|s| s.cell == name) {
            return Some(s.clone());
        }
        self.library
            .and_then(|l| l.storage_cell(name))
            .map(|s| StorageCellSpec {
                cell: s.name.clone(),
                d: s.d.clone(),
                q: s.q.clone(),
                clock: s.clock.clone(),
            })
    }

    /// True when `name` is any known cell.
    fn has_cell(&self, name: &str) -> bool {
        self.cell(name).is_some() || self.storage(name).is_some()
    }

    /// The error message for a cell nobody defines.
    fn unknown_message(&self, name: &str) -> String {
        match self.library {
            Some(l) => format!(
                "unknown cell or module '{name}': not defined in this file and not a cell of library '{}' (expected a module of this file, a library cell, or a storage cell named with --storage CELL:D:Q:CLOCK)",
                l.name
            ),
            None => format!(
                "unknown cell or module '{name}': not defined in this file and no library was given (expected a module of this file; give --lib for library cells or --storage CELL:D:Q:CLOCK for flip-flops)"
            ),
        }
    }
}

#[cfg(test)]
mod tests;
