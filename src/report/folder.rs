//! Reading a run folder: `run_info.json`, the CSV tables, the copied inputs and the
//! list of figures. Nothing is recomputed; every value the report shows is read
//! here. A hand-edited or damaged file gives [`Error::Invalid`] naming the file,
//! the row (spreadsheet numbering, header = row 1) and the column — never a panic.

use crate::error::{Error, Problem, Result};
use std::collections::{BTreeMap, BTreeSet};
use std::path::{Path, PathBuf};

/// Strategy name of the reference projection.
pub const NO_CONTROL: &str = "no-control";
/// Catchment id of the pooled basin rows.
pub const BASIN: &str = "basin";
/// Most catchments given a detailed section in the report (the largest losses at the horizon).
pub const MAX_DETAILED: usize = 30;
/// Most catchments drawn in Budyko space (the largest changes at the horizon).
pub const BUDYKO_MAX: usize = 8;
/// Most problems listed per file before the rest are summarised.
const MAX_PROBLEMS: usize = 25;

/// A CSV file read whole, with column lookup by name.
#[derive(Debug, Clone)]
pub struct CsvTable {
    /// Path on disk.
    pub path: PathBuf,
    /// Name relative to the run folder (e.g. `summary.csv`), used in provenance.
    pub name: String,
    /// Header names.
    pub headers: Vec<String>,
    /// Records.
    pub rows: Vec<csv::StringRecord>,
    /// Spreadsheet row of each record (header = 1).
    pub lines: Vec<usize>,
    /// Numbers use a decimal comma (a `;`-separated input table).
    pub decimal_comma: bool,
}

impl CsvTable {
    /// Reads `dir/rel` whole; `Ok(None)` when the file does not exist.
    pub fn read(dir: &Path, rel: &str) -> Result<Option<CsvTable>> {
        Self::read_filtered(dir, rel, |_, _| true)
    }

    /// Reads `dir/rel` as a stream, keeping only the records `keep` accepts
    /// (called with the header and each well-formed record, so it can also count
    /// what it does not keep). Memory grows with the rows kept, not the file.
    pub fn read_filtered(dir: &Path, rel: &str, mut keep: impl FnMut(&[String], &csv::StringRecord) -> bool) -> Result<Option<CsvTable>> {
        let path = dir.join(rel);
        if !path.is_file() {
            return Ok(None);
        }
        let file = std::fs::File::open(&path).map_err(|e| Error::io(format!("reading {}", path.display()), e))?;
        let mut rd =
            csv::ReaderBuilder::new().has_headers(true).flexible(true).from_reader(std::io::BufReader::with_capacity(1 << 16, file));
        let headers: Vec<String> = rd
            .headers()
            .map_err(|e| Error::invalid(Problem::in_file(&path, format!("cannot read the header: {e}")).row(1)))?
            .iter()
            .enumerate()
            .map(|(i, h)| if i == 0 { h.trim_start_matches('\u{feff}').trim().to_string() } else { h.trim().to_string() })
            .collect();
        let mut rows = Vec::new();
        let mut lines = Vec::new();
        let mut problems = Vec::new();
        let mut rec = csv::StringRecord::new();
        loop {
            match rd.read_record(&mut rec) {
                Ok(false) => break,
                Ok(true) => {
                    let line = rec.position().map_or(0, |p| p.line() as usize);
                    if rec.iter().all(|f| f.trim().is_empty()) {
                        continue;
                    }
                    if rec.len() != headers.len() {
                        problems.push(
                            Problem::in_file(&path, format!("has {} fields where the header has {}", rec.len(), headers.len())).row(line),
                        );
                    } else if keep(&headers, &rec) {
                        lines.push(line);
                        rows.push(rec.clone());
                    }
                }
                Err(e) => {
                    let line = e.position().map(|p| p.line() as usize);
                    let msg = match e.kind() {
                        csv::ErrorKind::Utf8 { .. } => "is not UTF-8 text".to_string(),
                        _ => format!("is not valid CSV: {e}"),
                    };
                    let mut p = Problem::in_file(&path, msg);
                    if let Some(l) = line {
                        p = p.row(l);
                    }
                    problems.push(p);
                    if !matches!(e.kind(), csv::ErrorKind::Utf8 { .. }) {
                        break;
                    }
                }
            }
            if problems.len() >= MAX_PROBLEMS {
                break;
            }
        }
        if !problems.is_empty() {
            return Err(Error::Invalid(problems));
        }
        Ok(Some(CsvTable { path, name: rel.to_string(), headers, rows, lines, decimal_comma: false }))
    }

    /// Reads a copied input table (`inputs/…`) with the reader the run used for it
    /// ([`crate::input::table::read_table`]: BOM, CRLF, `;` and decimal commas, blank
    /// rows), so any table the run accepted can be shown.
    pub fn read_input(dir: &Path, rel: &str) -> Result<Option<CsvTable>> {
        let path = dir.join(rel);
        if !path.is_file() {
            return Ok(None);
        }
        let t = crate::input::table::read_table(&path).map_err(Error::Invalid)?;
        let (lines, rows) = t.rows.into_iter().unzip();
        Ok(Some(CsvTable { path, name: rel.to_string(), headers: t.headers, rows, lines, decimal_comma: t.semicolon }))
    }

    /// A number as the input table writes it (decimal comma allowed in `;` tables).
    pub fn input_number(&self, r: usize, c: usize) -> Option<f64> {
        crate::input::table::parse_number(self.text(r, c), self.decimal_comma).ok().filter(|v| v.is_finite())
    }

    /// Index of column `name`.
    pub fn col(&self, name: &str) -> Option<usize> {
        self.headers.iter().position(|h| h == name)
    }

    /// Indices of the named columns; a problem for each that is missing.
    pub fn require(&self, names: &[&str], problems: &mut Vec<Problem>) -> Vec<usize> {
        names
            .iter()
            .map(|n| {
                self.col(n).unwrap_or_else(|| {
                    problems.push(Problem::in_file(&self.path, format!("has no column '{n}'")).row(1).column(*n));
                    usize::MAX
                })
            })
            .collect()
    }

    /// Trimmed text of a cell (empty for a missing column).
    pub fn text(&self, r: usize, c: usize) -> &str {
        self.rows[r].get(c).map(str::trim).unwrap_or("")
    }

    /// A number cell: `None` when empty; a problem when not a finite number.
    pub fn num(&self, r: usize, c: usize, problems: &mut Vec<Problem>) -> Option<f64> {
        let t = self.text(r, c);
        if t.is_empty() || c == usize::MAX {
            return None;
        }
        match t.parse::<f64>() {
            Ok(v) if v.is_finite() => Some(v),
            _ => {
                if problems.len() < MAX_PROBLEMS {
                    problems.push(
                        Problem::in_file(&self.path, format!("'{t}' is not a number"))
                            .row(self.lines[r])
                            .column(self.headers.get(c).cloned().unwrap_or_default()),
                    );
                }
                None
            }
        }
    }

    /// A number cell that must be present.
    pub fn req_num(&self, r: usize, c: usize, problems: &mut Vec<Problem>) -> f64 {
        match self.num(r, c, problems) {
            Some(v) => v,
            None => {
                if self.text(r, c).is_empty() && problems.len() < MAX_PROBLEMS && c != usize::MAX {
                    problems.push(
                        Problem::in_file(&self.path, "is empty; a number is required")
                            .row(self.lines[r])
                            .column(self.headers.get(c).cloned().unwrap_or_default()),
                    );
                }
                f64::NAN
            }
        }
    }

    /// A whole-number cell (a year): `None` when empty.
    pub fn int(&self, r: usize, c: usize, problems: &mut Vec<Problem>) -> Option<i32> {
        let v = self.num(r, c, problems)?;
        if v.fract() == 0.0 && v.abs() < 1e6 {
            Some(v as i32)
        } else {
            problems.push(
                Problem::in_file(&self.path, format!("'{}' is not a whole number", self.text(r, c)))
                    .row(self.lines[r])
                    .column(self.headers.get(c).cloned().unwrap_or_default()),
            );
            None
        }
    }
}

/// A contaminant as recorded in `run_info.json`.
#[derive(Debug, Clone, PartialEq)]
pub struct ContaminantInfo {
    /// Name (column prefix).
    pub name: String,
    /// Export coefficient of open land, kg/ha/yr.
    pub open_export_kg_per_ha_yr: f64,
    /// Export coefficient under conifer canopy, kg/ha/yr.
    pub forest_export_kg_per_ha_yr: f64,
    /// Guideline, mg/L.
    pub guideline_mg_per_l: Option<f64>,
}

/// The water-balance method of the run.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Method {
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

/// What `run_info.json` records.
#[derive(Debug, Clone)]
pub struct RunInfo {
    /// Scenario title.
    pub title: String,
    /// Tool version that wrote the run.
    pub version: String,
    /// Scenario file as given to the run.
    pub scenario: String,
    /// Catchment table as given.
    pub catchment_table: String,
    /// Climate table, if any.
    pub climate_table: Option<String>,
    /// First projected year.
    pub start_year: i32,
    /// Years after the start.
    pub horizon_years: i32,
    /// Curve method and parameters.
    pub method: Method,
    /// Forest PET factor.
    pub forest_pet_factor: f64,
    /// Spread rate, 1/yr.
    pub spread_rate_per_yr: f64,
    /// Seed-bearing age, years.
    pub seed_bearing_age_yr: f64,
    /// Seed rain, ha/yr.
    pub seed_rain_ha_per_yr: f64,
    /// Medium-density age, years.
    pub medium_age_yr: f64,
    /// Dense age, years.
    pub dense_age_yr: f64,
    /// Strategies, `no-control` first.
    pub strategies: Vec<String>,
    /// Discount rate per year.
    pub discount_rate: f64,
    /// Value of water, $/m³.
    pub water_value_per_m3: Option<f64>,
    /// Contaminants in scenario order.
    pub contaminants: Vec<ContaminantInfo>,
    /// The cautions text of the run.
    pub cautions: String,
    /// The whole document, for optional keys.
    pub raw: serde_json::Value,
}

impl RunInfo {
    /// Last projected year.
    pub fn end_year(&self) -> i32 {
        self.start_year + self.horizon_years
    }

    /// An optional number at a dotted path (e.g. `canopy_closure.half_closure_age_yr`).
    pub fn opt_num(&self, path: &str) -> Option<f64> {
        let mut v = &self.raw;
        for k in path.split('.') {
            v = v.get(k)?;
        }
        v.as_f64()
    }

    fn parse(path: &Path, text: &str) -> Result<RunInfo> {
        let raw: serde_json::Value = serde_json::from_str(text)
            .map_err(|e| Error::invalid(Problem::in_file(path, format!("is not valid JSON: {e}")).row(e.line())))?;
        let mut problems = Vec::new();
        let get = |k: &str| -> Option<&serde_json::Value> {
            let mut v = &raw;
            for p in k.split('.') {
                v = v.get(p)?;
            }
            Some(v)
        };
        let mut num = |k: &str| -> f64 {
            match get(k).and_then(|v| v.as_f64()).filter(|v| v.is_finite()) {
                Some(v) => v,
                None => {
                    problems.push(Problem::in_file(path, "is missing or not a number").column(k));
                    f64::NAN
                }
            }
        };
        let start_year = num("start_year");
        let horizon_years = num("horizon_years");
        let forest_pet_factor = num("hydrology.forest_pet_factor");
        let spread = num("invasion.spread_rate_per_yr");
        let seed_age = num("invasion.seed_bearing_age_yr");
        let seed_rain = num("invasion.seed_rain_ha_per_yr");
        let medium = num("invasion.medium_age_yr");
        let dense = num("invasion.dense_age_yr");
        let discount_rate = num("discount_rate");
        let method = match get("hydrology.method").and_then(|v| v.as_str()) {
            Some("zhang") => Method::Zhang { w_forest: num("hydrology.w_forest"), w_grass: num("hydrology.w_grass") },
            Some("fu") => Method::Fu { omega_forest: num("hydrology.omega_forest"), omega_grass: num("hydrology.omega_grass") },
            other => {
                problems.push(
                    Problem::in_file(path, format!("method {:?} is not one this report knows (zhang, fu)", other.unwrap_or("missing")))
                        .column("hydrology.method"),
                );
                Method::Zhang { w_forest: f64::NAN, w_grass: f64::NAN }
            }
        };
        let text = |k: &str, problems: &mut Vec<Problem>| -> String {
            match get(k).and_then(|v| v.as_str()) {
                Some(s) => s.to_string(),
                None => {
                    problems.push(Problem::in_file(path, "is missing or not text").column(k));
                    String::new()
                }
            }
        };
        let title = text("title", &mut problems);
        let cautions = text("cautions", &mut problems);
        let scenario = text("scenario", &mut problems);
        let catchment_table = text("catchment_table", &mut problems);
        let version = get("version").and_then(|v| v.as_str()).unwrap_or("unknown").to_string();
        let climate_table = get("climate_table").and_then(|v| v.as_str()).map(str::to_string);
        let water_value_per_m3 = get("water_value_per_m3").and_then(|v| v.as_f64());
        let strategies: Vec<String> = match get("strategies").and_then(|v| v.as_array()) {
            Some(a) => a.iter().filter_map(|s| s.as_str().map(str::to_string)).collect(),
            None => {
                problems.push(Problem::in_file(path, "is missing or not a list of names").column("strategies"));
                vec![]
            }
        };
        let mut contaminants = Vec::new();
        match get("contaminants").and_then(|v| v.as_array()) {
            Some(a) => {
                for (i, c) in a.iter().enumerate() {
                    let n = |k: &str| c.get(k).and_then(|v| v.as_f64());
                    match (c.get("name").and_then(|v| v.as_str()), n("open_export_kg_per_ha_yr"), n("forest_export_kg_per_ha_yr")) {
                        (Some(name), Some(o), Some(f)) => contaminants.push(ContaminantInfo {
                            name: name.to_string(),
                            open_export_kg_per_ha_yr: o,
                            forest_export_kg_per_ha_yr: f,
                            guideline_mg_per_l: n("guideline_mg_per_l"),
                        }),
                        _ => problems.push(
                            Problem::in_file(path, "needs name, open_export_kg_per_ha_yr and forest_export_kg_per_ha_yr")
                                .column(format!("contaminants[{i}]")),
                        ),
                    }
                }
            }
            None => problems.push(Problem::in_file(path, "is missing or not a list").column("contaminants")),
        }
        if !problems.is_empty() {
            return Err(Error::Invalid(problems));
        }
        if !(horizon_years >= 0.0 && horizon_years.fract() == 0.0 && start_year.fract() == 0.0) {
            return Err(Error::invalid(
                Problem::in_file(path, "start_year and horizon_years must be whole numbers").column("horizon_years"),
            ));
        }
        Ok(RunInfo {
            title,
            version,
            scenario,
            catchment_table,
            climate_table,
            start_year: start_year as i32,
            horizon_years: horizon_years as i32,
            method,
            forest_pet_factor,
            spread_rate_per_yr: spread,
            seed_bearing_age_yr: seed_age,
            seed_rain_ha_per_yr: seed_rain,
            medium_age_yr: medium,
            dense_age_yr: dense,
            strategies,
            discount_rate,
            water_value_per_m3,
            contaminants,
            cautions,
            raw,
        })
    }
}

/// Column names of `summary.csv` the report shows (besides the per-offset and
/// per-contaminant ones).
pub mod summary_cols {
    /// Yield change in the last year, %.
    pub const HORIZON: &str = "yield_change_horizon_pct";
    /// Change against no invasion in the last year, %.
    pub const VS_UNINVADED: &str = "change_vs_uninvaded_horizon_pct";
    /// Water lost in the last year, m³/yr.
    pub const WATER_LOST: &str = "water_lost_horizon_m3_per_yr";
    /// Canopy fraction in the first year.
    pub const CANOPY_START: &str = "canopy_fraction_start";
    /// Canopy fraction in the last year.
    pub const CANOPY_END: &str = "canopy_fraction_end";
    /// Nominal cost, $.
    pub const COST: &str = "total_cost";
    /// Present value of cost, $.
    pub const COST_PV: &str = "total_cost_pv";
    /// Water saved, m³.
    pub const SAVED: &str = "water_saved_m3";
    /// Discounted water saved, m³.
    pub const SAVED_PV: &str = "water_saved_pv_m3";
    /// Nominal cost per m³, $/m³.
    pub const COST_PER_M3: &str = "cost_per_m3";
    /// Levelised cost, $/m³.
    pub const LEVELISED: &str = "levelised_cost_per_m3";
    /// Net present value, $.
    pub const NPV: &str = "npv";
    /// Benefit-cost ratio.
    pub const BCR: &str = "benefit_cost_ratio";
}

/// One row of `summary.csv`.
#[derive(Debug, Clone)]
pub struct SummaryRow {
    /// Catchment id (or `basin`).
    pub catchment: String,
    /// Display name.
    pub name: String,
    /// Strategy.
    pub strategy: String,
    /// Area, ha.
    pub area_ha: f64,
    /// Yield change at each of [`RunData::offsets`], %.
    pub at_offsets: Vec<Option<f64>>,
    /// Numeric columns by name (empty cells absent).
    pub values: BTreeMap<String, f64>,
    /// First exceedance year per contaminant (run_info order).
    pub first_exceedance: Vec<Option<i32>>,
}

impl SummaryRow {
    /// A numeric column (None when the cell is empty).
    pub fn get(&self, col: &str) -> Option<f64> {
        self.values.get(col).copied()
    }
}

/// One year of `yearly.csv` for one catchment and strategy.
#[derive(Debug, Clone, PartialEq)]
pub struct YearRow {
    /// Year.
    pub year: i32,
    /// Rainfall, mm.
    pub rain_mm: f64,
    /// PET (grass), mm.
    pub pet_mm: f64,
    /// Evapotranspiration, mm.
    pub et_mm: f64,
    /// Yield, mm.
    pub yield_mm: f64,
    /// Baseline yield, mm.
    pub baseline_yield_mm: f64,
    /// No-invasion yield, mm.
    pub uninvaded_yield_mm: f64,
    /// Canopy fraction.
    pub canopy_fraction: f64,
    /// Scattered, medium, dense area, ha.
    pub classes: [f64; 3],
    /// Control cost, $.
    pub control_cost: f64,
    /// Water saved vs no-control, m³.
    pub water_saved_m3: f64,
    /// Concentration per contaminant (run_info order), mg/L.
    pub conc: Vec<Option<f64>>,
    /// True when any concentration of the year was flagged as low runoff.
    pub low_runoff: bool,
}

/// Percentiles of one ensemble variable in one year.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Quantiles {
    /// 5th percentile.
    pub p5: f64,
    /// 25th percentile.
    pub p25: f64,
    /// Median.
    pub p50: f64,
    /// 75th percentile.
    pub p75: f64,
    /// 95th percentile.
    pub p95: f64,
    /// Mean.
    pub mean: f64,
    /// Members contributing.
    pub members: f64,
    /// Share of members above the guideline (concentrations only), 0–1.
    pub prob_above_guideline: Option<f64>,
}

/// `ensemble.csv`, keyed by (catchment, strategy, variable, year).
#[derive(Debug, Clone, Default)]
pub struct Ensemble {
    /// Percentiles.
    pub rows: BTreeMap<(String, String, String, i32), Quantiles>,
    /// Largest member count seen.
    pub members: f64,
}

impl Ensemble {
    /// Percentiles of `variable` for a catchment, strategy and year.
    pub fn get(&self, catchment: &str, strategy: &str, variable: &str, year: i32) -> Option<&Quantiles> {
        self.rows.get(&(catchment.to_string(), strategy.to_string(), variable.to_string(), year))
    }

    /// The series of `variable` over years.
    pub fn series(&self, catchment: &str, strategy: &str, variable: &str) -> Vec<(i32, Quantiles)> {
        self.rows
            .range(
                (catchment.to_string(), strategy.to_string(), variable.to_string(), i32::MIN)
                    ..=(catchment.to_string(), strategy.to_string(), variable.to_string(), i32::MAX),
            )
            .map(|(k, q)| (k.3, *q))
            .collect()
    }

    /// Catchments (and `basin`) present.
    pub fn catchments(&self) -> BTreeSet<&str> {
        self.rows.keys().map(|k| k.0.as_str()).collect()
    }
}

/// One row of `sensitivity.csv`.
#[derive(Debug, Clone, PartialEq)]
pub struct SensitivityRow {
    /// Catchment id or `basin`.
    pub catchment: String,
    /// Strategy.
    pub strategy: String,
    /// When evaluated (`year-20`, `horizon`).
    pub at: String,
    /// Year evaluated.
    pub year: i32,
    /// Output variable, when the file names one.
    pub variable: Option<String>,
    /// Parameter (scenario key path).
    pub parameter: String,
    /// Spearman rank correlation (`None` when undefined, e.g. a constant result).
    pub spearman_rho: Option<f64>,
    /// Standardised regression coefficient.
    pub src: Option<f64>,
    /// Rank (1 = most influential).
    pub rank: u32,
}

/// One row of `delay.csv`.
#[derive(Debug, Clone, PartialEq)]
pub struct DelayRow {
    /// Strategy.
    pub strategy: String,
    /// Delay, years.
    pub delay_yr: i32,
    /// Start year after the delay.
    pub start_year: i32,
    /// Nominal cost, $.
    pub total_cost: f64,
    /// PV cost, $.
    pub total_cost_pv: f64,
    /// Water saved, m³.
    pub water_saved_m3: f64,
    /// Water lost vs baseline, m³.
    pub water_lost_vs_baseline_m3: f64,
    /// Infested area at the horizon, ha.
    pub final_infested_ha: f64,
}

/// Totals of `budget.csv` for one strategy and pool.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct BudgetTotals {
    /// Sum of available budget, $ (`None` when unlimited).
    pub available: Option<f64>,
    /// Spent, $.
    pub spent: f64,
    /// Unspent, $.
    pub unspent: f64,
    /// Years.
    pub years: usize,
}

/// One row of `nodes.csv`.
#[derive(Debug, Clone, PartialEq)]
pub struct NodeYear {
    /// Year.
    pub year: i32,
    /// Upstream catchments (including the node).
    pub upstream: i32,
    /// Yield change vs baseline, %.
    pub change_pct: Option<f64>,
    /// Concentrations per contaminant, mg/L.
    pub conc: Vec<Option<f64>>,
}

/// The scenario file copied into `inputs/`.
#[derive(Debug, Clone)]
pub struct ScenarioDoc {
    /// Path relative to the run folder.
    pub name: String,
    /// Parsed TOML.
    pub table: toml::Table,
}

/// Everything the report reads from a run folder.
#[derive(Debug, Clone)]
pub struct RunData {
    /// The folder.
    pub dir: PathBuf,
    /// `run_info.json`.
    pub info: RunInfo,
    /// Years after the start with a `yield_change_<o>y_pct` column, ascending.
    pub offsets: Vec<i32>,
    /// `summary.csv` rows in file order.
    pub summary: Vec<SummaryRow>,
    /// Catchments (id, name, area) in summary order, without the basin.
    pub catchments: Vec<(String, String, f64)>,
    /// Name of the basin row, if any.
    pub basin_name: Option<String>,
    /// `yearly.csv` by (catchment, strategy).
    pub yearly: BTreeMap<(String, String), Vec<YearRow>>,
    /// `nodes.csv` by (node, strategy).
    pub nodes: BTreeMap<(String, String), Vec<NodeYear>>,
    /// `delay.csv` rows.
    pub delay: Vec<DelayRow>,
    /// `budget.csv` totals by (strategy, pool).
    pub budget: BTreeMap<(String, String), BudgetTotals>,
    /// `ensemble.csv`, when present.
    pub ensemble: Option<Ensemble>,
    /// `sensitivity.csv`, when present.
    pub sensitivity: Option<Vec<SensitivityRow>>,
    /// The scenario copied into `inputs/`.
    pub scenario: Option<ScenarioDoc>,
    /// The catchment table copied into `inputs/`.
    pub catchment_input: Option<CsvTable>,
    /// The climate table copied into `inputs/`.
    pub climate_input: Option<CsvTable>,
    /// File names present in `figures/`.
    pub figures: BTreeSet<String>,
    /// Catchments given a detailed section (all, or the [`MAX_DETAILED`] largest losses).
    pub detailed: BTreeSet<String>,
    /// Catchments drawn in Budyko space (all, or the [`BUDYKO_MAX`] largest changes).
    pub budyko: BTreeSet<String>,
    /// Years flagged low-runoff in `yearly.csv` without control, per catchment.
    pub low_runoff_years: BTreeMap<String, usize>,
    /// Index of `summary` by (catchment, strategy).
    pub summary_index: std::collections::HashMap<(String, String), usize>,
}

impl RunData {
    /// The catchments given a detailed subsection, in table order: all of them, or
    /// the [`MAX_DETAILED`] with the largest yield loss at the horizon.
    pub fn detailed_catchments(&self) -> Vec<&(String, String, f64)> {
        self.catchments.iter().filter(|c| self.detailed.contains(&c.0)).collect()
    }

    /// Summary row of a catchment (or `basin`) and strategy.
    pub fn summary_row(&self, catchment: &str, strategy: &str) -> Option<&SummaryRow> {
        self.summary_index.get(&(catchment.to_string(), strategy.to_string())).map(|&i| &self.summary[i])
    }

    /// Years of a catchment and strategy.
    pub fn years(&self, catchment: &str, strategy: &str) -> &[YearRow] {
        self.yearly.get(&(catchment.to_string(), strategy.to_string())).map(Vec::as_slice).unwrap_or(&[])
    }

    /// True when `figures/<file>` exists.
    pub fn has_figure(&self, file: &str) -> bool {
        self.figures.contains(file)
    }

    /// Strategies other than `no-control`.
    pub fn programmes(&self) -> impl Iterator<Item = &String> {
        self.info.strategies.iter().filter(|s| s.as_str() != NO_CONTROL)
    }
}

fn file_name(p: &str) -> Option<String> {
    Path::new(p).file_name().map(|n| n.to_string_lossy().into_owned())
}

/// Reads the run folder `dir`.
pub fn read_run(dir: &Path) -> Result<RunData> {
    if !dir.is_dir() {
        return Err(Error::invalid(Problem::in_file(dir, "is not a folder; give the output folder of `yieldshift run`")));
    }
    let missing: Vec<Problem> = ["run_info.json", "summary.csv", "yearly.csv"]
        .iter()
        .filter(|f| !dir.join(f).is_file())
        .map(|f| Problem::in_file(&dir.join(f), "is missing; the report needs it (is this the output folder of `yieldshift run`?)"))
        .collect();
    if !missing.is_empty() {
        return Err(Error::Invalid(missing));
    }
    let info_path = dir.join("run_info.json");
    let text = std::fs::read_to_string(&info_path).map_err(|e| Error::io(format!("reading {}", info_path.display()), e))?;
    let info = RunInfo::parse(&info_path, &text)?;
    let names: Vec<String> = info.contaminants.iter().map(|c| c.name.clone()).collect();

    let mut problems = Vec::new();
    let gone = |f: &str| Error::invalid(Problem::in_file(&dir.join(f), "disappeared while the report was reading the folder"));
    let summary_t = CsvTable::read(dir, "summary.csv")?.ok_or_else(|| gone("summary.csv"))?;
    let (offsets, summary) = read_summary(&summary_t, &names, &mut problems);
    if !problems.is_empty() {
        return Err(Error::Invalid(problems));
    }

    // Catchments and the consistency of summary.csv with run_info.json.
    let summary_path = dir.join("summary.csv");
    let mut catchments: Vec<(String, String, f64)> = Vec::new();
    let mut seen = std::collections::HashSet::new();
    let mut summary_index = std::collections::HashMap::new();
    let mut basin_name = None;
    for (k, r) in summary.iter().enumerate() {
        summary_index.entry((r.catchment.clone(), r.strategy.clone())).or_insert(k);
        if r.catchment == BASIN {
            basin_name.get_or_insert_with(|| r.name.clone());
        } else if seen.insert(r.catchment.clone()) {
            catchments.push((r.catchment.clone(), r.name.clone(), r.area_ha));
        }
        if !info.strategies.contains(&r.strategy) && problems.len() < MAX_PROBLEMS {
            problems.push(
                Problem::in_file(&summary_path, format!("strategy '{}' is not among run_info.json's strategies", r.strategy))
                    .column("strategy"),
            );
        }
    }
    if catchments.is_empty() {
        problems.push(Problem::in_file(&summary_path, "has no catchment rows"));
    }
    for (id, _, _) in &catchments {
        for st in &info.strategies {
            if !summary_index.contains_key(&(id.clone(), st.clone())) && problems.len() < MAX_PROBLEMS {
                problems.push(Problem::in_file(&summary_path, format!("has no row for catchment '{id}' under strategy '{st}'")));
            }
        }
    }
    if !problems.is_empty() {
        return Err(Error::Invalid(problems));
    }

    // Which catchments the report details and draws: all in small basins.
    let horizon =
        |id: &str| summary_index.get(&(id.to_string(), NO_CONTROL.to_string())).and_then(|&k| summary[k].get(summary_cols::HORIZON));
    let largest = |n: usize, key: &dyn Fn(&str) -> f64| -> BTreeSet<String> {
        let mut ids: Vec<&String> = catchments.iter().map(|c| &c.0).collect();
        ids.sort_by(|a, b| key(a).total_cmp(&key(b)).then_with(|| a.cmp(b)));
        ids.into_iter().take(n).cloned().collect()
    };
    let detailed = largest(MAX_DETAILED, &|id| horizon(id).unwrap_or(0.0));
    let budyko = largest(BUDYKO_MAX, &|id| -horizon(id).map_or(0.0, f64::abs));

    // yearly.csv, streamed: rows kept only for the catchments drawn or detailed, without control.
    let mut year_keys: std::collections::HashSet<(String, String)> = std::collections::HashSet::new();
    let mut low_runoff_years: BTreeMap<String, usize> = BTreeMap::new();
    let mut cols: Option<(usize, usize, Option<usize>)> = None;
    let keep_ids: BTreeSet<&String> = detailed.iter().chain(budyko.iter()).collect();
    let yearly_t = CsvTable::read_filtered(dir, "yearly.csv", |h, rec| {
        let (ci, si, fi) = *cols.get_or_insert_with(|| {
            let find = |n: &str| h.iter().position(|x| x == n).unwrap_or(usize::MAX);
            (find("catchment"), find("strategy"), h.iter().position(|x| x == "flags"))
        });
        let (Some(c), Some(st)) = (rec.get(ci), rec.get(si)) else { return true };
        let (c, st) = (c.trim(), st.trim());
        if !year_keys.contains(&(c.to_string(), st.to_string())) {
            year_keys.insert((c.to_string(), st.to_string()));
        }
        if st != NO_CONTROL {
            return false;
        }
        if fi.and_then(|f| rec.get(f)).is_some_and(|f| f.contains("low-runoff")) {
            *low_runoff_years.entry(c.to_string()).or_insert(0) += 1;
        }
        keep_ids.iter().any(|k| k.as_str() == c)
    })?
    .ok_or_else(|| gone("yearly.csv"))?;
    let yearly = read_yearly(&yearly_t, &names, &mut problems);
    for (id, _, _) in &catchments {
        for st in &info.strategies {
            if !year_keys.contains(&(id.clone(), st.clone())) && problems.len() < MAX_PROBLEMS {
                problems.push(Problem::in_file(&dir.join("yearly.csv"), format!("has no rows for catchment '{id}' under strategy '{st}'")));
            }
        }
    }

    let nodes = match CsvTable::read(dir, "nodes.csv")? {
        Some(t) => read_nodes(&t, &names, &mut problems),
        None => BTreeMap::new(),
    };
    let delay = match CsvTable::read(dir, "delay.csv")? {
        Some(t) => read_delay(&t, &mut problems),
        None => vec![],
    };
    let budget = match CsvTable::read(dir, "budget.csv")? {
        Some(t) => read_budget(&t, &mut problems),
        None => BTreeMap::new(),
    };

    // ensemble.csv, streamed: full series for the basin and detailed catchments,
    // and the yield change at the reported years for every catchment.
    let report_years: BTreeSet<String> =
        offsets.iter().map(|o| (info.start_year + o).to_string()).chain(std::iter::once(info.end_year().to_string())).collect();
    let mut members_seen = 0.0f64;
    let mut ecols: Option<[usize; 5]> = None;
    let ensemble_t = CsvTable::read_filtered(dir, "ensemble.csv", |h, rec| {
        let [ci, si, yi, vi, mi] = *ecols.get_or_insert_with(|| {
            let find = |n: &str| h.iter().position(|x| x == n).unwrap_or(usize::MAX);
            [find("catchment"), find("strategy"), find("year"), find("variable"), find("members")]
        });
        let get = |i: usize| rec.get(i).map(str::trim).unwrap_or("");
        if let Ok(m) = get(mi).parse::<f64>() {
            members_seen = members_seen.max(m);
        }
        let c = get(ci);
        c == BASIN || detailed.contains(c) || (get(si) == NO_CONTROL && get(vi) == "yield_change_pct" && report_years.contains(get(yi)))
    })?;
    let ensemble = ensemble_t.map(|t| {
        let mut e = read_ensemble(&t, &mut problems);
        e.members = e.members.max(members_seen);
        e
    });
    let sensitivity_t = CsvTable::read_filtered(dir, "sensitivity.csv", |h, rec| {
        let ci = h.iter().position(|x| x == "catchment").unwrap_or(usize::MAX);
        rec.get(ci).map(str::trim).is_some_and(|c| c == BASIN || detailed.contains(c))
    })?;
    let sensitivity = sensitivity_t.map(|t| read_sensitivity(&t, &mut problems));
    problems.truncate(MAX_PROBLEMS);
    if !problems.is_empty() {
        return Err(Error::Invalid(problems));
    }

    // Inputs copied by the run (optional: older runs did not copy them).
    let scenario = match file_name(&info.scenario).map(|n| format!("inputs/{n}")) {
        Some(rel) if dir.join(&rel).is_file() => {
            let p = dir.join(&rel);
            let text = std::fs::read_to_string(&p).map_err(|e| Error::io(format!("reading {}", p.display()), e))?;
            let table = text
                .strip_prefix('\u{feff}')
                .unwrap_or(&text)
                .parse::<toml::Table>()
                .map_err(|e| Error::invalid(Problem::in_file(&p, format!("is not valid TOML: {}", e.message()))))?;
            Some(ScenarioDoc { name: rel, table })
        }
        _ => None,
    };
    let catchment_input = match file_name(&info.catchment_table) {
        Some(n) => CsvTable::read_input(dir, &format!("inputs/{n}"))?,
        None => None,
    };
    let climate_input = match info.climate_table.as_deref().and_then(file_name) {
        Some(n) => CsvTable::read_input(dir, &format!("inputs/{n}"))?,
        None => None,
    };
    let figures = match std::fs::read_dir(dir.join("figures")) {
        Ok(rd) => rd.filter_map(|e| e.ok()).map(|e| e.file_name().to_string_lossy().into_owned()).collect(),
        Err(_) => BTreeSet::new(),
    };
    Ok(RunData {
        dir: dir.to_path_buf(),
        info,
        offsets,
        summary,
        catchments,
        basin_name,
        yearly,
        nodes,
        delay,
        budget,
        ensemble,
        sensitivity,
        scenario,
        catchment_input,
        climate_input,
        figures,
        detailed,
        budyko,
        low_runoff_years,
        summary_index,
    })
}

fn read_summary(t: &CsvTable, contaminants: &[String], problems: &mut Vec<Problem>) -> (Vec<i32>, Vec<SummaryRow>) {
    let id = t.require(&["catchment", "name", "strategy", "area_ha"], problems);
    let mut offsets: Vec<(i32, usize)> = t
        .headers
        .iter()
        .enumerate()
        .filter_map(|(i, h)| h.strip_prefix("yield_change_")?.strip_suffix("y_pct")?.parse::<i32>().ok().map(|o| (o, i)))
        .collect();
    offsets.sort();
    use summary_cols::*;
    let named =
        [HORIZON, VS_UNINVADED, WATER_LOST, CANOPY_START, CANOPY_END, COST, COST_PV, SAVED, SAVED_PV, COST_PER_M3, LEVELISED, NPV, BCR];
    let cols = t.require(&named, problems);
    let exceed: Vec<usize> = contaminants
        .iter()
        .map(|c| {
            let n = format!("{c}_first_exceedance_year");
            t.require(&[n.as_str()], problems)[0]
        })
        .collect();
    if !problems.is_empty() {
        return (vec![], vec![]);
    }
    let mut rows = Vec::with_capacity(t.rows.len());
    for r in 0..t.rows.len() {
        let mut values = BTreeMap::new();
        for (name, &c) in named.iter().zip(&cols) {
            if let Some(v) = t.num(r, c, problems) {
                values.insert(name.to_string(), v);
            }
        }
        rows.push(SummaryRow {
            catchment: t.text(r, id[0]).to_string(),
            name: t.text(r, id[1]).to_string(),
            strategy: t.text(r, id[2]).to_string(),
            area_ha: t.req_num(r, id[3], problems),
            at_offsets: offsets.iter().map(|&(_, c)| t.num(r, c, problems)).collect(),
            values,
            first_exceedance: exceed.iter().map(|&c| t.int(r, c, problems)).collect(),
        });
    }
    (offsets.into_iter().map(|o| o.0).collect(), rows)
}

fn read_yearly(t: &CsvTable, contaminants: &[String], problems: &mut Vec<Problem>) -> BTreeMap<(String, String), Vec<YearRow>> {
    let c = t.require(
        &[
            "catchment",
            "strategy",
            "year",
            "rain_mm",
            "pet_mm",
            "et_mm",
            "yield_mm",
            "baseline_yield_mm",
            "uninvaded_yield_mm",
            "canopy_fraction",
            "scattered_ha",
            "medium_ha",
            "dense_ha",
            "control_cost",
            "water_saved_m3",
        ],
        problems,
    );
    let conc: Vec<usize> = contaminants.iter().map(|n| t.require(&[format!("{n}_mg_per_l").as_str()], problems)[0]).collect();
    let flags = t.col("flags");
    let mut out: BTreeMap<(String, String), Vec<YearRow>> = BTreeMap::new();
    if !problems.is_empty() {
        return out;
    }
    for r in 0..t.rows.len() {
        let Some(year) = t.int(r, c[2], problems) else {
            if t.text(r, c[2]).is_empty() {
                problems.push(Problem::in_file(&t.path, "is empty; a year is required").row(t.lines[r]).column("year"));
            }
            continue;
        };
        let n = |k: usize, p: &mut Vec<Problem>| t.req_num(r, c[k], p);
        let row = YearRow {
            year,
            rain_mm: n(3, problems),
            pet_mm: n(4, problems),
            et_mm: n(5, problems),
            yield_mm: n(6, problems),
            baseline_yield_mm: n(7, problems),
            uninvaded_yield_mm: n(8, problems),
            canopy_fraction: n(9, problems),
            classes: [n(10, problems), n(11, problems), n(12, problems)],
            control_cost: n(13, problems),
            water_saved_m3: n(14, problems),
            conc: conc.iter().map(|&k| t.num(r, k, problems)).collect(),
            low_runoff: flags.is_some_and(|f| t.text(r, f).contains("low-runoff")),
        };
        out.entry((t.text(r, c[0]).to_string(), t.text(r, c[1]).to_string())).or_default().push(row);
        if problems.len() >= MAX_PROBLEMS {
            break;
        }
    }
    for ((id, st), rows) in &out {
        if rows.windows(2).any(|w| w[1].year != w[0].year + 1) {
            problems.push(Problem::in_file(&t.path, format!("years of catchment '{id}' under '{st}' are not consecutive")));
        }
    }
    out
}

fn read_nodes(t: &CsvTable, contaminants: &[String], problems: &mut Vec<Problem>) -> BTreeMap<(String, String), Vec<NodeYear>> {
    let c = t.require(&["node", "strategy", "year", "upstream_catchments", "yield_change_pct"], problems);
    let conc: Vec<usize> = contaminants.iter().map(|n| t.require(&[format!("{n}_mg_per_l").as_str()], problems)[0]).collect();
    let mut out: BTreeMap<(String, String), Vec<NodeYear>> = BTreeMap::new();
    if !problems.is_empty() {
        return out;
    }
    for r in 0..t.rows.len() {
        let (Some(year), Some(up)) = (t.int(r, c[2], problems), t.int(r, c[3], problems)) else { continue };
        out.entry((t.text(r, c[0]).to_string(), t.text(r, c[1]).to_string())).or_default().push(NodeYear {
            year,
            upstream: up,
            change_pct: t.num(r, c[4], problems),
            conc: conc.iter().map(|&k| t.num(r, k, problems)).collect(),
        });
    }
    out
}

fn read_delay(t: &CsvTable, problems: &mut Vec<Problem>) -> Vec<DelayRow> {
    let c = t.require(&crate::schema::columns::delay::COLUMNS, problems);
    if !problems.is_empty() {
        return vec![];
    }
    (0..t.rows.len())
        .filter_map(|r| {
            Some(DelayRow {
                strategy: t.text(r, c[0]).to_string(),
                delay_yr: t.int(r, c[1], problems)?,
                start_year: t.int(r, c[2], problems)?,
                total_cost: t.req_num(r, c[3], problems),
                total_cost_pv: t.req_num(r, c[4], problems),
                water_saved_m3: t.req_num(r, c[5], problems),
                water_lost_vs_baseline_m3: t.req_num(r, c[6], problems),
                final_infested_ha: t.req_num(r, c[7], problems),
            })
        })
        .collect()
}

fn read_budget(t: &CsvTable, problems: &mut Vec<Problem>) -> BTreeMap<(String, String), BudgetTotals> {
    let c = t.require(&["strategy", "pool", "year", "available", "spent", "unspent"], problems);
    let mut out: BTreeMap<(String, String), BudgetTotals> = BTreeMap::new();
    if !problems.is_empty() {
        return out;
    }
    for r in 0..t.rows.len() {
        let e = out
            .entry((t.text(r, c[0]).to_string(), t.text(r, c[1]).to_string()))
            .or_insert_with(|| BudgetTotals { available: Some(0.0), ..Default::default() });
        e.years += 1;
        if t.text(r, c[3]) == "unlimited" {
            e.available = None;
        } else if let (Some(a), Some(v)) = (e.available.as_mut(), t.num(r, c[3], problems)) {
            *a += v;
        }
        e.spent += t.num(r, c[4], problems).unwrap_or(0.0);
        e.unspent += t.num(r, c[5], problems).unwrap_or(0.0);
    }
    out
}

fn read_ensemble(t: &CsvTable, problems: &mut Vec<Problem>) -> Ensemble {
    let c = t.require(&["catchment", "strategy", "year", "variable", "p5", "p25", "p50", "p75", "p95", "mean", "members"], problems);
    let prob = t.col("prob_above_guideline");
    let mut e = Ensemble::default();
    if !problems.is_empty() {
        return e;
    }
    for r in 0..t.rows.len() {
        let Some(year) = t.int(r, c[2], problems) else { continue };
        let n = |k: usize, p: &mut Vec<Problem>| t.num(r, c[k], p);
        let (Some(p5), Some(p25), Some(p50), Some(p75), Some(p95)) =
            (n(4, problems), n(5, problems), n(6, problems), n(7, problems), n(8, problems))
        else {
            // Undefined percentiles (e.g. too little runoff in every member) are left out.
            continue;
        };
        if !(p5 <= p25 && p25 <= p50 && p50 <= p75 && p75 <= p95) {
            problems.push(Problem::in_file(&t.path, "percentiles must satisfy p5 ≤ p25 ≤ p50 ≤ p75 ≤ p95").row(t.lines[r]).column("p5"));
            continue;
        }
        let q = Quantiles {
            p5,
            p25,
            p50,
            p75,
            p95,
            mean: n(9, problems).unwrap_or(f64::NAN),
            members: n(10, problems).unwrap_or(0.0),
            prob_above_guideline: prob.and_then(|k| t.num(r, k, problems)),
        };
        e.members = e.members.max(q.members);
        e.rows.insert((t.text(r, c[0]).to_string(), t.text(r, c[1]).to_string(), t.text(r, c[3]).to_string(), year), q);
    }
    e
}

fn read_sensitivity(t: &CsvTable, problems: &mut Vec<Problem>) -> Vec<SensitivityRow> {
    let c = t.require(&["catchment", "strategy", "at", "year", "parameter", "spearman_rho", "rank"], problems);
    let src = t.col("src");
    let variable = t.col("variable");
    if !problems.is_empty() {
        return vec![];
    }
    (0..t.rows.len())
        .filter_map(|r| {
            let rho = t.num(r, c[5], problems);
            if let Some(v) = rho.filter(|v| !(-1.0 - 1e-9..=1.0 + 1e-9).contains(v)) {
                problems.push(Problem::in_file(&t.path, format!("{v} is outside −1…1")).row(t.lines[r]).column("spearman_rho"));
                return None;
            }
            let rank = t.int(r, c[6], problems)?;
            Some(SensitivityRow {
                catchment: t.text(r, c[0]).to_string(),
                strategy: t.text(r, c[1]).to_string(),
                at: t.text(r, c[2]).to_string(),
                year: t.int(r, c[3], problems)?,
                variable: variable.map(|v| t.text(r, v).to_string()).filter(|s| !s.is_empty()),
                parameter: t.text(r, c[4]).to_string(),
                spearman_rho: rho,
                src: src.and_then(|k| t.num(r, k, problems)),
                rank: rank.max(0) as u32,
            })
        })
        .collect()
}
