//! Hostile-input cases run end-to-end against the real binary.
//!
//! Each folder in `tests/bad_inputs/` holds a scenario (`scenario.toml`), its
//! tables and an `expect.txt`:
//!
//! ```text
//! exit 2                     # exit code of `check` and of `run`
//! problems 3                 # optional: how many problems the message lists
//! contains catchments.csv, row 3, column 'rain_mm': 'lots' is not a number
//! ```
//!
//! Every `contains` line must appear in what the program prints. For a failing
//! case (exit 2), `run --out` must leave nothing behind: no output folder and no
//! staging folder. Folders named `ok-*` are inputs that must be accepted (a BOM,
//! CRLF line ends, a semicolon file with decimal commas, trailing empty columns).

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn cases_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/bad_inputs")
}

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_yieldshift"))
}

/// What a case expects.
#[derive(Debug)]
struct Expect {
    exit: i32,
    problems: Option<usize>,
    contains: Vec<String>,
}

fn read_expect(path: &Path) -> Expect {
    let text = std::fs::read_to_string(path).unwrap_or_else(|e| panic!("{}: {e}", path.display()));
    let mut exit = None;
    let mut problems = None;
    let mut contains = Vec::new();
    for (n, line) in text.lines().enumerate() {
        let line = line.trim_end();
        if line.trim().is_empty() || line.starts_with('#') {
            continue;
        }
        let (word, rest) = line.split_once(' ').unwrap_or((line, ""));
        match word {
            "exit" => exit = Some(rest.trim().parse().unwrap_or_else(|_| panic!("{}:{}: bad exit code", path.display(), n + 1))),
            "problems" => problems = Some(rest.trim().parse().unwrap_or_else(|_| panic!("{}:{}: bad count", path.display(), n + 1))),
            "contains" => contains.push(rest.to_string()),
            _ => panic!("{}:{}: unknown line '{line}'", path.display(), n + 1),
        }
    }
    Expect { exit: exit.unwrap_or_else(|| panic!("{}: no exit line", path.display())), problems, contains }
}

fn all_cases() -> Vec<(String, PathBuf, Expect)> {
    let mut cases: Vec<_> = std::fs::read_dir(cases_dir())
        .expect("tests/bad_inputs exists")
        .map(|e| e.unwrap().path())
        .filter(|p| p.is_dir())
        .map(|p| {
            let name = p.file_name().unwrap().to_string_lossy().into_owned();
            let expect = read_expect(&p.join("expect.txt"));
            (name, p, expect)
        })
        .collect();
    cases.sort_by(|a, b| a.0.cmp(&b.0));
    cases
}

fn text(o: &Output) -> String {
    format!("{}{}", String::from_utf8_lossy(&o.stdout), String::from_utf8_lossy(&o.stderr))
}

/// Number of problems an error message lists: "N problems in the input:" then N
/// lines "  - ...", or a single "error: ..." line.
fn problem_count(stderr: &str) -> Option<usize> {
    let listed = stderr.lines().filter(|l| l.starts_with("  - ")).count();
    if let Some(rest) = stderr.strip_prefix("error: ") {
        if let Some((n, _)) = rest.split_once(" problems in the input:") {
            let n: usize = n.trim().parse().ok()?;
            return (n == listed).then_some(n);
        }
        return (listed == 0).then_some(1);
    }
    None
}

/// Every file below `dir` with its bytes.
fn snapshot(dir: &Path) -> BTreeMap<PathBuf, Vec<u8>> {
    let mut out = BTreeMap::new();
    let mut stack = vec![dir.to_path_buf()];
    while let Some(d) = stack.pop() {
        for e in std::fs::read_dir(&d).unwrap() {
            let p = e.unwrap().path();
            if p.is_dir() {
                stack.push(p.clone());
                out.insert(p, Vec::new());
            } else {
                let bytes = std::fs::read(&p).unwrap();
                out.insert(p, bytes);
            }
        }
    }
    out
}

fn names_in(dir: &Path) -> Vec<String> {
    let mut v: Vec<String> = std::fs::read_dir(dir).unwrap().map(|e| e.unwrap().file_name().to_string_lossy().into_owned()).collect();
    v.sort();
    v
}

/// Checks one command's output against the case; returns what went wrong.
fn judge(case: &str, what: &str, o: &Output, expect: &Expect) -> Vec<String> {
    let mut wrong = Vec::new();
    let all = text(o);
    if o.status.code() != Some(expect.exit) {
        wrong.push(format!("{case} ({what}): exit {:?}, expected {}\n{all}", o.status.code(), expect.exit));
    }
    for frag in &expect.contains {
        if !all.contains(frag.as_str()) {
            wrong.push(format!("{case} ({what}): missing «{frag}» in:\n{all}"));
        }
    }
    if let Some(n) = expect.problems {
        let stderr = String::from_utf8_lossy(&o.stderr);
        if problem_count(&stderr) != Some(n) {
            wrong.push(format!("{case} ({what}): expected {n} problems listed, got {:?}:\n{stderr}", problem_count(&stderr)));
        }
    }
    if expect.exit != 0 {
        // No panic, no backtrace: a clean error message and nothing else.
        if all.contains("panicked") || all.contains("RUST_BACKTRACE") {
            wrong.push(format!("{case} ({what}): panicked:\n{all}"));
        }
        if !String::from_utf8_lossy(&o.stderr).starts_with("error: ") {
            wrong.push(format!("{case} ({what}): stderr does not start with 'error: ':\n{all}"));
        }
    }
    wrong
}

#[test]
fn every_case_gives_its_message_and_exit_code_in_check_and_run() {
    let cases = all_cases();
    let broken = cases.iter().filter(|(_, _, e)| e.exit != 0).count();
    assert!(broken >= 30, "only {broken} broken-input cases");
    let mut wrong = Vec::new();
    for (name, dir, expect) in &cases {
        let scenario = dir.join("scenario.toml");
        let before = snapshot(dir);

        let o = bin().arg("check").arg(&scenario).output().expect("binary runs");
        wrong.extend(judge(name, "check", &o, expect));

        let tmp = tempfile::tempdir().unwrap();
        let out = tmp.path().join("results");
        let o = bin().arg("run").arg(&scenario).arg("--out").arg(&out).args(["--figures", "none"]).output().expect("binary runs");
        wrong.extend(judge(name, "run", &o, expect));
        let left = names_in(tmp.path());
        if expect.exit == 0 {
            if left != ["results"] || !out.join("run_info.json").exists() {
                wrong.push(format!("{name} (run): expected only results/ with run_info.json, found {left:?}"));
            }
        } else if !left.is_empty() {
            wrong.push(format!("{name} (run): a failed run left {left:?} behind"));
        }
        if snapshot(dir) != before {
            wrong.push(format!("{name}: the case folder was changed"));
        }
    }
    assert!(wrong.is_empty(), "{} failures:\n\n{}", wrong.len(), wrong.join("\n\n"));
}

#[test]
fn a_failed_run_leaves_earlier_results_untouched() {
    let cases = cases_dir();
    let tmp = tempfile::tempdir().unwrap();
    let out = tmp.path().join("results");
    let good = cases.join("ok-trailing-empty-columns-and-blank-rows/scenario.toml");
    let o = bin().arg("run").arg(&good).arg("--out").arg(&out).args(["--figures", "none"]).output().unwrap();
    assert!(o.status.success(), "{}", text(&o));
    let before = snapshot(&out);
    assert!(before.keys().any(|p| p.ends_with("yearly.csv")));
    for bad in ["network-cycle", "toml-syntax-error", "climate-year-missing", "empty-file"] {
        let o = bin().arg("run").arg(cases.join(bad).join("scenario.toml")).arg("--out").arg(&out).output().unwrap();
        assert_eq!(o.status.code(), Some(2), "{bad}: {}", text(&o));
        assert_eq!(snapshot(&out), before, "{bad}: earlier results changed");
        assert_eq!(names_in(tmp.path()), ["results"], "{bad}: something left beside the results");
    }
}

#[test]
fn expectation_files_are_well_formed() {
    // Guards the harness itself: every case has a scenario, an exit code, and a
    // failing case names at least one file (so its message is located).
    for (name, dir, expect) in all_cases() {
        assert!(dir.join("scenario.toml").exists(), "{name}: no scenario.toml");
        assert!(!expect.contains.is_empty(), "{name}: nothing to look for");
        if expect.exit != 0 {
            assert!(
                expect.contains.iter().any(|c| c.contains(".csv") || c.contains(".toml") || c.contains("tables")),
                "{name}: no fragment names the file"
            );
        }
    }
    assert_eq!(problem_count("error: 2 problems in the input:\n  - a\n  - b\n"), Some(2));
    assert_eq!(problem_count("error: x.csv: bad\n"), Some(1));
    assert_eq!(problem_count("error: 3 problems in the input:\n  - a\n"), None);
}

/// One numeric key of `docs/scenario.md` with its documented range.
#[derive(Debug)]
struct Documented {
    section: String,
    key: String,
    lo: f64,
    hi: Option<f64>,
    /// The range as the documentation writes it, e.g. `0 to 10 000`.
    range_text: Option<String>,
    integer: bool,
}

/// Reads the numeric ranges of the sections whose keys stand alone (the
/// strategy, treatment and calibration tables need other entries to mean anything).
fn documented_ranges() -> Vec<Documented> {
    let doc = std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("docs/scenario.md")).unwrap();
    let mut out = Vec::new();
    let mut section: Option<String> = None;
    for line in doc.lines() {
        if let Some(h) = line.strip_prefix("## ") {
            let name = h.split('`').nth(1).unwrap_or("").trim_matches(['[', ']']).to_string();
            section = match (h.starts_with("Top level"), name.as_str()) {
                (true, _) => Some(String::new()),
                (_, "hydrology" | "invasion" | "canopy_closure" | "dilution" | "contaminant" | "economics") => Some(name),
                _ => None,
            };
            continue;
        }
        let Some(section) = &section else { continue };
        let cells: Vec<&str> = line.split('|').map(str::trim).collect();
        if cells.len() != 7 || !cells[1].starts_with('`') {
            continue;
        }
        let key = cells[1].trim_matches('`').to_string();
        let (unit, allowed) = (cells[2], cells[4].split(',').next().unwrap_or("").trim());
        let number = |s: &str| s.replace(' ', "").parse::<f64>().ok();
        let (lo, hi, text) = if let Some(lo) = allowed.strip_prefix("≥ ").and_then(number) {
            (lo, None, None)
        } else if let Some((a, b)) = allowed.split_once('–') {
            match (number(a), number(b)) {
                (Some(lo), Some(hi)) => (lo, Some(hi), Some(format!("{} to {}", a.trim(), b.trim()))),
                _ => continue,
            }
        } else {
            continue;
        };
        let integer = matches!(unit, "year" | "years") && lo.fract() == 0.0 && hi.is_some_and(|h| h.fract() == 0.0);
        out.push(Documented { section: section.clone(), key, lo, hi, range_text: text, integer });
    }
    out
}

fn scenario_with(d: &Documented, value: f64) -> String {
    let v = if d.integer { format!("{}", value as i64) } else { format!("{value:?}") };
    let mut top = vec![
        ("start_year".to_string(), "2030".to_string()),
        ("horizon_years".to_string(), "5".to_string()),
        ("catchments".to_string(), "\"catchments.csv\"".to_string()),
    ];
    let mut body: Vec<(String, String)> = match d.section.as_str() {
        "canopy_closure" => vec![("curve".into(), "\"logistic\"".into())],
        "contaminant" => vec![
            ("name".into(), "\"nitrate_n\"".into()),
            ("open_export_kg_per_ha_yr".into(), "2.0".into()),
            ("forest_export_kg_per_ha_yr".into(), "1.5".into()),
        ],
        // Keep the one cross-key rule (dense after medium) satisfied at both bounds.
        "invasion" if d.key == "dense_age_yr" => vec![("medium_age_yr".into(), "1".into())],
        "invasion" if d.key == "medium_age_yr" => vec![("dense_age_yr".into(), "200".into())],
        _ => Vec::new(),
    };
    let target = if d.section.is_empty() { &mut top } else { &mut body };
    target.retain(|(k, _)| *k != d.key);
    target.push((d.key.clone(), v));
    let mut text: String = top.iter().map(|(k, v)| format!("{k} = {v}\n")).collect();
    if !d.section.is_empty() {
        let header = if d.section == "contaminant" { "[[contaminant]]".to_string() } else { format!("[{}]", d.section) };
        text.push_str(&format!("\n{header}\n"));
        text.extend(body.iter().map(|(k, v)| format!("{k} = {v}\n")));
    }
    text
}

#[test]
fn documented_ranges_are_enforced_at_their_bounds() {
    let keys = documented_ranges();
    assert!(keys.len() >= 20, "read only {} ranges from docs/scenario.md: {keys:#?}", keys.len());
    let tmp = tempfile::tempdir().unwrap();
    std::fs::copy(cases_dir().join("ok-trailing-empty-columns-and-blank-rows/catchments.csv"), tmp.path().join("catchments.csv")).unwrap();
    let path = tmp.path().join("scenario.toml");
    let mut wrong = Vec::new();
    for d in &keys {
        let step = if d.integer { 1.0 } else { (d.hi.unwrap_or(d.lo + 1.0) - d.lo).abs().max(1.0) * 1e-3 };
        let key_path = if d.section.is_empty() {
            d.key.clone()
        } else if d.section == "contaminant" {
            format!("contaminant[1].{}", d.key)
        } else {
            format!("{}.{}", d.section, d.key)
        };
        let mut values = vec![(d.lo, true), (d.lo - step, false)];
        if let Some(hi) = d.hi {
            values.extend([(hi, true), (hi + step, false)]);
        }
        for (v, ok) in values {
            let text = scenario_with(d, v);
            std::fs::write(&path, &text).unwrap();
            match (yieldshift::input::scenario::load_scenario(&path), ok) {
                (Ok(_), true) => {}
                (Err(e), true) => wrong.push(format!("{key_path} = {v} (documented as allowed) was refused: {e}\n{text}")),
                (Ok(_), false) => wrong.push(format!("{key_path} = {v} (outside the documented range) was accepted\n{text}")),
                (Err(e), false) => {
                    let located = e.problems().iter().any(|p| {
                        p.column.as_deref() == Some(key_path.as_str())
                            && p.row.is_some()
                            && d.range_text.as_ref().is_none_or(|r| p.message.contains(r.as_str()))
                    });
                    if !located {
                        wrong.push(format!(
                            "{key_path} = {v}: the message does not name the key, its line and the range {:?}: {e}",
                            d.range_text
                        ));
                    }
                }
            }
        }
    }
    assert!(wrong.is_empty(), "{} mismatches with docs/scenario.md:\n\n{}", wrong.len(), wrong.join("\n\n"));
}
