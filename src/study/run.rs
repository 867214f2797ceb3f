//! Running a study plan end to end: load its libraries and benchmarks, then
//! evaluate every job of the chosen shard into the results file.
//!
//! The plan is checked whole before any job runs: every library of the plan
//! is loaded and every generated benchmark's parameters are checked (also
//! those of other shards and of jobs already done), so a bad plan stops the
//! study run at once (exit 2) instead of after hours of work or on another
//! machine. Of the netlist files only those the shard still needs are read.

use super::evaluate::{evaluate_with_levels, EvaluateOptions, LibraryLevels};
use super::jobs::{run_jobs, RunOptions, StudySummary};
use super::plan::{BenchmarkSource, Plan, Shard, VerifyMode};
use super::power::{Stimulus, DEFAULT_PATTERNS};
use super::record::StudyError;
use super::results::ResultsFile;
use crate::generate::{generate, Family, Params};
use crate::library::Library;
use crate::network::Network;
use std::collections::{BTreeMap, HashMap};
use std::path::Path;

/// Options of [`run_study`].
#[derive(Clone, Debug, Default)]
pub struct StudyOptions {
    /// Run only this share of the jobs.
    pub shard: Option<Shard>,
    /// Worker threads and progress display.
    pub run: RunOptions,
}

/// Loads a library given as a built-in name or a file.
pub fn load_library(spec: &str) -> Result<Library, StudyError> {
    if let Some(lib) = Library::builtin(spec) {
        return Ok(lib);
    }
    Library::load(Path::new(spec)).map_err(|e| StudyError::Input(e.to_string()))
}

/// Builds a generated benchmark from its plan parameters (`width`
/// required; `style` and `carry_in` optional).
pub fn generate_benchmark(
    family: &str,
    params: &BTreeMap<String, serde_json::Value>,
) -> Result<Network, StudyError> {
    let what = || format!("benchmark {{\"generate\": \"{family}\", ...}}");
    let family: Family = family
        .parse()
        .map_err(|e| StudyError::Input(format!("{}: {e}", what())))?;
    let mut p = Params::default();
    let mut width = None;
    for (key, value) in params {
        match key.as_str() {
            "width" => {
                width = value.as_u64().and_then(|w| u32::try_from(w).ok());
                if width.is_none() {
                    return Err(StudyError::Input(format!(
                        "{}: width must be a positive integer, found {value}",
                        what()
                    )));
                }
            }
            "style" => {
                let s = value.as_str().ok_or_else(|| {
                    StudyError::Input(format!("{}: style must be a string", what()))
                })?;
                p.style = Some(s.to_string());
            }
            "carry_in" => {
                p.carry_in = value.as_bool().ok_or_else(|| {
                    StudyError::Input(format!("{}: carry_in must be true or false", what()))
                })?;
            }
            other => {
                return Err(StudyError::Input(format!(
                    "{}: unknown parameter '{other}' (expected width, style, carry_in)",
                    what()
                )))
            }
        }
    }
    p.width = width.ok_or_else(|| StudyError::Input(format!("{}: a width is required", what())))?;
    generate(family, &p).map_err(|e| StudyError::Input(format!("{}: {e}", what())))
}

/// Reads or generates a plan benchmark.
pub fn load_benchmark(source: &BenchmarkSource) -> Result<Network, StudyError> {
    match source {
        BenchmarkSource::File(path) => {
            crate::io::read_netlist(path, &Default::default()).map_err(StudyError::from)
        }
        BenchmarkSource::Generate { family, params } => generate_benchmark(family, params),
    }
}

/// The evaluation options a plan asks for (verification defaults to a
/// proof).
pub fn plan_evaluate_options(plan: &Plan, goal: super::plan::Goal) -> EvaluateOptions {
    let o = &plan.options;
    EvaluateOptions {
        goal,
        cut_size: o.cut_size,
        cuts_per_node: o.cuts_per_node,
        verify: o.verify.unwrap_or(VerifyMode::Full),
        stimulus: Stimulus::Random {
            probability: o.input_probability.unwrap_or(0.5),
            patterns: o.patterns.unwrap_or(DEFAULT_PATTERNS),
            seed: 1,
        },
        min_margin_mv: o.min_margin,
    }
}

/// Runs the plan's jobs (or one shard of them) not yet in `results`,
/// appending one line per finished job. Returns what was done; failed jobs
/// are listed in the summary and not written.
pub fn run_study(
    plan: &Plan,
    results_path: &Path,
    options: &StudyOptions,
) -> Result<StudySummary, StudyError> {
    let jobs = plan.shard_jobs(options.shard);
    let mut libraries: HashMap<usize, Library> = HashMap::new();
    let mut levels: HashMap<usize, LibraryLevels> = HashMap::new();
    for (index, spec) in plan.libraries.iter().enumerate() {
        let at = |err: StudyError| {
            let (line, column) = spec.position;
            StudyError::Input(format!(
                "{}:{line}:{column}: library '{}': {err}",
                plan.path.display(),
                spec.spec
            ))
        };
        let lib = load_library(&spec.load).map_err(at)?;
        if plan.options.min_margin.is_some() {
            levels.insert(index, LibraryLevels::load(&lib, &spec.load).map_err(at)?);
        }
        libraries.insert(index, lib);
    }
    let mut benchmarks: HashMap<usize, Network> = HashMap::new();
    for (index, b) in plan.benchmarks.iter().enumerate() {
        if let BenchmarkSource::Generate { family, params } = &b.source {
            let network = generate_benchmark(family, params).map_err(|err| {
                let (line, column) = b.position;
                StudyError::Input(format!("{}:{line}:{column}: {err}", plan.path.display()))
            })?;
            benchmarks.insert(index, network);
        }
    }
    // The results file is opened (and created) only once the plan's
    // libraries and generated circuits are known to load.
    let (results, existing) = ResultsFile::open(results_path)?;
    if existing.repaired_bytes > 0 {
        eprintln!(
            "note: {}: removed an unfinished last line ({} bytes) left by an interrupted run",
            results_path.display(),
            existing.repaired_bytes
        );
    }
    let todo: Vec<&super::plan::Job> = jobs
        .iter()
        .filter(|j| !existing.keys.contains(&j.plan_key))
        .collect();
    for job in &todo {
        if let std::collections::hash_map::Entry::Vacant(e) = benchmarks.entry(job.benchmark) {
            let b = &plan.benchmarks[job.benchmark];
            let network = load_benchmark(&b.source)?;
            e.insert(network);
        }
    }
    run_jobs(
        &jobs,
        &existing.keys,
        &results,
        &options.run,
        |job| plan.benchmarks[job.benchmark].name.clone(),
        |job| {
            let bench = &plan.benchmarks[job.benchmark];
            let (Some(network), Some(library)) =
                (benchmarks.get(&job.benchmark), libraries.get(&job.library))
            else {
                return Err(StudyError::Internal("job inputs were not loaded".into()));
            };
            let mut record = evaluate_with_levels(
                &bench.name,
                network,
                library,
                levels.get(&job.library),
                &plan_evaluate_options(plan, job.goal),
            )?;
            record.extra.insert(
                "library_spec".into(),
                plan.libraries[job.library].spec.clone().into(),
            );
            record
                .extra
                .insert("benchmark_spec".into(), bench.spec.clone().into());
            let goal_index = plan.goals.iter().position(|g| *g == job.goal).unwrap_or(0);
            record.extra.insert(
                "plan_position".into(),
                serde_json::json!([job.benchmark, job.library, goal_index]),
            );
            Ok(record)
        },
    )
}
