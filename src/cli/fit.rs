//! `yieldshift fit`: fit the curve parameter of gauged catchments to observed flows
//! (annual records), or to long-term means with a regional distribution (`--mean-annual`).

use std::path::{Path, PathBuf};
use yieldshift::input::mean_annual::read_mean_annual;
use yieldshift::input::observed::read_observed;
use yieldshift::input::scenario::load_scenario;
use yieldshift::model::fit::{Cover, FitSettings, MAX_MOVING_AVERAGE_YR};
use yieldshift::plot::Formats;
use yieldshift::run::fit::{self, parse_donor, FitOptions};
use yieldshift::run::regional::{self, CurveSetup, MeanAnnualOptions, Target};
use yieldshift::{Error, Problem};

/// Most bootstrap resamples accepted.
pub const MAX_BOOTSTRAP: usize = 100_000;
/// Fewest bootstrap resamples accepted (other than 0, which means no interval).
pub const MIN_BOOTSTRAP: usize = 100;

/// Arguments of `fit`.
#[derive(clap::Args, Debug)]
pub struct FitArgs {
    /// Scenario file (TOML). With --observed its climate table must cover the gauged years;
    /// with --mean-annual it is optional and gives the [hydrology] values held in the fit.
    #[arg(required_unless_present = "mean_annual")]
    pub scenario: Option<PathBuf>,
    /// Observed annual flows (CSV: catchment, year, flow_mm or flow_m3).
    #[arg(long, value_name = "CSV", required_unless_present = "mean_annual", conflicts_with = "mean_annual")]
    pub observed: Option<PathBuf>,
    /// Long-term means of gauged catchments (CSV: catchment, rain_mm, pet_mm, flow_mm, forest_fraction[, snow_fraction]):
    /// fit each catchment and write a regional distribution.
    #[arg(long, value_name = "CSV")]
    pub mean_annual: Option<PathBuf>,
    /// Output folder (created; replaced atomically if it holds an earlier yieldshift output).
    #[arg(long, value_name = "DIR")]
    pub out: PathBuf,
    /// Replace a non-empty output folder that is not a yieldshift output.
    #[arg(long)]
    pub force: bool,
    /// Which curve parameter to fit: one cover's (the other held at its scenario value), or with
    /// --mean-annual `catchment`: one curve for the whole catchment.
    #[arg(long, value_enum, default_value = "grass")]
    pub parameter: ParameterArg,
    /// Curve family with --mean-annual and no scenario (a scenario's [hydrology] method decides otherwise).
    #[arg(long, value_enum, requires = "mean_annual")]
    pub method: Option<MethodArg>,
    /// With --mean-annual: leave out catchments whose snow_fraction is above this (0–1; e.g. 0.15).
    #[arg(long, value_name = "FRACTION", requires = "mean_annual")]
    pub max_snow_fraction: Option<f64>,
    /// Moving average (years) applied to observed and simulated yields in the annual-series fit.
    #[arg(long, value_name = "YEARS", default_value_t = 1, conflicts_with = "mean_annual")]
    pub moving_average_yr: usize,
    /// Bootstrap resamples of the record years for the interval (0 = none).
    #[arg(long, value_name = "N", default_value_t = 1000, conflicts_with = "mean_annual")]
    pub bootstrap: usize,
    /// Seed of the bootstrap's random numbers (same seed, same interval).
    #[arg(long, default_value_t = 1, conflicts_with = "mean_annual")]
    pub seed: u64,
    /// Give an ungauged catchment a gauged catchment's fitted values in calibration.toml (repeatable).
    #[arg(long, value_name = "UNGAUGED=GAUGED", conflicts_with = "mean_annual")]
    pub donor: Vec<String>,
    /// Print nothing but errors.
    #[arg(long, short)]
    pub quiet: bool,
}

/// `--method` values.
#[derive(Debug, Clone, Copy, clap::ValueEnum)]
pub enum MethodArg {
    /// Zhang et al. (2001): `w`.
    Zhang,
    /// Fu (1981): `omega`.
    Fu,
}

/// `--parameter` values.
#[derive(Debug, Clone, Copy, clap::ValueEnum)]
pub enum ParameterArg {
    /// Grass/tussock: `w_grass` (zhang) or `omega_grass` (fu).
    Grass,
    /// Forest: `w_forest` (zhang) or `omega_forest` (fu).
    Forest,
    /// With --mean-annual only: one curve for the whole catchment (forest fraction not used).
    Catchment,
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
            ParameterArg::Catchment => {
                return Err(Error::invalid(
                    Problem::new("catchment (one curve for the whole catchment) is only for --mean-annual; use grass or forest")
                        .column("--parameter"),
                ))
            }
        },
        settings: FitSettings { moving_average_yr: a.moving_average_yr, bootstrap_samples: a.bootstrap, seed: a.seed, level: 0.95 },
        donors,
        formats: Formats::default(),
    })
}

/// Runs `yieldshift fit`.
pub fn run(a: &FitArgs) -> anyhow::Result<()> {
    if let Some(table) = &a.mean_annual {
        return run_mean_annual(a, table);
    }
    let (Some(scenario_path), Some(observed_path)) = (&a.scenario, &a.observed) else {
        return Err(Error::invalid(
            Problem::new("give a SCENARIO and --observed FLOWS.csv, or --mean-annual MEANS.csv").column("--observed"),
        )
        .into());
    };
    let opts = options(a)?;
    let scenario = load_scenario(scenario_path)?;
    let observed = read_observed(observed_path, &scenario)?;
    if !a.quiet {
        for l in &observed.left_out {
            say!("note: {}, row {}: {} {} left out: {}", observed_path.display(), l.row, l.catchment, l.year, l.reason)?;
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

/// `yieldshift fit --mean-annual`: every catchment of the table fitted from its long-term
/// means, the left-out ones reported, and the regional distribution written.
fn run_mean_annual(a: &FitArgs, table_path: &Path) -> anyhow::Result<()> {
    let mut p = Vec::new();
    if let Some(m) = a.max_snow_fraction {
        if !(0.0..=1.0).contains(&m) {
            p.push(
                Problem::new(format!("{m} is out of range; allowed 0 to 1 (fraction of precipitation as snow)"))
                    .column("--max-snow-fraction"),
            );
        }
    }
    if a.scenario.is_some() && a.method.is_some() {
        p.push(Problem::new("the scenario's [hydrology] method decides the curve; drop --method or the scenario").column("--method"));
    }
    if !p.is_empty() {
        return Err(Error::Invalid(p).into());
    }
    let target = match a.parameter {
        ParameterArg::Grass => Target::Cover(Cover::Grass),
        ParameterArg::Forest => Target::Cover(Cover::Forest),
        ParameterArg::Catchment => Target::Catchment,
    };
    let setup = match &a.scenario {
        Some(path) => {
            let s = load_scenario(path)?;
            CurveSetup { curves: s.params.curves, forest_pet_factor: s.params.forest_pet_factor, interception: s.params.interception }
        }
        None => CurveSetup::defaults(match a.method {
            Some(MethodArg::Fu) => "fu",
            _ => "zhang",
        }),
    };
    let table = read_mean_annual(table_path)?;
    let opts = MeanAnnualOptions {
        out: a.out.clone(),
        force: a.force,
        target,
        max_snow_fraction: a.max_snow_fraction,
        formats: Formats::default(),
    };
    let outcome = regional::run(&setup, a.scenario.as_deref(), &table, &opts)?;
    if !a.quiet {
        let f = &outcome.fit;
        let label = f.setup.label(f.target);
        say!(
            "{}: fitted {} of {} catchments ({label}, method {}; {})",
            table_path.display(),
            f.fitted.len(),
            f.rows_in_table,
            f.setup.curves.method_name(),
            f.subset()
        )?;
        for (code, n) in f.left_out_by_reason() {
            say!("  left out, {code}: {n}")?;
        }
        if let Some(s) = f.summary {
            let q = s.quantiles;
            say!(
                "  {label}: n {}, mean {:.3}, sd {:.3}, 5/25/50/75/95 % {:.3} / {:.3} / {:.3} / {:.3} / {:.3}",
                s.n,
                s.mean,
                s.sd,
                q[0],
                q[1],
                q[2],
                q[3],
                q[4]
            )?;
        }
        match &f.regional {
            Ok(r) => say!(
                "  regional distribution ({}): {}",
                r.best().shape.name(),
                regional::distribution_toml(&r.best().dist).unwrap_or_default()
            )?,
            Err(e) => say!("  no regional distribution: {e}")?,
        }
        say!("wrote {} (fit_mean_annual.csv, catchments_left_out.csv, regional.csv, regional.toml, figures/)", outcome.out.display())?;
        say!("Screening estimates only; see run_info.json for cautions.")?;
    }
    Ok(())
}
