//! A progress bar on standard error for long yield runs: only on a terminal, only once a run
//! has taken more than a second, redrawn at most ten times a second.

use std::io::{IsTerminal, Write};
use std::sync::Mutex;
use std::time::{Duration, Instant};

/// Wait this long before drawing anything.
const QUIET_FOR: Duration = Duration::from_secs(1);
/// Redraw at most this often.
const REDRAW_EVERY: Duration = Duration::from_millis(100);

/// The bar's state; silent when standard error is not a terminal.
#[derive(Debug)]
pub struct Bar {
    enabled: bool,
    stages: usize,
    started: Instant,
    last: Mutex<Option<Instant>>,
}

impl Bar {
    /// A bar for `stages` stages, drawn on standard error when it is a terminal.
    pub fn on_stderr(stages: usize) -> Bar {
        Bar {
            enabled: std::io::stderr().is_terminal(),
            stages,
            started: Instant::now(),
            last: Mutex::new(None),
        }
    }

    /// `done` of `total` builds of stage `index` (from 1) are drawn.
    pub fn update(&self, index: usize, name: &str, done: u64, total: u64) {
        if !self.enabled || self.started.elapsed() < QUIET_FOR {
            return;
        }
        let Ok(mut last) = self.last.lock() else {
            return;
        };
        if last.is_some_and(|t| t.elapsed() < REDRAW_EVERY) && done < total {
            return;
        }
        *last = Some(Instant::now());
        let share = if total == 0 {
            1.0
        } else {
            done as f64 / total as f64
        };
        let width = 30usize;
        let filled = ((share * width as f64).round() as usize).min(width);
        let line = format!(
            "\r\x1b[2Kyield: stage {index}/{} {name:.24} [{}{}] {:>3.0} %",
            self.stages,
            "#".repeat(filled),
            " ".repeat(width - filled),
            share * 100.0
        );
        let mut err = std::io::stderr().lock();
        // A progress line that cannot be written is not worth stopping the run for.
        let _ = err.write_all(line.as_bytes()).and_then(|_| err.flush());
    }

    /// Clear the line, if anything was drawn.
    pub fn finish(&self) {
        let drawn = self.last.lock().map(|l| l.is_some()).unwrap_or(false);
        if self.enabled && drawn {
            let mut err = std::io::stderr().lock();
            let _ = err.write_all(b"\r\x1b[2K").and_then(|_| err.flush());
        }
    }
}
