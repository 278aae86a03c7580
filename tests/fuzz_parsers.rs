//! Fuzz-style tests of the input parsers on stable Rust: proptest feeds random,
//! token-built and mutated CSV and TOML to the readers. Every input must give
//! `Ok` or an invalid-input error that names its file — never a panic — and
//! whatever is accepted must be something the model can run.

use proptest::prelude::*;
use proptest::sample::Index;
use std::path::{Path, PathBuf};
use yieldshift::input::scenario::load_scenario;
use yieldshift::input::table::{nearest, parse_number, parse_table, suggestion};
use yieldshift::input::toml_reader::read_toml_file;
use yieldshift::model::project_catchment;

const CATCHMENTS: &str =
    "id,name,area_ha,rain_mm,pet_mm,vulnerable_ha,scattered_ha,medium_ha,dense_ha,forest_ha,flows_to,nitrate_n_point_kg_per_yr,notes\n\
upper,Upper Fork,1200,1400,820,900,40,10,5,100,lower,0,\n\
middle,\"Middle Reach, east\",800,1100,850,600,20,5,0,0,lower,12.5,\"two\nlines\"\n\
lower,Lower Flats,1500,950,880,1100,60,30,20,50,,0,\n";

const CLIMATE: &str = "catchment,year,rain_mm,pet_mm,pet_status\n\
upper,2029,1350,810,complete\nupper,2030,1460,830,complete\nupper,2031,1390,815,\n\
lower,2030,900,870,\nlower,2031,1010,890,\n";

const SCENARIO: &str = r#"title = "Fuzz base"
start_year = 2030
horizon_years = 4
catchments = "catchments.csv"

[climate]
table = "climate.csv"
beyond_record = "cycle"

[hydrology]
method = "fu"
omega_forest = 2.9
omega_grass = 2.1
forest_pet_factor = 1.1

[invasion]
spread_rate_per_yr = 0.07
seed_bearing_age_yr = 6
seed_rain_ha_per_yr = 1.5
medium_age_yr = 9
dense_age_yr = 18
initial_dense_span_yr = 8

[canopy_closure]
curve = "table"
ages_yr = [0, 5, 15, 30]
fractions = [0, 0.2, 0.7, 1]

[dilution]
min_runoff_mm = 2

[[contaminant]]
name = "nitrate_n"
open_export_kg_per_ha_yr = 2.5
forest_export_kg_per_ha_yr = 2.0
guideline_mg_per_l = 1.5
"#;

/// Pieces people and spreadsheets put in CSV files, good and bad.
const CSV_TOKENS: &[&str] = &[
    ",",
    ";",
    "\t",
    "\n",
    "\r\n",
    "\r",
    "\"",
    "\"\"",
    " ",
    "\u{feff}",
    "id",
    "area_ha",
    "rain_mm",
    "pet_mm",
    "flows_to",
    "vulnerable_fraction",
    "scattered_ha",
    "1",
    "0",
    "-5",
    "12,5",
    "1,250",
    "1.234,5",
    "1e400",
    "NaN",
    "inf",
    "-inf",
    "45%",
    "1200 mm",
    "\u{2212}3",
    "#DIV/0!",
    "n/a",
    "é",
    "\u{a0}",
    "upper",
    "lower",
    "middle",
    "\0",
    "\u{1F332}",
    "999999999999",
    "0.000001",
    "1e-320",
    "+",
    ".",
    "-",
];

/// Values of every TOML type, including ones no key accepts.
const TOML_VALUES: &[&str] = &[
    "0",
    "1",
    "-1",
    "0.5",
    "2",
    "20",
    "300",
    "301",
    "2030",
    "1e308",
    "-1e308",
    "nan",
    "inf",
    "-inf",
    "\"\"",
    "\"zhang\"",
    "\"fu\"",
    "\"table\"",
    "\"logistic\"",
    "\"cycle\"",
    "\"error\"",
    "\"mean\"",
    "\"0.06\"",
    "\"catchments.csv\"",
    "\"climate.csv\"",
    "\"/dev/null\"",
    "\".\"",
    "true",
    "[]",
    "[1, 2, 3]",
    "[3, 2, 1]",
    "[0, 0.5, 1]",
    "[\"a\"]",
    "{}",
    "{ dist = \"uniform\", min = 0, max = 1 }",
    "1979-05-27",
    "9223372036854775807",
    "-9223372036854775808",
];

const TOML_KEYS: &[&str] = &[
    "title",
    "start_year",
    "horizon_years",
    "catchments",
    "table",
    "beyond_record",
    "method",
    "w_forest",
    "w_grass",
    "omega_forest",
    "omega_grass",
    "forest_pet_factor",
    "spread_rate_per_yr",
    "seed_bearing_age_yr",
    "seed_rain_ha_per_yr",
    "medium_age_yr",
    "dense_age_yr",
    "initial_dense_span_yr",
    "curve",
    "half_closure_age_yr",
    "steepness_per_yr",
    "max_fraction",
    "ages_yr",
    "fractions",
    "min_runoff_mm",
    "name",
    "open_export_kg_per_ha_yr",
    "forest_export_kg_per_ha_yr",
    "guideline_mg_per_l",
    "catchment",
    "donor",
    "unknown_key",
    "\"quoted key\"",
    "a.b",
];

const TOML_HEADERS: &[&str] = &[
    "",
    "[climate]",
    "[hydrology]",
    "[invasion]",
    "[canopy_closure]",
    "[dilution]",
    "[[contaminant]]",
    "[[calibration]]",
    "[invasoin]",
    "[hydrology.extra]",
];

fn write_case(dir: &Path, scenario: &[u8], catchments: &[u8], climate: &[u8]) -> PathBuf {
    std::fs::write(dir.join("catchments.csv"), catchments).unwrap();
    std::fs::write(dir.join("climate.csv"), climate).unwrap();
    let s = dir.join("scenario.toml");
    std::fs::write(&s, scenario).unwrap();
    s
}

/// Applies byte-level edits: mostly token insertions and small deletions (which
/// often leave a loadable file), sometimes an overwritten byte, a duplicated or
/// dropped line, or a truncation.
fn mutate(base: &[u8], edits: &[(u8, Index, Index, usize)], tokens: &[&str]) -> Vec<u8> {
    let mut b = base.to_vec();
    for &(kind, at, len, tok) in edits {
        let n = b.len();
        let i = at.index(n + 1);
        match kind % 10 {
            0..=3 => {
                let t = tokens[tok % tokens.len()].as_bytes();
                b.splice(i..i, t.iter().copied());
            }
            4 | 5 => {
                let end = (i + len.index(6) + 1).min(n);
                if i < end {
                    b.drain(i..end);
                }
            }
            6 => {
                if i < n {
                    // Mostly printable ASCII; now and then any byte at all.
                    b[i] = if tok % 4 == 0 { (tok / 4 % 256) as u8 } else { b' ' + (tok / 4 % 95) as u8 };
                }
            }
            7 | 8 => {
                let lines: Vec<&[u8]> = b.split(|&c| c == b'\n').collect();
                let k = at.index(lines.len());
                let mut out: Vec<Vec<u8>> = lines.iter().map(|l| l.to_vec()).collect();
                if kind % 10 == 7 {
                    out.insert(k, lines[k].to_vec());
                } else {
                    out.remove(k);
                }
                b = out.join(&b'\n');
            }
            _ => b.truncate(i),
        }
    }
    b
}

fn edits() -> impl Strategy<Value = Vec<(u8, Index, Index, usize)>> {
    proptest::collection::vec((any::<u8>(), any::<Index>(), any::<Index>(), any::<usize>()), 1..4)
}

/// What `load_scenario` returned must be a located error or a scenario the model can run.
fn check_outcome(path: &Path) -> Result<(), TestCaseError> {
    match load_scenario(path) {
        Err(e) => {
            prop_assert!(e.is_invalid_input(), "not an input error: {e}");
            for p in e.problems() {
                prop_assert!(p.file.is_some(), "problem without a file: {p}");
                prop_assert!(!p.message.is_empty());
            }
            prop_assert!(!e.problems().is_empty());
        }
        Ok(s) => {
            let mut ids = std::collections::HashSet::new();
            for (i, c) in s.catchments.iter().enumerate() {
                prop_assert!(ids.insert(c.id.clone()), "duplicate id accepted: {}", c.id);
                prop_assert!(!c.id.is_empty() && !c.id.contains(char::is_whitespace));
                prop_assert!(c.area_ha > 0.0 && c.area_ha.is_finite());
                prop_assert!((1.0..=20_000.0).contains(&c.rain_mm) && (1.0..=5_000.0).contains(&c.pet_mm));
                let tol = 1e-9 * c.area_ha.max(1.0);
                prop_assert!(c.forest_ha >= 0.0 && c.forest_ha <= c.area_ha + tol);
                prop_assert!(c.vulnerable_ha >= 0.0 && c.vulnerable_ha <= c.area_ha - c.forest_ha + tol);
                prop_assert!(c.infested.total_ha() <= c.vulnerable_ha + tol);
                let years = project_catchment(c, &s.climate_series(i), &s.params, s.start_year);
                prop_assert_eq!(years.len(), s.horizon_years + 1);
                for y in &years {
                    prop_assert!(y.et_mm.is_finite() && y.yield_mm.is_finite() && y.yield_mm >= 0.0, "{y:?}");
                    for c in &y.concentrations {
                        prop_assert!(c.map_or(true, |v| v.is_finite() && v >= 0.0), "{y:?}");
                    }
                }
            }
            for c in &s.catchments {
                if let Some(to) = &c.flows_to {
                    prop_assert!(ids.contains(to), "flows_to '{to}' accepted but unknown");
                }
            }
        }
    }
    Ok(())
}

#[test]
fn the_unmutated_base_loads() {
    let tmp = tempfile::tempdir().unwrap();
    let s = write_case(tmp.path(), SCENARIO.as_bytes(), CATCHMENTS.as_bytes(), CLIMATE.as_bytes());
    let sc = load_scenario(&s).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(sc.catchments.len(), 3);
    assert_eq!(sc.catchments[1].name, "Middle Reach, east");
    check_outcome(&s).unwrap();
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(192))]

    #[test]
    fn random_bytes_as_a_table(bytes in proptest::collection::vec(any::<u8>(), 0..600)) {
        if let Ok(t) = parse_table(Path::new("r.csv"), &bytes) {
            let rows: Vec<usize> = t.rows.iter().map(|(r, _)| *r).collect();
            prop_assert!(rows.iter().all(|&r| r >= 2), "{rows:?}");
            prop_assert!(rows.windows(2).all(|w| w[0] < w[1]), "rows not increasing: {rows:?}");
        }
    }

    #[test]
    fn token_soup_as_a_table(tokens in proptest::collection::vec(0..CSV_TOKENS.len(), 0..80)) {
        let text: String = tokens.iter().map(|&i| CSV_TOKENS[i]).collect();
        match parse_table(Path::new("t.csv"), text.as_bytes()) {
            Err(problems) => {
                prop_assert!(!problems.is_empty());
                prop_assert!(problems.iter().all(|p| p.file.is_some()));
            }
            Ok(t) => {
                let rows: Vec<usize> = t.rows.iter().map(|(r, _)| *r).collect();
                prop_assert!(rows.windows(2).all(|w| w[0] < w[1]), "rows not increasing: {rows:?}");
                // A spreadsheet cannot show a record below the file's last line.
                let lines = text.split(['\n', '\r']).count().max(1);
                prop_assert!(rows.iter().all(|&r| r <= lines + 1), "{rows:?} in {lines} lines");
                let headers: Vec<String> = t.headers.clone();
                let known: Vec<&str> = headers.iter().map(String::as_str).collect();
                let _ = t.check_columns(&["id", "area_ha"], &known, |_| false);
                for (line, rec) in &t.rows {
                    for h in &headers {
                        if let Ok(Some(v)) = t.number(*line, rec, h) {
                            prop_assert!(v.is_finite());
                        }
                        let mut p = Vec::new();
                        if let Some(v) = t.required_in(*line, rec, h, 0.0, 1.0, "fraction", &mut p) {
                            prop_assert!((0.0..=1.0).contains(&v));
                        }
                        let _ = t.required_positive(*line, rec, h, 1e9, "ha", &mut p);
                    }
                }
            }
        }
    }

    #[test]
    fn mutated_catchment_tables(e in edits()) {
        let tmp = tempfile::tempdir().unwrap();
        let table = mutate(CATCHMENTS.as_bytes(), &e, CSV_TOKENS);
        let s = write_case(tmp.path(), SCENARIO.as_bytes(), &table, CLIMATE.as_bytes());
        check_outcome(&s)?;
    }

    #[test]
    fn mutated_climate_tables(e in edits()) {
        let tmp = tempfile::tempdir().unwrap();
        let table = mutate(CLIMATE.as_bytes(), &e, CSV_TOKENS);
        let s = write_case(tmp.path(), SCENARIO.as_bytes(), CATCHMENTS.as_bytes(), &table);
        check_outcome(&s)?;
    }

    #[test]
    fn mutated_scenario_files(e in edits()) {
        let tmp = tempfile::tempdir().unwrap();
        let toml_tokens: Vec<&str> = TOML_VALUES.iter().chain(TOML_KEYS).chain(TOML_HEADERS).chain(["=", "\n", "#", "\"", "[", "]"].iter()).copied().collect();
        let scenario = mutate(SCENARIO.as_bytes(), &e, &toml_tokens);
        let s = write_case(tmp.path(), &scenario, CATCHMENTS.as_bytes(), CLIMATE.as_bytes());
        check_outcome(&s)?;
    }

    #[test]
    fn scenarios_built_from_keys_and_values(
        lines in proptest::collection::vec((0..TOML_HEADERS.len(), 0..TOML_KEYS.len(), 0..TOML_VALUES.len(), any::<bool>()), 0..24)
    ) {
        // Start from the required keys so generation reaches the section readers.
        let mut text = String::from("start_year = 2030\nhorizon_years = 3\ncatchments = \"catchments.csv\"\n");
        for (h, k, v, new_section) in lines {
            if new_section && !TOML_HEADERS[h].is_empty() {
                text.push_str(TOML_HEADERS[h]);
                text.push('\n');
            }
            text.push_str(&format!("{} = {}\n", TOML_KEYS[k], TOML_VALUES[v]));
        }
        let tmp = tempfile::tempdir().unwrap();
        let s = write_case(tmp.path(), text.as_bytes(), CATCHMENTS.as_bytes(), CLIMATE.as_bytes());
        check_outcome(&s)?;
    }

    #[test]
    fn random_bytes_as_a_scenario(bytes in proptest::collection::vec(any::<u8>(), 0..400)) {
        let tmp = tempfile::tempdir().unwrap();
        let s = write_case(tmp.path(), &bytes, CATCHMENTS.as_bytes(), CLIMATE.as_bytes());
        check_outcome(&s)?;
        match read_toml_file(&s) {
            Ok(t) => prop_assert!(std::str::from_utf8(&bytes).is_ok() && t.len() == bytes.len()),
            Err(p) => prop_assert!(p.file.is_some() && std::str::from_utf8(&bytes).is_err()),
        }
    }

    #[test]
    fn numbers_written_by_people(s in "\\PC{0,12}", comma in any::<bool>()) {
        if let Ok(v) = parse_number(&s, comma) {
            prop_assert!(v.is_finite(), "{s:?} → {v}");
        }
    }

    #[test]
    fn number_like_text(s in "[-+−]?[0-9 ,.'%e]{0,10}(mm|ha|%)?", comma in any::<bool>()) {
        match parse_number(&s, comma) {
            Ok(v) => prop_assert!(v.is_finite()),
            Err(m) => prop_assert!(m.contains('\'') && !m.is_empty()),
        }
    }

    #[test]
    fn suggestions_for_any_text(given in "\\PC{0,30}", known in proptest::collection::vec("\\PC{0,12}", 0..30)) {
        let known: Vec<&str> = known.iter().map(String::as_str).collect();
        if let Some(k) = nearest(&given, &known) {
            prop_assert!(known.contains(&k));
        }
        let _ = suggestion(&given, &known);
    }
}

/// One generated catchment row.
#[derive(Debug, Clone)]
struct Row {
    id: String,
    area_ha: f64,
    rain_mm: f64,
    pet_mm: f64,
    forest_ha: f64,
    vulnerable_ha: f64,
    classes_ha: [f64; 3],
    /// Index of the row it drains into (`usize::MAX`: an id not in the table).
    flows_to: Option<usize>,
}

/// A plausible row: every value in range, infestation within the vulnerable
/// area, which is within the open land.
fn row() -> impl Strategy<Value = Row> {
    (
        1.0f64..5000.0,
        300.0f64..4000.0,
        300.0f64..1500.0,
        0.0f64..0.5,
        0.0f64..1.0,
        proptest::array::uniform3(0.0f64..0.33),
        proptest::option::of(0usize..6),
    )
        .prop_map(|(area, rain, pet, forest_frac, vuln_frac, class_fracs, to)| {
            let forest_ha = area * forest_frac;
            let vulnerable_ha = (area - forest_ha) * vuln_frac;
            Row {
                id: String::new(),
                area_ha: area,
                rain_mm: rain,
                pet_mm: pet,
                forest_ha,
                vulnerable_ha,
                classes_ha: class_fracs.map(|f| f * vulnerable_ha),
                flows_to: to,
            }
        })
}

/// Breaks one rule (kinds 0–11) or moves a value onto the edge of what is
/// allowed (kinds 12–16, still valid).
fn corrupt(rows: &mut [Row], at: usize, kind: u8) {
    let n = rows.len();
    let other = (at + 1) % n;
    let other_id = rows[other].id.clone();
    let r = &mut rows[at];
    let open = r.area_ha - r.forest_ha;
    match kind {
        0 => r.area_ha = -r.area_ha,
        1 => r.area_ha = 0.0,
        2 => r.rain_mm = 25_000.0,
        3 => r.rain_mm = -r.rain_mm,
        4 => r.pet_mm = 0.0,
        5 => r.forest_ha = r.area_ha * 1.1,
        6 => r.vulnerable_ha = open * 1.05 + 1.0,
        7 => r.classes_ha[1] = -1.0,
        8 => r.classes_ha[2] = r.vulnerable_ha + 1.0,
        9 => r.id = other_id,
        10 => r.flows_to = Some(usize::MAX),
        11 => r.flows_to = Some(at),
        12 => r.vulnerable_ha = open,
        13 => r.classes_ha[2] = (r.vulnerable_ha - r.classes_ha[0] - r.classes_ha[1]).max(0.0),
        14 => r.rain_mm = if at % 2 == 0 { 1.0 } else { 20_000.0 },
        15 => r.forest_ha = r.area_ha,
        _ => r.pet_mm = 5_000.0,
    }
    if kind == 15 {
        r.vulnerable_ha = 0.0;
        r.classes_ha = [0.0; 3];
    }
}

/// The rules of `docs/inputs.md`, written out independently of the reader.
// Source: docs/inputs.md, catchment table (allowed ranges); 1e9 ha is the reader's plausibility cap.
fn rows_are_valid(rows: &[Row]) -> bool {
    let mut ids = std::collections::HashSet::new();
    let rows_ok = rows.iter().enumerate().all(|(i, r)| {
        let tol = 1e-9 * r.area_ha.max(1.0);
        let sum = r.classes_ha.iter().sum::<f64>();
        let to_ok = match r.flows_to {
            None => true,
            Some(j) => j < rows.len() && j != i && rows[j].id != r.id,
        };
        ids.insert(r.id.clone())
            && r.area_ha > 0.0
            && r.area_ha <= 1e9
            && (1.0..=20_000.0).contains(&r.rain_mm)
            && (1.0..=5_000.0).contains(&r.pet_mm)
            && (0.0..=1e9).contains(&r.forest_ha)
            && r.forest_ha <= r.area_ha + tol
            && (0.0..=1e9).contains(&r.vulnerable_ha)
            && r.vulnerable_ha <= r.area_ha - r.forest_ha + tol
            && r.classes_ha.iter().all(|c| (0.0..=1e9).contains(c))
            && sum <= r.area_ha + tol
            && sum <= r.vulnerable_ha + tol
            && to_ok
    });
    // Following flows_to from any row must reach an outlet within n steps.
    let acyclic = (0..rows.len()).all(|start| {
        let mut i = start;
        for _ in 0..=rows.len() {
            match rows[i].flows_to {
                Some(j) if j < rows.len() && j != i => i = j,
                _ => return true,
            }
        }
        false
    });
    rows_ok && acyclic
}

/// Writes the rows as a person's spreadsheet export might: optional BOM, CRLF,
/// semicolons with decimal commas, quoted cells, blank lines, shuffled columns.
fn render(rows: &[Row], bom: bool, crlf: bool, semicolon: bool, quote: bool, blank_after: Option<usize>, reverse_cols: bool) -> Vec<u8> {
    let sep = if semicolon { ";" } else { "," };
    let nl = if crlf { "\r\n" } else { "\n" };
    let num = |v: f64| {
        let s = format!("{v}");
        let s = if semicolon { s.replace('.', ",") } else { s };
        if quote {
            format!("\"{s}\"")
        } else {
            s
        }
    };
    let mut header =
        vec!["id", "area_ha", "rain_mm", "pet_mm", "forest_ha", "vulnerable_ha", "scattered_ha", "medium_ha", "dense_ha", "flows_to"];
    let mut lines = Vec::new();
    for (i, r) in rows.iter().enumerate() {
        let to = match r.flows_to {
            None => String::new(),
            Some(j) if j < rows.len() => rows[j].id.clone(),
            Some(_) => "nowhere".to_string(),
        };
        let mut cells = vec![
            r.id.clone(),
            num(r.area_ha),
            num(r.rain_mm),
            num(r.pet_mm),
            num(r.forest_ha),
            num(r.vulnerable_ha),
            num(r.classes_ha[0]),
            num(r.classes_ha[1]),
            num(r.classes_ha[2]),
            to,
        ];
        if reverse_cols {
            cells.reverse();
        }
        lines.push(cells.join(sep));
        if blank_after == Some(i) {
            lines.push(String::new());
        }
    }
    if reverse_cols {
        header.reverse();
    }
    let mut text = String::new();
    if bom {
        text.push('\u{feff}');
    }
    text.push_str(&header.join(sep));
    text.push_str(nl);
    for l in lines {
        text.push_str(&l);
        text.push_str(nl);
    }
    text.into_bytes()
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(256))]

    /// A generated table is accepted exactly when it follows the documented
    /// rules, whatever its formatting, and accepted values are read back exactly.
    #[test]
    fn generated_tables_are_accepted_exactly_when_valid(
        rows in proptest::collection::vec(row(), 1..6),
        broken in proptest::option::of((any::<Index>(), 0u8..17)),
        bom in any::<bool>(), crlf in any::<bool>(), semicolon in any::<bool>(), quote in any::<bool>(),
        blank in proptest::option::of(0usize..6), reverse_cols in any::<bool>(),
    ) {
        let n = rows.len();
        let mut rows: Vec<Row> = rows
            .into_iter()
            .enumerate()
            .map(|(i, r)| Row { id: format!("c{i}"), flows_to: r.flows_to.filter(|&j| j < n && j != i), ..r })
            .collect();
        if let Some((at, kind)) = broken {
            corrupt(&mut rows, at.index(n), kind);
        }
        let tmp = tempfile::tempdir().unwrap();
        let table = render(&rows, bom, crlf, semicolon, quote, blank, reverse_cols);
        let s = write_case(tmp.path(), b"start_year = 2030\nhorizon_years = 2\ncatchments = \"catchments.csv\"\n", &table, b"");
        let valid = rows_are_valid(&rows);
        match load_scenario(&s) {
            Ok(sc) => {
                prop_assert!(valid, "accepted an invalid table:\n{}", String::from_utf8_lossy(&table));
                for (c, r) in sc.catchments.iter().zip(&rows) {
                    prop_assert_eq!(&c.id, &r.id);
                    prop_assert_eq!(c.area_ha, r.area_ha);
                    prop_assert_eq!(c.rain_mm, r.rain_mm);
                    prop_assert_eq!(c.vulnerable_ha, r.vulnerable_ha);
                    prop_assert_eq!(c.infested.dense_ha, r.classes_ha[2]);
                }
            }
            Err(e) => {
                prop_assert!(!valid, "rejected a valid table: {e}\n{}", String::from_utf8_lossy(&table));
                prop_assert!(e.is_invalid_input());
                for p in e.problems() {
                    prop_assert!(p.file.as_deref().is_some_and(|f| f.ends_with("catchments.csv")), "{p}");
                    prop_assert!(p.row.is_some(), "no row: {p}");
                }
            }
        }
    }
}
