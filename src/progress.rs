//! Progress on a terminal: spinners per stage, timings with `--verbose`, silence with `--quiet`.
//!
//! Bars draw on stderr only when it is a terminal, so piped and batch runs stay clean.

use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};
use std::time::{Duration, Instant};

/// How much a run reports on stderr.
#[derive(Debug, Clone, Copy, Default)]
pub struct Progress {
    /// No bars and no notes.
    pub quiet: bool,
    /// Stage timings and extra detail.
    pub verbose: bool,
}

/// One running stage; finishing (or dropping) it clears its spinner and logs its time in verbose mode.
pub struct Stage {
    name: &'static str,
    bar: ProgressBar,
    start: Instant,
    verbose: bool,
}

impl Progress {
    /// Starts a stage with a spinner.
    pub fn stage(&self, name: &'static str) -> Stage {
        let bar = if self.quiet {
            ProgressBar::hidden()
        } else {
            let b = ProgressBar::with_draw_target(None, ProgressDrawTarget::stderr());
            b.set_style(
                ProgressStyle::with_template("{spinner} {msg} {elapsed}")
                    .unwrap_or_else(|_| ProgressStyle::default_spinner()),
            );
            b.set_message(name);
            b.enable_steady_tick(Duration::from_millis(120));
            b
        };
        Stage {
            name,
            bar,
            start: Instant::now(),
            verbose: self.verbose && !self.quiet,
        }
    }

    /// Prints a note on stderr unless quiet (through [`say`]: a closed stderr is not an error).
    pub fn note(&self, msg: &str) {
        if !self.quiet {
            crate::say!("{msg}");
        }
    }
}

impl Stage {
    /// Updates the spinner's message.
    pub fn set_message(&self, msg: String) {
        self.bar.set_message(msg);
    }
}

impl Drop for Stage {
    fn drop(&mut self) {
        self.bar.finish_and_clear();
        if self.verbose {
            crate::say!(
                "{:>10.3} s  {}{}",
                self.start.elapsed().as_secs_f64(),
                self.name,
                peak_memory_mb()
                    .map(|m| format!("  (peak memory so far {m} MB)"))
                    .unwrap_or_default()
            );
        }
    }
}

/// The process's peak resident memory so far in MB, where the system tells (Linux /proc).
pub fn peak_memory_mb() -> Option<u64> {
    let status = std::fs::read_to_string("/proc/self/status").ok()?;
    let line = status.lines().find(|l| l.starts_with("VmHWM:"))?;
    let kb: u64 = line.split_whitespace().nth(1)?.parse().ok()?;
    Some(kb / 1024)
}

/// With `REKNIT_MEM_TRACE` set (a profiling aid, Linux only): prints the resident memory now and
/// its peak since the previous mark, then resets the peak (`/proc/self/clear_refs` 5) so each
/// line tells what one step held. The reset also lowers what `--verbose` and GNU time report as
/// the run's peak: measure the peak in a run without it.
pub fn mem_mark(label: &str) {
    if std::env::var_os("REKNIT_MEM_TRACE").is_none() {
        return;
    }
    let status = std::fs::read_to_string("/proc/self/status").unwrap_or_default();
    let get = |k: &str| {
        status
            .lines()
            .find(|l| l.starts_with(k))
            .and_then(|l| l.split_whitespace().nth(1)?.parse::<u64>().ok())
            .unwrap_or(0)
            / 1024
    };
    say(format_args!(
        "MEM {label:<40} now {:>6} MB  peak {:>6} MB",
        get("VmRSS:"),
        get("VmHWM:")
    ));
    let _ = std::fs::write("/proc/self/clear_refs", "5");
}

/// Writes one line on stderr and ignores a failure: a stderr whose reader has gone
/// (`reknit … 2>&1 | head -1`) must neither stop the run nor change its exit code, as the
/// standard `eprintln!` would by panicking.
pub fn say(args: std::fmt::Arguments) {
    use std::io::Write;
    let _ = writeln!(std::io::stderr().lock(), "{args}");
}

/// [`say`] with `format!` arguments: the one way reknit writes a line to stderr.
#[macro_export]
macro_rules! say {
    ($($t:tt)*) => {
        $crate::progress::say(format_args!($($t)*))
    };
}
