//! `yieldshift fit --mean-annual`: fit the curve parameter of every gauged
//! catchment of a mean-annual table from its long-term means, summarise the
//! fitted values over the set, and write a scenario distribution for ungauged
//! catchments — `fit_mean_annual.csv`, `catchments_left_out.csv`, `regional.csv`,
//! `regional.toml`, `run_info.json` and `figures/regional_budyko.png/.svg`.
//!
//! Each catchment is one long-term record ([`GaugeRecord::long_term`]) fitted by
//! the calibration's own long-term mean fit ([`GaugeRecord::fit_mean`]: Brent's root
//! of simulated minus observed flow). A catchment that cannot be fitted — an empty
//! value, more snow than `--max-snow-fraction`, outside the water or energy limit
//! ([`crate::model::regional::limit_violation`]), or outside what the curve gives on
//! the parameter's allowed range — is reported with its reason and left out; it
//! never fails the run. Results are staged and moved into place only when all of
//! them are written ([`crate::output::outdir`]).

use crate::error::{Error, Problem, Result};
use crate::input::mean_annual::{MeanAnnualRow, MeanAnnualTable};
use crate::model::budyko::CoverCurves;
use crate::model::fit::{Cover, FitError, GaugeRecord, GaugeYear, LONG_TERM_YEAR};
use crate::model::interception::CanopyInterception;
use crate::model::params::ParamId;
use crate::model::regional::{self, fit_distribution, limit_violation, RegionalError, RegionalFit, Shape, Summary, QUANTILE_PROBS};
use crate::model::uncertainty::Distribution;
use crate::output::outdir::Staging;
use crate::output::tables::{self, CsvOut};
use crate::plot::fit::{BudykoChart, FitSeries, Mark};
use crate::plot::{palette, save_figure, Formats};
use crate::schema::columns;
use crate::schema::numbers::num;
use crate::schema::run_info::{MeanAnnualFitRunInfo, FIT_COMMAND, MEAN_ANNUAL_FIT_MODE, TOOL};
use std::collections::BTreeMap;
use std::fmt::Write as _;
use std::path::{Path, PathBuf};

/// Cautions of the regional distribution, written with the general ones.
pub const REGIONAL_CAUTIONS: &str = "The regional distribution describes the gauged catchments fitted; it transfers to \
ungauged catchments only as far as they resemble them (the curve parameter is not a fixed property of a landscape: \
Reaver et al. 2022). Long-term means hide storage changes, inflows from outside a catchment and PET estimates tuned to \
flows; check the left-out catchments and the subset before relying on it.";

/// What a mean-annual fit solves for.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Target {
    /// One cover's parameter, the forest fraction mixing the forest and grass curves as projections do.
    Cover(Cover),
    /// One curve for the whole catchment (forest fraction and interception not used): the
    /// catchment-effective parameter that large-sample studies report.
    Catchment,
}

impl Target {
    /// `grass`, `forest` or `catchment`.
    pub fn name(self) -> &'static str {
        match self {
            Target::Cover(c) => c.name(),
            Target::Catchment => "catchment",
        }
    }
}

/// The curves and forest water use a mean-annual fit holds (a scenario's
/// `[hydrology]`, or the parameter table's defaults).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CurveSetup {
    /// Curves before fitting.
    pub curves: CoverCurves,
    /// Forest PET as a multiple of grass PET.
    pub forest_pet_factor: f64,
    /// Canopy interception of the forest share.
    pub interception: CanopyInterception,
}

impl CurveSetup {
    /// The parameter table's defaults for `method` (`zhang` or `fu`; anything else is Zhang's).
    pub fn defaults(method: &str) -> CurveSetup {
        let d = |id: ParamId| id.default_value().unwrap_or(f64::NAN);
        let curves = if method == "fu" {
            CoverCurves::Fu { omega_forest: d(ParamId::OmegaForest), omega_grass: d(ParamId::OmegaGrass) }
        } else {
            CoverCurves::Zhang { w_forest: d(ParamId::WForest), w_grass: d(ParamId::WGrass) }
        };
        let interception = CanopyInterception::new(d(ParamId::InterceptionFraction), d(ParamId::InterceptionDemandShare))
            .unwrap_or(CanopyInterception::DEFAULT);
        CurveSetup { curves, forest_pet_factor: d(ParamId::ForestPetFactor), interception }
    }

    /// Scenario key of the parameter `target` fits (`w_grass` for a whole-catchment Zhang fit).
    pub fn key(&self, target: Target) -> &'static str {
        match target {
            Target::Cover(c) => c.key(&self.curves),
            Target::Catchment => Cover::Grass.key(&self.curves),
        }
    }

    /// Name of the parameter in tables: the key, or `w`/`omega` for a whole-catchment fit.
    pub fn label(&self, target: Target) -> &'static str {
        match (target, self.curves) {
            (Target::Cover(c), _) => c.key(&self.curves),
            (Target::Catchment, CoverCurves::Zhang { .. }) => "w",
            (Target::Catchment, CoverCurves::Fu { .. }) => "omega",
        }
    }

    /// Allowed range of the fitted parameter.
    pub fn bounds(&self, target: Target) -> (f64, f64) {
        match target {
            Target::Cover(c) => c.bounds(&self.curves),
            Target::Catchment => Cover::Grass.bounds(&self.curves),
        }
    }

    /// The long-term record of `row` under this setup.
    pub fn record(&self, row: &MeanAnnualRow, target: Target) -> std::result::Result<GaugeRecord, FitError> {
        let mean = GaugeYear {
            year: LONG_TERM_YEAR,
            rain_mm: row.rain_mm,
            pet_mm: row.pet_mm,
            pet_forest_mm: row.pet_mm * self.forest_pet_factor,
            observed_yield_mm: row.flow_mm,
        };
        self.record_for(mean, row.forest_fraction, target).map(|r| r.with_id(&row.id))
    }

    fn record_for(&self, mean: GaugeYear, forest_fraction: f64, target: Target) -> std::result::Result<GaugeRecord, FitError> {
        Ok(match target {
            Target::Cover(c) => GaugeRecord::long_term(self.curves, c, forest_fraction, mean)?.with_interception(self.interception),
            Target::Catchment => GaugeRecord::long_term(self.curves, Cover::Grass, 0.0, mean)?,
        })
    }
}

/// One fitted catchment.
#[derive(Debug, Clone)]
pub struct FittedRow {
    /// The table row.
    pub row: MeanAnnualRow,
    /// The record fitted.
    pub record: GaugeRecord,
    /// Fitted parameter value.
    pub value: f64,
    /// Long-term flow the curve gives at the fitted value, mm/yr (equals the observed flow).
    pub simulated_flow_mm: f64,
}

/// A catchment left out, with its reason.
#[derive(Debug, Clone, PartialEq)]
pub struct LeftOutRow {
    /// Catchment id.
    pub id: String,
    /// Name.
    pub name: String,
    /// Spreadsheet row.
    pub row: usize,
    /// Reason code (`missing_value`, `snow_above_limit`, `snow_unknown`, `no_evaporation`,
    /// `above_energy_limit`, `less_evaporation_than_curve`, `more_evaporation_than_curve`, `cover_absent`).
    pub code: &'static str,
    /// The reason in words.
    pub reason: String,
    /// The row's values, when complete: rain, PET and flow, mm/yr.
    pub values: Option<(f64, f64, f64)>,
    /// Snow fraction, when given.
    pub snow_fraction: Option<f64>,
}

/// Every catchment of a mean-annual table fitted or left out, and the regional distribution.
#[derive(Debug, Clone)]
pub struct MeanAnnualFit {
    /// What was fitted.
    pub target: Target,
    /// Curves and forest water use held.
    pub setup: CurveSetup,
    /// Snow filter used.
    pub max_snow_fraction: Option<f64>,
    /// Rows of the table (complete or not).
    pub rows_in_table: usize,
    /// Fitted catchments, in table order.
    pub fitted: Vec<FittedRow>,
    /// Left-out catchments, in table order.
    pub left_out: Vec<LeftOutRow>,
    /// Summary of the fitted values (at least 2).
    pub summary: Option<Summary>,
    /// The regional distribution, or why there is none.
    pub regional: std::result::Result<RegionalFit, RegionalError>,
}

impl MeanAnnualFit {
    /// Which catchments the regional distribution describes, in words.
    pub fn subset(&self) -> String {
        match self.max_snow_fraction {
            Some(m) => format!("catchments with complete values and snow_fraction ≤ {m} that the curve can fit"),
            None => "catchments with complete values that the curve can fit (no snow filter)".into(),
        }
    }

    /// Left-out catchments counted by reason code.
    pub fn left_out_by_reason(&self) -> BTreeMap<String, usize> {
        let mut m = BTreeMap::new();
        for l in &self.left_out {
            *m.entry(l.code.to_string()).or_insert(0) += 1;
        }
        m
    }

    /// The fitted values, in table order.
    pub fn values(&self) -> Vec<f64> {
        self.fitted.iter().map(|f| f.value).collect()
    }
}

fn fit_error_code(e: &FitError) -> &'static str {
    match e {
        FitError::MeanYieldAboveCurve { .. } => "less_evaporation_than_curve",
        FitError::MeanYieldBelowCurve { .. } => "more_evaporation_than_curve",
        FitError::MeanYieldNotBelowRain { .. } => "no_evaporation",
        FitError::NoSensitivity { .. } => "cover_absent",
        _ => "not_fitted",
    }
}

/// Fits every complete row of `table`; never fails for a catchment (it is left out
/// with its reason). `max_snow_fraction` needs the table's `snow_fraction` column.
pub fn fit_table(setup: &CurveSetup, table: &MeanAnnualTable, target: Target, max_snow_fraction: Option<f64>) -> Result<MeanAnnualFit> {
    if max_snow_fraction.is_some() && !table.has_snow_fraction {
        return Err(Error::invalid(
            Problem::in_file(&table.path, "--max-snow-fraction needs a snow_fraction column (fraction of precipitation falling as snow)")
                .row(1)
                .column("snow_fraction"),
        ));
    }
    let mut fitted = Vec::new();
    let mut left_out: Vec<(usize, LeftOutRow)> = table
        .missing
        .iter()
        .map(|m| {
            let reason = format!("empty {} (rows with a missing value are left out, never filled)", m.columns.join(", "));
            (
                m.row,
                LeftOutRow {
                    id: m.id.clone(),
                    name: m.name.clone(),
                    row: m.row,
                    code: "missing_value",
                    reason,
                    values: None,
                    snow_fraction: None,
                },
            )
        })
        .collect();
    for r in &table.rows {
        let leave = |code: &'static str, reason: String| LeftOutRow {
            id: r.id.clone(),
            name: r.name.clone(),
            row: r.row,
            code,
            reason,
            values: Some((r.rain_mm, r.pet_mm, r.flow_mm)),
            snow_fraction: r.snow_fraction,
        };
        if let Some(max) = max_snow_fraction {
            match r.snow_fraction {
                None => {
                    left_out.push((r.row, leave("snow_unknown", "snow_fraction is empty and --max-snow-fraction is given".into())));
                    continue;
                }
                Some(s) if s > max => {
                    left_out.push((
                        r.row,
                        leave("snow_above_limit", format!("snow_fraction {} is above --max-snow-fraction {max}", num(s, 4))),
                    ));
                    continue;
                }
                Some(_) => {}
            }
        }
        if let Some(v) = limit_violation(r.rain_mm, r.pet_mm, r.flow_mm) {
            let et = r.rain_mm - r.flow_mm;
            let reason = match v {
                regional::LimitViolation::NoEvaporation => format!(
                    "flow {} mm/yr is not below rainfall {} mm/yr (ET/P = {} ≤ 0): outside every curve (inflow from outside the catchment, or a measurement error?)",
                    num(r.flow_mm, 1),
                    num(r.rain_mm, 1),
                    num(et / r.rain_mm, 4)
                ),
                regional::LimitViolation::AboveEnergyLimit => format!(
                    "ET = P − Q = {} mm/yr is above PET {} mm/yr (the energy limit): outside every curve (losses to groundwater or abstractions?)",
                    num(et, 1),
                    num(r.pet_mm, 1)
                ),
            };
            left_out.push((r.row, leave(v.code(), reason)));
            continue;
        }
        let fit = setup.record(r, target).and_then(|rec| rec.fit_mean().map(|m| (rec, m)));
        match fit {
            Ok((record, m)) => {
                let simulated_flow_mm = record.simulated_yield_mm(m.value)[0];
                fitted.push(FittedRow { row: r.clone(), record, value: m.value, simulated_flow_mm });
            }
            Err(e) => left_out.push((r.row, leave(fit_error_code(&e), e.to_string()))),
        }
    }
    left_out.sort_by_key(|(row, _)| *row);
    let values: Vec<f64> = fitted.iter().map(|f| f.value).collect();
    let summary = regional::summarise(&values);
    let regional = fit_distribution(&values, setup.bounds(target));
    Ok(MeanAnnualFit {
        target,
        setup: *setup,
        max_snow_fraction,
        rows_in_table: table.rows.len() + table.missing.len(),
        fitted,
        left_out: left_out.into_iter().map(|(_, l)| l).collect(),
        summary,
        regional,
    })
}

/// A TOML float as the toml crate's serializer writes it (reads back exactly).
fn toml_float(v: f64) -> String {
    toml::Value::Float(v).to_string()
}

/// The distribution as a scenario's inline table, drawn independently per catchment.
pub fn distribution_toml(d: &Distribution) -> Option<String> {
    let f = toml_float;
    Some(match *d {
        Distribution::Normal { mean, sd, min, max } => {
            format!("{{ dist = \"normal\", mean = {}, sd = {}, min = {}, max = {}, per = \"catchment\" }}", f(mean), f(sd), f(min), f(max))
        }
        Distribution::Pert { min, mode, max } => {
            format!("{{ dist = \"pert\", min = {}, mode = {}, max = {}, per = \"catchment\" }}", f(min), f(mode), f(max))
        }
        Distribution::LogNormal { median, sigma_log } => {
            format!("{{ dist = \"lognormal\", median = {}, sigma_log = {}, per = \"catchment\" }}", f(median), f(sigma_log))
        }
        // The reader truncates a log-normal to the key's range itself.
        Distribution::Truncated { ref dist, .. } if matches!(**dist, Distribution::LogNormal { .. }) => return distribution_toml(dist),
        _ => return None,
    })
}

fn comment(s: &str) -> String {
    s.chars().map(|c| if c.is_control() { ' ' } else { c }).collect()
}

/// The `regional.toml` snippet: a `[hydrology]` table with the fitted parameter as
/// a distribution and the values the fit held, with the summary in comments.
/// `None` when no distribution could be fitted.
pub fn regional_toml(fit: &MeanAnnualFit, table_path: &Path) -> Option<String> {
    let rf = fit.regional.as_ref().ok()?;
    let s = fit.summary?;
    let best = rf.best();
    let inline = distribution_toml(&best.dist)?;
    let key = fit.setup.key(fit.target);
    let label = fit.setup.label(fit.target);
    let mut t = String::new();
    let _ = writeln!(t, "# Regional distribution of {label} written by yieldshift fit --mean-annual {}.", env!("CARGO_PKG_VERSION"));
    let _ = writeln!(t, "# Mean-annual table: {}", comment(&table_path.display().to_string()));
    let _ = writeln!(
        t,
        "# {} of {} catchments fitted ({} left out; see catchments_left_out.csv); subset: {}.",
        fit.fitted.len(),
        fit.rows_in_table,
        fit.left_out.len(),
        fit.subset()
    );
    let q = s.quantiles;
    let _ = writeln!(
        t,
        "# Fitted {label}: n {}, mean {:.4}, sd {:.4}; 5/25/50/75/95 % quantiles {:.4} / {:.4} / {:.4} / {:.4} / {:.4}.",
        s.n, s.mean, s.sd, q[0], q[1], q[2], q[3], q[4]
    );
    let others: Vec<String> =
        rf.candidates.iter().filter(|c| c.shape != best.shape).map(|c| format!("{} {:.4}", c.shape.name(), c.misfit)).collect();
    let _ = writeln!(
        t,
        "# {} chosen: its quantiles miss the sample's by D = {:.4} (in interquartile ranges squared; {}).",
        best.shape.name(),
        best.misfit,
        others.join(", ")
    );
    let _ = writeln!(
        t,
        "# per = \"catchment\": each ungauged catchment draws its own value (use per = \"basin\" for one value shared by all)."
    );
    match fit.target {
        Target::Catchment => {
            let _ = writeln!(
                t,
                "# Fitted as one curve for the whole catchment (forest fraction and interception not used): it applies as\n\
                 # {key} to ungauged catchments with no forest, whose yield comes from the grass curve alone."
            );
        }
        Target::Cover(c) => {
            let _ = writeln!(
                t,
                "# Fitted as the {} curve of each catchment, its forest fraction mixing the forest and grass curves; the values\n\
                 # below the distribution were held in the fit and keep it consistent.",
                c.name()
            );
        }
    }
    let _ = writeln!(t, "# {}", comment(crate::schema::CAUTIONS));
    let _ = writeln!(t, "# {}", comment(REGIONAL_CAUTIONS));
    let _ = writeln!(t, "[hydrology]");
    let _ = writeln!(t, "method = \"{}\"", fit.setup.curves.method_name());
    let _ = writeln!(t, "{key} = {inline}");
    if let Target::Cover(c) = fit.target {
        let held = match c {
            Cover::Grass => Cover::Forest,
            Cover::Forest => Cover::Grass,
        };
        let _ = writeln!(t, "{} = {}   # held in the fit", held.key(&fit.setup.curves), toml_float(held.value(&fit.setup.curves)));
        let _ = writeln!(t, "forest_pet_factor = {}   # held in the fit", toml_float(fit.setup.forest_pet_factor));
        let _ = writeln!(t, "interception_fraction = {}   # held in the fit", toml_float(fit.setup.interception.fraction_of_rain()));
        let _ = writeln!(t, "interception_demand_share = {}   # held in the fit", toml_float(fit.setup.interception.demand_share()));
    }
    Some(t)
}

/// Options of a mean-annual fit run.
#[derive(Debug, Clone)]
pub struct MeanAnnualOptions {
    /// Output folder.
    pub out: PathBuf,
    /// Replace a non-empty folder that is not a yieldshift output.
    pub force: bool,
    /// What is fitted.
    pub target: Target,
    /// Leave out catchments with more snow than this fraction of precipitation.
    pub max_snow_fraction: Option<f64>,
    /// Figure formats.
    pub formats: Formats,
}

/// What a mean-annual fit run produced.
#[derive(Debug, Clone)]
pub struct MeanAnnualOutcome {
    /// The output folder.
    pub out: PathBuf,
    /// The fit.
    pub fit: MeanAnnualFit,
    /// The `regional.toml` text, when a distribution was fitted.
    pub snippet: Option<String>,
}

/// Runs the mean-annual fit and writes every output. `scenario` is the scenario
/// file the setup came from, if any (recorded in `run_info.json`).
pub fn run(setup: &CurveSetup, scenario: Option<&Path>, table: &MeanAnnualTable, opts: &MeanAnnualOptions) -> Result<MeanAnnualOutcome> {
    let fit = fit_table(setup, table, opts.target, opts.max_snow_fraction)?;
    let snippet = regional_toml(&fit, &table.path);
    let staging = Staging::new(&opts.out, opts.force)?;
    let dir = staging.dir().to_path_buf();
    write_fitted_csv(&dir.join(columns::fit_mean_annual::FILE), &fit)?;
    write_left_out_csv(&dir.join(columns::catchments_left_out::FILE), &fit)?;
    write_regional_csv(&dir.join(columns::regional::FILE), &fit)?;
    let toml_text = match &snippet {
        Some(s) => s.clone(),
        None => format!(
            "# No regional distribution: {}.\n",
            fit.regional.as_ref().err().map(|e| e.to_string()).unwrap_or_else(|| "no distribution could be written".into())
        ),
    };
    crate::output::outdir::write_atomic(&dir.join(columns::regional::TOML_FILE), toml_text.as_bytes())?;
    let fig_dir = dir.join("figures");
    std::fs::create_dir_all(&fig_dir).map_err(|e| Error::io("creating figures/", e))?;
    save_figure(&budyko_chart(&fit), &fig_dir.join("regional_budyko"), opts.formats)?;
    tables::write_run_info(&dir, &run_info(&fit, scenario, &table.path))?;
    let out = staging.commit()?;
    Ok(MeanAnnualOutcome { out, fit, snippet })
}

fn ratio_phi(rain: f64, pet: f64, flow: f64) -> (f64, f64) {
    (1.0 - flow / rain, pet / rain)
}

fn write_fitted_csv(path: &Path, fit: &MeanAnnualFit) -> Result<()> {
    let mut w = CsvOut::create(path, &columns::fit_mean_annual::COLUMNS)?;
    let method = fit.setup.curves.method_name();
    let label = fit.setup.label(fit.target);
    for f in &fit.fitted {
        let r = &f.row;
        let (ratio, phi) = ratio_phi(r.rain_mm, r.pet_mm, r.flow_mm);
        let fields = [
            r.id.clone(),
            r.name.clone(),
            r.row.to_string(),
            method.to_string(),
            label.to_string(),
            num(f.value, 10),
            num(r.rain_mm, 3),
            num(r.pet_mm, 3),
            num(r.flow_mm, 3),
            num(f.simulated_flow_mm, 6),
            num(ratio, 6),
            num(phi, 6),
            num(r.forest_fraction, 4),
            r.snow_fraction.map(|s| num(s, 4)).unwrap_or_default(),
            num(f.record.canopy_fraction(), 4),
        ];
        w.row(fields.iter().map(String::as_str))?;
    }
    w.finish()
}

fn write_left_out_csv(path: &Path, fit: &MeanAnnualFit) -> Result<()> {
    let mut w = CsvOut::create(path, &columns::catchments_left_out::COLUMNS)?;
    for l in &fit.left_out {
        let (a, b, c, d, e) = match l.values {
            Some((rain, pet, flow)) => {
                let (ratio, phi) = ratio_phi(rain, pet, flow);
                (num(rain, 3), num(pet, 3), num(flow, 3), num(ratio, 6), num(phi, 6))
            }
            None => Default::default(),
        };
        let fields = [
            l.id.clone(),
            l.name.clone(),
            l.row.to_string(),
            l.code.to_string(),
            l.reason.clone(),
            a,
            b,
            c,
            d,
            e,
            l.snow_fraction.map(|s| num(s, 4)).unwrap_or_default(),
        ];
        w.row(fields.iter().map(String::as_str))?;
    }
    w.finish()
}

fn write_regional_csv(path: &Path, fit: &MeanAnnualFit) -> Result<()> {
    let mut w = CsvOut::create(path, &columns::regional::COLUMNS)?;
    let st = &columns::regional::STATISTICS;
    let opt = |v: Option<f64>, d: usize| v.map(|x| num(x, d)).unwrap_or_default();
    let s = fit.summary;
    let rf = fit.regional.as_ref().ok();
    let misfit = |shape: Shape| rf.and_then(|r| r.candidates.iter().find(|c| c.shape == shape)).map(|c| c.misfit);
    let values: Vec<String> = vec![
        fit.setup.curves.method_name().into(),
        fit.setup.label(fit.target).into(),
        fit.subset(),
        fit.rows_in_table.to_string(),
        fit.fitted.len().to_string(),
        fit.left_out.len().to_string(),
        fit.fitted.len().to_string(),
        opt(s.map(|s| s.mean), 6),
        opt(s.map(|s| s.sd), 6),
        opt(s.map(|s| s.min), 6),
        opt(s.map(|s| s.quantiles[0]), 6),
        opt(s.map(|s| s.quantiles[1]), 6),
        opt(s.map(|s| s.quantiles[2]), 6),
        opt(s.map(|s| s.quantiles[3]), 6),
        opt(s.map(|s| s.quantiles[4]), 6),
        opt(s.map(|s| s.max), 6),
        rf.map(|r| r.best().shape.name().to_string()).unwrap_or_default(),
        rf.and_then(|r| distribution_toml(&r.best().dist)).unwrap_or_default(),
        opt(misfit(Shape::TruncatedNormal), 6),
        opt(misfit(Shape::LogNormal), 6),
        opt(misfit(Shape::Pert), 6),
        opt(rf.map(|r| r.best().quantiles[0]), 6),
        opt(rf.map(|r| r.best().quantiles[4]), 6),
    ];
    debug_assert_eq!(values.len(), st.len());
    for (k, v) in st.iter().zip(values) {
        w.row([*k, v.as_str()])?;
    }
    w.finish()
}

fn run_info(fit: &MeanAnnualFit, scenario: Option<&Path>, table: &Path) -> MeanAnnualFitRunInfo {
    MeanAnnualFitRunInfo {
        catchments_fitted: fit.fitted.len(),
        catchments_in_table: fit.rows_in_table,
        catchments_left_out: fit.left_out.len(),
        cautions: format!("{} {}", crate::schema::CAUTIONS, REGIONAL_CAUTIONS),
        command: FIT_COMMAND.into(),
        cover_fitted: fit.target.name().into(),
        distribution: fit.regional.as_ref().ok().and_then(|r| distribution_toml(&r.best().dist)),
        fit_mode: MEAN_ANNUAL_FIT_MODE.into(),
        forest_pet_factor: fit.setup.forest_pet_factor,
        hydrology_method: fit.setup.curves.method_name().into(),
        interception_demand_share: fit.setup.interception.demand_share(),
        interception_fraction: fit.setup.interception.fraction_of_rain(),
        left_out_by_reason: fit.left_out_by_reason(),
        max_snow_fraction: fit.max_snow_fraction,
        mean_annual_table: table.display().to_string(),
        parameter: fit.setup.key(fit.target).into(),
        scenario: scenario.map(|p| p.display().to_string()),
        subset: fit.subset(),
        tool: TOOL.into(),
        version: env!("CARGO_PKG_VERSION").into(),
    }
}

/// The fitted catchments in Budyko space with the curves at the regional 5, 50 and
/// 95 % fitted values (for a cover fit, at the fitted catchments' median forest fraction).
pub fn budyko_chart(fit: &MeanAnnualFit) -> BudykoChart {
    let label = fit.setup.label(fit.target);
    let point = |rain: f64, pet: f64, flow: f64| {
        let (ratio, phi) = ratio_phi(rain, pet, flow);
        (phi, Some(ratio))
    };
    let fitted: Vec<(f64, Option<f64>)> = fit.fitted.iter().map(|f| point(f.row.rain_mm, f.row.pet_mm, f.row.flow_mm)).collect();
    let outside: Vec<(f64, Option<f64>)> = fit
        .left_out
        .iter()
        .filter(|l| {
            matches!(l.code, "no_evaporation" | "above_energy_limit" | "less_evaporation_than_curve" | "more_evaporation_than_curve")
        })
        .filter_map(|l| l.values.map(|(r, p, q)| point(r, p, q)))
        .collect();
    let phi_max = fitted.iter().chain(&outside).map(|p| p.0).fold(1.0, f64::max) * 1.05;
    let mut forest: Vec<f64> = fit.fitted.iter().map(|f| f.row.forest_fraction).collect();
    forest.sort_by(f64::total_cmp);
    let forest_median = crate::model::stats::percentile_sorted(&forest, 0.5);
    let forest_median = if forest_median.is_finite() { forest_median } else { 0.0 };
    let reference = GaugeYear {
        year: LONG_TERM_YEAR,
        rain_mm: 1000.0,
        pet_mm: 1000.0,
        pet_forest_mm: 1000.0 * fit.setup.forest_pet_factor,
        observed_yield_mm: 0.0,
    };
    let curve_record = fit.setup.record_for(reference, forest_median, fit.target).ok();
    let curve = |v: f64| -> Vec<(f64, Option<f64>)> {
        (0..=240)
            .map(|i| {
                let phi = phi_max * i as f64 / 240.0;
                (phi, curve_record.as_ref().map(|r| r.evaporative_ratio(v, phi)))
            })
            .collect()
    };
    let mut series = Vec::new();
    if let Some(s) = fit.summary {
        series.push(FitSeries {
            label: format!("Median {label} = {:.3}", s.quantiles[2]),
            points: curve(s.quantiles[2]),
            colour: palette::YIELD,
            mark: Mark::Line,
        });
        series.push(FitSeries {
            label: format!("5 % {label} = {:.3}", s.quantiles[0]),
            points: curve(s.quantiles[0]),
            colour: palette::series(1),
            mark: Mark::Dashed,
        });
        series.push(FitSeries {
            label: format!("95 % {label} = {:.3}", s.quantiles[4]),
            points: curve(s.quantiles[4]),
            colour: palette::series(3),
            mark: Mark::Dashed,
        });
    }
    series.push(FitSeries {
        label: format!("Fitted catchments ({})", fit.fitted.len()),
        points: fitted,
        colour: palette::series(2),
        mark: Mark::Points,
    });
    if !outside.is_empty() {
        series.push(FitSeries {
            label: format!("Left out: outside limits or curve ({})", outside.len()),
            points: outside,
            colour: palette::GUIDELINE,
            mark: Mark::Points,
        });
    }
    let mut notes = vec![
        "ET/P = 1 − Q/P of each catchment's long-term means".to_string(),
        "Grey dashed: limits ET = E0 and ET = P".to_string(),
        format!(
            "Subset: {}",
            match fit.max_snow_fraction {
                Some(m) => format!("snow fraction ≤ {m}"),
                None => "no snow filter".into(),
            }
        ),
        format!("{} of {} catchments fitted", fit.fitted.len(), fit.rows_in_table),
    ];
    match fit.target {
        Target::Catchment => notes.push("One curve per catchment (forest not split)".into()),
        Target::Cover(_) => notes.push(format!("Curves at forest fraction {forest_median:.2} (median)")),
    }
    let quantile_words: Vec<String> = QUANTILE_PROBS.iter().map(|p| format!("{:.0}", p * 100.0)).collect();
    notes.push(format!("Quantiles {} % of fitted {label}", quantile_words.join("/")));
    BudykoChart {
        title: format!("Gauged catchments in Budyko space — fitted {label} ({})", fit.setup.curves.method_name()), series, notes
    }
}
