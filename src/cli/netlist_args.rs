//! Options every command that reads a netlist shares: format override, top
//! model and storage cells. Commands `#[command(flatten)]` [`NetlistArgs`]
//! and call [`NetlistArgs::read`].

use super::CliError;
use crate::io::{read_netlist, recorded_library, NetlistFormat, ReadOptions, StorageCellSpec};
use crate::library::Library;
use crate::network::Network;
use std::path::Path;

/// Reader options shared by every command that reads netlists.
#[derive(clap::Args, Debug, Clone, Default)]
pub struct NetlistArgs {
    /// Netlist format, overriding the file extension (.blif, .v, .bench,
    /// .aag, .aig).
    /// Needed when the netlist is read from standard input ('-').
    #[arg(long = "input-format", value_enum, value_name = "FORMAT")]
    pub input_format: Option<NetlistFormat>,
    /// Top model (BLIF) or module (Verilog). By default the first BLIF model,
    /// or the Verilog module that no other module instantiates.
    #[arg(long, value_name = "NAME")]
    pub top: Option<String>,
    /// A storage cell the netlist instantiates without defining it, as
    /// CELL:D:Q:CLOCK with the cell name and its data, output and clock pins
    /// (e.g. ff:D:Q:CK for the ISCAS-89 files). Repeat for several cells.
    #[arg(long = "storage", value_name = "CELL:D:Q:CK")]
    pub storage: Vec<StorageCellSpec>,
    /// The most one-bit nets the flattened design may have (default
    /// 1048576; the top Verilog module's port bits at most N/16); larger
    /// files are refused before they are flattened.
    #[arg(long = "max-nets", value_name = "N", value_parser = clap::value_parser!(u64).range(1..))]
    pub max_nets: Option<u64>,
}

impl NetlistArgs {
    /// Reads the netlist at `path` (`-` for standard input) with these
    /// options; instances of `library` cells become logic.
    pub fn read(&self, path: &Path, library: Option<&Library>) -> Result<Network, CliError> {
        let opts = self.options(library);
        read_netlist(path, &opts).map_err(CliError::from)
    }

    /// The reader options these arguments describe.
    pub fn options<'a>(&self, library: Option<&'a Library>) -> ReadOptions<'a> {
        ReadOptions {
            format: self.input_format,
            top: self.top.clone(),
            storage_cells: self.storage.clone(),
            library,
            max_nets: self.max_nets,
        }
    }
}

/// The library to read mapped netlists with: the one `--lib` names, else the
/// first one recorded in a header of `netlists` (with a note on standard
/// error saying so), else none. A recorded library file is read relative to
/// the netlist's folder and must still hold the library of the recorded
/// name; without a file, the name is a built-in library's.
pub fn library_for(lib: Option<&str>, netlists: &[&Path]) -> Result<Option<Library>, CliError> {
    if let Some(spec) = lib {
        return super::common::load_library(spec).map(Some);
    }
    for path in netlists {
        let Some(recorded) = recorded_library(path) else {
            continue;
        };
        let name = &recorded.name;
        let cannot = |e: String| {
            CliError::Input(format!(
                "{}: the header records library '{name}', which cannot be loaded ({e}); give --lib",
                path.display()
            ))
        };
        let (library, shown) = match &recorded.file {
            Some(file) => {
                let full = path.parent().unwrap_or(Path::new("")).join(file);
                let spec = full.to_string_lossy().to_string();
                let library =
                    super::common::load_library(&spec).map_err(|e| cannot(e.to_string()))?;
                if library.name != *name {
                    return Err(cannot(format!(
                        "{} now holds library '{}'",
                        full.display(),
                        library.name
                    )));
                }
                (library, format!("'{name}' from {}", full.display()))
            }
            None => (
                super::common::load_library(name).map_err(|e| cannot(e.to_string()))?,
                format!("'{name}'"),
            ),
        };
        eprintln!(
            "note: using library {shown} recorded in the header of {} (--lib chooses another)",
            path.display()
        );
        return Ok(Some(library));
    }
    Ok(None)
}
