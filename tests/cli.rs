//! End-to-end tests: the real binary on temporary folders.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};
use yieldshift::schema::columns;

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_yieldshift"))
}

fn demo() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("demo-data/scenario.toml")
}

fn run(args: &[&str]) -> Output {
    bin().args(args).output().expect("binary runs")
}

fn text(o: &Output) -> String {
    format!("{}{}", String::from_utf8_lossy(&o.stdout), String::from_utf8_lossy(&o.stderr))
}

fn header(path: &Path) -> Vec<String> {
    let t = std::fs::read_to_string(path).unwrap();
    t.lines().next().unwrap().split(',').map(str::to_string).collect()
}

#[test]
fn demo_run_writes_every_output() {
    let tmp = tempfile::tempdir().unwrap();
    let out = tmp.path().join("res");
    let o = run(&["run", demo().to_str().unwrap(), "--out", out.to_str().unwrap()]);
    assert!(o.status.success(), "{}", text(&o));

    // The header is exactly the schema's, for the demo's contaminants.
    let h = header(&out.join("yearly.csv"));
    assert_eq!(h, columns::yearly::columns(&["nitrate_n", "total_p"]));
    assert!(h.iter().any(|x| x == "yield_change_pct") && h.iter().any(|x| x == "total_p_mg_per_l"));
    let yearly = std::fs::read_to_string(out.join("yearly.csv")).unwrap();
    // 6 catchments × 61 years × (no-control + 3 demo strategies) + header
    assert_eq!(yearly.lines().count(), 6 * 61 * 4 + 1);
    for st in ["no-control", "contain-early", "best-value", "dense-first"] {
        let n = yearly.lines().filter(|l| l.split(',').nth(1) == Some(st)).count();
        assert_eq!(n, 6 * 61, "{st}");
    }
    for line in yearly.lines().skip(1) {
        for cell in line.split(',') {
            let c = cell.to_ascii_lowercase();
            assert!(!matches!(c.trim_start_matches(['+', '-']), "nan" | "inf" | "infinity"), "{line}");
        }
    }
    let s = header(&out.join("summary.csv"));
    assert_eq!(s, columns::summary::columns(&[10, 20, 50], &["nitrate_n", "total_p"]));
    for c in ["yield_change_10y_pct", "yield_change_20y_pct", "yield_change_50y_pct", "nitrate_n_first_exceedance_year"] {
        assert!(s.iter().any(|x| x == c), "summary.csv lacks {c}");
    }
    for c in ["total_cost", "total_cost_pv", "water_saved_m3", "water_saved_pv_m3", "cost_per_m3", "npv", "benefit_cost_ratio"] {
        assert!(s.iter().any(|x| x == c), "summary.csv lacks {c}");
    }
    let summary = std::fs::read_to_string(out.join("summary.csv")).unwrap();
    assert_eq!(summary.lines().filter(|l| l.starts_with("basin,")).count(), 4, "one basin row per strategy");
    assert!(out.join("nodes.csv").exists());
    let delay = std::fs::read_to_string(out.join("delay.csv")).unwrap();
    assert_eq!(delay.lines().count(), 1 + 4, "contain-early lists four delays");
    assert!(std::fs::read_to_string(out.join("budget.csv")).unwrap().lines().count() > 3 * 61);
    let info = std::fs::read_to_string(out.join("run_info.json")).unwrap();
    assert!(
        info.contains("not a substitute for a site hydrological assessment")
            || info.contains("Not a substitute for a site hydrological assessment")
    );

    let pngs: Vec<_> = std::fs::read_dir(out.join("figures"))
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|e| e == "png"))
        .collect();
    let per_catchment = pngs
        .iter()
        .filter(|p| {
            !["basin_", "strategies_", "delay_", "map_"].iter().any(|pre| p.file_name().unwrap().to_string_lossy().starts_with(pre))
        })
        .filter(|p| {
            !["_yield_bands.png", "_sensitivity.png", "_range.png"]
                .iter()
                .any(|suf| p.file_name().unwrap().to_string_lossy().ends_with(suf))
        })
        .filter(|p| !p.file_name().unwrap().to_string_lossy().contains("_arriving_"))
        .count();
    // What arrives at each receiving node: its change and each concentration.
    for node in ["corvisk", "quessendale-lower"] {
        for what in ["yield", "nitrate_n", "total_p"] {
            assert!(out.join("figures").join(format!("{node}_arriving_{what}.png")).exists(), "{node}_arriving_{what}");
        }
    }
    for id in ["skelvane", "fennigrue", "tamsquil", "corvisk", "wendlescar", "quessendale-lower"] {
        for suffix in ["yield_range", "sensitivity"] {
            assert!(out.join("figures").join(format!("{id}_{suffix}.png")).exists(), "{id}_{suffix}");
        }
    }
    assert!(out.join("ensemble.csv").exists() && out.join("sensitivity.csv").exists());
    assert_eq!(per_catchment, 6 * 4, "yield, two contaminants and cover per catchment");
    for f in ["strategies_cost_vs_water", "delay_contain-early", "basin_no-control_cover", "basin_best-value_cover"] {
        assert!(out.join("figures").join(format!("{f}.png")).exists(), "{f}");
        assert!(out.join("figures").join(format!("{f}.svg")).exists(), "{f}");
    }
    for p in &pngs {
        let dec = png::Decoder::new(std::io::BufReader::new(std::fs::File::open(p).unwrap()));
        let mut r = dec.read_info().unwrap();
        let mut buf = vec![0; r.output_buffer_size()];
        let info = r.next_frame(&mut buf).unwrap();
        assert_eq!((info.width, info.height), yieldshift::plot::SIZE);
        let bytes = &buf[..info.buffer_size()];
        let distinct = bytes.chunks(3).take(200_000).map(|c| c.to_vec()).collect::<std::collections::HashSet<_>>().len();
        assert!(distinct > 10, "{} looks blank", p.display());
    }
    // No staging folder is left behind.
    assert!(std::fs::read_dir(tmp.path()).unwrap().all(|e| !e.unwrap().file_name().to_string_lossy().contains("partial")));
}

#[test]
fn rerun_replaces_an_earlier_run_but_refuses_a_foreign_folder() {
    let tmp = tempfile::tempdir().unwrap();
    let out = tmp.path().join("res");
    for _ in 0..2 {
        let o = run(&["run", demo().to_str().unwrap(), "--out", out.to_str().unwrap(), "--figures", "none"]);
        assert!(o.status.success(), "{}", text(&o));
    }
    let foreign = tmp.path().join("mine");
    std::fs::create_dir(&foreign).unwrap();
    std::fs::write(foreign.join("precious.txt"), "keep me").unwrap();
    let o = run(&["run", demo().to_str().unwrap(), "--out", foreign.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2), "{}", text(&o));
    assert!(text(&o).contains("--force"));
    assert_eq!(std::fs::read_to_string(foreign.join("precious.txt")).unwrap(), "keep me");
}

fn broken_scenario(dir: &Path, catchments: &str) -> PathBuf {
    std::fs::write(dir.join("c.csv"), catchments).unwrap();
    let s = dir.join("s.toml");
    std::fs::write(&s, "title = \"t\"\nstart_year = 2027\nhorizon_years = 20\ncatchments = \"c.csv\"\n").unwrap();
    s
}

#[test]
fn check_rejects_a_broken_table_naming_row_and_column() {
    let tmp = tempfile::tempdir().unwrap();
    let s = broken_scenario(
        tmp.path(),
        "id,area_ha,rain_mm,pet_mm,vulnerable_ha,scattered_ha,medium_ha,dense_ha\n\
         a,100,1000,800,50,1,1,1\n\
         b,100,lots,800,50,1,1,1\n\
         c,-5,1000,800,50,1,1,1\n",
    );
    let o = run(&["check", s.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2), "{}", text(&o));
    let t = text(&o);
    assert!(t.contains("row 3") && t.contains("'rain_mm'") && t.contains("'lots' is not a number"), "{t}");
    // Every problem is reported, not only the first.
    assert!(t.contains("row 4") && t.contains("'area_ha'") && t.contains("out of range"), "{t}");
    assert!(t.contains("c.csv"), "{t}");
}

#[test]
fn check_accepts_the_demo_and_missing_files_exit_2() {
    let o = run(&["check", demo().to_str().unwrap()]);
    assert!(o.status.success(), "{}", text(&o));
    let o = run(&["check", "/no/such/scenario.toml"]);
    assert_eq!(o.status.code(), Some(2));
    let o = run(&["run", "--no-such-flag"]);
    assert_eq!(o.status.code(), Some(2));
    let o = run(&["--help"]);
    assert_eq!(o.status.code(), Some(0));
}

#[test]
fn unknown_scenario_key_is_reported_with_a_suggestion() {
    let tmp = tempfile::tempdir().unwrap();
    let s =
        broken_scenario(tmp.path(), "id,area_ha,rain_mm,pet_mm,vulnerable_ha,scattered_ha,medium_ha,dense_ha\na,100,1000,800,50,1,1,1\n");
    let mut t = std::fs::read_to_string(&s).unwrap();
    t.push_str("\n[invasion]\nspread_rate_per_year = 0.05\n");
    std::fs::write(&s, t).unwrap();
    let o = run(&["check", s.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2));
    let t = text(&o);
    assert!(t.contains("invasion.spread_rate_per_year") && t.contains("did you mean 'spread_rate_per_yr'"), "{t}");
    assert!(t.contains("line 7, key 'invasion.spread_rate_per_year'"), "line of the key: {t}");
}

#[test]
fn curve_json_and_table() {
    // Source: Zhang et al. (2001) eq. 8 at E0 = P: ET/P = (1 + w)/(2 + w) = 0.75 for w = 2.
    let o = run(&["curve", "--rain-mm", "1000", "--pet-mm", "1000", "--canopy-fraction", "1", "--interception-fraction", "0", "--json"]);
    assert!(o.status.success());
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert!((v["et_mm"].as_f64().unwrap() - 750.0).abs() < 1e-9);
    assert!((v["yield_mm"].as_f64().unwrap() - 250.0).abs() < 1e-9);
    // With the default canopy interception (c = 0.25, β = 0.6; src/model/interception.rs):
    // I = 250 mm; the rest, 750 mm, meets E0 − β·I = 850 mm in Zhang's curve with w = 2.
    let o = run(&["curve", "--rain-mm", "1000", "--pet-mm", "1000", "--canopy-fraction", "1", "--json"]);
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let (p, e0): (f64, f64) = (750.0, 850.0);
    let zhang = p * (1.0 + 2.0 * e0 / p) / (1.0 + 2.0 * e0 / p + p / e0);
    assert!((v["et_mm"].as_f64().unwrap() - (250.0 + zhang)).abs() < 1e-9, "{v}");
    assert!((v["interception_forest_mm"].as_f64().unwrap() - 250.0).abs() < 1e-9);
    // Regression: no rain has no evaporative ratio; refused, not ET/P = 0.
    let o = run(&["curve", "--rain-mm", "0", "--pet-mm", "800"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(text(&o).contains("undefined without rain"), "{}", text(&o));
    let o = run(&["curve", "--rain-mm", "1000", "--pet-mm", "1000", "--method", "fu", "--omega-grass", "2"]);
    assert!(o.status.success());
    // Source: Fu (1981): ω = 2, φ = 1 → ET/P = 2 − √2 = 0.5858.
    assert!(String::from_utf8_lossy(&o.stdout).contains("585.8"), "{}", text(&o));
    let o = run(&["curve", "--rain-mm", "1000", "--pet-mm", "1000", "--canopy-fraction", "1.5"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(text(&o).contains("--canopy-fraction"));
}

/// Regression (issue 14): a bad command-line value was reported as
/// "column '--shard'"; it is an option, and every command says so.
#[test]
fn command_line_problems_name_the_option_not_a_column() {
    let tmp = tempfile::tempdir().unwrap();
    let dir = tmp.path();
    let out = |name: &str| dir.join(name).to_str().unwrap().to_string();
    let observed = Path::new(env!("CARGO_MANIFEST_DIR")).join("demo-data/observed_flows.csv");
    let weather = dir.join("w.csv");
    std::fs::write(&weather, "date,tmax_c,tmin_c\n2021-01-01,20,8\n").unwrap();
    let demo = demo();
    let cases: Vec<(Vec<String>, Vec<&str>)> = vec![
        (
            ["curve", "--rain-mm", "1000", "--pet-mm", "1000", "--canopy-fraction", "1.5"].map(String::from).to_vec(),
            vec!["--canopy-fraction"],
        ),
        (["curve", "--rain-mm", "0", "--pet-mm", "800"].map(String::from).to_vec(), vec!["--rain-mm"]),
        (["curve", "--rain-mm", "900", "--pet-mm=-5", "--w-grass", "0"].map(String::from).to_vec(), vec!["--pet-mm", "--w-grass"]),
        // The demo's strategies share one basin budget, which a shard cannot split.
        (vec!["run".into(), demo.to_str().unwrap().into(), "--out".into(), out("r"), "--shard".into(), "1/2".into()], vec!["--shard"]),
        (
            vec![
                "fit".into(),
                demo.to_str().unwrap().into(),
                "--observed".into(),
                observed.to_str().unwrap().into(),
                "--out".into(),
                out("f"),
                "--moving-average-yr".into(),
                "0".into(),
                "--bootstrap".into(),
                "3".into(),
                "--donor".into(),
                "nothing".into(),
            ],
            vec!["--moving-average-yr", "--bootstrap", "--donor"],
        ),
        (vec!["pet".into(), weather.to_str().unwrap().into(), "--out".into(), out("pet.csv")], vec!["--latitude-deg", "--elevation-m"]),
        (
            vec![
                "pet".into(),
                weather.to_str().unwrap().into(),
                "--out".into(),
                weather.to_str().unwrap().into(),
                "--latitude-deg".into(),
                "-44.3".into(),
                "--elevation-m".into(),
                "600".into(),
            ],
            vec!["--out"],
        ),
    ];
    for (args, options) in cases {
        let args: Vec<&str> = args.iter().map(String::as_str).collect();
        let o = run(&args);
        let t = text(&o);
        assert_eq!(o.status.code(), Some(2), "{args:?}: {t}");
        for opt in options {
            assert!(t.contains(&format!("option '{opt}'")), "{args:?} should name option '{opt}': {t}");
        }
        assert!(!t.contains("column '--"), "{args:?}: {t}");
    }
}

#[test]
fn pet_from_weather_feeds_the_projection_and_matches_the_pet_command() {
    let tmp = tempfile::tempdir().unwrap();
    let dir = tmp.path();
    // Invented daily temperatures for 2020–2021 (temperature only: Hargreaves).
    let mut w = String::from("date,tmax_c,tmin_c\n");
    for (year, days) in [(2020, 366), (2021, 365)] {
        for d in 0..days {
            let month_day = yieldshift_date(year, d);
            let season = ((d as f64) / days as f64 * std::f64::consts::TAU).cos();
            w.push_str(&format!("{month_day},{:.1},{:.1}\n", 16.0 + 7.0 * season, 5.0 + 5.0 * season));
        }
    }
    std::fs::write(dir.join("weather.csv"), w).unwrap();
    std::fs::copy(demo().parent().unwrap().join("catchments.csv"), dir.join("catchments.csv")).unwrap();
    let s = dir.join("s.toml");
    std::fs::write(
        &s,
        "start_year = 2020\nhorizon_years = 3\ncatchments = \"catchments.csv\"\n\n[climate]\nweather = \"weather.csv\"\nlatitude_deg = -44.3\nelevation_m = 600\nbeyond_record = \"mean\"\n\n\
         [[contaminant]]\nname = \"nitrate_n\"\nopen_export_kg_per_ha_yr = 2.5\nforest_export_kg_per_ha_yr = 2.2\n\n\
         [[contaminant]]\nname = \"total_p\"\nopen_export_kg_per_ha_yr = 0.3\nforest_export_kg_per_ha_yr = 0.25\n",
    )
    .unwrap();
    let out = dir.join("res");
    let o = run(&["run", s.to_str().unwrap(), "--out", out.to_str().unwrap(), "--figures", "none"]);
    assert!(o.status.success(), "{}", text(&o));
    let info = std::fs::read_to_string(out.join("run_info.json")).unwrap();
    assert!(info.contains("\"method\": \"hargreaves\""), "{info}");
    // The weather covers 2020–2021 of the 2020–2023 projection: warned, recorded per
    // catchment and stated in the report's methods, never spliced silently.
    assert!(text(&o).contains("warning:") && text(&o).contains("in 2 of its 4 projected years"), "{}", text(&o));
    let ri: serde_json::Value = serde_json::from_str(&info).unwrap();
    let partial = ri["pet_from_weather"]["partial"].as_array().unwrap();
    assert_eq!(partial.len(), 6, "{info}");
    assert_eq!(partial[0]["weather_years"], 2);
    assert_eq!(partial[0]["long_term_years"], 2);
    let md = std::fs::read_to_string(out.join("report.md")).unwrap();
    assert!(
        md.contains("by the hargreaves method") && md.contains("covers only part of the projection"),
        "report methods lack the PET source"
    );
    let o = run(&[
        "pet",
        dir.join("weather.csv").to_str().unwrap(),
        "--out",
        dir.join("pet.csv").to_str().unwrap(),
        "--latitude-deg",
        "-44.3",
        "--elevation-m",
        "600",
    ]);
    assert!(o.status.success(), "{}", text(&o));
    let annual = std::fs::read_to_string(dir.join("pet_annual.csv")).unwrap();
    let pet2021: f64 = annual.lines().find(|l| l.contains(",2021,")).unwrap().split(',').nth(2).unwrap().parse().unwrap();
    let yearly = std::fs::read_to_string(out.join("yearly.csv")).unwrap();
    let row = yearly.lines().find(|l| l.starts_with("skelvane,no-control,2021,")).unwrap();
    let used: f64 = row.split(',').nth(4).unwrap().parse().unwrap();
    assert!((used - pet2021).abs() < 0.051, "projection PET {used} vs pet command {pet2021}");
    // 2023 is beyond the weather record: the catchment's long-term mean (800 mm for skelvane).
    let row = yearly.lines().find(|l| l.starts_with("skelvane,no-control,2023,")).unwrap();
    assert_eq!(row.split(',').nth(4).unwrap(), "800.0");
    // A gap that cannot be filled is refused, naming the year.
    let w = std::fs::read_to_string(dir.join("weather.csv")).unwrap();
    let cut: String = w.lines().enumerate().filter(|(i, _)| !(100..130).contains(i)).map(|(_, l)| format!("{l}\n")).collect();
    std::fs::write(dir.join("weather.csv"), cut).unwrap();
    let o = run(&["check", s.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2), "{}", text(&o));
    assert!(text(&o).contains("2020") && text(&o).contains("weather.csv"), "{}", text(&o));
}

/// YYYY-MM-DD of day `d` (0-based) of `year`.
fn yieldshift_date(year: i32, d: usize) -> String {
    let leap = year % 4 == 0 && (year % 100 != 0 || year % 400 == 0);
    let lens = [31, if leap { 29 } else { 28 }, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];
    let (mut m, mut rem) = (0, d);
    while rem >= lens[m] {
        rem -= lens[m];
        m += 1;
    }
    format!("{year}-{:02}-{:02}", m + 1, rem + 1)
}

#[test]
fn boundaries_in_and_results_out_and_bad_geojson_exits_2() {
    let tmp = tempfile::tempdir().unwrap();
    let out = tmp.path().join("res");
    let o = run(&["run", demo().to_str().unwrap(), "--out", out.to_str().unwrap(), "--figure-format", "png"]);
    assert!(o.status.success(), "{}", text(&o));
    let g: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(out.join("catchments.geojson")).unwrap()).unwrap();
    assert_eq!(g["type"], "FeatureCollection");
    assert_eq!(g["features"].as_array().unwrap().len(), 6);
    for m in ["map_yield_change_20y.png", "map_yield_change_horizon.png", "map_yield_change_horizon_contain-early.png"] {
        assert!(out.join("figures").join(m).exists(), "{m}");
    }
    assert!(out.join("inputs").join("catchments.geojson").exists());

    // An unclosed ring in the first feature is refused, naming the feature.
    let dir = tmp.path().join("bad");
    std::fs::create_dir(&dir).unwrap();
    let demo_dir = demo().parent().unwrap().to_path_buf();
    for f in ["catchments.csv", "climate.csv", "scenario.toml"] {
        std::fs::copy(demo_dir.join(f), dir.join(f)).unwrap();
    }
    let mut gj: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(demo_dir.join("catchments.geojson")).unwrap()).unwrap();
    let ring = gj["features"][0]["geometry"]["coordinates"][0].as_array_mut().unwrap();
    ring.pop();
    std::fs::write(dir.join("catchments.geojson"), serde_json::to_string_pretty(&gj).unwrap()).unwrap();
    let o = run(&["check", dir.join("scenario.toml").to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2), "{}", text(&o));
    let t = text(&o);
    assert!(t.contains("catchments.geojson") && t.contains("feature 1"), "{t}");
}

#[test]
fn a_closed_output_pipe_exits_quietly_with_zero() {
    // Regression: `yieldshift check ... | true` panicked ("failed printing to stdout")
    // with exit code 101. The reader closes the pipe before the program writes.
    let demo = Path::new(env!("CARGO_MANIFEST_DIR")).join("demo-data/scenario.toml");
    for args in [vec!["check", demo.to_str().unwrap()], vec!["curve", "--rain-mm", "1400", "--pet-mm", "800"]] {
        let mut child = Command::new(env!("CARGO_BIN_EXE_yieldshift"))
            .args(&args)
            .stdout(std::process::Stdio::piped())
            .stderr(std::process::Stdio::piped())
            .spawn()
            .unwrap();
        drop(child.stdout.take());
        let out = child.wait_with_output().unwrap();
        let stderr = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(0), "{args:?}: {stderr}");
        assert!(!stderr.contains("panicked") && !stderr.contains("error"), "{args:?}: {stderr}");
    }
}
