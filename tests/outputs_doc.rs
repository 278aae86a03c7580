//! `docs/outputs.md` against the single column definitions (`yieldshift::schema::columns`,
//! the `run_info.json` and `shard.json` types) and against the files of a real small
//! run, shard, calibration and PET computation: every column a file has is in that
//! file's table of the page, and the page lists nothing the code does not write.

mod common;

use serde_json::Value;
use std::collections::BTreeSet;
use std::path::{Path, PathBuf};
use yieldshift::model::summary::{GuidelineStatus, REPORT_OFFSETS_YR};
use yieldshift::schema::columns::{self, flags, owned, scope};
use yieldshift::schema::run_info as ri;

/// The example contaminants of the page's placeholders (and of the run below).
const CONTAMINANTS: [&str; 2] = ["nitrate_n", "total_p"];
/// The example programme of the run below and its GeoJSON suffix `{s}`.
const STRATEGY: &str = "contain-early";
const STRATEGY_SUFFIX: &str = "contain_early";

// ---------------------------------------------------------------------------
// Reading the page

/// One Markdown table: header cells and the first cell of each row.
struct Table {
    header: Vec<String>,
    first_cells: Vec<String>,
}

/// A heading and the tables before the next heading.
struct Section {
    heading: String,
    tables: Vec<Table>,
}

fn cells(line: &str) -> Vec<String> {
    let inner = line.trim().trim_start_matches('|').trim_end_matches('|');
    inner.split('|').map(|c| c.trim().to_string()).collect()
}

fn page() -> Vec<Section> {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("docs/outputs.md");
    let text = std::fs::read_to_string(&path).expect("docs/outputs.md exists");
    let mut sections: Vec<Section> = Vec::new();
    let mut table: Option<Table> = None;
    let close = |t: &mut Option<Table>, sections: &mut Vec<Section>| {
        if let Some(t) = t.take() {
            sections.last_mut().expect("a table under a heading").tables.push(t);
        }
    };
    for line in text.lines() {
        if line.starts_with('#') {
            close(&mut table, &mut sections);
            sections.push(Section { heading: line.trim_start_matches('#').trim().to_string(), tables: Vec::new() });
        } else if line.trim_start().starts_with('|') {
            let c = cells(line);
            match table.as_mut() {
                None => table = Some(Table { header: c, first_cells: Vec::new() }),
                Some(_) if c.iter().all(|x| x.chars().all(|ch| ch == '-' || ch == ':')) => {}
                Some(t) => t.first_cells.push(c[0].clone()),
            }
        } else {
            close(&mut table, &mut sections);
        }
    }
    close(&mut table, &mut sections);
    sections
}

/// The one section whose heading contains `needle`.
fn section<'a>(page: &'a [Section], needle: &str) -> &'a Section {
    let found: Vec<&Section> = page.iter().filter(|s| s.heading.contains(needle)).collect();
    assert_eq!(found.len(), 1, "docs/outputs.md: expected one heading containing {needle}, found {}", found.len());
    found[0]
}

/// The names in the first column of the section's one table headed `kind`
/// (`column`, `key`, `property` or `value`), each a single backticked name.
fn names(page: &[Section], needle: &str, kind: &str) -> Vec<String> {
    let s = section(page, needle);
    let tables: Vec<&Table> = s.tables.iter().filter(|t| t.header.first().map(String::as_str) == Some(kind)).collect();
    assert_eq!(tables.len(), 1, "docs/outputs.md, section '{}': expected one table headed '{kind}'", s.heading);
    tables[0]
        .first_cells
        .iter()
        .map(|c| {
            let name = c.strip_prefix('`').and_then(|r| r.strip_suffix('`'));
            match name {
                Some(n) if !n.is_empty() && !n.contains('`') => n.to_string(),
                _ => panic!("docs/outputs.md, section '{}': first cell {c:?} is not one backticked name", s.heading),
            }
        })
        .collect()
}

/// A documented name with its placeholders replaced by every example value.
fn expand(name: &str) -> Vec<String> {
    let mut out = vec![name.to_string()];
    let offsets: Vec<String> = REPORT_OFFSETS_YR.iter().map(|o| o.to_string()).collect();
    let contaminants: Vec<String> = CONTAMINANTS.iter().map(|c| c.to_string()).collect();
    let suffixes = vec![STRATEGY_SUFFIX.to_string()];
    for (placeholder, values) in [("{contaminant}", &contaminants), ("{N}", &offsets), ("{s}", &suffixes)] {
        out = out
            .into_iter()
            .flat_map(|n| if n.contains(placeholder) { values.iter().map(|v| n.replace(placeholder, v)).collect() } else { vec![n] })
            .collect();
    }
    for n in &out {
        assert!(!n.contains('{') && !n.contains('}'), "docs/outputs.md: unknown placeholder in `{name}`");
    }
    out
}

/// Checks that the documented names of one table are exactly `expected` and, when
/// `in_order`, that the table lists them in the order they come in `expected`
/// (a group of per-contaminant rows repeats for each contaminant).
fn check(page: &[Section], needle: &str, kind: &str, expected: &[String], in_order: bool) {
    let documented = names(page, needle, kind);
    let mut row_of: Vec<(String, usize)> = Vec::new();
    for (i, n) in documented.iter().enumerate() {
        assert!(documented[..i].iter().all(|m| m != n), "docs/outputs.md, {needle}: `{n}` is listed twice");
        row_of.extend(expand(n).into_iter().map(|e| (e, i)));
    }
    let doc_set: BTreeSet<&str> = row_of.iter().map(|(e, _)| e.as_str()).collect();
    let code_set: BTreeSet<&str> = expected.iter().map(String::as_str).collect();
    let missing: Vec<&&str> = code_set.difference(&doc_set).collect();
    let extra: Vec<&&str> = doc_set.difference(&code_set).collect();
    assert!(missing.is_empty(), "docs/outputs.md, {needle}: not documented (document them): {missing:?}");
    assert!(extra.is_empty(), "docs/outputs.md, {needle}: documented but not written by the code: {extra:?}");
    if in_order {
        // First appearance of each table row, walking the file's columns, must go down the table.
        let mut seen: Vec<usize> = Vec::new();
        for e in expected {
            let row = row_of.iter().find(|(n, _)| n == e).map(|(_, r)| *r).unwrap();
            if !seen.contains(&row) {
                if let Some(&last) = seen.last() {
                    assert!(
                        row > last,
                        "docs/outputs.md, {needle}: `{}` is listed after `{}`; list columns in file order",
                        documented[row],
                        documented[last]
                    );
                }
                seen.push(row);
            }
        }
    }
}

/// The text of the row documenting `name` in the section's `kind` table.
fn row_text(needle: &str, name: &str) -> String {
    let text = std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("docs/outputs.md")).unwrap();
    let heading = text.lines().position(|l| l.starts_with('#') && l.contains(needle)).unwrap();
    text.lines()
        .skip(heading + 1)
        .take_while(|l| !l.starts_with('#'))
        .find(|l| l.trim_start().starts_with(&format!("| `{name}` |")))
        .unwrap_or_else(|| panic!("docs/outputs.md, {needle}: no row for `{name}`"))
        .to_string()
}

// ---------------------------------------------------------------------------
// The JSON files' keys

/// Every key of a JSON value: `a.b` inside objects, `a[].b` inside lists of objects.
fn json_keys(v: &Value, prefix: &str, out: &mut BTreeSet<String>) {
    match v {
        Value::Object(m) => {
            for (k, x) in m {
                let p = if prefix.is_empty() { k.clone() } else { format!("{prefix}.{k}") };
                out.insert(p.clone());
                json_keys(x, &p, out);
            }
        }
        Value::Array(a) => {
            for x in a.iter().filter(|x| x.is_object()) {
                json_keys(x, &format!("{prefix}[]"), out);
            }
        }
        _ => {}
    }
}

fn keys_of<T: serde::Serialize>(v: &T) -> BTreeSet<String> {
    let mut out = BTreeSet::new();
    json_keys(&serde_json::to_value(v).unwrap(), "", &mut out);
    out
}

fn keys_in_file(path: &Path) -> BTreeSet<String> {
    let v: Value = serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap();
    let mut out = BTreeSet::new();
    json_keys(&v, "", &mut out);
    out
}

/// A run's `run_info.json` with every optional part present, in both closure
/// curves and both water-balance methods: together, every key the type can write.
fn run_info_keys() -> BTreeSet<String> {
    let variants = [
        (
            ri::CanopyClosure::Logistic {
                curve: ri::LogisticCurve::Logistic,
                half_closure_age_yr: 12.0,
                max_fraction: 1.0,
                steepness_per_yr: 0.35,
            },
            ri::Curves::Zhang { w_forest: 2.0, w_grass: 0.5 },
        ),
        (
            ri::CanopyClosure::Table { ages_yr: vec![0.0, 30.0], curve: ri::TableCurve::Table, fractions: vec![0.0, 0.9] },
            ri::Curves::Fu { omega_forest: 3.1, omega_grass: 2.4 },
        ),
    ];
    let mut keys = BTreeSet::new();
    for (closure, curves) in variants {
        let info = ri::RunInfo {
            canopy_closure: Some(closure),
            catchment_table: "c.csv".into(),
            catchments: 1,
            cautions: "c".into(),
            climate_table: Some("cl.csv".into()),
            contaminants: vec![ri::ContaminantInfo {
                cq_exponent: -1.0,
                forest_export_kg_per_ha_yr: 2.2,
                guideline_mg_per_l: Some(1.5),
                name: "nitrate_n".into(),
                open_export_kg_per_ha_yr: 2.5,
            }],
            discount_rate: 0.05,
            ensemble: Some(ri::EnsembleInfo {
                climate: ri::EnsembleClimate::Bootstrap,
                members: 4,
                sampling: ri::Sampling::MonteCarlo,
                seed: 1,
            }),
            gis: Some(ri::GisInfo {
                area_from_geometry: false,
                area_tolerance: 0.05,
                boundaries: Some("b.geojson".into()),
                id_property: "id".into(),
            }),
            horizon_years: 10,
            hydrology: ri::Hydrology {
                forest_pet_factor: 1.0,
                interception_demand_share: Some(0.6),
                interception_fraction: Some(0.25),
                curves,
            },
            hydrology_method: "zhang".into(),
            inputs_copied_to: ri::INPUTS_COPIED_TO.into(),
            invasion: ri::Invasion {
                dense_age_yr: 20,
                implied_areal_growth_per_yr: Some(0.04),
                initial_dense_span_yr: Some(10),
                medium_age_yr: 10,
                seed_bearing_age_yr: 8,
                seed_rain_ha_per_yr: 0.0,
                spread_rate_per_yr: 0.06,
            },
            min_runoff_mm: Some(1.0),
            pet_from_weather: Some(ri::PetFromWeather {
                method: "hargreaves".into(),
                weather_table: "w.csv".into(),
                partial: vec![yieldshift::schema::run_info::PetPartial { catchment: "c".into(), weather_years: 1, long_term_years: 1 }],
            }),
            scenario: "s.toml".into(),
            stand_table: Some("stands.csv".into()),
            start_year: 2024,
            strategies: vec!["no-control".into()],
            title: "t".into(),
            tool: ri::TOOL.into(),
            version: "0".into(),
            water_value_per_m3: Some(0.3),
        };
        keys.extend(keys_of(&info));
    }
    keys
}

/// Every key of the `run_info.json` of `fit` (donors present).
fn fit_run_info_keys() -> BTreeSet<String> {
    keys_of(&ri::FitRunInfo {
        bootstrap_samples: 100,
        catchments_fitted: vec!["a".into()],
        catchments_ungauged: vec!["b".into()],
        cautions: "c".into(),
        climate_table: Some("c.csv".into()),
        command: ri::FIT_COMMAND.into(),
        cover_fitted: "grass".into(),
        donors: vec![ri::DonorInfo { gauged: "a".into(), ungauged: "b".into() }],
        hydrology_method: "zhang".into(),
        interval_level: 0.95,
        moving_average_yr: 1,
        observations_left_out: 0,
        observed_flows: "o.csv".into(),
        parameter: Some("w_grass".into()),
        pbias_convention: "p".into(),
        scenario: "s.toml".into(),
        seed: 1,
        statistics: "s".into(),
        title: "t".into(),
        tool: ri::TOOL.into(),
        value_written: "v".into(),
        version: "0".into(),
    })
}

/// The top-level keys of `shard.json` (the partial sums are one opaque key).
fn shard_keys() -> Vec<String> {
    let info = yieldshift::schema::shard::ShardInfo::<Value> {
        tool: ri::TOOL.into(),
        shard: 1,
        of: 1,
        table_order: vec![],
        catchments: vec![],
        figures: false,
        partials: Value::Null,
    };
    match serde_json::to_value(&info).unwrap() {
        Value::Object(m) => m.keys().cloned().collect(),
        _ => unreachable!(),
    }
}

fn set(v: &[String]) -> BTreeSet<String> {
    v.iter().cloned().collect()
}

// ---------------------------------------------------------------------------
// The page against the definitions

#[test]
fn every_column_of_every_table_is_documented_in_its_table_and_nothing_else() {
    let p = page();
    let c = &CONTAMINANTS[..];
    check(&p, "`yearly.csv`", "column", &columns::yearly::columns(c), true);
    check(&p, "`summary.csv`", "column", &columns::summary::columns(&REPORT_OFFSETS_YR, c), true);
    check(&p, "`nodes.csv`", "column", &columns::nodes::columns(c), true);
    check(&p, "`budget.csv`", "column", &owned(&columns::budget::COLUMNS), true);
    check(&p, "`delay.csv`", "column", &owned(&columns::delay::COLUMNS), true);
    check(&p, "`ensemble.csv`", "column", &owned(&columns::ensemble::COLUMNS), true);
    check(&p, "`members.csv`", "column", &columns::members::columns(c), true);
    check(&p, "`sensitivity.csv`", "column", &owned(&columns::sensitivity::COLUMNS), true);
    check(&p, "`economics.csv`", "column", &owned(&columns::economics::COLUMNS), true);
    check(&p, "`economics.csv`", "value", &columns::economics::VARIABLES.iter().map(|v| v.0.to_string()).collect::<Vec<_>>(), true);
    check(&p, "`fit.csv`", "column", &owned(&columns::fit::COLUMNS), true);
    check(&p, "`fit_years.csv`", "column", &owned(&columns::fit_years::COLUMNS), true);
    check(&p, "`left_out.csv`", "column", &owned(&columns::left_out::COLUMNS), true);
    check(&p, "`fit_mean_annual.csv`", "column", &owned(&columns::fit_mean_annual::COLUMNS), true);
    check(&p, "`catchments_left_out.csv`", "column", &owned(&columns::catchments_left_out::COLUMNS), true);
    check(&p, "`regional.csv`", "column", &owned(&columns::regional::COLUMNS), true);
    check(&p, "Annual table", "column", &owned(&yieldshift::input::weather::ANNUAL_COLUMNS), true);
}

#[test]
fn the_values_columns_hold_are_documented() {
    let p = page();
    let c = &CONTAMINANTS[..];
    check(&p, "Values of `scope`", "value", &owned(&scope::ORDER), true);
    check(&p, "Values of `variable`", "value", &columns::ensemble::variables(c), true);
    let mut f: Vec<String> = c.iter().map(|x| flags::low_runoff(x)).collect();
    f.extend(c.iter().map(|x| flags::above_ceiling(x)));
    f.push(flags::ZERO_BASELINE_YIELD.into());
    check(&p, "Values of `flags`", "value", &f, false);
    let words: Vec<String> = [GuidelineStatus::AboveAtStart, GuidelineStatus::Exceeded(2030), GuidelineStatus::NotExceeded]
        .iter()
        .map(|s| s.word().to_string())
        .collect();
    assert_eq!(GuidelineStatus::NoGuideline.word(), "", "the page says the status is empty without a guideline");
    check(&p, "Values of `{contaminant}_guideline_status`", "value", &words, true);
    // Values named in a row's meaning.
    let sep = flags::SEPARATOR.to_string();
    let page_text = std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("docs/outputs.md")).unwrap();
    assert!(page_text.contains(&format!("separated by `{sep}`")), "the flag separator is documented");
    for at in [columns::sensitivity::AT_YEAR_20, columns::sensitivity::AT_HORIZON] {
        assert!(row_text("`sensitivity.csv`", columns::sensitivity::AT).contains(&format!("`{at}`")), "{at}");
    }
    assert!(row_text("`budget.csv`", columns::budget::AVAILABLE).contains(&format!("`{}`", columns::budget::UNLIMITED)));
    assert!(row_text("`budget.csv`", columns::budget::POOL).contains(&format!("`{}`", yieldshift::schema::BASIN_ID)));
    assert!(row_text("`sensitivity.csv`", columns::sensitivity::STRATEGY).contains(&format!("`{}`", yieldshift::schema::NO_CONTROL)));
}

#[test]
fn every_key_of_the_json_files_is_documented_and_nothing_else() {
    let p = page();
    let check_keys = |needle: &str, expected: &BTreeSet<String>| {
        let documented = set(&names(&p, needle, "key"));
        let missing: Vec<&String> = expected.difference(&documented).collect();
        let extra: Vec<&String> = documented.difference(expected).collect();
        assert!(missing.is_empty(), "docs/outputs.md, {needle}: not documented: {missing:?}");
        assert!(extra.is_empty(), "docs/outputs.md, {needle}: documented but not written: {extra:?}");
    };
    check_keys("`run_info.json` of a run", &run_info_keys());
    check_keys("`run_info.json` of `fit`", &fit_run_info_keys());
    check(&p, "`shard.json`", "key", &shard_keys(), false);
}

// ---------------------------------------------------------------------------
// The definitions against real files

/// A tiny invented basin: two catchments draining to a third (a receiving node),
/// two contaminants, one per-catchment budget programme with delays, boundaries,
/// and a small ensemble with two uncertain parameters and `members.csv`.
fn tiny_basin(dir: &Path) -> PathBuf {
    std::fs::write(
        dir.join("catchments.csv"),
        "id,name,area_ha,rain_mm,pet_mm,vulnerable_ha,scattered_ha,medium_ha,dense_ha,forest_ha,flows_to,nitrate_n_point_kg_per_yr,total_p_point_kg_per_yr\n\
         hill,Hill Stream,400,1200,800,300,20,10,5,0,intake,0,0\n\
         flat,Flat Creek,600,900,850,500,40,20,10,0,intake,200,5\n\
         intake,Intake Reach,300,1000,820,200,10,5,0,20,,0,0\n",
    )
    .unwrap();
    let mut climate = String::from("catchment,year,rain_mm,pet_mm\n");
    for (id, rain, pet) in [("hill", 1200.0, 800.0), ("flat", 900.0, 850.0), ("intake", 1000.0, 820.0)] {
        for (t, k) in [1.08f64, 0.92, 1.03].into_iter().enumerate() {
            climate.push_str(&format!("{id},{},{:.0},{:.0}\n", 2024 + t, rain * k, pet / k.sqrt()));
        }
    }
    std::fs::write(dir.join("climate.csv"), climate).unwrap();
    let square = |x: f64| format!("[[[{x},-50.0],[{},-50.0],[{},-49.98],[{x},-49.98],[{x},-50.0]]]", x + 0.02, x + 0.02);
    let features: Vec<String> = ["hill", "flat", "intake"]
        .iter()
        .enumerate()
        .map(|(i, id)| {
            format!(
                "{{\"type\":\"Feature\",\"properties\":{{\"id\":\"{id}\"}},\"geometry\":{{\"type\":\"Polygon\",\"coordinates\":{}}}}}",
                square(10.0 + 0.03 * i as f64)
            )
        })
        .collect();
    std::fs::write(dir.join("b.geojson"), format!("{{\"type\":\"FeatureCollection\",\"features\":[{}]}}", features.join(","))).unwrap();
    let s = dir.join("scenario.toml");
    std::fs::write(
        &s,
        format!(
            "title = \"Invented test basin\"\nstart_year = 2024\nhorizon_years = 25\ncatchments = \"catchments.csv\"\n\n\
             [climate]\ntable = \"climate.csv\"\nbeyond_record = \"cycle\"\n\n\
             [gis]\nboundaries = \"b.geojson\"\nid_property = \"id\"\narea_tolerance = 0.9\n\n\
             [hydrology]\nmethod = \"zhang\"\nw_forest = {{ dist = \"uniform\", min = 1.5, max = 2.5 }}\n\n\
             [invasion]\nspread_rate_per_yr = {{ dist = \"uniform\", min = 0.04, max = 0.08, per = \"catchment\" }}\n\n\
             [ensemble]\nmembers = 6\nseed = 3\nwrite_members = true\n\n\
             [[contaminant]]\nname = \"{}\"\nopen_export_kg_per_ha_yr = 2.5\nforest_export_kg_per_ha_yr = 2.2\nguideline_mg_per_l = 0.3\n\n\
             [[contaminant]]\nname = \"{}\"\nopen_export_kg_per_ha_yr = 0.3\nforest_export_kg_per_ha_yr = 0.25\n\n\
             [economics]\ndiscount_rate = 0.05\nwater_value_per_m3 = 0.3\n\n\
             [[treatment]]\nname = \"ground\"\nclass = \"scattered\"\ncost_per_ha = 50\n\n\
             [[treatment]]\nname = \"ground\"\nclass = \"medium\"\ncost_per_ha = 400\n\n\
             [[treatment]]\nname = \"aerial\"\nclass = \"dense\"\ncost_per_ha = 2000\n\n\
             [[strategy]]\nname = \"{STRATEGY}\"\nstart_year = 2024\nrule = \"scattered-first\"\nbudget_per_yr = 5000\n\
             budget_scope = \"catchment\"\nefficacy = 0.9\nregrowth_fraction = 0.2\nregrowth_years = 5\nfollow_up_cost_per_ha = 5\n\
             carry_over = true\ndelays_yr = [0, 5]\n",
            CONTAMINANTS[0], CONTAMINANTS[1]
        ),
    )
    .unwrap();
    s
}

fn run_ok(args: &[&str]) {
    let o = common::bin().args(args).output().expect("binary runs");
    assert!(o.status.success(), "{args:?}: {}{}", String::from_utf8_lossy(&o.stdout), String::from_utf8_lossy(&o.stderr));
}

/// The values of one column of a CSV file.
fn column_values(path: &Path, column: &str) -> BTreeSet<String> {
    let mut r = csv::Reader::from_path(path).unwrap();
    let i = r.headers().unwrap().iter().position(|h| h == column).unwrap_or_else(|| panic!("{}: no {column}", path.display()));
    r.records().map(|rec| rec.unwrap()[i].to_string()).collect()
}

#[test]
fn a_real_run_and_shard_write_the_defined_columns_and_documented_keys() {
    let tmp = tempfile::tempdir().unwrap();
    let s = tiny_basin(tmp.path());
    let out = tmp.path().join("res");
    run_ok(&["run", s.to_str().unwrap(), "--out", out.to_str().unwrap(), "--figures", "none", "--quiet"]);
    let c = &CONTAMINANTS[..];
    let expected: [(&str, Vec<String>); 8] = [
        ("yearly.csv", columns::yearly::columns(c)),
        ("summary.csv", columns::summary::columns(&REPORT_OFFSETS_YR, c)),
        ("nodes.csv", columns::nodes::columns(c)),
        ("budget.csv", owned(&columns::budget::COLUMNS)),
        ("delay.csv", owned(&columns::delay::COLUMNS)),
        ("ensemble.csv", owned(&columns::ensemble::COLUMNS)),
        ("members.csv", columns::members::columns(c)),
        ("sensitivity.csv", owned(&columns::sensitivity::COLUMNS)),
    ];
    for (file, header) in &expected {
        assert_eq!(&common::csv_header(&out.join(file)), header, "{file}");
    }

    // The values the page lists are the values the files hold.
    let all_scopes = set(&owned(&scope::ORDER));
    for file in ["summary.csv", "ensemble.csv"] {
        assert_eq!(column_values(&out.join(file), columns::SCOPE), all_scopes, "{file}: a local, an arriving and a basin row");
    }
    assert_eq!(column_values(&out.join("ensemble.csv"), columns::ensemble::VARIABLE), set(&columns::ensemble::variables(c)));
    let statuses = column_values(&out.join("summary.csv"), &columns::summary::guideline_status(c[0]));
    let words: BTreeSet<String> = [GuidelineStatus::AboveAtStart, GuidelineStatus::Exceeded(0), GuidelineStatus::NotExceeded]
        .iter()
        .map(|s| s.word().to_string())
        .collect();
    assert!(!statuses.is_empty() && statuses.is_subset(&words), "{statuses:?}");
    assert_eq!(column_values(&out.join("summary.csv"), &columns::summary::guideline_status(c[1])), set(&["".to_string()]), "no guideline");
    let ats = column_values(&out.join("sensitivity.csv"), columns::sensitivity::AT);
    assert_eq!(ats, set(&owned(&[columns::sensitivity::AT_YEAR_20, columns::sensitivity::AT_HORIZON])));

    // catchments.geojson: the properties it lists as written are the page's, in order.
    let geo: Value = serde_json::from_str(&std::fs::read_to_string(out.join("catchments.geojson")).unwrap()).unwrap();
    let member = &geo[yieldshift::schema::RESULTS_MEMBER];
    let written: Vec<String> = member["properties_written"].as_array().unwrap().iter().map(|v| v.as_str().unwrap().to_string()).collect();
    let p = page();
    check(&p, "`catchments.geojson`", "property", &written, true);
    let first = &geo["features"][0]["properties"];
    for w in &written {
        assert!(first.get(w).is_some(), "feature lacks {w}");
    }
    let member_keys: Vec<String> = member.as_object().unwrap().keys().cloned().collect();
    check(&p, "`yieldshift_run`", "key", &member_keys, false);

    // run_info.json: every key is one the type defines (and so one the page documents).
    let real = keys_in_file(&out.join("run_info.json"));
    let defined = run_info_keys();
    let undefined: Vec<&String> = real.difference(&defined).collect();
    assert!(undefined.is_empty(), "run_info.json has keys the test's RunInfo does not: {undefined:?}");
    assert!(real.len() > 40, "{real:?}");

    // A shard writes the same columns (no basin rows) and shard.json's keys.
    let shard = tmp.path().join("shard");
    run_ok(&["run", s.to_str().unwrap(), "--out", shard.to_str().unwrap(), "--shard", "1/1", "--figures", "none", "--quiet"]);
    for (file, header) in expected.iter().filter(|(f, _)| *f != "delay.csv") {
        assert_eq!(&common::csv_header(&shard.join(file)), header, "shard {file}");
    }
    let top: Vec<String> = match serde_json::from_str::<Value>(&std::fs::read_to_string(shard.join("shard.json")).unwrap()).unwrap() {
        Value::Object(m) => m.keys().cloned().collect(),
        _ => panic!("shard.json is not an object"),
    };
    assert_eq!(top, shard_keys());
}

#[test]
fn fit_and_pet_write_the_defined_columns() {
    let tmp = tempfile::tempdir().unwrap();
    let dir = tmp.path();
    std::fs::write(
        dir.join("catchments.csv"),
        "id,name,area_ha,rain_mm,pet_mm,vulnerable_ha,scattered_ha,medium_ha,dense_ha\n\
         gauged,Gauged Stream,500,1100,800,400,10,5,0\nother,Other Stream,300,900,820,200,5,0,0\n",
    )
    .unwrap();
    let mut climate = String::from("catchment,year,rain_mm,pet_mm\n");
    let mut observed = String::from("catchment,year,flow_mm,flow_m3,notes\n");
    for t in 0..8 {
        let tf = t as f64;
        let (p, e) = (1100.0 + 150.0 * (1.7 * tf).sin(), 800.0 + 30.0 * tf.cos());
        climate.push_str(&format!("gauged,{},{p:.0},{e:.0}\nother,{},{:.0},{e:.0}\n", 2010 + t, 2010 + t, 0.8 * p));
        if t == 3 {
            observed.push_str("gauged,2013,,,gauge down\n");
        } else {
            observed.push_str(&format!("gauged,{},{:.1},,\n", 2010 + t, 0.45 * p.round() + 20.0 * (3.1 * tf).sin()));
        }
    }
    observed.push_str("gauged,2030,500,,beyond the record\n");
    std::fs::write(dir.join("climate.csv"), climate).unwrap();
    std::fs::write(dir.join("observed.csv"), observed).unwrap();
    let s = dir.join("s.toml");
    std::fs::write(&s, "start_year = 2020\nhorizon_years = 10\ncatchments = \"catchments.csv\"\n\n[climate]\ntable = \"climate.csv\"\n")
        .unwrap();
    let out = dir.join("fit");
    let obs = dir.join("observed.csv");
    run_ok(&[
        "fit",
        s.to_str().unwrap(),
        "--observed",
        obs.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "--bootstrap",
        "100",
        "--donor",
        "other=gauged",
        "--quiet",
    ]);
    assert_eq!(common::csv_header(&out.join("fit.csv")), owned(&columns::fit::COLUMNS));
    assert_eq!(common::csv_header(&out.join("fit_years.csv")), owned(&columns::fit_years::COLUMNS));
    assert_eq!(common::csv_header(&out.join("left_out.csv")), owned(&columns::left_out::COLUMNS));
    assert_eq!(
        std::fs::read_to_string(out.join("left_out.csv")).unwrap().lines().count(),
        1 + 2,
        "an empty flow and a year beyond the record"
    );
    assert_eq!(keys_in_file(&out.join("run_info.json")), fit_run_info_keys());
    assert!(out.join("calibration.toml").exists());

    // pet: a daily table with a catchment column and a monthly one without.
    let mut daily = String::from("catchment,date,tmax_c,tmin_c\n");
    let lens = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];
    let mut d = 0;
    for (m, len) in lens.iter().enumerate() {
        for day in 1..=*len {
            let season = (d as f64 / 365.0 * std::f64::consts::TAU).cos();
            daily.push_str(&format!("hill,2021-{:02}-{day:02},{:.1},{:.1}\n", m + 1, 16.0 + 7.0 * season, 5.0 + 5.0 * season));
            d += 1;
        }
    }
    let mut monthly = String::from("year,month,tmax_c,tmin_c\n");
    for m in 1..=12 {
        let season = (m as f64 / 12.0 * std::f64::consts::TAU).cos();
        monthly.push_str(&format!("2021,{m},{:.1},{:.1}\n", 16.0 + 7.0 * season, 5.0 + 5.0 * season));
    }
    let mut periods: Vec<Vec<String>> = Vec::new();
    for (name, text) in [("daily", daily), ("monthly", monthly)] {
        let w = dir.join(format!("{name}.csv"));
        std::fs::write(&w, text).unwrap();
        let o = dir.join("pet").join(format!("{name}_et0.csv"));
        run_ok(&["pet", w.to_str().unwrap(), "--out", o.to_str().unwrap(), "--latitude-deg", "-44", "--elevation-m", "500"]);
        periods.push(common::csv_header(&o));
        assert_eq!(
            common::csv_header(&dir.join("pet").join(format!("{name}_et0_annual.csv"))),
            owned(&yieldshift::input::weather::ANNUAL_COLUMNS)
        );
    }
    assert_eq!(periods[0][0], "catchment");
    assert_eq!(periods[1][0], "year");
    // The page's per-period table lists the union, each file's columns in its order.
    let documented = names(&page(), "Per-period table", "column");
    let union: BTreeSet<String> = periods.iter().flatten().cloned().collect();
    assert_eq!(set(&documented), union);
    for header in &periods {
        let positions: Vec<usize> = header.iter().map(|h| documented.iter().position(|d| d == h).unwrap()).collect();
        assert!(positions.windows(2).all(|w| w[0] < w[1]), "{header:?} out of the page's order {documented:?}");
    }
}
