//! Progress on standard error for commands that can run for seconds or
//! minutes, drawn only when standard error is a terminal (pipes, files and
//! CI stay quiet, as docs/exit-codes.md promises).

use indicatif::{ProgressBar, ProgressStyle};
use std::io::IsTerminal;
use std::time::Duration;

/// A bar counting `len` steps with `message`, or `None` off a terminal.
pub fn bar(len: u64, message: &str) -> Option<ProgressBar> {
    if !std::io::stderr().is_terminal() {
        return None;
    }
    let bar = ProgressBar::new(len);
    if let Ok(style) =
        ProgressStyle::with_template("{msg} {elapsed_precise} [{bar:40}] {pos}/{len}")
    {
        bar.set_style(style.progress_chars("=> "));
    }
    bar.set_message(message.to_string());
    bar.enable_steady_tick(Duration::from_millis(200));
    Some(bar)
}

/// A spinner with `message` and the time elapsed, for work whose size is
/// not known in advance, or `None` off a terminal.
pub fn spinner(message: &str) -> Option<ProgressBar> {
    if !std::io::stderr().is_terminal() {
        return None;
    }
    let bar = ProgressBar::new_spinner();
    if let Ok(style) = ProgressStyle::with_template("{spinner} {msg} ({elapsed})") {
        bar.set_style(style);
    }
    bar.set_message(message.to_string());
    bar.enable_steady_tick(Duration::from_millis(200));
    Some(bar)
}
