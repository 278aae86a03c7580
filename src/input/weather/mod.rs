//! Weather records in, reference evapotranspiration out.
//!
//! Reads a daily or monthly weather table (CSV), checks every cell, picks (or is
//! told) the method the columns allow, computes ET0 per period with
//! [`crate::model::pet`], sets negative daily values to zero by the crate's one
//! rule, fills short gaps by a stated rule, and totals each calendar year per
//! catchment. The annual table (written by `crate::output::pet`) is what the
//! scenario's climate table reader accepts.
//!
//! # Files
//! * [`site`] — the site values and the site TOML file;
//! * [`columns`] — accepted columns, their ranges, daily or monthly, method choice;
//! * `rows` — cell and row checks, one sorted series per catchment;
//! * [`calendar`] — periods, day numbers, month lengths, leap years, dates;
//! * `compute` — ET0 of each row, then the non-negativity rule;
//! * [`gaps`] — missing periods and the gap rule;
//! * [`totals`] — per-period values and annual totals.
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
//!
//! # Negative ET0
//! Penman–Monteith and Priestley–Taylor go below zero when net radiation is below
//! the soil heat flux (clear high-latitude winter days); Hargreaves does below
//! −17.8 °C. Every computed value goes through [`crate::model::pet::non_negative_et0`]
//! before it is stored, used for gap filling or summed: a negative value becomes 0
//! (common practice, no published source) and the day is counted in
//! [`AnnualPet::clamped_days`] (for monthly records, the days of such months).

pub mod calendar;
pub mod columns;
mod compute;
pub mod gaps;
mod rows;
pub mod site;
pub mod totals;

pub use calendar::Period;
pub use columns::{PetMethodChoice, Timestep, WEATHER_COLUMNS};
pub use gaps::{Gap, GapRule};
pub use site::{read_site_file, SiteFile, SiteMeta};
pub use totals::{AnnualPet, PeriodPet, ANNUAL_COLUMNS, GAP_FILLED, STATUS_COMPLETE, STATUS_GAP_FILLED, STATUS_INCOMPLETE};

use crate::error::{Error, Result};
use crate::input::table::read_table;
use crate::model::pet::fao56::Humidity;
use crate::model::pet::PetMethod;
use columns::Layout;
use compute::{evaluate_series, Context};
use rows::{group_series, parse_rows};
use std::collections::HashMap;
use std::path::{Path, PathBuf};
use totals::{assemble_daily, assemble_monthly};

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

    /// Catchment-years with at least one day whose negative ET0 was set to 0.
    pub fn clamped_years(&self) -> impl Iterator<Item = &AnnualPet> {
        self.annual.iter().filter(|a| a.clamped_days > 0)
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
    let cx = Context { path, layout: &layout, site: &model_site, wind_height_m: site.wind_height_m };
    for (catchment, rows) in series {
        let outcomes = evaluate_series(&cx, &rows, &mut problems, &mut humidity_counts);
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::error::Problem;
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
}
