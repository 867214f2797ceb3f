//! Architecture studies: what a cell library buys on real circuits.
//!
//! A study maps benchmarks on several libraries and sets the results side by
//! side. The parts, in the order data flows through them:
//!
//! - [`power`]: switching-activity energy per operation and static power of
//!   a circuit of library cells (word-parallel random or file-driven
//!   simulation).
//! - [`evaluate`]: one benchmark × library × goal — map, check, measure —
//!   giving a [`StudyRecord`]; [`evaluate::compare`] runs it for every pair.
//! - [`mapped_energy`]: the energy model applied to a mapped netlist (what
//!   `ribbonmap map` reports as `energy_per_op` and `static_power`).
//! - [`plan`]: study plans, their jobs, stable plan keys and shards.
//! - [`results`]: the append-only, crash-tolerant results file.
//! - [`jobs`]: the parallel job engine; [`run`] drives it from a plan.
//! - [`table`] and [`chart`]: comparison tables (text, Markdown, CSV, JSON,
//!   LaTeX) and grouped bar charts (SVG) with ratios to a baseline library;
//!   [`units`] names each figure's unit and refuses ratios across unit
//!   systems unless they are normalised.
//!
//! `ribbonmap compare`, `study` and `tabulate` are thin wrappers over these.

pub mod activity;
pub mod chart;
pub mod evaluate;
pub mod jobs;
pub mod mapped_energy;
pub mod plan;
pub mod power;
pub mod record;
pub mod results;
pub mod run;
pub mod table;
pub mod units;

pub use chart::render_svg;
pub use evaluate::{compare, evaluate, EvaluateOptions};
pub use jobs::{run_jobs, RunOptions, StudySummary};
pub use mapped_energy::{energy_per_op, mapped_energy, static_power};
pub use plan::{plan_key, Goal, Job, Plan, Shard, VerifyMode};
pub use power::{EnergyReport, InputVectors, Stimulus, SwitchingCircuit};
pub use record::{StudyError, StudyRecord};
pub use results::{read_results, ResultsFile};
pub use run::{run_study, StudyOptions};
pub use table::{ComparisonTable, Metric, TableFormat};
