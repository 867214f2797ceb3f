//! From device data to a cell library, and back out to a circuit simulator.
//!
//! Device groups start from conduction maps: each ribbon's conductance over
//! its gate voltages, computed by their device simulator. This stage reads
//! those tables ([`table`], [`table_csv`], [`table_json`], in the units of
//! [`units`]) and the kit that ties them to cells ([`kit`]), derives every
//! figure a library needs from first-order circuit relations
//! ([`characterize`], [`transfer`]), writes the result as a
//! `ribbonmap-library/1` file with its electrical data ([`library_write`])
//! and an HTML report ([`report`]), and writes SPICE decks of mapped
//! netlists that use the same tables ([`spice`]), so the derived numbers can
//! be checked in a circuit simulator the user trusts. [`levels`] finds the
//! static voltage of every net of a mapped netlist from the same tables and
//! its margins to the receiving cells' thresholds. [`demo_builtins`] derives
//! the built-in ribbon libraries from the demo kit.

pub mod characterize;
pub mod demo_builtins;
pub mod kit;
pub mod levels;
pub mod library_write;
pub mod margin;
pub mod report;
pub mod spice;
pub mod switching;
pub mod table;
pub mod table_csv;
pub mod table_json;
pub mod transfer;
pub mod units;

pub use characterize::{characterize, CellCharacter, Characterization};
pub use kit::{read_kit, DeviceKit};
pub use table::{read_table, ConductanceTable};
pub use units::CONDUCTANCE_QUANTUM_S;
