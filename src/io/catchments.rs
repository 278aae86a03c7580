//! The catchment table (CSV): one row per catchment.
//!
//! Columns (names are the contract; see `docs/inputs.md`):
//!
//! | column | unit | required | allowed |
//! |---|---|---|---|
//! | `id` | text | yes | unique, no spaces |
//! | `name` | text | no (defaults to id) | |
//! | `area_ha` | ha | yes | > 0 |
//! | `rain_mm` | mm/yr | yes | 1–20 000 |
//! | `pet_mm` | mm/yr | yes | 1–5 000 |
//! | `pet_forest_mm` | mm/yr | no | 1–5 000 |
//! | `vulnerable_ha` or `vulnerable_fraction` | ha, or fraction of area | one of them | ≤ open area |
//! | `scattered_ha`, `medium_ha`, `dense_ha` | ha | yes | ≥ 0, sum ≤ vulnerable |
//! | `forest_ha` | ha | no (0) | ≥ 0, ≤ area |
//! | `flows_to` | id | no | another catchment's id |
//! | `<contaminant>_point_kg_per_yr` | kg/yr | no (0) | ≥ 0 |

use crate::error::Problem;
use crate::io::table::{fmt_value, read_table};
use crate::model::catchment::{Catchment, Contaminant};
use crate::model::cover::ClassAreas;
use std::collections::HashMap;
use std::path::Path;

/// Column names of the catchment table, excluding per-contaminant columns.
pub const CATCHMENT_COLUMNS: [&str; 14] = [
    "id",
    "name",
    "area_ha",
    "rain_mm",
    "pet_mm",
    "pet_forest_mm",
    "vulnerable_ha",
    "vulnerable_fraction",
    "scattered_ha",
    "medium_ha",
    "dense_ha",
    "forest_ha",
    "flows_to",
    "notes",
];

/// Reads and validates the catchment table. Returns the catchments and the
/// spreadsheet row of each; on failure every problem found in the file.
pub fn read_catchments(path: &Path, contaminants: &[Contaminant]) -> Result<(Vec<Catchment>, Vec<usize>), Vec<Problem>> {
    let table = read_table(path)?;
    let point_cols: Vec<String> = contaminants.iter().map(|c| format!("{}_point_kg_per_yr", c.name)).collect();
    let mut known: Vec<&str> = CATCHMENT_COLUMNS.to_vec();
    known.extend(point_cols.iter().map(String::as_str));
    let mut problems =
        table.check_columns(&["id", "area_ha", "rain_mm", "pet_mm", "scattered_ha", "medium_ha", "dense_ha"], &known, |_| false);
    let has_vha = table.col("vulnerable_ha").is_some();
    let has_vfrac = table.col("vulnerable_fraction").is_some();
    if !has_vha && !has_vfrac {
        problems.push(
            Problem::in_file(path, "give the area open to invasion as vulnerable_ha (ha) or vulnerable_fraction (0–1 of the area)")
                .row(1)
                .column("vulnerable_ha"),
        );
    } else if has_vha && has_vfrac {
        problems.push(Problem::in_file(path, "give vulnerable_ha or vulnerable_fraction, not both").row(1).column("vulnerable_fraction"));
    }
    if !problems.is_empty() {
        return Err(problems);
    }

    let mut out = Vec::with_capacity(table.rows.len());
    let mut rows = Vec::with_capacity(table.rows.len());
    let mut seen: HashMap<String, usize> = HashMap::new();
    for (line, rec) in &table.rows {
        let line = *line;
        let mut p = Vec::new();
        let id = table.text(rec, "id").to_string();
        if id.is_empty() {
            p.push(Problem::in_file(path, "id is empty; every catchment needs a unique id").row(line).column("id"));
        } else if id.contains(char::is_whitespace) || id.contains(',') {
            p.push(Problem::in_file(path, format!("id '{id}' must not contain spaces or commas")).row(line).column("id"));
        } else if let Some(first) = seen.insert(id.clone(), line) {
            p.push(Problem::in_file(path, format!("duplicate catchment id '{id}' (first used on row {first})")).row(line).column("id"));
        }
        let name = match table.text(rec, "name") {
            "" => id.clone(),
            n => n.to_string(),
        };
        let area = table.required_in(line, rec, "area_ha", 1e-6, 1e9, "ha", &mut p);
        let rain = table.required_in(line, rec, "rain_mm", 1.0, 20_000.0, "mm/yr", &mut p);
        let pet = table.required_in(line, rec, "pet_mm", 1.0, 5_000.0, "mm/yr", &mut p);
        let pet_forest = table.optional_in(line, rec, "pet_forest_mm", 1.0, 5_000.0, "mm/yr", &mut p);
        let forest = table.optional_in(line, rec, "forest_ha", 0.0, 1e9, "ha", &mut p).unwrap_or(0.0);
        let scattered = table.required_in(line, rec, "scattered_ha", 0.0, 1e9, "ha", &mut p);
        let medium = table.required_in(line, rec, "medium_ha", 0.0, 1e9, "ha", &mut p);
        let dense = table.required_in(line, rec, "dense_ha", 0.0, 1e9, "ha", &mut p);
        let vulnerable = if has_vha {
            table.required_in(line, rec, "vulnerable_ha", 0.0, 1e9, "ha", &mut p)
        } else {
            table.required_in(line, rec, "vulnerable_fraction", 0.0, 1.0, "fraction", &mut p).and_then(|f| area.map(|a| f * a))
        };
        let points: Vec<f64> = point_cols
            .iter()
            .map(|c| table.optional_in(line, rec, c, 0.0, 1e12, "kg/yr", &mut p).unwrap_or(0.0))
            .collect();
        let flows_to = match table.text(rec, "flows_to") {
            "" => None,
            s => Some(s.to_string()),
        };

        if let (Some(area), Some(v)) = (area, vulnerable) {
            let tol = 1e-9 * area.max(1.0);
            if forest > area + tol {
                p.push(Problem::in_file(path, format!("forest_ha {} exceeds area_ha {}", fmt_value(forest), fmt_value(area))).row(line).column("forest_ha"));
            }
            let open = area - forest;
            if v > open + tol {
                let col = if has_vha { "vulnerable_ha" } else { "vulnerable_fraction" };
                p.push(
                    Problem::in_file(
                        path,
                        format!("vulnerable area {} ha exceeds the open area (area_ha − forest_ha = {} ha)", fmt_value(v), fmt_value(open)),
                    )
                    .row(line)
                    .column(col),
                );
            }
            if let (Some(s), Some(m), Some(d)) = (scattered, medium, dense) {
                let inf = s + m + d;
                if inf > area + tol {
                    p.push(
                        Problem::in_file(
                            path,
                            format!("infested area scattered + medium + dense = {} ha exceeds the catchment area {} ha", fmt_value(inf), fmt_value(area)),
                        )
                        .row(line)
                        .column("dense_ha"),
                    );
                } else if inf > v + tol {
                    p.push(
                        Problem::in_file(
                            path,
                            format!(
                                "infested area scattered + medium + dense = {} ha exceeds the vulnerable area {} ha (vulnerable area includes what is infested now)",
                                fmt_value(inf),
                                fmt_value(v)
                            ),
                        )
                        .row(line)
                        .column(if has_vha { "vulnerable_ha" } else { "vulnerable_fraction" }),
                    );
                }
            }
        }

        if p.is_empty() {
            out.push(Catchment {
                id,
                name,
                area_ha: area.unwrap_or(0.0),
                rain_mm: rain.unwrap_or(0.0),
                pet_mm: pet.unwrap_or(0.0),
                pet_forest_mm: pet_forest,
                vulnerable_ha: vulnerable.unwrap_or(0.0),
                infested: ClassAreas {
                    scattered_ha: scattered.unwrap_or(0.0),
                    medium_ha: medium.unwrap_or(0.0),
                    dense_ha: dense.unwrap_or(0.0),
                },
                forest_ha: forest,
                flows_to,
                point_kg_per_yr: points,
                curves: None,
            });
            rows.push(line);
        } else {
            problems.extend(p);
        }
    }
    if problems.is_empty() {
        Ok((out, rows))
    } else {
        Err(problems)
    }
}
