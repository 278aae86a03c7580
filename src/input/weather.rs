//! Weather records in, reference evapotranspiration out.
//!
//! Reads a daily or monthly weather table (CSV), checks every cell, picks (or is
//! told) the method the columns allow, computes ET0 per period with
//! [`crate::model::pet`], fills short gaps by a stated rule, and totals each
//! calendar year per catchment. The annual table written by [`write_annual_csv`]
//! is what the scenario's climate table reader accepts.
//!
//! # Columns (the names are the contract)
//! * period: `date` (YYYY-MM-DD) for daily records, or `year` and `month` (1–12)
//!   for monthly means of daily values;
//! * `catchment` (optional): several catchments may share one file;
//! * temperature, °C: `tmax_c`, `tmin_c`, optional `tmean_c`;
//! * humidity: `ea_kpa`, `dewpoint_c`, `rh_max_pct`, `rh_min_pct`, `rh_mean_pct`
//!   (any subset; the best present in each row is used, FAO-56's order);
//! * `wind_m_per_s` at the site's wind measurement height;
//! * `sunshine_h` (hours/day) or `solar_mj_m2` (MJ m⁻² day⁻¹);
//! * `rn_mj_m2` (MJ m⁻² day⁻¹), net radiation, used by Priestley–Taylor;
//! * monthly only: `tmean_prev_c`, `tmean_next_c`, the previous and next month's
//!   mean temperature for soil heat flux (otherwise taken from neighbouring rows).
//!
//! Empty cells and `NA` are missing values. Any other text that is not a finite
//! number is an error naming the file, the spreadsheet row and the column.
//!
//! # Method selection
//! [`PetMethodChoice::Auto`] uses Penman–Monteith when the header has Tmax, Tmin,
//! a humidity column, wind and sunshine or solar radiation; otherwise
//! Priestley–Taylor when it has net radiation, or Tmax, Tmin and sunshine or solar
//! radiation; otherwise Hargreaves when it has Tmax and Tmin. One method is used
//! for the whole file and is written in every output row.
//!
//! # Missing days and the gap rule
//! A day is missing when the file has no row for it or a value the method needs is
//! blank. A run of at most [`GapRule::max_fill_days`] consecutive missing days
//! (default 5) with computed days on both sides is filled by linear interpolation
//! of daily ET0; its year is flagged `gap-filled`. A year with any missing day left
//! unfilled (a longer run, or days before the first or after the last record) is
//! flagged `incomplete`, and its `pet_mm` is the sum of the days it has — which the
//! climate table reader refuses. Missing months of a monthly record are never
//! filled. Every gap is listed in [`PetOutput::gaps`].

use crate::error::{Error, Problem, Result};
use crate::input::table::{fmt_value, parse_number, read_table, suggestion, Table};
use crate::input::toml_reader::TomlDoc;
use crate::model::pet::fao56::{
    self, daylight_hours, extraterrestrial_radiation_mj_m2_day, mean_temperature_c, saturation_vapour_pressure_kpa,
    soil_heat_flux_monthly_mj_m2_day, wind_speed_2m_m_per_s, Angstrom, Humidity, PenmanMonteithInput, Solar,
};
use crate::model::pet::hargreaves;
use crate::model::pet::priestley_taylor::{self, NetRadiation};
use crate::model::pet::{day_of_year, days_in_month, days_in_year, mid_month_day_of_year, PetMethod, Site};
use crate::schema::numbers::num;
use std::collections::{BTreeMap, HashMap};
use std::fmt;
use std::path::{Path, PathBuf};
use std::str::FromStr;

/// Every column name the weather table accepts.
pub const WEATHER_COLUMNS: [&str; 18] = [
    "catchment",
    "date",
    "year",
    "month",
    "tmax_c",
    "tmin_c",
    "tmean_c",
    "rh_max_pct",
    "rh_min_pct",
    "rh_mean_pct",
    "dewpoint_c",
    "ea_kpa",
    "wind_m_per_s",
    "sunshine_h",
    "solar_mj_m2",
    "rn_mj_m2",
    "tmean_prev_c",
    "tmean_next_c",
];

/// The columns of the annual table, in order.
pub const ANNUAL_COLUMNS: [&str; 7] = ["catchment", "year", "pet_mm", "pet_method", "pet_days", "pet_missing_days", "pet_status"];

/// `method` written for a day whose ET0 was interpolated across a gap.
pub const GAP_FILLED: &str = "gap-filled";

/// Year status: every day computed from weather.
pub const STATUS_COMPLETE: &str = "complete";
/// Year status: every missing day filled by the gap rule.
pub const STATUS_GAP_FILLED: &str = "gap-filled";
/// Year status: some days missing and not filled; `pet_mm` is short.
pub const STATUS_INCOMPLETE: &str = "incomplete";

/// Allowed range, unit and meaning of each numeric weather column.
const RANGES: [(&str, f64, f64, &str); 14] = [
    ("tmax_c", -60.0, 60.0, "°C"),
    ("tmin_c", -60.0, 60.0, "°C"),
    ("tmean_c", -60.0, 60.0, "°C"),
    ("rh_max_pct", 0.0, 100.0, "%"),
    ("rh_min_pct", 0.0, 100.0, "%"),
    ("rh_mean_pct", 0.0, 100.0, "%"),
    ("dewpoint_c", -70.0, 50.0, "°C"),
    ("ea_kpa", 0.0, 10.0, "kPa"),
    ("wind_m_per_s", 0.0, 60.0, "m/s"),
    ("sunshine_h", 0.0, 24.0, "h/day"),
    ("solar_mj_m2", 0.0, 50.0, "MJ m-2 day-1"),
    ("rn_mj_m2", -20.0, 40.0, "MJ m-2 day-1"),
    ("tmean_prev_c", -60.0, 60.0, "°C"),
    ("tmean_next_c", -60.0, 60.0, "°C"),
];

/// Sunshine may exceed the computed daylight length by this much (h) before it is
/// refused, to allow for rounding in published records; it is then capped at N.
const SUNSHINE_TOLERANCE_H: f64 = 0.1;

/// Site metadata for the weather record.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SiteMeta {
    /// Latitude, decimal degrees, south negative, −90..=90. No default.
    pub latitude_deg: f64,
    /// Elevation above sea level, m, −500..=9000.
    pub elevation_m: f64,
    /// Height of the wind measurement above the ground, m, 0.5..=100 (default 2).
    pub wind_height_m: f64,
    /// Ångström `a_s` (default 0.25, FAO-56).
    pub angstrom_a: f64,
    /// Ångström `b_s` (default 0.50, FAO-56).
    pub angstrom_b: f64,
}

impl SiteMeta {
    /// Default wind measurement height, m.
    pub const DEFAULT_WIND_HEIGHT_M: f64 = 2.0;

    /// A site with the given latitude and elevation, wind measured at 2 m and
    /// FAO-56's default Ångström coefficients.
    pub fn new(latitude_deg: f64, elevation_m: f64) -> SiteMeta {
        SiteMeta {
            latitude_deg,
            elevation_m,
            wind_height_m: Self::DEFAULT_WIND_HEIGHT_M,
            angstrom_a: Angstrom::FAO56_DEFAULT.a_s,
            angstrom_b: Angstrom::FAO56_DEFAULT.b_s,
        }
    }

    /// Checks every value, returning the model's [`Site`] or every problem found.
    pub fn validate(&self) -> std::result::Result<Site, Vec<Problem>> {
        let mut problems = Vec::new();
        let angstrom = Angstrom { a_s: self.angstrom_a, b_s: self.angstrom_b };
        if let Err(e) = Site::new(self.latitude_deg, 0.0, Angstrom::default()) {
            problems.push(Problem::new(e.to_string()).column("latitude_deg"));
        }
        if let Err(e) = Site::new(0.0, self.elevation_m, Angstrom::default()) {
            problems.push(Problem::new(e.to_string()).column("elevation_m"));
        }
        if let Err(e) = Site::new(0.0, 0.0, angstrom) {
            problems.push(Problem::new(e.to_string()).column("angstrom_a"));
        }
        if !(self.wind_height_m.is_finite() && (0.5..=100.0).contains(&self.wind_height_m)) {
            problems.push(
                Problem::new(format!(
                    "wind measurement height {} m is not allowed: it must be in 0.5..=100 m above the ground",
                    fmt_value(self.wind_height_m)
                ))
                .column("wind_height_m"),
            );
        }
        if !problems.is_empty() {
            return Err(problems);
        }
        Site::new(self.latitude_deg, self.elevation_m, angstrom).map_err(|e| vec![Problem::new(e.to_string())])
    }
}

/// Site values read from a small TOML file; each may be absent.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct SiteFile {
    /// `latitude_deg`, decimal degrees, south negative.
    pub latitude_deg: Option<f64>,
    /// `elevation_m`, m above sea level.
    pub elevation_m: Option<f64>,
    /// `wind_height_m`, m above the ground.
    pub wind_height_m: Option<f64>,
    /// `angstrom_a`, dimensionless.
    pub angstrom_a: Option<f64>,
    /// `angstrom_b`, dimensionless.
    pub angstrom_b: Option<f64>,
}

/// Reads a site TOML file with the keys `latitude_deg`, `elevation_m`,
/// `wind_height_m`, `angstrom_a`, `angstrom_b` (all optional). Unknown keys and
/// out-of-range values are reported with their line.
pub fn read_site_file(path: &Path) -> Result<SiteFile> {
    let text = std::fs::read_to_string(path).map_err(|e| Error::io(format!("reading {}", path.display()), e))?;
    let (doc, table) = TomlDoc::parse(path, text).map_err(Error::invalid)?;
    let root = doc.root(&table);
    let site = SiteFile {
        latitude_deg: root.opt_f64_in("latitude_deg", -90.0, 90.0, "degrees (south negative)"),
        elevation_m: root.opt_f64_in("elevation_m", -500.0, 9000.0, "m"),
        wind_height_m: root.opt_f64_in("wind_height_m", 0.5, 100.0, "m"),
        angstrom_a: root.opt_f64_in("angstrom_a", 0.0, 1.0, ""),
        angstrom_b: root.opt_f64_in("angstrom_b", 0.0, 1.0, ""),
    };
    root.finish();
    let problems = doc.take_problems();
    if problems.is_empty() {
        Ok(site)
    } else {
        Err(Error::Invalid(problems))
    }
}

/// Which method to use: picked from the columns, or forced.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum PetMethodChoice {
    /// Pick from the columns present (see the module docs).
    #[default]
    Auto,
    /// FAO-56 Penman–Monteith.
    PenmanMonteith,
    /// Hargreaves (FAO-56 eq. 52).
    Hargreaves,
    /// Priestley–Taylor (α = 1.26).
    PriestleyTaylor,
}

impl PetMethodChoice {
    /// The names accepted by [`FromStr`].
    pub const NAMES: [&'static str; 4] = ["auto", "penman-monteith", "hargreaves", "priestley-taylor"];

    /// The name of this choice.
    pub fn name(self) -> &'static str {
        match self {
            PetMethodChoice::Auto => "auto",
            PetMethodChoice::PenmanMonteith => PetMethod::PenmanMonteith.name(),
            PetMethodChoice::Hargreaves => PetMethod::Hargreaves.name(),
            PetMethodChoice::PriestleyTaylor => PetMethod::PriestleyTaylor.name(),
        }
    }

    fn forced(self) -> Option<PetMethod> {
        match self {
            PetMethodChoice::Auto => None,
            PetMethodChoice::PenmanMonteith => Some(PetMethod::PenmanMonteith),
            PetMethodChoice::Hargreaves => Some(PetMethod::Hargreaves),
            PetMethodChoice::PriestleyTaylor => Some(PetMethod::PriestleyTaylor),
        }
    }
}

impl FromStr for PetMethodChoice {
    type Err = String;
    fn from_str(s: &str) -> std::result::Result<Self, String> {
        match s {
            "auto" => Ok(PetMethodChoice::Auto),
            "penman-monteith" => Ok(PetMethodChoice::PenmanMonteith),
            "hargreaves" => Ok(PetMethodChoice::Hargreaves),
            "priestley-taylor" => Ok(PetMethodChoice::PriestleyTaylor),
            _ => Err(format!("'{s}' is not a PET method; choose one of: {}{}", Self::NAMES.join(", "), suggestion(s, &Self::NAMES))),
        }
    }
}

/// The rule for filling missing days.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct GapRule {
    /// Longest run of consecutive missing days filled by linear interpolation of
    /// daily ET0 (0 disables filling). Default 5.
    pub max_fill_days: u32,
}

impl Default for GapRule {
    fn default() -> Self {
        GapRule { max_fill_days: 5 }
    }
}

/// Daily or monthly records.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Timestep {
    /// One row per day (`date` column).
    Daily,
    /// One row per month of daily means (`year` and `month` columns).
    Monthly,
}

/// One period of the record.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum Period {
    /// A day.
    Day {
        /// Calendar year.
        year: i32,
        /// Month, 1–12.
        month: u32,
        /// Day of the month, 1–31.
        day: u32,
    },
    /// A month.
    Month {
        /// Calendar year.
        year: i32,
        /// Month, 1–12.
        month: u32,
    },
}

impl Period {
    /// The calendar year.
    pub fn year(&self) -> i32 {
        match *self {
            Period::Day { year, .. } | Period::Month { year, .. } => year,
        }
    }

    /// Number of days the period covers.
    pub fn days(&self) -> u32 {
        match *self {
            Period::Day { .. } => 1,
            Period::Month { year, month } => days_in_month(year, month),
        }
    }

    /// Day of the year used by the radiation equations (the 15th for a month).
    pub fn day_of_year(&self) -> u32 {
        match *self {
            Period::Day { year, month, day } => day_of_year(year, month, day),
            Period::Month { year, month } => mid_month_day_of_year(year, month),
        }
    }
}

impl fmt::Display for Period {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match *self {
            Period::Day { year, month, day } => write!(f, "{year:04}-{month:02}-{day:02}"),
            Period::Month { year, month } => write!(f, "{year:04}-{month:02}"),
        }
    }
}

/// ET0 of one period.
#[derive(Debug, Clone, PartialEq)]
pub struct PeriodPet {
    /// Catchment, when the file has a `catchment` column.
    pub catchment: Option<String>,
    /// The day or month.
    pub period: Period,
    /// Mean daily reference evapotranspiration over the period, mm/day.
    pub et0_mm_per_day: f64,
    /// Total over the period, mm (`et0_mm_per_day` × days in the period).
    pub et0_mm: f64,
    /// The method's name, or [`GAP_FILLED`] for an interpolated day.
    pub method: &'static str,
}

/// Annual total of one catchment and year.
#[derive(Debug, Clone, PartialEq)]
pub struct AnnualPet {
    /// Catchment, when the file has a `catchment` column.
    pub catchment: Option<String>,
    /// Calendar year.
    pub year: i32,
    /// Total ET0 of the year, mm: computed plus gap-filled days (short when incomplete).
    pub pet_mm: f64,
    /// Method's name.
    pub method: &'static str,
    /// Days of the year whose ET0 was computed from weather.
    pub days: u32,
    /// Days of the year without a computed value (filled or not); `days + missing_days`
    /// is the length of the year.
    pub missing_days: u32,
    /// [`STATUS_COMPLETE`], [`STATUS_GAP_FILLED`] or [`STATUS_INCOMPLETE`].
    pub status: &'static str,
}

/// A run of consecutive missing periods.
#[derive(Debug, Clone, PartialEq)]
pub struct Gap {
    /// Catchment, when the file has a `catchment` column.
    pub catchment: Option<String>,
    /// First missing period.
    pub first: Period,
    /// Last missing period.
    pub last: Period,
    /// Days covered by the run.
    pub days: u32,
    /// True when the run was filled by the gap rule.
    pub filled: bool,
    /// Why the periods are missing (no rows, or which values were blank in which rows).
    pub cause: String,
}

/// Everything computed from one weather file.
#[derive(Debug, Clone, PartialEq)]
pub struct PetOutput {
    /// The weather file.
    pub source: PathBuf,
    /// The method used for every period.
    pub method: PetMethod,
    /// Daily or monthly.
    pub timestep: Timestep,
    /// Data rows read.
    pub rows_read: usize,
    /// ET0 per computed or gap-filled period, by catchment (file order) then time.
    pub periods: Vec<PeriodPet>,
    /// Annual totals, by catchment then year.
    pub annual: Vec<AnnualPet>,
    /// Every run of missing periods.
    pub gaps: Vec<Gap>,
    /// Humidity data used (FAO-56 order), with the number of periods each served.
    pub humidity_sources: Vec<(&'static str, usize)>,
    /// Columns present in the file that the chosen method does not use.
    pub unused_columns: Vec<String>,
}

impl PetOutput {
    /// Years flagged incomplete.
    pub fn incomplete_years(&self) -> impl Iterator<Item = &AnnualPet> {
        self.annual.iter().filter(|a| a.status == STATUS_INCOMPLETE)
    }
}

/// Computes ET0 from a weather file with the default [`GapRule`].
pub fn compute_pet_file(path: &Path, site: &SiteMeta, choice: PetMethodChoice) -> Result<PetOutput> {
    compute_pet_file_with(path, site, choice, GapRule::default())
}

/// Computes ET0 from a weather file with an explicit gap rule. Every problem in the
/// file (and in `site`) is collected and returned together as [`Error::Invalid`].
pub fn compute_pet_file_with(path: &Path, site: &SiteMeta, choice: PetMethodChoice, rule: GapRule) -> Result<PetOutput> {
    let mut problems = Vec::new();
    let model_site = match site.validate() {
        Ok(s) => Some(s),
        Err(p) => {
            problems.extend(p);
            None
        }
    };
    let table = match read_table(path) {
        Ok(t) => t,
        Err(p) => {
            problems.extend(p);
            return Err(Error::Invalid(problems));
        }
    };
    let layout = match Layout::from_table(&table, choice) {
        Ok(l) => l,
        Err(p) => {
            problems.extend(p);
            return Err(Error::Invalid(problems));
        }
    };
    let rows = parse_rows(&table, &layout, &mut problems);
    let Some(model_site) = model_site else { return Err(Error::Invalid(problems)) };
    let series = group_series(path, rows, &mut problems);
    let mut evaluated = Vec::with_capacity(series.len());
    let mut humidity_counts: HashMap<&'static str, usize> = HashMap::new();
    for (catchment, rows) in series {
        let outcomes = evaluate_series(path, &layout, &model_site, site.wind_height_m, &rows, &mut problems, &mut humidity_counts);
        evaluated.push((catchment, rows, outcomes));
    }
    if !problems.is_empty() {
        return Err(Error::Invalid(problems));
    }
    let method = layout.method;
    let mut out = PetOutput {
        source: path.to_path_buf(),
        method,
        timestep: layout.timestep,
        rows_read: table.rows.len(),
        periods: Vec::new(),
        annual: Vec::new(),
        gaps: Vec::new(),
        humidity_sources: Vec::new(),
        unused_columns: layout.unused.clone(),
    };
    for (catchment, rows, outcomes) in evaluated {
        match layout.timestep {
            Timestep::Daily => assemble_daily(catchment, &rows, &outcomes, method, rule, &mut out),
            Timestep::Monthly => assemble_monthly(catchment, &rows, &outcomes, method, &mut out),
        }
    }
    let order = [
        Humidity::VapourPressure { ea_kpa: 0.0 },
        Humidity::DewPoint { dewpoint_c: 0.0 },
        Humidity::RhMaxMin { rh_max_pct: 0.0, rh_min_pct: 0.0 },
        Humidity::RhMax { rh_max_pct: 0.0 },
        Humidity::RhMean { rh_mean_pct: 0.0 },
        Humidity::TminAsDewPoint,
    ];
    out.humidity_sources = order.iter().filter_map(|h| humidity_counts.get(h.label()).map(|&n| (h.label(), n))).collect();
    Ok(out)
}

/// Which columns the file has, how it is laid out and which method it gets.
#[derive(Debug)]
struct Layout {
    timestep: Timestep,
    method: PetMethod,
    has_catchment: bool,
    /// Numeric columns the chosen method reads.
    used: Vec<&'static str>,
    unused: Vec<String>,
}

impl Layout {
    fn from_table(table: &Table, choice: PetMethodChoice) -> std::result::Result<Layout, Vec<Problem>> {
        let path = &table.path;
        let mut problems = table.check_columns(&[], &WEATHER_COLUMNS, |_| false);
        let has = |c: &str| table.col(c).is_some();
        let timestep = match (has("date"), has("year"), has("month")) {
            (true, false, false) => Some(Timestep::Daily),
            (false, true, true) => Some(Timestep::Monthly),
            (true, _, _) => {
                problems.push(
                    Problem::in_file(
                        path,
                        "give either a date column (daily records) or year and month columns (monthly records), not both",
                    )
                    .row(1)
                    .column(if has("year") { "year" } else { "month" }),
                );
                None
            }
            (false, true, false) => {
                problems.push(
                    Problem::in_file(path, "monthly records need a month column beside year (daily records need a date column instead)")
                        .row(1)
                        .column("month"),
                );
                None
            }
            (false, false, true) => {
                problems.push(Problem::in_file(path, "monthly records need a year column beside month").row(1).column("year"));
                None
            }
            (false, false, false) => {
                problems.push(
                    Problem::in_file(
                        path,
                        "no period column: give date (YYYY-MM-DD) for daily records, or year and month for monthly records",
                    )
                    .row(1)
                    .column("date"),
                );
                None
            }
        };
        let temps = has("tmax_c") && has("tmin_c");
        let humidity = ["ea_kpa", "dewpoint_c", "rh_max_pct", "rh_mean_pct"].iter().any(|c| has(c));
        let wind = has("wind_m_per_s");
        let shortwave = has("sunshine_h") || has("solar_mj_m2");
        let rn = has("rn_mj_m2");
        let pt_possible = (rn && (temps || has("tmean_c"))) || (shortwave && temps);
        let method = match choice.forced() {
            None => {
                if temps && humidity && wind && shortwave {
                    Some(PetMethod::PenmanMonteith)
                } else if pt_possible {
                    Some(PetMethod::PriestleyTaylor)
                } else if temps {
                    Some(PetMethod::Hargreaves)
                } else {
                    problems.push(
                        Problem::in_file(
                            path,
                            "no method can be used: every method needs tmax_c and tmin_c (Priestley–Taylor with rn_mj_m2 can use tmean_c)",
                        )
                        .row(1)
                        .column("tmax_c"),
                    );
                    None
                }
            }
            Some(m) => {
                let mut missing: Vec<&str> = Vec::new();
                match m {
                    PetMethod::PenmanMonteith => {
                        for c in ["tmax_c", "tmin_c", "wind_m_per_s"] {
                            if !has(c) {
                                missing.push(c);
                            }
                        }
                        if !shortwave {
                            missing.push("sunshine_h or solar_mj_m2");
                        }
                    }
                    PetMethod::Hargreaves => {
                        for c in ["tmax_c", "tmin_c"] {
                            if !has(c) {
                                missing.push(c);
                            }
                        }
                    }
                    PetMethod::PriestleyTaylor => {
                        if !pt_possible {
                            missing.push("rn_mj_m2 (with tmean_c or tmax_c and tmin_c), or tmax_c, tmin_c and sunshine_h or solar_mj_m2");
                        }
                    }
                }
                if missing.is_empty() {
                    Some(m)
                } else {
                    problems.push(
                        Problem::in_file(path, format!("--method {} needs columns that the file lacks: {}", m.name(), missing.join(", ")))
                            .row(1)
                            .column(missing[0].split(' ').next().unwrap_or("")),
                    );
                    None
                }
            }
        };
        if !problems.is_empty() {
            return Err(problems);
        }
        let (Some(timestep), Some(method)) = (timestep, method) else { return Err(problems) };
        let humidity_cols = ["rh_max_pct", "rh_min_pct", "rh_mean_pct", "dewpoint_c", "ea_kpa"];
        let mut wanted: Vec<&'static str> = vec!["tmax_c", "tmin_c"];
        match method {
            PetMethod::PenmanMonteith => {
                wanted.extend(humidity_cols);
                wanted.extend(["wind_m_per_s", "sunshine_h", "solar_mj_m2"]);
            }
            PetMethod::PriestleyTaylor => {
                wanted.push("tmean_c");
                wanted.extend(humidity_cols);
                wanted.extend(["sunshine_h", "solar_mj_m2", "rn_mj_m2"]);
            }
            PetMethod::Hargreaves => {}
        }
        if timestep == Timestep::Monthly && method != PetMethod::Hargreaves {
            wanted.extend(["tmean_c", "tmean_prev_c", "tmean_next_c"]);
        }
        let used: Vec<&'static str> = RANGES.iter().map(|r| r.0).filter(|c| wanted.contains(c) && has(c)).collect();
        let structural = ["catchment", "date", "year", "month"];
        let unused = table
            .headers
            .iter()
            .filter(|h| !h.is_empty() && !structural.contains(&h.as_str()) && !used.contains(&h.as_str()))
            .cloned()
            .collect();
        Ok(Layout { timestep, method, has_catchment: has("catchment"), used, unused })
    }
}

/// Numeric values of one row (only the columns the method reads are filled).
#[derive(Debug, Clone, Copy, Default)]
struct Values {
    tmax_c: Option<f64>,
    tmin_c: Option<f64>,
    tmean_c: Option<f64>,
    rh_max_pct: Option<f64>,
    rh_min_pct: Option<f64>,
    rh_mean_pct: Option<f64>,
    dewpoint_c: Option<f64>,
    ea_kpa: Option<f64>,
    wind_m_per_s: Option<f64>,
    sunshine_h: Option<f64>,
    solar_mj_m2: Option<f64>,
    rn_mj_m2: Option<f64>,
    tmean_prev_c: Option<f64>,
    tmean_next_c: Option<f64>,
}

impl Values {
    fn slot(&mut self, col: &str) -> Option<&mut Option<f64>> {
        Some(match col {
            "tmax_c" => &mut self.tmax_c,
            "tmin_c" => &mut self.tmin_c,
            "tmean_c" => &mut self.tmean_c,
            "rh_max_pct" => &mut self.rh_max_pct,
            "rh_min_pct" => &mut self.rh_min_pct,
            "rh_mean_pct" => &mut self.rh_mean_pct,
            "dewpoint_c" => &mut self.dewpoint_c,
            "ea_kpa" => &mut self.ea_kpa,
            "wind_m_per_s" => &mut self.wind_m_per_s,
            "sunshine_h" => &mut self.sunshine_h,
            "solar_mj_m2" => &mut self.solar_mj_m2,
            "rn_mj_m2" => &mut self.rn_mj_m2,
            "tmean_prev_c" => &mut self.tmean_prev_c,
            "tmean_next_c" => &mut self.tmean_next_c,
            _ => return None,
        })
    }

    /// The month's (or day's) mean temperature: `tmean_c`, else `(Tmax + Tmin)/2`.
    fn month_temperature_c(&self) -> Option<f64> {
        self.tmean_c.or(match (self.tmax_c, self.tmin_c) {
            (Some(a), Some(b)) => Some(mean_temperature_c(a, b)),
            _ => None,
        })
    }
}

#[derive(Debug, Clone)]
struct Row {
    line: usize,
    catchment: Option<String>,
    period: Period,
    /// Day number (days since 1970-01-01) or month number (year × 12 + month − 1).
    key: i64,
    v: Values,
}

fn parse_rows(table: &Table, layout: &Layout, problems: &mut Vec<Problem>) -> Vec<Row> {
    let path = &table.path;
    let mut rows = Vec::with_capacity(table.rows.len());
    for (line, rec) in &table.rows {
        let line = *line;
        let before = problems.len();
        let catchment = if layout.has_catchment {
            let id = table.text(rec, "catchment");
            if id.is_empty() {
                problems.push(
                    Problem::in_file(path, "catchment is empty; every row needs one when the column is present")
                        .row(line)
                        .column("catchment"),
                );
            }
            Some(id.to_string())
        } else {
            None
        };
        let period = match layout.timestep {
            Timestep::Daily => match parse_date(table.text(rec, "date")) {
                Ok((year, month, day)) => Some(Period::Day { year, month, day }),
                Err(m) => {
                    problems.push(Problem::in_file(path, m).row(line).column("date"));
                    None
                }
            },
            Timestep::Monthly => {
                let year = whole_number(table, line, rec, "year", 1000, 3000, problems);
                let month = whole_number(table, line, rec, "month", 1, 12, problems);
                match (year, month) {
                    (Some(y), Some(m)) => Some(Period::Month { year: y as i32, month: m as u32 }),
                    _ => None,
                }
            }
        };
        let mut v = Values::default();
        for &(col, lo, hi, unit) in RANGES.iter().filter(|r| layout.used.contains(&r.0)) {
            let text = table.text(rec, col);
            if text.is_empty() || text == "NA" {
                continue;
            }
            match parse_number(text, table.semicolon) {
                Ok(x) if (lo..=hi).contains(&x) => {
                    if let Some(slot) = v.slot(col) {
                        *slot = Some(x);
                    }
                }
                Ok(x) => {
                    let mut msg = format!("{} is out of range; allowed {} to {} {unit}", fmt_value(x), fmt_value(lo), fmt_value(hi));
                    if unit == "%" && x > 100.0 {
                        msg.push_str(" (relative humidity cannot exceed 100 %)");
                    }
                    if col == "solar_mj_m2" && x > hi {
                        msg.push_str(" (daily totals in MJ m-2 day-1 are expected; W/m2 × 0.0864 = MJ m-2 day-1)");
                    }
                    problems.push(Problem::in_file(path, msg).row(line).column(col));
                }
                Err(m) => problems.push(Problem::in_file(path, m).row(line).column(col)),
            }
        }
        check_row_consistency(path, line, &v, problems);
        if problems.len() > before {
            continue;
        }
        let Some(period) = period else { continue };
        let key = match period {
            Period::Day { year, month, day } => days_from_civil(year, month, day),
            Period::Month { year, month } => i64::from(year) * 12 + i64::from(month) - 1,
        };
        rows.push(Row { line, catchment, period, key, v });
    }
    rows
}

fn whole_number(
    table: &Table,
    line: usize,
    rec: &csv::StringRecord,
    col: &str,
    lo: i64,
    hi: i64,
    problems: &mut Vec<Problem>,
) -> Option<i64> {
    let text = table.text(rec, col);
    if text.is_empty() {
        problems.push(
            Problem::in_file(&table.path, format!("value is missing; expected a whole number from {lo} to {hi}")).row(line).column(col),
        );
        return None;
    }
    match parse_number(text, false) {
        Ok(x) if x.fract() == 0.0 && x >= lo as f64 && x <= hi as f64 => Some(x as i64),
        Ok(x) => {
            problems.push(
                Problem::in_file(&table.path, format!("{} is not allowed; expected a whole number from {lo} to {hi}", fmt_value(x)))
                    .row(line)
                    .column(col),
            );
            None
        }
        Err(m) => {
            problems.push(Problem::in_file(&table.path, m).row(line).column(col));
            None
        }
    }
}

fn check_row_consistency(path: &Path, line: usize, v: &Values, problems: &mut Vec<Problem>) {
    if let (Some(tmax), Some(tmin)) = (v.tmax_c, v.tmin_c) {
        if tmin > tmax {
            problems.push(
                Problem::in_file(
                    path,
                    format!("tmin_c {} is above tmax_c {}; check for swapped columns", fmt_value(tmin), fmt_value(tmax)),
                )
                .row(line)
                .column("tmin_c"),
            );
        } else if let Some(tmean) = v.tmean_c {
            if tmean < tmin || tmean > tmax {
                problems.push(
                    Problem::in_file(
                        path,
                        format!("tmean_c {} lies outside tmin_c {} to tmax_c {}", fmt_value(tmean), fmt_value(tmin), fmt_value(tmax)),
                    )
                    .row(line)
                    .column("tmean_c"),
                );
            }
        }
        if let Some(dew) = v.dewpoint_c {
            if dew > tmax {
                problems.push(
                    Problem::in_file(
                        path,
                        format!(
                            "dewpoint_c {} is above tmax_c {}; the dew point cannot exceed the air temperature",
                            fmt_value(dew),
                            fmt_value(tmax)
                        ),
                    )
                    .row(line)
                    .column("dewpoint_c"),
                );
            }
        }
        if let Some(ea) = v.ea_kpa {
            let es_max = saturation_vapour_pressure_kpa(tmax);
            if ea > es_max {
                problems.push(
                    Problem::in_file(
                        path,
                        format!(
                            "ea_kpa {} exceeds the saturation vapour pressure {:.3} kPa at tmax_c {}; check the units (kPa; hPa ÷ 10)",
                            fmt_value(ea),
                            es_max,
                            fmt_value(tmax)
                        ),
                    )
                    .row(line)
                    .column("ea_kpa"),
                );
            }
        }
    }
    if let (Some(hi), Some(lo)) = (v.rh_max_pct, v.rh_min_pct) {
        if lo > hi {
            problems.push(
                Problem::in_file(path, format!("rh_min_pct {} is above rh_max_pct {}", fmt_value(lo), fmt_value(hi)))
                    .row(line)
                    .column("rh_min_pct"),
            );
        }
    }
}

/// Parses a strict `YYYY-MM-DD` date with a year in 1000–3000.
fn parse_date(s: &str) -> std::result::Result<(i32, u32, u32), String> {
    if s.is_empty() {
        return Err("date is missing; write it as YYYY-MM-DD (for example 2021-03-05)".to_string());
    }
    let parts: Vec<&str> = s.split('-').collect();
    let shape_ok = parts.len() == 3
        && parts[0].len() == 4
        && parts[1].len() == 2
        && parts[2].len() == 2
        && parts.iter().all(|p| p.bytes().all(|b| b.is_ascii_digit()));
    if !shape_ok {
        return Err(format!("'{s}' is not a date written YYYY-MM-DD (for example 2021-03-05)"));
    }
    let (Ok(year), Ok(month), Ok(day)) = (parts[0].parse::<i32>(), parts[1].parse::<u32>(), parts[2].parse::<u32>()) else {
        return Err(format!("'{s}' is not a date written YYYY-MM-DD (for example 2021-03-05)"));
    };
    if !(1000..=3000).contains(&year) {
        return Err(format!("'{s}': year {year} is outside 1000–3000"));
    }
    if !(1..=12).contains(&month) || day == 0 || day > days_in_month(year, month) {
        return Err(format!("'{s}' is not a date that exists (YYYY-MM-DD)"));
    }
    Ok((year, month, day))
}

/// Days since 1970-01-01 of a proleptic Gregorian date.
fn days_from_civil(year: i32, month: u32, day: u32) -> i64 {
    let y = i64::from(year) - i64::from(month <= 2);
    let era = y.div_euclid(400);
    let yoe = y - era * 400;
    let m = i64::from(month);
    let doy = (153 * (if m > 2 { m - 3 } else { m + 9 }) + 2) / 5 + i64::from(day) - 1;
    let doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
    era * 146_097 + doe - 719_468
}

/// Inverse of [`days_from_civil`].
fn civil_from_days(z: i64) -> (i32, u32, u32) {
    let z = z + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z - era * 146_097;
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let day = (doy - (153 * mp + 2) / 5 + 1) as u32;
    let month = if mp < 10 { mp + 3 } else { mp - 9 } as u32;
    let year = (yoe + era * 400 + i64::from(month <= 2)) as i32;
    (year, month, day)
}

/// Groups rows by catchment (file order), sorts each by time, reports duplicates.
fn group_series(path: &Path, rows: Vec<Row>, problems: &mut Vec<Problem>) -> Vec<(Option<String>, Vec<Row>)> {
    let mut order: Vec<Option<String>> = Vec::new();
    let mut groups: HashMap<Option<String>, Vec<Row>> = HashMap::new();
    for row in rows {
        if !groups.contains_key(&row.catchment) {
            order.push(row.catchment.clone());
        }
        groups.entry(row.catchment.clone()).or_default().push(row);
    }
    let mut out = Vec::with_capacity(order.len());
    for c in order {
        let mut rows = groups.remove(&c).unwrap_or_default();
        rows.sort_by_key(|r| (r.key, r.line));
        for pair in rows.windows(2) {
            if pair[0].key == pair[1].key {
                let whose = c.as_ref().map(|c| format!(" for catchment '{c}'")).unwrap_or_default();
                problems.push(
                    Problem::in_file(path, format!("{} appears twice{whose}: also in row {}", pair[1].period, pair[0].line))
                        .row(pair[1].line)
                        .column(if matches!(pair[1].period, Period::Day { .. }) { "date" } else { "month" }),
                );
            }
        }
        out.push((c, rows));
    }
    out
}

/// Result of evaluating one row.
#[derive(Debug, Clone)]
enum Outcome {
    /// ET0, mm/day.
    Value(f64),
    /// A value the method needs is blank: which columns.
    Blank(Vec<&'static str>),
    /// The row's values are impossible; the problem has been reported.
    Rejected,
}

/// Computes ET0 for each row of one catchment's sorted series.
fn evaluate_series(
    path: &Path,
    layout: &Layout,
    site: &Site,
    wind_height_m: f64,
    rows: &[Row],
    problems: &mut Vec<Problem>,
    humidity_counts: &mut HashMap<&'static str, usize>,
) -> Vec<Outcome> {
    let by_key: HashMap<i64, usize> = rows.iter().enumerate().map(|(i, r)| (r.key, i)).collect();
    let mut outcomes = Vec::with_capacity(rows.len());
    for row in rows {
        let v = &row.v;
        let j = row.period.day_of_year();
        let g = match layout.timestep {
            Timestep::Daily => fao56::soil_heat_flux_daily_mj_m2_day(),
            Timestep::Monthly => {
                let neighbour = |k: i64| by_key.get(&k).and_then(|&i| rows[i].v.month_temperature_c());
                let prev = v.tmean_prev_c.or_else(|| neighbour(row.key - 1));
                let next = v.tmean_next_c.or_else(|| neighbour(row.key + 1));
                match v.month_temperature_c() {
                    Some(t) => soil_heat_flux_monthly_mj_m2_day(prev, t, next),
                    None => 0.0,
                }
            }
        };
        let mut blank: Vec<&'static str> = Vec::new();
        let humidity = Humidity::from_best_available(v.ea_kpa, v.dewpoint_c, v.rh_max_pct, v.rh_min_pct, v.rh_mean_pct);
        let outcome = match layout.method {
            PetMethod::Hargreaves => match (v.tmax_c, v.tmin_c) {
                (Some(tmax), Some(tmin)) => Outcome::Value(hargreaves::hargreaves(site, j, tmax, tmin).et0_mm_per_day),
                _ => {
                    blank_temps(v, &mut blank);
                    Outcome::Blank(blank)
                }
            },
            PetMethod::PenmanMonteith => {
                blank_temps(v, &mut blank);
                if v.wind_m_per_s.is_none() {
                    blank.push("wind_m_per_s");
                }
                let solar = shortwave(layout, v, &mut blank);
                match (v.tmax_c, v.tmin_c, v.wind_m_per_s, solar) {
                    (Some(tmax_c), Some(tmin_c), Some(wind), Some(solar)) if blank.is_empty() => {
                        if check_shortwave(path, row, site, j, solar, problems) {
                            let input = PenmanMonteithInput {
                                day_of_year: j,
                                tmax_c,
                                tmin_c,
                                humidity,
                                u2_m_per_s: wind_speed_2m_m_per_s(wind, wind_height_m),
                                solar,
                                g_mj_m2_day: g,
                            };
                            *humidity_counts.entry(humidity.label()).or_default() += 1;
                            Outcome::Value(fao56::penman_monteith(site, &input).et0_mm_per_day)
                        } else {
                            Outcome::Rejected
                        }
                    }
                    _ => Outcome::Blank(blank),
                }
            }
            PetMethod::PriestleyTaylor => {
                if let Some(rn) = v.rn_mj_m2 {
                    let t_mean = match (v.tmax_c, v.tmin_c) {
                        (Some(a), Some(b)) => Some(mean_temperature_c(a, b)),
                        _ => v.tmean_c,
                    };
                    match t_mean {
                        Some(t_mean_c) => {
                            let nr = NetRadiation::Measured { t_mean_c, rn_mj_m2_day: rn };
                            Outcome::Value(priestley_taylor::priestley_taylor(site, &nr, g).et0_mm_per_day)
                        }
                        None => {
                            blank.push("tmean_c (or tmax_c and tmin_c)");
                            Outcome::Blank(blank)
                        }
                    }
                } else {
                    if layout.used.contains(&"rn_mj_m2") {
                        blank.push("rn_mj_m2");
                    }
                    let mut needed = Vec::new();
                    blank_temps(v, &mut needed);
                    let solar = shortwave(layout, v, &mut needed);
                    match (v.tmax_c, v.tmin_c, solar) {
                        (Some(tmax_c), Some(tmin_c), Some(solar)) => {
                            if check_shortwave(path, row, site, j, solar, problems) {
                                let nr = NetRadiation::Estimated { day_of_year: j, tmax_c, tmin_c, humidity, solar };
                                *humidity_counts.entry(humidity.label()).or_default() += 1;
                                Outcome::Value(priestley_taylor::priestley_taylor(site, &nr, g).et0_mm_per_day)
                            } else {
                                Outcome::Rejected
                            }
                        }
                        _ => {
                            blank.extend(needed);
                            Outcome::Blank(blank)
                        }
                    }
                }
            }
        };
        let outcome = match outcome {
            Outcome::Value(x) if !x.is_finite() => {
                // Not expected for range-checked input; reported rather than written.
                problems.push(Problem::in_file(path, "ET0 could not be computed from this row's values").row(row.line));
                Outcome::Rejected
            }
            other => other,
        };
        outcomes.push(outcome);
    }
    outcomes
}

fn blank_temps(v: &Values, blank: &mut Vec<&'static str>) {
    if v.tmax_c.is_none() {
        blank.push("tmax_c");
    }
    if v.tmin_c.is_none() {
        blank.push("tmin_c");
    }
}

/// Measured solar radiation when given, else sunshine hours (FAO-56 prefers measured Rs).
fn shortwave(layout: &Layout, v: &Values, blank: &mut Vec<&'static str>) -> Option<Solar> {
    if let Some(rs) = v.solar_mj_m2 {
        Some(Solar::MeasuredMjM2Day(rs))
    } else if let Some(n) = v.sunshine_h {
        Some(Solar::SunshineHours(n))
    } else {
        let has_solar = layout.used.contains(&"solar_mj_m2");
        let has_sun = layout.used.contains(&"sunshine_h");
        blank.push(match (has_solar, has_sun) {
            (true, true) => "solar_mj_m2 and sunshine_h",
            (true, false) => "solar_mj_m2",
            _ => "sunshine_h",
        });
        None
    }
}

/// Checks shortwave data against what the sun can deliver at the site on the day.
fn check_shortwave(path: &Path, row: &Row, site: &Site, j: u32, solar: Solar, problems: &mut Vec<Problem>) -> bool {
    let lat = site.latitude_deg();
    match solar {
        Solar::SunshineHours(n) => {
            let daylight = daylight_hours(lat, j);
            if n > daylight + SUNSHINE_TOLERANCE_H {
                problems.push(
                    Problem::in_file(
                        path,
                        format!(
                            "sunshine_h {} exceeds the {:.1} h of daylight at latitude {}° on {}; check the latitude (south negative) and that the value is hours per day",
                            fmt_value(n),
                            daylight,
                            fmt_value(lat),
                            row.period
                        ),
                    )
                    .row(row.line)
                    .column("sunshine_h"),
                );
                return false;
            }
        }
        Solar::MeasuredMjM2Day(rs) => {
            let ra = extraterrestrial_radiation_mj_m2_day(lat, j);
            if rs > ra {
                problems.push(
                    Problem::in_file(
                        path,
                        format!(
                            "solar_mj_m2 {} exceeds the extraterrestrial radiation {:.2} MJ m-2 day-1 at latitude {}° on {}; check the latitude (south negative) and the units (MJ m-2 day-1)",
                            fmt_value(rs),
                            ra,
                            fmt_value(lat),
                            row.period
                        ),
                    )
                    .row(row.line)
                    .column("solar_mj_m2"),
                );
                return false;
            }
        }
    }
    true
}

/// One slot of a daily or monthly calendar.
#[derive(Debug, Clone, Copy)]
enum Slot {
    Computed(f64),
    Filled(f64),
    Missing { row: Option<usize> },
}

fn assemble_daily(catchment: Option<String>, rows: &[Row], outcomes: &[Outcome], method: PetMethod, rule: GapRule, out: &mut PetOutput) {
    let (Some(first), Some(last)) = (rows.first(), rows.last()) else { return };
    let first_year = first.period.year();
    let last_year = last.period.year();
    let start = days_from_civil(first_year, 1, 1);
    let end = days_from_civil(last_year, 12, 31);
    let len = (end - start + 1) as usize;
    let mut slots = vec![Slot::Missing { row: None }; len];
    let mut blanks: HashMap<usize, &[&'static str]> = HashMap::new();
    for (i, (row, outcome)) in rows.iter().zip(outcomes).enumerate() {
        let idx = (row.key - start) as usize;
        slots[idx] = match outcome {
            Outcome::Value(x) => Slot::Computed(*x),
            Outcome::Blank(cols) => {
                blanks.insert(i, cols.as_slice());
                Slot::Missing { row: Some(i) }
            }
            Outcome::Rejected => Slot::Missing { row: Some(i) },
        };
    }
    // Runs of missing days.
    let mut idx = 0;
    while idx < len {
        if !matches!(slots[idx], Slot::Missing { .. }) {
            idx += 1;
            continue;
        }
        let run_start = idx;
        while idx < len && matches!(slots[idx], Slot::Missing { .. }) {
            idx += 1;
        }
        let run_end = idx - 1; // inclusive
        let run_len = (run_end - run_start + 1) as u32;
        let before = run_start.checked_sub(1).and_then(|i| value_of(slots[i]));
        let after = slots.get(run_end + 1).and_then(|s| value_of(*s));
        let cause = gap_cause(&slots[run_start..=run_end], rows, &blanks, run_start == 0, run_end + 1 == len);
        let filled = match (before, after) {
            (Some(a), Some(b)) if run_len <= rule.max_fill_days => {
                for k in 0..run_len {
                    let w = f64::from(k + 1) / f64::from(run_len + 1);
                    slots[run_start + k as usize] = Slot::Filled(a + (b - a) * w);
                }
                true
            }
            _ => false,
        };
        let day = |i: usize| {
            let (year, month, day) = civil_from_days(start + i as i64);
            Period::Day { year, month, day }
        };
        out.gaps.push(Gap { catchment: catchment.clone(), first: day(run_start), last: day(run_end), days: run_len, filled, cause });
    }
    let name = method.name();
    let mut year_start = 0usize;
    for year in first_year..=last_year {
        let n = days_in_year(year) as usize;
        let (mut days, mut filled, mut total) = (0u32, 0u32, 0.0f64);
        for (k, slot) in slots[year_start..year_start + n].iter().enumerate() {
            let (value, method_name) = match *slot {
                Slot::Computed(x) => {
                    days += 1;
                    (x, name)
                }
                Slot::Filled(x) => {
                    filled += 1;
                    (x, GAP_FILLED)
                }
                Slot::Missing { .. } => continue,
            };
            total += value;
            let (y, m, d) = civil_from_days(start + (year_start + k) as i64);
            out.periods.push(PeriodPet {
                catchment: catchment.clone(),
                period: Period::Day { year: y, month: m, day: d },
                et0_mm_per_day: value,
                et0_mm: value,
                method: method_name,
            });
        }
        let missing = n as u32 - days;
        out.annual.push(AnnualPet {
            catchment: catchment.clone(),
            year,
            pet_mm: total,
            method: name,
            days,
            missing_days: missing,
            status: status(missing, filled),
        });
        year_start += n;
    }
}

fn value_of(slot: Slot) -> Option<f64> {
    match slot {
        Slot::Computed(x) | Slot::Filled(x) => Some(x),
        Slot::Missing { .. } => None,
    }
}

fn status(missing: u32, filled: u32) -> &'static str {
    if missing == 0 {
        STATUS_COMPLETE
    } else if filled == missing {
        STATUS_GAP_FILLED
    } else {
        STATUS_INCOMPLETE
    }
}

/// Describes why a run of slots is missing: absent rows and/or blank values by row.
fn gap_cause(run: &[Slot], rows: &[Row], blanks: &HashMap<usize, &[&'static str]>, at_start: bool, at_end: bool) -> String {
    let mut no_rows = 0usize;
    let mut by_cols: BTreeMap<String, Vec<usize>> = BTreeMap::new();
    for slot in run {
        match *slot {
            Slot::Missing { row: None } => no_rows += 1,
            Slot::Missing { row: Some(i) } => {
                let cols = blanks.get(&i).map(|c| c.join(", ")).unwrap_or_default();
                by_cols.entry(cols).or_default().push(rows[i].line);
            }
            _ => {}
        }
    }
    let mut parts = Vec::new();
    if no_rows > 0 {
        parts.push(if by_cols.is_empty() && at_start && at_end {
            "no rows at all".to_string()
        } else if by_cols.is_empty() && at_start {
            "before the first date in the file".to_string()
        } else if by_cols.is_empty() && at_end {
            "after the last date in the file".to_string()
        } else {
            "no rows for these dates".to_string()
        });
    }
    for (cols, lines) in by_cols {
        let shown: Vec<String> = lines.iter().take(5).map(|l| l.to_string()).collect();
        let more = if lines.len() > 5 { format!(" and {} more", lines.len() - 5) } else { String::new() };
        let noun = if lines.len() == 1 { "row" } else { "rows" };
        parts.push(format!("blank {cols} in {noun} {}{more}", shown.join(", ")));
    }
    parts.join("; ")
}

fn assemble_monthly(catchment: Option<String>, rows: &[Row], outcomes: &[Outcome], method: PetMethod, out: &mut PetOutput) {
    let (Some(first), Some(last)) = (rows.first(), rows.last()) else { return };
    let first_year = first.period.year();
    let last_year = last.period.year();
    let start = i64::from(first_year) * 12;
    let len = ((last_year - first_year + 1) * 12) as usize;
    let mut slots = vec![Slot::Missing { row: None }; len];
    let mut blanks: HashMap<usize, &[&'static str]> = HashMap::new();
    for (i, (row, outcome)) in rows.iter().zip(outcomes).enumerate() {
        let idx = (row.key - start) as usize;
        slots[idx] = match outcome {
            Outcome::Value(x) => Slot::Computed(*x),
            Outcome::Blank(cols) => {
                blanks.insert(i, cols.as_slice());
                Slot::Missing { row: Some(i) }
            }
            Outcome::Rejected => Slot::Missing { row: Some(i) },
        };
    }
    let month_of = |i: usize| {
        let k = start + i as i64;
        Period::Month { year: k.div_euclid(12) as i32, month: (k.rem_euclid(12) + 1) as u32 }
    };
    let mut idx = 0;
    while idx < len {
        if !matches!(slots[idx], Slot::Missing { .. }) {
            idx += 1;
            continue;
        }
        let run_start = idx;
        while idx < len && matches!(slots[idx], Slot::Missing { .. }) {
            idx += 1;
        }
        let run_end = idx - 1;
        let days = (run_start..=run_end).map(|i| month_of(i).days()).sum();
        let cause = gap_cause(&slots[run_start..=run_end], rows, &blanks, run_start == 0, run_end + 1 == len);
        out.gaps.push(Gap {
            catchment: catchment.clone(),
            first: month_of(run_start),
            last: month_of(run_end),
            days,
            filled: false,
            cause,
        });
    }
    let name = method.name();
    for (y, year) in (first_year..=last_year).enumerate() {
        let (mut days, mut total) = (0u32, 0.0f64);
        for m in 0..12 {
            let i = y * 12 + m;
            if let Slot::Computed(x) = slots[i] {
                let period = month_of(i);
                let n = period.days();
                days += n;
                let et0_mm = x * f64::from(n);
                total += et0_mm;
                out.periods.push(PeriodPet { catchment: catchment.clone(), period, et0_mm_per_day: x, et0_mm, method: name });
            }
        }
        let missing = days_in_year(year) - days;
        out.annual.push(AnnualPet {
            catchment: catchment.clone(),
            year,
            pet_mm: total,
            method: name,
            days,
            missing_days: missing,
            status: status(missing, 0),
        });
    }
}

/// Writes the per-period table: `catchment` (when any row has one), `date` or
/// `year,month`, `et0_mm_per_day`, `et0_mm`, `method`. The file is written beside
/// the target under a temporary name and renamed into place.
pub fn write_period_csv(out: &Path, rows: &[PeriodPet]) -> Result<()> {
    let monthly = rows.first().is_some_and(|r| matches!(r.period, Period::Month { .. }));
    if rows.iter().any(|r| matches!(r.period, Period::Month { .. }) != monthly) {
        return Err(Error::Other("cannot write daily and monthly periods in one table".to_string()));
    }
    let with_catchment = rows.iter().any(|r| r.catchment.is_some());
    let mut header: Vec<&str> = Vec::new();
    if with_catchment {
        header.push("catchment");
    }
    header.extend(if monthly { &["year", "month"][..] } else { &["date"][..] });
    header.extend(["et0_mm_per_day", "et0_mm", "method"]);
    let mut w = csv::WriterBuilder::new().terminator(csv::Terminator::Any(b'\n')).from_writer(Vec::new());
    let csv_err = |e: csv::Error| Error::Other(format!("formatting {}: {e}", out.display()));
    w.write_record(&header).map_err(csv_err)?;
    for r in rows {
        let mut rec: Vec<String> = Vec::with_capacity(6);
        if with_catchment {
            rec.push(r.catchment.clone().unwrap_or_default());
        }
        match r.period {
            Period::Month { year, month } => {
                rec.push(year.to_string());
                rec.push(month.to_string());
            }
            p @ Period::Day { .. } => rec.push(p.to_string()),
        }
        rec.push(num(r.et0_mm_per_day, 3));
        rec.push(num(r.et0_mm, 3));
        rec.push(r.method.to_string());
        w.write_record(&rec).map_err(csv_err)?;
    }
    let bytes = w.into_inner().map_err(|e| Error::Other(format!("formatting {}: {e}", out.display())))?;
    write_atomically(out, &bytes)
}

/// Writes the annual table with exactly the columns
/// `catchment,year,pet_mm,pet_method,pet_days,pet_missing_days,pet_status`
/// (`catchment` empty when the weather file had none), atomically.
pub fn write_annual_csv(out: &Path, rows: &[AnnualPet]) -> Result<()> {
    let mut w = csv::WriterBuilder::new().terminator(csv::Terminator::Any(b'\n')).from_writer(Vec::new());
    let csv_err = |e: csv::Error| Error::Other(format!("formatting {}: {e}", out.display()));
    w.write_record(ANNUAL_COLUMNS).map_err(csv_err)?;
    for r in rows {
        w.write_record([
            r.catchment.clone().unwrap_or_default(),
            r.year.to_string(),
            num(r.pet_mm, 2),
            r.method.to_string(),
            r.days.to_string(),
            r.missing_days.to_string(),
            r.status.to_string(),
        ])
        .map_err(csv_err)?;
    }
    let bytes = w.into_inner().map_err(|e| Error::Other(format!("formatting {}: {e}", out.display())))?;
    write_atomically(out, &bytes)
}

/// Writes `bytes` to a temporary file beside `out`, then renames it onto `out`, so
/// that a failure never leaves a half-written file under the target name.
fn write_atomically(out: &Path, bytes: &[u8]) -> Result<()> {
    let parent = out.parent().filter(|p| !p.as_os_str().is_empty()).unwrap_or(Path::new("."));
    std::fs::create_dir_all(parent).map_err(|e| Error::io(format!("creating {}", parent.display()), e))?;
    let name = out.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_else(|| "pet.csv".to_string());
    let tmp = parent.join(format!(".{name}.partial-{}", std::process::id()));
    if let Err(e) = std::fs::write(&tmp, bytes) {
        let _ = std::fs::remove_file(&tmp);
        return Err(Error::io(format!("writing {}", tmp.display()), e));
    }
    if let Err(e) = std::fs::rename(&tmp, out) {
        let _ = std::fs::remove_file(&tmp);
        return Err(Error::io(format!("moving {} into place", out.display()), e));
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    fn write(dir: &Path, name: &str, text: &str) -> PathBuf {
        let p = dir.join(name);
        std::fs::write(&p, text).unwrap();
        p
    }

    fn problems_of(e: Error) -> Vec<Problem> {
        match e {
            Error::Invalid(p) => p,
            other => panic!("expected invalid input, got {other}"),
        }
    }

    #[test]
    fn civil_day_numbers_round_trip() {
        assert_eq!(days_from_civil(1970, 1, 1), 0);
        assert_eq!(days_from_civil(2000, 3, 1) - days_from_civil(2000, 2, 28), 2);
        assert_eq!(days_from_civil(1900, 3, 1) - days_from_civil(1900, 2, 28), 1);
        for z in [-200_000i64, -1, 0, 1, 10_957, 59, 60, 400_000] {
            let (y, m, d) = civil_from_days(z);
            assert_eq!(days_from_civil(y, m, d), z);
        }
        let mut z = days_from_civil(1999, 1, 1);
        for year in 1999..=2001 {
            for month in 1..=12 {
                for day in 1..=days_in_month(year, month) {
                    assert_eq!(civil_from_days(z), (year, month, day));
                    z += 1;
                }
            }
        }
    }

    #[test]
    fn dates_are_strict() {
        assert_eq!(parse_date("2021-03-05"), Ok((2021, 3, 5)));
        assert!(parse_date("2021-3-5").is_err());
        assert!(parse_date("05/03/2021").is_err());
        assert!(parse_date("2021-02-29").is_err());
        assert_eq!(parse_date("2020-02-29"), Ok((2020, 2, 29)));
        assert!(parse_date("2021-13-01").is_err());
        assert!(parse_date("").is_err());
    }

    #[test]
    fn method_choice_names() {
        for n in PetMethodChoice::NAMES {
            assert_eq!(n.parse::<PetMethodChoice>().unwrap().name(), n);
        }
        assert!("hargraves".parse::<PetMethodChoice>().unwrap_err().contains("did you mean 'hargreaves'"));
    }

    #[test]
    fn site_validation_lists_every_problem() {
        let mut s = SiteMeta::new(95.0, 20_000.0);
        s.wind_height_m = 0.0;
        let p = s.validate().unwrap_err();
        let cols: Vec<_> = p.iter().filter_map(|p| p.column.as_deref()).collect();
        assert_eq!(cols, vec!["latitude_deg", "elevation_m", "wind_height_m"]);
        assert!(SiteMeta::new(-45.5, 300.0).validate().is_ok());
    }

    #[test]
    fn every_bad_cell_is_reported_with_row_and_column() {
        let dir = tempfile::tempdir().unwrap();
        let p = write(
            dir.path(),
            "w.csv",
            "\u{feff}date,tmax_c,tmin_c,rh_mean_pct,wind_m_per_s,sunshine_h,tmaxx\n\
             2021-01-01,25,12,60,2,8,1\n\
             2021-01-02,abc,12,160,2,8,1\n\
             2021-01-03,10,12,60,NaN,8,1\n\
             2021-01-03,20,12,60,2,8,1\n",
        );
        let problems = problems_of(compute_pet_file(&p, &SiteMeta::new(-45.0, 100.0), PetMethodChoice::Auto).unwrap_err());
        // Unknown column is a header problem, reported before cells are read.
        assert_eq!(problems.len(), 1, "{problems:?}");
        assert_eq!(problems[0].column.as_deref(), Some("tmaxx"));
        assert!(problems[0].message.contains("did you mean 'tmax_c'"), "{}", problems[0].message);
        assert_eq!(problems[0].row, Some(1));

        let text = std::fs::read_to_string(&p).unwrap().replace(",tmaxx", "").replace(",1\n", "\n");
        std::fs::write(&p, text).unwrap();
        let problems = problems_of(compute_pet_file(&p, &SiteMeta::new(-45.0, 100.0), PetMethodChoice::Auto).unwrap_err());
        let located: Vec<(Option<usize>, Option<&str>)> = problems.iter().map(|p| (p.row, p.column.as_deref())).collect();
        assert!(located.contains(&(Some(3), Some("tmax_c"))), "{located:?}");
        assert!(located.contains(&(Some(3), Some("rh_mean_pct"))), "{located:?}");
        assert!(located.contains(&(Some(4), Some("wind_m_per_s"))), "{located:?}");
        assert!(located.contains(&(Some(4), Some("tmin_c"))), "{located:?}");
        assert!(problems.iter().all(|q| q.file.as_deref() == Some(p.as_path())), "{problems:?}");
    }

    #[test]
    fn duplicate_dates_and_impossible_sunshine_are_reported() {
        let dir = tempfile::tempdir().unwrap();
        let p = write(
            dir.path(),
            "w.csv",
            "date,tmax_c,tmin_c,rh_mean_pct,wind_m_per_s,sunshine_h\n\
             2021-06-21,12,2,60,2,8\n\
             2021-06-21,12,2,60,2,8\n\
             2021-06-22,12,2,60,2,14\n",
        );
        // At 45°S on 22 June the day is about 8.9 h long.
        let problems = problems_of(compute_pet_file(&p, &SiteMeta::new(-45.0, 100.0), PetMethodChoice::Auto).unwrap_err());
        let located: Vec<(Option<usize>, Option<&str>)> = problems.iter().map(|p| (p.row, p.column.as_deref())).collect();
        assert!(located.contains(&(Some(3), Some("date"))), "{located:?}");
        assert!(located.contains(&(Some(4), Some("sunshine_h"))), "{located:?}");
    }

    #[test]
    fn auto_method_follows_columns() {
        let dir = tempfile::tempdir().unwrap();
        let site = SiteMeta::new(-45.0, 100.0);
        let cases = [
            ("date,tmax_c,tmin_c,rh_mean_pct,wind_m_per_s,sunshine_h\n2021-01-01,25,12,60,2,8\n", PetMethod::PenmanMonteith),
            ("date,tmax_c,tmin_c,wind_m_per_s,sunshine_h\n2021-01-01,25,12,2,8\n", PetMethod::PriestleyTaylor),
            ("date,tmean_c,rn_mj_m2\n2021-01-01,18,12\n", PetMethod::PriestleyTaylor),
            ("date,tmax_c,tmin_c,wind_m_per_s\n2021-01-01,25,12,2\n", PetMethod::Hargreaves),
        ];
        for (i, (text, expected)) in cases.iter().enumerate() {
            let p = write(dir.path(), &format!("w{i}.csv"), text);
            let out = compute_pet_file(&p, &site, PetMethodChoice::Auto).unwrap();
            assert_eq!(out.method, *expected, "case {i}");
            assert!(out.periods.iter().all(|r| r.method == expected.name()));
        }
        // Hargreaves case: the wind column is reported unused.
        let out = compute_pet_file(&dir.path().join("w3.csv"), &site, PetMethodChoice::Auto).unwrap();
        assert_eq!(out.unused_columns, vec!["wind_m_per_s".to_string()]);
        // Forcing a method the columns cannot support is refused, naming what is missing.
        let problems = problems_of(compute_pet_file(&dir.path().join("w3.csv"), &site, PetMethodChoice::PenmanMonteith).unwrap_err());
        assert!(problems[0].message.contains("sunshine_h or solar_mj_m2"), "{}", problems[0].message);
        // No temperature at all.
        let p = write(dir.path(), "none.csv", "date,wind_m_per_s\n2021-01-01,2\n");
        let problems = problems_of(compute_pet_file(&p, &site, PetMethodChoice::Auto).unwrap_err());
        assert!(problems[0].message.contains("no method can be used"));
    }

    #[test]
    fn monthly_soil_heat_from_neighbours_and_explicit_columns_agree() {
        let dir = tempfile::tempdir().unwrap();
        let site = SiteMeta::new(13.0 + 44.0 / 60.0, 2.0);
        let a = write(
            dir.path(),
            "a.csv",
            "year,month,tmax_c,tmin_c,ea_kpa,wind_m_per_s,sunshine_h\n\
             2021,3,33.0,25.4,2.8,2,8.0\n\
             2021,4,34.8,25.6,2.85,2,8.5\n",
        );
        let b = write(
            dir.path(),
            "b.csv",
            "year,month,tmax_c,tmin_c,ea_kpa,wind_m_per_s,sunshine_h,tmean_prev_c\n\
             2021,4,34.8,25.6,2.85,2,8.5,29.2\n",
        );
        let oa = compute_pet_file(&a, &site, PetMethodChoice::Auto).unwrap();
        let ob = compute_pet_file(&b, &site, PetMethodChoice::Auto).unwrap();
        let april_a = oa.periods.iter().find(|r| r.period == Period::Month { year: 2021, month: 4 }).unwrap();
        assert_abs_diff_eq!(april_a.et0_mm_per_day, ob.periods[0].et0_mm_per_day, epsilon = 1e-12);
        assert_abs_diff_eq!(april_a.et0_mm, april_a.et0_mm_per_day * 30.0, epsilon = 1e-12);
        // The year has only two of twelve months.
        assert_eq!(oa.annual[0].status, STATUS_INCOMPLETE);
        assert_eq!(oa.annual[0].days, 31 + 30);
        assert_eq!(oa.annual[0].missing_days, 365 - 61);
    }

    #[test]
    fn writers_produce_the_contract_columns_and_leave_no_temp_files() {
        let dir = tempfile::tempdir().unwrap();
        let rows = vec![AnnualPet {
            catchment: Some("upper, east".into()),
            year: 2021,
            pet_mm: 812.345,
            method: "hargreaves",
            days: 365,
            missing_days: 0,
            status: STATUS_COMPLETE,
        }];
        let out = dir.path().join("sub").join("annual.csv");
        write_annual_csv(&out, &rows).unwrap();
        let text = std::fs::read_to_string(&out).unwrap();
        assert_eq!(
            text,
            "catchment,year,pet_mm,pet_method,pet_days,pet_missing_days,pet_status\n\"upper, east\",2021,812.35,hargreaves,365,0,complete\n"
        );
        let periods = vec![PeriodPet {
            catchment: None,
            period: Period::Month { year: 2021, month: 4 },
            et0_mm_per_day: 5.7234,
            et0_mm: 171.702,
            method: "penman-monteith",
        }];
        let pout = dir.path().join("sub").join("periods.csv");
        write_period_csv(&pout, &periods).unwrap();
        assert_eq!(
            std::fs::read_to_string(&pout).unwrap(),
            "year,month,et0_mm_per_day,et0_mm,method\n2021,4,5.723,171.702,penman-monteith\n"
        );
        let names: Vec<_> = std::fs::read_dir(dir.path().join("sub")).unwrap().map(|e| e.unwrap().file_name()).collect();
        assert_eq!(names.len(), 2, "{names:?}");
    }

    #[test]
    fn site_file_is_checked() {
        let dir = tempfile::tempdir().unwrap();
        let good = write(dir.path(), "site.toml", "latitude_deg = -45.2\nelevation_m = 420\n");
        let s = read_site_file(&good).unwrap();
        assert_eq!(s.latitude_deg, Some(-45.2));
        assert_eq!(s.elevation_m, Some(420.0));
        assert_eq!(s.wind_height_m, None);
        let bad = write(dir.path(), "bad.toml", "latitude_deg = -45.2\nelevaton_m = 420\nwind_height_m = 0\n");
        let problems = problems_of(read_site_file(&bad).unwrap_err());
        let located: Vec<(Option<usize>, Option<&str>)> = problems.iter().map(|p| (p.row, p.column.as_deref())).collect();
        assert!(located.contains(&(Some(2), Some("elevaton_m"))), "{located:?}");
        assert!(located.contains(&(Some(3), Some("wind_height_m"))), "{located:?}");
    }
}
