//! Validation against published paired-catchment records.
//!
//! Each folder `validation/<case>/` is a small scenario a user can open and run
//! (`scenario.toml`, `catchments.csv`, optional `stands.csv`) with the published
//! values it is checked against in `expected.toml`: the published value, the
//! tolerance and why, and the source of each (a `# Source:` comment in every
//! `[[check]]`). This file runs the real binary on each scenario, reads
//! `yearly.csv` (strategy `no-control`) and evaluates every check.
//!
//! Metrics (evaluated over the check's `years`, inclusive; the reduction of a year is
//! `uninvaded_yield_mm − yield_mm`, the planted catchment against its own uninvaded
//! twin, i.e. the paired control):
//! * `mean_reduction_mm` — mean annual reduction, mm/yr;
//! * `mean_reduction_pct` — `100·Σ reduction / Σ uninvaded yield` (the reduction as a
//!   share of the control's runoff over the period);
//! * `reduction_mm_per_10pct_cover`, `reduction_pct_per_10pct_cover` — the two above
//!   divided by `10 × planted fraction` (the `[[site]]` entry's `planted_fraction`);
//! * `max_reduction_mm`, `max_reduction_pct` — the largest annual value;
//! * `min_yield_mm` — the smallest annual yield (a stream that dried up);
//! * `mean_uninvaded_yield_mm` — mean runoff of the uninvaded twin (the control);
//! * `ordering` — the metric named by `of`, per catchment in the order listed in
//!   `catchments`, must be strictly `decreasing` or `increasing` (`expect`).
//!
//! With `window_years = N`, a mean-type metric is the largest of its values over all
//! runs of `N` consecutive years inside `years` (a peak over an N-year period). With
//! `catchments = [...]` instead of `catchment`, a metric is the mean of the listed
//! catchments' values.
//!
//! Acceptance: `published` is a number or a published range `[lo, hi]`; the model must
//! lie within `tolerance` (relative: ± that fraction of the published value, or of each
//! end of the range) or `tolerance_abs` (± that many units).
//!
//! Known gaps: a check the model is known not to meet carries `expected = "known-gap"`
//! and `known_gap = "..."` (why, and the gap measured when it was marked). It is printed
//! as `known-gap` and does not fail its case; if it starts passing, the case fails until
//! the mark is removed, so the mark cannot outlive the gap.
//!
//! What a case may set (the defaults are what is validated): `[[calibration]]` entries
//! with `w_grass` only, each fitted to the site's control runoff and saying so in a
//! `# Fitted to:` comment; and, for a planting, `[canopy_closure]` with
//! `half_closure_age_yr` and `steepness_per_yr`, the same in every case.
//!
//! `cargo test --test validation -- --nocapture` prints one line per check.

use serde::Deserialize;
use std::collections::BTreeMap;
use std::fmt::Write as _;
use std::path::{Path, PathBuf};
use std::process::Command;

// ---------------------------------------------------------------------------
// expected.toml

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct Expected {
    /// What the case is, in a line.
    title: String,
    /// Main published source of the case.
    source: String,
    /// Site climate and planting, with a source for each value.
    #[serde(default)]
    site: Vec<Site>,
    /// Notes on what the record says that an annual model cannot be checked against.
    #[serde(default)]
    not_tested: Vec<String>,
    #[serde(default)]
    check: Vec<Check>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct Site {
    catchment: String,
    name: String,
    rain_mm: f64,
    rain_source: String,
    pet_mm: f64,
    /// What the PET is (Penman, pan with its coefficient, …).
    pet_kind: String,
    pet_source: String,
    control_runoff_mm: f64,
    control_source: String,
    planted_fraction: f64,
    planted_source: String,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(untagged)]
enum Published {
    Value(f64),
    Range([f64; 2]),
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
struct Check {
    what: String,
    metric: String,
    #[serde(default)]
    catchment: Option<String>,
    #[serde(default)]
    catchments: Option<Vec<String>>,
    years: [i32; 2],
    #[serde(default)]
    window_years: Option<usize>,
    #[serde(default)]
    of: Option<String>,
    #[serde(default)]
    expect: Option<String>,
    #[serde(default)]
    published: Option<Published>,
    #[serde(default)]
    tolerance: Option<f64>,
    #[serde(default)]
    tolerance_abs: Option<f64>,
    why_tolerance: String,
    /// `"known-gap"`: the model is known not to meet this check (see `known_gap`).
    #[serde(default)]
    expected: Option<String>,
    /// Why the check is a known gap, and the gap measured when it was marked.
    #[serde(default)]
    known_gap: Option<String>,
}

// ---------------------------------------------------------------------------
// yearly.csv

/// One `no-control` row of `yearly.csv`, the columns the checks use.
#[derive(Debug, Clone, PartialEq)]
struct Row {
    catchment: String,
    year: i32,
    yield_mm: f64,
    uninvaded_yield_mm: f64,
}

/// Reads the `no-control` rows of a `yearly.csv`, columns found by name.
fn read_yearly(text: &str) -> Result<Vec<Row>, String> {
    let mut rdr = csv::ReaderBuilder::new().from_reader(text.as_bytes());
    let headers = rdr.headers().map_err(|e| format!("yearly.csv header: {e}"))?.clone();
    let col = |name: &str| headers.iter().position(|h| h == name).ok_or_else(|| format!("yearly.csv has no column {name}"));
    let (ic, is, iy, iq, iu) = (col("catchment")?, col("strategy")?, col("year")?, col("yield_mm")?, col("uninvaded_yield_mm")?);
    let mut rows = Vec::new();
    for (n, rec) in rdr.records().enumerate() {
        let rec = rec.map_err(|e| format!("yearly.csv row {}: {e}", n + 2))?;
        if &rec[is] != "no-control" {
            continue;
        }
        let num = |i: usize| rec[i].trim().parse::<f64>().map_err(|e| format!("yearly.csv row {} column {}: {e}", n + 2, &headers[i]));
        rows.push(Row {
            catchment: rec[ic].to_string(),
            year: rec[iy].trim().parse().map_err(|e| format!("yearly.csv row {} year: {e}", n + 2))?,
            yield_mm: num(iq)?,
            uninvaded_yield_mm: num(iu)?,
        });
    }
    Ok(rows)
}

// ---------------------------------------------------------------------------
// Metrics

const MEAN_METRICS: [&str; 5] =
    ["mean_reduction_mm", "mean_reduction_pct", "reduction_mm_per_10pct_cover", "reduction_pct_per_10pct_cover", "mean_uninvaded_yield_mm"];
const EXTREME_METRICS: [&str; 3] = ["max_reduction_mm", "max_reduction_pct", "min_yield_mm"];

/// The catchment's rows for every year of `years` (inclusive), in year order.
fn rows_for<'a>(table: &'a [Row], catchment: &str, years: [i32; 2]) -> Result<Vec<&'a Row>, String> {
    let [y0, y1] = years;
    if y1 < y0 {
        return Err(format!("years [{y0}, {y1}] are reversed"));
    }
    let mut out = Vec::new();
    for y in y0..=y1 {
        let r = table
            .iter()
            .find(|r| r.catchment == catchment && r.year == y)
            .ok_or_else(|| format!("no no-control row for catchment {catchment} in {y}"))?;
        out.push(r);
    }
    Ok(out)
}

/// A mean-type metric over a run of rows.
fn mean_metric(rows: &[&Row], metric: &str, planted_fraction: Option<f64>) -> Result<f64, String> {
    let n = rows.len() as f64;
    let red: f64 = rows.iter().map(|r| r.uninvaded_yield_mm - r.yield_mm).sum();
    let unin: f64 = rows.iter().map(|r| r.uninvaded_yield_mm).sum();
    let pct = || {
        if unin > 0.0 {
            Ok(100.0 * red / unin)
        } else {
            Err("uninvaded yield is zero: no percentage".to_string())
        }
    };
    let per10 = || match planted_fraction {
        Some(f) if f > 0.0 => Ok(10.0 * f),
        _ => Err(format!("{metric} needs the site's planted_fraction (> 0)")),
    };
    match metric {
        "mean_reduction_mm" => Ok(red / n),
        "mean_reduction_pct" => pct(),
        "reduction_mm_per_10pct_cover" => Ok(red / n / per10()?),
        "reduction_pct_per_10pct_cover" => Ok(pct()? / per10()?),
        "mean_uninvaded_yield_mm" => Ok(unin / n),
        _ => Err(format!("unknown mean metric {metric}")),
    }
}

/// Value of a metric for one catchment.
fn metric_value(
    table: &[Row],
    metric: &str,
    catchment: &str,
    years: [i32; 2],
    window_years: Option<usize>,
    planted_fraction: Option<f64>,
) -> Result<f64, String> {
    let rows = rows_for(table, catchment, years)?;
    if MEAN_METRICS.contains(&metric) {
        match window_years {
            None => mean_metric(&rows, metric, planted_fraction),
            Some(w) if w == 0 || w > rows.len() => Err(format!("window_years {w} does not fit in years [{}, {}]", years[0], years[1])),
            Some(w) => {
                let mut best = f64::NEG_INFINITY;
                for win in rows.windows(w) {
                    best = best.max(mean_metric(win, metric, planted_fraction)?);
                }
                Ok(best)
            }
        }
    } else if EXTREME_METRICS.contains(&metric) {
        if window_years.is_some() {
            return Err(format!("window_years does not apply to {metric}"));
        }
        let vals: Vec<f64> = match metric {
            "max_reduction_mm" => rows.iter().map(|r| r.uninvaded_yield_mm - r.yield_mm).collect(),
            "max_reduction_pct" => rows
                .iter()
                .map(|r| {
                    if r.uninvaded_yield_mm > 0.0 {
                        Ok(100.0 * (r.uninvaded_yield_mm - r.yield_mm) / r.uninvaded_yield_mm)
                    } else {
                        Err(format!("uninvaded yield is zero in {}", r.year))
                    }
                })
                .collect::<Result<_, _>>()?,
            _ => rows.iter().map(|r| r.yield_mm).collect(),
        };
        Ok(if metric == "min_yield_mm" {
            vals.iter().copied().fold(f64::INFINITY, f64::min)
        } else {
            vals.iter().copied().fold(f64::NEG_INFINITY, f64::max)
        })
    } else {
        Err(format!("unknown metric {metric}"))
    }
}

/// Whether `vals` is strictly decreasing or increasing, as `expect` says.
fn is_ordered(vals: &[f64], expect: &str) -> Result<bool, String> {
    match expect {
        "decreasing" => Ok(vals.windows(2).all(|w| w[1] < w[0])),
        "increasing" => Ok(vals.windows(2).all(|w| w[1] > w[0])),
        _ => Err(format!("expect must be \"decreasing\" or \"increasing\", not {expect:?}")),
    }
}

/// Acceptance interval for a published value or range and its tolerance.
fn bounds(published: &Published, tolerance: Option<f64>, tolerance_abs: Option<f64>) -> Result<(f64, f64), String> {
    let (lo, hi) = match *published {
        Published::Value(v) => (v, v),
        Published::Range([a, b]) if a <= b => (a, b),
        Published::Range([a, b]) => return Err(format!("published range [{a}, {b}] is reversed")),
    };
    match (tolerance, tolerance_abs) {
        (Some(t), None) if t >= 0.0 => Ok((lo - t * lo.abs(), hi + t * hi.abs())),
        (None, Some(a)) if a >= 0.0 => Ok((lo - a, hi + a)),
        (Some(_), Some(_)) => Err("give tolerance (relative) or tolerance_abs, not both".into()),
        (None, None) => Err("a numeric check needs tolerance (relative) or tolerance_abs".into()),
        _ => Err("tolerances must be ≥ 0".into()),
    }
}

/// The result of one check, ready to print.
#[derive(Debug, Clone, PartialEq)]
struct Outcome {
    what: String,
    published: String,
    tolerance: String,
    model: String,
    pass: bool,
}

fn fmt_num(v: f64) -> String {
    if v.abs() >= 100.0 {
        format!("{v:.0}")
    } else {
        format!("{v:.1}")
    }
}

fn fmt_published(p: &Published) -> String {
    match p {
        Published::Value(v) => fmt_num(*v),
        Published::Range([a, b]) => format!("{}–{}", fmt_num(*a), fmt_num(*b)),
    }
}

/// Evaluates one check against a yearly table. `planted` maps catchment → planted fraction.
fn evaluate(check: &Check, table: &[Row], planted: &BTreeMap<String, f64>) -> Result<Outcome, String> {
    let names: Vec<String> = match (&check.catchment, &check.catchments) {
        (Some(c), None) => vec![c.clone()],
        (None, Some(cs)) if !cs.is_empty() => cs.clone(),
        _ => return Err(format!("check {:?}: give catchment or a non-empty catchments list, not both", check.what)),
    };
    let value_of = |metric: &str, c: &str| metric_value(table, metric, c, check.years, check.window_years, planted.get(c).copied());
    if check.metric == "ordering" {
        let of = check.of.as_deref().ok_or("ordering needs `of`")?;
        let expect = check.expect.as_deref().ok_or("ordering needs `expect`")?;
        if names.len() < 2 {
            return Err("ordering needs at least two catchments".into());
        }
        if check.published.is_some() || check.tolerance.is_some() || check.tolerance_abs.is_some() {
            return Err("ordering takes no published value or tolerance".into());
        }
        let vals = names.iter().map(|c| value_of(of, c)).collect::<Result<Vec<f64>, _>>()?;
        let pass = is_ordered(&vals, expect)?;
        let model = names.iter().zip(&vals).map(|(c, v)| format!("{c} {}", fmt_num(*v))).collect::<Vec<_>>().join(", ");
        return Ok(Outcome {
            what: check.what.clone(),
            published: format!("{of} {expect} in the listed order"),
            tolerance: "strict order".into(),
            model,
            pass,
        });
    }
    if check.of.is_some() || check.expect.is_some() {
        return Err(format!("check {:?}: `of` and `expect` belong to ordering checks", check.what));
    }
    let published = check.published.as_ref().ok_or_else(|| format!("check {:?} has no published value", check.what))?;
    let (lo, hi) = bounds(published, check.tolerance, check.tolerance_abs)?;
    let vals = names.iter().map(|c| value_of(&check.metric, c)).collect::<Result<Vec<f64>, _>>()?;
    let model = vals.iter().sum::<f64>() / vals.len() as f64;
    let tol = match (check.tolerance, check.tolerance_abs) {
        (Some(t), _) => format!("±{}% → {}–{}", fmt_num(100.0 * t), fmt_num(lo), fmt_num(hi)),
        (_, Some(a)) => format!("±{} → {}–{}", fmt_num(a), fmt_num(lo), fmt_num(hi)),
        _ => unreachable!("bounds() checked the tolerance"),
    };
    Ok(Outcome {
        what: check.what.clone(),
        published: fmt_published(published),
        tolerance: tol,
        model: fmt_num(model),
        pass: model.is_finite() && model >= lo && model <= hi,
    })
}

// ---------------------------------------------------------------------------
// Cases on disk

fn validation_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("validation")
}

/// Every case folder (a directory under `validation/`), sorted.
fn case_folders() -> Vec<String> {
    let mut v: Vec<String> = std::fs::read_dir(validation_dir())
        .expect("validation/ exists")
        .filter_map(|e| e.ok())
        .filter(|e| e.path().is_dir())
        .map(|e| e.file_name().to_string_lossy().into_owned())
        .collect();
    v.sort();
    v
}

fn read_expected(case: &str) -> (String, Expected) {
    let path = validation_dir().join(case).join("expected.toml");
    let text = std::fs::read_to_string(&path).unwrap_or_else(|e| panic!("{case}: cannot read {}: {e}", path.display()));
    let parsed: Expected = toml::from_str(&text).unwrap_or_else(|e| panic!("{case}: expected.toml does not parse: {e}"));
    (text, parsed)
}

fn planted_fractions(exp: &Expected) -> BTreeMap<String, f64> {
    exp.site.iter().map(|s| (s.catchment.clone(), s.planted_fraction)).collect()
}

/// Runs the binary on a case and returns its `no-control` yearly rows.
fn run_case(case: &str) -> Vec<Row> {
    let scenario = validation_dir().join(case).join("scenario.toml");
    let tmp = tempfile::tempdir().expect("temporary folder");
    let out = tmp.path().join("out");
    let o = Command::new(env!("CARGO_BIN_EXE_yieldshift"))
        .args(["run", scenario.to_str().unwrap(), "--out", out.to_str().unwrap(), "--figures", "none", "--quiet"])
        .output()
        .expect("binary runs");
    assert!(
        o.status.success(),
        "validation case {case}: `yieldshift run` failed:\n{}{}",
        String::from_utf8_lossy(&o.stdout),
        String::from_utf8_lossy(&o.stderr)
    );
    let text = std::fs::read_to_string(out.join("yearly.csv")).unwrap_or_else(|e| panic!("{case}: no yearly.csv: {e}"));
    read_yearly(&text).unwrap_or_else(|e| panic!("{case}: {e}"))
}

/// What a check's outcome means for its case, given whether it is marked a known gap.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Verdict {
    /// Inside the record.
    Pass,
    /// Outside the record: the case fails.
    Fail,
    /// Outside the record, as its `known-gap` mark says: reported, not failed.
    KnownGap,
    /// Marked a known gap but inside the record: the case fails until the mark goes.
    GapClosed,
}

impl Verdict {
    fn label(self) -> &'static str {
        match self {
            Verdict::Pass => "pass",
            Verdict::Fail => "FAIL",
            Verdict::KnownGap => "known-gap",
            Verdict::GapClosed => "FAIL (known-gap now passes: remove the mark)",
        }
    }
}

/// Whether a check is marked a known gap (`expected = "known-gap"`); any other
/// `expected` value is a mistake in the file.
fn is_known_gap(check: &Check) -> Result<bool, String> {
    match check.expected.as_deref() {
        None => Ok(false),
        Some("known-gap") => Ok(true),
        Some(other) => Err(format!("check {:?}: expected = {other:?}; the only mark is \"known-gap\"", check.what)),
    }
}

fn verdict(check: &Check, outcome: &Outcome) -> Result<Verdict, String> {
    Ok(match (is_known_gap(check)?, outcome.pass) {
        (false, true) => Verdict::Pass,
        (false, false) => Verdict::Fail,
        (true, false) => Verdict::KnownGap,
        (true, true) => Verdict::GapClosed,
    })
}

/// Evaluates every check of a case on a yearly table: one printable line per check,
/// and the failures (checks outside the record, and known gaps that now pass).
fn judge(case: &str, exp: &Expected, table: &[Row]) -> Result<(Vec<String>, String), String> {
    let planted = planted_fractions(exp);
    let mut lines = Vec::new();
    let mut failures = String::new();
    for check in &exp.check {
        let o = evaluate(check, table, &planted).map_err(|e| format!("validation case {case}: check {:?}: {e}", check.what))?;
        let v = verdict(check, &o).map_err(|e| format!("validation case {case}: {e}"))?;
        lines.push(format!(
            "validation | {case} | {} | published {} | tolerance {} | model {} | {}",
            o.what,
            o.published,
            o.tolerance,
            o.model,
            v.label()
        ));
        match v {
            Verdict::Fail => {
                let _ = writeln!(
                    failures,
                    "  {case}: {}: published {} ({}), tolerance {}, model {}",
                    o.what, o.published, exp.source, o.tolerance, o.model
                );
            }
            Verdict::GapClosed => {
                let _ = writeln!(
                    failures,
                    "  {case}: {}: marked known-gap but now inside the record (published {}, tolerance {}, model {}); \
                     remove `expected = \"known-gap\"` and `known_gap` from expected.toml and say so in docs/validation.md",
                    o.what, o.published, o.tolerance, o.model
                );
            }
            Verdict::Pass | Verdict::KnownGap => {}
        }
    }
    Ok((lines, failures))
}

/// Runs one case, prints a line per check and fails naming every check outside its
/// tolerance (known gaps excepted) and every known gap that now passes.
fn validate(case: &str) {
    let (_, exp) = read_expected(case);
    let table = run_case(case);
    let (lines, failures) = judge(case, &exp, &table).unwrap_or_else(|e| panic!("{e}"));
    for l in lines {
        println!("{l}");
    }
    assert!(failures.is_empty(), "validation case {case} ({}) is outside the published record:\n{failures}", exp.title);
}

macro_rules! cases {
    ($($name:ident => $folder:literal,)*) => {
        /// Every case folder with a test of its own.
        const CASES: &[&str] = &[$($folder),*];
        $(
            #[test]
            fn $name() {
                validate($folder);
            }
        )*
    };
}

cases! {
    glendhu_fahey_jackson_1997 => "glendhu-fahey-jackson-1997",
    fahey_1994_tussock => "fahey-1994-tussock",
    scott_prinsloo_2008_pine => "scott-prinsloo-2008-pine",
    mokobulaan_scott_lesch_1997 => "mokobulaan-scott-lesch-1997",
    cathedral_peak_ii_pine => "cathedral-peak-ii-pine",
    bosch_hewlett_1982 => "bosch-hewlett-1982",
    farley_2005_grassland_series => "farley-2005-grassland-series",
    trade_tussock_22_years => "trade-tussock-22-years",
}

// ---------------------------------------------------------------------------
// The case folders themselves

#[test]
fn every_case_folder_has_its_own_test() {
    let mut listed: Vec<String> = CASES.iter().map(|s| s.to_string()).collect();
    listed.sort();
    assert_eq!(case_folders(), listed, "add each validation/<case>/ folder to the cases! list (and remove deleted ones)");
}

#[test]
fn every_case_has_expected_toml_with_a_source_and_sourced_checks() {
    let folders = case_folders();
    assert!(folders.len() >= 7, "the validation suite has lost cases: {folders:?}");
    for case in &folders {
        let dir = validation_dir().join(case);
        assert!(dir.join("scenario.toml").is_file(), "{case}: no scenario.toml");
        assert!(dir.join("catchments.csv").is_file(), "{case}: no catchments.csv");
        let (text, exp) = read_expected(case);
        assert!(!exp.title.trim().is_empty(), "{case}: empty title");
        assert!(!exp.source.trim().is_empty(), "{case}: expected.toml needs a source");
        assert!(!exp.check.is_empty(), "{case}: expected.toml has no [[check]]");
        assert!(!exp.site.is_empty(), "{case}: expected.toml has no [[site]] (climate and its sources)");
        for n in &exp.not_tested {
            assert!(!n.trim().is_empty(), "{case}: empty not_tested entry");
        }
        for s in &exp.site {
            assert!(!s.name.trim().is_empty(), "{case}: site {} has no name", s.catchment);
            assert!(s.rain_mm > 0.0 && s.pet_mm > 0.0 && s.control_runoff_mm > 0.0, "{case}: site {} climate", s.catchment);
            assert!(s.planted_fraction > 0.0 && s.planted_fraction <= 1.0, "{case}: site {} planted_fraction", s.catchment);
            for (k, v) in [
                ("rain_source", &s.rain_source),
                ("pet_kind", &s.pet_kind),
                ("pet_source", &s.pet_source),
                ("control_source", &s.control_source),
                ("planted_source", &s.planted_source),
            ] {
                assert!(!v.trim().is_empty(), "{case}: site {} has an empty {k}", s.catchment);
            }
        }
        // Every [[check]] block carries a `# Source:` comment of its own.
        let blocks: Vec<&str> = text.split("[[check]]").skip(1).collect();
        assert_eq!(blocks.len(), exp.check.len(), "{case}: [[check]] count");
        for (i, block) in blocks.iter().enumerate() {
            let own = block.split("\n[").next().unwrap_or(block);
            assert!(
                own.lines().any(|l| l.trim_start().starts_with("# Source:")),
                "{case}: check {} ({:?}) has no `# Source:` comment",
                i + 1,
                exp.check[i].what
            );
        }
        let known = exp.site.iter().map(|s| s.catchment.as_str()).collect::<Vec<_>>();
        for c in &exp.check {
            assert!(
                !c.why_tolerance.trim().is_empty() || c.metric == "ordering",
                "{case}: check {:?} does not say why its tolerance",
                c.what
            );
            for name in c.catchment.iter().chain(c.catchments.iter().flatten()) {
                assert!(known.contains(&name.as_str()), "{case}: check {:?} names catchment {name} with no [[site]]", c.what);
            }
            assert!(c.years[0] <= c.years[1], "{case}: check {:?} years reversed", c.what);
            // A known gap says why, and only a known gap has a `known_gap` note.
            let gap = is_known_gap(c).unwrap_or_else(|e| panic!("{case}: {e}"));
            let note = c.known_gap.as_deref().map(str::trim).unwrap_or("");
            assert_eq!(
                gap,
                !note.is_empty(),
                "{case}: check {:?}: `expected = \"known-gap\"` and a non-empty `known_gap` (why, and the gap measured) go together",
                c.what
            );
            if c.metric != "ordering" {
                let p = c.published.as_ref().unwrap_or_else(|| panic!("{case}: check {:?} has no published value", c.what));
                bounds(p, c.tolerance, c.tolerance_abs).unwrap_or_else(|e| panic!("{case}: check {:?}: {e}", c.what));
            }
            // A control-runoff check states the site's control runoff.
            if c.metric == "mean_uninvaded_yield_mm" {
                let site = exp.site.iter().find(|s| Some(&s.catchment) == c.catchment.as_ref()).expect("site checked above");
                assert!(
                    matches!(c.published, Some(Published::Value(v)) if v == site.control_runoff_mm),
                    "{case}: check {:?} must publish the site's control_runoff_mm {}",
                    c.what,
                    site.control_runoff_mm
                );
            }
        }
    }
}

/// Plain CSV table: header → column of strings.
fn read_csv_columns(path: &Path) -> Vec<BTreeMap<String, String>> {
    let mut rdr = csv::Reader::from_path(path).unwrap_or_else(|e| panic!("{}: {e}", path.display()));
    let headers = rdr.headers().unwrap().clone();
    rdr.records()
        .map(|r| {
            let r = r.unwrap();
            headers.iter().zip(r.iter()).map(|(h, v)| (h.to_string(), v.to_string())).collect()
        })
        .collect()
}

/// The `[[calibration]]` rule: every site of the case has one entry, with `catchment`
/// and `w_grass` only (the forest curve and interception stay at their defaults), and
/// each entry carries a `# Fitted to:` comment naming the site's control runoff.
fn check_calibration(case: &str, scenario: &toml::Table, text: &str, exp: &Expected) {
    let entries: Vec<&toml::Table> = match scenario.get("calibration") {
        None => Vec::new(),
        Some(v) => v
            .as_array()
            .unwrap_or_else(|| panic!("{case}: calibration must be [[calibration]] entries"))
            .iter()
            .map(|e| e.as_table().unwrap_or_else(|| panic!("{case}: a [[calibration]] entry is not a table")))
            .collect(),
    };
    // The raw text of each entry, for its comments: from its header to the next table.
    let blocks: Vec<&str> = text.split("[[calibration]]").skip(1).map(|b| b.split("\n[").next().unwrap_or(b)).collect();
    assert_eq!(blocks.len(), entries.len(), "{case}: [[calibration]] count in the text and the table differ");
    let mut seen = Vec::new();
    for (entry, block) in entries.iter().zip(&blocks) {
        let keys: Vec<&str> = entry.keys().map(String::as_str).collect();
        assert_eq!(keys, ["catchment", "w_grass"], "{case}: a [[calibration]] entry may set catchment and w_grass only, not {keys:?}");
        let id = entry["catchment"].as_str().unwrap_or_else(|| panic!("{case}: [[calibration]] catchment is not a string"));
        assert!(!seen.contains(&id), "{case}: catchment {id} calibrated twice");
        seen.push(id);
        let site = exp.site.iter().find(|s| s.catchment == id).unwrap_or_else(|| panic!("{case}: [[calibration]] {id} has no [[site]]"));
        let control = format!("{}", site.control_runoff_mm);
        assert!(
            block.lines().any(|l| {
                let l = l.trim_start();
                l.starts_with("# Fitted to:")
                    && l.contains("control runoff")
                    && l.split(|c: char| !(c.is_ascii_digit() || c == '.')).any(|w| w == control)
            }),
            "{case}: [[calibration]] {id} needs a `# Fitted to:` comment naming the control runoff it was fitted to ({control} mm)"
        );
    }
    for s in &exp.site {
        assert!(
            seen.contains(&s.catchment.as_str()),
            "{case}: site {} has no [[calibration]] w_grass fitted to its control runoff",
            s.catchment
        );
    }
}

/// The closure rule: a planting (a case with `stands`) sets `[canopy_closure]` with
/// `half_closure_age_yr` and `steepness_per_yr` and nothing else; a case without
/// stands sets none. Returns the two values, for the same-in-every-case check.
fn check_plantation_closure(case: &str, scenario: &toml::Table) -> Option<(f64, f64)> {
    let planting = scenario.get("stands").is_some();
    let Some(cc) = scenario.get("canopy_closure") else {
        assert!(!planting, "{case}: a planting sets [canopy_closure] half_closure_age_yr and steepness_per_yr (the plantation closure)");
        return None;
    };
    assert!(planting, "{case}: [canopy_closure] is for plantings (a stands table); this case has none");
    let cc = cc.as_table().unwrap_or_else(|| panic!("{case}: [canopy_closure] is not a table"));
    let keys: Vec<&str> = cc.keys().map(String::as_str).collect();
    assert_eq!(
        keys,
        ["half_closure_age_yr", "steepness_per_yr"],
        "{case}: [canopy_closure] may set half_closure_age_yr and steepness_per_yr only, not {keys:?}"
    );
    let num = |k: &str| {
        cc[k].as_float().or_else(|| cc[k].as_integer().map(|i| i as f64)).unwrap_or_else(|| panic!("{case}: {k} is not a number"))
    };
    Some((num("half_closure_age_yr"), num("steepness_per_yr")))
}

#[test]
fn every_planting_uses_the_same_plantation_closure() {
    let mut closures: Vec<(String, (f64, f64))> = Vec::new();
    for case in case_folders() {
        let text = std::fs::read_to_string(validation_dir().join(&case).join("scenario.toml")).unwrap();
        let scenario: toml::Table = toml::from_str(&text).unwrap_or_else(|e| panic!("{case}: scenario.toml: {e}"));
        if let Some(c) = check_plantation_closure(&case, &scenario) {
            closures.push((case, c));
        }
    }
    for (case, c) in &closures {
        assert_eq!(
            *c, closures[0].1,
            "{case}: plantation closure {c:?} differs from {}'s {:?}: one choice for every planting (docs/validation.md)",
            closures[0].0, closures[0].1
        );
    }
}

/// Zhang et al. (2001) eq. 8 yield, `P − ET`, with ET capped at `min(P, E0)` (as the
/// model does), for the calibration check below.
fn zhang_yield_mm(p: f64, e0: f64, w: f64) -> f64 {
    let phi = e0 / p;
    let et = p * (1.0 - 1.0 / (1.0 + phi + w * phi * phi));
    p - et.clamp(0.0, p.min(e0))
}

/// The `w` at which `zhang_yield_mm(p, e0, w) = q` (closed form, uncapped).
fn zhang_w_for_yield(p: f64, e0: f64, q: f64) -> f64 {
    let phi = e0 / p;
    (p / q - 1.0 - phi) / (phi * phi)
}

#[test]
fn calibrated_grass_curve_gives_the_control_runoff() {
    // Hand check of the closed form: P 1000, E0 800, w 0.5 → 471.698 mm (see
    // harness_reads_what_the_binary_writes), and back.
    assert!((zhang_yield_mm(1000.0, 800.0, 0.5) - 471.698).abs() < 1e-3);
    assert!((zhang_w_for_yield(1000.0, 800.0, 471.698) - 0.5).abs() < 1e-5);
    for case in case_folders() {
        let dir = validation_dir().join(&case);
        let (_, exp) = read_expected(&case);
        let scenario: toml::Table = toml::from_str(&std::fs::read_to_string(dir.join("scenario.toml")).unwrap()).unwrap();
        let Some(entries) = scenario.get("calibration").and_then(|v| v.as_array()) else {
            continue;
        };
        for e in entries {
            let id = e["catchment"].as_str().unwrap();
            let w = e["w_grass"].as_float().unwrap_or_else(|| panic!("{case}: {id} w_grass is not a float"));
            let s = exp.site.iter().find(|s| s.catchment == id).unwrap();
            let solved = zhang_w_for_yield(s.rain_mm, s.pet_mm, s.control_runoff_mm);
            if (W_GRASS_MIN..=W_GRASS_MAX).contains(&solved) {
                let q = zhang_yield_mm(s.rain_mm, s.pet_mm, w);
                assert!(
                    (q - s.control_runoff_mm).abs() <= 0.005 * s.control_runoff_mm,
                    "{case}: {id} w_grass {w} gives {q:.1} mm at P {} and PET {}, not the control's {} mm (solved w {solved:.4})",
                    s.rain_mm,
                    s.pet_mm,
                    s.control_runoff_mm
                );
            } else {
                let bound = solved.clamp(W_GRASS_MIN, W_GRASS_MAX);
                assert_eq!(w, bound, "{case}: {id}: the solved w {solved:.4} is outside {W_GRASS_MIN}–{W_GRASS_MAX}; w_grass falls back to the nearest bound {bound}");
            }
        }
    }
}

/// The scenario's range for `w_grass` (src/input/scenario.rs).
const W_GRASS_MIN: f64 = 0.01;
const W_GRASS_MAX: f64 = 20.0;

#[test]
fn case_files_agree_with_their_site_tables_and_keep_the_defaults() {
    for case in case_folders() {
        let dir = validation_dir().join(&case);
        let (_, exp) = read_expected(&case);
        let scenario_text = std::fs::read_to_string(dir.join("scenario.toml")).unwrap();
        let scenario: toml::Table = toml::from_str(&scenario_text).unwrap_or_else(|e| panic!("{case}: scenario.toml: {e}"));
        // The model's defaults are what is validated: no forest curve, interception or
        // PET-factor parameter may be set (a change of default must show here).
        if let Some(h) = scenario.get("hydrology").and_then(|v| v.as_table()) {
            for k in h.keys() {
                assert_eq!(k, "method", "{case}: [hydrology] sets {k}; validation cases use the defaults");
            }
            assert_eq!(h.get("method").and_then(|v| v.as_str()), Some("zhang"), "{case}: method");
        }
        // Allowed: the grass curve fitted to the control, and a plantation's closure.
        check_calibration(&case, &scenario, &scenario_text, &exp);
        check_plantation_closure(&case, &scenario);
        // A planting that does not spread.
        let inv = scenario.get("invasion").and_then(|v| v.as_table()).unwrap_or_else(|| panic!("{case}: no [invasion]"));
        for k in ["spread_rate_per_yr", "seed_rain_ha_per_yr"] {
            let v = inv.get(k).and_then(|v| v.as_float().or_else(|| v.as_integer().map(|i| i as f64)));
            assert_eq!(v, Some(0.0), "{case}: [invasion] {k} must be 0 (a planting that does not spread)");
        }
        let catchments = read_csv_columns(&dir.join(scenario.get("catchments").and_then(|v| v.as_str()).expect("catchments key")));
        let stands = match scenario.get("stands").and_then(|v| v.as_str()) {
            Some(p) => read_csv_columns(&dir.join(p)),
            None => Vec::new(),
        };
        let num = |m: &BTreeMap<String, String>, k: &str| -> f64 {
            m.get(k).unwrap_or_else(|| panic!("{case}: column {k} missing")).trim().parse().unwrap_or_else(|e| panic!("{case}: {k}: {e}"))
        };
        for s in &exp.site {
            let row = catchments
                .iter()
                .find(|r| r.get("id") == Some(&s.catchment))
                .unwrap_or_else(|| panic!("{case}: catchment {} not in catchments.csv", s.catchment));
            assert_eq!(num(row, "rain_mm"), s.rain_mm, "{case}: {} rain_mm differs between catchments.csv and expected.toml", s.catchment);
            assert_eq!(num(row, "pet_mm"), s.pet_mm, "{case}: {} pet_mm differs between catchments.csv and expected.toml", s.catchment);
            let area = num(row, "area_ha");
            let planted: f64 = stands.iter().filter(|r| r.get("catchment") == Some(&s.catchment)).map(|r| num(r, "area_ha")).sum();
            assert!(
                (planted / area - s.planted_fraction).abs() < 5e-4,
                "{case}: {} stands.csv plants {planted} of {area} ha ({:.4}), expected.toml says {}",
                s.catchment,
                planted / area,
                s.planted_fraction
            );
            assert!(
                (num(row, "vulnerable_ha") - planted).abs() < 1e-9,
                "{case}: {} vulnerable_ha must equal the planted area",
                s.catchment
            );
            for k in ["scattered_ha", "medium_ha", "dense_ha"] {
                assert_eq!(num(row, k), 0.0, "{case}: {} {k} must be 0: its stands come from stands.csv", s.catchment);
            }
        }
    }
}

// ---------------------------------------------------------------------------
// The harness itself, on a hand-made yearly table

fn row(c: &str, year: i32, yield_mm: f64, uninvaded_yield_mm: f64) -> Row {
    Row { catchment: c.into(), year, yield_mm, uninvaded_yield_mm }
}

/// Catchment `a`: control 100 mm every year, yields 100, 90, 80, 70, 60 in 2000–2004
/// (reductions 0, 10, 20, 30, 40). Catchment `b`: control 200, yields 190, 180, 170,
/// 160, 150 (reductions 10, 20, 30, 40, 50).
fn table() -> Vec<Row> {
    let mut t = Vec::new();
    for (i, y) in (2000..=2004).enumerate() {
        t.push(row("a", y, 100.0 - 10.0 * i as f64, 100.0));
        t.push(row("b", y, 190.0 - 10.0 * i as f64, 200.0));
    }
    t
}

fn check(metric: &str, catchment: &str, years: [i32; 2]) -> Check {
    Check {
        what: "test".into(),
        metric: metric.into(),
        catchment: Some(catchment.into()),
        catchments: None,
        years,
        window_years: None,
        of: None,
        expect: None,
        published: Some(Published::Value(0.0)),
        tolerance: None,
        tolerance_abs: Some(0.0),
        why_tolerance: "test".into(),
        expected: None,
        known_gap: None,
    }
}

#[test]
fn harness_reads_only_no_control_rows_by_column_name() {
    let text = "strategy,year,catchment,rain_mm,yield_mm,uninvaded_yield_mm\n\
                no-control,2000,a,1000,90.5,100\n\
                contain-early,2000,a,1000,99,100\n\
                no-control,2001,a,1000,80,100.25\n";
    let rows = read_yearly(text).unwrap();
    assert_eq!(rows, vec![row("a", 2000, 90.5, 100.0), row("a", 2001, 80.0, 100.25)]);
    assert!(read_yearly("catchment,strategy,year,yield_mm\n").unwrap_err().contains("uninvaded_yield_mm"));
}

#[test]
fn harness_metrics_on_a_hand_made_table() {
    let t = table();
    let v = |m: &str, c: &str, y: [i32; 2]| metric_value(&t, m, c, y, None, Some(0.5)).unwrap();
    // a, 2000–2004: reductions 0..40 → mean 20 mm; Σ red 100 / Σ control 500 = 20 %.
    assert_eq!(v("mean_reduction_mm", "a", [2000, 2004]), 20.0);
    assert_eq!(v("mean_reduction_pct", "a", [2000, 2004]), 20.0);
    // b, 2001–2003: reductions 20, 30, 40 → 30 mm; 90 / 600 = 15 %.
    assert_eq!(v("mean_reduction_mm", "b", [2001, 2003]), 30.0);
    assert_eq!(v("mean_reduction_pct", "b", [2001, 2003]), 15.0);
    // Planted fraction 0.5: per 10 % cover divide by 5.
    assert_eq!(v("reduction_mm_per_10pct_cover", "a", [2000, 2004]), 4.0);
    assert_eq!(v("reduction_pct_per_10pct_cover", "b", [2001, 2003]), 3.0);
    assert_eq!(v("max_reduction_mm", "a", [2000, 2003]), 30.0);
    assert_eq!(v("max_reduction_pct", "b", [2000, 2004]), 25.0);
    assert_eq!(v("min_yield_mm", "a", [2000, 2004]), 60.0);
    assert_eq!(v("mean_uninvaded_yield_mm", "b", [2002, 2002]), 200.0);
    // A single year is a one-year mean.
    assert_eq!(v("mean_reduction_mm", "a", [2003, 2003]), 30.0);
    // Peak over 2-year runs: a's best run is 2003–2004, (30 + 40)/2 = 35.
    assert_eq!(metric_value(&t, "mean_reduction_mm", "a", [2000, 2004], Some(2), None).unwrap(), 35.0);
    assert_eq!(metric_value(&t, "mean_reduction_mm", "a", [2000, 2002], Some(3), None).unwrap(), 10.0);
}

#[test]
fn harness_refuses_what_it_cannot_evaluate() {
    let t = table();
    assert!(metric_value(&t, "mean_reduction_mm", "a", [1999, 2001], None, None).unwrap_err().contains("1999"));
    assert!(metric_value(&t, "mean_reduction_mm", "zz", [2000, 2000], None, None).is_err());
    assert!(metric_value(&t, "mean_reduction_mm", "a", [2002, 2001], None, None).unwrap_err().contains("reversed"));
    assert!(metric_value(&t, "median_reduction", "a", [2000, 2001], None, None).unwrap_err().contains("unknown"));
    assert!(metric_value(&t, "reduction_mm_per_10pct_cover", "a", [2000, 2001], None, None).unwrap_err().contains("planted_fraction"));
    assert!(metric_value(&t, "mean_reduction_mm", "a", [2000, 2001], Some(3), None).unwrap_err().contains("window"));
    assert!(metric_value(&t, "min_yield_mm", "a", [2000, 2001], Some(1), None).unwrap_err().contains("window"));
}

/// Writes a one-catchment scenario without the keys that are still being wired in.
fn write_plain_scenario(dir: &Path, dense_ha: f64) -> PathBuf {
    std::fs::write(
        dir.join("catchments.csv"),
        format!("id,area_ha,rain_mm,pet_mm,vulnerable_ha,scattered_ha,medium_ha,dense_ha\nc,1000,1000,800,500,0,0,{dense_ha}\n"),
    )
    .unwrap();
    let path = dir.join("scenario.toml");
    std::fs::write(
        &path,
        "start_year = 2000\nhorizon_years = 3\ncatchments = \"catchments.csv\"\n[invasion]\nspread_rate_per_yr = 0\nseed_rain_ha_per_yr = 0\n",
    )
    .unwrap();
    path
}

#[test]
fn harness_reads_what_the_binary_writes() {
    // The harness's reading of yearly.csv, on the real binary with today's keys. Zhang
    // (2001) eq. 8, w = 0.5, P 1000, E0 800: φ = 0.8, ET/P = 1 − 1/(1 + 0.8 + 0.5·0.64)
    // = 0.528302 → grass yield 471.698 mm (hand computation).
    let tmp = tempfile::tempdir().unwrap();
    for (dense_ha, grows) in [(0.0, false), (400.0, true)] {
        let scenario = write_plain_scenario(tmp.path(), dense_ha);
        let out = tmp.path().join(format!("out{dense_ha}"));
        let o = Command::new(env!("CARGO_BIN_EXE_yieldshift"))
            .args(["run", scenario.to_str().unwrap(), "--out", out.to_str().unwrap(), "--figures", "none", "--quiet"])
            .output()
            .unwrap();
        assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
        let t = read_yearly(&std::fs::read_to_string(out.join("yearly.csv")).unwrap()).unwrap();
        assert_eq!(t.len(), 4, "one no-control row per year 2000-2003");
        let unin = metric_value(&t, "mean_uninvaded_yield_mm", "c", [2000, 2003], None, None).unwrap();
        assert!((unin - 471.698).abs() < 0.01, "uninvaded yield {unin}");
        let red = metric_value(&t, "mean_reduction_mm", "c", [2000, 2003], None, None).unwrap();
        if grows {
            // 400 ha of dense stand on 1000 ha: the forest uses more water than grass.
            assert!(red > 10.0, "reduction {red}");
            assert!(metric_value(&t, "min_yield_mm", "c", [2000, 2003], None, None).unwrap() < unin);
        } else {
            assert_eq!(red, 0.0, "no stand, no reduction");
        }
    }
}

#[test]
fn harness_tolerances_and_ranges() {
    assert_eq!(bounds(&Published::Value(200.0), Some(0.25), None).unwrap(), (150.0, 250.0));
    assert_eq!(bounds(&Published::Value(31.0), None, Some(5.0)).unwrap(), (26.0, 36.0));
    assert_eq!(bounds(&Published::Range([25.0, 30.0]), None, Some(5.0)).unwrap(), (20.0, 35.0));
    assert_eq!(bounds(&Published::Range([20.0, 40.0]), Some(0.5), None).unwrap(), (10.0, 60.0));
    assert!(bounds(&Published::Value(1.0), None, None).is_err());
    assert!(bounds(&Published::Value(1.0), Some(0.1), Some(1.0)).is_err());
    assert!(bounds(&Published::Range([3.0, 2.0]), Some(0.1), None).is_err());
    assert!(bounds(&Published::Value(1.0), Some(-0.1), None).is_err());
}

#[test]
fn harness_passes_inside_and_fails_outside_the_tolerance() {
    let t = table();
    let planted = BTreeMap::from([("a".to_string(), 0.5), ("b".to_string(), 0.5)]);
    // Model 20 mm; published 25 ± 20 % → 20–30: passes at the edge.
    let mut c = check("mean_reduction_mm", "a", [2000, 2004]);
    c.published = Some(Published::Value(25.0));
    c.tolerance_abs = None;
    c.tolerance = Some(0.2);
    let o = evaluate(&c, &t, &planted).unwrap();
    assert!(o.pass, "{o:?}");
    assert_eq!(o.model, "20.0");
    assert_eq!(o.tolerance, "±20.0% → 20.0–30.0");
    // ± 10 % → 22.5–27.5: fails.
    c.tolerance = Some(0.1);
    let o = evaluate(&c, &t, &planted).unwrap();
    assert!(!o.pass, "{o:?}");
    // Mean over two catchments: (20 + 30)/2 = 25 for 2000–2004 (b: 10..50 → 30).
    c.catchment = None;
    c.catchments = Some(vec!["a".into(), "b".into()]);
    let o = evaluate(&c, &t, &planted).unwrap();
    assert_eq!(o.model, "25.0");
    assert!(o.pass);
    // Both catchment and catchments: refused.
    c.catchment = Some("a".into());
    assert!(evaluate(&c, &t, &planted).is_err());
}

#[test]
fn harness_ordering_checks() {
    let t = table();
    let planted = BTreeMap::new();
    let mut c = check("ordering", "a", [2000, 2004]);
    c.catchment = None;
    c.published = None;
    c.tolerance_abs = None;
    c.of = Some("mean_reduction_pct".into());
    // a 20 %, b 15 %: decreasing in the order a, b.
    c.catchments = Some(vec!["a".into(), "b".into()]);
    c.expect = Some("decreasing".into());
    assert!(evaluate(&c, &t, &planted).unwrap().pass);
    c.expect = Some("increasing".into());
    assert!(!evaluate(&c, &t, &planted).unwrap().pass);
    // In mm: a 20, b 30 → increasing.
    c.of = Some("mean_reduction_mm".into());
    let o = evaluate(&c, &t, &planted).unwrap();
    assert!(o.pass);
    assert_eq!(o.model, "a 20.0, b 30.0");
    // Equal values are not an order.
    c.catchments = Some(vec!["a".into(), "a".into()]);
    assert!(!evaluate(&c, &t, &planted).unwrap().pass);
    c.expect = Some("sideways".into());
    assert!(evaluate(&c, &t, &planted).is_err());
    // An ordering with a published value is a mistake in the file.
    c.expect = Some("increasing".into());
    c.published = Some(Published::Value(1.0));
    assert!(evaluate(&c, &t, &planted).is_err());
    assert!(is_ordered(&[3.0, 2.0, 1.0], "decreasing").unwrap());
    assert!(!is_ordered(&[3.0, 2.0, 2.5], "decreasing").unwrap());
}

#[test]
fn harness_known_gaps_are_reported_not_failed_and_fail_once_they_pass() {
    let t = table();
    // Catchment a, 2000–2004: mean reduction 20 mm.
    let mut inside = check("mean_reduction_mm", "a", [2000, 2004]);
    inside.what = "inside".into();
    inside.published = Some(Published::Value(20.0));
    inside.tolerance_abs = Some(1.0);
    let mut outside = inside.clone();
    outside.what = "outside".into();
    outside.published = Some(Published::Value(50.0));
    let exp =
        |checks: Vec<Check>| Expected { title: "t".into(), source: "s".into(), site: Vec::new(), not_tested: Vec::new(), check: checks };
    // Unmarked: inside passes, outside fails.
    let (lines, failures) = judge("c", &exp(vec![inside.clone(), outside.clone()]), &t).unwrap();
    assert!(lines[0].ends_with("| pass") && lines[1].ends_with("| FAIL"), "{lines:?}");
    assert!(failures.contains("outside") && !failures.contains("inside"), "{failures}");
    // Marked known-gap and still outside: reported, not failed.
    let mut gap = outside.clone();
    gap.expected = Some("known-gap".into());
    gap.known_gap = Some("model 20 mm against 49–51".into());
    let (lines, failures) = judge("c", &exp(vec![inside.clone(), gap.clone()]), &t).unwrap();
    assert!(lines[1].ends_with("| known-gap"), "{lines:?}");
    assert!(failures.is_empty(), "{failures}");
    // Marked known-gap but inside the record: the case fails until the mark goes.
    let mut closed = inside.clone();
    closed.expected = Some("known-gap".into());
    closed.known_gap = Some("was outside".into());
    let (lines, failures) = judge("c", &exp(vec![closed]), &t).unwrap();
    assert!(lines[0].contains("known-gap now passes"), "{lines:?}");
    assert!(failures.contains("now inside the record"), "{failures}");
    // Any other mark is a mistake in the file.
    let mut odd = outside;
    odd.expected = Some("fail".into());
    assert!(judge("c", &exp(vec![odd]), &t).unwrap_err().contains("known-gap"));
    // Ordering checks take the mark too.
    let mut ord = check("ordering", "a", [2000, 2004]);
    ord.catchment = None;
    ord.catchments = Some(vec!["a".into(), "b".into()]);
    ord.published = None;
    ord.tolerance_abs = None;
    ord.of = Some("mean_reduction_mm".into());
    ord.expect = Some("decreasing".into()); // a 20, b 30: not decreasing
    ord.expected = Some("known-gap".into());
    ord.known_gap = Some("a 20, b 30".into());
    let (lines, failures) = judge("c", &exp(vec![ord]), &t).unwrap();
    assert!(lines[0].ends_with("| known-gap") && failures.is_empty(), "{lines:?} {failures}");
}

// ---------------------------------------------------------------------------
// The figure of docs/validation.md

/// Published value (the middle of a published range), its tolerance bounds and the
/// model's value of a numeric check; `None` for an ordering check or a published 0.
fn numeric(check: &Check, table: &[Row], planted: &BTreeMap<String, f64>) -> Option<(f64, f64, f64, f64)> {
    let published = check.published.as_ref()?;
    let mid = match *published {
        Published::Value(v) => v,
        Published::Range([a, b]) => 0.5 * (a + b),
    };
    if mid == 0.0 || check.metric == "ordering" {
        return None;
    }
    let (lo, hi) = bounds(published, check.tolerance, check.tolerance_abs).ok()?;
    let names: Vec<String> = check.catchment.clone().map(|c| vec![c]).or_else(|| check.catchments.clone())?;
    let vals: Vec<f64> = names
        .iter()
        .map(|c| metric_value(table, &check.metric, c, check.years, check.window_years, planted.get(c).copied()))
        .collect::<Result<_, _>>()
        .ok()?;
    Some((mid, lo, hi, vals.iter().sum::<f64>() / vals.len() as f64))
}

/// Redraws `docs/img/validation.png`: every numeric check as the model's value in
/// percent of the published one (bar), with the tolerance as a whisker (the record's
/// own value is 100 %). Run with `cargo test --test validation -- --ignored`.
#[test]
#[ignore = "writes docs/img/validation.png; run by hand after a change of the model or the cases"]
fn draw_the_validation_figure() {
    use yieldshift::plot::bars::{Bar, HBarChart};
    use yieldshift::plot::legend::{Entry, Swatch};
    use yieldshift::plot::{palette, save_figure, Formats};
    let mut bars = Vec::new();
    for case in CASES {
        let (_, exp) = read_expected(case);
        let table = run_case(case);
        let planted = planted_fractions(&exp);
        for check in &exp.check {
            let Some((mid, lo, hi, model)) = numeric(check, &table, &planted) else { continue };
            let gap = is_known_gap(check).unwrap_or(false);
            let short: String = check.what.chars().take(58).collect();
            bars.push(Bar {
                label: format!("{case}: {short}"),
                value: 100.0 * model / mid,
                range: Some((100.0 * lo / mid, 100.0 * hi / mid)),
                marker: Some(100.0),
                colour: if gap { palette::GUIDELINE } else { palette::YIELD },
            });
        }
    }
    let chart = HBarChart {
        title: "Model against the published records (default parameters)".into(),
        x_label: "Model, % of the published value (whisker: tolerance; diamond: 100 %)".into(),
        bars,
        value_decimals: 0,
        x_range: Some((0.0, 160.0)),
        legend: vec![
            Entry { label: "Inside the record's tolerance".into(), swatch: Swatch::Fill { colour: palette::YIELD, opacity: 1.0 } },
            Entry { label: "Known gap (outside)".into(), swatch: Swatch::Fill { colour: palette::GUIDELINE, opacity: 1.0 } },
        ],
    };
    let stem = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("docs/img/validation");
    save_figure(&chart, &stem, Formats { png: true, svg: false }).unwrap();
}
