//! One study job: map a network on a library, check the result, measure it.
//!
//! [`evaluate`] is what `compare` and every `study` job run: technology
//! mapping with the given goal, a check of the mapped circuit against the
//! source (a proof with the equivalence checker, or random simulation),
//! static timing, the switching-activity energy model, and the count of
//! majority-class cells. The result is a [`StudyRecord`] whose fields are the
//! `map` report's plus the study's own. [`compare`] runs it for every
//! benchmark × library pair in parallel. With a required noise margin
//! (`min_margin_mv`) the mapping is margin-aware, as `map --min-margin`
//! ([`crate::device::margin::map_with_margin`]), on a characterised
//! library whose level model ([`LibraryLevels`]) the caller loads once.

use super::mapped_energy::mapped_energy;
use super::plan::{Goal, VerifyMode};
use super::power::Stimulus;
use super::record::{count_majority_cells, StudyError, StudyRecord};
use crate::device::levels::{LevelModel, LevelOptions};
use crate::library::electrical::ElectricalData;
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
    /// Noise margin every net must keep, millivolts (`None`: plain
    /// mapping). Needs the library's [`LibraryLevels`].
    pub min_margin_mv: Option<f64>,
}

/// What margin-aware evaluation needs of a characterised library: its
/// level model (tables and thresholds) and electrical blocks.
#[derive(Clone, Debug)]
pub struct LibraryLevels {
    /// Level model built from the library's tables.
    pub model: LevelModel,
    /// The library's electrical data.
    pub data: ElectricalData,
}

impl LibraryLevels {
    /// Loads the tables of `library`, read from `spec` (a file, or a
    /// built-in name); an error for a library without electrical data.
    pub fn load(library: &Library, spec: &str) -> Result<LibraryLevels, StudyError> {
        let (models, data) =
            crate::device::spice::load_spec_models(library, spec).map_err(|e| {
                StudyError::Input(format!("min_margin needs a characterised library: {e}"))
            })?;
        Ok(LibraryLevels {
            model: LevelModel::new(library, &models, &data),
            data,
        })
    }
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
            min_margin_mv: None,
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
    evaluate_with_levels(benchmark, network, library, None, options)
}

/// [`evaluate`] with the library's level model, which a required margin
/// (`options.min_margin_mv`) needs. The record then carries
/// `min_margin_mv` and the `margin` object of the map report; a margin
/// that cannot be kept is recorded (`margin.holds` false), not an error.
pub fn evaluate_with_levels(
    benchmark: &str,
    network: &Network,
    library: &Library,
    levels: Option<&LibraryLevels>,
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
    let (outcome, margin) = match options.min_margin_mv {
        None => (
            mapper::map_detailed(network, library, &map_options)
                .map_err(|e| StudyError::Input(format!("{benchmark} on {}: {e}", library.name)))?,
            None,
        ),
        Some(mv) => {
            let levels = levels.ok_or_else(|| {
                StudyError::Input(format!(
                    "{benchmark} on {}: min_margin needs a characterised library",
                    library.name
                ))
            })?;
            let m = crate::device::margin::map_with_margin(
                network,
                library,
                &levels.model,
                &levels.data,
                &map_options,
                mv / 1e3,
                &LevelOptions::default(),
            )
            .map_err(|e| StudyError::Input(format!("{benchmark} on {}: {e}", library.name)))?;
            (m.outcome.clone(), Some(m))
        }
    };
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
        if let Some(margin) = &margin {
            m.insert("min_margin_mv".into(), (margin.min_margin_v * 1e3).into());
            m.insert("margin".into(), margin.summary_json(library));
        }
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
    compare_with_levels(benchmarks, libraries, &[], options, done)
}

/// [`compare_reporting`] with each library's level model (`levels[l]` for
/// `libraries[l]`; missing entries are `None`), for a required margin.
pub fn compare_with_levels(
    benchmarks: &[(String, Network)],
    libraries: &[Library],
    levels: &[Option<LibraryLevels>],
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
            let record = evaluate_with_levels(
                &benchmarks[b].0,
                &benchmarks[b].1,
                &libraries[l],
                levels.get(l).and_then(Option::as_ref),
                options,
            );
            done();
            record
        })
        .collect()
}
