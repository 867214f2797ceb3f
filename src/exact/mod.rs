//! SAT-based exact synthesis over a cell library, coverage tables and the
//! optimum database the mapper reads.
//!
//! - [`gates`]: library cells as [`GateSpec`]s and their expansion into the
//!   permuted, support-reduced variants the encoding uses.
//! - `encode`: the SAT encoding of "k steps compute these functions" (the
//!   variables and symmetry breaking are described there).
//! - `limits`: conflict and time limits for the SAT solver.
//! - [`synthesize()`]: the objective loops (cells, area, depth) around the
//!   encoding; returns an [`ExactResult`], a small netlist that can print
//!   itself ([`ExactResult::netlist`]), simulate itself and become a
//!   [`Network`](crate::network::Network). For cells and area, a lower
//!   bound proven over a relaxed basis (every function of the library's
//!   arities, complements free: inverters vanish) rules out step counts and
//!   caps how many steps may be inverters, once proofs grow large or a
//!   limit stops one.
//! - [`classes`]: permutation and NPN classes of small functions.
//! - [`coverage()`]: cells needed by every function of 3 or 4 inputs.
//! - [`cache`]: the on-disk cache keyed by the gate set's content hash.
//! - [`OptimumDatabase`]: per-library minimum implementations for the
//!   mapper, computed on demand.
//!
//! ```
//! use ribbonmap::exact::{synthesize, ExactOptions, GateSpec};
//! let gates = vec![
//!     GateSpec::new("maj3", 3, 0xE8, 1.0),
//!     GateSpec::new("xor3", 3, 0x96, 1.0),
//! ];
//! // A full adder: sum and carry.
//! let r = synthesize(&[0x96, 0xE8], 3, &gates, &ExactOptions::default()).unwrap();
//! assert_eq!((r.cells, r.optimal), (2, true));
//! ```

pub mod cache;
pub mod classes;
pub mod coverage;
mod database;
mod encode;
pub mod gates;
mod limits;
mod synthesize;

pub use coverage::{
    coverage, coverage_of_library, ClassCost, Coverage, CoverageOptions, NpnSummary,
};
pub use database::{OptimumDatabase, DATABASE_MAX_INPUTS};
pub use gates::{gates_from_library, GateSpec};
pub use synthesize::{
    synthesize, ExactError, ExactOptions, ExactResult, Objective, Operand, Source, Step,
};
