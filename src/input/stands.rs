//! The stand table (CSV, optional): a catchment's starting infestation as dated
//! cohorts, for a planting or an invasion whose establishment years are known.
//!
//! Columns: `catchment`, `established_year` (whole year, at most the scenario's
//! `start_year`), `area_ha` (≥ 0). Several rows may give the same catchment and year
//! (their areas add up). A catchment listed here takes its starting cohorts from
//! these rows: a cohort established in year `y` has age `start_year − y` at the
//! start ([`crate::model::cover::Cohorts::from_ages`]). Its `scattered_ha`,
//! `medium_ha` and `dense_ha` in the catchment table must then be 0 (the infested
//! area is given once), and the dated area must fit within its `vulnerable_ha`.

use crate::error::Problem;
use crate::input::table::{fmt_value, read_table, suggestion, MAX_SUGGESTIONS};
use crate::model::catchment::Catchment;
use crate::model::cover::InvasionParams;
use std::collections::{BTreeMap, HashMap, HashSet};
use std::path::Path;

/// Columns of the stand table.
pub const STAND_COLUMNS: [&str; 3] = ["catchment", "established_year", "area_ha"];

/// Oldest stand accepted, years before the start.
pub const MAX_STAND_AGE_YR: f64 = 300.0;

/// Areas by age (index = age in years at the start) per catchment id.
pub type StandAges = HashMap<String, Vec<f64>>;

/// Reads and validates the stand table; `start_year` dates the cohorts.
pub fn read_stands(path: &Path, catchments: &[Catchment], start_year: i32) -> Result<StandAges, Vec<Problem>> {
    let table = read_table(path)?;
    let mut problems = table.check_columns(&STAND_COLUMNS, &STAND_COLUMNS, |_| false);
    if !problems.is_empty() {
        return Err(problems);
    }
    let ids: Vec<&str> = catchments.iter().map(|c| c.id.as_str()).collect();
    let known: HashSet<&str> = ids.iter().copied().collect();
    let mut unknown: BTreeMap<usize, String> = BTreeMap::new();
    let mut seen_unknown: HashSet<String> = HashSet::new();
    // Catchment → (age → area), and the first row of each catchment.
    let mut areas: HashMap<String, BTreeMap<usize, f64>> = HashMap::new();
    let mut first_row: HashMap<String, usize> = HashMap::new();
    let oldest_year = start_year as f64 - MAX_STAND_AGE_YR;
    for (line, rec) in &table.rows {
        let line = *line;
        let mut p = Vec::new();
        let id = table.text(rec, "catchment").to_string();
        if id.is_empty() {
            p.push(Problem::in_file(path, "catchment is empty; give the id of a catchment of the scenario").row(line).column("catchment"));
        } else if !known.contains(id.as_str()) && seen_unknown.insert(id.clone()) {
            unknown.insert(line, id.clone());
        }
        let year = table.required_in(line, rec, "established_year", oldest_year, start_year as f64, "", &mut p);
        if let Some(y) = year {
            if y.fract() != 0.0 {
                p.push(
                    Problem::in_file(path, format!("established_year {} must be a whole number", fmt_value(y)))
                        .row(line)
                        .column("established_year"),
                );
            }
        }
        let area = table.required_in(line, rec, "area_ha", 0.0, 1e9, "ha", &mut p);
        if let (true, Some(y), Some(a)) = (p.is_empty() && known.contains(id.as_str()), year, area) {
            let age = (start_year as f64 - y) as usize;
            *areas.entry(id.clone()).or_default().entry(age).or_insert(0.0) += a;
            first_row.entry(id).or_insert(line);
        }
        problems.extend(p);
    }
    for (k, (row, id)) in unknown.into_iter().enumerate() {
        let hint = if k < MAX_SUGGESTIONS { suggestion(&id, &ids) } else { String::new() };
        problems.push(Problem::in_file(path, format!("'{id}' is not a catchment of the scenario{hint}")).row(row).column("catchment"));
    }
    for c in catchments {
        let (Some(by_age), Some(&row)) = (areas.get(&c.id), first_row.get(&c.id)) else { continue };
        let total: f64 = by_age.values().sum();
        if c.infested.total_ha() > 0.0 {
            problems.push(
                Problem::in_file(
                    path,
                    format!(
                        "catchment '{}' also has scattered_ha + medium_ha + dense_ha = {} ha in the catchment table; \
                         give its infestation once: set those to 0, or leave it out of the stand table",
                        c.id,
                        fmt_value(c.infested.total_ha())
                    ),
                )
                .row(row)
                .column("catchment"),
            );
        }
        if total > c.vulnerable_ha * (1.0 + 1e-9) {
            problems.push(
                Problem::in_file(
                    path,
                    format!(
                        "the stands of '{}' add up to {} ha, more than its vulnerable area {} ha (the vulnerable area includes what is infested now)",
                        c.id,
                        fmt_value(total),
                        fmt_value(c.vulnerable_ha)
                    ),
                )
                .row(row)
                .column("area_ha"),
            );
        }
    }
    problems.sort_by_key(|p| p.row.unwrap_or(0));
    if !problems.is_empty() {
        return Err(problems);
    }
    Ok(areas
        .into_iter()
        .map(|(id, by_age)| {
            let oldest = by_age.keys().next_back().copied().unwrap_or(0);
            let mut v = vec![0.0; oldest + 1];
            for (age, a) in by_age {
                v[age] += a;
            }
            (id, v)
        })
        .collect())
}

/// Gives each listed catchment its dated cohorts, and its class areas from them
/// (so reports show the starting cover by density class).
pub fn apply_stands(catchments: &mut [Catchment], stands: StandAges, invasion: &InvasionParams) {
    let mut stands = stands;
    for c in catchments.iter_mut() {
        if let Some(by_age) = stands.remove(&c.id) {
            c.stand_ages_ha = Some(by_age);
            c.infested = c.starting_cohorts(invasion).class_areas(invasion);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::cover::ClassAreas;

    use crate::model::catchment::test_catchment as catchment;

    fn write(text: &str) -> (tempfile::TempDir, std::path::PathBuf) {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("stands.csv");
        std::fs::write(&p, text).unwrap();
        (dir, p)
    }

    #[test]
    fn dated_rows_become_ages_at_the_start() {
        let (_d, p) = write("catchment,established_year,area_ha\nplanted,1982,400\nplanted,1982,270\nplanted,1990,30\n");
        let cs = vec![catchment("planted", 1000.0, ClassAreas::default())];
        let s = read_stands(&p, &cs, 1995).unwrap();
        let v = &s["planted"];
        assert_eq!(v.len(), 14);
        assert_eq!(v[13], 670.0);
        assert_eq!(v[5], 30.0);
        assert_eq!(v.iter().sum::<f64>(), 700.0);
    }

    #[test]
    fn bad_rows_are_located() {
        let (_d, p) = write("catchment,established_year,area_ha\nplanted,2030,10\nplantd,1990,5\nplanted,1990.5,5\nplanted,1980,-2\n");
        let cs = vec![catchment("planted", 1000.0, ClassAreas::default())];
        let e = read_stands(&p, &cs, 2000).unwrap_err();
        let text: Vec<String> = e.iter().map(|p| p.to_string()).collect();
        assert_eq!(e.len(), 4, "{text:?}");
        assert!(e[0].row == Some(2) && e[0].column.as_deref() == Some("established_year"), "{text:?}");
        assert!(text[1].contains("'plantd' is not a catchment") && text[1].contains("planted"), "{text:?}");
        assert!(e[2].row == Some(4) && text[2].contains("whole number"), "{text:?}");
        assert!(e[3].row == Some(5) && e[3].column.as_deref() == Some("area_ha"), "{text:?}");
    }

    #[test]
    fn infestation_is_given_once_and_fits_the_vulnerable_area() {
        let (_d, p) = write("catchment,established_year,area_ha\na,1990,50\nb,1990,500\n");
        let cs = vec![
            catchment("a", 1000.0, ClassAreas { scattered_ha: 5.0, ..Default::default() }),
            catchment("b", 400.0, ClassAreas::default()),
        ];
        let e = read_stands(&p, &cs, 2000).unwrap_err();
        assert_eq!(e.len(), 2);
        assert!(e[0].to_string().contains("give its infestation once"), "{}", e[0]);
        assert!(e[1].to_string().contains("more than its vulnerable area 400 ha"), "{}", e[1]);
    }
}
