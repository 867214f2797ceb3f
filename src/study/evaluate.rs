//! One study job: map a network on a library, check the result, measure it.
//!
//! [`evaluate`] is what `compare` and every `study` job run: technology
//! mapping with the given goal, a check of the mapped circuit against the
//! source (a proof with the equivalence checker, or random simulation),
//! static timing, the switching-activity energy model, and the count of
//! majority-class cells. The result is a [`StudyRecord`] whose fields are the
//! `map` report's plus the study's own. [`compare`] runs it for every
//! benchmark × library pair in parallel.

use super::mapped_energy::mapped_energy;
use super::plan::{Goal, VerifyMode};
use super::power::Stimulus;
use super::record::{count_majority_cells, StudyError, StudyRecord};
use crate::library::Library;
use crate::mapper::{self, MapOptions};
use crate::netlist::{self, Report, Verified};
use crate::network::Network;
use indexmap::IndexMap;
use std::time::Instant;

/// Options of one evaluation.
#[derive(Clone, Debug)]
pub struct EvaluateOptions {
    /// Mapping goal.
    pub goal: Goal,
    /// Cut size (`None`: the mapper's default).
    pub cut_size: Option<u32>,
    /// Priority cuts per node (`None`: the mapper's default).
    pub cuts_per_node: Option<u32>,
    /// How the mapped circuit is checked.
    pub verify: VerifyMode,
    /// Patterns of the energy simulation.
    pub stimulus: Stimulus,
}

impl Default for EvaluateOptions {
    /// Balanced goal, mapper defaults, full verification, default stimulus.
    fn default() -> Self {
        EvaluateOptions {
            goal: Goal::Balanced,
            cut_size: None,
            cuts_per_node: None,
            verify: VerifyMode::Full,
            stimulus: Stimulus::default(),
        }
    }
}

fn mapper_goal(goal: Goal) -> mapper::Goal {
    match goal {
        Goal::Area => mapper::Goal::Area,
        Goal::Delay => mapper::Goal::Delay,
        Goal::Balanced => mapper::Goal::Balanced,
    }
}

/// Checks `mapped` against `original` by simulation (or not at all); full
/// proofs go through [`crate::proof::prove`]. A difference is an internal
/// error: the mapper produced a wrong circuit.
fn check(original: &Network, mapped: &Network, mode: VerifyMode) -> Result<Verified, StudyError> {
    let mode = match mode {
        VerifyMode::Full => netlist::VerifyMode::Full,
        VerifyMode::Sim => netlist::VerifyMode::Sim,
        VerifyMode::None => netlist::VerifyMode::None,
    };
    netlist::verify(original, mapped, mode)
        .map_err(|e| StudyError::Internal(format!("mapped circuit fails verification: {e}")))
}

/// Maps `network` on `library`, checks and measures it. `benchmark` is the
/// name the tables show.
///
/// Errors: [`StudyError::Input`] when the library cannot implement the
/// network or the options are out of range; [`StudyError::Internal`] when
/// the mapped circuit fails its check.
pub fn evaluate(
    benchmark: &str,
    network: &Network,
    library: &Library,
    options: &EvaluateOptions,
) -> Result<StudyRecord, StudyError> {
    let mut map_options = MapOptions {
        goal: mapper_goal(options.goal),
        ..MapOptions::default()
    };
    if let Some(k) = options.cut_size {
        map_options.cut_size = k as usize;
    }
    if let Some(c) = options.cuts_per_node {
        map_options.cuts_per_node = c as usize;
    }
    let mut seconds = IndexMap::new();
    let start = Instant::now();
    let outcome = mapper::map_detailed(network, library, &map_options)
        .map_err(|e| StudyError::Input(format!("{benchmark} on {}: {e}", library.name)))?;
    let mapped = outcome.netlist;
    seconds.insert("map".to_string(), start.elapsed().as_secs_f64());

    let start = Instant::now();
    let verified = if options.verify == VerifyMode::Full {
        // The mapper's witness proves its own output in linear time.
        crate::proof::prove(network, &mapped, library, &outcome.witness)
            .map(|(verified, _)| verified)
            .map_err(|e| StudyError::Internal(format!("mapped circuit fails verification: {e}")))
    } else {
        check(network, &mapped.to_network(library), options.verify)
    };
    let verified = verified.map_err(|e| match e {
        StudyError::Internal(m) => {
            StudyError::Internal(format!("{benchmark} on {}: {m}", library.name))
        }
        other => other,
    })?;
    seconds.insert("verify".to_string(), start.elapsed().as_secs_f64());

    let start = Instant::now();
    let timing = netlist::analyze_timing(&mapped, library);
    seconds.insert("timing".to_string(), start.elapsed().as_secs_f64());

    let start = Instant::now();
    let energy = mapped_energy(&mapped, library, &options.stimulus)
        .map_err(|e| StudyError::Internal(format!("{benchmark} on {}: {e}", library.name)))?;
    seconds.insert("energy".to_string(), start.elapsed().as_secs_f64());

    let report = Report::new(
        &mapped,
        library,
        options.goal.as_str(),
        &timing,
        verified,
        seconds,
    );
    let mut value = serde_json::to_value(&report)
        .map_err(|e| StudyError::Internal(format!("cannot serialise report: {e}")))?;
    if let serde_json::Value::Object(m) = &mut value {
        m.insert("benchmark".into(), benchmark.into());
        m.insert("energy_per_op".into(), energy.energy_per_op.into());
        m.insert("static_power".into(), energy.static_power.into());
        if let Some(serde_json::Value::Object(units)) = m.get_mut("units") {
            units.insert("energy".into(), library.units.energy.clone().into());
            units.insert("power".into(), library.units.power.clone().into());
        }
    }
    let mut record = StudyRecord::from_json(value)
        .map_err(|e| StudyError::Internal(format!("map report lacks a field: {e}")))?;
    record.majority_cells = count_majority_cells(&record.cells, library);
    Ok(record)
}

/// Evaluates every benchmark on every library (benchmark-major order, the
/// libraries in the given order), in parallel on the current rayon pool.
/// Stops at the first error.
pub fn compare(
    benchmarks: &[(String, Network)],
    libraries: &[Library],
    options: &EvaluateOptions,
) -> Result<Vec<StudyRecord>, StudyError> {
    compare_reporting(benchmarks, libraries, options, || {})
}

/// [`compare`], calling `done` after each benchmark × library pair (from
/// the worker threads), for a progress display.
pub fn compare_reporting(
    benchmarks: &[(String, Network)],
    libraries: &[Library],
    options: &EvaluateOptions,
    done: impl Fn() + Sync,
) -> Result<Vec<StudyRecord>, StudyError> {
    use rayon::prelude::*;
    let pairs: Vec<(usize, usize)> = (0..benchmarks.len())
        .flat_map(|b| (0..libraries.len()).map(move |l| (b, l)))
        .collect();
    pairs
        .par_iter()
        .map(|&(b, l)| {
            let record = evaluate(&benchmarks[b].0, &benchmarks[b].1, &libraries[l], options);
            done();
            record
        })
        .collect()
}
