//! The scenario file (TOML) and everything it points to, read and validated in
//! two stages: the text is walked against the documented keys (every problem
//! collected, unknown keys reported with a suggestion), then the catchment and
//! climate tables are read and checked against it.
//!
//! Every key, with unit, default and allowed range, is documented in
//! `docs/scenario.md`.

use crate::error::{Error, Problem, Result};
use crate::input::catchments::read_catchments;
use crate::input::climate::{read_climate, BeyondRecord, ClimateTable};
pub use crate::input::toml_reader::UncertainKey;
use crate::input::toml_reader::{Section, TomlDoc};
use crate::model::budyko::CoverCurves;
use crate::model::catchment::{Catchment, ClimateYear, Contaminant, ModelParams};
use crate::model::closure::ClosureCurve;
use crate::model::control::{Effort, PriorityRule, Strategy, TreatmentMethod};
use crate::model::cover::spread_rate_for_areal_growth;
use crate::model::cover::DensityClass;
use crate::model::cover::InvasionParams;
use crate::model::dilution::{ConcentrationCeiling, ConcentrationDischarge};
use crate::model::interception::CanopyInterception;
use crate::model::network::{Network, NetworkError};
use crate::model::params::ParamId;
use crate::model::uncertainty::Sampling;
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
    /// The stand table's path (dated cohorts), if any.
    pub stands_path: Option<PathBuf>,
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
    /// Control programmes (besides the `no-control` reference), in file order.
    pub strategies: Vec<Strategy>,
    /// Discounting and the value of water.
    pub economics: Economics,
    /// Treatment methods (`[[treatment]]`), in file order.
    pub treatments: Vec<TreatmentMethod>,
    /// Multiplier on every year's rainfall (`[climate] rain_scale`).
    pub rain_scale: f64,
    /// Multiplier on every year's PET (`[climate] pet_scale`).
    pub pet_scale: f64,
    /// Parameters given as distributions, each with the typed parameter it sets.
    pub uncertain: Vec<UncertainKey>,
    /// `(catchment id, calibration entry path)`: which `[[calibration]]` entry sets each
    /// calibrated catchment's curves (its own, or its donor's).
    pub calibration_links: Vec<(String, String)>,
    /// Catchment boundaries (`[gis]`), if given.
    pub gis: Option<GisInputs>,
    /// Warnings found while loading (e.g. boundary areas that differ from the table).
    pub warnings: Vec<String>,
    /// When PET comes from a weather table (`[climate] weather`): the file and the FAO-56 method used.
    pub pet_source: Option<(PathBuf, String)>,
    /// Catchments whose projection takes PET from the weather table in only some years:
    /// `(catchment, years from the weather, years at the long-term mean)`.
    pub pet_fallback: Vec<(String, usize, usize)>,
    /// Ensemble settings (`[ensemble]`), if any.
    pub ensemble: Option<EnsembleConfig>,
}

/// `[gis]` settings and the boundaries read.
#[derive(Debug, Clone)]
pub struct GisInputs {
    /// The boundaries.
    pub boundaries: crate::input::gis::Boundaries,
    /// Relative area difference above which a warning is given.
    pub area_tolerance: f64,
    /// Catchment areas were taken from the geometry.
    pub area_from_geometry: bool,
}

/// How an ensemble varies the climate between members.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum ClimateVariability {
    /// Every member uses the scenario's climate.
    None,
    /// Moving-block bootstrap of the climate table's years.
    Bootstrap {
        /// Block length, years.
        block_years: usize,
    },
    /// Log-normal AR(1) annual rainfall around each catchment's mean.
    Stochastic {
        /// Coefficient of variation of annual rainfall.
        rain_cv: f64,
        /// Lag-1 autocorrelation of (log) annual rainfall.
        rain_lag1: f64,
        /// Coefficient of variation of annual PET (0: held at its mean).
        pet_cv: f64,
    },
}

/// `[ensemble]` settings.
#[derive(Debug, Clone, PartialEq)]
pub struct EnsembleConfig {
    /// Members, ≥ 1.
    pub members: usize,
    /// Sampling scheme.
    pub sampling: crate::model::uncertainty::Sampling,
    /// Random seed.
    pub seed: u64,
    /// Climate variability between members.
    pub climate: ClimateVariability,
    /// Also write `members.csv` (large).
    pub write_members: bool,
}

/// Discount rate and value of water for programme economics.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Economics {
    /// Discount rate per year, fraction (0–0.5).
    pub discount_rate: f64,
    /// Value of water, $/m³, if given.
    pub water_value_per_m3: Option<f64>,
}

impl Scenario {
    /// Calendar years projected: `start_year ..= start_year + horizon_years`.
    pub fn years(&self) -> impl Iterator<Item = i32> {
        let s = self.start_year;
        (0..=self.horizon_years as i32).map(move |t| s + t)
    }

    /// The climate series of catchment `index` over the projected years.
    pub fn climate_series(&self, index: usize) -> Vec<ClimateYear> {
        self.climate_series_scaled(index, self.rain_scale, self.pet_scale)
    }

    /// The climate series with rainfall and PET multiplied by the given scales.
    pub fn climate_series_scaled(&self, index: usize, rain_scale: f64, pet_scale: f64) -> Vec<ClimateYear> {
        let c = &self.catchments[index];
        let scale = |cl: ClimateYear| ClimateYear { rain_mm: cl.rain_mm * rain_scale, pet_mm: cl.pet_mm * pet_scale };
        match &self.climate {
            Some(table) => self.years().map(|y| scale(table.year_for(&c.id, y, c.mean_climate(), self.beyond_record))).collect(),
            None => vec![scale(c.mean_climate()); self.horizon_years + 1],
        }
    }
}

/// Reads and validates a scenario and all the tables it names.
// Over 100 lines on purpose: the two-stage load in order (TOML, sections, tables, GIS, calibration, cross-checks); each step is a call, and the order is the point.
pub fn load_scenario(path: &Path) -> Result<Scenario> {
    let text = crate::input::toml_reader::read_toml_file(path).map_err(Error::invalid)?;
    let (doc, table) = TomlDoc::parse(path, text).map_err(Error::invalid)?;
    let base = path.parent().map(Path::to_path_buf).unwrap_or_default();
    let mut raw = read_keys(&doc, &table, &base);
    raw.uncertain = doc.take_uncertain();
    let mut problems = doc.take_problems();
    if let (Some(ClimateVariability::Bootstrap { .. }), None) = (raw.ensemble.as_ref().map(|e| e.climate), &raw.climate_path) {
        let msg = "climate = \"bootstrap\" resamples the climate table's years, but the scenario has no [climate] table; use climate = \"stochastic\"";
        let at = doc.root(&table).section("ensemble").map(|e| e.problem("climate", msg));
        problems.push(at.unwrap_or_else(|| Problem::in_file(path, msg).key("ensemble.climate")));
    }
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
    if let (Some(sp), false) = (&raw.stands_path, catchments.is_empty()) {
        match crate::input::stands::read_stands(sp, &catchments, raw.start_year) {
            Ok(st) => crate::input::stands::apply_stands(&mut catchments, st, &raw.params.invasion),
            Err(p) => problems.extend(p),
        }
    }
    let mut warnings = Vec::new();
    if raw.params.interception.fraction_of_rain() > 0.0 {
        let given_forest_pet = catchments.iter().filter(|c| c.pet_forest_mm.is_some()).count();
        if raw.params.forest_pet_factor != 1.0 || given_forest_pet > 0 {
            warnings.push(format!(
                "{}: canopy interception (interception_fraction = {}) already adds the conifer canopy's extra water use; \
                 a forest PET above grass PET ({}) counts part of it twice. Set forest_pet_factor = 1 and drop pet_forest_mm, \
                 or set interception_fraction = 0",
                path.display(),
                raw.params.interception.fraction_of_rain(),
                if given_forest_pet > 0 {
                    format!("pet_forest_mm in {given_forest_pet} catchments")
                } else {
                    format!("forest_pet_factor = {}", raw.params.forest_pet_factor)
                }
            ));
        }
    }
    let mut gis = None;
    if let (Some(g), false) = (&raw.gis, catchments.is_empty()) {
        let ids: Vec<&str> = catchments.iter().map(|c| c.id.as_str()).collect();
        match crate::input::gis::read_boundaries(&g.path, &g.id_property, &ids) {
            Err(p) => problems.extend(p),
            Ok(b) => {
                let table: Vec<(String, f64)> = catchments.iter().map(|c| (c.id.clone(), c.area_ha)).collect();
                if g.area_from_geometry {
                    for (c, row) in catchments.iter_mut().zip(&rows) {
                        if let Some(f) = b.get(&c.id) {
                            c.area_ha = f.area_ha();
                            let open = c.area_ha - c.forest_ha;
                            let infested = c.infested.total_ha();
                            let tol = 1e-9 * c.area_ha.max(1.0);
                            if c.vulnerable_ha > open + tol || infested > c.vulnerable_ha + tol {
                                problems.push(
                                    Problem::in_file(
                                        &raw.catchments_path,
                                        format!(
                                            "with area_from_geometry the area is {:.1} ha (from {}), too small for forest {:.1} ha, vulnerable {:.1} ha and infested {:.1} ha",
                                            c.area_ha,
                                            g.path.display(),
                                            c.forest_ha,
                                            c.vulnerable_ha,
                                            infested
                                        ),
                                    )
                                    .row(*row)
                                    .column("area_ha"),
                                );
                            }
                        }
                    }
                } else {
                    warnings.extend(crate::input::gis::area_mismatches(&b, &table, g.area_tolerance).iter().map(|m| m.message()));
                }
                gis = Some(GisInputs { boundaries: b, area_tolerance: g.area_tolerance, area_from_geometry: g.area_from_geometry });
            }
        }
    }
    let mut calibration_links = Vec::new();
    if !catchments.is_empty() {
        problems.extend(apply_calibration(&raw.calibration, &raw.params, &mut catchments, &mut calibration_links));
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
    let mut pet_source = None;
    let mut pet_fallback = Vec::new();
    let mut climate = climate;
    if let (Some(w), false) = (&raw.weather, catchments.is_empty()) {
        match crate::input::weather::compute_pet_file(&w.path, &w.site, w.choice) {
            Err(e) => problems.extend(e.problems().iter().cloned().map(|p| p.or_file(&w.path))),
            Ok(out) => {
                let ids: Vec<&str> = catchments.iter().map(|c| c.id.as_str()).collect();
                let mut records = Vec::new();
                for a in &out.annual {
                    if a.status == crate::input::weather::STATUS_INCOMPLETE {
                        problems.push(Problem::in_file(
                            &w.path,
                            format!(
                                "{}{}: {} of the year's days have no weather; fill the gaps or remove the year (never summed short)",
                                a.catchment.as_deref().map(|c| format!("catchment '{c}', ")).unwrap_or_default(),
                                a.year,
                                a.missing_days
                            ),
                        ));
                        continue;
                    }
                    match &a.catchment {
                        Some(id) if ids.contains(&id.as_str()) => records.push((id.clone(), a.year, a.pet_mm)),
                        Some(id) => problems.push(
                            Problem::in_file(
                                &w.path,
                                format!("'{id}' is not a catchment of the scenario{}", crate::input::table::suggestion(id, &ids)),
                            )
                            .column("catchment"),
                        ),
                        None => records.extend(ids.iter().map(|id| (id.to_string(), a.year, a.pet_mm))),
                    }
                }
                let table = climate.unwrap_or_default().with_pet(&records);
                // Where the weather covers only part of a catchment's projection, the
                // other years fall back to its long-term PET: say so (issue: a silent splice).
                let n_years = raw.horizon_years + 1;
                for c in &catchments {
                    let years = raw.start_year..=raw.start_year + raw.horizon_years as i32;
                    let from_weather = table.pet_record_years(&c.id, years, raw.beyond_record);
                    if from_weather < n_years {
                        warnings.push(format!(
                            "{}: catchment '{}' has PET from the weather table in {from_weather} of its {n_years} projected years; \
                             the other {} use its long-term pet_mm from the catchment table",
                            w.path.display(),
                            c.id,
                            n_years - from_weather
                        ));
                        pet_fallback.push((c.id.clone(), from_weather, n_years - from_weather));
                    }
                }
                climate = Some(table);
                pet_source = Some((w.path.clone(), out.method.name().to_string()));
            }
        }
    }
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
    let strategies = if catchments.is_empty() {
        Vec::new()
    } else {
        match resolve_strategies(&raw, &catchments) {
            Ok(s) => s,
            Err(p) => {
                problems.extend(p);
                Vec::new()
            }
        }
    };
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
        stands_path: raw.stands_path,
        climate_path: raw.climate_path,
        params: raw.params,
        catchments,
        network,
        climate,
        beyond_record: raw.beyond_record,
        strategies,
        economics: raw.economics,
        treatments: raw.treatments,
        rain_scale: raw.rain_scale,
        pet_scale: raw.pet_scale,
        uncertain: raw.uncertain,
        ensemble: raw.ensemble,
        pet_source,
        pet_fallback,
        calibration_links,
        gis,
        warnings,
    })
}

struct RawScenario {
    title: String,
    start_year: i32,
    horizon_years: usize,
    catchments_path: PathBuf,
    stands_path: Option<PathBuf>,
    climate_path: Option<PathBuf>,
    beyond_record: BeyondRecord,
    params: ModelParams,
    calibration: Vec<RawCalibration>,
    economics: Economics,
    strategies: Vec<RawStrategy>,
    treatments: Vec<TreatmentMethod>,
    rain_scale: f64,
    pet_scale: f64,
    ensemble: Option<EnsembleConfig>,
    uncertain: Vec<UncertainKey>,
    weather: Option<WeatherSpec>,
    gis: Option<GisSpec>,
}

/// `[gis]` keys before the boundaries are read.
struct GisSpec {
    path: PathBuf,
    id_property: String,
    area_tolerance: f64,
    area_from_geometry: bool,
}

/// `[climate] weather`: PET computed from a weather table.
struct WeatherSpec {
    path: PathBuf,
    site: crate::input::weather::SiteMeta,
    choice: crate::input::weather::PetMethodChoice,
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
    /// Key path of the entry (`calibration[2]`), naming its uncertain values.
    path: String,
}

fn read_calibration(root: &Section<'_>) -> Vec<RawCalibration> {
    root.array_of_tables("calibration")
        .into_iter()
        .map(|s| {
            let r = RawCalibration {
                catchment: s.string("catchment", None).unwrap_or_default(),
                w_forest: s.opt_number(ParamId::CalibrationWForest),
                w_grass: s.opt_number(ParamId::CalibrationWGrass),
                omega_forest: s.opt_number(ParamId::CalibrationOmegaForest),
                omega_grass: s.opt_number(ParamId::CalibrationOmegaGrass),
                donor: s.opt_string("donor"),
                at_catchment: s.problem("catchment", ""),
                at_donor: s.problem("donor", ""),
                path: s.path.clone(),
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
fn apply_calibration(
    cal: &[RawCalibration],
    params: &ModelParams,
    catchments: &mut [Catchment],
    links: &mut Vec<(String, String)>,
) -> Vec<Problem> {
    let mut problems = Vec::new();
    let ids: Vec<&str> = catchments.iter().map(|c| c.id.as_str()).collect();
    let index = |id: &str| ids.iter().position(|&x| x == id);
    let with_msg = |p: &Problem, m: String| Problem { message: m, ..p.clone() };
    let mut fitted: Vec<Option<CoverCurves>> = vec![None; catchments.len()];
    for r in cal.iter().filter(|r| r.donor.is_none()) {
        let Some(i) = index(&r.catchment) else {
            problems.push(with_msg(
                &r.at_catchment,
                format!("'{}' is not a catchment of the scenario{}", r.catchment, crate::input::table::suggestion(&r.catchment, &ids)),
            ));
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
    for r in cal.iter().filter(|r| r.donor.is_none()) {
        links.push((r.catchment.clone(), r.path.clone()));
    }
    let mut applied = fitted.clone();
    for r in cal.iter() {
        let Some(donor) = &r.donor else { continue };
        let Some(i) = index(&r.catchment) else {
            problems.push(with_msg(
                &r.at_catchment,
                format!("'{}' is not a catchment of the scenario{}", r.catchment, crate::input::table::suggestion(&r.catchment, &ids)),
            ));
            continue;
        };
        match index(donor) {
            None => problems.push(with_msg(
                &r.at_donor,
                format!("donor '{donor}' is not a catchment of the scenario{}", crate::input::table::suggestion(donor, &ids)),
            )),
            Some(j) => match fitted[j] {
                Some(c) => {
                    applied[i] = Some(c);
                    if let Some(entry) = cal.iter().find(|e| e.donor.is_none() && e.catchment == *donor) {
                        links.push((r.catchment.clone(), entry.path.clone()));
                    }
                }
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
    let start_year = root.whole(ParamId::StartYear) as i32;
    let horizon_years = root.whole(ParamId::HorizonYears) as usize;
    let catchments_path = base.join(root.string("catchments", None).unwrap_or_default());
    let stands_path = root.opt_string("stands").map(|t| base.join(t));

    let (climate_path, beyond_record, (rain_scale, pet_scale), weather) = match root.section("climate") {
        Some(s) => {
            let p = s.opt_string("table").map(|t| base.join(t));
            let b = match s.choice("beyond_record", "cycle", &["cycle", "mean", "error"]).as_str() {
                "mean" => BeyondRecord::Mean,
                "error" => BeyondRecord::Error,
                _ => BeyondRecord::Cycle,
            };
            let scales = (s.number(ParamId::RainScale), s.number(ParamId::PetScale));
            let weather = s.opt_string("weather").map(|w| {
                let lat = s.number(ParamId::LatitudeDeg);
                let elev = s.number(ParamId::ElevationM);
                let mut site = crate::input::weather::SiteMeta::new(lat, elev);
                site.wind_height_m = s.number(ParamId::WindHeightM);
                let method = s.choice("pet_method", "auto", &["auto", "penman-monteith", "hargreaves", "priestley-taylor"]);
                let choice = method.parse().unwrap_or_default();
                WeatherSpec { path: base.join(w), site, choice }
            });
            if weather.is_none() {
                let _ = (s.get("latitude_deg"), s.get("elevation_m"), s.get("wind_height_m"), s.get("pet_method"));
            }
            s.finish();
            (p, b, scales, weather)
        }
        None => (None, BeyondRecord::Cycle, (default_of(ParamId::RainScale), default_of(ParamId::PetScale)), None),
    };
    let gis = root.section("gis").map(|s| {
        let g = GisSpec {
            path: base.join(s.string("boundaries", None).unwrap_or_default()),
            id_property: s.string("id_property", Some(crate::input::gis::DEFAULT_ID_PROPERTY)).unwrap_or_default(),
            area_tolerance: s.number(ParamId::AreaTolerance),
            area_from_geometry: match s.get("area_from_geometry") {
                None => false,
                Some(toml::Value::Boolean(b)) => *b,
                Some(_) => {
                    s.push("area_from_geometry", "must be true or false");
                    false
                }
            },
        };
        s.finish();
        g
    });
    let ensemble = root.section("ensemble").map(|s| {
        let e = read_ensemble(&s);
        s.finish();
        e
    });

    let (curves, forest_pet_factor, interception) = read_hydrology(root.section("hydrology"));
    let invasion = read_invasion(root.section("invasion"), root.section("canopy_closure"));
    let min_runoff_mm = match root.section("dilution") {
        Some(s) => {
            let v = s.number(ParamId::MinRunoff);
            s.finish();
            v
        }
        None => default_of(ParamId::MinRunoff),
    };
    let contaminants = read_contaminants(&root);
    let calibration = read_calibration(&root);
    let economics = match root.section("economics") {
        Some(s) => {
            let e = Economics { discount_rate: s.number(ParamId::DiscountRate), water_value_per_m3: s.opt_number(ParamId::WaterValue) };
            s.finish();
            e
        }
        None => Economics { discount_rate: default_of(ParamId::DiscountRate), water_value_per_m3: None },
    };
    let treatments = read_treatments(&root);
    let strategies = read_strategies(&root, base, &treatments);
    root.finish();
    RawScenario {
        title,
        start_year,
        horizon_years,
        catchments_path,
        stands_path,
        climate_path,
        beyond_record,
        params: ModelParams {
            curves,
            forest_pet_factor,
            interception,
            invasion,
            contaminants,
            min_runoff_mm,
            concentration_ceiling: ConcentrationCeiling::DEFAULT,
        },
        calibration,
        economics,
        strategies,
        treatments,
        rain_scale,
        pet_scale,
        ensemble,
        uncertain: Vec::new(),
        weather,
        gis,
    }
}

/// The table default of a parameter that has one (used when its whole section is absent).
fn default_of(id: ParamId) -> f64 {
    id.default_value().unwrap_or_else(|| id.range().bounds().0.max(0.0))
}

fn read_ensemble(s: &Section<'_>) -> EnsembleConfig {
    let members = s.whole(ParamId::Members) as usize;
    let sampling = match s.choice("sampling", "latin-hypercube", &["latin-hypercube", "monte-carlo"]).as_str() {
        "monte-carlo" => Sampling::MonteCarlo,
        _ => Sampling::LatinHypercube,
    };
    let seed = s.whole(ParamId::Seed) as u64;
    let mode = s.choice("climate", "none", &["none", "bootstrap", "stochastic"]);
    let block_years = s.whole(ParamId::BlockYears) as usize;
    let rain_cv = s.number(ParamId::RainCv);
    let rain_lag1 = s.number(ParamId::RainLag1);
    let pet_cv = s.number(ParamId::PetCv);
    let write_members = match s.get("write_members") {
        None => false,
        Some(toml::Value::Boolean(b)) => *b,
        Some(_) => {
            s.push("write_members", "must be true or false");
            false
        }
    };
    let climate = match mode.as_str() {
        "bootstrap" => ClimateVariability::Bootstrap { block_years },
        "stochastic" => ClimateVariability::Stochastic { rain_cv, rain_lag1, pet_cv },
        _ => ClimateVariability::None,
    };
    EnsembleConfig { members, sampling, seed, climate, write_members }
}

fn read_hydrology(s: Option<Section<'_>>) -> (CoverCurves, f64, CanopyInterception) {
    let default_interception = || {
        CanopyInterception::new(default_of(ParamId::InterceptionFraction), default_of(ParamId::InterceptionDemandShare))
            .unwrap_or(CanopyInterception::DEFAULT)
    };
    let Some(s) = s else {
        let curves = CoverCurves::Zhang { w_forest: default_of(ParamId::WForest), w_grass: default_of(ParamId::WGrass) };
        return (curves, default_of(ParamId::ForestPetFactor), default_interception());
    };
    let method = s.choice("method", "zhang", &["zhang", "fu"]);
    let w_forest = s.number(ParamId::WForest);
    let w_grass = s.number(ParamId::WGrass);
    let omega_forest = s.number(ParamId::OmegaForest);
    let omega_grass = s.number(ParamId::OmegaGrass);
    let factor = s.number(ParamId::ForestPetFactor);
    let fraction = s.number(ParamId::InterceptionFraction);
    let share = s.number(ParamId::InterceptionDemandShare);
    s.finish();
    let curves = if method == "fu" { CoverCurves::Fu { omega_forest, omega_grass } } else { CoverCurves::Zhang { w_forest, w_grass } };
    // The table's ranges are the constructor's; a value already refused falls back to the default.
    let interception = CanopyInterception::new(fraction, share).unwrap_or_else(|_| default_interception());
    (curves, factor, interception)
}

fn read_invasion(inv: Option<Section<'_>>, closure: Option<Section<'_>>) -> InvasionParams {
    let (spread, seed_age, seed_rain, medium, dense, span) = match &inv {
        Some(s) => {
            let spread = s.number(ParamId::SpreadRate);
            let seed_age = if matches!(s.get("seed_bearing_age_yr"), Some(toml::Value::Table(_))) {
                s.number(ParamId::SeedBearingAge).round() as u32
            } else {
                s.whole(ParamId::SeedBearingAge) as u32
            };
            let seed_rain = s.number(ParamId::SeedRain);
            let medium = s.whole(ParamId::MediumAge) as u32;
            let dense = s.whole(ParamId::DenseAge) as u32;
            let span = s.whole(ParamId::InitialDenseSpan) as u32;
            if dense <= medium {
                s.push("dense_age_yr", format!("must be greater than medium_age_yr ({medium})"));
            }
            let spread = match s.opt_number(ParamId::ArealGrowth) {
                None => spread,
                Some(_) if s.has("spread_rate_per_yr") => {
                    s.push(
                        "areal_growth_rate_per_yr",
                        "give either areal_growth_rate_per_yr (what is observed) or spread_rate_per_yr (r), not both",
                    );
                    spread
                }
                Some(g) => match spread_rate_for_areal_growth(g, seed_age) {
                    Ok(r) if ParamId::SpreadRate.range().contains(r) => r,
                    Ok(r) => {
                        s.push(
                            "areal_growth_rate_per_yr",
                            format!(
                                "{g} per year with seed_bearing_age_yr = {seed_age} needs a spread rate r = {r:.3} per seed-bearing hectare, above the allowed 1"
                            ),
                        );
                        spread
                    }
                    Err(e) => {
                        s.push("areal_growth_rate_per_yr", e.to_string());
                        spread
                    }
                },
            };
            s.finish();
            (spread, seed_age, seed_rain, medium, dense, span)
        }
        None => (
            default_of(ParamId::SpreadRate),
            default_of(ParamId::SeedBearingAge) as u32,
            default_of(ParamId::SeedRain),
            default_of(ParamId::MediumAge) as u32,
            default_of(ParamId::DenseAge) as u32,
            default_of(ParamId::InitialDenseSpan) as u32,
        ),
    };
    let closure = match closure {
        None => ClosureCurve::Logistic {
            half_closure_age_yr: default_of(ParamId::HalfClosureAge),
            steepness_per_yr: default_of(ParamId::ClosureSteepness),
            max_fraction: default_of(ParamId::ClosureMaxFraction),
        },
        Some(s) => {
            let kind = s.choice("curve", "logistic", &["logistic", "table"]);
            let half = s.number(ParamId::HalfClosureAge);
            let k = s.number(ParamId::ClosureSteepness);
            let max = s.number(ParamId::ClosureMaxFraction);
            let ages = s.list(ParamId::ClosureAges);
            let fractions = s.list(ParamId::ClosureFractions);
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
        let open = s.number(ParamId::OpenExport);
        let forest = s.number(ParamId::ForestExport);
        let guideline = s.opt_number(ParamId::Guideline);
        // The range (−1..=2) is checked by the parameter table, which places the
        // problem at its line and key; a refused value leaves pure dilution.
        let cq = ConcentrationDischarge::new(s.number(ParamId::CqExponent)).unwrap_or(ConcentrationDischarge::PURE_DILUTION);
        s.finish();
        out.push(Contaminant {
            name,
            open_export_kg_per_ha_yr: open,
            forest_export_kg_per_ha_yr: forest,
            guideline_mg_per_l: guideline,
            cq,
        });
    }
    out
}

fn build_network(path: &Path, catchments: &[Catchment], rows: &[usize]) -> std::result::Result<Network, Vec<Problem>> {
    let mut problems = Vec::new();
    let mut downstream = Vec::with_capacity(catchments.len());
    let index: std::collections::HashMap<&str, usize> = catchments.iter().enumerate().map(|(i, c)| (c.id.as_str(), i)).collect();
    for (i, c) in catchments.iter().enumerate() {
        match &c.flows_to {
            None => downstream.push(None),
            Some(to) => match index.get(to.as_str()) {
                Some(&j) => downstream.push(Some(j)),
                None => {
                    let ids: Vec<&str> = catchments.iter().map(|c| c.id.as_str()).collect();
                    problems.push(
                        Problem::in_file(
                            path,
                            format!("'{to}' is not the id of any catchment{}", crate::input::table::suggestion(to, &ids)),
                        )
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

fn class_from_name(name: &str) -> Option<DensityClass> {
    DensityClass::ALL.into_iter().find(|c| c.name() == name)
}

fn read_treatments(root: &Section<'_>) -> Vec<TreatmentMethod> {
    let mut out: Vec<TreatmentMethod> = Vec::new();
    for s in root.array_of_tables("treatment") {
        let name = s.string("name", None).unwrap_or_default();
        let class = s.choice("class", "scattered", &["scattered", "medium", "dense"]);
        if !s.has("class") {
            s.push("class", "required key is missing; choose one of: scattered, medium, dense");
        }
        let cost = s.number(ParamId::TreatmentCost);
        let class = class_from_name(&class).unwrap_or(DensityClass::Scattered);
        if out.iter().any(|m| m.name == name && m.class == class) {
            s.push("name", format!("treatment '{name}' for class {} is defined twice", class.name()));
        }
        s.finish();
        out.push(TreatmentMethod { name, class, cost_per_ha: cost });
    }
    out
}

/// A `[[strategy]]` entry before its budget table is resolved against the catchments.
struct RawStrategy {
    strategy: Strategy,
    budget: RawBudget,
    at_name: Problem,
}

enum RawBudget {
    Unlimited,
    Constant(f64, bool),
    Table(PathBuf, bool),
    Area(f64),
}

// Over 100 lines on purpose: every key of a [[strategy]] table read and cross-checked in one place, so its problems come out in line order.
fn read_strategies(root: &Section<'_>, base: &Path, treatments: &[TreatmentMethod]) -> Vec<RawStrategy> {
    let mut out: Vec<RawStrategy> = Vec::new();
    for s in root.array_of_tables("strategy") {
        let name = s.string("name", None).unwrap_or_default();
        if name == crate::schema::NO_CONTROL {
            s.push("name", "'no-control' is the reference strategy every run keeps; choose another name");
        } else if name.is_empty() || !name.chars().all(|c| c.is_ascii_alphanumeric() || c == '-' || c == '_') {
            s.push("name", format!("'{name}' must be non-empty and use only letters, digits, '-' and '_'"));
        }
        if out.iter().any(|r| r.strategy.name == name) {
            s.push("name", format!("strategy '{name}' is defined twice"));
        }
        let start_year = s.whole(ParamId::StrategyStartYear) as i32;
        let end_year = s.has("end_year").then(|| s.whole_from(ParamId::StrategyEndYear, start_year as i64) as i32);
        if !s.has("end_year") {
            let _ = s.get("end_year");
        }
        let rule = match s.choice("rule", "scattered-first", &["scattered-first", "densest-first", "best-value"]).as_str() {
            "densest-first" => PriorityRule::DensestFirst,
            "best-value" => PriorityRule::BestValue,
            _ => PriorityRule::ScatteredFirst,
        };
        let scope = s.choice("budget_scope", "basin", &["basin", "catchment"]);
        let per_catchment = scope == "catchment";
        let carry_over = match s.get("carry_over") {
            None => false,
            Some(toml::Value::Boolean(b)) => *b,
            Some(_) => {
                s.push("carry_over", "must be true or false");
                false
            }
        };
        let given: Vec<&str> = ["budget_per_yr", "budget_table", "area_ha_per_yr"].into_iter().filter(|k| s.has(k)).collect();
        let budget = match given.as_slice() {
            ["budget_per_yr"] => match s.get("budget_per_yr") {
                Some(toml::Value::String(t)) if t == "unlimited" => RawBudget::Unlimited,
                _ => RawBudget::Constant(s.opt_number(ParamId::BudgetPerYr).unwrap_or(0.0), per_catchment),
            },
            ["budget_table"] => RawBudget::Table(base.join(s.string("budget_table", Some("")).unwrap_or_default()), per_catchment),
            ["area_ha_per_yr"] => {
                if per_catchment {
                    s.push("budget_scope", "a fixed-area programme (area_ha_per_yr) treats the basin as one pool; remove budget_scope");
                }
                RawBudget::Area(s.opt_number(ParamId::AreaPerYr).unwrap_or(0.0))
            }
            [] => {
                s.push("name", "needs one of budget_per_yr ($/yr or \"unlimited\"), budget_table (CSV) or area_ha_per_yr (ha/yr)");
                RawBudget::Constant(0.0, false)
            }
            _ => {
                s.push(given[1], format!("give only one of budget_per_yr, budget_table, area_ha_per_yr (found {})", given.join(", ")));
                RawBudget::Constant(0.0, false)
            }
        };
        let _ = (s.get("budget_per_yr"), s.get("budget_table"), s.get("area_ha_per_yr"));
        let efficacy = s.number(ParamId::Efficacy);
        let regrowth_fraction = s.number(ParamId::RegrowthFraction);
        let regrowth_years = s.whole(ParamId::RegrowthYears) as u32;
        let follow_up = s.number(ParamId::FollowUpCost);
        let delays: Vec<u32> = s.list(ParamId::Delays).unwrap_or_default().into_iter().map(|d| d as u32).collect();
        let mut fixed: [Option<String>; 3] = [None, None, None];
        if let Some(m) = s.section("methods") {
            for (k, class) in DensityClass::ALL.iter().enumerate() {
                fixed[k] = m.opt_string(class.name());
                if let Some(name) = &fixed[k] {
                    if !treatments.iter().any(|t| &t.name == name && t.class == *class) {
                        m.push(class.name(), format!("no [[treatment]] named '{name}' for class {}", class.name()));
                    }
                }
            }
            m.finish();
        }
        let chosen = Strategy::choose_methods(treatments, [fixed[0].as_deref(), fixed[1].as_deref(), fixed[2].as_deref()]);
        for (k, class) in DensityClass::ALL.iter().enumerate() {
            if chosen[k].is_none() && fixed[k].is_none() {
                s.push("name", format!("no [[treatment]] is defined for class {}; add one with its cost_per_ha", class.name()));
            }
        }
        let at_name = s.problem("name", "");
        s.finish();
        let cost_per_ha = [0, 1, 2].map(|k| chosen[k].as_ref().map_or(0.0, |c| c.1));
        let method_names = [0, 1, 2].map(|k| chosen[k].as_ref().map_or(String::new(), |c| c.0.clone()));
        out.push(RawStrategy {
            strategy: Strategy {
                name,
                start_year,
                end_year,
                rule,
                effort: Effort::Unlimited,
                carry_over,
                cost_per_ha,
                method_names,
                efficacy,
                regrowth_fraction,
                regrowth_years,
                follow_up_cost_per_ha: follow_up,
                delays_yr: delays,
            },
            budget,
            at_name,
        });
    }
    out
}

/// Turns each strategy's budget into per-year amounts over the projection.
fn resolve_strategies(raw: &RawScenario, catchments: &[Catchment]) -> std::result::Result<Vec<Strategy>, Vec<Problem>> {
    let n_years = raw.horizon_years + 1;
    let mut problems = Vec::new();
    let mut out = Vec::new();
    for r in &raw.strategies {
        let mut st = r.strategy.clone();
        let last = raw.start_year + raw.horizon_years as i32;
        if st.start_year > last {
            problems.push(Problem {
                message: format!("strategy '{}' starts in {} after the projection ends ({last})", st.name, st.start_year),
                ..r.at_name.clone()
            });
        }
        st.effort = match &r.budget {
            RawBudget::Unlimited => Effort::Unlimited,
            RawBudget::Constant(b, false) => Effort::BasinBudget(vec![*b; n_years]),
            RawBudget::Constant(b, true) => Effort::CatchmentBudget(vec![vec![*b; n_years]; catchments.len()]),
            RawBudget::Area(a) => Effort::FixedArea(vec![*a; n_years]),
            RawBudget::Table(path, per_catchment) => {
                match crate::input::budget::read_budget_table(path, catchments, raw.start_year, n_years, *per_catchment) {
                    Ok(e) => e,
                    Err(p) => {
                        problems.extend(p);
                        Effort::Unlimited
                    }
                }
            }
        };
        out.push(st);
    }
    if problems.is_empty() {
        Ok(out)
    } else {
        Err(problems)
    }
}
