//! The column layout of a weather table: which names are accepted, their allowed
//! ranges, whether the record is daily or monthly, and which method the columns
//! allow (or whether they support the one asked for).

use crate::error::Problem;
use crate::input::table::{suggestion, Table};
use crate::model::pet::PetMethod;
use std::path::Path;
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

/// Allowed range and unit of each numeric weather column.
pub(super) const RANGES: [(&str, f64, f64, &str); 14] = [
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

/// Humidity columns, any subset of which a row may have.
const HUMIDITY_COLUMNS: [&str; 5] = ["rh_max_pct", "rh_min_pct", "rh_mean_pct", "dewpoint_c", "ea_kpa"];

/// Columns that name the period or the catchment rather than hold weather.
const STRUCTURAL_COLUMNS: [&str; 4] = ["catchment", "date", "year", "month"];

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

/// Daily or monthly records.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Timestep {
    /// One row per day (`date` column).
    Daily,
    /// One row per month of daily means (`year` and `month` columns).
    Monthly,
}

/// Which columns the file has, how it is laid out and which method it gets.
#[derive(Debug)]
pub(super) struct Layout {
    pub(super) timestep: Timestep,
    pub(super) method: PetMethod,
    pub(super) has_catchment: bool,
    /// Numeric columns the chosen method reads.
    pub(super) used: Vec<&'static str>,
    /// Weather columns present that the chosen method does not read.
    pub(super) unused: Vec<String>,
}

/// What kinds of data the header offers.
struct Offered {
    temps: bool,
    tmean: bool,
    humidity: bool,
    wind: bool,
    shortwave: bool,
    rn: bool,
}

impl Offered {
    fn of(table: &Table) -> Offered {
        let has = |c: &str| table.col(c).is_some();
        Offered {
            temps: has("tmax_c") && has("tmin_c"),
            tmean: has("tmean_c"),
            humidity: ["ea_kpa", "dewpoint_c", "rh_max_pct", "rh_mean_pct"].iter().any(|c| has(c)),
            wind: has("wind_m_per_s"),
            shortwave: has("sunshine_h") || has("solar_mj_m2"),
            rn: has("rn_mj_m2"),
        }
    }

    fn penman_monteith(&self) -> bool {
        self.temps && self.humidity && self.wind && self.shortwave
    }

    fn priestley_taylor(&self) -> bool {
        (self.rn && (self.temps || self.tmean)) || (self.shortwave && self.temps)
    }
}

impl Layout {
    /// Reads the header: unknown columns, the period columns, the method. Every
    /// header problem is returned together, at row 1.
    pub(super) fn from_table(table: &Table, choice: PetMethodChoice) -> std::result::Result<Layout, Vec<Problem>> {
        let mut problems = table.check_columns(&[], &WEATHER_COLUMNS, |_| false);
        let timestep = timestep_of(table, &mut problems);
        let method = match choice.forced() {
            None => auto_method(table, &mut problems),
            Some(m) => forced_method(table, m, &mut problems),
        };
        let (Some(timestep), Some(method), true) = (timestep, method, problems.is_empty()) else { return Err(problems) };
        let used = used_columns(table, timestep, method);
        let unused = table
            .headers
            .iter()
            .filter(|h| !h.is_empty() && !STRUCTURAL_COLUMNS.contains(&h.as_str()) && !used.contains(&h.as_str()))
            .cloned()
            .collect();
        Ok(Layout { timestep, method, has_catchment: table.col("catchment").is_some(), used, unused })
    }
}

/// Daily (`date`) or monthly (`year` and `month`) from the period columns present.
fn timestep_of(table: &Table, problems: &mut Vec<Problem>) -> Option<Timestep> {
    let path: &Path = &table.path;
    let has = |c: &str| table.col(c).is_some();
    let (message, column) = match (has("date"), has("year"), has("month")) {
        (true, false, false) => return Some(Timestep::Daily),
        (false, true, true) => return Some(Timestep::Monthly),
        (true, _, _) => (
            "give either a date column (daily records) or year and month columns (monthly records), not both",
            if has("year") { "year" } else { "month" },
        ),
        (false, true, false) => ("monthly records need a month column beside year (daily records need a date column instead)", "month"),
        (false, false, true) => ("monthly records need a year column beside month", "year"),
        (false, false, false) => {
            ("no period column: give date (YYYY-MM-DD) for daily records, or year and month for monthly records", "date")
        }
    };
    problems.push(Problem::in_file(path, message).row(1).column(column));
    None
}

/// The most complete method the header allows (see the module docs of
/// [`super`]): Penman–Monteith, else Priestley–Taylor, else Hargreaves.
fn auto_method(table: &Table, problems: &mut Vec<Problem>) -> Option<PetMethod> {
    let o = Offered::of(table);
    if o.penman_monteith() {
        Some(PetMethod::PenmanMonteith)
    } else if o.priestley_taylor() {
        Some(PetMethod::PriestleyTaylor)
    } else if o.temps {
        Some(PetMethod::Hargreaves)
    } else {
        problems.push(
            Problem::in_file(
                &table.path,
                "no method can be used: every method needs tmax_c and tmin_c (Priestley–Taylor with rn_mj_m2 can use tmean_c)",
            )
            .row(1)
            .column("tmax_c"),
        );
        None
    }
}

/// `m` when the header has what it needs, else a problem naming the missing columns.
fn forced_method(table: &Table, m: PetMethod, problems: &mut Vec<Problem>) -> Option<PetMethod> {
    let has = |c: &str| table.col(c).is_some();
    let o = Offered::of(table);
    let mut missing: Vec<&str> = Vec::new();
    let required: &[&str] = match m {
        PetMethod::PenmanMonteith => &["tmax_c", "tmin_c", "wind_m_per_s"],
        PetMethod::Hargreaves => &["tmax_c", "tmin_c"],
        PetMethod::PriestleyTaylor => &[],
    };
    missing.extend(required.iter().copied().filter(|c| !has(c)));
    if m == PetMethod::PenmanMonteith && !o.shortwave {
        missing.push("sunshine_h or solar_mj_m2");
    }
    if m == PetMethod::PriestleyTaylor && !o.priestley_taylor() {
        missing.push("rn_mj_m2 (with tmean_c or tmax_c and tmin_c), or tmax_c, tmin_c and sunshine_h or solar_mj_m2");
    }
    if missing.is_empty() {
        return Some(m);
    }
    problems.push(
        Problem::in_file(&table.path, format!("--method {} needs columns that the file lacks: {}", m.name(), missing.join(", ")))
            .row(1)
            .column(missing[0].split(' ').next().unwrap_or("")),
    );
    None
}

/// The numeric columns present that `method` reads at `timestep`, in [`RANGES`] order.
fn used_columns(table: &Table, timestep: Timestep, method: PetMethod) -> Vec<&'static str> {
    let mut wanted: Vec<&'static str> = vec!["tmax_c", "tmin_c"];
    match method {
        PetMethod::PenmanMonteith => {
            wanted.extend(HUMIDITY_COLUMNS);
            wanted.extend(["wind_m_per_s", "sunshine_h", "solar_mj_m2"]);
        }
        PetMethod::PriestleyTaylor => {
            wanted.push("tmean_c");
            wanted.extend(HUMIDITY_COLUMNS);
            wanted.extend(["sunshine_h", "solar_mj_m2", "rn_mj_m2"]);
        }
        PetMethod::Hargreaves => {}
    }
    if timestep == Timestep::Monthly && method != PetMethod::Hargreaves {
        wanted.extend(["tmean_c", "tmean_prev_c", "tmean_next_c"]);
    }
    RANGES.iter().map(|r| r.0).filter(|c| wanted.contains(c) && table.col(c).is_some()).collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn method_choice_names() {
        for n in PetMethodChoice::NAMES {
            assert_eq!(n.parse::<PetMethodChoice>().unwrap().name(), n);
        }
        assert!("hargraves".parse::<PetMethodChoice>().unwrap_err().contains("did you mean 'hargreaves'"));
    }

    #[test]
    fn every_range_names_a_weather_column() {
        for (col, lo, hi, _) in RANGES {
            assert!(WEATHER_COLUMNS.contains(&col), "{col}");
            assert!(lo < hi, "{col}");
        }
        for col in HUMIDITY_COLUMNS.iter().chain(&STRUCTURAL_COLUMNS) {
            assert!(WEATHER_COLUMNS.contains(col), "{col}");
        }
    }
}
