//! Architecture studies: what a cell library buys on real circuits.
//!
//! A study maps benchmarks on several libraries and sets the results side by
//! side. The parts, in the order data flows through them:
//!
//! - [`power`]: switching-activity energy per operation and static power of
//!   a circuit of library cells (word-parallel random or file-driven
//!   simulation).
//! - `evaluate`: one benchmark × library × goal — map, check, measure —
//!   giving a [`StudyRecord`]; `compare` runs it for every pair.
//! - [`plan`]: sweep plans, their jobs, stable plan keys and shards.
//! - [`results`]: the append-only, crash-tolerant results file.
//! - [`sweep`]: the parallel job engine behind `ribbonmap sweep`.
//! - [`table`] and [`chart`]: comparison tables (text, Markdown, CSV, JSON,
//!   LaTeX) and grouped bar charts (SVG) with ratios to a baseline library.
//!
//! `ribbonmap compare`, `sweep` and `merge` are thin wrappers over these.

pub mod chart;
pub mod plan;
pub mod power;
pub mod record;
pub mod results;
pub mod sweep;
pub mod table;

pub use chart::render_svg;
pub use plan::{plan_key, Goal, Job, Plan, Shard, VerifyMode};
pub use power::{EnergyReport, InputVectors, Stimulus, SwitchingCircuit};
pub use record::{StudyError, StudyRecord};
pub use results::{read_results, ResultsFile};
pub use sweep::{run_jobs, RunOptions, SweepSummary};
pub use table::{ComparisonTable, Metric, TableFormat};
