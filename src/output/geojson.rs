//! `catchments.geojson` in a run folder: the boundaries with the run's results
//! as feature properties, for any GIS that reads GeoJSON.
//!
//! Every result property is copied number for number from `summary.csv` (and,
//! with an ensemble, `ensemble.csv`): the cell text is parsed and written as a
//! JSON number, so a GIS shows exactly what the tables say; empty cells become
//! `null`. Property names are listed in `docs/gis.md`.
//!
//! The file is RFC 7946 GeoJSON: a FeatureCollection in WGS84
//! longitude/latitude with no `crs` member, exterior rings counter-clockwise
//! and holes clockwise. The foreign member [`RESULTS_MEMBER`](crate::schema::RESULTS_MEMBER) records what the
//! run wrote, so that the file can be read back as boundaries without carrying
//! old results into a new run.

use crate::error::{Error, Problem, Result};
use crate::input::gis::Boundaries;
use crate::schema::columns::{ensemble, summary};
use crate::schema::run_info::RunInfo;
use crate::schema::{ENSEMBLE_FILE, NO_CONTROL, RESULTS_FILE, RESULTS_MEMBER, SUMMARY_FILE};
use geo::orient::{Direction, Orient};
use serde::ser::{Serialize, SerializeMap, Serializer};
use serde_json::Value;
use std::collections::HashMap;
use std::io::Write;
use std::path::{Path, PathBuf};

/// Property-name suffix for a strategy: lower case, `-` replaced by `_`
/// (`contain-early` → `contain_early`).
pub fn property_suffix(strategy: &str) -> String {
    strategy.chars().map(|c| if c == '-' { '_' } else { c.to_ascii_lowercase() }).collect()
}

/// `summary.csv` of a run folder, indexed by catchment and strategy.
pub(crate) struct Summary {
    path: PathBuf,
    header: Vec<String>,
    col: HashMap<String, usize>,
    rows: Vec<csv::StringRecord>,
    /// First row of each (catchment, strategy): catchment rows come before the
    /// basin row of their strategy, so this is right even for a catchment
    /// whose id is `basin`.
    first: HashMap<(String, String), usize>,
    /// Strategies in order of first appearance (`no-control` first).
    pub strategies: Vec<String>,
}

impl Summary {
    pub(crate) fn read(run_dir: &Path) -> Result<Summary> {
        let path = run_dir.join(SUMMARY_FILE);
        let mut r = csv::ReaderBuilder::new().from_path(&path).map_err(|e| Error::Other(format!("reading {}: {e}", path.display())))?;
        let header: Vec<String> =
            r.headers().map_err(|e| Error::Other(format!("reading {}: {e}", path.display())))?.iter().map(str::to_string).collect();
        let col: HashMap<String, usize> = header.iter().enumerate().map(|(i, h)| (h.clone(), i)).collect();
        for need in [summary::CATCHMENT, summary::NAME, summary::STRATEGY] {
            if !col.contains_key(need) {
                return Err(Error::Other(format!("{} has no column '{need}'; is this a yieldshift run folder?", path.display())));
            }
        }
        let mut rows = Vec::new();
        let mut first = HashMap::new();
        let mut strategies: Vec<String> = Vec::new();
        for rec in r.records() {
            let rec = rec.map_err(|e| Error::Other(format!("reading {}: {e}", path.display())))?;
            let c = rec.get(col[summary::CATCHMENT]).unwrap_or("").to_string();
            let s = rec.get(col[summary::STRATEGY]).unwrap_or("").to_string();
            // A catchment's properties are its own (local) results, not what arrives at it.
            if col.get(summary::SCOPE).and_then(|&i| rec.get(i)) == Some(crate::schema::columns::scope::ARRIVING) {
                continue;
            }
            if !strategies.contains(&s) {
                strategies.push(s.clone());
            }
            first.entry((c, s)).or_insert(rows.len());
            rows.push(rec);
        }
        Ok(Summary { path, header, col, rows, first, strategies })
    }

    pub(crate) fn header(&self) -> &[String] {
        &self.header
    }

    pub(crate) fn has(&self, column: &str) -> bool {
        self.col.contains_key(column)
    }

    fn row(&self, catchment: &str, strategy: &str) -> Option<&csv::StringRecord> {
        self.first.get(&(catchment.to_string(), strategy.to_string())).map(|&i| &self.rows[i])
    }

    /// The cell text, `None` when the row or column does not exist.
    pub(crate) fn cell(&self, catchment: &str, strategy: &str, column: &str) -> Option<&str> {
        let i = *self.col.get(column)?;
        self.row(catchment, strategy)?.get(i)
    }

    /// The cell as a JSON number (`null` when empty).
    pub(crate) fn json(&self, catchment: &str, strategy: &str, column: &str) -> Result<Value> {
        let text = self.cell(catchment, strategy, column).unwrap_or("");
        json_number(text).map_err(|m| {
            Error::Other(format!("{}: catchment '{catchment}', strategy '{strategy}', column '{column}': {m}", self.path.display()))
        })
    }

    /// The cell as a number (`None` when empty or absent).
    pub(crate) fn number(&self, catchment: &str, strategy: &str, column: &str) -> Result<Option<f64>> {
        Ok(self.json(catchment, strategy, column)?.as_f64())
    }

    /// True when the catchment has a row for the strategy.
    pub(crate) fn has_row(&self, catchment: &str, strategy: &str) -> bool {
        self.row(catchment, strategy).is_some()
    }

    /// Columns `yield_change_<N>y_pct` with their N, in file order.
    pub(crate) fn offset_columns(&self) -> Vec<(usize, String)> {
        self.header.iter().filter_map(|h| summary::offset_of(h).map(|n| (n, h.clone()))).collect()
    }
}

/// A CSV cell as JSON: empty → `null`, integers stay integers, other numbers
/// are the nearest `f64` (serde_json writes the shortest text that reads back
/// as that `f64`, so the GeoJSON and the CSV agree).
pub(crate) fn json_number(text: &str) -> std::result::Result<Value, String> {
    let t = text.trim();
    if t.is_empty() {
        return Ok(Value::Null);
    }
    if let Ok(i) = t.parse::<i64>() {
        return Ok(Value::from(i));
    }
    match t.parse::<f64>() {
        Ok(x) if x.is_finite() => Ok(serde_json::Number::from_f64(x).map(Value::Number).unwrap_or(Value::Null)),
        _ => Err(format!("'{t}' is not a number")),
    }
}

/// (catchment, year) → the p5, p50 and p95 cells of `ensemble.csv`.
type Percentiles = HashMap<(String, i64), [Value; 3]>;

/// Ensemble percentiles of the no-control 10-year-mean yield change (the quantity of the
/// summary's headline columns) of each catchment's own runoff at the given years
/// (`None` without an ensemble).
fn ensemble_yield_percentiles(run_dir: &Path, years: &[i64]) -> Result<Option<Percentiles>> {
    let path = run_dir.join(ENSEMBLE_FILE);
    if !path.exists() {
        return Ok(None);
    }
    let fail = |e: String| Error::Other(format!("reading {}: {e}", path.display()));
    let mut r = csv::ReaderBuilder::new().from_path(&path).map_err(|e| fail(e.to_string()))?;
    let h: Vec<String> = r.headers().map_err(|e| fail(e.to_string()))?.iter().map(str::to_string).collect();
    let at = |name: &str| h.iter().position(|x| x == name).ok_or_else(|| fail(format!("no column '{name}'")));
    let (c, s, y, var) = (at(ensemble::CATCHMENT)?, at(ensemble::STRATEGY)?, at(ensemble::YEAR)?, at(ensemble::VARIABLE)?);
    let (p5, p50, p95) = (at(ensemble::P5)?, at(ensemble::P50)?, at(ensemble::P95)?);
    let scope = h.iter().position(|x| x == ensemble::SCOPE);
    let mut out = HashMap::new();
    for rec in r.records() {
        let rec = rec.map_err(|e| fail(e.to_string()))?;
        if rec.get(s) != Some(NO_CONTROL)
            || rec.get(var) != Some(ensemble::YIELD_CHANGE_10YR_MEAN_PCT)
            || scope.is_some_and(|k| rec.get(k) != Some(crate::schema::columns::scope::LOCAL))
        {
            continue;
        }
        let Some(year) = rec.get(y).and_then(|t| t.parse::<i64>().ok()) else { continue };
        if !years.contains(&year) {
            continue;
        }
        let cell = |i: usize| json_number(rec.get(i).unwrap_or("")).map_err(fail);
        out.entry((rec.get(c).unwrap_or("").to_string(), year)).or_insert([cell(p5)?, cell(p50)?, cell(p95)?]);
    }
    Ok(Some(out))
}

/// Properties in a fixed order (serde_json's own map would sort them).
struct Ordered<'a>(&'a [(String, Value)]);

impl Serialize for Ordered<'_> {
    fn serialize<S: Serializer>(&self, s: S) -> std::result::Result<S::Ok, S::Error> {
        let mut m = s.serialize_map(Some(self.0.len()))?;
        for (k, v) in self.0 {
            m.serialize_entry(k, v)?;
        }
        m.end()
    }
}

/// Per-strategy result properties: (summary column, property base name).
/// Per-strategy result properties: the `summary.csv` columns, each written as
/// `<column>_<strategy suffix>`.
const STRATEGY_PROPERTIES: [&str; 7] = [
    summary::YIELD_CHANGE_HORIZON_PCT,
    summary::WATER_SAVED_M3,
    summary::TOTAL_COST,
    summary::COST_PER_M3,
    summary::LEVELISED_COST_PER_M3,
    summary::NPV,
    summary::BENEFIT_COST_RATIO,
];

/// No-control result properties taken under their `summary.csv` names.
const NO_CONTROL_PROPERTIES: [&str; 5] = summary::HORIZON;

/// Reads `run_dir/summary.csv` (and `ensemble.csv` if there is one) and writes
/// `run_dir/catchments.geojson`: every boundary with its catchment's results
/// as properties. `run_dir/run_info.json` must already be written. Returns the
/// path written.
// Over 100 lines on purpose: one pass from the tables to the file, in the order the properties are written (docs/gis.md lists them in this order); pieces would only pass the same dozen locals around.
pub fn write_results_geojson(run_dir: &Path, b: &Boundaries) -> Result<PathBuf> {
    let summary = Summary::read(run_dir)?;
    let info = RunInfo::read(run_dir)?;
    let offsets = summary.offset_columns();
    let exceedance: Vec<&String> = summary.header().iter().filter(|h| summary::is_first_exceedance_year(h)).collect();
    let strategies: Vec<&String> = summary.strategies.iter().filter(|s| s.as_str() != NO_CONTROL).collect();

    // Strategy suffixes must not collide.
    let mut suffixes: HashMap<String, &str> = HashMap::new();
    for s in &strategies {
        if let Some(other) = suffixes.insert(property_suffix(s), s) {
            return Err(Error::invalid(Problem::new(format!(
                "strategies '{other}' and '{s}' would give the same GeoJSON property names (suffix '{}'); rename one",
                property_suffix(s)
            ))));
        }
    }
    let horizon_year = info.end_year() as i64;
    let start_year = info.start_year as i64;
    let year20 = offsets.iter().find(|(n, _)| *n == 20).map(|_| start_year + 20).filter(|y| *y <= horizon_year);
    let ens_years: Vec<i64> = year20.into_iter().chain(std::iter::once(horizon_year)).collect();
    let ensemble = ensemble_yield_percentiles(run_dir, &ens_years)?;

    let mut written: Vec<String> = Vec::new();
    let mut features = Vec::with_capacity(b.len());
    for f in b.iter() {
        let id = f.id();
        if !summary.has_row(id, NO_CONTROL) {
            return Err(Error::Other(format!(
                "{} has no {NO_CONTROL} row for catchment '{id}' of the boundaries {}; are they from the same run?",
                run_dir.join(SUMMARY_FILE).display(),
                b.path().display()
            )));
        }
        let mut ours: Vec<(String, Value)> = Vec::new();
        let mut put = |k: String, v: Value| ours.push((k, v));
        put("catchment_name".into(), Value::from(summary.cell(id, NO_CONTROL, summary::NAME).unwrap_or("")));
        put("area_table_ha".into(), summary.json(id, NO_CONTROL, summary::AREA_HA)?);
        put("area_geodesic_ha".into(), round_json(f.area_ha(), 3));
        put("start_year".into(), Value::from(start_year));
        put("horizon_year".into(), Value::from(horizon_year));
        for (_, column) in &offsets {
            put(column.clone(), summary.json(id, NO_CONTROL, column)?);
        }
        for column in NO_CONTROL_PROPERTIES {
            if summary.has(column) {
                put(column.to_string(), summary.json(id, NO_CONTROL, column)?);
            }
        }
        for column in &exceedance {
            put(column.to_string(), summary.json(id, NO_CONTROL, column)?);
        }
        if let Some(ens) = &ensemble {
            for (label, year) in [("20y", year20), ("horizon", Some(horizon_year))] {
                let Some(year) = year else { continue };
                let cells = ens.get(&(id.to_string(), year));
                for (k, q) in [ensemble::P5, ensemble::P50, ensemble::P95].iter().enumerate() {
                    put(format!("yield_change_{label}_pct_{q}"), cells.map(|c| c[k].clone()).unwrap_or(Value::Null));
                }
            }
        }
        for s in &strategies {
            let suffix = property_suffix(s);
            for column in STRATEGY_PROPERTIES {
                if summary.has(column) {
                    put(format!("{column}_{suffix}"), summary.json(id, s, column)?);
                }
            }
        }
        if written.is_empty() {
            written = ours.iter().map(|(k, _)| k.clone()).collect();
        }
        // The feature's own properties first (the id property leading), then ours;
        // ours replace input properties of the same name.
        let mut props: Vec<(String, Value)> = Vec::new();
        if let Some(v) = f.properties().get(b.id_property()) {
            props.push((b.id_property().to_string(), v.clone()));
        }
        for (k, v) in f.properties() {
            if k != b.id_property() && !ours.iter().any(|(o, _)| o == k) {
                props.push((k.clone(), v.clone()));
            }
        }
        props.extend(ours);

        let geometry = if f.is_multi() {
            geojson::GeometryValue::from(&f.geometry().orient(Direction::Default))
        } else {
            geojson::GeometryValue::from(&f.geometry().0[0].orient(Direction::Default))
        };
        features.push((f.feature_id().cloned(), props, geojson::Geometry::new(geometry)));
    }

    let member = serde_json::json!({
        "tool": crate::schema::run_info::TOOL,
        "version": info.version,
        "title": info.title,
        "boundaries": b.path().file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_default(),
        "id_property": b.id_property(),
        "start_year": start_year,
        "horizon_year": horizon_year,
        "strategies": summary.strategies,
        "properties_written": written,
        "properties_documented_in": "docs/gis.md",
    });
    let path = run_dir.join(RESULTS_FILE);
    let fail = |e: std::io::Error| Error::io(format!("writing {}", path.display()), e);
    let file = std::fs::File::create(&path).map_err(fail)?;
    let mut w = std::io::BufWriter::new(file);
    let json_err = |e: serde_json::Error| Error::Other(format!("writing {}: {e}", path.display()));
    write!(w, "{{\"type\":\"FeatureCollection\",\n\"{RESULTS_MEMBER}\":").map_err(fail)?;
    serde_json::to_writer(&mut w, &member).map_err(json_err)?;
    write!(w, ",\n\"features\":[\n").map_err(fail)?;
    for (i, (fid, props, geometry)) in features.iter().enumerate() {
        write!(w, "{{\"type\":\"Feature\",").map_err(fail)?;
        if let Some(fid) = fid {
            write!(w, "\"id\":").map_err(fail)?;
            serde_json::to_writer(&mut w, fid).map_err(json_err)?;
            write!(w, ",").map_err(fail)?;
        }
        write!(w, "\"properties\":").map_err(fail)?;
        serde_json::to_writer(&mut w, &Ordered(props)).map_err(json_err)?;
        write!(w, ",\"geometry\":").map_err(fail)?;
        serde_json::to_writer(&mut w, geometry).map_err(json_err)?;
        writeln!(w, "}}{}", if i + 1 < features.len() { "," } else { "" }).map_err(fail)?;
    }
    writeln!(w, "]}}").map_err(fail)?;
    w.flush().map_err(fail)?;
    Ok(path)
}

fn round_json(x: f64, decimals: i32) -> Value {
    let p = 10f64.powi(decimals);
    serde_json::Number::from_f64((x * p).round() / p).map(Value::Number).unwrap_or(Value::Null)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn cells_become_json_numbers_that_read_back_equal() {
        for t in ["-9.9865", "2048618.5", "0.081787", "0.00", "1e-7", "123456789.123456"] {
            let v = json_number(t).unwrap();
            // Read back with a correctly rounded parser (std's): serde_json's own
            // default float parser can be one unit in the last place off.
            let back: f64 = v.to_string().parse().unwrap();
            assert_eq!(back, t.parse::<f64>().unwrap(), "{t}");
        }
        assert_eq!(json_number("2061").unwrap(), Value::from(2061));
        assert_eq!(json_number("").unwrap(), Value::Null);
        assert!(json_number("abc").is_err());
        assert!(json_number("NaN").is_err());
    }

    #[test]
    fn suffixes_are_snake_case() {
        assert_eq!(property_suffix("contain-early"), "contain_early");
        assert_eq!(property_suffix("Best_Value"), "best_value");
    }
}
