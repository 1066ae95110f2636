//! A stage display on stderr for long runs, shown only when stderr is a terminal; with the
//! environment variable `HONE_STAGE_TIMES=1` each stage's wall time is printed on stderr instead
//! (for benchmarks; see DEVELOPERS.md).

use indicatif::{ProgressBar, ProgressStyle};
use std::cell::RefCell;
use std::io::IsTerminal;
use std::time::{Duration, Instant};

/// Shows the current stage of a multi-stage command.
pub struct Stages {
    bar: Option<ProgressBar>,
    /// The stage running and when it started, when stage times are asked for.
    timing: Option<RefCell<(&'static str, Instant)>>,
}

impl Stages {
    /// A display with `total` stages; hidden when `quiet` or stderr is not a terminal.
    pub fn new(total: u64, quiet: bool) -> Self {
        let timing = (std::env::var("HONE_STAGE_TIMES").as_deref() == Ok("1"))
            .then(|| RefCell::new(("start", Instant::now())));
        if timing.is_some() || quiet || !std::io::stderr().is_terminal() {
            return Self { bar: None, timing };
        }
        let bar = ProgressBar::new(total);
        if let Ok(style) =
            ProgressStyle::with_template("{spinner} [{elapsed_precise}] {bar:30} {pos}/{len} {msg}")
        {
            bar.set_style(style);
        }
        bar.enable_steady_tick(Duration::from_millis(120));
        Self {
            bar: Some(bar),
            timing,
        }
    }

    /// Prints the time of the stage that just ended, when asked for.
    fn lap(&self, next: &'static str) {
        if let Some(t) = &self.timing {
            let mut t = t.borrow_mut();
            eprintln!("stage {:<40} {:>8.3} s", t.0, t.1.elapsed().as_secs_f64());
            *t = (next, Instant::now());
        }
    }

    /// Starts the next stage.
    pub fn stage(&self, message: &'static str) {
        self.lap(message);
        if let Some(bar) = &self.bar {
            bar.set_message(message);
            bar.inc(1);
        }
    }

    /// Removes the display.
    pub fn finish(&self) {
        self.lap("done");
        if let Some(bar) = &self.bar {
            bar.finish_and_clear();
        }
    }
}
