//! A stage display on stderr for long runs, shown only when stderr is a terminal.

use indicatif::{ProgressBar, ProgressStyle};
use std::io::IsTerminal;
use std::time::Duration;

/// Shows the current stage of a multi-stage command.
pub struct Stages {
    bar: Option<ProgressBar>,
}

impl Stages {
    /// A display with `total` stages; hidden when `quiet` or stderr is not a terminal.
    pub fn new(total: u64, quiet: bool) -> Self {
        if quiet || !std::io::stderr().is_terminal() {
            return Self { bar: None };
        }
        let bar = ProgressBar::new(total);
        if let Ok(style) =
            ProgressStyle::with_template("{spinner} [{elapsed_precise}] {bar:30} {pos}/{len} {msg}")
        {
            bar.set_style(style);
        }
        bar.enable_steady_tick(Duration::from_millis(120));
        Self { bar: Some(bar) }
    }

    /// Starts the next stage.
    pub fn stage(&self, message: &'static str) {
        if let Some(bar) = &self.bar {
            bar.set_message(message);
            bar.inc(1);
        }
    }

    /// Removes the display.
    pub fn finish(&self) {
        if let Some(bar) = &self.bar {
            bar.finish_and_clear();
        }
    }
}
