//! `ribbonmap study`: run every job of a plan (or one shard of them) and
//! append one result line per finished job, resuming where a previous run
//! stopped.

use super::common::counted;
use super::compare::cli_error;
use super::{CliError, CmdResult, EXIT_OK};
use crate::study::run::{run_study, StudyOptions};
use crate::study::{Plan, RunOptions, Shard, StudyError};
use std::path::PathBuf;

/// Arguments of `ribbonmap study`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// The plan file (JSON: benchmarks, libraries, goals, options).
    #[arg(value_name = "PLAN.json")]
    plan: PathBuf,
    /// Run only shard I of N (1-based), e.g. from a job array:
    /// --shard $SLURM_ARRAY_TASK_ID/$SLURM_ARRAY_TASK_COUNT.
    #[arg(long, value_name = "I/N")]
    shard: Option<Shard>,
    /// Worker threads, 1 to 1024 (default: one per core).
    #[arg(long, value_name = "N", value_parser = clap::builder::RangedU64ValueParser::<usize>::new().range(1..=1024))]
    jobs: Option<usize>,
    /// Results file; finished jobs are appended, and jobs already in it are
    /// skipped.
    #[arg(
        short = 'o',
        long = "output",
        value_name = "RESULTS.jsonl",
        default_value = "results.jsonl"
    )]
    output: PathBuf,
}

/// Runs the command.
pub fn run(args: Args) -> CmdResult {
    let plan = Plan::load(&args.plan)?;
    let options = StudyOptions {
        shard: args.shard,
        run: RunOptions {
            threads: args.jobs,
            progress: true,
        },
    };
    let summary = run_study(&plan, &args.output, &options).map_err(cli_error)?;
    eprintln!(
        "study: {}{}, {} already in {}, {} done, {} failed",
        counted(summary.jobs as u64, "job"),
        match args.shard {
            Some(s) => format!(" in shard {}/{}", s.index, s.count),
            None => String::new(),
        },
        summary.skipped,
        args.output.display(),
        summary.completed,
        summary.failures.len()
    );
    for (key, name, error) in &summary.failures {
        eprintln!("error: job {key} ({name}): {error}");
    }
    match summary
        .failures
        .iter()
        .find(|(_, _, e)| matches!(e, StudyError::Internal(_)))
        .or(summary.failures.first())
    {
        None => Ok(EXIT_OK),
        Some((_, _, StudyError::Internal(m))) => Err(CliError::Internal(m.clone())),
        Some((_, _, StudyError::Input(m))) => Err(CliError::Input(format!(
            "{} failed; first: {m}",
            counted(summary.failures.len() as u64, "job")
        ))),
    }
}
