//! The mean-annual table (CSV): one row per gauged catchment with its long-term
//! mean rainfall, PET and flow and its forest fraction, for `yieldshift fit
//! --mean-annual` (no annual series needed).
//!
//! | column | unit | required | allowed |
//! |---|---|---|---|
//! | `catchment` | id (text, kept as written: leading zeros stay) | yes | unique, not empty |
//! | `name` | text | no | |
//! | `rain_mm` | mm/yr, long-term mean | yes | 1–20 000 |
//! | `pet_mm` | mm/yr, long-term mean (grass reference) | yes | 1–5 000 |
//! | `flow_mm` | mm/yr, long-term mean flow depth over the catchment | yes | 0–30 000 |
//! | `forest_fraction` | fraction of the catchment under forest | yes | 0–1 |
//! | `snow_fraction` | fraction of precipitation falling as snow | no (needed by `--max-snow-fraction`) | 0–1 |
//! | `notes` | text | no | ignored |
//!
//! A row with an empty `rain_mm`, `pet_mm`, `flow_mm` or `forest_fraction` cell is
//! **left out and reported — never filled —** ([`MeanAnnualTable::missing`]); an
//! empty `snow_fraction` is `None` (a snow filter then leaves the row out); anything malformed (an unknown column, text where
//! a number belongs, a value out of range, a repeated id) is an error naming the
//! file, spreadsheet row (header = 1) and column, and every problem is reported
//! together. Whether a record lies within the water and energy limits is decided
//! by the fit ([`crate::model::regional::limit_violation`]), not here.

use crate::error::{Error, Problem, Result};
use crate::input::observed::MAX_FLOW_MM;
use crate::input::table::read_table;
use std::collections::HashMap;
use std::path::{Path, PathBuf};

/// Known columns of the mean-annual table.
pub const MEAN_ANNUAL_COLUMNS: [&str; 8] =
    ["catchment", "name", "rain_mm", "pet_mm", "flow_mm", "forest_fraction", "snow_fraction", "notes"];
/// Required columns.
pub const MEAN_ANNUAL_REQUIRED: [&str; 5] = ["catchment", "rain_mm", "pet_mm", "flow_mm", "forest_fraction"];
/// Allowed long-term rainfall, mm/yr (as in the catchment table).
pub const RAIN_RANGE_MM: (f64, f64) = (1.0, 20_000.0);
/// Allowed long-term PET, mm/yr (as in the catchment table).
pub const PET_RANGE_MM: (f64, f64) = (1.0, 5_000.0);

/// One catchment's long-term record.
#[derive(Debug, Clone, PartialEq)]
pub struct MeanAnnualRow {
    /// Catchment id as written.
    pub id: String,
    /// Name (the id when the column is absent or empty).
    pub name: String,
    /// Spreadsheet row (header = 1).
    pub row: usize,
    /// Long-term mean rainfall, mm/yr.
    pub rain_mm: f64,
    /// Long-term mean PET, mm/yr.
    pub pet_mm: f64,
    /// Long-term mean flow depth, mm/yr.
    pub flow_mm: f64,
    /// Forest fraction, 0–1.
    pub forest_fraction: f64,
    /// Fraction of precipitation as snow, 0–1, when given.
    pub snow_fraction: Option<f64>,
}

/// A row left out because a value cell is empty.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct MissingValue {
    /// Catchment id.
    pub id: String,
    /// Name (the id when none is given).
    pub name: String,
    /// Spreadsheet row.
    pub row: usize,
    /// The empty columns.
    pub columns: Vec<&'static str>,
}

/// The mean-annual table, read and checked.
#[derive(Debug, Clone, PartialEq)]
pub struct MeanAnnualTable {
    /// The file read.
    pub path: PathBuf,
    /// Complete rows, in file order.
    pub rows: Vec<MeanAnnualRow>,
    /// Rows left out for an empty value cell, in file order.
    pub missing: Vec<MissingValue>,
    /// Whether the file has a `snow_fraction` column.
    pub has_snow_fraction: bool,
}

/// Reads the mean-annual table at `path`.
///
/// Returns [`Error::Invalid`] with every problem in the file (each naming the row
/// and column) when anything is malformed.
pub fn read_mean_annual(path: &Path) -> Result<MeanAnnualTable> {
    let table = read_table(path).map_err(Error::Invalid)?;
    let mut problems = table.check_columns(&MEAN_ANNUAL_REQUIRED, &MEAN_ANNUAL_COLUMNS, |_| false);
    if !problems.is_empty() {
        return Err(Error::Invalid(problems));
    }
    let has_snow_fraction = table.col("snow_fraction").is_some();
    let mut seen: HashMap<String, usize> = HashMap::new();
    let mut rows = Vec::new();
    let mut missing = Vec::new();
    let value_columns: [(&'static str, (f64, f64), &str); 5] = [
        ("rain_mm", RAIN_RANGE_MM, "mm/yr"),
        ("pet_mm", PET_RANGE_MM, "mm/yr"),
        ("flow_mm", (0.0, MAX_FLOW_MM), "mm/yr"),
        ("forest_fraction", (0.0, 1.0), ""),
        ("snow_fraction", (0.0, 1.0), ""),
    ];
    for (line, rec) in &table.rows {
        let line = *line;
        let mut p = Vec::new();
        let id = table.text(rec, "catchment").to_string();
        if id.is_empty() {
            p.push(Problem::in_file(path, "catchment is empty; give each gauged catchment an id").row(line).column("catchment"));
        } else if let Some(first) = seen.insert(id.clone(), line) {
            p.push(
                Problem::in_file(path, format!("catchment '{id}' appears twice (first on row {first}); give each catchment once"))
                    .row(line)
                    .column("catchment"),
            );
        }
        let mut values = [None; 5];
        let mut empty = Vec::new();
        for (slot, (col, (lo, hi), unit)) in values.iter_mut().zip(value_columns) {
            if col == "snow_fraction" && !has_snow_fraction {
                continue;
            }
            if table.text(rec, col).is_empty() {
                // An empty snow fraction matters only to --max-snow-fraction (the fit reports it there).
                if col != "snow_fraction" {
                    empty.push(col);
                }
                continue;
            }
            *slot = table.required_in(line, rec, col, lo, hi, unit, &mut p);
        }
        if !p.is_empty() {
            problems.extend(p);
            continue;
        }
        let name = match table.text(rec, "name") {
            "" => id.clone(),
            n => n.to_string(),
        };
        if !empty.is_empty() {
            missing.push(MissingValue { id, name, row: line, columns: empty });
            continue;
        }
        let [Some(rain_mm), Some(pet_mm), Some(flow_mm), Some(forest_fraction), snow_fraction] = values else { continue };
        rows.push(MeanAnnualRow { id, name, row: line, rain_mm, pet_mm, flow_mm, forest_fraction, snow_fraction });
    }
    if !problems.is_empty() {
        return Err(Error::Invalid(problems));
    }
    Ok(MeanAnnualTable { path: path.to_path_buf(), rows, missing, has_snow_fraction })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn write(name: &str, text: &str) -> PathBuf {
        let dir = std::env::temp_dir().join(format!("yieldshift-mean-annual-{}-{name}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        let p = dir.join("mean_annual.csv");
        std::fs::write(&p, text).unwrap();
        p
    }

    #[test]
    fn reads_rows_keeps_ids_as_text_and_leaves_out_empty_cells() {
        let p = write(
            "ok",
            "catchment,rain_mm,pet_mm,flow_mm,forest_fraction,snow_fraction\n\
             01013500,1142,720,620,0.91,0.31\n\
             02,900,1000,,0.2,0.0\n\
             03,800,900,1000,0.1,\n",
        );
        let t = read_mean_annual(&p).unwrap();
        assert_eq!(t.rows.len(), 2);
        assert_eq!(t.rows[0].id, "01013500");
        assert_eq!(t.rows[1].snow_fraction, None);
        assert_eq!(t.rows[0].name, "01013500");
        assert_eq!(t.rows[0].snow_fraction, Some(0.31));
        assert_eq!(t.missing.len(), 1);
        assert_eq!((t.missing[0].row, t.missing[0].columns.clone()), (3, vec!["flow_mm"]));
        assert!(t.has_snow_fraction);
    }

    #[test]
    fn bad_cells_name_row_and_column_all_at_once() {
        let p = write(
            "bad",
            "catchment,rain_mm,pet_mm,flow_mm,forest_fraction\n\
             a,1000,800,300,1.5\n\
             a,abc,800,300,0.5\n\
             ,1000,800,-5,0.5\n",
        );
        let Err(Error::Invalid(problems)) = read_mean_annual(&p) else { panic!("expected problems") };
        let at: Vec<(Option<usize>, Option<String>)> = problems.iter().map(|p| (p.row, p.column.clone())).collect();
        assert!(at.contains(&(Some(2), Some("forest_fraction".into()))), "{problems:?}");
        assert!(at.contains(&(Some(3), Some("catchment".into()))), "{problems:?}");
        assert!(at.contains(&(Some(3), Some("rain_mm".into()))), "{problems:?}");
        assert!(at.contains(&(Some(4), Some("catchment".into()))), "{problems:?}");
        assert!(at.contains(&(Some(4), Some("flow_mm".into()))), "{problems:?}");
    }

    #[test]
    fn a_missing_required_column_is_an_error() {
        let p = write("col", "catchment,rain_mm,pet_mm,flow_mm\nx,1000,800,300\n");
        let Err(Error::Invalid(problems)) = read_mean_annual(&p) else { panic!("expected problems") };
        assert!(problems.iter().any(|p| p.column.as_deref() == Some("forest_fraction")), "{problems:?}");
    }
}
