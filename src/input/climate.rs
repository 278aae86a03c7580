//! The annual climate table (CSV, optional): rainfall and PET per catchment and year.
//!
//! Columns: `catchment`, `year`, and at least one of `rain_mm`, `pet_mm` (mm/yr).
//! A missing variable falls back to the catchment's long-term mean. The columns
//! `pet_method`, `pet_days`, `pet_missing_days`, `pet_status`, `pet_clamped_days`
//! written by `yieldshift pet` are accepted; a year whose `pet_status` is `incomplete` is refused.
//! For each catchment, years must increase down the file with no gaps or repeats.
//! Catchments with no rows use their long-term means in every year.

use crate::error::Problem;
use crate::input::table::{fmt_value, read_table, suggestion, MAX_SUGGESTIONS};
use crate::model::catchment::{Catchment, ClimateYear};
use std::collections::{HashMap, HashSet};
use std::path::Path;

/// Known columns of the climate table.
pub const CLIMATE_COLUMNS: [&str; 9] =
    ["catchment", "year", "rain_mm", "pet_mm", "pet_method", "pet_days", "pet_missing_days", "pet_status", "pet_clamped_days"];

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

/// One year of a record: rainfall and PET, mm/yr (`None`: the long-term mean).
pub type RecordYear = (Option<f64>, Option<f64>);

/// Annual climate records per catchment.
#[derive(Debug, Clone, Default)]
pub struct ClimateTable {
    series: HashMap<String, (i32, Vec<RecordYear>)>,
}

impl ClimateTable {
    /// The record year that projected `year` of `id` uses, if any.
    fn record_year(&self, id: &str, year: i32, rule: BeyondRecord) -> Option<&RecordYear> {
        let (first, vals) = self.series.get(id)?;
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
        idx.map(|i| &vals[i])
    }

    /// The climate of `id` in `year`, filling absent variables from `mean`.
    pub fn year_for(&self, id: &str, year: i32, mean: ClimateYear, rule: BeyondRecord) -> ClimateYear {
        match self.record_year(id, year, rule) {
            Some(v) => ClimateYear { rain_mm: v.0.unwrap_or(mean.rain_mm), pet_mm: v.1.unwrap_or(mean.pet_mm) },
            None => mean,
        }
    }

    /// How many of `years` take their PET from the record (the rest use the long-term mean).
    pub fn pet_record_years(&self, id: &str, years: impl Iterator<Item = i32>, rule: BeyondRecord) -> usize {
        years.filter(|&y| self.record_year(id, y, rule).is_some_and(|v| v.1.is_some())).count()
    }

    /// `(catchment, first year, last year)` of each record, sorted by catchment.
    pub fn coverage(&self) -> Vec<(String, i32, i32)> {
        let mut v: Vec<_> = self.series.iter().map(|(k, (f, s))| (k.clone(), *f, f + s.len() as i32 - 1)).collect();
        v.sort();
        v
    }

    /// Replaces (or adds) PET of the given `(catchment, year, pet_mm)` records,
    /// keeping each catchment's rainfall; years between records stay at the means.
    pub fn with_pet(self, records: &[(String, i32, f64)]) -> ClimateTable {
        use std::collections::BTreeMap;
        let mut by_id: HashMap<String, BTreeMap<i32, RecordYear>> = HashMap::new();
        for (id, (first, vals)) in self.series {
            let m = by_id.entry(id).or_default();
            for (t, v) in vals.into_iter().enumerate() {
                m.insert(first + t as i32, v);
            }
        }
        for (id, year, pet) in records {
            by_id.entry(id.clone()).or_default().entry(*year).or_insert((None, None)).1 = Some(*pet);
        }
        let series = by_id
            .into_iter()
            .filter_map(|(id, m)| {
                let first = *m.keys().next()?;
                let last = *m.keys().next_back()?;
                let vals = (first..=last).map(|y| m.get(&y).copied().unwrap_or((None, None))).collect();
                Some((id, (first, vals)))
            })
            .collect();
        ClimateTable { series }
    }

    /// Builds a table from in-memory records `(catchment, first year, [(rain, pet)])`.
    pub fn from_series(series: Vec<(String, i32, Vec<RecordYear>)>) -> ClimateTable {
        ClimateTable { series: series.into_iter().map(|(id, f, v)| (id, (f, v))).collect() }
    }
}

/// Reads and validates the climate table against the catchments.
///
/// Every row is checked; the year sequence of each catchment is checked in file
/// order (a repeated year, a year out of order and each gap are reported at the
/// row where they show). Rows naming a catchment the scenario does not have are
/// reported once per unknown name, at its first row.
pub fn read_climate(path: &Path, catchments: &[Catchment]) -> Result<ClimateTable, Vec<Problem>> {
    let table = read_table(path)?;
    let mut problems = table.check_columns(&["catchment", "year"], &CLIMATE_COLUMNS, |_| false);
    if table.col("rain_mm").is_none() && table.col("pet_mm").is_none() {
        problems.push(Problem::in_file(path, "needs a rain_mm or pet_mm column (or both)").row(1).column("rain_mm"));
    }
    if table.col("catchment").is_none() || table.col("year").is_none() {
        return Err(problems);
    }
    let ids: Vec<&str> = catchments.iter().map(|c| c.id.as_str()).collect();
    let id_set: HashSet<&str> = ids.iter().copied().collect();
    // Unknown catchment name → (first row, number of rows).
    let mut unknown: HashMap<String, (usize, usize)> = HashMap::new();
    // Catchment → its rows in file order.
    let mut records: HashMap<String, Vec<Record>> = HashMap::new();
    let mut order: Vec<String> = Vec::new();
    for (line, rec) in &table.rows {
        let line = *line;
        let mut p = Vec::new();
        let id = table.text(rec, "catchment").to_string();
        let known = id_set.contains(id.as_str());
        if id.is_empty() {
            p.push(Problem::in_file(path, "catchment is empty; give the id of a catchment of the scenario").row(line).column("catchment"));
        } else if !known {
            let e = unknown.entry(id.clone()).or_insert((line, 0));
            e.1 += 1;
        }
        let year = table.required_in(line, rec, "year", 1000.0, 3000.0, "", &mut p);
        if let Some(y) = year {
            if y.fract() != 0.0 {
                p.push(Problem::in_file(path, format!("year {} must be a whole number", fmt_value(y))).row(line).column("year"));
            }
        }
        let rain = table.optional_in(line, rec, "rain_mm", 0.0, 30_000.0, "mm/yr", &mut p);
        let pet = table.optional_in(line, rec, "pet_mm", 0.0, 6_000.0, "mm/yr", &mut p);
        let status = table.text(rec, "pet_status");
        match status.to_ascii_lowercase().as_str() {
            "" | "complete" | "gap-filled" => {}
            "incomplete" => p.push(
                Problem::in_file(path, "PET for this year was computed from an incomplete weather record; fill the gaps or drop the year")
                    .row(line)
                    .column("pet_status"),
            ),
            _ => p.push(
                Problem::in_file(path, format!("'{status}' is not a PET status; allowed: complete, gap-filled, incomplete (or empty)"))
                    .row(line)
                    .column("pet_status"),
            ),
        }
        let valid = p.is_empty();
        problems.extend(p);
        // The year sequence is checked for every row with a usable year, even when
        // another cell of the row is wrong, so gaps and repeats are reported together.
        if let (true, Some(y)) = (known, year.filter(|y| y.fract() == 0.0)) {
            let list = records.entry(id.clone()).or_insert_with(|| {
                order.push(id.clone());
                Vec::new()
            });
            list.push(Record { year: y as i32, row: line, rain, pet, valid });
        }
    }
    let mut unknown: Vec<(String, (usize, usize))> = unknown.into_iter().collect();
    unknown.sort_by_key(|(_, (row, _))| *row);
    for (k, (id, (row, n))) in unknown.into_iter().enumerate() {
        let also = if n > 1 { format!(" (and {} more rows)", n - 1) } else { String::new() };
        let hint = if k < MAX_SUGGESTIONS { suggestion(&id, &ids) } else { String::new() };
        problems
            .push(Problem::in_file(path, format!("'{id}' is not a catchment of the scenario{hint}{also}")).row(row).column("catchment"));
    }
    let mut series = HashMap::new();
    for id in order {
        let list = records.remove(&id).unwrap_or_default();
        problems.extend(check_years(path, &id, &list));
        if let Some(first) = list.first() {
            if list.iter().all(|r| r.valid) {
                series.insert(id, (first.year, list.iter().map(|r| (r.rain, r.pet)).collect()));
            }
        }
    }
    problems.sort_by_key(|p| p.row.unwrap_or(0));
    if problems.is_empty() {
        Ok(ClimateTable { series })
    } else {
        Err(problems)
    }
}

/// One row of a catchment's climate record.
struct Record {
    year: i32,
    row: usize,
    rain: Option<f64>,
    pet: Option<f64>,
    /// The row had no other problem.
    valid: bool,
}

/// Years of one catchment must increase by one down the file.
fn check_years(path: &Path, id: &str, list: &[Record]) -> Vec<Problem> {
    let mut problems = Vec::new();
    let mut first_row: HashMap<i32, usize> = HashMap::new();
    let mut last = None::<&Record>;
    for r in list {
        if let Some(&row) = first_row.get(&r.year) {
            problems.push(
                Problem::in_file(path, format!("year {} of catchment '{id}' repeats row {row}; each year appears once", r.year))
                    .row(r.row)
                    .column("year"),
            );
            continue;
        }
        first_row.insert(r.year, r.row);
        if let Some(prev) = last {
            if r.year < prev.year {
                problems.push(
                    Problem::in_file(
                        path,
                        format!(
                            "year {} of catchment '{id}' is out of order (it follows {} on row {}); years must increase by one down the file",
                            r.year, prev.year, prev.row
                        ),
                    )
                    .row(r.row)
                    .column("year"),
                );
            } else if r.year > prev.year + 1 {
                let missing =
                    if r.year - 1 > prev.year + 1 { format!("{}–{}", prev.year + 1, r.year - 1) } else { format!("{}", prev.year + 1) };
                problems.push(
                    Problem::in_file(
                        path,
                        format!(
                            "catchment '{id}' has no climate for {missing} (between row {} and this row); the record must have no gaps",
                            prev.row
                        ),
                    )
                    .row(r.row)
                    .column("year"),
                );
            }
        }
        if last.is_none_or(|p| r.year > p.year) {
            last = Some(r);
        }
    }
    problems
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::cover::ClassAreas;

    fn catchment(id: &str) -> Catchment {
        crate::model::catchment::test_catchment(id, 50.0, ClassAreas::default())
    }

    #[test]
    fn the_annual_table_of_the_pet_command_is_accepted_including_gap_filled_years() {
        // Regression: a `gap-filled` year written by `yieldshift pet` was refused.
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("annual.csv");
        std::fs::write(
            &p,
            "catchment,year,pet_mm,pet_method,pet_days,pet_missing_days,pet_status,pet_clamped_days\n\
             a,2020,712.5,penman-monteith,366,0,complete,0\n\
             a,2021,698.0,penman-monteith,365,3,gap-filled,0\n",
        )
        .unwrap();
        let t = read_climate(&p, &[catchment("a")]).unwrap();
        assert_eq!(t.coverage(), vec![("a".to_string(), 2020, 2021)]);
        std::fs::write(&p, "catchment,year,pet_mm,pet_status\na,2020,700,partial\n").unwrap();
        let e = read_climate(&p, &[catchment("a")]).unwrap_err();
        assert!(e[0].to_string().contains("'partial' is not a PET status"), "{}", e[0]);
    }
}
