//! Calibration end to end: a validated [`Scenario`] and its [`ObservedFlows`] in,
//! the output folder out — `fit.csv`, `fit_years.csv`, `left_out.csv`,
//! `calibration.toml`, `run_info.json` and `figures/`.
//!
//! Every gauged catchment is fitted ([`crate::model::fit`]) before anything is
//! written; if any catchment cannot be fitted, every such problem is returned
//! together and no output is left behind. Results are staged in a temporary
//! folder and moved into place only when everything succeeded
//! ([`crate::output::outdir`]).

use crate::error::{Error, Problem, Result};
use crate::input::observed::{LeftOut, ObservedFlows, ObservedSeries};
use crate::input::scenario::Scenario;
use crate::model::budyko::CoverCurves;
use crate::model::fit::{Bound, CatchmentFit, Cover, FitError, FitSettings, GaugeRecord};
use crate::model::skill::Skill;
use crate::model::uncertainty::stable_hash;
use crate::output::outdir::Staging;
use crate::output::tables::{self, CsvOut};
use crate::plot::fit::{BudykoChart, FitSeries, Mark, YieldFitChart};
use crate::plot::{palette, save_figure, Formats};
use crate::schema::numbers::{num, opt_num};
use crate::schema::run_info::FitRunInfo;
use crate::schema::{columns, file_stem};
use std::fmt::Write as _;
use std::path::{Path, PathBuf};

/// The sign convention of percent bias, as written in every output.
pub const PBIAS_CONVENTION: &str =
    "pbias_pct = 100·Σ(simulated − observed)/Σ observed; positive = the simulation overestimates yield (hydroeval and Moriasi et al. 2007 use the opposite sign)";

/// Cautions specific to calibration, written with the general ones.
pub const FIT_CAUTIONS: &str = "Fitted values describe the gauged record with today's cover held over it; a mean-annual \
curve applied to single years ignores storage carry-over, and the bootstrap treats years as independent, so intervals \
are narrower than the real uncertainty when years are persistent. Check the gauge record (rating changes, abstractions, \
inflows from outside the catchment) before relying on a fitted value.";

/// An ungauged catchment that takes a gauged catchment's fitted values.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Donor {
    /// The ungauged catchment's id.
    pub ungauged: String,
    /// The gauged (fitted) catchment's id.
    pub gauged: String,
}

/// Options of a calibration run.
#[derive(Debug, Clone)]
pub struct FitOptions {
    /// Output folder.
    pub out: PathBuf,
    /// Replace a non-empty folder that is not a yieldshift output.
    pub force: bool,
    /// Which cover's parameter is fitted.
    pub cover: Cover,
    /// Moving average, bootstrap and seed.
    pub settings: FitSettings,
    /// Donors for ungauged catchments (written into `calibration.toml`).
    pub donors: Vec<Donor>,
    /// Figure formats.
    pub formats: Formats,
}

/// One fitted catchment.
#[derive(Debug, Clone)]
pub struct FittedCatchment {
    /// Index in `Scenario::catchments`.
    pub index: usize,
    /// The record fitted.
    pub record: GaugeRecord,
    /// The fits.
    pub fit: CatchmentFit,
    /// Statistics of the annual yields simulated with the long-term mean fit.
    pub skill: Skill,
    /// Statistics of the annual yields simulated with the value before fitting.
    pub skill_scenario: Skill,
    /// Observations left out.
    pub years_left_out: usize,
    /// Years whose PET came from the catchment's long-term mean.
    pub years_mean_pet: usize,
}

/// What a calibration run produced.
#[derive(Debug, Clone)]
pub struct FitOutcome {
    /// The output folder.
    pub out: PathBuf,
    /// Fitted catchments, in catchment-table order.
    pub fitted: Vec<FittedCatchment>,
    /// Ids of catchments with no observations.
    pub ungauged: Vec<String>,
    /// Observations left out in all.
    pub left_out: usize,
    /// Figures drawn.
    pub figures: usize,
}

/// Parses `UNGAUGED=GAUGED` (the `--donor` argument).
pub fn parse_donor(text: &str) -> std::result::Result<Donor, Problem> {
    match text.split_once('=') {
        Some((u, g)) if !u.trim().is_empty() && !g.trim().is_empty() && !g.contains('=') => {
            Ok(Donor { ungauged: u.trim().to_string(), gauged: g.trim().to_string() })
        }
        _ => Err(Problem::new(format!("'{text}' is not UNGAUGED=GAUGED (two catchment ids joined by '=')")).option("--donor")),
    }
}

/// Seed of one catchment's bootstrap: the run's seed mixed with the catchment id
/// ([`stable_hash`]), so a catchment's interval does not depend on which others are gauged.
pub fn catchment_seed(seed: u64, id: &str) -> u64 {
    seed ^ stable_hash(id)
}

fn first_row(s: &ObservedSeries) -> usize {
    s.rows.iter().copied().min().unwrap_or(1)
}

fn left_out_text(left: &[&LeftOut]) -> String {
    if left.is_empty() {
        return String::new();
    }
    let mut t = String::from("; left out:");
    for l in left.iter().take(6) {
        let _ = write!(t, " {} (row {}): {};", l.year, l.row, l.reason);
    }
    if left.len() > 6 {
        let _ = write!(t, " and {} more;", left.len() - 6);
    }
    t.pop();
    t
}

/// Fits every gauged catchment. Returns all problems together when any cannot be fitted.
pub fn fit_catchments(scenario: &Scenario, observed: &ObservedFlows, cover: Cover, settings: &FitSettings) -> Result<Vec<FittedCatchment>> {
    let mut problems = Vec::new();
    let mut out = Vec::new();
    for s in &observed.series {
        let c = &scenario.catchments[s.catchment];
        let years: Vec<_> = s.years.iter().map(|y| (y.year, y.climate, y.flow_mm)).collect();
        let left: Vec<&LeftOut> = observed.left_out.iter().filter(|l| l.catchment == c.id).collect();
        let located =
            |msg: String| Problem::in_file(&observed.path, format!("catchment '{}': {msg}", c.id)).row(first_row(s)).column("catchment");
        let record = match GaugeRecord::for_catchment(c, &scenario.params, cover, &years) {
            Ok(r) => r,
            Err(e) => {
                problems.push(located(format!("{e}{}", left_out_text(&left))));
                continue;
            }
        };
        let settings = FitSettings { seed: catchment_seed(settings.seed, &c.id), ..*settings };
        match record.fit(&settings) {
            Ok(fit) => {
                let obs = record.observed_yield_mm();
                let sim = record.simulated_yield_mm(fit.mean.value);
                let sim0 = record.simulated_yield_mm(fit.scenario_value);
                let skill = Skill::compute(&sim, &obs).map_err(|e| Error::Other(format!("statistics of '{}': {e}", c.id)))?;
                let skill_scenario = Skill::compute(&sim0, &obs).map_err(|e| Error::Other(format!("statistics of '{}': {e}", c.id)))?;
                out.push(FittedCatchment {
                    index: s.catchment,
                    record,
                    fit,
                    skill,
                    skill_scenario,
                    years_left_out: left.len(),
                    years_mean_pet: s.years.iter().filter(|y| y.pet_from_mean).count(),
                });
            }
            Err(e) => {
                let hint = match (&e, cover) {
                    (FitError::MeanYieldAboveCurve { .. } | FitError::MeanYieldBelowCurve { .. }, Cover::Forest) => format!(
                        " (the catchment's canopy fraction is {:.3}, so its forest parameter moves the yield little; consider --parameter grass)",
                        record.canopy_fraction()
                    ),
                    _ => String::new(),
                };
                problems.push(located(format!("{e}{hint}{}", left_out_text(&left))))
            }
        }
    }
    if problems.is_empty() {
        Ok(out)
    } else {
        Err(Error::Invalid(problems))
    }
}

/// Checks `--donor` pairs against the scenario and the fitted catchments.
pub fn check_donors(scenario: &Scenario, fitted: &[FittedCatchment], donors: &[Donor]) -> Vec<Problem> {
    let ids: Vec<&str> = scenario.catchments.iter().map(|c| c.id.as_str()).collect();
    let fitted_ids: Vec<&str> = fitted.iter().map(|f| scenario.catchments[f.index].id.as_str()).collect();
    let mut problems = Vec::new();
    let mut seen: Vec<&str> = Vec::new();
    for d in donors {
        let at = |m: String| Problem::new(m).option("--donor");
        if !ids.contains(&d.ungauged.as_str()) {
            problems.push(at(format!(
                "'{}' is not a catchment of the scenario{}",
                d.ungauged,
                crate::input::table::suggestion(&d.ungauged, &ids)
            )));
        } else if fitted_ids.contains(&d.ungauged.as_str()) {
            problems.push(at(format!("'{}' is gauged and has its own fitted value; a donor is only for ungauged catchments", d.ungauged)));
        } else if seen.contains(&d.ungauged.as_str()) {
            problems.push(at(format!("'{}' is given a donor more than once", d.ungauged)));
        }
        seen.push(d.ungauged.as_str());
        if !fitted_ids.contains(&d.gauged.as_str()) {
            let hint = if fitted_ids.is_empty() {
                " (no catchment was fitted)".to_string()
            } else {
                crate::input::table::suggestion(&d.gauged, &fitted_ids)
            };
            problems.push(at(format!("donor '{}' is not a fitted (gauged) catchment{hint}", d.gauged)));
        }
    }
    problems
}

/// Runs the calibration and writes every output.
pub fn run(scenario: &Scenario, observed: &ObservedFlows, opts: &FitOptions) -> Result<FitOutcome> {
    let fitted = fit_catchments(scenario, observed, opts.cover, &opts.settings)?;
    let donor_problems = check_donors(scenario, &fitted, &opts.donors);
    if !donor_problems.is_empty() {
        return Err(Error::Invalid(donor_problems));
    }
    if fitted.is_empty() {
        return Err(Error::invalid(Problem::in_file(&observed.path, "has no observations of any catchment of the scenario")));
    }
    let ungauged: Vec<String> =
        scenario.catchments.iter().enumerate().filter(|(i, _)| !fitted.iter().any(|f| f.index == *i)).map(|(_, c)| c.id.clone()).collect();

    let staging = Staging::new(&opts.out, opts.force)?;
    let dir = staging.dir().to_path_buf();
    write_fit_csv(&dir.join("fit.csv"), scenario, &fitted)?;
    write_years_csv(&dir.join("fit_years.csv"), scenario, &fitted)?;
    write_left_out_csv(&dir.join("left_out.csv"), &observed.left_out)?;
    let snippet = calibration_toml(scenario, observed, &fitted, &opts.donors, &opts.settings);
    let cal = dir.join("calibration.toml");
    crate::output::outdir::write_atomic(&cal, snippet.as_bytes())?;
    let fig_dir = dir.join("figures");
    std::fs::create_dir_all(&fig_dir).map_err(|e| Error::io("creating figures/", e))?;
    let mut figures = 0;
    for f in &fitted {
        figures += draw_figures(&fig_dir, scenario, f, opts.formats)?;
    }
    tables::write_run_info(&dir, &run_info(scenario, observed, opts, &fitted, &ungauged))?;
    let out = staging.commit()?;
    Ok(FitOutcome { out, fitted, ungauged, left_out: observed.left_out.len(), figures })
}

fn write_fit_csv(path: &Path, s: &Scenario, fitted: &[FittedCatchment]) -> Result<()> {
    let mut w = CsvOut::create(path, &columns::fit::COLUMNS)?;
    for f in fitted {
        let c = &s.catchments[f.index];
        let years = f.record.years();
        let iv = f.fit.interval;
        let mut notes = Vec::new();
        if let Some(iv) = iv {
            if iv.at_bound > 0 {
                notes.push(format!("{} of {} resamples had a mean impossible for the curve and count at a bound", iv.at_bound, iv.samples));
            }
        }
        if f.years_mean_pet > 0 {
            notes.push(format!("PET from the long-term mean in {} year(s)", f.years_mean_pet));
        }
        let fields: Vec<String> = vec![
            c.id.clone(),
            c.name.clone(),
            f.record.curves().method_name().to_string(),
            f.fit.key.to_string(),
            num(f.fit.scenario_value, 6),
            num(f.fit.mean.value, 10),
            num(f.fit.series.value, 10),
            iv.map(|i| num(i.level, 3)).unwrap_or_default(),
            iv.map(|i| num(i.low, 6)).unwrap_or_default(),
            iv.map(|i| num(i.high, 6)).unwrap_or_default(),
            iv.map(|i| i.samples.to_string()).unwrap_or_else(|| "0".into()),
            iv.map(|i| i.at_bound.to_string()).unwrap_or_default(),
            opt_num(f.skill.nse, 6),
            opt_num(f.skill.kge.map(|k| k.kge), 6),
            opt_num(f.skill.kge.map(|k| k.r), 6),
            opt_num(f.skill.kge.map(|k| k.alpha), 6),
            opt_num(f.skill.kge.map(|k| k.beta), 6),
            opt_num(f.skill.pbias_pct, 4),
            opt_num(f.skill.rmse_mm, 3),
            opt_num(f.skill_scenario.nse, 6),
            opt_num(f.skill_scenario.kge.map(|k| k.kge), 6),
            opt_num(f.skill_scenario.pbias_pct, 4),
            opt_num(f.skill_scenario.rmse_mm, 3),
            num(f.fit.mean.observed_mm, 3),
            num(f.fit.mean.simulated_mm, 3),
            num(f.fit.mean.rain_mm, 3),
            num(f.record.canopy_fraction(), 6),
            f.fit.series.window_yr.to_string(),
            f.fit.series.windows.to_string(),
            years.first().map(|y| y.year.to_string()).unwrap_or_default(),
            years.last().map(|y| y.year.to_string()).unwrap_or_default(),
            years.len().to_string(),
            f.years_left_out.to_string(),
            f.years_mean_pet.to_string(),
            match f.fit.series.at_bound {
                Some(Bound::Lower) => "lower".into(),
                Some(Bound::Upper) => "upper".into(),
                None => String::new(),
            },
            notes.join("; "),
        ];
        w.row(fields.iter().map(String::as_str))?;
    }
    w.finish()
}

fn write_years_csv(path: &Path, s: &Scenario, fitted: &[FittedCatchment]) -> Result<()> {
    let mut w = CsvOut::create(path, &columns::fit_years::COLUMNS)?;
    for f in fitted {
        let id = &s.catchments[f.index].id;
        let sim = f.record.simulated_yield_mm(f.fit.mean.value);
        let sim0 = f.record.simulated_yield_mm(f.fit.scenario_value);
        for ((y, q), q0) in f.record.years().iter().zip(&sim).zip(&sim0) {
            let fields = [
                id.clone(),
                y.year.to_string(),
                num(y.rain_mm, 1),
                num(y.pet_mm, 1),
                num(y.observed_yield_mm, 3),
                num(*q, 3),
                num(*q0, 3),
                num(q - y.observed_yield_mm, 3),
                num(1.0 - y.observed_yield_mm / y.rain_mm, 6),
                num(y.pet_mm / y.rain_mm, 6),
            ];
            w.row(fields.iter().map(String::as_str))?;
        }
    }
    w.finish()
}

fn write_left_out_csv(path: &Path, left: &[LeftOut]) -> Result<()> {
    let mut w = CsvOut::create(path, &columns::left_out::COLUMNS)?;
    for l in left {
        let fields = [l.catchment.clone(), l.year.to_string(), l.row.to_string(), l.reason.to_string()];
        w.row(fields.iter().map(String::as_str))?;
    }
    w.finish()
}

/// A TOML float as the toml crate's serializer writes it: reads back to
/// exactly `v`, always with a decimal point.
fn toml_float(v: f64) -> String {
    toml::Value::Float(v).to_string()
}

/// A TOML string as the toml crate's serializer writes it: quoted and escaped,
/// so any id (with `"`, `\` or control characters) reads back as it is.
fn toml_str(s: &str) -> String {
    toml::Value::String(s.to_string()).to_string()
}

/// Text for a `#` comment: line breaks (which would end the comment) become spaces.
fn comment(s: &str) -> String {
    s.chars().map(|c| if c.is_control() { ' ' } else { c }).collect()
}

/// The `[[calibration]]` snippet: fitted values for gauged catchments, donor
/// entries for `--donor` pairs, and commented hints for other ungauged catchments.
// Over 100 lines on purpose: the snippet is written line by line in file order, comments included; the order of the code is the order of the file.
pub fn calibration_toml(
    scenario: &Scenario,
    observed: &ObservedFlows,
    fitted: &[FittedCatchment],
    donors: &[Donor],
    settings: &FitSettings,
) -> String {
    let mut t = String::new();
    let method = scenario.params.curves.method_name();
    let key = fitted.first().map(|f| f.fit.key).unwrap_or("");
    let _ = writeln!(t, "# [[calibration]] entries written by yieldshift fit {}.", env!("CARGO_PKG_VERSION"));
    let _ = writeln!(t, "# Scenario: {}", comment(&scenario.path.display().to_string()));
    let _ = writeln!(t, "# Observed flows: {}", comment(&observed.path.display().to_string()));
    let _ = writeln!(
        t,
        "# Method {method}: {key} fitted so that each gauged catchment's mean simulated yield over its record equals the\n\
         # mean observed yield (long-term mean fit), other parameters as in the scenario. Paste these entries into the\n\
         # scenario file, replacing any earlier [[calibration]] entries for the same catchments."
    );
    for f in fitted {
        let c = &scenario.catchments[f.index];
        let fitted_curves = f.record.curves_with(f.fit.mean.value);
        let years = f.record.years();
        let _ = writeln!(t);
        let _ = writeln!(t, "[[calibration]]");
        let _ = writeln!(t, "catchment = {}", toml_str(&c.id));
        let _ = writeln!(t, "{} = {}", f.fit.key, toml_float(f.fit.mean.value));
        // A held parameter that differs from [hydrology] (an earlier calibration) is kept.
        for (k, v, base) in parameter_pairs(&fitted_curves, &scenario.params.curves) {
            if k != f.fit.key && v != base {
                let _ = writeln!(t, "{k} = {}   # held at its earlier calibrated value", toml_float(v));
            }
        }
        let _ = write!(
            t,
            "# {}: {} years used ({}–{}), {} left out; scenario value {}",
            comment(&c.name),
            years.len(),
            years.first().map(|y| y.year).unwrap_or(0),
            years.last().map(|y| y.year).unwrap_or(0),
            f.years_left_out,
            crate::schema::numbers::recorded(f.fit.scenario_value)
        );
        let _ = writeln!(t);
        if let Some(iv) = f.fit.interval {
            let _ = writeln!(
                t,
                "# {:.0}% bootstrap interval {:.4}–{:.4} ({} resamples of the record years, seed {}); annual-series fit {:.4}{}",
                iv.level * 100.0,
                iv.low,
                iv.high,
                iv.samples,
                settings.seed,
                f.fit.series.value,
                if f.fit.series.window_yr > 1 { format!(" ({}-year moving average)", f.fit.series.window_yr) } else { String::new() }
            );
            if iv.low < f.fit.mean.value && f.fit.mean.value < iv.high {
                let _ = writeln!(
                    t,
                    "# for ensembles, the interval as a distribution (replace the line above):\n# {} = {{ dist = \"pert\", min = {}, mode = {}, max = {} }}",
                    f.fit.key,
                    toml_float(iv.low),
                    toml_float(f.fit.mean.value),
                    toml_float(iv.high)
                );
            }
        } else {
            let _ = writeln!(t, "# annual-series fit {:.4}", f.fit.series.value);
        }
        let _ = writeln!(
            t,
            "# annual statistics with this value: NSE {}, KGE {}, PBIAS {} % (positive = overestimate), RMSE {} mm",
            opt_num(f.skill.nse, 3),
            opt_num(f.skill.kge.map(|k| k.kge), 3),
            opt_num(f.skill.pbias_pct, 2),
            opt_num(f.skill.rmse_mm, 1)
        );
    }
    let donor_of = |id: &str| donors.iter().find(|d| d.ungauged == id);
    for d in donors {
        let _ = writeln!(t);
        let _ = writeln!(t, "[[calibration]]");
        let _ = writeln!(t, "catchment = {}", toml_str(&d.ungauged));
        let _ = writeln!(t, "donor = {}   # ungauged: takes {}'s fitted values", toml_str(&d.gauged), comment(&d.gauged));
    }
    let rest: Vec<&crate::model::Catchment> = scenario
        .catchments
        .iter()
        .enumerate()
        .filter(|(i, c)| !fitted.iter().any(|f| f.index == *i) && donor_of(&c.id).is_none())
        .map(|(_, c)| c)
        .collect();
    if !rest.is_empty() && !fitted.is_empty() {
        let _ = writeln!(t);
        let _ = writeln!(
            t,
            "# Ungauged catchments keep the [hydrology] values. To give one a gauged catchment's fitted values, uncomment its\n\
             # entry (the donor suggested is the gauged catchment closest in long-term aridity index E0/P; choose on local knowledge)."
        );
        for c in rest {
            let phi = c.pet_mm / c.rain_mm;
            let nearest = fitted
                .iter()
                .map(|f| &scenario.catchments[f.index])
                .min_by(|a, b| ((a.pet_mm / a.rain_mm) - phi).abs().total_cmp(&((b.pet_mm / b.rain_mm) - phi).abs()));
            if let Some(n) = nearest {
                let _ = writeln!(t, "# [[calibration]]");
                let _ = writeln!(t, "# catchment = {}", toml_str(&c.id));
                let _ = writeln!(t, "# donor = {}", toml_str(&n.id));
            }
        }
    }
    t
}

fn parameter_pairs(c: &CoverCurves, base: &CoverCurves) -> Vec<(&'static str, f64, f64)> {
    let get = |cv: &CoverCurves, cover: Cover| cover.value(cv);
    let same_method = std::mem::discriminant(c) == std::mem::discriminant(base);
    [Cover::Grass, Cover::Forest]
        .into_iter()
        .map(|cv| (cv.key(c), get(c, cv), if same_method { get(base, cv) } else { f64::NAN }))
        .collect()
}

fn run_info(s: &Scenario, observed: &ObservedFlows, opts: &FitOptions, fitted: &[FittedCatchment], ungauged: &[String]) -> FitRunInfo {
    use crate::schema::run_info as ri;
    FitRunInfo {
        bootstrap_samples: opts.settings.bootstrap_samples,
        catchments_fitted: fitted.iter().map(|f| s.catchments[f.index].id.clone()).collect(),
        catchments_ungauged: ungauged.to_vec(),
        cautions: format!("{} {}", crate::schema::CAUTIONS, FIT_CAUTIONS),
        climate_table: s.climate_path.as_ref().map(|p| p.display().to_string()),
        command: ri::FIT_COMMAND.into(),
        cover_fitted: opts.cover.name().into(),
        donors: opts.donors.iter().map(|d| ri::DonorInfo { gauged: d.gauged.clone(), ungauged: d.ungauged.clone() }).collect(),
        hydrology_method: s.params.curves.method_name().into(),
        interval_level: opts.settings.level,
        moving_average_yr: opts.settings.moving_average_yr,
        observations_left_out: observed.left_out.len(),
        observed_flows: observed.path.display().to_string(),
        parameter: fitted.first().map(|f| f.fit.key.to_string()),
        pbias_convention: PBIAS_CONVENTION.into(),
        scenario: s.path.display().to_string(),
        seed: opts.settings.seed,
        statistics: "nse, kge, pbias_pct, rmse_mm compare annual yields simulated with value_mean_fit to the observed; *_scenario columns use the value before fitting".into(),
        title: s.title.clone(),
        tool: ri::TOOL.into(),
        value_written: "value_mean_fit (long-term mean fit)".into(),
        version: env!("CARGO_PKG_VERSION").into(),
    }
}

// Over 100 lines on purpose: two figures of one catchment from the same series; the setup is shared.
fn draw_figures(dir: &Path, s: &Scenario, f: &FittedCatchment, formats: Formats) -> Result<usize> {
    let c = &s.catchments[f.index];
    let stem = file_stem(&c.id);
    let key = f.fit.key;
    let years = f.record.years();
    let obs = f.record.observed_yield_mm();
    let sim = f.record.simulated_yield_mm(f.fit.mean.value);
    let sim0 = f.record.simulated_yield_mm(f.fit.scenario_value);
    // Year axis with breaks where years are missing.
    let with_gaps = |vals: &[f64]| -> Vec<(f64, Option<f64>)> {
        let mut pts = Vec::with_capacity(vals.len() + 4);
        for (i, (y, v)) in years.iter().zip(vals).enumerate() {
            if i > 0 && y.year != years[i - 1].year + 1 {
                pts.push((y.year as f64 - 0.5, None));
            }
            pts.push((y.year as f64, Some(*v)));
        }
        pts
    };
    let notes_common = |skill: &Skill, label: &str| -> Vec<String> {
        vec![
            format!("{label}:"),
            format!("  NSE {}  KGE {}", opt_num(skill.nse, 2), opt_num(skill.kge.map(|k| k.kge), 2)),
            format!("  PBIAS {} %  RMSE {} mm", opt_num(skill.pbias_pct, 1), opt_num(skill.rmse_mm, 0)),
        ]
    };
    let mut notes = notes_common(&f.skill, &format!("Fitted {key} = {:.3}", f.fit.mean.value));
    notes.extend(notes_common(&f.skill_scenario, &format!("Scenario {key} = {:.3}", f.fit.scenario_value)));
    notes.push("PBIAS > 0: simulation overestimates".into());
    if let Some(iv) = f.fit.interval {
        notes.push(format!("{:.0}% interval {:.3}–{:.3}", iv.level * 100.0, iv.low, iv.high));
    }
    notes.push(format!("Cover held at canopy fraction {:.3}", f.record.canopy_fraction()));
    let chart = YieldFitChart {
        title: format!("{} — observed and simulated annual yield", c.name),
        series: vec![
            FitSeries { label: "Observed".into(), points: with_gaps(&obs), colour: palette::series(2), mark: Mark::Points },
            FitSeries {
                label: format!("Fitted, {key} = {:.3}", f.fit.mean.value),
                points: with_gaps(&sim),
                colour: palette::YIELD,
                mark: Mark::Line,
            },
            FitSeries {
                label: format!("Scenario, {key} = {:.3}", f.fit.scenario_value),
                points: with_gaps(&sim0),
                colour: palette::series(1),
                mark: Mark::Dashed,
            },
        ],
        notes,
    };
    save_figure(&chart, &dir.join(format!("{stem}_fit_yield")), formats)?;

    let phis: Vec<f64> = years.iter().map(|y| y.pet_mm / y.rain_mm).collect();
    let ratios: Vec<f64> = years.iter().map(|y| 1.0 - y.observed_yield_mm / y.rain_mm).collect();
    let phi_max = phis.iter().copied().fold(1.0, f64::max) * 1.15;
    let curve = |v: f64| -> Vec<(f64, Option<f64>)> {
        (0..=200)
            .map(|i| {
                let phi = phi_max * i as f64 / 200.0;
                (phi, Some(f.record.evaporative_ratio(v, phi)))
            })
            .collect()
    };
    let n = years.len() as f64;
    let mean_rain = years.iter().map(|y| y.rain_mm).sum::<f64>() / n;
    let mean_pet = years.iter().map(|y| y.pet_mm).sum::<f64>() / n;
    let mean_q = obs.iter().sum::<f64>() / n;
    let budyko = BudykoChart {
        title: format!("{} — record in Budyko space", c.name),
        series: vec![
            FitSeries {
                label: format!("Fitted curve, {key} = {:.3}", f.fit.mean.value),
                points: curve(f.fit.mean.value),
                colour: palette::YIELD,
                mark: Mark::Line,
            },
            FitSeries {
                label: format!("Scenario curve, {key} = {:.3}", f.fit.scenario_value),
                points: curve(f.fit.scenario_value),
                colour: palette::series(1),
                mark: Mark::Dashed,
            },
            FitSeries {
                label: "Observed years".into(),
                points: phis.iter().zip(&ratios).map(|(&x, &y)| (x, Some(y))).collect(),
                colour: palette::series(2),
                mark: Mark::Points,
            },
            FitSeries {
                label: "Record mean".into(),
                points: vec![(mean_pet / mean_rain, Some(1.0 - mean_q / mean_rain))],
                colour: palette::DENSE,
                mark: Mark::BigPoint,
            },
        ],
        notes: vec![
            "ET/P observed = 1 − Q/P of each year".into(),
            format!("Curves: catchment mix at canopy fraction {:.3}", f.record.canopy_fraction()),
            "Grey dashed: limits ET = E0 and ET = P".into(),
            format!("{} years, {}–{}", years.len(), years.first().map(|y| y.year).unwrap_or(0), years.last().map(|y| y.year).unwrap_or(0)),
        ],
    };
    save_figure(&budyko, &dir.join(format!("{stem}_budyko")), formats)?;
    Ok(2)
}
