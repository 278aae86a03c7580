//! The annual climate table (CSV, optional): rainfall and PET per catchment and year.
//!
//! Columns: `catchment`, `year`, and at least one of `rain_mm`, `pet_mm` (mm/yr).
//! A missing variable falls back to the catchment's long-term mean. The columns
//! `pet_method`, `pet_days`, `pet_missing_days`, `pet_status` written by
//! `yieldshift pet` are accepted; a year whose `pet_status` is `incomplete` is refused.
//! For each catchment, years must increase down the file with no gaps or repeats.
//! Catchments with no rows use their long-term means in every year.

use crate::error::Problem;
use crate::io::table::{read_table, suggestion};
use crate::model::catchment::{Catchment, ClimateYear};
use std::collections::HashMap;
use std::path::Path;

/// Known columns of the climate table.
pub const CLIMATE_COLUMNS: [&str; 8] =
    ["catchment", "year", "rain_mm", "pet_mm", "pet_method", "pet_days", "pet_missing_days", "pet_status"];

/// What to use for projected years outside a catchment's climate record.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum BeyondRecord {
    /// Repeat the record cyclically (year `y` uses record year `first + (y − first) mod n`).
    Cycle,
    /// Use the catchment's long-term means from the catchment table.
    Mean,
    /// Refuse the scenario: the record must cover the whole projection.
    Error,
}

/// Annual climate records per catchment.
#[derive(Debug, Clone, Default)]
pub struct ClimateTable {
    series: HashMap<String, (i32, Vec<(Option<f64>, Option<f64>)>)>,
}

impl ClimateTable {
    /// The climate of `id` in `year`, filling absent variables from `mean`.
    pub fn year_for(&self, id: &str, year: i32, mean: ClimateYear, rule: BeyondRecord) -> ClimateYear {
        let Some((first, vals)) = self.series.get(id) else { return mean };
        let n = vals.len() as i32;
        let offset = year - first;
        let idx = if (0..n).contains(&offset) {
            Some(offset as usize)
        } else {
            match rule {
                BeyondRecord::Cycle => Some(offset.rem_euclid(n) as usize),
                BeyondRecord::Mean | BeyondRecord::Error => None,
            }
        };
        match idx {
            Some(i) => ClimateYear { rain_mm: vals[i].0.unwrap_or(mean.rain_mm), pet_mm: vals[i].1.unwrap_or(mean.pet_mm) },
            None => mean,
        }
    }

    /// `(catchment, first year, last year)` of each record, sorted by catchment.
    pub fn coverage(&self) -> Vec<(String, i32, i32)> {
        let mut v: Vec<_> = self.series.iter().map(|(k, (f, s))| (k.clone(), *f, f + s.len() as i32 - 1)).collect();
        v.sort();
        v
    }

    /// Builds a table from in-memory records `(catchment, first year, [(rain, pet)])`.
    pub fn from_series(series: Vec<(String, i32, Vec<(Option<f64>, Option<f64>)>)>) -> ClimateTable {
        ClimateTable { series: series.into_iter().map(|(id, f, v)| (id, (f, v))).collect() }
    }
}

/// Reads and validates the climate table against the catchments.
pub fn read_climate(path: &Path, catchments: &[Catchment]) -> Result<ClimateTable, Vec<Problem>> {
    let table = read_table(path)?;
    let mut problems = table.check_columns(&["catchment", "year"], &CLIMATE_COLUMNS, |_| false);
    if table.col("rain_mm").is_none() && table.col("pet_mm").is_none() {
        problems.push(Problem::in_file(path, "needs a rain_mm or pet_mm column (or both)").row(1).column("rain_mm"));
    }
    if !problems.is_empty() {
        return Err(problems);
    }
    let ids: Vec<&str> = catchments.iter().map(|c| c.id.as_str()).collect();
    let mut series: HashMap<String, (i32, Vec<(Option<f64>, Option<f64>)>, usize)> = HashMap::new();
    for (line, rec) in &table.rows {
        let line = *line;
        let mut p = Vec::new();
        let id = table.text(rec, "catchment").to_string();
        if !ids.contains(&id.as_str()) {
            p.push(Problem::in_file(path, format!("'{id}' is not a catchment of the scenario{}", suggestion(&id, &ids))).row(line).column("catchment"));
        }
        let year = table.required_in(line, rec, "year", 1000.0, 3000.0, "", &mut p);
        if let Some(y) = year {
            if y.fract() != 0.0 {
                p.push(Problem::in_file(path, format!("year {y} must be a whole number")).row(line).column("year"));
            }
        }
        let rain = table.optional_in(line, rec, "rain_mm", 0.0, 30_000.0, "mm/yr", &mut p);
        let pet = table.optional_in(line, rec, "pet_mm", 0.0, 6_000.0, "mm/yr", &mut p);
        if table.text(rec, "pet_status") == "incomplete" {
            p.push(
                Problem::in_file(path, "PET for this year was computed from an incomplete weather record; fill the gaps or drop the year")
                    .row(line)
                    .column("pet_status"),
            );
        }
        if !p.is_empty() {
            problems.extend(p);
            continue;
        }
        let y = year.unwrap_or(0.0) as i32;
        match series.get_mut(&id) {
            None => {
                series.insert(id, (y, vec![(rain, pet)], line));
            }
            Some((first, vals, _)) => {
                let expected = *first + vals.len() as i32;
                if y == expected {
                    vals.push((rain, pet));
                } else if y < expected {
                    let what = if y >= *first { "repeats an earlier year" } else { "is out of order" };
                    problems.push(
                        Problem::in_file(path, format!("year {y} of catchment '{id}' {what}; years must increase by one down the file"))
                            .row(line)
                            .column("year"),
                    );
                } else {
                    problems.push(
                        Problem::in_file(
                            path,
                            format!("catchment '{id}' has no climate for {}{}; the record must have no gaps", expected, if y - 1 > expected { format!("–{}", y - 1) } else { String::new() }),
                        )
                        .row(line)
                        .column("year"),
                    );
                    vals.push((rain, pet));
                    *first = y - vals.len() as i32 + 1;
                }
            }
        }
    }
    if problems.is_empty() {
        Ok(ClimateTable { series: series.into_iter().map(|(k, (f, v, _))| (k, (f, v))).collect() })
    } else {
        Err(problems)
    }
}
