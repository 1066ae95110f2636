//! Command-line front end: clap parses raw flags ([`args`]), one function per command turns them
//! into checked options and chains the library stages, and this module maps outcomes to exit
//! codes. Only this layer prints.

pub mod args;
mod demo;
mod estimate;
pub use estimate::write_annotated;
mod inspect;
mod model_options;
mod plan;
mod progress;
mod study;

/// Prints a report on stdout as pretty JSON (`--json`) or text; the outcome is `Warnings` when
/// the report has any.
fn print_report(
    json: bool,
    to_json: impl FnOnce() -> serde_json::Value,
    write_text: impl FnOnce(&mut dyn std::io::Write) -> std::io::Result<()>,
    has_warnings: bool,
) -> Result<Outcome> {
    let stdout = std::io::stdout();
    let mut out = stdout.lock();
    if json {
        serde_json::to_writer_pretty(&mut out, &to_json())?;
        writeln!(out)?;
    } else {
        write_text(&mut out)?;
    }
    Ok(if has_warnings {
        Outcome::Warnings
    } else {
        Outcome::Ok
    })
}

use anyhow::Result;
use args::{Cli, Command};
use clap::Parser;
use std::io::Write as _;
use std::process::ExitCode;

/// How a command finished.
#[derive(Copy, Clone, Debug, PartialEq, Eq)]
pub enum Outcome {
    /// Everything as expected.
    Ok,
    /// Finished, but the user should read the warnings.
    Warnings,
}

/// Parses the command line, runs the command, prints errors, returns the exit code:
/// 0 ok, 1 finished with warnings, 2 error (including bad usage).
pub fn main_exit_code() -> ExitCode {
    let cli = match Cli::try_parse() {
        Ok(cli) => cli,
        Err(e) => {
            let code = if e.use_stderr() { 2 } else { 0 };
            let _ = e.print();
            return ExitCode::from(code);
        }
    };
    match run(cli) {
        Ok(Outcome::Ok) => ExitCode::from(0),
        Ok(Outcome::Warnings) => ExitCode::from(1),
        Err(e) => {
            eprintln!("error: {e}");
            for cause in e.chain().skip(1) {
                eprintln!("  caused by: {cause}");
            }
            ExitCode::from(2)
        }
    }
}

/// Runs a parsed command line.
pub fn run(cli: Cli) -> Result<Outcome> {
    if let Some(threads) = cli.threads {
        anyhow::ensure!(
            threads > 0,
            "--threads {threads}: expected a positive number of threads"
        );
        // Fails only if a pool was already built (tests calling run twice): keep the first.
        let _ = rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build_global();
    }
    crate::io::set_sync_outputs(cli.sync);
    crate::io::set_cached_writes(cli.cached_writes);
    match cli.command {
        Command::Inspect(a) => inspect::run(&a, cli.json),
        Command::Estimate(a) => estimate::run(&a, cli.json, cli.quiet),
        Command::Plan(a) => plan::run(&a, cli.json, cli.quiet),
        Command::Study(a) => study::run(&a, cli.json, cli.quiet),
        Command::Demo(a) => demo::run(&a),
    }
}
