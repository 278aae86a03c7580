//! The observed-flow table (CSV): gauged annual flow per catchment and year, for
//! `yieldshift fit`.
//!
//! | column | unit | required | allowed |
//! |---|---|---|---|
//! | `catchment` | id | yes | a catchment of the scenario |
//! | `year` | calendar year | yes | whole number, 1000–3000, once per catchment |
//! | `flow_mm` | mm/yr (flow depth over the catchment) | one of the two columns | 0–30 000 |
//! | `flow_m3` | m³/yr | one of the two columns | ≥ 0; converted with the catchment's area |
//! | `notes` | text | no | ignored |
//!
//! Both flow columns may appear; each row gives one of them. `flow_m3` is
//! converted to depth with `flow_mm = flow_m3 / (10 · area_ha)` (1 mm over 1 ha =
//! 10 m³). Rows may come in any order.
//!
//! Years are aligned with the scenario's climate table. An observation is **left
//! out and reported — never filled —** when its flow cell is empty, when the
//! climate table has no record of that catchment-year, or when that record has no
//! rainfall. PET missing from a climate record falls back to the catchment's
//! long-term PET, as it does in projections, and is reported. Anything malformed
//! (unknown catchment, bad number, repeated year, both flows given) is an error
//! naming the file, spreadsheet row (header = 1) and column; every problem in the
//! file is reported together.

use crate::error::{Error, Problem, Result};
use crate::input::climate::BeyondRecord;
use crate::input::scenario::Scenario;
use crate::input::table::{fmt_value, read_table, suggestion};
use crate::model::catchment::ClimateYear;
use std::collections::HashMap;
use std::fmt;
use std::path::{Path, PathBuf};

/// Known columns of the observed-flow table.
pub const OBSERVED_COLUMNS: [&str; 5] = ["catchment", "year", "flow_mm", "flow_m3", "notes"];

/// Largest annual flow depth accepted, mm/yr.
pub const MAX_FLOW_MM: f64 = 30_000.0;

/// One observed year, aligned with the climate of the same year.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ObservedYear {
    /// Calendar year.
    pub year: i32,
    /// Spreadsheet row of the observation (header = 1).
    pub row: usize,
    /// The year's climate from the scenario's climate table.
    pub climate: ClimateYear,
    /// True when the climate record had no PET and the catchment's long-term PET was used.
    pub pet_from_mean: bool,
    /// Observed flow as depth over the catchment, mm/yr.
    pub flow_mm: f64,
}

/// The usable observations of one gauged catchment, in calendar order.
#[derive(Debug, Clone, PartialEq)]
pub struct ObservedSeries {
    /// Index of the catchment in `Scenario::catchments`.
    pub catchment: usize,
    /// Catchment id.
    pub id: String,
    /// Years with both an observed flow and a climate record.
    pub years: Vec<ObservedYear>,
    /// Spreadsheet rows of this catchment in the file (used and left out).
    pub rows: Vec<usize>,
}

/// Why an observation was left out.
#[derive(Debug, Clone, PartialEq)]
pub enum LeftOutReason {
    /// The flow cell (`flow_mm` and `flow_m3`) is empty.
    MissingFlow,
    /// The climate table has no record of this catchment in this year;
    /// the record's span is given when the catchment has one.
    NoClimate {
        /// First and last year of the catchment's climate record, if any.
        record: Option<(i32, i32)>,
    },
    /// The climate record of this year has no rainfall.
    NoRainfall,
}

impl fmt::Display for LeftOutReason {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            LeftOutReason::MissingFlow => write!(f, "flow is empty (missing years are left out and never filled)"),
            LeftOutReason::NoClimate { record: Some((a, b)) } => {
                write!(f, "no climate record for this year (the climate table covers {a}–{b})")
            }
            LeftOutReason::NoClimate { record: None } => write!(f, "the climate table has no record of this catchment"),
            LeftOutReason::NoRainfall => write!(f, "the climate table has no rain_mm for this year"),
        }
    }
}

/// An observation that was left out of the fit.
#[derive(Debug, Clone, PartialEq)]
pub struct LeftOut {
    /// Catchment id.
    pub catchment: String,
    /// Calendar year.
    pub year: i32,
    /// Spreadsheet row.
    pub row: usize,
    /// Why it was left out.
    pub reason: LeftOutReason,
}

/// The observed-flow table read and aligned with the scenario's climate.
#[derive(Debug, Clone, PartialEq)]
pub struct ObservedFlows {
    /// The file read.
    pub path: PathBuf,
    /// One entry per catchment that has at least one row, in catchment-table order.
    pub series: Vec<ObservedSeries>,
    /// Observations left out, in file order.
    pub left_out: Vec<LeftOut>,
}

impl ObservedFlows {
    /// Years left out for catchment `id`.
    pub fn left_out_of(&self, id: &str) -> usize {
        self.left_out.iter().filter(|l| l.catchment == id).count()
    }
}

/// Reads the observed-flow table at `path` and aligns it with `scenario`'s climate.
///
/// Returns [`Error::Invalid`] with every problem in the file (each naming the
/// row and column) when anything is malformed; reports left-out years in
/// [`ObservedFlows::left_out`].
// Over 100 lines on purpose: one pass over the rows with the per-catchment year sequence checked as it is read, so every problem is reported in file order.
pub fn read_observed(path: &Path, scenario: &Scenario) -> Result<ObservedFlows> {
    let table = read_table(path).map_err(Error::Invalid)?;
    let mut problems = table.check_columns(&["catchment", "year"], &OBSERVED_COLUMNS, |_| false);
    let has_mm = table.col("flow_mm").is_some();
    let has_m3 = table.col("flow_m3").is_some();
    if !has_mm && !has_m3 {
        problems.push(
            Problem::in_file(path, "needs a flow column: flow_mm (mm/yr over the catchment) or flow_m3 (m³/yr)").row(1).column("flow_mm"),
        );
    }
    let Some(climate) = &scenario.climate else {
        problems.push(
            Problem::in_file(
                &scenario.path,
                "fitting needs the annual climate of the gauged years: add [climate] table = \"<climate.csv>\" to the scenario",
            )
            .column("climate.table"),
        );
        return Err(Error::Invalid(problems));
    };
    if !problems.is_empty() {
        return Err(Error::Invalid(problems));
    }
    let ids: Vec<&str> = scenario.catchments.iter().map(|c| c.id.as_str()).collect();
    let coverage: HashMap<String, (i32, i32)> = climate.coverage().into_iter().map(|(id, a, b)| (id, (a, b))).collect();
    let mut seen: HashMap<(usize, i32), usize> = HashMap::new();
    let mut per_catchment: Vec<Option<ObservedSeries>> = vec![None; scenario.catchments.len()];
    let mut left_out = Vec::new();

    for (line, rec) in &table.rows {
        let line = *line;
        let mut p = Vec::new();
        let id = table.text(rec, "catchment").to_string();
        let index = ids.iter().position(|&x| x == id);
        if id.is_empty() {
            p.push(Problem::in_file(path, "catchment is empty; give the id of a catchment in the scenario").row(line).column("catchment"));
        } else if index.is_none() {
            p.push(
                Problem::in_file(path, format!("'{id}' is not a catchment of the scenario{}", suggestion(&id, &ids)))
                    .row(line)
                    .column("catchment"),
            );
        }
        let year = table.required_in(line, rec, "year", 1000.0, 3000.0, "", &mut p).and_then(|y| {
            if y.fract() != 0.0 {
                p.push(Problem::in_file(path, format!("year {} must be a whole number", fmt_value(y))).row(line).column("year"));
                None
            } else {
                Some(y as i32)
            }
        });
        let mm = table.optional_in(line, rec, "flow_mm", 0.0, MAX_FLOW_MM, "mm/yr", &mut p);
        let m3 = table.optional_in(line, rec, "flow_m3", 0.0, 1e13, "m³/yr", &mut p);
        let flow_mm = match (mm, m3) {
            (Some(_), Some(_)) => {
                p.push(Problem::in_file(path, "give flow_mm or flow_m3 in a row, not both").row(line).column("flow_m3"));
                None
            }
            (Some(v), None) => Some(v),
            (None, Some(v)) => index.and_then(|i| {
                let area = scenario.catchments[i].area_ha;
                let depth = v / (10.0 * area);
                if depth > MAX_FLOW_MM {
                    p.push(
                        Problem::in_file(
                            path,
                            format!(
                                "{} m³/yr over the catchment's {} ha is {} mm/yr, more than the {} mm/yr allowed; check the units (m³/yr, not L or m³/s)",
                                fmt_value(v),
                                fmt_value(area),
                                fmt_value(depth),
                                fmt_value(MAX_FLOW_MM)
                            ),
                        )
                        .row(line)
                        .column("flow_m3"),
                    );
                    None
                } else {
                    Some(depth)
                }
            }),
            (None, None) => None,
        };
        if let (Some(i), Some(y)) = (index, year) {
            if let Some(first) = seen.insert((i, y), line) {
                p.push(
                    Problem::in_file(
                        path,
                        format!("year {y} of catchment '{id}' appears twice (first on row {first}); give each year once"),
                    )
                    .row(line)
                    .column("year"),
                );
            }
        }
        if !p.is_empty() {
            problems.extend(p);
            continue;
        }
        let (Some(i), Some(y)) = (index, year) else { continue };
        let c = &scenario.catchments[i];
        let series =
            per_catchment[i].get_or_insert_with(|| ObservedSeries { catchment: i, id: id.clone(), years: Vec::new(), rows: Vec::new() });
        series.rows.push(line);
        let Some(flow_mm) = flow_mm else {
            // Both cells are empty (a bad value would have been a problem above).
            left_out.push(LeftOut { catchment: id, year: y, row: line, reason: LeftOutReason::MissingFlow });
            continue;
        };
        let record = coverage.get(&c.id).copied();
        let in_record = record.is_some_and(|(a, b)| (a..=b).contains(&y));
        if !in_record {
            left_out.push(LeftOut { catchment: id, year: y, row: line, reason: LeftOutReason::NoClimate { record } });
            continue;
        }
        // A NaN fallback reveals cells the climate table left empty.
        let probe = climate.year_for(&c.id, y, ClimateYear { rain_mm: f64::NAN, pet_mm: f64::NAN }, BeyondRecord::Mean);
        if probe.rain_mm.is_nan() {
            left_out.push(LeftOut { catchment: id, year: y, row: line, reason: LeftOutReason::NoRainfall });
            continue;
        }
        let pet_from_mean = probe.pet_mm.is_nan();
        let climate_year = ClimateYear { rain_mm: probe.rain_mm, pet_mm: if pet_from_mean { c.pet_mm } else { probe.pet_mm } };
        series.years.push(ObservedYear { year: y, row: line, climate: climate_year, pet_from_mean, flow_mm });
    }
    if !problems.is_empty() {
        return Err(Error::Invalid(problems));
    }
    let series = per_catchment
        .into_iter()
        .flatten()
        .map(|mut s| {
            s.years.sort_by_key(|y| y.year);
            s
        })
        .collect();
    Ok(ObservedFlows { path: path.to_path_buf(), series, left_out })
}
