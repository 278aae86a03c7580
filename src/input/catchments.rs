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
//! | `flows_to` | id | no | another catchment's id; no cycles |
//! | `<contaminant>_point_kg_per_yr` | kg/yr | no (0) | ≥ 0 |
//!
//! Every row is checked even when the header has problems (columns missing from
//! the header are reported once, not on every row), and the drainage network
//! (`flows_to`) is checked over every row with a usable id, so one pass reports
//! everything wrong with the file.

use crate::error::Problem;
use crate::input::table::{fmt_value, nearest, read_table, Table, MAX_SUGGESTIONS};
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

/// Columns every catchment table must have.
pub const REQUIRED_COLUMNS: [&str; 7] = ["id", "area_ha", "rain_mm", "pet_mm", "scattered_ha", "medium_ha", "dense_ha"];

/// Suffix of the per-contaminant point-load columns.
pub const POINT_SUFFIX: &str = "_point_kg_per_yr";

/// Largest area accepted in any area column, ha (10⁹ ha = 10 million km², about
/// the size of Canada; anything larger is a unit slip).
// Common practice, no published source: a plausibility bound, not a physical law.
const MAX_AREA_HA: f64 = 1e9;

/// Reads and validates the catchment table. Returns the catchments and the
/// spreadsheet row of each; on failure every problem found in the file.
// Over 100 lines on purpose: one pass over the rows checks every column of a row and collects every problem in file order; splitting it would pass the row state through many small functions.
pub fn read_catchments(path: &Path, contaminants: &[Contaminant]) -> Result<(Vec<Catchment>, Vec<usize>), Vec<Problem>> {
    let table = read_table(path)?;
    let point_cols: Vec<String> = contaminants.iter().map(|c| format!("{}{POINT_SUFFIX}", c.name)).collect();
    let mut known: Vec<&str> = CATCHMENT_COLUMNS.to_vec();
    known.extend(point_cols.iter().map(String::as_str));
    let mut problems = table.check_columns(&REQUIRED_COLUMNS, &known, |h| h.ends_with(POINT_SUFFIX) && h.len() > POINT_SUFFIX.len());
    for h in &table.headers {
        if let Some(name) = h.strip_suffix(POINT_SUFFIX).filter(|n| !n.is_empty()) {
            if !point_cols.contains(h) {
                let defined: Vec<&str> = contaminants.iter().map(|c| c.name.as_str()).collect();
                let hint = match nearest(name, &defined) {
                    Some(k) => format!(" (did you mean '{k}{POINT_SUFFIX}'?)"),
                    None if defined.is_empty() => " (the scenario defines no contaminants)".to_string(),
                    None => format!(" (the scenario defines: {})", defined.join(", ")),
                };
                problems.push(
                    Problem::in_file(
                        path,
                        format!("point-load column for contaminant '{name}', which has no [[contaminant]] entry in the scenario{hint}"),
                    )
                    .row(1)
                    .column(h.clone()),
                );
            }
        }
    }
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
    let vulnerable_col = match (has_vha, has_vfrac) {
        (true, false) => Some("vulnerable_ha"),
        (false, true) => Some("vulnerable_fraction"),
        _ => None,
    };

    let mut out = Vec::with_capacity(table.rows.len());
    let mut rows = Vec::with_capacity(table.rows.len());
    let mut seen: HashMap<String, usize> = HashMap::new();
    let mut links: Vec<Link> = Vec::new();
    let mut stems: HashMap<String, (String, usize)> = HashMap::new();
    for (line, rec) in &table.rows {
        let line = *line;
        let mut p = Vec::new();
        let id = table.text(rec, "id").to_string();
        let mut usable_id = false;
        if table.col("id").is_none() {
            // Reported once by the header check.
        } else if id.is_empty() {
            p.push(Problem::in_file(path, "id is empty; every catchment needs a unique id").row(line).column("id"));
        } else if id.contains(char::is_whitespace) || id.contains(',') {
            p.push(Problem::in_file(path, format!("id '{id}' must not contain spaces or commas")).row(line).column("id"));
        } else if id.eq_ignore_ascii_case(crate::schema::BASIN_ID) {
            p.push(
                Problem::in_file(path, format!("id '{id}' is reserved for the whole-basin rows of the outputs; choose another id"))
                    .row(line)
                    .column("id"),
            );
        } else if let Some(first) = seen.get(&id) {
            p.push(Problem::in_file(path, format!("duplicate catchment id '{id}' (first used on row {first})")).row(line).column("id"));
        } else {
            seen.insert(id.clone(), line);
            usable_id = true;
            // Outputs name files after ids; two ids must not map to one file name.
            let stem = crate::schema::file_stem(&id).to_lowercase();
            if let Some((other, other_row)) = stems.get(&stem) {
                p.push(
                    Problem::in_file(
                        path,
                        format!(
                            "id '{id}' and id '{other}' (row {other_row}) would share the output file name '{stem}' \
                             (ids are compared ignoring case, with characters other than letters, digits, '-' and '_' read as '_')"
                        ),
                    )
                    .row(line)
                    .column("id"),
                );
            } else {
                stems.insert(stem, (id.clone(), line));
            }
        }
        let name = match table.text(rec, "name") {
            "" => id.clone(),
            n => n.to_string(),
        };
        let area = table.col("area_ha").and_then(|_| table.required_positive(line, rec, "area_ha", MAX_AREA_HA, "ha", &mut p));
        let rain = required(&table, line, rec, "rain_mm", 1.0, 20_000.0, "mm/yr", &mut p);
        let pet = required(&table, line, rec, "pet_mm", 1.0, 5_000.0, "mm/yr", &mut p);
        let pet_forest = table.optional_in(line, rec, "pet_forest_mm", 1.0, 5_000.0, "mm/yr", &mut p);
        let forest = table.optional_in(line, rec, "forest_ha", 0.0, MAX_AREA_HA, "ha", &mut p).unwrap_or(0.0);
        let scattered = required(&table, line, rec, "scattered_ha", 0.0, MAX_AREA_HA, "ha", &mut p);
        let medium = required(&table, line, rec, "medium_ha", 0.0, MAX_AREA_HA, "ha", &mut p);
        let dense = required(&table, line, rec, "dense_ha", 0.0, MAX_AREA_HA, "ha", &mut p);
        let vfrac = (vulnerable_col == Some("vulnerable_fraction"))
            .then(|| table.required_in(line, rec, "vulnerable_fraction", 0.0, 1.0, "fraction", &mut p))
            .flatten();
        let vulnerable = match vulnerable_col {
            Some("vulnerable_ha") => table.required_in(line, rec, "vulnerable_ha", 0.0, MAX_AREA_HA, "ha", &mut p),
            Some(_) => vfrac.and_then(|f| area.map(|a| f * a)),
            None => None,
        };
        let points: Vec<f64> =
            point_cols.iter().map(|c| table.optional_in(line, rec, c, 0.0, 1e12, "kg/yr", &mut p).unwrap_or(0.0)).collect();
        let flows_to = match table.text(rec, "flows_to") {
            "" => None,
            s => Some(s.to_string()),
        };
        if usable_id {
            links.push(Link { id: id.clone(), flows_to: flows_to.clone(), row: line });
        }

        if let Some(area) = area {
            let tol = 1e-9 * area.max(1.0);
            if forest > area + tol {
                p.push(
                    Problem::in_file(
                        path,
                        format!("forest_ha {} exceeds area_ha {}; allowed 0 to {} ha", fmt_value(forest), fmt_value(area), fmt_value(area)),
                    )
                    .row(line)
                    .column("forest_ha"),
                );
            }
            let open = (area - forest).max(0.0);
            if let (Some(v), Some(col)) = (vulnerable, vulnerable_col) {
                if v > open + tol && forest <= area + tol {
                    let allowed = match vfrac {
                        Some(f) => format!(
                            "vulnerable_fraction {} of area_ha {} is {} ha, more than the open area (area_ha − forest_ha = {} ha); allowed 0 to {}",
                            fmt_value(f),
                            fmt_value(area),
                            fmt_value(v),
                            fmt_value(open),
                            fmt_value(open / area)
                        ),
                        None => format!(
                            "vulnerable area {} ha exceeds the open area (area_ha − forest_ha = {} ha); allowed 0 to {} ha",
                            fmt_value(v),
                            fmt_value(open),
                            fmt_value(open)
                        ),
                    };
                    p.push(Problem::in_file(path, allowed).row(line).column(col));
                }
            }
            if let (Some(s), Some(m), Some(d)) = (scattered, medium, dense) {
                let inf = s + m + d;
                if inf > area + tol {
                    p.push(
                        Problem::in_file(
                            path,
                            format!(
                                "infested area scattered_ha + medium_ha + dense_ha = {} ha exceeds the catchment area {} ha; \
                                 the three classes together are allowed 0 to {} ha (are they in m² or percent?)",
                                fmt_value(inf),
                                fmt_value(area),
                                fmt_value(area)
                            ),
                        )
                        .row(line)
                        .column("dense_ha"),
                    );
                } else if let (Some(v), Some(col)) = (vulnerable, vulnerable_col) {
                    if inf > v + tol {
                        p.push(
                            Problem::in_file(
                                path,
                                format!(
                                    "infested area scattered_ha + medium_ha + dense_ha = {} ha exceeds the vulnerable area {} ha \
                                     (the vulnerable area includes what is infested now, so it must be at least {} ha)",
                                    fmt_value(inf),
                                    fmt_value(v),
                                    fmt_value(inf)
                                ),
                            )
                            .row(line)
                            .column(col),
                        );
                    }
                }
            }
        }

        if p.is_empty() && problems.is_empty() {
            out.push(Catchment {
                id,
                name,
                area_ha: area.unwrap_or(0.0),
                rain_mm: rain.unwrap_or(0.0),
                pet_mm: pet.unwrap_or(0.0),
                pet_forest_mm: pet_forest,
                vulnerable_ha: vulnerable.unwrap_or(0.0),
                stand_ages_ha: None,
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
    // In table order, so that suggestions do not depend on hashing.
    let all_ids: Vec<&str> = links.iter().map(|l| l.id.as_str()).collect();
    problems.extend(check_network(path, &links, &all_ids));
    problems.sort_by_key(|p| p.row.unwrap_or(0));
    if problems.is_empty() {
        Ok((out, rows))
    } else {
        Err(problems)
    }
}

/// A required numeric cell, checked only when its column is in the header (a
/// missing column is reported once by the header check, not on every row).
#[allow(clippy::too_many_arguments)]
fn required(
    table: &Table,
    line: usize,
    rec: &csv::StringRecord,
    col: &str,
    lo: f64,
    hi: f64,
    unit: &str,
    p: &mut Vec<Problem>,
) -> Option<f64> {
    table.col(col)?;
    table.required_in(line, rec, col, lo, hi, unit, p)
}

/// One catchment's place in the drainage network, as read from its row.
#[derive(Debug, Clone)]
struct Link {
    id: String,
    flows_to: Option<String>,
    row: usize,
}

/// Checks `flows_to` over every row with a usable id: each must name a catchment
/// of the table (`all_ids`, which includes rows with other problems), not the
/// catchment itself, and following `flows_to` must reach an outlet (no cycles).
/// Each cycle is reported once, at the row of its first member in the file.
fn check_network(path: &Path, links: &[Link], all_ids: &[&str]) -> Vec<Problem> {
    let mut problems = Vec::new();
    let index: HashMap<&str, usize> = links.iter().enumerate().map(|(i, l)| (l.id.as_str(), i)).collect();
    let known: std::collections::HashSet<&str> = all_ids.iter().copied().collect();
    let mut hints: HashMap<&str, String> = HashMap::new();
    let mut downstream: Vec<Option<usize>> = vec![None; links.len()];
    for (i, l) in links.iter().enumerate() {
        let Some(to) = l.flows_to.as_deref() else { continue };
        if to == l.id {
            problems.push(
                Problem::in_file(
                    path,
                    format!("catchment '{to}' flows into itself; flows_to names the catchment downstream (leave it empty at an outlet)"),
                )
                .row(l.row)
                .column("flows_to"),
            );
        } else if let Some(&j) = index.get(to) {
            downstream[i] = Some(j);
        } else if !known.contains(to) {
            let searched = hints.len();
            let hint = hints.entry(to).or_insert_with(|| match (searched < MAX_SUGGESTIONS).then(|| nearest(to, all_ids)).flatten() {
                Some(k) => format!(" (did you mean '{k}'?)"),
                None => String::new(),
            });
            problems.push(
                Problem::in_file(path, format!("'{to}' is not the id of any catchment in the table{hint}")).row(l.row).column("flows_to"),
            );
        }
    }
    // Each catchment has at most one downstream neighbour, so following the links
    // from any start either reaches an outlet or enters exactly one cycle.
    let mut state = vec![0u8; links.len()]; // 0 unvisited, 1 on the current walk, 2 done
    for start in 0..links.len() {
        let mut walk = Vec::new();
        let mut i = start;
        while state[i] == 0 {
            state[i] = 1;
            walk.push(i);
            match downstream[i] {
                Some(j) => i = j,
                None => break,
            }
        }
        if state[i] == 1 && downstream[i].is_some() {
            if let Some(pos) = walk.iter().position(|&k| k == i) {
                let cycle = &walk[pos..];
                let first = cycle.iter().enumerate().min_by_key(|(_, &k)| links[k].row).map(|(n, _)| n).unwrap_or(0);
                let ordered: Vec<usize> = cycle[first..].iter().chain(&cycle[..first]).copied().collect();
                let mut text: Vec<String> = ordered.iter().map(|&k| format!("{} (row {})", links[k].id, links[k].row)).collect();
                text.push(links[ordered[0]].id.clone());
                problems.push(
                    Problem::in_file(
                        path,
                        format!("catchments form a cycle: {}; following flows_to must lead downstream to an outlet", text.join(" → ")),
                    )
                    .row(links[ordered[0]].row)
                    .column("flows_to"),
                );
            }
        }
        for k in walk {
            state[k] = 2;
        }
    }
    problems
}

#[cfg(test)]
mod tests {
    use super::*;

    fn link(id: &str, to: Option<&str>, row: usize) -> Link {
        Link { id: id.into(), flows_to: to.map(Into::into), row }
    }

    #[test]
    fn network_problems_name_every_cycle_and_unknown_id() {
        let links = vec![
            link("a", Some("b"), 2),
            link("b", Some("c"), 3),
            link("c", Some("a"), 4),
            link("d", Some("a"), 5),
            link("e", Some("f"), 6),
            link("f", Some("e"), 7),
            link("g", Some("g"), 8),
            link("h", Some("zz"), 9),
            link("i", None, 10),
        ];
        let ids: Vec<&str> = links.iter().map(|l| l.id.as_str()).collect();
        let p = check_network(Path::new("c.csv"), &links, &ids);
        let msgs: Vec<String> = p.iter().map(|p| p.to_string()).collect();
        assert_eq!(p.len(), 4, "{msgs:#?}");
        assert!(msgs.iter().any(|m| m.contains("row 2") && m.contains("a (row 2) → b (row 3) → c (row 4) → a")), "{msgs:#?}");
        assert!(msgs.iter().any(|m| m.contains("e (row 6) → f (row 7) → e")), "{msgs:#?}");
        assert!(msgs.iter().any(|m| m.contains("row 8") && m.contains("flows into itself")), "{msgs:#?}");
        assert!(msgs.iter().any(|m| m.contains("row 9") && m.contains("'zz' is not the id")), "{msgs:#?}");
    }

    #[test]
    fn a_tree_has_no_network_problems() {
        let links = vec![link("a", Some("c"), 2), link("b", Some("c"), 3), link("c", Some("d"), 4), link("d", None, 5)];
        let ids: Vec<&str> = links.iter().map(|l| l.id.as_str()).collect();
        assert!(check_network(Path::new("c.csv"), &links, &ids).is_empty());
    }
}
