//! ribbonmap maps Boolean networks onto libraries of multi-input conductance
//! gates and reports what those gates buy on real circuits.

pub mod cli;
pub mod device;
pub mod diag;
pub mod equiv;
pub mod exact;
pub mod fsutil;
pub mod generate;
pub mod io;
pub mod library;
pub mod mapper;
pub mod netlist;
pub mod network;
pub mod optimize;
pub mod proof;
pub mod study;
pub mod truth;
