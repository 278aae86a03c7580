//! The `yieldshift` command line (clap derive). Exit codes are decided in one
//! place, [`main`]: 0 success, 2 invalid input or usage, 1 any other failure.
//! A closed output pipe (`yieldshift curve ... | head -0`) ends the program
//! quietly with 0: everything is written through [`say!`], which returns the
//! write error instead of panicking.

/// `println!` that returns the write error (so a closed pipe is not a panic).
macro_rules! say {
    ($($arg:tt)*) => {{
        use std::io::Write as _;
        writeln!(std::io::stdout().lock(), $($arg)*)
    }};
}

mod curve;
mod fit;
pub mod pet;
mod report;
mod run;

use clap::{Parser, Subcommand};
use std::process::ExitCode;

/// Screening projections of water-yield loss and contaminant dilution as invading
/// conifers spread over tussock and grass catchments.
#[derive(Debug, Parser)]
#[command(name = "yieldshift", version, about, long_about = None)]
pub struct Cli {
    /// What to do.
    #[command(subcommand)]
    pub command: Command,
}

/// Subcommands.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// Project a scenario year by year and write CSV tables and figures.
    Run(run::RunArgs),
    /// Validate a scenario and every table it names; writes nothing.
    Check(run::CheckArgs),
    /// Evaluate the water-balance curve at one point.
    Curve(curve::CurveArgs),
    /// Combine the output folders of a sharded run (`run --shard K/N`) into one.
    Merge(run::MergeArgs),
    /// Fit the water-balance curve parameter of gauged catchments to observed annual flows, or to long-term means (--mean-annual) with a regional distribution.
    Fit(fit::FitArgs),
    /// Compute reference evapotranspiration (FAO-56) from weather records.
    Pet(pet::PetArgs),
    /// Regenerate report.html, report.md and the report's figures from a run folder.
    Report(report::ReportArgs),
}

/// Runs the command line and returns the process exit code.
pub(crate) fn main() -> ExitCode {
    let cli = match Cli::try_parse() {
        Ok(c) => c,
        Err(e) => {
            let code = if e.use_stderr() { 2 } else { 0 };
            let _ = e.print();
            return ExitCode::from(code);
        }
    };
    let result = match &cli.command {
        Command::Run(a) => run::run(a),
        Command::Check(a) => run::check(a),
        Command::Curve(a) => curve::run(a),
        Command::Fit(a) => fit::run(a),
        Command::Merge(a) => run::merge(a),
        Command::Pet(a) => pet::run(a),
        Command::Report(a) => report::run(a),
    };
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) if closed_pipe(&e) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("error: {e:#}");
            ExitCode::from(exit_code(&e))
        }
    }
}

/// 2 for invalid input, 1 otherwise.
fn exit_code(e: &anyhow::Error) -> u8 {
    if e.chain().any(|c| c.downcast_ref::<yieldshift::Error>().is_some_and(yieldshift::Error::is_invalid_input)) {
        2
    } else {
        1
    }
}

/// True when the failure is standard output closed by its reader (`| head`).
fn closed_pipe(e: &anyhow::Error) -> bool {
    e.chain().any(|c| c.downcast_ref::<std::io::Error>().is_some_and(|io| io.kind() == std::io::ErrorKind::BrokenPipe))
}
