//! Every bracketed value the report prints — a central value followed by its 5–95 %
//! ensemble range, "−3.3 (−3.7 to −2.9)" — lies inside its own range: the headline
//! changes are 10-year means computed the same way for the central run and for every
//! member (`model::summary::window_change_pct`), so one wet or dry year of the central
//! run's climate cannot push it outside the members' spread.
//!
//! Checked on the demo and on randomised scenarios (seeded, so a failure reproduces):
//! random basins, climates, infestations, networks and programmes, with uncertain
//! parameters whose distributions are centred on the central values and a bootstrapped
//! climate record. Common practice, no published source: an ensemble's central estimate
//! should lie within its own stated range; the issue tracker's report gave "−5.7 (−15.3
//! to −6.7)" when single years were used.

use rand::{RngExt, SeedableRng};
use std::path::Path;
use std::process::Command;

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_yieldshift"))
}

/// Parses a number as the report writes it (Unicode minus, thousands separators, `+`).
fn parse_num(s: &str) -> Option<f64> {
    s.replace('\u{2212}', "-").replace([',', '+'], "").trim().parse().ok()
}

/// Every "x (a to b)" of the Markdown report, with the line it is on: the token before
/// an opening bracket (an optional "%" between) and the two numbers inside it.
fn bracketed(md: &str) -> Vec<(f64, f64, f64, String)> {
    let mut out = Vec::new();
    for line in md.lines() {
        let mut rest = line;
        while let Some(open) = rest.find('(') {
            let before = rest[..open].trim_end().trim_end_matches('%').trim_end();
            let after = &rest[open + 1..];
            let Some(close) = after.find(')') else { break };
            let inside = &after[..close];
            if let Some((a, b)) = inside.split_once(" to ") {
                let x = before.rsplit([' ', '|', '(']).next().and_then(parse_num);
                if let (Some(x), Some(a), Some(b)) = (x, parse_num(a), parse_num(b)) {
                    out.push((x, a, b, line.to_string()));
                }
            }
            rest = &after[close + 1..];
        }
    }
    out
}

/// Asserts every bracketed value of `dir/report.md` is inside its range (to the printed
/// precision: one step of the last decimal); returns how many were checked.
fn check_report(dir: &Path) -> usize {
    let md = std::fs::read_to_string(dir.join("report.md")).unwrap();
    let found = bracketed(&md);
    for (x, a, b, line) in &found {
        assert!(a <= b, "range printed backwards: {a} to {b} in: {line}");
        let step = 0.1 + 1e-9;
        assert!(*x >= a - step && *x <= b + step, "{x} lies outside its own range ({a} to {b}) in: {line}");
    }
    found.len()
}

fn run(scenario: &Path, out: &Path) {
    let o =
        bin().args(["run", scenario.to_str().unwrap(), "--out", out.to_str().unwrap(), "--figures", "none", "--quiet"]).output().unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
}

#[test]
fn demo_central_values_lie_inside_their_ranges() {
    let tmp = tempfile::tempdir().unwrap();
    let out = tmp.path().join("demo");
    run(Path::new("demo-data/scenario.toml"), &out);
    let n = check_report(&out);
    assert!(n > 50, "only {n} bracketed values in the demo report");
}

/// Writes a random basin scenario into `dir`.
fn random_scenario(dir: &Path, seed: u64) -> std::path::PathBuf {
    let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(seed);
    let n = rng.random_range(3..=6);
    let mut cat = String::from("id,name,area_ha,rain_mm,pet_mm,vulnerable_ha,scattered_ha,medium_ha,dense_ha,forest_ha,flows_to\n");
    let mut rains = Vec::new();
    for i in 0..n {
        let area: f64 = rng.random_range(500.0..6000.0);
        let rain: f64 = rng.random_range(700.0..2000.0);
        let pet: f64 = rng.random_range(500.0..1100.0);
        let vulnerable = area * rng.random_range(0.4..0.95);
        let scattered = vulnerable * rng.random_range(0.0..0.15);
        let medium = vulnerable * rng.random_range(0.0..0.06);
        let dense = vulnerable * rng.random_range(0.0..0.03);
        // The last catchment receives the others' flow (a node), some drain in a chain.
        let to = if i + 1 < n {
            if rng.random_bool(0.5) {
                format!("c{}", n - 1)
            } else {
                format!("c{}", i + 1)
            }
        } else {
            String::new()
        };
        cat.push_str(&format!(
            "c{i},Basin {i},{area:.0},{rain:.0},{pet:.0},{vulnerable:.0},{scattered:.1},{medium:.1},{dense:.1},0,{to}\n"
        ));
        rains.push((rain, pet));
    }
    std::fs::write(dir.join("catchments.csv"), cat).unwrap();
    let mut clim = String::from("catchment,year,rain_mm,pet_mm\n");
    let cv: f64 = rng.random_range(0.1..0.3);
    for (i, (rain, pet)) in rains.iter().enumerate() {
        for y in 1997..2027 {
            let f: f64 = 1.0 + cv * (rng.random::<f64>() * 2.0 - 1.0) * 1.7;
            let g: f64 = 1.0 + 0.05 * (rng.random::<f64>() * 2.0 - 1.0);
            clim.push_str(&format!("c{i},{y},{:.1},{:.1}\n", rain * f.max(0.3), pet * g));
        }
    }
    std::fs::write(dir.join("climate.csv"), clim).unwrap();
    let w_f: f64 = rng.random_range(1.6..2.4);
    let w_g: f64 = rng.random_range(0.4..0.8);
    let spread: f64 = rng.random_range(0.03..0.09);
    let half: f64 = rng.random_range(9.0..15.0);
    let horizon = rng.random_range(30..=60);
    let budget = rng.random_range(20_000..200_000);
    let text = format!(
        "title = \"Random basin {seed}\"\nstart_year = 2027\nhorizon_years = {horizon}\ncatchments = \"catchments.csv\"\n\n\
         [climate]\ntable = \"climate.csv\"\nbeyond_record = \"cycle\"\n\n\
         [hydrology]\nmethod = \"zhang\"\n\
         w_forest = {{ dist = \"pert\", min = {:.3}, mode = {w_f:.3}, max = {:.3} }}\n\
         w_grass = {{ dist = \"uniform\", min = {:.3}, max = {:.3}, per = \"catchment\" }}\n\n\
         [invasion]\nspread_rate_per_yr = {{ dist = \"triangular\", min = {:.4}, mode = {spread:.4}, max = {:.4} }}\n\n\
         [canopy_closure]\ncurve = \"logistic\"\nhalf_closure_age_yr = {{ dist = \"normal\", mean = {half:.2}, sd = 1.5, min = {:.2}, max = {:.2} }}\n\n\
         [ensemble]\nmembers = 40\nseed = {seed}\nclimate = \"bootstrap\"\nblock_years = 5\n\n\
         [[contaminant]]\nname = \"nitrate_n\"\nopen_export_kg_per_ha_yr = 2.5\nforest_export_kg_per_ha_yr = 2.2\nguideline_mg_per_l = 1.0\n\n\
         [[treatment]]\nname = \"ground\"\nclass = \"scattered\"\ncost_per_ha = 45\n\n\
         [[treatment]]\nname = \"ground\"\nclass = \"medium\"\ncost_per_ha = 420\n\n\
         [[treatment]]\nname = \"aerial\"\nclass = \"dense\"\ncost_per_ha = 2200\n\n\
         [[strategy]]\nname = \"early\"\nstart_year = 2027\nrule = \"scattered-first\"\nbudget_per_yr = {budget}\nefficacy = 0.95\n",
        w_f - 0.4,
        w_f + 0.4,
        w_g - 0.15,
        w_g + 0.15,
        spread - 0.02,
        spread + 0.02,
        half - 5.0,
        half + 5.0,
    );
    let path = dir.join("scenario.toml");
    std::fs::write(&path, text).unwrap();
    path
}

#[test]
fn randomised_scenarios_central_values_lie_inside_their_ranges() {
    let mut checked = 0;
    for seed in 1..=6 {
        let tmp = tempfile::tempdir().unwrap();
        let s = random_scenario(tmp.path(), seed);
        let out = tmp.path().join("out");
        run(&s, &out);
        checked += check_report(&out);
    }
    assert!(checked > 100, "only {checked} bracketed values checked");
}

#[test]
fn the_bracket_parser_reads_what_the_report_writes() {
    let v = bracketed("| `x` | −1.2 (−1.3 to −0.9) | +2.1 % (+1.6 to +2.8) | 12,345 (12,000 to 13,000) |");
    assert_eq!(v.len(), 3);
    assert_eq!((v[0].0, v[0].1, v[0].2), (-1.2, -1.3, -0.9));
    assert_eq!((v[1].0, v[1].1, v[1].2), (2.1, 1.6, 2.8));
    assert_eq!(v[2].0, 12345.0);
}
