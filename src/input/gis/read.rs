//! Reading catchment boundaries from a GeoJSON FeatureCollection.
//!
//! Problems name the file, the line where the feature starts (`row`), the JSON
//! path of what is wrong (`column`, e.g. `features[2].properties.id`) and, in
//! the message, the feature's number (1-based, as a GIS attribute table counts)
//! and id. Every problem in the file is collected before returning.

use super::validate::{check_rings, check_topology, json_kind, parse_geometry, to_multipolygon};
use super::{area::geodesic_area_ha, json_lines::feature_lines, Boundaries, Boundary};
use crate::error::Problem;
use crate::input::table::{read_limited, suggestion};
use crate::schema::RESULTS_MEMBER;
use serde_json::Value;
use std::collections::{HashMap, HashSet};
use std::path::Path;

/// Largest GeoJSON file accepted, bytes (512 MiB).
pub const MAX_GEOJSON_BYTES: u64 = 512 * 1024 * 1024;

/// Most problems listed for one file; the rest are counted.
const MAX_PROBLEMS: usize = 200;

/// Reads catchment boundaries from an RFC 7946 GeoJSON FeatureCollection at
/// `path`, taking each feature's catchment id from property `id_property` and
/// matching it against `catchment_ids` (the catchment table's ids).
///
/// Every feature must be a Polygon or MultiPolygon (holes allowed) in WGS84
/// longitude/latitude with a known, unique id, and every catchment must have a
/// feature. All problems found are returned together.
pub fn read_boundaries(path: &Path, id_property: &str, catchment_ids: &[&str]) -> Result<Boundaries, Vec<Problem>> {
    let bytes = read_limited(path, MAX_GEOJSON_BYTES, "GeoJSON files", "a GeoJSON file").map_err(|p| vec![p])?;
    parse_boundaries(path, &bytes, id_property, catchment_ids)
}

/// Parses GeoJSON bytes as [`read_boundaries`] does.
// Over 100 lines on purpose: one pass over the features, each checked in the order a reader fixes them (JSON shape, geometry, rings, ids), collecting every problem with its feature and line.
pub(crate) fn parse_boundaries(path: &Path, bytes: &[u8], id_property: &str, catchment_ids: &[&str]) -> Result<Boundaries, Vec<Problem>> {
    let bytes = bytes.strip_prefix(b"\xEF\xBB\xBF").unwrap_or(bytes);
    let text = std::str::from_utf8(bytes).map_err(|e| {
        let line = bytes[..e.valid_up_to()].iter().filter(|&&b| b == b'\n').count() + 1;
        vec![Problem::in_file(path, "is not UTF-8 text; GeoJSON must be UTF-8 (RFC 7946 §11)").row(line)]
    })?;
    if text.trim().is_empty() {
        return Err(vec![Problem::in_file(path, "is empty: expected a GeoJSON FeatureCollection of catchment polygons")]);
    }
    let root: Value = serde_json::from_str(text).map_err(|e| {
        let line = e.line();
        let full = e.to_string();
        let suffix = format!(" at line {} column {}", e.line(), e.column());
        let what = full.strip_suffix(&suffix).unwrap_or(&full);
        let p = Problem::in_file(path, format!("is not valid JSON: {what} (line {}, column {})", e.line(), e.column()));
        vec![if line > 0 { p.row(line) } else { p }]
    })?;
    let features = top_level(path, &root)?;
    let lines = feature_lines(text);
    let known: HashSet<&str> = catchment_ids.iter().copied().collect();
    let dropped: HashSet<String> = written_properties(&root);

    let mut problems = Vec::new();
    let mut out = Vec::with_capacity(features.len());
    let mut first_feature_of: HashMap<String, usize> = HashMap::new();
    let mut listed = 0usize;
    let mut unlisted = 0usize;
    let mut push = |problems: &mut Vec<Problem>, p: Problem| {
        if listed < MAX_PROBLEMS {
            problems.push(p);
            listed += 1;
        } else {
            unlisted += 1;
        }
    };
    for (i, f) in features.iter().enumerate() {
        let line = lines.get(i).copied();
        let id = feature_catchment_id(f, id_property);
        let name = match &id {
            Ok(id) => format!("feature {} (id '{id}')", i + 1),
            Err(_) => format!("feature {}", i + 1),
        };
        let here = |at: &str, msg: String| {
            let p = Problem::in_file(path, format!("{name}: {msg}")).column(if at.is_empty() {
                format!("features[{i}]")
            } else {
                format!("features[{i}].{at}")
            });
            match line {
                Some(l) => p.row(l),
                None => p,
            }
        };
        let Some(obj) = f.as_object() else {
            push(&mut problems, here("", format!("is {}, not a Feature object", json_kind(f))));
            continue;
        };
        match obj.get("type").and_then(Value::as_str) {
            Some("Feature") => {}
            Some(t) => {
                push(&mut problems, here("type", format!("has \"type\": \"{t}\"; every member of \"features\" must be a Feature")));
                continue;
            }
            None => {
                push(&mut problems, here("type", "has no \"type\": \"Feature\"".into()));
                continue;
            }
        }
        let mut ok = true;
        // The catchment id.
        let id = match id {
            Ok(id) => {
                if !known.contains(id.as_str()) {
                    ok = false;
                    push(
                        &mut problems,
                        here(
                            &format!("properties.{id_property}"),
                            format!("'{id}' is not a catchment of the catchment table{}", suggestion(&id, catchment_ids)),
                        ),
                    );
                } else if let Some(&j) = first_feature_of.get(&id) {
                    ok = false;
                    push(
                        &mut problems,
                        here(
                            &format!("properties.{id_property}"),
                            format!(
                                "id '{id}' is also used by feature {}; each catchment needs exactly one feature (make a catchment in several pieces one MultiPolygon)",
                                j + 1
                            ),
                        ),
                    );
                } else {
                    first_feature_of.insert(id.clone(), i);
                }
                Some(id)
            }
            Err(msg) => {
                ok = false;
                push(&mut problems, here(&format!("properties.{id_property}"), msg));
                None
            }
        };
        // The geometry.
        let geometry = match obj.get("geometry") {
            None | Some(Value::Null) => {
                push(&mut problems, here("geometry", "has no geometry; every catchment needs its boundary polygon".into()));
                None
            }
            Some(g) => match parse_geometry(g) {
                Err(issues) => {
                    for x in issues {
                        push(&mut problems, here(&x.at, x.message));
                    }
                    None
                }
                Ok((polys, multi)) => {
                    let mut issues = check_rings(&polys, multi);
                    let mp = issues.is_empty().then(|| to_multipolygon(&polys));
                    if let Some(mp) = &mp {
                        issues = check_topology(mp, multi);
                    }
                    if issues.is_empty() {
                        mp.map(|mp| (mp, multi))
                    } else {
                        for x in issues {
                            push(&mut problems, here(&x.at, x.message));
                        }
                        None
                    }
                }
            },
        };
        if let (true, Some(id), Some((geometry, multi))) = (ok, id, geometry) {
            let mut properties = match obj.get("properties") {
                Some(Value::Object(m)) => m.clone(),
                _ => serde_json::Map::new(),
            };
            properties.retain(|k, _| k == id_property || !dropped.contains(k));
            let area_ha = geodesic_area_ha(&geometry);
            out.push(Boundary { id, geometry, multi, properties, feature_id: obj.get("id").cloned(), area_ha, index: i });
        }
    }
    // Catchments of the table without a feature.
    let missing: Vec<&str> = catchment_ids.iter().copied().filter(|c| !first_feature_of.contains_key(*c)).collect();
    const LIST: usize = 20;
    for c in missing.iter().take(LIST) {
        push(
            &mut problems,
            Problem::in_file(
                path,
                format!(
                    "catchment '{c}' of the catchment table has no feature with {id_property} = '{c}'; every catchment needs a boundary"
                ),
            ),
        );
    }
    if missing.len() > LIST {
        push(&mut problems, Problem::in_file(path, format!("… and {} more catchments of the table have no feature", missing.len() - LIST)));
    }
    if unlisted > 0 {
        problems.push(Problem::in_file(path, format!("… and {unlisted} more problems not listed (only the first {MAX_PROBLEMS} are)")));
    }
    if problems.is_empty() {
        Ok(Boundaries::new(path, id_property, out))
    } else {
        Err(problems)
    }
}

/// The `features` array of a FeatureCollection, or why the file is not one.
fn top_level<'a>(path: &Path, root: &'a Value) -> Result<&'a Vec<Value>, Vec<Problem>> {
    let refuse = |msg: String| vec![Problem::in_file(path, msg)];
    let Some(obj) = root.as_object() else {
        return Err(refuse(format!("is JSON but {} at the top, not a GeoJSON FeatureCollection object", json_kind(root))));
    };
    match obj.get("type").and_then(Value::as_str) {
        Some("FeatureCollection") => {}
        Some("Feature") => return Err(refuse("holds a single Feature; wrap it in a FeatureCollection: {\"type\": \"FeatureCollection\", \"features\": [ … ]}".into())),
        Some(t @ ("Polygon" | "MultiPolygon" | "Point" | "MultiPoint" | "LineString" | "MultiLineString" | "GeometryCollection")) => {
            return Err(refuse(format!(
                "holds a bare {t} geometry; expected a FeatureCollection with one Feature per catchment, each with the catchment id in its properties"
            )))
        }
        Some(t) => return Err(refuse(format!("has \"type\": \"{t}\"; expected \"FeatureCollection\""))),
        None => return Err(refuse("has no \"type\"; expected a GeoJSON FeatureCollection (\"type\": \"FeatureCollection\")".into())),
    }
    if let Some(crs) = obj.get("crs") {
        let name = crs.pointer("/properties/name").and_then(Value::as_str).unwrap_or("");
        let wgs84 = ["CRS84", "EPSG:4326", "EPSG::4326", "WGS84", "WGS 84"].iter().any(|w| name.to_ascii_uppercase().contains(w));
        if !wgs84 {
            let shown = if name.is_empty() { crs.to_string().chars().take(80).collect() } else { name.to_string() };
            return Err(refuse(format!(
                "declares the coordinate system {shown} in a \"crs\" member; GeoJSON must be WGS84 longitude/latitude (RFC 7946 §4, which also removed \"crs\"): \
                 export the layer as GeoJSON in WGS84 (EPSG:4326)"
            )));
        }
    }
    match obj.get("features") {
        Some(Value::Array(f)) if !f.is_empty() => Ok(f),
        Some(Value::Array(_)) => Err(refuse("has no features; expected one Feature per catchment".into())),
        Some(other) => Err(refuse(format!("\"features\" is {}, not an array of Features", json_kind(other)))),
        None => Err(refuse("has no \"features\" array".into())),
    }
}

/// Properties an earlier yieldshift run wrote (listed in its [`RESULTS_MEMBER`]),
/// so that a results file read back as boundaries does not carry stale results.
fn written_properties(root: &Value) -> HashSet<String> {
    root.get(RESULTS_MEMBER)
        .and_then(|m| m.get("properties_written"))
        .and_then(Value::as_array)
        .map(|a| a.iter().filter_map(|v| v.as_str().map(str::to_string)).collect())
        .unwrap_or_default()
}

/// The catchment id of a feature, or what is wrong with it.
fn feature_catchment_id(f: &Value, id_property: &str) -> Result<String, String> {
    let props = f.get("properties");
    let Some(props) = props.and_then(Value::as_object) else {
        return Err(format!("has no properties, so no catchment id in property '{id_property}'"));
    };
    match props.get(id_property) {
        Some(Value::String(s)) if s.trim().is_empty() => Err(format!("property '{id_property}' is empty; it must hold the catchment id")),
        Some(Value::String(s)) => Ok(s.clone()),
        Some(Value::Number(n)) => Ok(match (n.as_i64(), n.as_f64()) {
            (Some(i), _) => i.to_string(),
            (None, Some(x)) if x.fract() == 0.0 && x.abs() < 1e15 => format!("{x:.0}"),
            _ => n.to_string(),
        }),
        Some(other) => Err(format!("property '{id_property}' is {}; it must hold the catchment id as text", json_kind(other))),
        None => {
            let keys: Vec<&str> = props.keys().map(String::as_str).collect();
            let near = match crate::input::table::nearest(id_property, &keys) {
                Some(k) => format!(" (did you mean '{k}'?)"),
                None if keys.is_empty() => " (its properties are empty)".to_string(),
                None if keys.len() <= 24 => format!(" (its properties: {})", keys.join(", ")),
                None => String::new(),
            };
            let top = match f.get("id") {
                Some(Value::String(s)) => {
                    format!(" (the feature has a top-level \"id\" '{s}': copy it into the properties or name another id_property)")
                }
                Some(Value::Number(n)) => {
                    format!(" (the feature has a top-level \"id\" {n}: copy it into the properties or name another id_property)")
                }
                _ => String::new(),
            };
            Err(format!("has no property '{id_property}' holding the catchment id{near}{top}"))
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const IDS: [&str; 2] = ["skelvane", "corvisk"];

    fn feature(id: &str, x0: f64) -> String {
        format!(
            r#"{{"type": "Feature", "properties": {{"id": "{id}", "name": "N"}}, "geometry": {{"type": "Polygon", "coordinates": [[[{x0}, -44.0], [{x1}, -44.0], [{x1}, -43.9], [{x0}, -43.9], [{x0}, -44.0]]]}}}}"#,
            x1 = x0 + 0.1
        )
    }

    fn parse(text: &str) -> Result<Boundaries, Vec<Problem>> {
        parse_boundaries(Path::new("b.geojson"), text.as_bytes(), "id", &IDS)
    }

    fn collection(features: &[String]) -> String {
        format!("{{\"type\": \"FeatureCollection\", \"features\": [\n{}\n]}}", features.join(",\n"))
    }

    #[test]
    fn reads_a_valid_collection() {
        let b = parse(&collection(&[feature("skelvane", 100.0), feature("corvisk", 100.1)])).unwrap();
        assert_eq!(b.len(), 2);
        assert_eq!(b.get("corvisk").unwrap().feature_index(), 1);
        assert!(b.get("skelvane").unwrap().area_ha() > 0.0);
        assert_eq!(b.get("skelvane").unwrap().properties()["name"], "N");
    }

    #[test]
    fn every_problem_is_named_by_feature_and_line() {
        let text = collection(&[feature("skelvane", 100.0), feature("Corvisk", 100.1), feature("skelvane", 100.2)]);
        let e = parse(&text).unwrap_err();
        let all: Vec<String> = e.iter().map(|p| p.to_string()).collect();
        assert_eq!(e.len(), 3, "{all:?}");
        assert!(all[0].contains("row 3") && all[0].contains("features[1].properties.id"), "{all:?}");
        assert!(
            all[0].contains("feature 2 (id 'Corvisk'): 'Corvisk' is not a catchment") && all[0].contains("did you mean 'corvisk'"),
            "{all:?}"
        );
        assert!(all[1].contains("row 4") && all[1].contains("also used by feature 1"), "{all:?}");
        assert!(all[2].contains("catchment 'corvisk' of the catchment table has no feature"), "{all:?}");
    }

    #[test]
    fn json_errors_give_the_line() {
        let e = parse("{\"type\": \"FeatureCollection\",\n \"features\": [\n {\"type\": \"Feature\",}]}").unwrap_err();
        assert_eq!(e[0].row, Some(3), "{e:?}");
        assert!(e[0].message.starts_with("is not valid JSON"), "{e:?}");
        assert!(!e[0].message.contains("at line"), "{e:?}");
    }

    #[test]
    fn not_a_collection() {
        let e = parse(&feature("skelvane", 100.0)).unwrap_err();
        assert!(e[0].message.contains("single Feature"));
        let e = parse("[1, 2]").unwrap_err();
        assert!(e[0].message.contains("an array at the top"));
        let e = parse(r#"{"type": "FeatureCollection", "crs": {"type": "name", "properties": {"name": "urn:ogc:def:crs:EPSG::2193"}}, "features": []}"#).unwrap_err();
        assert!(e[0].message.contains("EPSG::2193"), "{e:?}");
        let e = parse(r#"{"type": "FeatureCollection", "features": []}"#).unwrap_err();
        assert!(e[0].message.contains("no features"));
    }

    #[test]
    fn missing_and_odd_ids() {
        let no_id = feature("skelvane", 100.0).replace("\"id\": \"skelvane\", ", "");
        let e = parse(&collection(&[no_id, feature("corvisk", 100.1)])).unwrap_err();
        assert!(e[0].message.contains("feature 1: has no property 'id'"), "{e:?}");
        let numeric = feature("skelvane", 100.0).replace("\"skelvane\"", "12");
        let e = parse_boundaries(Path::new("b.geojson"), collection(&[numeric]).as_bytes(), "id", &["12"]);
        assert_eq!(e.unwrap().get("12").unwrap().id(), "12");
    }

    #[test]
    fn properties_written_by_a_run_are_not_kept() {
        let text = collection(&[feature("skelvane", 100.0), feature("corvisk", 100.1)]).replacen(
            "{\"type\": \"FeatureCollection\",",
            "{\"type\": \"FeatureCollection\", \"yieldshift_run\": {\"properties_written\": [\"name\"]},",
            1,
        );
        let b = parse(&text).unwrap();
        assert!(!b.get("skelvane").unwrap().properties().contains_key("name"));
        assert!(b.get("skelvane").unwrap().properties().contains_key("id"));
    }
}
