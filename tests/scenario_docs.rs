//! `docs/scenario.md` states every numeric key as the parameter table does.
//!
//! Every row of [`PARAMS`] must appear in the reference under its table's heading
//! with the table's unit, default and allowed range, written as the reference
//! writes them (`0–1`, `0–10 000`, `0–10⁷`, `−0.95–0.95`, `≥ 0`; a list's range
//! after `list, `; a rule between keys may follow the range after `, `). Every
//! documented key that has a unit (other than text, path, id or table) must be
//! a row of the table, and the keys the reference lists as accepting a
//! distribution must be exactly the table's keys that may vary.

use std::collections::BTreeSet;
use std::ops::Bound;
use yieldshift::model::params::{Absent, Kind, ParamSpec, Range, PARAMS};

/// A row of one of the reference's key tables.
#[derive(Debug)]
struct DocRow {
    /// `""` for the top level, `invasion`, `contaminant`.
    section: String,
    /// Under a `[[section]]` heading.
    repeated: bool,
    /// The keys the row documents (a row may name several: `` `w_forest`, `w_grass` ``).
    keys: Vec<String>,
    /// Column name → cell text.
    cells: Vec<(String, String)>,
    /// Line in the file, for messages.
    line: usize,
}

impl DocRow {
    fn cell(&self, column: &str) -> Option<&str> {
        self.cells.iter().find(|(c, _)| c == column).map(|(_, v)| v.as_str())
    }
}

fn reference() -> String {
    std::fs::read_to_string(concat!(env!("CARGO_MANIFEST_DIR"), "/docs/scenario.md")).unwrap()
}

/// The section a heading introduces: `## Top level`, ``## `[invasion]` ``, ``## `[[strategy]]` (…)``.
fn heading_section(line: &str) -> Option<(String, bool)> {
    let h = line.strip_prefix("## ")?.trim();
    if h == "Top level" {
        return Some((String::new(), false));
    }
    let inner = h.strip_prefix('`')?.split('`').next()?;
    if let Some(name) = inner.strip_prefix("[[").and_then(|s| s.strip_suffix("]]")) {
        Some((name.to_string(), true))
    } else {
        inner.strip_prefix('[').and_then(|s| s.strip_suffix(']')).map(|name| (name.to_string(), false))
    }
}

fn cells(line: &str) -> Vec<String> {
    let t = line.trim().trim_start_matches('|').trim_end_matches('|');
    t.split('|').map(|c| c.trim().to_string()).collect()
}

/// Every row of every key table, with the section of its heading.
fn doc_rows(text: &str) -> Vec<DocRow> {
    let mut out = Vec::new();
    let mut section: Option<(String, bool)> = None;
    let mut columns: Vec<String> = Vec::new();
    for (n, line) in text.lines().enumerate() {
        if line.starts_with("## ") {
            section = heading_section(line);
            columns.clear();
        } else if line.starts_with("| key |") {
            columns = cells(line);
        } else if line.starts_with("| `") && !columns.is_empty() {
            let Some((name, repeated)) = &section else { continue };
            let c = cells(line);
            assert_eq!(c.len(), columns.len(), "docs/scenario.md:{}: {} cells for {} columns", n + 1, c.len(), columns.len());
            let keys = c[0].split(", ").map(|k| k.trim_matches('`').to_string()).collect();
            out.push(DocRow {
                section: name.clone(),
                repeated: *repeated,
                keys,
                cells: columns.iter().cloned().zip(c).collect(),
                line: n + 1,
            });
        }
    }
    out
}

const SUPERSCRIPT: [char; 10] = ['⁰', '¹', '²', '³', '⁴', '⁵', '⁶', '⁷', '⁸', '⁹'];

/// A number as the reference writes it: `0.01`, `9000`, `10 000`, `10⁷`, `−90`.
fn doc_number(v: f64) -> String {
    let a = v.abs();
    let power = (6..=18).find(|&k| 10f64.powi(k) == a);
    let s = match power {
        Some(k) => format!("10{}", k.to_string().chars().map(|d| SUPERSCRIPT[d.to_digit(10).unwrap() as usize]).collect::<String>()),
        None if a >= 10_000.0 && a.fract() == 0.0 => {
            let digits = format!("{}", a as u64);
            let mut g = String::new();
            for (i, c) in digits.chars().enumerate() {
                if i > 0 && (digits.len() - i) % 3 == 0 {
                    g.push(' ');
                }
                g.push(c);
            }
            g
        }
        None => format!("{a}"),
    };
    if v < 0.0 {
        format!("−{s}")
    } else {
        s
    }
}

/// A range as the reference writes it: `0–1`, `≥ 0`, and `0 < x ≤ 1` when an end is excluded.
fn doc_range(r: Range) -> String {
    let end = |b: Bound<f64>, incl: &str, excl: &str| match b {
        Bound::Included(v) => Some((incl.to_string(), doc_number(v))),
        Bound::Excluded(v) => Some((excl.to_string(), doc_number(v))),
        Bound::Unbounded => None,
    };
    match (r.min, r.max) {
        (Bound::Included(a), Bound::Included(b)) => format!("{}–{}", doc_number(a), doc_number(b)),
        (min, Bound::Unbounded) => end(min, "≥", ">").map(|(op, v)| format!("{op} {v}")).unwrap_or_else(|| "any".into()),
        (Bound::Unbounded, max) => end(max, "≤", "<").map(|(op, v)| format!("{op} {v}")).unwrap_or_default(),
        (min, max) => {
            let (lo_op, lo) = end(min, "≤", "<").unwrap();
            let (hi_op, hi) = end(max, "≤", "<").unwrap();
            format!("{lo} {lo_op} x {hi_op} {hi}")
        }
    }
}

fn parse_doc_number(s: &str) -> Option<f64> {
    s.replace('−', "-").replace(' ', "").parse().ok()
}

fn where_(spec: &ParamSpec) -> String {
    if spec.repeated {
        format!("[[{}]] {}", spec.section, spec.key)
    } else if spec.section.is_empty() {
        format!("top-level {}", spec.key)
    } else {
        format!("[{}] {}", spec.section, spec.key)
    }
}

#[test]
fn every_key_of_the_table_is_documented_with_its_unit_default_and_range() {
    let rows = doc_rows(&reference());
    assert!(rows.len() > 40, "the reference's key tables were not found ({} rows)", rows.len());
    let mut wrong = Vec::new();
    for spec in PARAMS.iter() {
        let Some(row) =
            rows.iter().find(|r| r.section == spec.section && r.repeated == spec.repeated && r.keys.iter().any(|k| k == spec.key))
        else {
            wrong.push(format!("{}: not documented under its heading", where_(spec)));
            continue;
        };
        let at = format!("docs/scenario.md:{} {}", row.line, where_(spec));
        match row.cell("unit") {
            Some(u) if u == spec.unit => {}
            u => wrong.push(format!("{at}: unit {u:?}, the table says {:?}", spec.unit)),
        }
        let default = row.cell("default");
        let default_ok = match (spec.absent, default) {
            (Absent::Default(v), Some(d)) => parse_doc_number(d) == Some(v),
            (Absent::Required, Some(d)) => d.starts_with("required"),
            (Absent::Unset, Some(d)) => d == "none",
            (_, None) => false,
        };
        if !default_ok {
            wrong.push(format!("{at}: default {default:?}, the table says {:?}", spec.absent));
        }
        let range = doc_range(spec.range);
        let allowed = row.cell("allowed").unwrap_or_default();
        let rest = match spec.kind {
            Kind::List => allowed.strip_prefix("list, "),
            Kind::Number | Kind::Whole => Some(allowed),
        };
        let range_ok = rest.is_some_and(|r| r == range || r.starts_with(&format!("{range}, ")));
        if !range_ok {
            let list = if spec.kind == Kind::List { "list, " } else { "" };
            wrong.push(format!("{at}: allowed {allowed:?}, the table says \"{list}{range}\""));
        }
    }
    assert!(wrong.is_empty(), "docs/scenario.md disagrees with the parameter table:\n{}", wrong.join("\n"));
}

#[test]
fn every_documented_quantity_is_a_key_of_the_table() {
    let not_quantities = ["", "text", "path", "id", "table"];
    let mut unknown = Vec::new();
    for row in doc_rows(&reference()) {
        let unit = row.cell("unit").unwrap_or_default();
        if not_quantities.contains(&unit) {
            continue;
        }
        for k in &row.keys {
            if !PARAMS.iter().any(|p| p.section == row.section && p.repeated == row.repeated && p.key == k) {
                unknown.push(format!("docs/scenario.md:{}: '{k}' ({unit}) in [{}] is not in the parameter table", row.line, row.section));
            }
        }
    }
    assert!(unknown.is_empty(), "{}", unknown.join("\n"));
}

#[test]
fn the_keys_documented_as_uncertain_are_the_keys_that_may_vary() {
    let text = reference();
    let intro = "These keys may be given as a distribution instead of a number:";
    let start = text.find(intro).expect("the 'Uncertain parameters' list") + intro.len();
    let list = &text[start..start + text[start..].find("\n\n").unwrap()];
    let mut documented = BTreeSet::new();
    let mut section = None;
    for (i, token) in list.split('`').enumerate() {
        if i % 2 == 0 {
            continue; // outside backticks
        }
        if let Some(name) = token.strip_prefix("[[").and_then(|t| t.strip_suffix("]]")) {
            section = Some(name.to_string());
        } else if let Some(name) = token.strip_prefix('[').and_then(|t| t.strip_suffix(']')) {
            section = Some(name.to_string());
        } else {
            let s = section.clone().unwrap_or_else(|| panic!("'{token}' listed before any [section]"));
            documented.insert(format!("{s}.{token}"));
        }
    }
    let varying: BTreeSet<String> = PARAMS.iter().filter(|p| p.may_vary).map(|p| p.path()).collect();
    assert_eq!(documented, varying, "the 'Uncertain parameters' list of docs/scenario.md against the table");
}

#[test]
fn numbers_and_ranges_are_written_as_the_reference_writes_them() {
    assert_eq!(doc_range(Range::closed(0.0, 1e7)), "0–10⁷");
    assert_eq!(doc_range(Range::closed(0.0, 1e4)), "0–10 000");
    assert_eq!(doc_range(Range::closed(1.0, 100_000.0)), "1–100 000");
    assert_eq!(doc_range(Range::closed(-0.95, 0.95)), "−0.95–0.95");
    assert_eq!(doc_range(Range::closed(-500.0, 9000.0)), "−500–9000");
    assert_eq!(doc_range(Range::at_least(0.0)), "≥ 0");
    assert_eq!(doc_range(Range { min: Bound::Excluded(0.0), max: Bound::Included(1.0) }), "0 < x ≤ 1");
    assert_eq!(parse_doc_number("2.0"), Some(2.0));
    assert_eq!(parse_doc_number("−0.95"), Some(-0.95));
}
