//! Options every command that reads a netlist shares: format override, top
//! model and storage cells. Commands `#[command(flatten)]` [`NetlistArgs`]
//! and call [`NetlistArgs::read`].

use super::CliError;
use crate::io::{read_netlist, NetlistFormat, ReadOptions, StorageCellSpec};
use crate::library::Library;
use crate::network::Network;
use std::path::Path;

/// Reader options shared by every command that reads netlists.
#[derive(clap::Args, Debug, Clone, Default)]
pub struct NetlistArgs {
    /// Netlist format, overriding the file extension (.blif, .v, .bench).
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
        }
    }
}
