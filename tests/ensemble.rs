//! Ensembles: distributions, sampling, percentiles, collapse onto the deterministic
//! run, and reproducibility across thread counts.

mod common;

use approx::assert_abs_diff_eq;
use common::{params, tussock};
use statrs::distribution::{ContinuousCDF, Normal};
use std::path::Path;
use std::process::Command;
use yieldshift::model::kernel::{project_lean, LeanYears};
use yieldshift::model::stats::percentile_sorted;
use yieldshift::model::uncertainty::{uniforms, Distribution, Sampling};
use yieldshift::model::{project_catchment, ClassAreas, ClimateYear};

fn sample(d: &Distribution, n: usize) -> Vec<f64> {
    uniforms(Sampling::LatinHypercube, 11, 5, n).into_iter().map(|u| d.quantile(u)).collect()
}

fn mean_var(x: &[f64]) -> (f64, f64) {
    let m = x.iter().sum::<f64>() / x.len() as f64;
    (m, x.iter().map(|v| (v - m) * (v - m)).sum::<f64>() / (x.len() - 1) as f64)
}

#[test]
fn distribution_moments_match_their_formulas() {
    let n = 20_000;
    // (distribution, analytic mean, analytic variance, source)
    let cases: Vec<(Distribution, f64, f64)> = vec![
        // Source: uniform moments (a + b)/2, (b − a)²/12 (e.g. Johnson, Kotz & Balakrishnan 1995, ch. 26).
        (Distribution::Uniform { min: 2.0, max: 5.0 }, 3.5, 9.0 / 12.0),
        // Source: triangular moments (a + b + c)/3, (a² + b² + c² − ab − ac − bc)/18 (Evans, Hastings & Peacock 2000, ch. 40).
        (
            Distribution::Triangular { min: 0.04, mode: 0.06, max: 0.08 },
            0.06,
            (0.04f64.powi(2) + 0.06f64.powi(2) + 0.08f64.powi(2) - 0.04 * 0.06 - 0.04 * 0.08 - 0.06 * 0.08) / 18.0,
        ),
        // Source: normal moments (untruncated: bounds at ±10 sd change nothing measurable).
        (Distribution::Normal { mean: 12.0, sd: 2.0, min: -8.0, max: 32.0 }, 12.0, 4.0),
        // Source: log-normal moments exp(μ + σ²/2), (e^{σ²} − 1) e^{2μ + σ²} (Aitchison & Brown 1957).
        (
            Distribution::LogNormal { median: 3.0, sigma_log: 0.25 },
            3.0 * (0.25f64.powi(2) / 2.0).exp(),
            (0.0625f64.exp() - 1.0) * 9.0 * 0.0625f64.exp(),
        ),
        // Source: beta-PERT mean (a + 4m + b)/6 and variance (μ − a)(b − μ)/7 (Vose 2008, §10.3.5; exact for the PERT form with λ = 4 when the mode is central).
        (Distribution::Pert { min: 1.5, mode: 2.0, max: 2.5 }, 2.0, (0.5 * 0.5) / 7.0),
        (Distribution::Fixed { value: 7.0 }, 7.0, 0.0),
    ];
    for (d, m, v) in cases {
        let (sm, sv) = mean_var(&sample(&d, n));
        assert_abs_diff_eq!(sm, m, epsilon = 1e-3 * m.abs().max(1e-3) + 1e-12);
        assert_abs_diff_eq!(sv, v, epsilon = 0.01 * v + 1e-12);
    }
}

#[test]
fn truncated_normal_stays_inside_and_matches_its_mean() {
    // Source: truncated-normal mean μ + σ(φ(α) − φ(β))/(Φ(β) − Φ(α)) (Johnson, Kotz & Balakrishnan 1994, §10.1).
    let d = Distribution::Normal { mean: 0.0, sd: 1.0, min: 0.0, max: f64::INFINITY };
    let x = sample(&d, 20_000);
    assert!(x.iter().all(|&v| v >= 0.0));
    let expected = (2.0 / std::f64::consts::PI).sqrt(); // half-normal mean
    assert_abs_diff_eq!(mean_var(&x).0, expected, epsilon = 2e-3);
}

#[test]
fn percentiles_of_a_normal_sample_match_the_inverse_cdf() {
    // Source: statrs Normal::inverse_cdf as the reference quantile function; the
    // sample is the LHS of N(100, 15²), whose order statistics sit at the stratum centres.
    let d = Distribution::Normal { mean: 100.0, sd: 15.0, min: f64::NEG_INFINITY, max: f64::INFINITY };
    let mut x = sample(&d, 40_000);
    x.sort_by(f64::total_cmp);
    let n = Normal::new(100.0, 15.0).unwrap();
    for p in [0.05, 0.25, 0.5, 0.75, 0.95] {
        assert_abs_diff_eq!(percentile_sorted(&x, p), n.inverse_cdf(p), epsilon = 0.05);
    }
}

#[test]
fn lean_kernel_matches_the_reference_projection() {
    use yieldshift::model::dilution::ConcentrationDischarge;
    // Wet and dry years (every 13th year a near-drought) so that low-runoff and
    // above-ceiling flags occur, and a point source beside the diffuse load.
    let mut c = tussock(2000.0, 1200.0, 900.0, 1800.0, ClassAreas { scattered_ha: 120.0, medium_ha: 60.0, dense_ha: 30.0 });
    c.point_kg_per_yr = vec![400.0];
    let clim: Vec<ClimateYear> = (0..61)
        .map(|t| ClimateYear { rain_mm: if t % 13 == 5 { 250.0 } else { 1200.0 + 150.0 * ((t as f64) * 0.7).sin() }, pet_mm: 900.0 })
        .collect();
    for b in [-1.0, 0.0, -0.5] {
        let mut p = params();
        p.contaminants[0].cq = ConcentrationDischarge::new(b).unwrap();
        let reference = project_catchment(&c, &clim, &p, 2027);
        let mut lean = LeanYears::default();
        project_lean(&c, &clim, &p, &mut lean);
        let mut flagged = 0;
        for (t, y) in reference.iter().enumerate() {
            assert_abs_diff_eq!(lean.yield_mm[t], y.yield_mm, epsilon = 1e-9);
            assert_abs_diff_eq!(lean.baseline_yield_mm[t], y.baseline_yield_mm, epsilon = 1e-9);
            assert_abs_diff_eq!(lean.loads_kg_per_yr[t], y.loads_kg_per_yr[0], epsilon = 1e-9);
            match (lean.concentrations_mg_per_l[t], y.concentrations[0]) {
                (Some(a), Ok(r)) => assert_abs_diff_eq!(a, r, epsilon = 1e-12 * r.max(1.0)),
                (None, Err(_)) => flagged += 1,
                (a, r) => panic!("b {b}, year {t}: kernel {a:?}, projection {r:?}"),
            }
        }
        // Pure dilution of the dry years goes above the ceiling; the flow-following
        // loads stay below it. Either way both paths agree on every year.
        assert_eq!(flagged > 0, b == -1.0, "b {b}: {flagged} flagged years");
    }
}

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_yieldshift"))
}

fn demo_dir() -> std::path::PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("demo-data")
}

fn scenario_with(dir: &Path, extra: &str, replace_spread: Option<&str>) -> std::path::PathBuf {
    for f in ["catchments.csv", "climate.csv", "catchments.geojson"] {
        std::fs::copy(demo_dir().join(f), dir.join(f)).unwrap();
    }
    let mut text = std::fs::read_to_string(demo_dir().join("scenario.toml")).unwrap();
    // Keep the deterministic demo but replace its [ensemble] section.
    let start = text.find("[ensemble]").unwrap();
    let end = start + text[start..].find("[dilution]").unwrap();
    text.replace_range(start..end, extra);
    if let Some(r) = replace_spread {
        for line in text.clone().lines() {
            if line.contains("dist =") {
                let key = line.split('=').next().unwrap().trim();
                let fixed = format!("{key} = {r}");
                text = text.replace(line, &fixed);
            }
        }
    }
    let p = dir.join("scenario.toml");
    std::fs::write(&p, text).unwrap();
    p
}

#[test]
fn fixed_parameters_and_no_climate_variability_collapse_onto_the_deterministic_run() {
    let tmp = tempfile::tempdir().unwrap();
    // Every distribution replaced by a fixed distribution at its central value is
    // approximated here by replacing them with plain numbers; climate = "none".
    let s = scenario_with(tmp.path(), "[ensemble]\nmembers = 7\nclimate = \"none\"\n\n", Some("{ dist = \"fixed\", value = 0.5 }"));
    let text = std::fs::read_to_string(&s).unwrap();
    // Fixed values valid for every key that had a distribution in the demo:
    let text = text
        .replace("spread_rate_per_yr = { dist = \"fixed\", value = 0.5 }", "spread_rate_per_yr = { dist = \"fixed\", value = 0.06 }")
        .replace("w_forest = { dist = \"fixed\", value = 0.5 }", "w_forest = { dist = \"fixed\", value = 2.0 }")
        .replace("half_closure_age_yr = { dist = \"fixed\", value = 0.5 }", "half_closure_age_yr = { dist = \"fixed\", value = 12 }");
    std::fs::write(&s, text).unwrap();
    let out = tmp.path().join("res");
    let o = bin().args(["run", s.to_str().unwrap(), "--out", out.to_str().unwrap(), "--figures", "none"]).output().unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let yearly = std::fs::read_to_string(out.join("yearly.csv")).unwrap();
    let hdr: Vec<&str> = yearly.lines().next().unwrap().split(',').collect();
    let col = |n: &str| hdr.iter().position(|h| *h == n).unwrap();
    let ens = std::fs::read_to_string(out.join("ensemble.csv")).unwrap();
    let mut checked = 0;
    for line in yearly.lines().skip(1) {
        let f: Vec<&str> = line.split(',').collect();
        let key = format!("{},local,{},{},yield_mm,", f[0], f[1], f[2]);
        let row = ens.lines().find(|l| l.starts_with(&key)).unwrap_or_else(|| panic!("{key}"));
        let e: Vec<&str> = row.split(',').collect();
        let det: f64 = f[col("yield_mm")].parse().unwrap();
        for q in &e[5..11] {
            let v: f64 = q.parse().unwrap();
            assert_abs_diff_eq!(v, det, epsilon = 1e-3);
        }
        checked += 1;
    }
    assert!(checked >= 6 * 61 * 4);
    // Programme economics collapse onto the central run's too (economics.csv against
    // summary.csv), for catchments, nodes and the basin: computed the same way.
    let mut summary = csv::Reader::from_path(out.join("summary.csv")).unwrap();
    let sh: Vec<String> = summary.headers().unwrap().iter().map(str::to_string).collect();
    let scol = |n: &str| sh.iter().position(|h| h == n).unwrap();
    let eco = std::fs::read_to_string(out.join("economics.csv")).unwrap();
    let mut eco_checked = 0;
    for rec in summary.records() {
        let rec = rec.unwrap();
        let f: Vec<&str> = rec.iter().collect();
        if f[scol("strategy")] == "no-control" {
            continue;
        }
        for var in ["total_cost", "total_cost_pv", "water_saved_m3", "levelised_cost_per_m3", "npv", "benefit_cost_ratio"] {
            let cell = f[scol(var)];
            if cell.is_empty() {
                continue;
            }
            let key = format!("{},{},{},{var},", f[scol("catchment")], f[scol("scope")], f[scol("strategy")]);
            let row = eco.lines().find(|l| l.starts_with(&key)).unwrap_or_else(|| panic!("economics.csv has no row {key}"));
            let e: Vec<&str> = row.split(',').collect();
            let det: f64 = cell.parse().unwrap();
            for q in &e[4..10] {
                let v: f64 = q.parse().unwrap();
                assert!((v - det).abs() <= 1e-6 * det.abs().max(1.0) + 0.01, "{key}: member {v} vs central {det}");
            }
            eco_checked += 1;
        }
    }
    assert!(eco_checked > 50, "only {eco_checked} economics cells checked");
    assert!(eco.lines().any(|l| l.starts_with("basin,basin,") && l.contains(",npv,")), "basin economics rows");
}

#[test]
fn same_seed_gives_identical_bytes_with_one_or_two_threads() {
    let tmp = tempfile::tempdir().unwrap();
    let s = scenario_with(
        tmp.path(),
        "[ensemble]\nmembers = 24\nseed = 9\nclimate = \"bootstrap\"\nblock_years = 4\nwrite_members = true\n\n",
        None,
    );
    let mut outputs = Vec::new();
    for threads in ["1", "2"] {
        let out = tmp.path().join(format!("res{threads}"));
        let o = bin()
            .args(["run", s.to_str().unwrap(), "--out", out.to_str().unwrap(), "--figures", "none", "--threads", threads, "--quiet"])
            .output()
            .unwrap();
        assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
        outputs.push(out);
    }
    for f in ["ensemble.csv", "sensitivity.csv", "members.csv", "yearly.csv", "summary.csv"] {
        let a = std::fs::read(outputs[0].join(f)).unwrap();
        let b = std::fs::read(outputs[1].join(f)).unwrap();
        assert!(!a.is_empty());
        assert!(a == b, "{f} differs between 1 and 2 threads");
    }
    let ens = std::fs::read_to_string(outputs[0].join("ensemble.csv")).unwrap();
    assert!(ens.starts_with("catchment,scope,strategy,year,variable,p5,p25,p50,p75,p95,mean,members,prob_above_guideline\n"));
    // Bands are ordered and not degenerate for yield.
    let row = ens.lines().find(|l| l.starts_with("corvisk,local,no-control,2057,yield_mm,")).unwrap();
    let q: Vec<f64> = row.split(',').skip(5).take(5).map(|v| v.parse().unwrap()).collect();
    assert!(q.windows(2).all(|w| w[0] <= w[1]) && q[4] > q[0], "{row}");
    let sens = std::fs::read_to_string(outputs[0].join("sensitivity.csv")).unwrap();
    assert!(sens.lines().any(|l| l.starts_with("basin,no-control,horizon,")));
    // Members file: catchments × members × years × strategies rows.
    let members = std::fs::read_to_string(outputs[0].join("members.csv")).unwrap();
    assert_eq!(members.lines().count() - 1, 6 * 24 * 61 * 4);
}

fn files_under(dir: &Path) -> Vec<std::path::PathBuf> {
    let mut out = Vec::new();
    for e in std::fs::read_dir(dir).unwrap() {
        let p = e.unwrap().path();
        if p.is_dir() {
            out.extend(files_under(&p));
        } else {
            out.push(p);
        }
    }
    out.sort();
    out
}

#[test]
fn sharded_and_merged_equals_unsharded_byte_for_byte() {
    let tmp = tempfile::tempdir().unwrap();
    let s = scenario_with(tmp.path(), "[ensemble]\nmembers = 12\nseed = 5\nclimate = \"bootstrap\"\nwrite_members = true\n\n", None);
    // Per-catchment budgets: the only strategies that can be sharded.
    let text =
        std::fs::read_to_string(&s).unwrap().replace("budget_per_yr = 150000", "budget_per_yr = 30000\nbudget_scope = \"catchment\"");
    std::fs::write(&s, text).unwrap();
    let run = |args: &[&str]| {
        let o = bin().args(args).output().unwrap();
        assert!(o.status.success(), "{:?}: {}", args, String::from_utf8_lossy(&o.stderr));
    };
    let p = |n: &str| tmp.path().join(n).to_str().unwrap().to_string();
    run(&["run", s.to_str().unwrap(), "--out", &p("full"), "--quiet", "--figure-format", "png"]);
    for k in 1..=3 {
        run(&[
            "run",
            s.to_str().unwrap(),
            "--out",
            &p(&format!("s{k}")),
            "--shard",
            &format!("{k}/3"),
            "--quiet",
            "--figure-format",
            "png",
        ]);
    }
    run(&["merge", &p("s3"), &p("s1"), &p("s2"), "--out", &p("merged")]);
    let full = files_under(&tmp.path().join("full"));
    let merged = files_under(&tmp.path().join("merged"));
    let rel = |v: &[std::path::PathBuf], root: &str| {
        v.iter().map(|f| f.strip_prefix(tmp.path().join(root)).unwrap().to_path_buf()).collect::<Vec<_>>()
    };
    assert_eq!(rel(&full, "full"), rel(&merged, "merged"));
    for (a, b) in full.iter().zip(&merged) {
        assert!(std::fs::read(a).unwrap() == std::fs::read(b).unwrap(), "{} differs", a.display());
    }
    assert!(full.iter().any(|f| f.ends_with("summary.csv")) && full.len() > 40);
}

#[test]
fn shared_budgets_cannot_be_sharded_and_incomplete_merges_are_refused() {
    let tmp = tempfile::tempdir().unwrap();
    let s = scenario_with(tmp.path(), "[ensemble]\nmembers = 4\n\n", None);
    let o = bin().args(["run", s.to_str().unwrap(), "--out", tmp.path().join("x").to_str().unwrap(), "--shard", "1/2"]).output().unwrap();
    assert_eq!(o.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&o.stderr).contains("budget_scope = \"catchment\""));
    let o = bin().args(["run", s.to_str().unwrap(), "--out", "x", "--shard", "3/2"]).output().unwrap();
    assert_eq!(o.status.code(), Some(2));
    let text =
        std::fs::read_to_string(&s).unwrap().replace("budget_per_yr = 150000", "budget_per_yr = 30000\nbudget_scope = \"catchment\"");
    std::fs::write(&s, text).unwrap();
    let one = tmp.path().join("s1");
    let o =
        bin().args(["run", s.to_str().unwrap(), "--out", one.to_str().unwrap(), "--shard", "1/2", "--figures", "none"]).output().unwrap();
    assert!(o.status.success());
    let o = bin().args(["merge", one.to_str().unwrap(), "--out", tmp.path().join("m").to_str().unwrap()]).output().unwrap();
    assert_eq!(o.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&o.stderr).contains("shard 2/2 is missing"));
    assert!(!tmp.path().join("m").exists());
}

#[test]
fn calibrated_values_given_as_distributions_vary_only_their_catchments() {
    let tmp = tempfile::tempdir().unwrap();
    let dir = tmp.path();
    std::fs::write(
        dir.join("c.csv"),
        "id,area_ha,rain_mm,pet_mm,vulnerable_ha,scattered_ha,medium_ha,dense_ha\n\
         a,100,1000,800,80,5,5,5\nb,100,1000,800,80,5,5,5\nc,100,1000,800,80,5,5,5\n",
    )
    .unwrap();
    std::fs::write(
        dir.join("s.toml"),
        "start_year = 2027\nhorizon_years = 25\ncatchments = \"c.csv\"\n\n[ensemble]\nmembers = 16\n\n\
         [[calibration]]\ncatchment = \"a\"\nw_grass = { dist = \"pert\", min = 0.4, mode = 0.6, max = 0.9 }\n\n\
         [[calibration]]\ncatchment = \"c\"\ndonor = \"a\"\n",
    )
    .unwrap();
    let out = dir.join("res");
    let o =
        bin().args(["run", dir.join("s.toml").to_str().unwrap(), "--out", out.to_str().unwrap(), "--figures", "none"]).output().unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let ens = std::fs::read_to_string(out.join("ensemble.csv")).unwrap();
    let band = |id: &str| -> Vec<String> {
        let row = ens.lines().find(|l| l.starts_with(&format!("{id},local,no-control,2040,yield_mm,"))).unwrap();
        row.split(',').skip(5).take(5).map(str::to_string).collect()
    };
    assert_ne!(band("a")[0], band("a")[4], "a's calibrated w_grass is uncertain");
    assert_eq!(band("a"), band("c"), "c takes its donor's draws");
    assert_eq!(band("b")[0], band("b")[4], "b is not calibrated and nothing else is uncertain");
    let sens = std::fs::read_to_string(out.join("sensitivity.csv")).unwrap();
    assert!(sens.lines().any(|l| l.starts_with("a,no-control,horizon,") && l.contains("calibration[1].w_grass")), "{sens}");
}

/// A scenario giving every key that may vary (apart from calibration entries) as
/// a distribution, under Zhang's or Fu's method.
fn every_varying_key(dir: &Path, method: &str) -> yieldshift::input::scenario::Scenario {
    use yieldshift::model::params::PARAMS;
    std::fs::write(dir.join("c.csv"), "id,area_ha,rain_mm,pet_mm,vulnerable_ha,scattered_ha,medium_ha,dense_ha\na,100,1000,800,80,5,5,5\n")
        .unwrap();
    let mut sections: Vec<(String, Vec<String>)> = vec![
        ("hydrology".into(), vec![format!("method = \"{method}\"")]),
        ("contaminant".into(), vec!["name = \"n\"".into()]),
        ("treatment".into(), vec!["name = \"g\"".into(), "class = \"dense\"".into()]),
        ("strategy".into(), vec!["name = \"s\"".into(), "start_year = 2027".into(), "budget_per_yr = 1000".into()]),
    ];
    for (i, p) in PARAMS.iter().filter(|p| p.may_vary && p.section != "calibration").enumerate() {
        // A different central value for every key, so that one key's value in another's field shows.
        let (lo, hi) = p.range.bounds();
        let (a, b) = (lo + (0.2 + 0.01 * i as f64) * (hi - lo), lo + (0.4 + 0.02 * i as f64) * (hi - lo));
        let line = format!("{} = {{ dist = \"uniform\", min = {a}, max = {b} }}", p.key);
        match sections.iter_mut().find(|(s, _)| s == p.section) {
            Some((_, keys)) => keys.push(line),
            None => sections.push((p.section.to_string(), vec![line])),
        }
    }
    let mut text = String::from("start_year = 2027\nhorizon_years = 5\ncatchments = \"c.csv\"\n\n");
    text.push_str("[[treatment]]\nname = \"g\"\nclass = \"scattered\"\ncost_per_ha = 1\n\n[[treatment]]\nname = \"g\"\nclass = \"medium\"\ncost_per_ha = 1\n\n");
    for (s, keys) in &sections {
        let repeated = ["contaminant", "treatment", "strategy"].contains(&s.as_str());
        text.push_str(&if repeated { format!("[[{s}]]\n") } else { format!("[{s}]\n") });
        for k in keys {
            text.push_str(k);
            text.push('\n');
        }
        text.push('\n');
    }
    std::fs::write(dir.join("s.toml"), &text).unwrap();
    yieldshift::input::scenario::load_scenario(&dir.join("s.toml")).unwrap_or_else(|e| panic!("{e}\n{text}"))
}

#[test]
fn every_varying_parameter_is_applied_by_its_typed_id_and_nothing_else_changes() {
    use yieldshift::model::params::ParamId;
    use yieldshift::run::ensemble::{apply_param, MemberSetup};
    for method in ["zhang", "fu"] {
        let tmp = tempfile::tempdir().unwrap();
        let s = every_varying_key(tmp.path(), method);
        assert_eq!(s.uncertain.len(), 21, "{:#?}", s.uncertain.iter().map(|u| &u.param.path).collect::<Vec<_>>());
        let fresh =
            || MemberSetup { params: s.params.clone(), strategies: s.strategies.clone(), rain_scale: s.rain_scale, pet_scale: s.pet_scale };
        let before = format!("{:?}", fresh());
        for u in &s.uncertain {
            let id = u.target.id();
            let other_method = match method {
                "zhang" => matches!(id, ParamId::OmegaForest | ParamId::OmegaGrass),
                _ => matches!(id, ParamId::WForest | ParamId::WGrass),
            };
            let (lo, hi) = id.range().bounds();
            // A value no other field holds (whole for the seed-bearing age, which is rounded).
            let v = if id == ParamId::SeedBearingAge { 37.0 } else { lo + 0.123456789 * (hi - lo) };
            let mut m = fresh();
            apply_param(&s, u.target, v, &mut m);
            let after = format!("{m:?}");
            if other_method {
                assert_eq!(after, before, "{}: the other method's parameter changes nothing", u.param.path);
                continue;
            }
            let shown = if id == ParamId::SeedBearingAge { format!(": {v}") } else { format!("{v:?}") };
            assert!(after.contains(&shown) && !before.contains(&shown), "{}: {v} not applied", u.param.path);
            // Applying the central value again restores the deterministic setup exactly.
            apply_param(&s, u.target, u.param.dist.central(), &mut m);
            assert_eq!(format!("{m:?}"), before, "{}", u.param.path);
        }
    }
}
