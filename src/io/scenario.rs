//! The scenario file (TOML) and everything it points to, read and validated in
//! two stages: the text is walked against the documented keys (every problem
//! collected, unknown keys reported with a suggestion), then the catchment and
//! climate tables are read and checked against it.
//!
//! Every key, with unit, default and allowed range, is documented in
//! `docs/scenario.md`.

use crate::error::{Error, Problem, Result};
use crate::io::catchments::read_catchments;
use crate::io::climate::{read_climate, BeyondRecord, ClimateTable};
use crate::io::toml_reader::{Section, TomlDoc};
use crate::model::budyko::CoverCurves;
use crate::model::catchment::{Catchment, ClimateYear, Contaminant, ModelParams};
use crate::model::closure::ClosureCurve;
use crate::model::cover::InvasionParams;
use crate::model::network::{Network, NetworkError};
use std::path::{Path, PathBuf};

/// A scenario with all its inputs read and validated.
#[derive(Debug, Clone)]
pub struct Scenario {
    /// The scenario file.
    pub path: PathBuf,
    /// Title shown in outputs.
    pub title: String,
    /// First projected year (year 0, the current cover).
    pub start_year: i32,
    /// Years projected after the start year (1–300); outputs have `horizon_years + 1` years.
    pub horizon_years: usize,
    /// The catchment table's path.
    pub catchments_path: PathBuf,
    /// The climate table's path, if any.
    pub climate_path: Option<PathBuf>,
    /// Model parameters.
    pub params: ModelParams,
    /// Catchments in table order.
    pub catchments: Vec<Catchment>,
    /// Drainage network over the catchments.
    pub network: Network,
    /// Annual climate, if a table was given.
    pub climate: Option<ClimateTable>,
    /// What to do for years outside the climate record.
    pub beyond_record: BeyondRecord,
}

impl Scenario {
    /// Calendar years projected: `start_year ..= start_year + horizon_years`.
    pub fn years(&self) -> impl Iterator<Item = i32> {
        let s = self.start_year;
        (0..=self.horizon_years as i32).map(move |t| s + t)
    }

    /// The climate series of catchment `index` over the projected years.
    pub fn climate_series(&self, index: usize) -> Vec<ClimateYear> {
        let c = &self.catchments[index];
        match &self.climate {
            Some(table) => self.years().map(|y| table.year_for(&c.id, y, c.mean_climate(), self.beyond_record)).collect(),
            None => vec![c.mean_climate(); self.horizon_years + 1],
        }
    }
}

/// Reads and validates a scenario and all the tables it names.
pub fn load_scenario(path: &Path) -> Result<Scenario> {
    let text = std::fs::read_to_string(path).map_err(|e| {
        Error::invalid(Problem::in_file(path, format!("cannot read the scenario file: {e}")))
    })?;
    let (doc, table) = TomlDoc::parse(path, text).map_err(Error::invalid)?;
    let base = path.parent().map(Path::to_path_buf).unwrap_or_default();
    let raw = read_keys(&doc, &table, &base);
    let mut problems = doc.take_problems();
    if !problems.is_empty() {
        return Err(Error::Invalid(problems));
    }
    let (mut catchments, rows) = match read_catchments(&raw.catchments_path, &raw.params.contaminants) {
        Ok(c) => c,
        Err(p) => {
            problems.extend(p);
            (Vec::new(), Vec::new())
        }
    };
    if !catchments.is_empty() {
        problems.extend(apply_calibration(&raw.calibration, &raw.params, &mut catchments));
    }
    let network = if catchments.is_empty() {
        None
    } else {
        match build_network(&raw.catchments_path, &catchments, &rows) {
            Ok(n) => Some(n),
            Err(p) => {
                problems.extend(p);
                None
            }
        }
    };
    let climate = match &raw.climate_path {
        Some(p) if !catchments.is_empty() => match read_climate(p, &catchments) {
            Ok(t) => Some(t),
            Err(e) => {
                problems.extend(e);
                None
            }
        },
        _ => None,
    };
    if let (Some(table), BeyondRecord::Error) = (&climate, raw.beyond_record) {
        let last = raw.start_year + raw.horizon_years as i32;
        for (id, first, end) in table.coverage() {
            if first > raw.start_year || end < last {
                problems.push(
                    Problem::in_file(
                        raw.climate_path.as_deref().unwrap_or(path),
                        format!(
                            "catchment '{id}' has climate for {first}–{end} but the projection runs {}–{last}; \
                             extend the table or set [climate] beyond_record = \"cycle\" or \"mean\"",
                            raw.start_year
                        ),
                    )
                    .column("year"),
                );
            }
        }
    }
    if !problems.is_empty() {
        return Err(Error::Invalid(problems));
    }
    let network = network.ok_or_else(|| Error::Other("no catchments".into()))?;
    Ok(Scenario {
        path: path.to_path_buf(),
        title: raw.title,
        start_year: raw.start_year,
        horizon_years: raw.horizon_years,
        catchments_path: raw.catchments_path,
        climate_path: raw.climate_path,
        params: raw.params,
        catchments,
        network,
        climate,
        beyond_record: raw.beyond_record,
    })
}

struct RawScenario {
    title: String,
    start_year: i32,
    horizon_years: usize,
    catchments_path: PathBuf,
    climate_path: Option<PathBuf>,
    beyond_record: BeyondRecord,
    params: ModelParams,
    calibration: Vec<RawCalibration>,
}

/// A `[[calibration]]` entry: fitted curve parameters for one catchment, or a donor.
struct RawCalibration {
    catchment: String,
    w_forest: Option<f64>,
    w_grass: Option<f64>,
    omega_forest: Option<f64>,
    omega_grass: Option<f64>,
    donor: Option<String>,
    /// Located problem templates for the `catchment` and `donor` keys.
    at_catchment: Problem,
    at_donor: Problem,
}

fn read_calibration(root: &Section<'_>) -> Vec<RawCalibration> {
    root.array_of_tables("calibration")
        .into_iter()
        .map(|s| {
            let r = RawCalibration {
                catchment: s.string("catchment", None).unwrap_or_default(),
                w_forest: s.opt_f64_in("w_forest", 0.01, 20.0, ""),
                w_grass: s.opt_f64_in("w_grass", 0.01, 20.0, ""),
                omega_forest: s.opt_f64_in("omega_forest", 1.01, 20.0, ""),
                omega_grass: s.opt_f64_in("omega_grass", 1.01, 20.0, ""),
                donor: s.opt_string("donor"),
                at_catchment: s.problem("catchment", ""),
                at_donor: s.problem("donor", ""),
            };
            let n_values = [r.w_forest, r.w_grass, r.omega_forest, r.omega_grass].iter().filter(|v| v.is_some()).count();
            if r.donor.is_some() && n_values > 0 {
                s.push("donor", "give either fitted values or a donor catchment, not both");
            } else if r.donor.is_none() && n_values == 0 {
                s.push("catchment", "needs fitted values (w_grass, w_forest, omega_grass, omega_forest) or donor = \"<catchment id>\"");
            }
            s.finish();
            r
        })
        .collect()
}

/// Applies `[[calibration]]` entries to the catchments (per-catchment curve parameters).
fn apply_calibration(cal: &[RawCalibration], params: &ModelParams, catchments: &mut [Catchment]) -> Vec<Problem> {
    let mut problems = Vec::new();
    let ids: Vec<&str> = catchments.iter().map(|c| c.id.as_str()).collect();
    let index = |id: &str| ids.iter().position(|&x| x == id);
    let with_msg = |p: &Problem, m: String| Problem { message: m, ..p.clone() };
    let mut fitted: Vec<Option<CoverCurves>> = vec![None; catchments.len()];
    for r in cal.iter().filter(|r| r.donor.is_none()) {
        let Some(i) = index(&r.catchment) else {
            problems.push(with_msg(&r.at_catchment, format!("'{}' is not a catchment of the scenario{}", r.catchment, crate::io::table::suggestion(&r.catchment, &ids))));
            continue;
        };
        if fitted[i].is_some() {
            problems.push(with_msg(&r.at_catchment, format!("catchment '{}' is calibrated twice", r.catchment)));
        }
        fitted[i] = Some(match params.curves {
            CoverCurves::Zhang { w_forest, w_grass } => {
                if r.omega_forest.is_some() || r.omega_grass.is_some() {
                    problems.push(with_msg(&r.at_catchment, "gives Fu's omega but [hydrology] method is zhang".into()));
                }
                CoverCurves::Zhang { w_forest: r.w_forest.unwrap_or(w_forest), w_grass: r.w_grass.unwrap_or(w_grass) }
            }
            CoverCurves::Fu { omega_forest, omega_grass } => {
                if r.w_forest.is_some() || r.w_grass.is_some() {
                    problems.push(with_msg(&r.at_catchment, "gives Zhang's w but [hydrology] method is fu".into()));
                }
                CoverCurves::Fu { omega_forest: r.omega_forest.unwrap_or(omega_forest), omega_grass: r.omega_grass.unwrap_or(omega_grass) }
            }
        });
    }
    let mut applied = fitted.clone();
    for r in cal.iter() {
        let Some(donor) = &r.donor else { continue };
        let Some(i) = index(&r.catchment) else {
            problems.push(with_msg(&r.at_catchment, format!("'{}' is not a catchment of the scenario{}", r.catchment, crate::io::table::suggestion(&r.catchment, &ids))));
            continue;
        };
        match index(donor) {
            None => problems.push(with_msg(&r.at_donor, format!("donor '{donor}' is not a catchment of the scenario{}", crate::io::table::suggestion(donor, &ids)))),
            Some(j) => match fitted[j] {
                Some(c) => applied[i] = Some(c),
                None => problems.push(with_msg(&r.at_donor, format!("donor '{donor}' has no fitted values of its own in [[calibration]]"))),
            },
        }
    }
    for (c, cv) in catchments.iter_mut().zip(applied) {
        if cv.is_some() {
            c.curves = cv;
        }
    }
    problems
}

fn read_keys(doc: &TomlDoc, table: &toml::Table, base: &Path) -> RawScenario {
    let root = doc.root(table);
    let title = root.string("title", Some("Untitled scenario")).unwrap_or_default();
    let start_year = root.int_in("start_year", None, 1800, 2500, "") as i32;
    let horizon_years = root.int_in("horizon_years", None, 1, 300, "years") as usize;
    let catchments_path = base.join(root.string("catchments", None).unwrap_or_default());

    let (climate_path, beyond_record) = match root.section("climate") {
        Some(s) => {
            let p = s.opt_string("table").map(|t| base.join(t));
            let b = match s.choice("beyond_record", "cycle", &["cycle", "mean", "error"]).as_str() {
                "mean" => BeyondRecord::Mean,
                "error" => BeyondRecord::Error,
                _ => BeyondRecord::Cycle,
            };
            s.finish();
            (p, b)
        }
        None => (None, BeyondRecord::Cycle),
    };

    let (curves, forest_pet_factor) = read_hydrology(root.section("hydrology"));
    let invasion = read_invasion(root.section("invasion"), root.section("canopy_closure"));
    let min_runoff_mm = match root.section("dilution") {
        Some(s) => {
            let v = s.f64_in("min_runoff_mm", Some(1.0), 0.0, 1000.0, "mm/yr");
            s.finish();
            v
        }
        None => 1.0,
    };
    let contaminants = read_contaminants(&root);
    let calibration = read_calibration(&root);
    root.finish();
    RawScenario {
        title,
        start_year,
        horizon_years,
        catchments_path,
        climate_path,
        beyond_record,
        params: ModelParams { curves, forest_pet_factor, invasion, contaminants, min_runoff_mm },
        calibration,
    }
}

fn read_hydrology(s: Option<Section<'_>>) -> (CoverCurves, f64) {
    let Some(s) = s else { return (CoverCurves::ZHANG_DEFAULT, 1.0) };
    let method = s.choice("method", "zhang", &["zhang", "fu"]);
    let w_forest = s.f64_in("w_forest", Some(2.0), 0.01, 20.0, "");
    let w_grass = s.f64_in("w_grass", Some(0.5), 0.01, 20.0, "");
    let omega_forest = s.f64_in("omega_forest", Some(2.97), 1.01, 20.0, "");
    let omega_grass = s.f64_in("omega_grass", Some(2.16), 1.01, 20.0, "");
    let factor = s.f64_in("forest_pet_factor", Some(1.0), 0.5, 2.0, "");
    s.finish();
    let curves = if method == "fu" {
        CoverCurves::Fu { omega_forest, omega_grass }
    } else {
        CoverCurves::Zhang { w_forest, w_grass }
    };
    (curves, factor)
}

fn read_invasion(inv: Option<Section<'_>>, closure: Option<Section<'_>>) -> InvasionParams {
    let (spread, seed_age, seed_rain, medium, dense, span) = match &inv {
        Some(s) => {
            let spread = s.f64_in("spread_rate_per_yr", Some(0.06), 0.0, 1.0, "1/yr");
            let seed_age = s.int_in("seed_bearing_age_yr", Some(8), 0, 100, "years") as u32;
            let seed_rain = s.f64_in("seed_rain_ha_per_yr", Some(0.0), 0.0, 1e7, "ha/yr");
            let medium = s.int_in("medium_age_yr", Some(10), 1, 100, "years") as u32;
            let dense = s.int_in("dense_age_yr", Some(20), 2, 200, "years") as u32;
            let span = s.int_in("initial_dense_span_yr", Some(10), 1, 100, "years") as u32;
            if dense <= medium {
                s.push("dense_age_yr", format!("must be greater than medium_age_yr ({medium})"));
            }
            s.finish();
            (spread, seed_age, seed_rain, medium, dense, span)
        }
        None => (0.06, 8, 0.0, 10, 20, 10),
    };
    let closure = match closure {
        None => ClosureCurve::Logistic { half_closure_age_yr: 12.0, steepness_per_yr: 0.35, max_fraction: 1.0 },
        Some(s) => {
            let kind = s.choice("curve", "logistic", &["logistic", "table"]);
            let half = s.f64_in("half_closure_age_yr", Some(12.0), 0.5, 200.0, "years");
            let k = s.f64_in("steepness_per_yr", Some(0.35), 0.01, 10.0, "1/yr");
            let max = s.f64_in("max_fraction", Some(1.0), 0.0, 1.0, "fraction");
            let ages = s.f64_list("ages_yr", 0.0, 500.0, "years");
            let fractions = s.f64_list("fractions", 0.0, 1.0, "fraction");
            let c = if kind == "table" {
                match (ages, fractions) {
                    (Some(a), Some(f)) => {
                        if a.len() != f.len() || a.is_empty() {
                            s.push("fractions", format!("needs one value per entry of ages_yr ({} ages, {} fractions)", a.len(), f.len()));
                        } else if a.windows(2).any(|w| w[1] <= w[0]) {
                            s.push("ages_yr", "ages must strictly increase");
                        }
                        ClosureCurve::Table { ages_yr: a, fractions: f }
                    }
                    _ => {
                        s.push("curve", "curve = \"table\" needs ages_yr = [...] and fractions = [...]");
                        ClosureCurve::Table { ages_yr: vec![0.0], fractions: vec![0.0] }
                    }
                }
            } else {
                ClosureCurve::Logistic { half_closure_age_yr: half, steepness_per_yr: k, max_fraction: max }
            };
            s.finish();
            c
        }
    };
    InvasionParams {
        spread_rate_per_yr: spread,
        seed_bearing_age_yr: seed_age,
        seed_rain_ha_per_yr: seed_rain,
        medium_age_yr: medium,
        dense_age_yr: dense.max(medium + 1),
        initial_dense_span_yr: span,
        closure,
    }
}

fn read_contaminants(root: &Section<'_>) -> Vec<Contaminant> {
    let mut out: Vec<Contaminant> = Vec::new();
    for s in root.array_of_tables("contaminant") {
        let name = s.string("name", None).unwrap_or_default();
        if !name.is_empty() && !name.chars().all(|c| c.is_ascii_lowercase() || c.is_ascii_digit() || c == '_') {
            s.push("name", format!("'{name}' must use only lower-case letters, digits and '_' (it becomes a column name)"));
        }
        if out.iter().any(|c| c.name == name) {
            s.push("name", format!("contaminant '{name}' is defined twice"));
        }
        let open = s.f64_in("open_export_kg_per_ha_yr", None, 0.0, 1e4, "kg/ha/yr");
        let forest = s.f64_in("forest_export_kg_per_ha_yr", None, 0.0, 1e4, "kg/ha/yr");
        let guideline = s.opt_f64_in("guideline_mg_per_l", 0.0, 1e6, "mg/L");
        s.finish();
        out.push(Contaminant { name, open_export_kg_per_ha_yr: open, forest_export_kg_per_ha_yr: forest, guideline_mg_per_l: guideline });
    }
    out
}

fn build_network(path: &Path, catchments: &[Catchment], rows: &[usize]) -> std::result::Result<Network, Vec<Problem>> {
    let mut problems = Vec::new();
    let mut downstream = Vec::with_capacity(catchments.len());
    let index: std::collections::HashMap<&str, usize> =
        catchments.iter().enumerate().map(|(i, c)| (c.id.as_str(), i)).collect();
    for (i, c) in catchments.iter().enumerate() {
        match &c.flows_to {
            None => downstream.push(None),
            Some(to) => match index.get(to.as_str()) {
                Some(&j) => downstream.push(Some(j)),
                None => {
                    let ids: Vec<&str> = catchments.iter().map(|c| c.id.as_str()).collect();
                    problems.push(
                        Problem::in_file(path, format!("'{to}' is not the id of any catchment{}", crate::io::table::suggestion(to, &ids)))
                            .row(rows[i])
                            .column("flows_to"),
                    );
                    downstream.push(None);
                }
            },
        }
    }
    if !problems.is_empty() {
        return Err(problems);
    }
    Network::new(downstream).map_err(|e| {
        let msg = match e {
            NetworkError::SelfLoop(i) => (i, format!("catchment '{}' flows into itself", catchments[i].id)),
            NetworkError::Cycle(ids) => (
                ids[0],
                format!(
                    "catchments form a cycle: {}; flows_to must lead downstream to an outlet",
                    ids.iter().map(|&i| catchments[i].id.as_str()).collect::<Vec<_>>().join(", ")
                ),
            ),
            NetworkError::OutOfRange(i) => (i, "invalid downstream catchment".to_string()),
        };
        vec![Problem::in_file(path, msg.1).row(rows[msg.0]).column("flows_to")]
    })
}
