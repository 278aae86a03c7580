//! A schema-checked reader over a parsed TOML document.
//!
//! Every key read is recorded; keys never read are reported as unknown with the
//! nearest valid name, or with the section they belong in when they were read in
//! another section. Every problem is collected with the file, the line of the
//! key (from the TOML parser's spans) and the dotted key path, and the allowed
//! range; [`TomlDoc::take_problems`] returns them in file order.
//!
//! Numeric parameters are read by their [`ParamId`]: default, range and unit come
//! from the parameter table ([`crate::model::params`]).

use crate::error::Problem;
use crate::input::table::{fmt_value, nearest, parse_number, percent_hint, range_text, read_limited, suggestion};
use crate::model::params::{Absent, ParamId, ParamRef, ParamSpec, Range};
use crate::model::uncertainty::{Distribution, UncertainParam};
use serde::Deserialize;
use std::cell::RefCell;
use std::collections::{BTreeSet, HashMap};
use std::ops::Bound;
use std::path::{Path, PathBuf};
use toml::de::{DeTable, DeValue};

/// Largest scenario file accepted, bytes (16 MiB; real scenarios are a few KiB).
pub const MAX_TOML_BYTES: u64 = 16 * 1024 * 1024;

/// Reads a TOML file as text: a regular file of at most [`MAX_TOML_BYTES`], in
/// UTF-8 (a byte-order mark is accepted). Problems name the file (and the line of
/// the first byte that is not UTF-8).
pub fn read_toml_file(path: &Path) -> Result<String, Problem> {
    let bytes = read_limited(path, MAX_TOML_BYTES, "scenario files", "a TOML file")?;
    String::from_utf8(bytes).map_err(|e| {
        let bytes = e.as_bytes();
        let valid = e.utf8_error().valid_up_to();
        let line = bytes[..valid].iter().filter(|&&b| b == b'\n').count() + 1;
        Problem::in_file(path, "is not UTF-8 text; save it as UTF-8").line(line)
    })
}

/// Display name of the root table in messages.
const TOP_LEVEL: &str = "the top level";

/// Most problems recorded for one file; the rest are counted. A real scenario
/// never comes near this; a generated or corrupted one could list millions.
pub const MAX_PROBLEMS: usize = 1000;

/// A scenario parameter given as a distribution, with the parameter it sets.
#[derive(Debug, Clone, PartialEq)]
pub struct UncertainKey {
    /// The parameter (and entry of an array of tables) the drawn values set,
    /// resolved once from the key path.
    pub target: ParamRef,
    /// The key path (which names the sampling dimension), distribution and drawing.
    pub param: UncertainParam,
}

/// Shared state of one TOML file being read.
#[derive(Debug)]
pub struct TomlDoc {
    path: PathBuf,
    problems: RefCell<Vec<Problem>>,
    /// Keys read in each section, by the section's display name (`[invasion]`).
    known: RefCell<Vec<(String, BTreeSet<String>)>>,
    /// Unknown keys whose message may gain a "belongs in" hint:
    /// (index into `problems`, key, display name of its section).
    unknown: RefCell<Vec<(usize, String, String)>>,
    /// Parameters given as distributions, in reading order.
    uncertain: RefCell<Vec<UncertainKey>>,
    /// Lines of the root table's keys and of everything below it.
    spans: Spans,
    /// Problems beyond [`MAX_PROBLEMS`], counted but not kept.
    dropped: RefCell<usize>,
}

/// Where one table and its keys are in the text, from the parser's spans.
#[derive(Debug, Default)]
struct Spans {
    /// Line (1-based) of the table itself: its `[header]`, inline table or
    /// dotted key; `None` for the root.
    line: Option<usize>,
    /// Each key of the table.
    keys: HashMap<String, KeySpans>,
}

/// Where one key and its value are.
#[derive(Debug, Default)]
struct KeySpans {
    /// Line (1-based) of the key (of an array of tables: its first header).
    line: usize,
    /// The value, when it is a table.
    table: Option<Spans>,
    /// The items, when the value is an array (for an array of tables, each entry's header).
    items: Vec<Spans>,
}

/// Byte offsets at which the lines of `text` start.
fn line_starts(text: &str) -> Vec<usize> {
    std::iter::once(0).chain(text.match_indices('\n').map(|(i, _)| i + 1)).collect()
}

/// The 1-based line holding byte `offset`.
fn line_at(starts: &[usize], offset: usize) -> usize {
    starts.partition_point(|&s| s <= offset).max(1)
}

impl Spans {
    fn of(table: &DeTable<'_>, line: Option<usize>, starts: &[usize]) -> Spans {
        let keys = table
            .iter()
            .map(|(k, v)| {
                let mut at = KeySpans { line: line_at(starts, k.span().start), ..KeySpans::default() };
                match v.get_ref() {
                    DeValue::Table(t) => at.table = Some(Spans::of(t, Some(line_at(starts, v.span().start)), starts)),
                    DeValue::Array(items) => {
                        at.items = items
                            .iter()
                            .map(|item| {
                                let line = Some(line_at(starts, item.span().start));
                                match item.get_ref() {
                                    DeValue::Table(t) => Spans::of(t, line, starts),
                                    _ => Spans { line, keys: HashMap::new() },
                                }
                            })
                            .collect()
                    }
                    _ => {}
                }
                (k.get_ref().to_string(), at)
            })
            .collect();
        Spans { line, keys }
    }

    /// Line of `key`, or of this table when the key is absent.
    fn line_of(&self, key: &str) -> Option<usize> {
        self.keys.get(key).map(|k| k.line).or(self.line)
    }
}

/// One table of the document (the root, a `[section]` or one `[[array]]` entry).
pub struct Section<'a> {
    doc: &'a TomlDoc,
    /// Dotted path of this table (`""` for the root, `invasion`, `contaminant[2]`).
    pub path: String,
    spans: Option<&'a Spans>,
    table: &'a toml::Table,
    used: RefCell<BTreeSet<String>>,
}

impl TomlDoc {
    /// Parses TOML text; a syntax error becomes a located problem.
    pub fn parse(path: &Path, text: String) -> Result<(TomlDoc, toml::Table), Problem> {
        let text = text.strip_prefix('\u{feff}').unwrap_or(&text);
        let starts = line_starts(text);
        let invalid = |e: toml::de::Error| {
            let p = Problem::in_file(path, format!("is not valid TOML: {}", e.message()));
            match e.span() {
                Some(s) => p.line(line_at(&starts, s.start)),
                None => p,
            }
        };
        let document = DeTable::parse(text).map_err(invalid)?;
        let spans = Spans::of(document.get_ref(), None, &starts);
        let table = toml::Table::deserialize(toml::de::Deserializer::from(document)).map_err(invalid)?;
        let doc = TomlDoc {
            path: path.to_path_buf(),
            problems: RefCell::new(Vec::new()),
            known: RefCell::new(Vec::new()),
            unknown: RefCell::new(Vec::new()),
            uncertain: RefCell::new(Vec::new()),
            spans,
            dropped: RefCell::new(0),
        };
        Ok((doc, table))
    }

    /// Every parameter given as a distribution, in reading order.
    pub fn take_uncertain(&self) -> Vec<UncertainKey> {
        std::mem::take(&mut self.uncertain.borrow_mut())
    }

    /// The file's path.
    pub fn path(&self) -> &Path {
        &self.path
    }

    /// The root table as a section (`table` is the one [`TomlDoc::parse`] returned).
    pub fn root<'a>(&'a self, table: &'a toml::Table) -> Section<'a> {
        Section { doc: self, path: String::new(), spans: Some(&self.spans), table, used: RefCell::new(BTreeSet::new()) }
    }

    /// Records a problem (beyond [`MAX_PROBLEMS`] only counts it).
    pub fn push(&self, p: Problem) {
        self.try_push(p);
    }

    /// Records a problem; false when it was only counted.
    fn try_push(&self, p: Problem) -> bool {
        let mut problems = self.problems.borrow_mut();
        if problems.len() >= MAX_PROBLEMS {
            *self.dropped.borrow_mut() += 1;
            return false;
        }
        problems.push(p);
        true
    }

    /// True once [`MAX_PROBLEMS`] are recorded.
    fn full(&self) -> bool {
        self.problems.borrow().len() >= MAX_PROBLEMS
    }

    /// All problems recorded so far, in file order (problems with no line last).
    ///
    /// An unknown key with no close match in its own section, but read in another
    /// section, is told where it belongs.
    pub fn take_problems(&self) -> Vec<Problem> {
        let mut problems = std::mem::take(&mut *self.problems.borrow_mut());
        let known = self.known.borrow();
        for (i, key, own) in self.unknown.borrow_mut().drain(..) {
            let mut homes: Vec<&str> =
                known.iter().filter(|(name, keys)| name != &own && keys.contains(&key)).map(|(n, _)| n.as_str()).collect();
            homes.dedup();
            let Some(p) = problems.get_mut(i) else { continue };
            if homes.is_empty() {
                continue;
            }
            let place = |name: &str| {
                if name == TOP_LEVEL {
                    "at the top level (before any [section])".to_string()
                } else {
                    format!("in {name}")
                }
            };
            let here = if own == TOP_LEVEL { "at the top level".to_string() } else { format!("in {own}") };
            let there: Vec<String> = homes.iter().map(|h| place(h)).collect();
            p.message = format!("unknown key {here}; '{key}' belongs {}", there.join(" or "));
        }
        problems.sort_by_key(|p| p.row.unwrap_or(usize::MAX));
        let dropped = std::mem::take(&mut *self.dropped.borrow_mut());
        if dropped > 0 {
            problems.push(Problem::in_file(
                &self.path,
                format!("… and {dropped} more problems not listed (only the first {MAX_PROBLEMS} are)"),
            ));
        }
        problems
    }

    /// Records the keys a section reads, for "belongs in" hints.
    fn record_known(&self, section: String, keys: &BTreeSet<String>) {
        let mut known = self.known.borrow_mut();
        match known.iter_mut().find(|(n, _)| *n == section) {
            Some((_, k)) => k.extend(keys.iter().cloned()),
            None => known.push((section, keys.clone())),
        }
    }
}

/// `contaminant[2].x` → `contaminant.x`.
fn strip_indices(path: &str) -> String {
    let mut out = String::with_capacity(path.len());
    let mut depth = 0;
    for c in path.chars() {
        match c {
            '[' => depth += 1,
            ']' => depth -= 1,
            _ if depth == 0 => out.push(c),
            _ => {}
        }
    }
    out
}

/// The allowed values of a range in words: `0 to 1 fraction`, `0 or more`,
/// `more than 0 and at most 1`.
pub fn range_words(r: Range, unit: &str) -> String {
    let (lo, hi) = r.bounds();
    match (r.min, r.max) {
        (Bound::Included(_), Bound::Included(_) | Bound::Unbounded) => range_text(lo, hi, unit),
        _ => {
            let lower = match r.min {
                Bound::Included(v) => Some(format!("at least {}", fmt_value(v))),
                Bound::Excluded(v) => Some(format!("more than {}", fmt_value(v))),
                Bound::Unbounded => None,
            };
            let upper = match r.max {
                Bound::Included(v) => Some(format!("at most {}", fmt_value(v))),
                Bound::Excluded(v) => Some(format!("less than {}", fmt_value(v))),
                Bound::Unbounded => None,
            };
            let words: Vec<String> = lower.into_iter().chain(upper).collect();
            let u = if unit.is_empty() { String::new() } else { format!(" {unit}") };
            format!("{}{u}", if words.is_empty() { "any number".to_string() } else { words.join(" and ") })
        }
    }
}

impl<'a> Section<'a> {
    fn key_path(&self, key: &str) -> String {
        if self.path.is_empty() {
            key.to_string()
        } else {
            format!("{}.{key}", self.path)
        }
    }

    /// A problem located at `key` of this section (at the table itself when the
    /// key is absent; at no line for an absent key of the top level).
    pub fn problem(&self, key: &str, message: impl Into<String>) -> Problem {
        let p = Problem::in_file(&self.doc.path, message).key(self.key_path(key));
        match self.spans.and_then(|s| s.line_of(key)) {
            Some(line) => p.line(line),
            None => p,
        }
    }

    /// Records a problem located at `key`.
    pub fn push(&self, key: &str, message: impl Into<String>) {
        if self.doc.full() {
            self.doc.push(Problem::new(""));
        } else {
            self.doc.push(self.problem(key, message));
        }
    }

    /// The raw value of `key`, marking it used.
    pub fn get(&self, key: &str) -> Option<&'a toml::Value> {
        self.used.borrow_mut().insert(key.to_string());
        self.table.get(key)
    }

    /// True when `key` is present.
    pub fn has(&self, key: &str) -> bool {
        self.table.contains_key(key)
    }

    fn key_spans(&self, key: &str) -> Option<&'a KeySpans> {
        self.spans.and_then(|s| s.keys.get(key))
    }

    /// A sub-table `[name]` (empty when absent).
    pub fn section(&self, key: &str) -> Option<Section<'a>> {
        match self.get(key)? {
            toml::Value::Table(t) => Some(Section {
                doc: self.doc,
                path: self.key_path(key),
                spans: self.key_spans(key).and_then(|k| k.table.as_ref()),
                table: t,
                used: RefCell::new(BTreeSet::new()),
            }),
            _ => {
                self.push(key, "must be a table (a [section])");
                None
            }
        }
    }

    /// The entries of an array of tables `[[name]]`.
    pub fn array_of_tables(&self, key: &str) -> Vec<Section<'a>> {
        match self.get(key) {
            None => Vec::new(),
            Some(toml::Value::Array(items)) => items
                .iter()
                .enumerate()
                .filter_map(|(i, v)| match v {
                    toml::Value::Table(t) => Some(Section {
                        doc: self.doc,
                        path: format!("{}[{}]", self.key_path(key), i + 1),
                        spans: self.key_spans(key).and_then(|k| k.items.get(i)),
                        table: t,
                        used: RefCell::new(BTreeSet::new()),
                    }),
                    _ => {
                        self.push(key, format!("entry {} must be a table ([[{key}]])", i + 1));
                        None
                    }
                })
                .collect(),
            Some(_) => {
                self.push(key, format!("must be written as one or more [[{key}]] tables"));
                Vec::new()
            }
        }
    }

    /// The table row of `id`, which must be a key of this section.
    fn spec(&self, id: ParamId) -> &'static ParamSpec {
        let spec = id.spec();
        debug_assert_eq!(strip_indices(&self.path), spec.section, "{} read in the wrong table", spec.path());
        spec
    }

    /// The number `id` of the parameter table: its default when absent (a problem
    /// when required), within its range. A key that may vary may instead be
    /// given as a distribution (see [`Section::param`]).
    pub fn number(&self, id: ParamId) -> f64 {
        let spec = self.spec(id);
        let default = spec.absent.value();
        if spec.may_vary {
            self.param(spec.key, id, default)
        } else {
            self.f64_within(spec.key, default, spec.range, spec.message_unit())
        }
    }

    /// The number `id` when its key is present.
    pub fn opt_number(&self, id: ParamId) -> Option<f64> {
        let spec = self.spec(id);
        if self.has(spec.key) {
            Some(self.number(id))
        } else {
            let _ = self.get(spec.key);
            None
        }
    }

    /// The whole number `id` of the parameter table: its default when absent (a
    /// problem when required), within its range.
    pub fn whole(&self, id: ParamId) -> i64 {
        let spec = self.spec(id);
        let default = spec.absent.value().map(|v| v as i64);
        self.whole_within(spec.key, default, spec.range, spec.message_unit())
    }

    /// The whole number `id`, within its range and no less than `min` (a rule
    /// between keys, e.g. `end_year` ≥ `start_year`); `min` when absent.
    pub fn whole_from(&self, id: ParamId, min: i64) -> i64 {
        let spec = self.spec(id);
        let lo = (min as f64).max(spec.range.bounds().0);
        let range = Range { min: Bound::Included(lo), max: spec.range.max };
        self.whole_within(spec.key, Some(min), range, spec.message_unit())
    }

    /// The list `id` of the parameter table, each item within its range; `None` when absent.
    pub fn list(&self, id: ParamId) -> Option<Vec<f64>> {
        let spec = self.spec(id);
        debug_assert!(matches!(spec.absent, Absent::Unset));
        self.list_within(spec.key, spec.range, spec.message_unit())
    }

    /// A number within `lo..=hi`; `default` when absent (a problem when no default).
    pub fn f64_in(&self, key: &str, default: Option<f64>, lo: f64, hi: f64, unit: &str) -> f64 {
        self.f64_within(key, default, Range::closed(lo, hi), unit)
    }

    fn f64_within(&self, key: &str, default: Option<f64>, range: Range, unit: &str) -> f64 {
        let (lo, hi) = range.bounds();
        let fallback = default.unwrap_or(lo.max(0.0).min(hi));
        let allowed = range_words(range, unit);
        match self.get(key) {
            None => {
                if default.is_none() {
                    self.push(key, format!("required key is missing; expected a number in {allowed}"));
                }
                fallback
            }
            Some(v) => match as_f64(v) {
                Some(x) if range.contains(x) => x,
                Some(x) => {
                    self.push(key, format!("{} is out of range; allowed {allowed}{}", fmt_value(x), percent_hint(x, unit)));
                    fallback
                }
                None => {
                    self.push(key, format!("must be a number in {allowed}{}", quoted_number_hint(v)));
                    fallback
                }
            },
        }
    }

    /// A parameter that may vary: a number within its range, or an inline table
    /// giving a distribution, e.g. `{ dist = "triangular", min = 0.04, mode = 0.06, max = 0.08 }`
    /// with an optional `per = "catchment"` (default `"basin"`: one draw per member
    /// shared by all catchments). Returns the number, or the distribution's central
    /// value, and records the distribution with the parameter its key path resolves to.
    // Over 100 lines on purpose: every distribution kind's keys read, validated and bounded in one place, so a distribution's problems are reported together at its key.
    fn param(&self, key: &str, id: ParamId, default: Option<f64>) -> f64 {
        let spec = id.spec();
        let (range, unit) = (spec.range, spec.message_unit());
        let Some(toml::Value::Table(t)) = self.table.get(key) else {
            return self.f64_within(key, default, range, unit);
        };
        self.used.borrow_mut().insert(key.to_string());
        let (lo, hi) = range.bounds();
        let fallback = default.unwrap_or(lo.max(0.0).min(hi));
        let num = |k: &str| -> Option<f64> { t.get(k).and_then(as_f64) };
        let need = |k: &str, problems: &mut Vec<String>| -> f64 {
            num(k).unwrap_or_else(|| {
                problems.push(format!("needs a number '{k}'"));
                f64::NAN
            })
        };
        let mut msgs = Vec::new();
        let kind = match t.get("dist") {
            Some(toml::Value::String(s)) => s.clone(),
            _ => {
                self.push(
                    key,
                    "a distribution needs dist = \"fixed\" | \"uniform\" | \"triangular\" | \"normal\" | \"lognormal\" | \"pert\"",
                );
                return fallback;
            }
        };
        let allowed: &[&str] = match kind.as_str() {
            "fixed" => &["value"],
            "uniform" => &["min", "max"],
            "triangular" | "pert" => &["min", "mode", "max"],
            "normal" => &["mean", "sd", "min", "max"],
            "lognormal" => &["median", "sigma_log"],
            other => {
                let kinds = ["fixed", "uniform", "triangular", "normal", "lognormal", "pert"];
                self.push(key, format!("unknown distribution '{other}'{}", suggestion(other, &kinds)));
                return fallback;
            }
        };
        let dist = match kind.as_str() {
            "fixed" => Distribution::Fixed { value: need("value", &mut msgs) },
            "uniform" => Distribution::Uniform { min: need("min", &mut msgs), max: need("max", &mut msgs) },
            "triangular" => {
                Distribution::Triangular { min: need("min", &mut msgs), mode: need("mode", &mut msgs), max: need("max", &mut msgs) }
            }
            "pert" => Distribution::Pert { min: need("min", &mut msgs), mode: need("mode", &mut msgs), max: need("max", &mut msgs) },
            "normal" => Distribution::Normal {
                mean: need("mean", &mut msgs),
                sd: need("sd", &mut msgs),
                min: num("min").unwrap_or(lo).max(lo),
                max: num("max").unwrap_or(hi).min(hi),
            },
            _ => Distribution::LogNormal { median: need("median", &mut msgs), sigma_log: need("sigma_log", &mut msgs) },
        };
        let per_catchment = match t.get("per") {
            None => false,
            Some(toml::Value::String(s)) if s == "basin" => false,
            Some(toml::Value::String(s)) if s == "catchment" => true,
            Some(_) => {
                msgs.push("per must be \"basin\" (one draw per member, shared) or \"catchment\" (independent per catchment)".into());
                false
            }
        };
        for k in t.keys() {
            if k != "dist" && k != "per" && !allowed.contains(&k.as_str()) {
                msgs.push(format!("unknown key '{k}' for a {kind} distribution{}", suggestion(k, allowed)));
            }
        }
        if msgs.is_empty() {
            if let Err(m) = dist.validate() {
                msgs.push(format!("{kind} distribution {m}"));
            }
        }
        if msgs.is_empty() {
            let (a, b) = dist.support();
            if !matches!(dist, Distribution::LogNormal { .. }) && (a < lo || b > hi) {
                msgs.push(format!(
                    "the distribution reaches {}–{}, outside the allowed {}",
                    fmt_value(a),
                    fmt_value(b),
                    range_words(range, unit)
                ));
            }
        }
        // A log-normal reaches from 0 to infinity, beyond any finite upper bound and
        // below any lower bound above 0: draw it truncated to the allowed range (by
        // inverse CDF, so no probability piles up on a bound).
        let dist = match (&dist, msgs.is_empty()) {
            (Distribution::LogNormal { .. }, true) if dist.support().1 > hi || dist.support().0 < lo => match dist.truncated(lo, hi) {
                Ok(d) => d,
                Err(m) => {
                    msgs.push(format!("{kind} distribution cannot be truncated to {}: {m}", range_words(range, unit)));
                    dist
                }
            },
            _ => dist,
        };
        let path = self.key_path(key);
        let target = ParamRef::resolve(&path).filter(|r| r.id() == id);
        if msgs.is_empty() && target.is_none() {
            msgs.push(format!("'{path}' cannot be given as a distribution; give a number in {}", range_words(range, unit)));
        }
        let (Some(target), true) = (target, msgs.is_empty()) else {
            for m in msgs {
                self.push(key, m);
            }
            return fallback;
        };
        let central = dist.central().clamp(lo, hi);
        self.doc.uncertain.borrow_mut().push(UncertainKey { target, param: UncertainParam { path, dist, per_catchment } });
        central
    }

    /// An optional number within `lo..=hi`.
    pub fn opt_f64_in(&self, key: &str, lo: f64, hi: f64, unit: &str) -> Option<f64> {
        self.has(key).then(|| self.f64_in(key, Some(lo), lo, hi, unit))
    }

    /// A whole number within `lo..=hi`.
    pub fn int_in(&self, key: &str, default: Option<i64>, lo: i64, hi: i64, unit: &str) -> i64 {
        self.whole_within(key, default, Range::closed(lo as f64, hi as f64), unit)
    }

    /// A whole number within `range` (and within the 64-bit integers TOML allows).
    fn whole_within(&self, key: &str, default: Option<i64>, range: Range, unit: &str) -> i64 {
        let (lo, _) = range.bounds();
        let fallback = default.unwrap_or(if lo.is_finite() { lo.ceil() as i64 } else { 0 });
        let allowed = range_words(range, unit);
        // `i64::MAX as f64` is 2^63, one past the largest i64.
        let fits = |f: f64| f >= i64::MIN as f64 && f < i64::MAX as f64;
        match self.get(key) {
            None => {
                if default.is_none() {
                    self.push(key, format!("required key is missing; expected a whole number in {allowed}"));
                }
                fallback
            }
            Some(toml::Value::Integer(i)) if range.contains(*i as f64) => *i,
            Some(toml::Value::Float(f)) if f.fract() == 0.0 && fits(*f) && range.contains(*f) => *f as i64,
            Some(v) => {
                let shown = as_f64(v).map(fmt_value).unwrap_or_else(|| v.to_string());
                let why = match as_f64(v) {
                    Some(f) if f.fract() == 0.0 && !fits(f) => " (too large for a whole number)",
                    _ => "",
                };
                self.push(key, format!("{shown} is not allowed{why}; expected a whole number in {allowed}{}", quoted_number_hint(v)));
                fallback
            }
        }
    }

    /// A string; `default` when absent.
    pub fn string(&self, key: &str, default: Option<&str>) -> Option<String> {
        match self.get(key) {
            None => {
                if default.is_none() {
                    self.push(key, "required key is missing; expected a text value in quotes");
                }
                default.map(str::to_string)
            }
            Some(toml::Value::String(s)) => Some(s.clone()),
            Some(_) => {
                self.push(key, "must be a text value in quotes");
                default.map(str::to_string)
            }
        }
    }

    /// An optional string.
    pub fn opt_string(&self, key: &str) -> Option<String> {
        if self.has(key) {
            self.string(key, Some(""))
        } else {
            None
        }
    }

    /// One of `choices`; `default` when absent.
    pub fn choice(&self, key: &str, default: &str, choices: &[&str]) -> String {
        let s = self.string(key, Some(default)).unwrap_or_else(|| default.to_string());
        if choices.contains(&s.as_str()) {
            s
        } else {
            let hint = nearest(&s, choices).map(|k| format!(" (did you mean '{k}'?)")).unwrap_or_default();
            self.push(key, format!("'{s}' is not allowed; choose one of: {}{hint}", choices.join(", ")));
            default.to_string()
        }
    }

    /// A list of numbers each within `lo..=hi`.
    pub fn f64_list(&self, key: &str, lo: f64, hi: f64, unit: &str) -> Option<Vec<f64>> {
        self.list_within(key, Range::closed(lo, hi), unit)
    }

    fn list_within(&self, key: &str, range: Range, unit: &str) -> Option<Vec<f64>> {
        let allowed = range_words(range, unit);
        match self.get(key)? {
            toml::Value::Array(items) => {
                let mut out = Vec::with_capacity(items.len());
                for (i, v) in items.iter().enumerate() {
                    match as_f64(v) {
                        Some(x) if range.contains(x) => out.push(x),
                        Some(x) => self.push(
                            key,
                            format!("item {} is {}; each must be a number in {allowed}{}", i + 1, fmt_value(x), percent_hint(x, unit)),
                        ),
                        None => self.push(key, format!("item {} must be a number in {allowed}{}", i + 1, quoted_number_hint(v))),
                    }
                }
                Some(out)
            }
            _ => {
                self.push(key, format!("must be a list of numbers, e.g. {key} = [1, 2, 3]"));
                None
            }
        }
    }

    /// Reports every key of this table that was never read, suggesting the nearest
    /// known key (or, when it was read in another section, where it belongs; see
    /// [`TomlDoc::take_problems`]). Call after reading all keys.
    pub fn finish(&self) {
        let used = self.used.borrow();
        let known: Vec<&str> = used.iter().map(String::as_str).collect();
        let display = self.display_name();
        for key in self.table.keys() {
            if !used.contains(key) {
                if self.doc.full() {
                    self.doc.push(Problem::new(""));
                    continue;
                }
                let close = nearest(key, &known).is_some();
                if self.doc.try_push(self.problem(key, format!("unknown key{}", suggestion(key, &known)))) && !close {
                    let index = self.doc.problems.borrow().len() - 1;
                    self.doc.unknown.borrow_mut().push((index, key.clone(), display.clone()));
                }
            }
        }
        self.doc.record_known(display, &used);
    }

    /// How the section is written in the file: `the top level`, `[invasion]`, `[[contaminant]]`.
    fn display_name(&self) -> String {
        if self.path.is_empty() {
            TOP_LEVEL.to_string()
        } else if self.path.ends_with(']') {
            format!("[[{}]]", strip_indices(&self.path))
        } else {
            format!("[{}]", strip_indices(&self.path))
        }
    }

    /// Marks keys as known even when not read on this path (e.g. the other method's parameters).
    pub fn allow(&self, keys: &[&str]) {
        let mut used = self.used.borrow_mut();
        for k in keys {
            used.insert((*k).to_string());
        }
    }
}

/// "; write 0.06 without quotes" when a text value holds a number.
fn quoted_number_hint(v: &toml::Value) -> String {
    match v {
        toml::Value::String(t) => match parse_number(t, false) {
            Ok(x) => format!("; write {} without quotes", fmt_value(x)),
            Err(m) => format!(" (the value is text: {m})"),
        },
        _ => String::new(),
    }
}

fn as_f64(v: &toml::Value) -> Option<f64> {
    match v {
        toml::Value::Float(f) => Some(*f),
        toml::Value::Integer(i) => Some(*i as f64),
        _ => None,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn doc(text: &str) -> (TomlDoc, toml::Table) {
        TomlDoc::parse(Path::new("s.toml"), text.to_string()).unwrap()
    }

    #[test]
    fn keys_are_located_in_every_way_tables_can_be_written() {
        let text = "title = \"t\"\nhydrology = { method = \"fu\" }\ndilution.min_runoff_mm = 3\n\n\
                    [ invasion ]  # spread\nspread_rate_per_yr = 0.1\n\n[[contaminant]]\nname = \"a\"\n\n[[contaminant]]\n\"name\" = \"b\"\n\n\
                    [[strategy]]\nname = \"x\"\n[[strategy]]\nname = \"y\"\n[strategy.methods]\ndense = \"aerial\"\n";
        let (d, t) = doc(text);
        let root = d.root(&t);
        assert_eq!(root.problem("title", "").row, Some(1));
        assert_eq!(root.section("hydrology").unwrap().problem("method", "").row, Some(2), "inline table");
        assert_eq!(root.section("dilution").unwrap().problem("min_runoff_mm", "").row, Some(3), "dotted keys");
        let inv = root.section("invasion").unwrap();
        assert_eq!(inv.problem("spread_rate_per_yr", "").row, Some(6), "header with spaces and a comment");
        assert_eq!(inv.problem("medium_age_yr", "").row, Some(5), "a missing key points at its table");
        let c = root.array_of_tables("contaminant");
        assert_eq!(c[1].problem("name", "").row, Some(12), "quoted key in the second entry");
        let s = root.array_of_tables("strategy");
        assert_eq!(s[1].section("methods").unwrap().problem("dense", "").row, Some(19), "sub-table of the second entry");
    }

    #[test]
    fn keys_are_located_by_the_parser_inside_strings_and_multi_line_values() {
        let text = "note = \"\"\"\n[hydrology]\nw_grass = 1\n\"\"\"\nhydrology = {\n  method = \"fu\",\n  w_grass = 0.5,\n}\n\
                    list = [\n  1,\n  2,\n]\n'x' = 'a = 1'\n";
        let (d, t) = doc(text);
        let root = d.root(&t);
        let h = root.section("hydrology").unwrap();
        assert_eq!(h.problem("w_grass", "").row, Some(7), "a key of a multi-line inline table");
        assert_eq!(h.problem("omega_grass", "").row, Some(5), "a missing key points at the inline table");
        assert_eq!(root.problem("list", "").row, Some(9));
        assert_eq!(root.problem("x", "").row, Some(13));
        assert_eq!(root.problem("a", "").row, None, "text inside a value is not a key");
    }

    #[test]
    fn unknown_keys_are_told_where_they_belong_and_problems_come_in_file_order() {
        let (d, t) = doc("start_year = 2030\nw_grass = 0.4\n\n[hydrology]\nw_grass = 0.5\nhorizon_years = 9\n\n[hydrolgy]\nx = 1\n");
        let root = d.root(&t);
        let _ = root.int_in("start_year", None, 1800, 2500, "");
        let _ = root.int_in("horizon_years", None, 1, 300, "years");
        let h = root.section("hydrology").unwrap();
        let _ = h.f64_in("w_grass", Some(0.5), 0.01, 20.0, "");
        h.finish();
        root.finish();
        let p = d.take_problems();
        let rows: Vec<Option<usize>> = p.iter().map(|p| p.row).collect();
        assert_eq!(rows, vec![Some(2), Some(6), Some(8), None], "{p:#?}");
        assert!(p[0].message.contains("'w_grass' belongs in [hydrology]"), "{}", p[0].message);
        assert!(p[1].message.contains("'horizon_years' belongs at the top level"), "{}", p[1].message);
        assert!(p[2].message.contains("did you mean 'hydrology'"), "{}", p[2].message);
        assert!(p[3].message.contains("required key is missing"), "{}", p[3].message);
    }

    #[test]
    fn values_get_hints_for_quotes_and_percentages() {
        let (d, t) = doc("a = \"0.06\"\nb = 85\nc = [0.5, 40]\n");
        let root = d.root(&t);
        let _ = root.f64_in("a", Some(0.0), 0.0, 1.0, "1/yr");
        let _ = root.f64_in("b", Some(0.0), 0.0, 1.0, "fraction");
        let _ = root.f64_list("c", 0.0, 1.0, "fraction");
        let p = d.take_problems();
        assert!(p[0].message.contains("write 0.06 without quotes"), "{}", p[0].message);
        assert!(p[1].message.contains("write 0.85 for 85%"), "{}", p[1].message);
        assert!(p[2].message.contains("item 2 is 40") && p[2].message.contains("write 0.4 for 40%"), "{}", p[2].message);
    }

    #[test]
    fn scenario_files_are_read_with_limits() {
        let tmp = tempfile::tempdir().unwrap();
        let big = tmp.path().join("big.toml");
        std::fs::File::create(&big).unwrap().set_len(MAX_TOML_BYTES + 1).unwrap();
        assert!(read_toml_file(&big).unwrap_err().message.contains("are refused"));
        let latin = tmp.path().join("latin.toml");
        std::fs::write(&latin, b"title = \"ok\"\nname = \"Lac \xe9\"\n").unwrap();
        assert_eq!(read_toml_file(&latin).unwrap_err().row, Some(2));
        assert!(read_toml_file(tmp.path()).unwrap_err().message.contains("is a folder"));
        std::fs::write(&latin, "\u{feff}title = \"ok\"\n").unwrap();
        assert!(read_toml_file(&latin).is_ok());
    }
}
