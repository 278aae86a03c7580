//! A schema-checked reader over a parsed TOML document.
//!
//! Every key read is recorded; keys never read are reported as unknown with the
//! nearest valid name. Every problem is collected with the file, the line of the
//! key (found in the source text) and the dotted key path, and the allowed range.

use crate::error::Problem;
use crate::io::table::{fmt_value, range_text, suggestion};
use crate::model::uncertainty::{Distribution, UncertainParam};
use std::cell::RefCell;
use std::collections::BTreeSet;
use std::path::{Path, PathBuf};

/// Shared state of one TOML file being read.
#[derive(Debug)]
pub struct TomlDoc {
    path: PathBuf,
    text: String,
    problems: RefCell<Vec<Problem>>,
    /// Parameters given as distributions, in reading order.
    uncertain: RefCell<Vec<UncertainParam>>,
}

/// One table of the document (the root, a `[section]` or one `[[array]]` entry).
pub struct Section<'a> {
    doc: &'a TomlDoc,
    /// Dotted path of this table (`""` for the root, `invasion`, `contaminant[2]`).
    pub path: String,
    header: Option<(String, usize)>,
    table: &'a toml::Table,
    used: RefCell<BTreeSet<String>>,
}

impl TomlDoc {
    /// Parses TOML text; a syntax error becomes a located problem.
    pub fn parse(path: &Path, text: String) -> Result<(TomlDoc, toml::Table), Problem> {
        let text = text.strip_prefix('\u{feff}').map(str::to_string).unwrap_or(text);
        match text.parse::<toml::Table>() {
            Ok(t) => Ok((TomlDoc { path: path.to_path_buf(), text, problems: RefCell::new(Vec::new()), uncertain: RefCell::new(Vec::new()) }, t)),
            Err(e) => {
                let line = e.span().map(|s| text[..s.start.min(text.len())].matches('\n').count() + 1);
                let msg = format!("is not valid TOML: {}", e.message());
                let mut p = Problem::in_file(path, msg);
                p.row = line;
                Err(p)
            }
        }
    }

    /// Every parameter given as a distribution, in reading order.
    pub fn take_uncertain(&self) -> Vec<UncertainParam> {
        std::mem::take(&mut self.uncertain.borrow_mut())
    }

    /// The file's path.
    pub fn path(&self) -> &Path {
        &self.path
    }

    /// The root table as a section.
    pub fn root<'a>(&'a self, table: &'a toml::Table) -> Section<'a> {
        Section { doc: self, path: String::new(), header: None, table, used: RefCell::new(BTreeSet::new()) }
    }

    /// Records a problem.
    pub fn push(&self, p: Problem) {
        self.problems.borrow_mut().push(p);
    }

    /// All problems recorded so far.
    pub fn take_problems(&self) -> Vec<Problem> {
        std::mem::take(&mut self.problems.borrow_mut())
    }

    /// Line (1-based) of `key` inside the table with header `[name]` / `[[name]]`
    /// (its `nth` occurrence), or at the top of the file when `header` is `None`.
    fn line_of(&self, header: Option<&(String, usize)>, key: &str) -> Option<usize> {
        let lines: Vec<&str> = self.text.lines().collect();
        let mut start = 0;
        if let Some((name, nth)) = header {
            let mut seen = 0;
            let mut found = None;
            for (i, l) in lines.iter().enumerate() {
                let t = l.trim();
                if t == format!("[{name}]") || t == format!("[[{name}]]") {
                    if seen == *nth {
                        found = Some(i);
                        break;
                    }
                    seen += 1;
                }
            }
            start = found? + 1;
        }
        for (i, l) in lines.iter().enumerate().skip(start) {
            let t = l.trim_start();
            if t.starts_with('[') {
                break;
            }
            if let Some(rest) = t.strip_prefix(key) {
                if rest.trim_start().starts_with('=') {
                    return Some(i + 1);
                }
            }
        }
        None
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

    /// A problem located at `key` of this section.
    pub fn problem(&self, key: &str, message: impl Into<String>) -> Problem {
        let mut p = Problem::in_file(&self.doc.path, message).column(self.key_path(key));
        p.row = self.doc.line_of(self.header.as_ref(), key);
        p
    }

    /// Records a problem located at `key`.
    pub fn push(&self, key: &str, message: impl Into<String>) {
        self.doc.push(self.problem(key, message));
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

    /// A sub-table `[name]` (empty when absent).
    pub fn section(&self, key: &str) -> Option<Section<'a>> {
        match self.get(key)? {
            toml::Value::Table(t) => Some(Section {
                doc: self.doc,
                path: self.key_path(key),
                header: Some((self.key_path(key), 0)),
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
                        header: Some((self.key_path(key), i)),
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

    /// A number within `lo..=hi`; `default` when absent (a problem when no default).
    pub fn f64_in(&self, key: &str, default: Option<f64>, lo: f64, hi: f64, unit: &str) -> f64 {
        let fallback = default.unwrap_or(lo.max(0.0).min(hi));
        match self.get(key) {
            None => {
                if default.is_none() {
                    self.push(key, format!("required key is missing; expected a number in {}", range_text(lo, hi, unit)));
                }
                fallback
            }
            Some(v) => match as_f64(v) {
                Some(x) if x.is_finite() && x >= lo && x <= hi => x,
                Some(x) => {
                    self.push(key, format!("{} is out of range; allowed {}", fmt_value(x), range_text(lo, hi, unit)));
                    fallback
                }
                None => {
                    self.push(key, format!("must be a number in {}", range_text(lo, hi, unit)));
                    fallback
                }
            },
        }
    }

    /// A parameter that may be uncertain: a number within `lo..=hi`, or an inline
    /// table giving a distribution, e.g. `{ dist = "triangular", min = 0.04, mode = 0.06, max = 0.08 }`
    /// with an optional `per = "catchment"` (default `"basin"`: one draw per member
    /// shared by all catchments). Returns the number, or the distribution's central
    /// value, and records the distribution.
    pub fn param(&self, key: &str, default: Option<f64>, lo: f64, hi: f64, unit: &str) -> f64 {
        let Some(toml::Value::Table(t)) = self.table.get(key) else {
            return self.f64_in(key, default, lo, hi, unit);
        };
        self.used.borrow_mut().insert(key.to_string());
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
                self.push(key, "a distribution needs dist = \"fixed\" | \"uniform\" | \"triangular\" | \"normal\" | \"lognormal\" | \"pert\"");
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
            "triangular" => Distribution::Triangular { min: need("min", &mut msgs), mode: need("mode", &mut msgs), max: need("max", &mut msgs) },
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
            if a < lo || (b > hi && !matches!(dist, Distribution::LogNormal { .. })) {
                msgs.push(format!("the distribution reaches {}–{}, outside the allowed {}", fmt_value(a), fmt_value(b), range_text(lo, hi, unit)));
            }
        }
        if !msgs.is_empty() {
            for m in msgs {
                self.push(key, m);
            }
            return fallback;
        }
        let central = dist.central().clamp(lo, hi);
        self.doc.uncertain.borrow_mut().push(UncertainParam { path: self.key_path(key), dist, per_catchment });
        central
    }

    /// An optional number within `lo..=hi`.
    pub fn opt_f64_in(&self, key: &str, lo: f64, hi: f64, unit: &str) -> Option<f64> {
        self.has(key).then(|| self.f64_in(key, Some(lo), lo, hi, unit))
    }

    /// A whole number within `lo..=hi`.
    pub fn int_in(&self, key: &str, default: Option<i64>, lo: i64, hi: i64, unit: &str) -> i64 {
        let fallback = default.unwrap_or(lo);
        match self.get(key) {
            None => {
                if default.is_none() {
                    self.push(key, format!("required key is missing; expected a whole number in {}", range_text(lo as f64, hi as f64, unit)));
                }
                fallback
            }
            Some(toml::Value::Integer(i)) if *i >= lo && *i <= hi => *i,
            Some(toml::Value::Float(f)) if f.fract() == 0.0 && *f >= lo as f64 && *f <= hi as f64 => *f as i64,
            Some(v) => {
                let shown = as_f64(v).map(fmt_value).unwrap_or_else(|| v.to_string());
                self.push(key, format!("{shown} is not allowed; expected a whole number in {}", range_text(lo as f64, hi as f64, unit)));
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
            self.push(key, format!("'{s}' is not allowed; choose one of: {}{}", choices.join(", "), suggestion(&s, choices)));
            default.to_string()
        }
    }

    /// A list of numbers each within `lo..=hi`.
    pub fn f64_list(&self, key: &str, lo: f64, hi: f64, unit: &str) -> Option<Vec<f64>> {
        match self.get(key)? {
            toml::Value::Array(items) => {
                let mut out = Vec::with_capacity(items.len());
                for (i, v) in items.iter().enumerate() {
                    match as_f64(v) {
                        Some(x) if x.is_finite() && x >= lo && x <= hi => out.push(x),
                        _ => self.push(key, format!("item {} must be a number in {}", i + 1, range_text(lo, hi, unit))),
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
    /// known key. Call after reading all keys.
    pub fn finish(&self) {
        let used = self.used.borrow();
        let known: Vec<&str> = used.iter().map(String::as_str).collect();
        for key in self.table.keys() {
            if !used.contains(key) {
                self.push(key, format!("unknown key{}", suggestion(key, &known)));
            }
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

fn as_f64(v: &toml::Value) -> Option<f64> {
    match v {
        toml::Value::Float(f) => Some(*f),
        toml::Value::Integer(i) => Some(*i as f64),
        _ => None,
    }
}
