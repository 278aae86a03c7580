//! The `yieldshift` command line (clap derive). Exit codes are decided in one
//! place, [`main`]: 0 success, 2 invalid input or usage, 1 any other failure.

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
    /// Fit the water-balance curve parameter of gauged catchments to observed annual flows.
    Fit(fit::FitArgs),
    /// Compute reference evapotranspiration (FAO-56) from weather records.
    Pet(pet::PetArgs),
    /// Regenerate report.html, report.md and the report's figures from a run folder.
    Report(report::ReportArgs),
}

/// Runs the command line and returns the process exit code.
pub fn main() -> ExitCode {
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
        Err(e) => {
            eprintln!("error: {e:#}");
            ExitCode::from(exit_code(&e))
        }
    }
}

/// 2 for invalid input, 1 otherwise.
pub fn exit_code(e: &anyhow::Error) -> u8 {
    match e.downcast_ref::<crate::Error>() {
        Some(err) if err.is_invalid_input() => 2,
        _ if e.chain().any(|c| c.downcast_ref::<crate::Error>().is_some_and(crate::Error::is_invalid_input)) => 2,
        _ => 1,
    }
}
