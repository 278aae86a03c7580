//! `yieldshift fit`: fit the curve parameter of gauged catchments to observed flows.

use std::path::PathBuf;
use yieldshift::input::observed::read_observed;
use yieldshift::input::scenario::load_scenario;
use yieldshift::model::fit::{Cover, FitSettings, MAX_MOVING_AVERAGE_YR};
use yieldshift::plot::Formats;
use yieldshift::run::fit::{self, parse_donor, FitOptions};
use yieldshift::{Error, Problem};

/// Most bootstrap resamples accepted.
pub const MAX_BOOTSTRAP: usize = 100_000;
/// Fewest bootstrap resamples accepted (other than 0, which means no interval).
pub const MIN_BOOTSTRAP: usize = 100;

/// Arguments of `fit`.
#[derive(clap::Args, Debug)]
pub struct FitArgs {
    /// Scenario file (TOML); its climate table must cover the gauged years.
    pub scenario: PathBuf,
    /// Observed annual flows (CSV: catchment, year, flow_mm or flow_m3).
    #[arg(long, value_name = "CSV")]
    pub observed: PathBuf,
    /// Output folder (created; replaced atomically if it holds an earlier yieldshift output).
    #[arg(long, value_name = "DIR")]
    pub out: PathBuf,
    /// Replace a non-empty output folder that is not a yieldshift output.
    #[arg(long)]
    pub force: bool,
    /// Which cover's curve parameter to fit; the other is held at its scenario value.
    #[arg(long, value_enum, default_value = "grass")]
    pub parameter: ParameterArg,
    /// Moving average (years) applied to observed and simulated yields in the annual-series fit.
    #[arg(long, value_name = "YEARS", default_value_t = 1)]
    pub moving_average_yr: usize,
    /// Bootstrap resamples of the record years for the interval (0 = none).
    #[arg(long, value_name = "N", default_value_t = 1000)]
    pub bootstrap: usize,
    /// Seed of the bootstrap's random numbers (same seed, same interval).
    #[arg(long, default_value_t = 1)]
    pub seed: u64,
    /// Give an ungauged catchment a gauged catchment's fitted values in calibration.toml (repeatable).
    #[arg(long, value_name = "UNGAUGED=GAUGED")]
    pub donor: Vec<String>,
    /// Print nothing but errors.
    #[arg(long, short)]
    pub quiet: bool,
}

/// `--parameter` values.
#[derive(Debug, Clone, Copy, clap::ValueEnum)]
pub enum ParameterArg {
    /// Grass/tussock: `w_grass` (zhang) or `omega_grass` (fu).
    Grass,
    /// Forest: `w_forest` (zhang) or `omega_forest` (fu).
    Forest,
}

/// Checks the numeric options and parses `--donor`; every problem together.
fn options(a: &FitArgs) -> yieldshift::Result<FitOptions> {
    let mut p = Vec::new();
    if a.moving_average_yr == 0 || a.moving_average_yr > MAX_MOVING_AVERAGE_YR {
        p.push(
            Problem::new(format!("{} is out of range; allowed 1 to {MAX_MOVING_AVERAGE_YR} years", a.moving_average_yr))
                .option("--moving-average-yr"),
        );
    }
    if a.bootstrap != 0 && !(MIN_BOOTSTRAP..=MAX_BOOTSTRAP).contains(&a.bootstrap) {
        p.push(
            Problem::new(format!(
                "{} is out of range; allowed 0 (no interval) or {MIN_BOOTSTRAP} to {MAX_BOOTSTRAP} resamples",
                a.bootstrap
            ))
            .option("--bootstrap"),
        );
    }
    let mut donors = Vec::new();
    for d in &a.donor {
        match parse_donor(d) {
            Ok(d) => donors.push(d),
            // The problem names the option; say so however the parser placed it.
            Err(e) => p.push(e.option("--donor")),
        }
    }
    if !p.is_empty() {
        return Err(Error::Invalid(p));
    }
    Ok(FitOptions {
        out: a.out.clone(),
        force: a.force,
        cover: match a.parameter {
            ParameterArg::Grass => Cover::Grass,
            ParameterArg::Forest => Cover::Forest,
        },
        settings: FitSettings { moving_average_yr: a.moving_average_yr, bootstrap_samples: a.bootstrap, seed: a.seed, level: 0.95 },
        donors,
        formats: Formats::default(),
    })
}

/// Runs `yieldshift fit`.
pub fn run(a: &FitArgs) -> anyhow::Result<()> {
    let opts = options(a)?;
    let scenario = load_scenario(&a.scenario)?;
    let observed = read_observed(&a.observed, &scenario)?;
    if !a.quiet {
        for l in &observed.left_out {
            say!("note: {}, row {}: {} {} left out: {}", a.observed.display(), l.row, l.catchment, l.year, l.reason)?;
        }
    }
    let outcome = fit::run(&scenario, &observed, &opts)?;
    if !a.quiet {
        say!(
            "{}: fitted {} of {} catchments ({}, method {})",
            scenario.title,
            outcome.fitted.len(),
            scenario.catchments.len(),
            outcome.fitted.first().map(|f| f.fit.key).unwrap_or(""),
            scenario.params.curves.method_name()
        )?;
        for f in &outcome.fitted {
            let c = &scenario.catchments[f.index];
            let iv = f.fit.interval.map(|i| format!(", {:.0}% interval {:.3}–{:.3}", i.level * 100.0, i.low, i.high)).unwrap_or_default();
            say!(
                "  {:<16} {} {:.3} → {:.4} (series fit {:.4}{iv}); NSE {}, KGE {}, PBIAS {} %, RMSE {} mm; {} years",
                c.id,
                f.fit.key,
                f.fit.scenario_value,
                f.fit.mean.value,
                f.fit.series.value,
                yieldshift::schema::numbers::opt_num(f.skill.nse, 3),
                yieldshift::schema::numbers::opt_num(f.skill.kge.map(|k| k.kge), 3),
                yieldshift::schema::numbers::opt_num(f.skill.pbias_pct, 2),
                yieldshift::schema::numbers::opt_num(f.skill.rmse_mm, 1),
                f.record.years().len()
            )?;
        }
        if !outcome.ungauged.is_empty() {
            say!("  ungauged (keep scenario values unless given a donor): {}", outcome.ungauged.join(", "))?;
        }
        say!("wrote {} (fit.csv, fit_years.csv, left_out.csv, calibration.toml, {} figures)", outcome.out.display(), outcome.figures)?;
        say!("PBIAS > 0 means the simulation overestimates. Screening estimates only; see run_info.json for cautions.")?;
    }
    Ok(())
}
