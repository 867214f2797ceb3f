//! Running many study jobs in parallel into a resumable results file.
//!
//! [`run_jobs`] is the engine behind `ribbonmap study`: it skips jobs whose
//! plan key is already in the results file, runs the rest on a rayon thread
//! pool, appends each finished result as one line the moment it is ready,
//! and shows a progress bar on standard error only when that is a terminal.
//! What a job does is a closure, so the engine is independent of the mapper
//! and is tested on its own.

use super::plan::Job;
use super::record::{StudyError, StudyRecord};
use super::results::ResultsFile;
use std::collections::HashSet;
use std::io::IsTerminal;
use std::sync::Mutex;

/// How to run a set of jobs.
#[derive(Clone, Debug, Default)]
pub struct RunOptions {
    /// Worker threads (`None`: one per core).
    pub threads: Option<usize>,
    /// Show a progress bar (only drawn when standard error is a terminal).
    pub progress: bool,
}

/// What a study run did.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct StudySummary {
    /// Jobs in the plan (or shard).
    pub jobs: usize,
    /// Jobs skipped because their result was already in the file.
    pub skipped: usize,
    /// Jobs run and written.
    pub completed: usize,
    /// Jobs that failed: plan key, benchmark label and error.
    pub failures: Vec<(String, String, StudyError)>,
}

/// Runs `jobs` not yet in `existing` with `run_one`, appending each result to
/// `results` as soon as it is ready. A failing job is recorded in the
/// summary and not written, so a later run retries it; the other jobs go on.
/// An error writing the results file stops the study run.
pub fn run_jobs<F>(
    jobs: &[Job],
    existing: &HashSet<String>,
    results: &ResultsFile,
    options: &RunOptions,
    label: impl Fn(&Job) -> String + Sync,
    run_one: F,
) -> Result<StudySummary, StudyError>
where
    F: Fn(&Job) -> Result<StudyRecord, StudyError> + Sync,
{
    use rayon::prelude::*;
    let todo: Vec<&Job> = jobs
        .iter()
        .filter(|j| !existing.contains(&j.plan_key))
        .collect();
    let mut summary = StudySummary {
        jobs: jobs.len(),
        skipped: jobs.len() - todo.len(),
        ..Default::default()
    };
    let bar = if options.progress && std::io::stderr().is_terminal() {
        let bar = indicatif::ProgressBar::new(todo.len() as u64);
        if let Ok(style) = indicatif::ProgressStyle::with_template(
            "{elapsed_precise} [{bar:40}] {pos}/{len} {msg}",
        ) {
            bar.set_style(style.progress_chars("=> "));
        }
        Some(bar)
    } else {
        None
    };
    let mut builder = rayon::ThreadPoolBuilder::new();
    if let Some(n) = options.threads {
        builder = builder.num_threads(n.max(1));
    }
    let pool = builder
        .build()
        .map_err(|e| StudyError::Internal(format!("cannot start worker threads: {e}")))?;
    let failures = Mutex::new(Vec::new());
    let write_error: Mutex<Option<String>> = Mutex::new(None);
    let completed = std::sync::atomic::AtomicUsize::new(0);
    pool.install(|| {
        todo.par_iter().for_each(|job| {
            if write_error.lock().map(|e| e.is_some()).unwrap_or(true) {
                return;
            }
            let name = label(job);
            if let Some(bar) = &bar {
                bar.set_message(name.clone());
            }
            match run_one(job) {
                Ok(mut record) => {
                    record.plan_key = Some(job.plan_key.clone());
                    if let Err(e) = results.append(&record.to_json_line()) {
                        if let Ok(mut w) = write_error.lock() {
                            *w = Some(format!("{}: {e}", results.path().display()));
                        }
                    } else {
                        completed.fetch_add(1, std::sync::atomic::Ordering::Relaxed);
                    }
                }
                Err(e) => {
                    if let Ok(mut f) = failures.lock() {
                        f.push((job.plan_key.clone(), name, e));
                    }
                }
            }
            if let Some(bar) = &bar {
                bar.inc(1);
            }
        });
    });
    if let Some(bar) = bar {
        bar.finish_and_clear();
    }
    if let Some(e) = write_error.into_inner().ok().flatten() {
        return Err(StudyError::Input(format!("cannot write results: {e}")));
    }
    summary.completed = completed.into_inner();
    summary.failures = failures.into_inner().unwrap_or_default();
    summary.failures.sort_by(|a, b| a.0.cmp(&b.0));
    Ok(summary)
}
