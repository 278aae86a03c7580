//! The invented multi-intake basin of `examples/multi_intake/`: twelve catchments,
//! five receiving nodes, two supply intakes. What arrives at each node is a
//! first-class result — rows of `summary.csv` and `ensemble.csv` with scope
//! `arriving`, figures, the report's "At the intakes" section and the executive
//! summary — and every headline about a node agrees with `nodes.csv`, the
//! year-by-year sums of what reaches it.
//!
//! Source of the checks: the node sums `V_m = Σ V_i` over the upstream set and the
//! 10-year-window change `100·(Σ V − Σ V_base)/Σ V_base` (src/model/summary.rs),
//! recomputed here from `nodes.csv`. Common practice, no published source: a
//! headline for an intake is about the water that reaches it.

use std::collections::BTreeMap;
use std::path::Path;
use std::process::Command;

fn csv(path: &Path) -> (Vec<String>, Vec<Vec<String>>) {
    let text = std::fs::read_to_string(path).unwrap();
    let mut lines = text.lines();
    let head: Vec<String> = lines.next().unwrap().split(',').map(str::to_string).collect();
    (head, lines.map(|l| l.split(',').map(str::to_string).collect()).collect())
}

fn col(head: &[String], name: &str) -> usize {
    head.iter().position(|h| h == name).unwrap_or_else(|| panic!("no column {name}"))
}

const NODES: [&str; 5] = ["node-n1", "intake-upper", "node-n3", "node-n4", "intake-lower"];

#[test]
fn every_node_is_reported_from_what_arrives_there() {
    let tmp = tempfile::tempdir().unwrap();
    let out = tmp.path().join("multi");
    let o = Command::new(env!("CARGO_BIN_EXE_yieldshift"))
        .args(["run", "examples/multi_intake/scenario.toml", "--out", out.to_str().unwrap(), "--quiet"])
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));

    // nodes.csv: (node, strategy) → (yield_m3, baseline_yield_m3) by year, in order.
    let (nh, nrows) = csv(&out.join("nodes.csv"));
    let mut series: BTreeMap<(String, String), Vec<(f64, f64)>> = BTreeMap::new();
    for r in &nrows {
        let v: f64 = r[col(&nh, "yield_m3")].parse().unwrap();
        let b: f64 = r[col(&nh, "baseline_yield_m3")].parse().unwrap();
        series.entry((r[col(&nh, "node")].clone(), r[col(&nh, "strategy")].clone())).or_default().push((v, b));
    }
    assert_eq!(series.len(), NODES.len() * 2, "five nodes × (no-control, early)");

    // summary.csv: one arriving row per node and strategy; its 10-year-mean changes are
    // those of nodes.csv's volumes.
    let (sh, srows) = csv(&out.join("summary.csv"));
    let (sc, scope, ss) = (col(&sh, "catchment"), col(&sh, "scope"), col(&sh, "strategy"));
    let arriving: Vec<&Vec<String>> = srows.iter().filter(|r| r[scope] == "arriving").collect();
    assert_eq!(arriving.len(), NODES.len() * 2);
    let mut checked = 0;
    for r in &arriving {
        let ys = &series[&(r[sc].clone(), r[ss].clone())];
        for (column, end) in [("yield_change_10y_pct", 10), ("yield_change_20y_pct", 20), ("yield_change_horizon_pct", 50)] {
            let window = &ys[end - 9..=end];
            let (v, b): (f64, f64) = window.iter().fold((0.0, 0.0), |a, x| (a.0 + x.0, a.1 + x.1));
            let expected = 100.0 * (v - b) / b;
            let got: f64 = r[col(&sh, column)].parse().unwrap();
            assert!((got - expected).abs() < 5e-4, "{}/{} {column}: summary {got} vs nodes.csv {expected}", r[sc], r[ss]);
            checked += 1;
        }
        // The area drained is the node's upstream area, not its own.
        let local = srows.iter().find(|x| x[sc] == r[sc] && x[scope] == "local" && x[ss] == r[ss]).unwrap();
        let a_node: f64 = r[col(&sh, "area_ha")].parse().unwrap();
        let a_local: f64 = local[col(&sh, "area_ha")].parse().unwrap();
        assert!(a_node > a_local, "{}: drained area {a_node} ≤ own area {a_local}", r[sc]);
    }
    assert_eq!(checked, 30);
    // The lower intake drains the whole basin: its arriving area is the basin's.
    let lower = arriving.iter().find(|r| r[sc] == "intake-lower").unwrap();
    let basin = srows.iter().find(|r| r[sc] == "basin" && r[ss] == "no-control").unwrap();
    assert_eq!(lower[col(&sh, "area_ha")], basin[col(&sh, "area_ha")]);

    // ensemble.csv: arriving rows of every node with every variable, and basin rows
    // of each strategy (without concentrations); central values inside their ranges.
    let (eh, erows) = csv(&out.join("ensemble.csv"));
    let (ec, escope, es, ey, ev) = (col(&eh, "catchment"), col(&eh, "scope"), col(&eh, "strategy"), col(&eh, "year"), col(&eh, "variable"));
    for node in NODES {
        for var in ["yield_mm", "yield_change_pct", "yield_change_10yr_mean_pct", "nitrate_n_mg_per_l", "control_cost"] {
            assert!(erows.iter().any(|r| r[ec] == node && r[escope] == "arriving" && r[ev] == var && r[ey] == "2047"), "{node} {var}");
        }
    }
    for st in ["no-control", "early"] {
        assert!(erows.iter().any(|r| r[ec] == "basin" && r[escope] == "basin" && r[es] == st && r[ev] == "yield_change_10yr_mean_pct"));
        assert!(!erows.iter().any(|r| r[escope] == "basin" && r[ev] == "nitrate_n_mg_per_l"));
    }
    for r in &arriving {
        let central: f64 = r[col(&sh, "yield_change_20y_pct")].parse().unwrap();
        let e = erows
            .iter()
            .find(|x| {
                x[ec] == r[sc] && x[escope] == "arriving" && x[es] == r[ss] && x[ey] == "2047" && x[ev] == "yield_change_10yr_mean_pct"
            })
            .unwrap();
        let (p5, p95): (f64, f64) = (e[col(&eh, "p5")].parse().unwrap(), e[col(&eh, "p95")].parse().unwrap());
        assert!(p5 <= central + 1e-9 && central <= p95 + 1e-9, "{}/{}: {central} outside {p5}..{p95}", r[sc], r[ss]);
    }

    // Figures at every node, and the report's section and executive summary.
    for node in NODES {
        for what in ["yield", "nitrate_n"] {
            assert!(out.join("figures").join(format!("{node}_arriving_{what}.png")).exists(), "{node}_arriving_{what}");
        }
    }
    let md = std::fs::read_to_string(out.join("report.md")).unwrap();
    // Headings are numbered ("### 4.1 At the intakes …").
    let heading = |level: &str, title: &str| {
        let mut at = 0;
        for line in md.split_inclusive('\n') {
            if line.starts_with(level) && line.trim_end().ends_with(title) {
                return Some(at);
            }
            at += line.len();
        }
        None
    };
    let section = md.find("At the intakes (receiving nodes)").expect("report has the intake section");
    let per_catchment = heading("### ", " Catchments").expect("report has the catchments");
    assert!(section < per_catchment, "the intake section comes before the per-catchment results");
    let exec_start = heading("## ", " Executive summary").expect("report opens with the executive summary");
    let exec_end = exec_start + 3 + md[exec_start + 3..].find("\n## ").unwrap_or(md.len() - exec_start - 3);
    let exec = &md[exec_start..exec_end];
    for name in ["Upper supply intake", "Lower supply intake"] {
        assert!(exec.contains(name), "executive summary names {name}");
        assert!(md[section..].contains(name), "intake section names {name}");
    }
    // The executive summary's 20-year change at the lower intake is its arriving row's.
    let v: f64 = lower[col(&sh, "yield_change_20y_pct")].parse().unwrap();
    let shown = format!("{}{:.1}", if v < 0.0 { "−" } else { "+" }, v.abs());
    let lower_para = exec.lines().find(|l| l.contains("Lower supply intake")).unwrap();
    assert!(lower_para.contains(&shown), "executive summary shows {shown} for the lower intake: {lower_para}");
}
