//! Scenario loading through the library API: calibration entries and donors.

use std::path::Path;
use yieldshift::input::scenario::load_scenario;
use yieldshift::model::params::{Kind, ParamId, ParamSpec, PARAMS};
use yieldshift::model::CoverCurves;

const TABLE: &str = "id,area_ha,rain_mm,pet_mm,vulnerable_ha,scattered_ha,medium_ha,dense_ha\n\
a,100,1000,800,50,1,1,1\nb,100,1100,800,50,1,1,1\nc,100,1200,800,50,1,1,1\n";

fn write(dir: &Path, extra: &str) -> std::path::PathBuf {
    std::fs::write(dir.join("c.csv"), TABLE).unwrap();
    let s = dir.join("s.toml");
    std::fs::write(&s, format!("start_year = 2027\nhorizon_years = 10\ncatchments = \"c.csv\"\n{extra}")).unwrap();
    s
}

#[test]
fn calibration_and_donor_set_per_catchment_curves() {
    let tmp = tempfile::tempdir().unwrap();
    let s = write(tmp.path(), "[[calibration]]\ncatchment = \"a\"\nw_grass = 0.9\n\n[[calibration]]\ncatchment = \"c\"\ndonor = \"a\"\n");
    let sc = load_scenario(&s).unwrap();
    assert_eq!(sc.catchments[0].curves, Some(CoverCurves::Zhang { w_forest: 2.0, w_grass: 0.9 }));
    assert_eq!(sc.catchments[1].curves, None);
    assert_eq!(sc.catchments[2].curves, sc.catchments[0].curves);
}

#[test]
fn calibration_errors_name_the_key() {
    let tmp = tempfile::tempdir().unwrap();
    let s = write(
        tmp.path(),
        "[[calibration]]\ncatchment = \"zz\"\nw_grass = 0.9\n\n[[calibration]]\ncatchment = \"b\"\ndonor = \"c\"\n\n[[calibration]]\ncatchment = \"a\"\nomega_grass = 2.5\n",
    );
    let e = load_scenario(&s).unwrap_err();
    let msg = e.to_string();
    assert!(e.is_invalid_input());
    assert!(msg.contains("'zz' is not a catchment"), "{msg}");
    assert!(msg.contains("donor 'c' has no fitted values"), "{msg}");
    assert!(msg.contains("method is zhang"), "{msg}");
    assert!(msg.contains("line 5, key 'calibration[1].catchment'"), "{msg}");
}

const TREATMENTS: &str = "[[treatment]]\nname = \"ground\"\nclass = \"scattered\"\ncost_per_ha = 50\n\n\
[[treatment]]\nname = \"ground\"\nclass = \"medium\"\ncost_per_ha = 400\n\n\
[[treatment]]\nname = \"aerial\"\nclass = \"dense\"\ncost_per_ha = 2000\n\n\
[[treatment]]\nname = \"felling\"\nclass = \"dense\"\ncost_per_ha = 900\n\n";

#[test]
fn strategy_budget_table_per_catchment_and_method_choice() {
    use yieldshift::model::control::Effort;
    let tmp = tempfile::tempdir().unwrap();
    std::fs::write(tmp.path().join("budget.csv"), "catchment,year,budget_per_yr\na,2027,1000\nb,2029,2500\na,2040,99\n").unwrap();
    let s = write(
        tmp.path(),
        &format!(
            "{TREATMENTS}[[strategy]]\nname = \"t\"\nstart_year = 2028\nrule = \"best-value\"\nbudget_table = \"budget.csv\"\nbudget_scope = \"catchment\"\nmethods = {{ dense = \"aerial\" }}\n"
        ),
    );
    let sc = load_scenario(&s).unwrap();
    let st = &sc.strategies[0];
    assert_eq!(st.cost_per_ha, [50.0, 400.0, 2000.0], "dense fixed to aerial although felling is cheaper");
    match &st.effort {
        Effort::CatchmentBudget(b) => {
            assert_eq!(b.len(), 3);
            assert_eq!(b[0][0], 1000.0);
            assert_eq!(b[1][2], 2500.0);
            assert!(b[0][1..].iter().all(|&v| v == 0.0), "2040 lies beyond the 10-year horizon");
            assert!(b[2].iter().all(|&v| v == 0.0));
        }
        e => panic!("{e:?}"),
    }
}

#[test]
fn strategy_errors_are_located() {
    let tmp = tempfile::tempdir().unwrap();
    std::fs::write(tmp.path().join("budget.csv"), "year,budget_per_yr\n2027,lots\n").unwrap();
    let s = write(
        tmp.path(),
        "[[treatment]]\nname = \"ground\"\nclass = \"scattered\"\ncost_per_ha = 50\n\n\
         [[strategy]]\nname = \"no-control\"\nstart_year = 2027\nbudget_per_yr = 10\narea_ha_per_yr = 5\n\n\
         [[strategy]]\nname = \"x\"\nstart_year = 2027\nbudget_table = \"budget.csv\"\nefficacy = 1.5\n",
    );
    let e = load_scenario(&s).unwrap_err();
    let msg = e.to_string();
    assert!(msg.contains("reference strategy"), "{msg}");
    assert!(msg.contains("give only one of budget_per_yr"), "{msg}");
    assert!(msg.contains("no [[treatment]] is defined for class medium"), "{msg}");
    assert!(msg.contains("strategy[2].efficacy") && msg.contains("0 to 1"), "{msg}");
    // The budget table is only read once the scenario itself is valid; check it alone.
    let s2 = write(tmp.path(), &format!("{TREATMENTS}[[strategy]]\nname = \"x\"\nstart_year = 2027\nbudget_table = \"budget.csv\"\n"));
    let msg = load_scenario(&s2).unwrap_err().to_string();
    assert!(msg.contains("budget.csv") && msg.contains("row 2") && msg.contains("'budget_per_yr'"), "{msg}");
}

/// Problems are located by the TOML parser's spans, not by guessing from line text:
/// a multi-line string holding lines that look like a header and a key does not
/// move the problem away from the real key.
#[test]
fn problems_are_located_at_the_real_key_not_at_look_alike_text() {
    let tmp = tempfile::tempdir().unwrap();
    std::fs::write(tmp.path().join("c.csv"), TABLE).unwrap();
    let s = tmp.path().join("s.toml");
    std::fs::write(
        &s,
        "title = \"\"\"Upper\n[invasion]\nspread_rate_per_yr = 0.5\n[[contaminant]]\nbasin\"\"\"\n\
         start_year = 2027\nhorizon_years = 10\ncatchments = \"c.csv\"\n\n\
         [invasion]\nspread_rate_per_yr = 1.5\n\n\
         [[contaminant]]\nname = \"n\"\nnote = '''\n[[contaminant]]\nopen_export_kg_per_ha_yr = 1\n'''\nopen_export_kg_per_ha_yr = 2\n",
    )
    .unwrap();
    let e = load_scenario(&s).unwrap_err();
    let lines: Vec<String> = e.problems().iter().map(|p| p.to_string()).collect();
    let find = |key: &str| lines.iter().find(|l| l.contains(&format!("key '{key}'"))).unwrap_or_else(|| panic!("{key}: {lines:#?}"));
    assert!(
        find("invasion.spread_rate_per_yr")
            .contains("line 11, key 'invasion.spread_rate_per_yr': 1.5 is out of range; allowed 0 to 1 1/yr"),
        "{lines:#?}"
    );
    // A missing key points at its table's own header (line 13), not at a look-alike in a string.
    assert!(find("contaminant[1].forest_export_kg_per_ha_yr").contains("line 13,"), "{lines:#?}");
    assert!(find("contaminant[1].note").contains("line 15, key 'contaminant[1].note': unknown key"), "{lines:#?}");
    assert_eq!(e.problems().len(), 3, "{lines:#?}");
}

/// Keys of a section for a scenario that is valid apart from the key under test.
fn section_keys(section: &str) -> Vec<(String, String)> {
    let kv = |pairs: &[(&str, &str)]| pairs.iter().map(|(k, v)| (k.to_string(), v.to_string())).collect();
    match section {
        "" => kv(&[("start_year", "2027"), ("horizon_years", "10"), ("catchments", "\"c.csv\"")]),
        "climate" => kv(&[("weather", "\"w.csv\""), ("latitude_deg", "-45"), ("elevation_m", "300")]),
        "gis" => kv(&[("boundaries", "\"b.geojson\"")]),
        "contaminant" => kv(&[("name", "\"n\""), ("open_export_kg_per_ha_yr", "1"), ("forest_export_kg_per_ha_yr", "1")]),
        "calibration" => kv(&[("catchment", "\"a\"")]),
        "treatment" => kv(&[("name", "\"g\""), ("class", "\"scattered\""), ("cost_per_ha", "1")]),
        "strategy" => kv(&[("name", "\"s\""), ("start_year", "2027"), ("budget_per_yr", "1")]),
        _ => Vec::new(),
    }
}

/// A scenario with `key = value` in the table of `spec` (replacing the base value).
fn scenario_text(spec: &ParamSpec, value: &str) -> String {
    let mut keys = section_keys(spec.section);
    keys.retain(|(k, _)| k != spec.key && !(spec.key == "area_ha_per_yr" && k == "budget_per_yr"));
    if spec.section == "climate" && spec.may_vary {
        keys.clear(); // the scales need no weather table
    }
    keys.push((spec.key.to_string(), value.to_string()));
    let body: String = keys.iter().map(|(k, v)| format!("{k} = {v}\n")).collect();
    let treatments = "[[treatment]]\nname = \"g\"\nclass = \"scattered\"\ncost_per_ha = 1\n\n\
                      [[treatment]]\nname = \"g\"\nclass = \"medium\"\ncost_per_ha = 1\n\n\
                      [[treatment]]\nname = \"g\"\nclass = \"dense\"\ncost_per_ha = 1\n\n";
    // Fu's omega of a calibration entry needs the Fu method.
    let method = if spec.section == "calibration" && spec.key.starts_with("omega") { "[hydrology]\nmethod = \"fu\"\n\n" } else { "" };
    match (spec.section, spec.repeated) {
        ("", _) => body,
        (s, false) => format!("{}\n{method}[{s}]\n{body}", scenario_text_top()),
        ("strategy", true) => format!("{}\n{treatments}[[strategy]]\n{body}", scenario_text_top()),
        (s, true) => format!("{}\n{method}[[{s}]]\n{body}", scenario_text_top()),
    }
}

fn scenario_text_top() -> String {
    section_keys("").iter().map(|(k, v)| format!("{k} = {v}\n")).collect()
}

#[test]
fn every_key_of_the_parameter_table_is_read_with_its_range_unit_and_line() {
    use yieldshift::input::table::range_text;
    let tmp = tempfile::tempdir().unwrap();
    std::fs::write(tmp.path().join("c.csv"), TABLE).unwrap();
    let s = tmp.path().join("s.toml");
    for spec in PARAMS.iter() {
        let (lo, hi) = spec.range.bounds();
        let whole = spec.kind == Kind::Whole;
        let bad = if hi.is_finite() {
            if whole {
                hi + 1.0
            } else {
                hi * 1.5 + 1.0
            }
        } else {
            lo - 1.0
        };
        let value = if spec.kind == Kind::List { format!("[{bad}]") } else { format!("{bad}") };
        let text = scenario_text(spec, &value);
        std::fs::write(&s, &text).unwrap();
        let e = load_scenario(&s).unwrap_err();
        let path = if spec.repeated { format!("{}[1].{}", spec.section, spec.key) } else { spec.path() };
        let line = text.lines().collect::<Vec<_>>().iter().rposition(|l| l.starts_with(&format!("{} = ", spec.key))).unwrap() + 1;
        // `end_year` must also be no earlier than the strategy's `start_year` (2027).
        let lo = if spec.id == ParamId::StrategyEndYear { 2027.0 } else { lo };
        let allowed = if matches!(spec.range.min, std::ops::Bound::Excluded(_)) {
            yieldshift::input::toml_reader::range_words(spec.range, spec.message_unit())
        } else {
            range_text(lo, hi, spec.message_unit())
        };
        let expected = format!("line {line}, key '{path}': ");
        let msg = e.problems().iter().map(|p| p.to_string()).find(|m| m.contains(&expected));
        let msg = msg.unwrap_or_else(|| panic!("{path}: no problem at {expected}\n{e}\n{text}"));
        assert!(msg.contains(&format!(" in {allowed}")) || msg.contains(&format!("allowed {allowed}")), "{path}: {msg}");
    }
}

#[test]
fn keys_that_may_vary_record_a_typed_target_and_others_refuse_a_distribution() {
    let tmp = tempfile::tempdir().unwrap();
    std::fs::write(tmp.path().join("c.csv"), TABLE).unwrap();
    let s = tmp.path().join("s.toml");
    for spec in PARAMS.iter().filter(|p| p.kind != Kind::List && p.section != "climate" || p.key.ends_with("_scale")) {
        let (lo, hi) = spec.range.bounds();
        let (a, b) = if hi.is_finite() { (lo + 0.25 * (hi - lo), lo + 0.5 * (hi - lo)) } else { (lo + 1.0, lo + 2.0) };
        let text = scenario_text(spec, &format!("{{ dist = \"uniform\", min = {a}, max = {b} }}"));
        std::fs::write(&s, &text).unwrap();
        let path = if spec.repeated { format!("{}[1].{}", spec.section, spec.key) } else { spec.path() };
        match load_scenario(&s) {
            Ok(sc) => {
                assert!(spec.may_vary, "{path} accepted a distribution");
                assert_eq!(sc.uncertain.len(), 1, "{path}");
                let u = &sc.uncertain[0];
                assert_eq!((u.target.id(), u.target.entry()), (spec.id, spec.repeated.then_some(0)), "{path}");
                assert_eq!(u.param.path, path);
                assert_eq!(u.target.path(), path);
            }
            Err(e) => {
                assert!(!spec.may_vary, "{path}: {e}\n{text}");
                let m = e.to_string();
                let refused = [": must be a number in", ": { dist = \"uniform\""].iter().any(|r| m.contains(&format!("key '{path}'{r}")));
                assert!(refused, "{path}: {m}");
            }
        }
    }
}

#[test]
fn log_normal_draws_never_exceed_the_allowed_maximum() {
    // Regression: a log-normal max_fraction drew values above 1, giving yields below
    // what any allowed closure can give. docs/scenario.md: truncated to the allowed range.
    let tmp = tempfile::tempdir().unwrap();
    let s = write(tmp.path(), "[canopy_closure]\nmax_fraction = { dist = \"lognormal\", median = 0.9, sigma_log = 0.4 }\n");
    let sc = load_scenario(&s).unwrap();
    let u = sc.uncertain.iter().find(|k| k.param.path.ends_with("max_fraction")).expect("max_fraction is uncertain");
    let (lo, hi) = ParamId::ClosureMaxFraction.range().bounds();
    let draws: Vec<f64> = (1..1000).map(|i| u.param.dist.quantile(i as f64 / 1000.0)).collect();
    assert!(draws.iter().all(|&v| v >= lo && v <= hi), "a draw left {lo}..={hi}");
    // Truncation, not clamping: no mass piles up on the bound, and the median stays below it.
    assert!(draws.iter().filter(|&&v| v == hi).count() <= 1);
    assert!(u.param.dist.quantile(0.5) < 0.9 && u.param.dist.quantile(0.999) < hi);
}

#[test]
fn an_observed_six_percent_areal_growth_is_what_the_projection_gives() {
    // Common practice, no published source: unchecked infestations grow about 6%/yr in
    // area, doubling in ln 2 / ln 1.06 = 11.9 years (derived). Entered as observed, the
    // reader derives r = g (1 + g)^a for seed-bearing age a = 8 (the cohort model's
    // renewal equation, src/model/cover.rs), so the projection grows at 6.0%/yr.
    let tmp = tempfile::tempdir().unwrap();
    let s = write(tmp.path(), "[invasion]\nareal_growth_rate_per_yr = 0.06\nseed_bearing_age_yr = 8\n");
    let sc = load_scenario(&s).unwrap();
    let r = sc.params.invasion.spread_rate_per_yr;
    assert!((r - 0.06 * 1.06f64.powi(8)).abs() < 1e-12, "{r}");
    let mut c = yieldshift::model::cover::Cohorts::from_classes(
        &sc.params.invasion,
        yieldshift::model::cover::ClassAreas { scattered_ha: 100.0, medium_ha: 0.0, dense_ha: 0.0 },
    );
    let vulnerable = 1e30;
    let mut areas = Vec::new();
    for _ in 0..300 {
        c.step(&sc.params.invasion, vulnerable);
        areas.push(c.infested_ha());
    }
    let growth = areas[299] / areas[298] - 1.0;
    assert!((growth - 0.06).abs() < 0.001, "areal growth {growth}");
    let doubling = (0..299).find(|&t| areas[t] >= 2.0 * areas[200]).map(|t| t - 200).unwrap();
    assert_eq!(doubling, 12, "first whole year at or past the 11.9-year doubling");
    // Giving both is refused at the key.
    let s = write(tmp.path(), "[invasion]\nareal_growth_rate_per_yr = 0.06\nspread_rate_per_yr = 0.06\n");
    let e = load_scenario(&s).unwrap_err().to_string();
    assert!(e.contains("key 'invasion.areal_growth_rate_per_yr'") && e.contains("not both"), "{e}");
}

#[test]
fn cq_exponent_defaults_to_pure_dilution_and_is_checked_naming_line_and_key() {
    use yieldshift::model::dilution::ConcentrationDischarge;
    let tmp = tempfile::tempdir().unwrap();
    let c = "[[contaminant]]\nname = \"no3\"\nopen_export_kg_per_ha_yr = 2\nforest_export_kg_per_ha_yr = 1\n\n\
             [[contaminant]]\nname = \"srp\"\nopen_export_kg_per_ha_yr = 0.2\nforest_export_kg_per_ha_yr = 0.1\ncq_exponent = 0\n";
    let sc = load_scenario(&write(tmp.path(), c)).unwrap();
    assert_eq!(sc.params.contaminants[0].cq, ConcentrationDischarge::PURE_DILUTION);
    assert_eq!(sc.params.contaminants[1].cq, ConcentrationDischarge::CHEMOSTATIC);
    let bad = c.replace("cq_exponent = 0", "cq_exponent = 2.5");
    let e = load_scenario(&write(tmp.path(), &bad)).unwrap_err();
    let msg = e.to_string();
    assert!(e.is_invalid_input());
    assert!(msg.contains("s.toml") && msg.contains("line 13, key 'contaminant[2].cq_exponent'"), "{msg}");
}
