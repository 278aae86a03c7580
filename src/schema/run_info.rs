//! `run_info.json`: what was run, with which settings, and the cautions — the
//! serde types written by a run ([`RunInfo`]) and by `yieldshift fit`
//! ([`FitRunInfo`]), and read by the report, the GeoJSON, the maps and `merge`.
//!
//! The file is pretty-printed JSON with its keys in alphabetical order at every
//! level (the order it has always had), so the fields of every struct here are
//! declared alphabetically: field order is key order. A test checks it.

use crate::error::{Error, Problem, Result};
use crate::model::budyko::CoverCurves;
use crate::model::closure::ClosureCurve;
use serde::{Deserialize, Serialize};
use std::path::Path;

/// Value of `tool` in every file yieldshift writes.
pub const TOOL: &str = "yieldshift";
/// Value of `inputs_copied_to`.
pub const INPUTS_COPIED_TO: &str = "inputs/";
/// Most years after the start a run folder can hold (scenarios allow 300).
pub const MAX_HORIZON_YEARS: usize = 1000;
/// Value of `command` in the run_info.json of `yieldshift fit`.
pub const FIT_COMMAND: &str = "fit";

/// The `run_info.json` of `yieldshift run` (and of a shard, and of `merge`).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct RunInfo {
    /// Canopy closure curve (not recorded by early versions).
    #[serde(default)]
    pub canopy_closure: Option<CanopyClosure>,
    /// Catchment table as given to the run.
    pub catchment_table: String,
    /// Catchments projected.
    #[serde(default)]
    pub catchments: usize,
    /// The cautions of the run.
    pub cautions: String,
    /// Climate table as given, if any.
    #[serde(default)]
    pub climate_table: Option<String>,
    /// Contaminants in scenario order.
    pub contaminants: Vec<ContaminantInfo>,
    /// Discount rate per year.
    pub discount_rate: f64,
    /// Ensemble settings, when an ensemble was run.
    #[serde(default)]
    pub ensemble: Option<EnsembleInfo>,
    /// Catchment boundaries, when given.
    #[serde(default)]
    pub gis: Option<GisInfo>,
    /// Years after the start.
    pub horizon_years: usize,
    /// Water-balance curves.
    pub hydrology: Hydrology,
    /// `zhang` or `fu` (as in `hydrology.method`).
    #[serde(default)]
    pub hydrology_method: String,
    /// Folder of the copied inputs ([`INPUTS_COPIED_TO`]).
    #[serde(default)]
    pub inputs_copied_to: String,
    /// Spread and density of the invader.
    pub invasion: Invasion,
    /// Runoff below which no concentration is stated, mm/yr (not recorded by early versions).
    #[serde(default)]
    pub min_runoff_mm: Option<f64>,
    /// PET computed from a weather table, when it was.
    #[serde(default)]
    pub pet_from_weather: Option<PetFromWeather>,
    /// Scenario file as given to the run.
    pub scenario: String,
    /// The stand table (dated cohorts), if the scenario gave one.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub stand_table: Option<String>,
    /// First projected year.
    pub start_year: i32,
    /// Strategies, `no-control` first.
    pub strategies: Vec<String>,
    /// Scenario title.
    pub title: String,
    /// [`TOOL`].
    #[serde(default)]
    pub tool: String,
    /// Version of yieldshift that wrote the run.
    #[serde(default = "unknown")]
    pub version: String,
    /// Value of water, $/m³.
    #[serde(default)]
    pub water_value_per_m3: Option<f64>,
}

fn unknown() -> String {
    "unknown".into()
}

/// The canopy closure curve.
///
/// Written without a tag of serde's own: `curve` is a key like the others, so
/// that the keys stay in alphabetical order (`ages_yr` before `curve`).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(untagged)]
pub enum CanopyClosure {
    /// Logistic closure with stand age.
    Logistic {
        /// `"logistic"`.
        curve: LogisticCurve,
        /// Age of half closure, years.
        half_closure_age_yr: f64,
        /// Closure of a mature stand, 0–1.
        max_fraction: f64,
        /// Steepness, 1/yr.
        steepness_per_yr: f64,
    },
    /// A table of stand ages and closures.
    Table {
        /// Stand ages, years.
        ages_yr: Vec<f64>,
        /// `"table"`.
        curve: TableCurve,
        /// Closure at each age, 0–1.
        fractions: Vec<f64>,
    },
}

/// The `curve` value of a logistic closure.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
pub enum LogisticCurve {
    /// `"logistic"`.
    #[serde(rename = "logistic")]
    Logistic,
}

/// The `curve` value of a tabulated closure.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
pub enum TableCurve {
    /// `"table"`.
    #[serde(rename = "table")]
    Table,
}

impl From<&ClosureCurve> for CanopyClosure {
    fn from(c: &ClosureCurve) -> CanopyClosure {
        match c {
            ClosureCurve::Logistic { half_closure_age_yr, steepness_per_yr, max_fraction } => CanopyClosure::Logistic {
                curve: LogisticCurve::Logistic,
                half_closure_age_yr: *half_closure_age_yr,
                max_fraction: *max_fraction,
                steepness_per_yr: *steepness_per_yr,
            },
            ClosureCurve::Table { ages_yr, fractions } => {
                CanopyClosure::Table { ages_yr: ages_yr.clone(), curve: TableCurve::Table, fractions: fractions.clone() }
            }
        }
    }
}

impl CanopyClosure {
    /// A parameter of the logistic curve by its key (`half_closure_age_yr`,
    /// `steepness_per_yr`, `max_fraction`); `None` for a table.
    pub fn logistic_parameter(&self, key: &str) -> Option<f64> {
        match self {
            CanopyClosure::Logistic { half_closure_age_yr, max_fraction, steepness_per_yr, .. } => match key {
                "half_closure_age_yr" => Some(*half_closure_age_yr),
                "max_fraction" => Some(*max_fraction),
                "steepness_per_yr" => Some(*steepness_per_yr),
                _ => None,
            },
            CanopyClosure::Table { .. } => None,
        }
    }
}

/// A contaminant as recorded.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ContaminantInfo {
    /// Concentration–discharge exponent `b` of the diffuse load (−1 pure dilution;
    /// runs written before the key existed were pure dilution).
    #[serde(default = "pure_dilution_exponent")]
    pub cq_exponent: f64,
    /// Export coefficient under conifer canopy, kg/ha/yr.
    pub forest_export_kg_per_ha_yr: f64,
    /// Guideline, mg/L.
    #[serde(default)]
    pub guideline_mg_per_l: Option<f64>,
    /// Name (column prefix).
    pub name: String,
    /// Export coefficient of open land, kg/ha/yr.
    pub open_export_kg_per_ha_yr: f64,
}

impl From<&crate::model::Contaminant> for ContaminantInfo {
    fn from(c: &crate::model::Contaminant) -> ContaminantInfo {
        ContaminantInfo {
            cq_exponent: c.cq.exponent(),
            forest_export_kg_per_ha_yr: c.forest_export_kg_per_ha_yr,
            guideline_mg_per_l: c.guideline_mg_per_l,
            name: c.name.clone(),
            open_export_kg_per_ha_yr: c.open_export_kg_per_ha_yr,
        }
    }
}

/// The exponent of runs recorded before `cq_exponent` existed: pure dilution.
fn pure_dilution_exponent() -> f64 {
    crate::model::dilution::ConcentrationDischarge::PURE_DILUTION.exponent()
}

/// Ensemble settings.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct EnsembleInfo {
    /// How member climates vary.
    pub climate: EnsembleClimate,
    /// Members.
    pub members: usize,
    /// How parameters are sampled.
    pub sampling: Sampling,
    /// Seed.
    pub seed: u64,
}

/// How member climates vary.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum EnsembleClimate {
    /// Every member has the run's climate.
    None,
    /// Blocks of record years resampled.
    Bootstrap,
    /// Stochastic multipliers.
    Stochastic,
}

/// How an ensemble samples its parameters.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Sampling {
    /// `monte-carlo`.
    MonteCarlo,
    /// `latin-hypercube`.
    LatinHypercube,
}

impl From<crate::model::uncertainty::Sampling> for Sampling {
    fn from(s: crate::model::uncertainty::Sampling) -> Sampling {
        match s {
            crate::model::uncertainty::Sampling::MonteCarlo => Sampling::MonteCarlo,
            crate::model::uncertainty::Sampling::LatinHypercube => Sampling::LatinHypercube,
        }
    }
}

/// Catchment boundaries of the run.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct GisInfo {
    /// Areas taken from the geometry instead of the table.
    pub area_from_geometry: bool,
    /// Relative tolerance of the area check.
    pub area_tolerance: f64,
    /// File name of the boundaries (copied into `inputs/`).
    pub boundaries: Option<String>,
    /// Feature property holding the catchment id.
    pub id_property: String,
}

/// Water-balance curves and the forest PET factor.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Hydrology {
    /// Forest PET / grass PET where the table gives none.
    pub forest_pet_factor: f64,
    /// Share of the interception loss taken from the transpiration demand (not
    /// recorded by early versions, which had no interception).
    #[serde(default)]
    pub interception_demand_share: Option<f64>,
    /// Annual interception loss of a closed canopy, fraction of rain (absent: none).
    #[serde(default)]
    pub interception_fraction: Option<f64>,
    /// The curves: `method` and its parameters.
    #[serde(flatten)]
    pub curves: Curves,
}

/// The curves of each cover, as recorded (`method` = `zhang` or `fu`).
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(tag = "method", rename_all = "lowercase")]
pub enum Curves {
    /// Zhang et al. (2001).
    Zhang {
        /// Forest `w`.
        w_forest: f64,
        /// Grass `w`.
        w_grass: f64,
    },
    /// Fu (1981).
    Fu {
        /// Forest ω.
        omega_forest: f64,
        /// Grass ω.
        omega_grass: f64,
    },
}

impl From<CoverCurves> for Curves {
    fn from(c: CoverCurves) -> Curves {
        match c {
            CoverCurves::Zhang { w_forest, w_grass } => Curves::Zhang { w_forest, w_grass },
            CoverCurves::Fu { omega_forest, omega_grass } => Curves::Fu { omega_forest, omega_grass },
        }
    }
}

impl From<Curves> for CoverCurves {
    fn from(c: Curves) -> CoverCurves {
        match c {
            Curves::Zhang { w_forest, w_grass } => CoverCurves::Zhang { w_forest, w_grass },
            Curves::Fu { omega_forest, omega_grass } => CoverCurves::Fu { omega_forest, omega_grass },
        }
    }
}

/// Spread and density parameters.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Invasion {
    /// Age from which a cohort is dense, years.
    pub dense_age_yr: u32,
    /// Asymptotic growth of the infested area, 1/yr, that `spread_rate_per_yr` and
    /// `seed_bearing_age_yr` give far from the cap (what the field observes; equal to
    /// `areal_growth_rate_per_yr` when the scenario gave that). Not recorded by early versions.
    #[serde(default)]
    pub implied_areal_growth_per_yr: Option<f64>,
    /// Age span of the initially dense area, years (not recorded by early versions).
    #[serde(default)]
    pub initial_dense_span_yr: Option<u32>,
    /// Age from which a cohort is of medium density, years.
    pub medium_age_yr: u32,
    /// Age from which a cohort bears seed, years.
    pub seed_bearing_age_yr: u32,
    /// Seed rain from outside, ha/yr.
    pub seed_rain_ha_per_yr: f64,
    /// Spread rate, 1/yr.
    pub spread_rate_per_yr: f64,
}

impl From<&crate::model::InvasionParams> for Invasion {
    fn from(p: &crate::model::InvasionParams) -> Invasion {
        Invasion {
            dense_age_yr: p.dense_age_yr,
            implied_areal_growth_per_yr: crate::model::cover::areal_growth_for_spread_rate(p.spread_rate_per_yr, p.seed_bearing_age_yr)
                .ok(),
            initial_dense_span_yr: Some(p.initial_dense_span_yr),
            medium_age_yr: p.medium_age_yr,
            seed_bearing_age_yr: p.seed_bearing_age_yr,
            seed_rain_ha_per_yr: p.seed_rain_ha_per_yr,
            spread_rate_per_yr: p.spread_rate_per_yr,
        }
    }
}

/// PET computed from a weather table.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PetFromWeather {
    /// PET method.
    pub method: String,
    /// Catchments whose projection has PET from the weather table in only some years;
    /// the other years use the catchment table's long-term `pet_mm`.
    #[serde(default)]
    pub partial: Vec<PetPartial>,
    /// Weather table as given.
    pub weather_table: String,
}

/// A catchment whose PET comes from the weather table in only some projected years.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PetPartial {
    /// Catchment id.
    pub catchment: String,
    /// Projected years at the long-term `pet_mm`.
    pub long_term_years: usize,
    /// Projected years with PET from the weather table.
    pub weather_years: usize,
}

impl RunInfo {
    /// Last projected year.
    pub fn end_year(&self) -> i32 {
        self.start_year + self.horizon_years as i32
    }

    /// The curves as the model takes them.
    pub fn cover_curves(&self) -> CoverCurves {
        self.hydrology.curves.into()
    }

    /// Reads `run_dir/run_info.json`; refuses years no run writes (a hand-edited
    /// file), so that year arithmetic of the readers cannot overflow.
    pub fn read(run_dir: &Path) -> Result<RunInfo> {
        let path = run_dir.join(super::RUN_INFO_FILE);
        let info: RunInfo = read_json(&path)?;
        if !(1..=9999).contains(&info.start_year) {
            return Err(Error::invalid(
                Problem::in_file(&path, format!("{} is not a year from 1 to 9999", info.start_year)).column("start_year"),
            ));
        }
        if info.horizon_years > MAX_HORIZON_YEARS {
            return Err(Error::invalid(
                Problem::in_file(&path, format!("{} is more years than a run projects (at most {MAX_HORIZON_YEARS})", info.horizon_years))
                    .column("horizon_years"),
            ));
        }
        Ok(info)
    }

    /// The file's text: pretty JSON and a final line end.
    pub fn to_json(&self) -> Result<String> {
        to_json(self)
    }
}

/// The `run_info.json` of `yieldshift fit`.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct FitRunInfo {
    /// Bootstrap resamples.
    pub bootstrap_samples: usize,
    /// Ids of the fitted catchments.
    pub catchments_fitted: Vec<String>,
    /// Ids of catchments with no observations.
    pub catchments_ungauged: Vec<String>,
    /// The general cautions and those of calibration.
    pub cautions: String,
    /// Climate table as given, if any.
    pub climate_table: Option<String>,
    /// [`FIT_COMMAND`].
    pub command: String,
    /// Cover whose parameter was fitted (`grass`, `forest`).
    pub cover_fitted: String,
    /// Donor pairs given with `--donor`.
    pub donors: Vec<DonorInfo>,
    /// `zhang` or `fu`.
    pub hydrology_method: String,
    /// Level of the bootstrap interval.
    pub interval_level: f64,
    /// Moving average of the series fit, years.
    pub moving_average_yr: usize,
    /// Observations left out.
    pub observations_left_out: usize,
    /// Observed-flow table as given.
    pub observed_flows: String,
    /// Scenario key of the fitted parameter.
    pub parameter: Option<String>,
    /// Sign convention of percent bias.
    pub pbias_convention: String,
    /// Scenario file as given.
    pub scenario: String,
    /// Seed of the bootstrap.
    pub seed: u64,
    /// What the statistics compare.
    pub statistics: String,
    /// Scenario title.
    pub title: String,
    /// [`TOOL`].
    pub tool: String,
    /// Which fitted value `calibration.toml` holds.
    pub value_written: String,
    /// Version of yieldshift.
    pub version: String,
}

/// An ungauged catchment and the gauged one whose values it takes.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct DonorInfo {
    /// The gauged catchment.
    pub gauged: String,
    /// The ungauged catchment.
    pub ungauged: String,
}

impl FitRunInfo {
    /// The file's text: pretty JSON and a final line end.
    pub fn to_json(&self) -> Result<String> {
        to_json(self)
    }
}

/// The `run_info.json` of `yieldshift fit --mean-annual` (long-term means, regional distribution).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct MeanAnnualFitRunInfo {
    /// Catchments fitted.
    pub catchments_fitted: usize,
    /// Rows of the mean-annual table.
    pub catchments_in_table: usize,
    /// Catchments left out (every reason).
    pub catchments_left_out: usize,
    /// The general cautions and those of the regional distribution.
    pub cautions: String,
    /// [`FIT_COMMAND`].
    pub command: String,
    /// What was fitted: `grass`, `forest` or `catchment` (one curve for the whole catchment).
    pub cover_fitted: String,
    /// The regional distribution as written in `regional.toml`, if one was fitted.
    pub distribution: Option<String>,
    /// [`MEAN_ANNUAL_FIT_MODE`].
    pub fit_mode: String,
    /// Forest PET as a multiple of grass PET.
    pub forest_pet_factor: f64,
    /// `zhang` or `fu`.
    pub hydrology_method: String,
    /// Canopy interception: share of the loss taken from the transpiration demand.
    pub interception_demand_share: f64,
    /// Canopy interception: fraction of rain of a closed canopy (0 = off).
    pub interception_fraction: f64,
    /// Catchments left out, by reason code.
    pub left_out_by_reason: std::collections::BTreeMap<String, usize>,
    /// `--max-snow-fraction`, if given.
    pub max_snow_fraction: Option<f64>,
    /// The mean-annual table as given.
    pub mean_annual_table: String,
    /// Scenario key of the fitted parameter (`w_grass`, ...).
    pub parameter: String,
    /// Scenario file as given, if any (without one, the parameter table's defaults).
    pub scenario: Option<String>,
    /// Which catchments the distribution describes.
    pub subset: String,
    /// [`TOOL`].
    pub tool: String,
    /// Version of yieldshift.
    pub version: String,
}

/// `fit_mode` of [`MeanAnnualFitRunInfo`].
pub const MEAN_ANNUAL_FIT_MODE: &str = "mean-annual";

/// Pretty JSON and a final line end, as every JSON file of a run folder is
/// written; floating-point numbers are recorded to
/// [`RECORDED_DIGITS`](crate::schema::numbers::RECORDED_DIGITS) significant digits
/// ([`recorded_json`](crate::schema::numbers::recorded_json)), so a derived value
/// reads 0.525, not 0.5249999999999999.
pub fn to_json<T: Serialize>(value: &T) -> Result<String> {
    crate::schema::numbers::recorded_json(value).map(|t| t + "\n").map_err(|e| Error::Other(format!("writing JSON: {e}")))
}

/// Reads a JSON file of a run folder into its type. Errors name the file, the
/// line and, where it can be told, the key.
pub fn read_json<T: serde::de::DeserializeOwned>(path: &Path) -> Result<T> {
    let text = std::fs::read_to_string(path).map_err(|e| Error::io(format!("reading {}", path.display()), e))?;
    parse_json(path, &text)
}

/// [`read_json`] of text already read.
pub fn parse_json<T: serde::de::DeserializeOwned>(path: &Path, text: &str) -> Result<T> {
    serde_json::from_str(text).map_err(|e| {
        let mut p = if e.is_syntax() || e.is_eof() {
            Problem::in_file(path, format!("is not valid JSON: {e}"))
        } else {
            Problem::in_file(path, format!("does not hold what yieldshift writes there: {e}"))
        };
        if e.line() > 0 {
            p = p.row(e.line());
            if let Some(key) = key_at_line(text, e.line()).filter(|_| e.is_data()) {
                p = p.column(key);
            }
        }
        Error::invalid(p)
    })
}

/// The key on line `line` (1-based) of pretty-printed JSON, if the line starts with one.
fn key_at_line(text: &str, line: usize) -> Option<String> {
    let l = text.lines().nth(line.checked_sub(1)?)?.trim_start();
    let rest = l.strip_prefix('"')?;
    let end = rest.find('"')?;
    rest[end + 1..].trim_start().starts_with(':').then(|| rest[..end].to_string())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn example(closure: CanopyClosure, curves: Curves) -> RunInfo {
        RunInfo {
            canopy_closure: Some(closure),
            catchment_table: "data/catchments.csv".into(),
            catchments: 2,
            cautions: "Screening only.".into(),
            climate_table: None,
            contaminants: vec![ContaminantInfo {
                cq_exponent: -0.5,
                forest_export_kg_per_ha_yr: 2.2,
                guideline_mg_per_l: Some(1.5),
                name: "nitrate_n".into(),
                open_export_kg_per_ha_yr: 2.5,
            }],
            discount_rate: 0.05,
            ensemble: Some(EnsembleInfo { climate: EnsembleClimate::Bootstrap, members: 60, sampling: Sampling::LatinHypercube, seed: 7 }),
            gis: Some(GisInfo {
                area_from_geometry: false,
                area_tolerance: 0.05,
                boundaries: Some("b.geojson".into()),
                id_property: "id".into(),
            }),
            horizon_years: 60,
            hydrology: Hydrology {
                forest_pet_factor: 1.0,
                interception_demand_share: Some(0.6),
                interception_fraction: Some(0.25),
                curves,
            },
            hydrology_method: "zhang".into(),
            inputs_copied_to: INPUTS_COPIED_TO.into(),
            invasion: Invasion {
                dense_age_yr: 20,
                implied_areal_growth_per_yr: Some(0.0429),
                initial_dense_span_yr: Some(10),
                medium_age_yr: 10,
                seed_bearing_age_yr: 8,
                seed_rain_ha_per_yr: 2.0,
                spread_rate_per_yr: 0.06,
            },
            min_runoff_mm: Some(5.0),
            pet_from_weather: Some(PetFromWeather { method: "fao56".into(), weather_table: "w.csv".into(), partial: Vec::new() }),
            scenario: "s.toml".into(),
            stand_table: None,
            start_year: 2027,
            strategies: vec!["no-control".into()],
            title: "T".into(),
            tool: TOOL.into(),
            version: "0.1.0".into(),
            water_value_per_m3: Some(0.35),
        }
    }

    /// serde_json's own map sorts its keys: text from the struct equals text
    /// from the map exactly when every struct declares its fields alphabetically.
    fn keys_sorted<T: Serialize>(v: &T) {
        let direct = to_json(v).unwrap();
        let sorted = to_json(&serde_json::to_value(v).unwrap()).unwrap();
        assert_eq!(direct, sorted);
    }

    /// Regression (issue 14): run_info.json printed the middle of the uniform
    /// 0.35–0.7 w_grass range as 0.5249999999999999, and a derived areal growth
    /// with 17 digits. Every number is recorded to 12 significant digits.
    #[test]
    fn derived_numbers_are_written_as_a_reader_expects() {
        let logistic = CanopyClosure::Logistic {
            curve: LogisticCurve::Logistic,
            half_closure_age_yr: 12.0,
            max_fraction: 1.0,
            steepness_per_yr: 0.35,
        };
        let mut info = example(logistic, Curves::Zhang { w_forest: 2.0, w_grass: (0.35 + 0.7) / 2.0 });
        info.invasion.implied_areal_growth_per_yr = Some(0.04288161696269708);
        let text = info.to_json().unwrap();
        assert!(text.contains("\"w_grass\": 0.525\n"), "{text}");
        assert!(text.contains("\"implied_areal_growth_per_yr\": 0.0428816169627,"), "{text}");
        assert!(!text.contains("99999") && !text.contains("00000"), "{text}");
        // Values read back are the recorded ones; writing them again changes nothing.
        let back = parse_json::<RunInfo>(Path::new("run_info.json"), &text).unwrap();
        assert_eq!(back.to_json().unwrap(), text);
    }

    #[test]
    fn keys_are_in_alphabetical_order_at_every_level_and_read_back() {
        let logistic = CanopyClosure::Logistic {
            curve: LogisticCurve::Logistic,
            half_closure_age_yr: 12.0,
            max_fraction: 1.0,
            steepness_per_yr: 0.35,
        };
        let table = CanopyClosure::Table { ages_yr: vec![0.0, 30.0], curve: TableCurve::Table, fractions: vec![0.0, 0.9] };
        for (closure, curves) in
            [(logistic, Curves::Zhang { w_forest: 2.0, w_grass: 0.525 }), (table, Curves::Fu { omega_forest: 3.1, omega_grass: 2.4 })]
        {
            let info = example(closure, curves);
            keys_sorted(&info);
            let text = info.to_json().unwrap();
            assert!(text.ends_with("}\n"));
            assert_eq!(parse_json::<RunInfo>(Path::new("run_info.json"), &text).unwrap(), info);
        }
        let fit = FitRunInfo {
            bootstrap_samples: 1000,
            catchments_fitted: vec!["a".into()],
            catchments_ungauged: vec![],
            cautions: "c".into(),
            climate_table: Some("c.csv".into()),
            command: FIT_COMMAND.into(),
            cover_fitted: "grass".into(),
            donors: vec![DonorInfo { gauged: "a".into(), ungauged: "b".into() }],
            hydrology_method: "zhang".into(),
            interval_level: 0.9,
            moving_average_yr: 1,
            observations_left_out: 0,
            observed_flows: "o.csv".into(),
            parameter: Some("w_grass".into()),
            pbias_convention: "p".into(),
            scenario: "s.toml".into(),
            seed: 1,
            statistics: "s".into(),
            title: "t".into(),
            tool: TOOL.into(),
            value_written: "v".into(),
            version: "0".into(),
        };
        keys_sorted(&fit);
    }

    #[test]
    fn a_hand_edited_file_is_refused_naming_line_and_key() {
        let info = example(
            CanopyClosure::Logistic {
                curve: LogisticCurve::Logistic,
                half_closure_age_yr: 12.0,
                max_fraction: 1.0,
                steepness_per_yr: 0.35,
            },
            Curves::Zhang { w_forest: 2.0, w_grass: 0.5 },
        );
        let text = info.to_json().unwrap().replace("\"discount_rate\": 0.05", "\"discount_rate\": \"five\"");
        let e = parse_json::<RunInfo>(Path::new("run_info.json"), &text).unwrap_err().to_string();
        assert!(e.contains("run_info.json") && e.contains("discount_rate"), "{e}");
        let line = text.lines().position(|l| l.contains("five")).unwrap() + 1;
        assert!(e.contains(&format!("row {line}")), "{e}");
        let e = parse_json::<RunInfo>(Path::new("run_info.json"), "{ \"title\": ").unwrap_err().to_string();
        assert!(e.contains("not valid JSON"), "{e}");
        let curves: CoverCurves = Curves::Fu { omega_forest: 3.0, omega_grass: 2.0 }.into();
        assert_eq!(curves, CoverCurves::Fu { omega_forest: 3.0, omega_grass: 2.0 });
    }

    #[test]
    fn a_run_written_before_the_exponent_existed_reads_as_pure_dilution() {
        let info = example(
            CanopyClosure::Logistic {
                curve: LogisticCurve::Logistic,
                half_closure_age_yr: 12.0,
                max_fraction: 1.0,
                steepness_per_yr: 0.35,
            },
            Curves::Zhang { w_forest: 2.0, w_grass: 0.5 },
        );
        let text = info.to_json().unwrap();
        assert!(text.contains("\"cq_exponent\": -0.5"), "{text}");
        let older = text.replace("\"cq_exponent\": -0.5,", "");
        assert_ne!(older, text);
        let read = parse_json::<RunInfo>(Path::new("run_info.json"), &older).unwrap();
        assert_eq!(read.contaminants[0].cq_exponent, -1.0);
    }
}
