//! Progress of long proofs, shown only to a person watching a terminal.
//!
//! Exhaustive simulation of a 24-input miter or algebraic rewriting of a
//! 64 x 64 multiplier takes seconds; a bar on standard error tells the user
//! the tool is working. Nothing is drawn when standard error is not a
//! terminal (pipes, files, tests), and short proofs finish before the bar
//! appears. Bars are drawn only once [`show_progress`] was called: the
//! `equiv` command asks for them, while commands that run proofs under a
//! bar of their own (`compare`, `study`) leave them off so that two bars
//! never overwrite each other's line.

use std::io::IsTerminal;
use std::sync::atomic::{AtomicBool, AtomicU64, Ordering};
use std::time::{Duration, Instant};

/// Whether proofs draw their own progress bars (see the module comment).
static SHOWN: AtomicBool = AtomicBool::new(false);

/// Lets the proofs of this process draw progress bars on a terminal.
pub fn show_progress() {
    SHOWN.store(true, Ordering::Relaxed);
}

/// Delay before the bar appears.
const SHOW_AFTER: Duration = Duration::from_millis(700);

/// A progress counter, drawn as a bar on a terminal after a short delay.
/// Safe to advance from many threads.
pub(crate) struct Progress {
    bar: Option<indicatif::ProgressBar>,
    started: Instant,
    done: AtomicU64,
}

impl Progress {
    /// A counter of `total` steps labelled `what`.
    pub fn new(what: &str, total: u64) -> Progress {
        let shown = SHOWN.load(Ordering::Relaxed) && std::io::stderr().is_terminal();
        let bar = shown.then(|| {
            let bar = indicatif::ProgressBar::hidden();
            bar.set_length(total);
            if let Ok(style) =
                indicatif::ProgressStyle::with_template("{msg} [{bar:40}] {percent}% {elapsed}")
            {
                bar.set_style(style.progress_chars("=> "));
            }
            bar.set_message(what.to_string());
            bar
        });
        Progress {
            bar,
            started: Instant::now(),
            done: AtomicU64::new(0),
        }
    }

    /// Counts `steps` more steps done.
    pub fn advance(&self, steps: u64) {
        let done = self.done.fetch_add(steps, Ordering::Relaxed) + steps;
        if let Some(bar) = &self.bar {
            if bar.is_hidden() && self.started.elapsed() >= SHOW_AFTER {
                bar.set_draw_target(indicatif::ProgressDrawTarget::stderr());
            }
            bar.set_position(done);
        }
    }

    /// Removes the bar.
    pub fn finish(&self) {
        if let Some(bar) = &self.bar {
            bar.finish_and_clear();
        }
    }
}
