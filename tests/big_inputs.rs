//! Big inputs: a 100 000-row catchment table validates and runs, and a file far
//! larger than any table is refused before it is read.

use std::io::{BufRead, BufWriter, Write};
use std::path::Path;
use yieldshift::input::scenario::load_scenario;
use yieldshift::input::table::{read_table, MAX_TABLE_BYTES};
use yieldshift::input::toml_reader::{read_toml_file, MAX_TOML_BYTES};
use yieldshift::model::project_catchment;
use yieldshift::plot::Formats;
use yieldshift::run::deterministic::{self, FigureChoice, RunOptions};

const ROWS: usize = 100_000;
/// Catchments drain in groups of this many into the group's first catchment.
const GROUP: usize = 50;

/// Writes an invented basin of `ROWS` catchments with values varying by row.
fn write_big_table(path: &Path) {
    let mut w = BufWriter::new(std::fs::File::create(path).unwrap());
    writeln!(w, "id,area_ha,rain_mm,pet_mm,vulnerable_ha,scattered_ha,medium_ha,dense_ha,forest_ha,flows_to").unwrap();
    for i in 0..ROWS {
        let area = 200.0 + (i % 997) as f64;
        let rain = 600.0 + (i % 1801) as f64;
        let pet = 500.0 + (i % 701) as f64;
        let forest = (i % 7) as f64 * 10.0;
        let vulnerable = 0.8 * (area - forest);
        let (s, m, d) = ((i % 13) as f64, (i % 5) as f64, (i % 3) as f64);
        let to = if i % GROUP == 0 { String::new() } else { format!("c{:06}", i - i % GROUP) };
        writeln!(w, "c{i:06},{area},{rain},{pet},{vulnerable},{s},{m},{d},{forest},{to}").unwrap();
    }
    w.flush().unwrap();
}

fn count_lines(path: &Path, mut keep: impl FnMut(&str) -> bool) -> usize {
    let r = std::io::BufReader::new(std::fs::File::open(path).unwrap());
    r.lines().map(|l| l.unwrap()).filter(|l| keep(l)).count()
}

#[test]
fn a_hundred_thousand_catchments_validate_and_run() {
    let tmp = tempfile::tempdir().unwrap();
    write_big_table(&tmp.path().join("catchments.csv"));
    let scenario = tmp.path().join("scenario.toml");
    std::fs::write(&scenario, "title = \"Big basin\"\nstart_year = 2030\nhorizon_years = 1\ncatchments = \"catchments.csv\"\n").unwrap();

    let s = load_scenario(&scenario).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(s.catchments.len(), ROWS);
    assert_eq!(s.catchments[12_345].id, "c012345");
    assert_eq!(s.catchments[12_345].flows_to.as_deref(), Some("c012300"));
    assert_eq!(s.network.receiving_nodes().len(), ROWS / GROUP);

    let out = tmp.path().join("results");
    let opts =
        RunOptions { figures: FigureChoice::None, formats: Formats { png: false, svg: false }, threads: Some(1), ..RunOptions::new(&out) };
    let outcome = deterministic::run(&s, &opts).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(outcome.catchments, ROWS);
    assert_eq!(outcome.years, 2);

    // Every catchment has its two years in yearly.csv, and one summary row.
    let per_catchment = count_lines(&out.join("yearly.csv"), |l| l.starts_with('c') && l.as_bytes().get(7) == Some(&b','));
    assert_eq!(per_catchment, ROWS * 2);
    let summaries = count_lines(&out.join("summary.csv"), |l| l.starts_with('c') && l.as_bytes().get(7) == Some(&b','));
    // One local row per catchment and one arriving row per receiving node.
    assert_eq!(summaries, ROWS + ROWS / GROUP);
    let arriving = count_lines(&out.join("summary.csv"), |l| l.contains(",arriving,"));
    assert_eq!(arriving, ROWS / GROUP);

    // A row far down the file holds what the model gives for that catchment.
    let k = 98_765;
    let direct = project_catchment(&s.catchments[k], &s.climate_series(k), &s.params, s.start_year);
    let header = std::fs::read_to_string(out.join("yearly.csv")).unwrap();
    let mut lines = header.lines();
    let cols: Vec<&str> = lines.next().unwrap().split(',').collect();
    let yield_col = cols.iter().position(|c| *c == "yield_mm").unwrap();
    let year_col = cols.iter().position(|c| *c == "year").unwrap();
    let rows: Vec<Vec<&str>> = lines.filter(|l| l.starts_with("c098765,")).map(|l| l.split(',').collect()).collect();
    assert_eq!(rows.len(), 2);
    for (row, y) in rows.iter().zip(&direct) {
        assert_eq!(row[year_col], y.year.to_string());
        let written: f64 = row[yield_col].parse().unwrap();
        // Written with 3 decimals.
        assert!((written - y.yield_mm).abs() <= 0.0005 + 1e-9, "{written} vs {}", y.yield_mm);
    }
    assert!(std::fs::read_dir(tmp.path()).unwrap().all(|e| !e.unwrap().file_name().to_string_lossy().contains("partial")));
}

#[test]
fn a_gigabyte_of_junk_is_refused_before_it_is_read() {
    let tmp = tempfile::tempdir().unwrap();
    let junk = tmp.path().join("catchments.csv");
    // Sparse: the length is set without writing (no real disk use).
    let f = std::fs::File::create(&junk).unwrap();
    f.set_len(1 << 30).unwrap();
    drop(f);
    assert!(std::fs::metadata(&junk).unwrap().len() > MAX_TABLE_BYTES);

    let problems = read_table(&junk).unwrap_err();
    assert_eq!(problems.len(), 1);
    let m = &problems[0].message;
    assert!(m.contains("1024 MiB") && m.contains("larger than 512 MiB are refused"), "{m}");

    // Through the scenario: the same single, located problem, exit-code-2 kind.
    let scenario = tmp.path().join("scenario.toml");
    std::fs::write(&scenario, "start_year = 2030\nhorizon_years = 2\ncatchments = \"catchments.csv\"\n").unwrap();
    let e = load_scenario(&scenario).unwrap_err();
    assert!(e.is_invalid_input());
    assert_eq!(e.problems().len(), 1);
    assert!(e.to_string().contains("catchments.csv: file is 1024 MiB"), "{e}");

    // As a climate table too.
    std::fs::write(
        tmp.path().join("small.csv"),
        "id,area_ha,rain_mm,pet_mm,vulnerable_ha,scattered_ha,medium_ha,dense_ha\na,100,1000,800,50,1,1,1\n",
    )
    .unwrap();
    std::fs::write(&scenario, "start_year = 2030\nhorizon_years = 2\ncatchments = \"small.csv\"\n[climate]\ntable = \"catchments.csv\"\n")
        .unwrap();
    let e = load_scenario(&scenario).unwrap_err();
    assert!(e.to_string().contains("file is 1024 MiB"), "{e}");

    // A scenario file of that size is refused by the TOML reader's own limit.
    let p = read_toml_file(&junk).unwrap_err();
    assert!(p.message.contains(&format!("larger than {} MiB are refused", MAX_TOML_BYTES >> 20)), "{}", p.message);
}

#[test]
fn junk_below_the_size_limit_is_refused_as_text() {
    let tmp = tempfile::tempdir().unwrap();
    let junk = tmp.path().join("catchments.csv");
    // 2 MiB of bytes from a fixed linear congruential sequence (invented data).
    let mut x: u32 = 12345;
    let bytes: Vec<u8> = (0..2 << 20)
        .map(|_| {
            x = x.wrapping_mul(1_103_515_245).wrapping_add(12_345);
            (x >> 16) as u8
        })
        .collect();
    std::fs::write(&junk, &bytes).unwrap();
    let problems = read_table(&junk).unwrap_err();
    assert_eq!(problems.len(), 1);
    assert!(problems[0].message.contains("not UTF-8") && problems[0].row.is_some(), "{:?}", problems[0]);
}

#[test]
fn a_scenario_with_a_hundred_thousand_unknown_keys_is_reported_without_stalling() {
    // Each problem is located by a lookup, not a scan of the file, and only the
    // first MAX_PROBLEMS are listed; before that this took minutes.
    use yieldshift::input::toml_reader::MAX_PROBLEMS;
    let tmp = tempfile::tempdir().unwrap();
    let mut text = String::from("start_year = 2030\nhorizon_years = 2\ncatchments = \"c.csv\"\n");
    for i in 0..100_000 {
        text.push_str(&format!("stray_key_{i} = {i}\n"));
    }
    let scenario = tmp.path().join("scenario.toml");
    std::fs::write(&scenario, text).unwrap();
    let e = load_scenario(&scenario).unwrap_err();
    let p = e.problems();
    assert_eq!(p.len(), MAX_PROBLEMS + 1);
    assert_eq!(p[0].row, Some(4));
    assert!(p[0].column.as_deref().is_some_and(|c| c.starts_with("stray_key_")));
    assert!(p[MAX_PROBLEMS].message.contains(&format!("{} more problems not listed", 100_000 - MAX_PROBLEMS)), "{}", p[MAX_PROBLEMS]);
}
