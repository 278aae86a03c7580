//! Geometry of one feature: parsing GeoJSON coordinates and checking that they
//! make valid WGS84 polygons (closed rings, enough corners, longitude/latitude
//! ranges, no crossings, holes inside their polygon, parts apart).
//!
//! Crossings are found with the `geo` crate's sweep-line segment intersection
//! (`geo::algorithm::sweep::Intersections`), so a ring of `n` edges costs about
//! `n log n`, not `n²`: digitised catchment boundaries can have tens of
//! thousands of vertices. Touching at a single point is allowed between
//! different rings and parts (as the OGC simple-features rules allow); a ring
//! may not touch or cross itself.

use geo::algorithm::sweep::{Cross, Intersections};
use geo::coordinate_position::CoordPos;
use geo::{Coord, CoordinatePosition, Line, LineIntersection, LineString, MultiPolygon, Polygon};
use serde_json::Value;

/// Something wrong with a feature's geometry: where (a JSON path below the
/// feature, e.g. `geometry.coordinates[0]`) and what.
#[derive(Debug, Clone, PartialEq)]
pub(crate) struct Issue {
    pub at: String,
    pub message: String,
}

fn issue(at: impl Into<String>, message: impl Into<String>) -> Issue {
    Issue { at: at.into(), message: message.into() }
}

/// Rings of one polygon as given: exterior first, then holes; positions `[lon, lat]`.
pub(crate) type RawPolygon = Vec<Vec<[f64; 2]>>;

/// Most topology problems reported per feature (the first few locate the fault).
const MAX_TOPOLOGY_ISSUES: usize = 3;

/// The polygons of a Polygon or MultiPolygon geometry, and whether it was a
/// MultiPolygon. Other geometry types and malformed coordinates are refused.
pub(crate) fn parse_geometry(g: &Value) -> Result<(Vec<RawPolygon>, bool), Vec<Issue>> {
    let Some(obj) = g.as_object() else {
        return Err(vec![issue("geometry", format!("geometry is {}, not a GeoJSON geometry object", json_kind(g)))]);
    };
    let ty = obj.get("type").and_then(Value::as_str).unwrap_or("");
    let coords = obj.get("coordinates");
    match ty {
        "Polygon" | "MultiPolygon" => {}
        "" => return Err(vec![issue("geometry.type", "geometry has no \"type\"; expected \"Polygon\" or \"MultiPolygon\"")]),
        "Point" | "MultiPoint" | "LineString" | "MultiLineString" => {
            return Err(vec![issue(
                "geometry.type",
                format!("geometry is a {ty}; a catchment boundary must be a Polygon or MultiPolygon (an area, not points or lines)"),
            )])
        }
        "GeometryCollection" => {
            return Err(vec![issue("geometry.type", "geometry is a GeometryCollection; give the catchment as one Polygon or MultiPolygon")])
        }
        other => {
            return Err(vec![issue(
                "geometry.type",
                format!("geometry type \"{other}\" is not a GeoJSON geometry; expected \"Polygon\" or \"MultiPolygon\""),
            )])
        }
    }
    let Some(coords) = coords else {
        return Err(vec![issue("geometry", format!("{ty} geometry has no \"coordinates\""))]);
    };
    let multi = ty == "MultiPolygon";
    let mut issues = Vec::new();
    let mut polygons = Vec::new();
    if multi {
        let Some(parts) = coords.as_array() else {
            return Err(vec![issue("geometry.coordinates", "MultiPolygon coordinates must be an array of polygons")]);
        };
        if parts.is_empty() {
            return Err(vec![issue("geometry.coordinates", "MultiPolygon has no polygons")]);
        }
        for (p, part) in parts.iter().enumerate() {
            match parse_rings(part, &format!("geometry.coordinates[{p}]")) {
                Ok(r) => polygons.push(r),
                Err(mut e) => issues.append(&mut e),
            }
        }
    } else {
        match parse_rings(coords, "geometry.coordinates") {
            Ok(r) => polygons.push(r),
            Err(mut e) => issues.append(&mut e),
        }
    }
    if issues.is_empty() {
        Ok((polygons, multi))
    } else {
        Err(issues)
    }
}

/// What a JSON value is, for messages ("a number", "an array", …).
pub(super) fn json_kind(v: &Value) -> &'static str {
    match v {
        Value::Null => "null",
        Value::Bool(_) => "true/false",
        Value::Number(_) => "a number",
        Value::String(_) => "text",
        Value::Array(_) => "an array",
        Value::Object(_) => "an object",
    }
}

fn parse_rings(v: &Value, at: &str) -> Result<RawPolygon, Vec<Issue>> {
    let Some(rings) = v.as_array() else {
        return Err(vec![issue(at, "polygon coordinates must be an array of rings (arrays of [longitude, latitude] positions)")]);
    };
    if rings.is_empty() {
        return Err(vec![issue(at, "polygon has no rings")]);
    }
    let mut out = Vec::with_capacity(rings.len());
    let mut issues = Vec::new();
    for (r, ring) in rings.iter().enumerate() {
        let at_r = format!("{at}[{r}]");
        let Some(positions) = ring.as_array() else {
            issues.push(issue(&at_r, format!("ring is {}, not an array of [longitude, latitude] positions", json_kind(ring))));
            continue;
        };
        let mut pts = Vec::with_capacity(positions.len());
        let mut bad = None;
        for (k, pos) in positions.iter().enumerate() {
            let xy = pos.as_array().and_then(|a| {
                if a.len() >= 2 {
                    Some([a[0].as_f64()?, a[1].as_f64()?]).filter(|_| a[2..].iter().all(Value::is_number))
                } else {
                    None
                }
            });
            match xy {
                Some(p) => pts.push(p),
                None => {
                    bad.get_or_insert((k, pos.to_string()));
                }
            }
        }
        if let Some((k, text)) = bad {
            let text: String = text.chars().take(60).collect();
            issues.push(issue(
                format!("{at_r}[{k}]"),
                format!("position {text} is not [longitude, latitude] (two numbers, optionally a third for elevation)"),
            ));
            continue;
        }
        out.push(pts);
    }
    if issues.is_empty() {
        Ok(out)
    } else {
        Err(issues)
    }
}

/// Human name of a ring: "exterior ring", "hole 2", "part 3, exterior ring".
pub(crate) fn ring_name(multi: bool, part: usize, ring: usize) -> String {
    let r = if ring == 0 { "exterior ring".to_string() } else { format!("hole {ring}") };
    if multi {
        format!("part {}, {r}", part + 1)
    } else {
        r
    }
}

fn ring_path(multi: bool, part: usize, ring: usize) -> String {
    if multi {
        format!("geometry.coordinates[{part}][{ring}]")
    } else {
        format!("geometry.coordinates[{ring}]")
    }
}

fn fmt_pos(p: [f64; 2]) -> String {
    format!("[{}, {}]", p[0], p[1])
}

/// Checks each ring on its own: closed, at least 4 positions and 3 distinct
/// corners, some area, within longitude/latitude ranges, not spanning the
/// antimeridian. Out-of-range coordinates are reported once per feature.
pub(crate) fn check_rings(polygons: &[RawPolygon], multi: bool) -> Vec<Issue> {
    let mut issues = Vec::new();
    let mut out_of_range: Option<(String, [f64; 2])> = None;
    let mut n_out = 0usize;
    let mut all_swappable = true;
    for (p, rings) in polygons.iter().enumerate() {
        for (r, ring) in rings.iter().enumerate() {
            let name = ring_name(multi, p, r);
            let at = ring_path(multi, p, r);
            let mut ring_out = false;
            for (k, q) in ring.iter().enumerate() {
                if !(-180.0..=180.0).contains(&q[0]) || !(-90.0..=90.0).contains(&q[1]) {
                    n_out += 1;
                    ring_out = true;
                    out_of_range.get_or_insert((format!("{at}[{k}]"), *q));
                }
                if q[0].abs() > 90.0 || q[1].abs() > 180.0 {
                    all_swappable = false;
                }
            }
            if ring.len() < 4 {
                issues.push(issue(
                    &at,
                    format!(
                        "{name} has {} position{}; a ring needs at least 4 (three corners and the first repeated at the end)",
                        ring.len(),
                        if ring.len() == 1 { "" } else { "s" }
                    ),
                ));
                continue;
            }
            let (first, last) = (ring[0], ring[ring.len() - 1]);
            if first != last {
                issues.push(issue(
                    &at,
                    format!(
                        "{name} is not closed: it starts at {} but ends at {}; the last position must repeat the first exactly",
                        fmt_pos(first),
                        fmt_pos(last)
                    ),
                ));
                continue;
            }
            let distinct = dedup(ring);
            if distinct.len() < 4 {
                issues.push(issue(&at, format!("{name} has fewer than 3 distinct corners")));
                continue;
            }
            if planar_area2(&distinct) == 0.0 {
                issues.push(issue(&at, format!("{name} encloses no area (its corners are all on one line)")));
                continue;
            }
            let (lo, hi) = ring.iter().fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), q| (a.min(q[0]), b.max(q[0])));
            if hi - lo > 180.0 && !ring_out {
                issues.push(issue(
                    &at,
                    format!(
                        "{name} spans {:.0}° of longitude, so it crosses the antimeridian (180°); split it into parts on either side (RFC 7946 §3.1.9)",
                        hi - lo
                    ),
                ));
            }
        }
    }
    if let Some((at, q)) = out_of_range {
        let hint = if all_swappable && q[1].abs() > 90.0 {
            "; it looks like [latitude, longitude] order: GeoJSON positions are [longitude, latitude]"
        } else {
            "; the coordinates look projected (e.g. metres of a national grid): GeoJSON must be WGS84 longitude/latitude \
             (RFC 7946), so reproject the layer to WGS84 (EPSG:4326) when exporting it"
        };
        issues.push(issue(
            at,
            format!(
                "position {} is outside longitude −180…180 / latitude −90…90 ({} position{} out of range){hint}",
                fmt_pos(q),
                n_out,
                if n_out == 1 { "" } else { "s" }
            ),
        ));
    }
    issues
}

/// A closed ring without consecutive repeated positions (still closed).
fn dedup(ring: &[[f64; 2]]) -> Vec<[f64; 2]> {
    let mut out: Vec<[f64; 2]> = Vec::with_capacity(ring.len());
    for q in ring {
        if out.last() != Some(q) {
            out.push(*q);
        }
    }
    out
}

/// Twice the signed planar area of a closed ring (shoelace), degrees².
fn planar_area2(ring: &[[f64; 2]]) -> f64 {
    ring.windows(2).map(|w| w[0][0] * w[1][1] - w[1][0] * w[0][1]).sum()
}

/// The polygons as a geo MultiPolygon (consecutive repeated positions dropped).
/// Call only after [`check_rings`] found nothing.
pub(crate) fn to_multipolygon(polygons: &[RawPolygon]) -> MultiPolygon<f64> {
    let ls = |ring: &Vec<[f64; 2]>| LineString::from(dedup(ring).into_iter().map(|q| Coord { x: q[0], y: q[1] }).collect::<Vec<_>>());
    MultiPolygon(polygons.iter().map(|rings| Polygon::new(ls(&rings[0]), rings[1..].iter().map(ls).collect())).collect())
}

/// One edge of a ring, with where it belongs.
#[derive(Debug, Clone, Copy)]
struct Edge {
    line: Line<f64>,
    part: usize,
    ring: usize,
    k: usize,
    n: usize,
}

impl Cross for Edge {
    type Scalar = f64;
    fn line(&self) -> Line<f64> {
        self.line
    }
}

/// Checks how the rings of a feature meet: no ring touches or crosses itself,
/// rings and parts touch at most at single points, holes lie inside their
/// exterior ring and outside each other, and no part lies inside another.
pub(crate) fn check_topology(mp: &MultiPolygon<f64>, multi: bool) -> Vec<Issue> {
    let mut edges = Vec::new();
    for (p, poly) in mp.0.iter().enumerate() {
        for (r, ring) in std::iter::once(poly.exterior()).chain(poly.interiors()).enumerate() {
            let n = ring.0.len().saturating_sub(1);
            for (k, line) in ring.lines().enumerate() {
                edges.push(Edge { line, part: p, ring: r, k, n });
            }
        }
    }
    let mut issues = Vec::new();
    let mut seen = std::collections::HashSet::new();
    for (a, b, x) in Intersections::from_iter(edges) {
        if issues.len() >= MAX_TOPOLOGY_ISSUES {
            break;
        }
        let same_ring = a.part == b.part && a.ring == b.ring;
        let adjacent = same_ring && (a.k.abs_diff(b.k) == 1 || (a.k.min(b.k) == 0 && a.k.max(b.k) == a.n - 1));
        let (point, touch) = match x {
            LineIntersection::SinglePoint { intersection, is_proper } => (intersection, !is_proper),
            LineIntersection::Collinear { intersection } => (intersection.start, false),
        };
        let here = format!("near [{:.6}, {:.6}]", point.x, point.y);
        let (key, message) = if same_ring {
            if adjacent && matches!(x, LineIntersection::SinglePoint { .. }) {
                continue;
            }
            let name = ring_name(multi, a.part, a.ring);
            if adjacent {
                ((a.part, a.ring, a.part, a.ring), format!("{name} doubles back on itself {here} (a spike of zero width)"))
            } else {
                ((a.part, a.ring, a.part, a.ring), format!("{name} crosses or touches itself {here}"))
            }
        } else {
            if touch {
                continue;
            }
            let (first, second) = if (a.part, a.ring) < (b.part, b.ring) { (a, b) } else { (b, a) };
            let what = if matches!(x, LineIntersection::Collinear { .. }) { "share an edge" } else { "cross" };
            let msg = if first.part == second.part {
                format!("{} and {} {what} {here}", ring_name(multi, first.part, first.ring), ring_name(multi, second.part, second.ring))
            } else {
                format!(
                    "parts {} and {} of the MultiPolygon {what} {here}; parts may touch at a point but not overlap (merge overlapping parts into one polygon)",
                    first.part + 1,
                    second.part + 1
                )
            };
            ((first.part, first.ring, second.part, second.ring), msg)
        };
        if seen.insert(key) {
            let (p, r) = (key.0, key.1);
            issues.push(issue(ring_path(multi, p, r), message));
        }
    }
    if !issues.is_empty() {
        return issues;
    }
    // No crossings: one vertex off the other ring's boundary decides containment.
    let position = |ring: &LineString<f64>, poly: &Polygon<f64>| {
        ring.0.iter().map(|c| poly.coordinate_position(c)).find(|p| *p != CoordPos::OnBoundary).unwrap_or(CoordPos::OnBoundary)
    };
    for (p, poly) in mp.0.iter().enumerate() {
        let shell = Polygon::new(poly.exterior().clone(), vec![]);
        for (h, hole) in poly.interiors().iter().enumerate() {
            if position(hole, &shell) == CoordPos::Outside {
                issues.push(issue(
                    ring_path(multi, p, h + 1),
                    format!("{} lies outside the exterior ring; a hole must be inside its polygon", ring_name(multi, p, h + 1)),
                ));
            }
            for (g, other) in poly.interiors().iter().enumerate() {
                if g != h && position(hole, &Polygon::new(other.clone(), vec![])) == CoordPos::Inside {
                    issues.push(issue(
                        ring_path(multi, p, h + 1),
                        format!("{} lies inside {}; holes may not be nested", ring_name(multi, p, h + 1), ring_name(multi, p, g + 1)),
                    ));
                }
            }
        }
        for (q, other) in mp.0.iter().enumerate() {
            if q != p && position(poly.exterior(), other) == CoordPos::Inside {
                issues.push(issue(
                    ring_path(multi, p, 0),
                    format!("part {} of the MultiPolygon lies inside part {}; parts may not overlap", p + 1, q + 1),
                ));
            }
        }
    }
    issues.truncate(MAX_TOPOLOGY_ISSUES);
    issues
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    fn polygon(v: Value) -> Vec<Issue> {
        let (polys, multi) = parse_geometry(&v).expect("parses");
        let mut i = check_rings(&polys, multi);
        if i.is_empty() {
            i = check_topology(&to_multipolygon(&polys), multi);
        }
        i
    }

    const SQUARE: [[f64; 2]; 5] = [[100.0, -44.0], [100.1, -44.0], [100.1, -43.9], [100.0, -43.9], [100.0, -44.0]];

    #[test]
    fn a_square_with_a_hole_is_valid_either_way_round() {
        let hole = [[100.02, -43.98], [100.02, -43.95], [100.05, -43.95], [100.05, -43.98], [100.02, -43.98]];
        assert!(polygon(json!({"type": "Polygon", "coordinates": [SQUARE, hole]})).is_empty());
        let mut rev = SQUARE.to_vec();
        rev.reverse();
        assert!(polygon(json!({"type": "Polygon", "coordinates": [rev]})).is_empty());
    }

    #[test]
    fn bow_tie_is_a_self_intersection() {
        let bow = [[100.0, -44.0], [100.1, -43.9], [100.1, -44.0], [100.0, -43.85], [100.0, -44.0]];
        let i = polygon(json!({"type": "Polygon", "coordinates": [bow]}));
        assert_eq!(i.len(), 1, "{i:?}");
        assert!(i[0].message.contains("exterior ring crosses or touches itself near [100.060000, -43.940000]"), "{i:?}");
    }

    #[test]
    fn figure_eight_touching_at_a_vertex_is_refused() {
        let eight = [[100.0, -44.0], [100.1, -44.0], [100.05, -43.95], [100.1, -43.9], [100.0, -43.9], [100.05, -43.95], [100.0, -44.0]];
        let i = polygon(json!({"type": "Polygon", "coordinates": [eight]}));
        assert!(i.iter().any(|x| x.message.contains("touches itself")), "{i:?}");
    }

    #[test]
    fn hole_outside_and_hole_crossing_are_refused() {
        let outside = [[101.0, -44.0], [101.0, -43.95], [101.05, -43.95], [101.0, -44.0]];
        let i = polygon(json!({"type": "Polygon", "coordinates": [SQUARE, outside]}));
        assert!(i[0].message.contains("hole 1 lies outside the exterior ring"), "{i:?}");
        let crossing = [[100.05, -44.05], [100.05, -43.95], [100.08, -43.95], [100.05, -44.05]];
        let i = polygon(json!({"type": "Polygon", "coordinates": [SQUARE, crossing]}));
        assert!(i[0].message.contains("exterior ring and hole 1 cross"), "{i:?}");
    }

    #[test]
    fn overlapping_and_nested_parts_are_refused_touching_parts_are_not() {
        let shifted: Vec<[f64; 2]> = SQUARE.iter().map(|q| [q[0] + 0.05, q[1]]).collect();
        let i = polygon(json!({"type": "MultiPolygon", "coordinates": [[SQUARE], [shifted]]}));
        assert!(i[0].message.contains("parts 1 and 2 of the MultiPolygon"), "{i:?}");
        let inner = [[100.02, -43.98], [100.05, -43.98], [100.05, -43.95], [100.02, -43.98]];
        let i = polygon(json!({"type": "MultiPolygon", "coordinates": [[SQUARE], [inner]]}));
        assert!(i[0].message.contains("part 2 of the MultiPolygon lies inside part 1"), "{i:?}");
        let corner = [[100.1, -43.9], [100.2, -43.9], [100.2, -43.8], [100.1, -43.8], [100.1, -43.9]];
        assert!(polygon(json!({"type": "MultiPolygon", "coordinates": [[SQUARE], [corner]]})).is_empty());
    }

    #[test]
    fn ring_shape_problems() {
        let open = &SQUARE[..4];
        assert!(polygon(json!({"type": "Polygon", "coordinates": [open]}))[0].message.contains("is not closed"));
        let short = [[100.0, -44.0], [100.1, -44.0], [100.0, -44.0]];
        assert!(polygon(json!({"type": "Polygon", "coordinates": [short]}))[0].message.contains("has 3 positions"));
        let flat = [[100.0, -44.0], [100.1, -44.0], [100.2, -44.0], [100.0, -44.0]];
        assert!(polygon(json!({"type": "Polygon", "coordinates": [flat]}))[0].message.contains("encloses no area"));
        let nztm = [[1370000.0, 5150000.0], [1371000.0, 5150000.0], [1371000.0, 5151000.0], [1370000.0, 5150000.0]];
        let i = polygon(json!({"type": "Polygon", "coordinates": [nztm]}));
        assert!(i[0].message.contains("look projected") && i[0].message.contains("4 positions out of range"), "{i:?}");
        let swapped: Vec<[f64; 2]> = SQUARE.iter().map(|q| [q[1], q[0]]).collect();
        assert!(polygon(json!({"type": "Polygon", "coordinates": [swapped]}))[0].message.contains("[latitude, longitude] order"));
        let wide = [[179.9, -44.0], [-179.9, -44.0], [-179.9, -43.9], [179.9, -44.0]];
        assert!(polygon(json!({"type": "Polygon", "coordinates": [wide]}))[0].message.contains("antimeridian"));
    }

    #[test]
    fn wrong_geometry_types_and_malformed_coordinates() {
        let e = parse_geometry(&json!({"type": "LineString", "coordinates": [[0, 0], [1, 1]]})).unwrap_err();
        assert!(e[0].message.contains("is a LineString"));
        let e = parse_geometry(&json!({"type": "Polygon", "coordinates": [[[0, 0], [1, "a"], [1, 1], [0, 0]]]})).unwrap_err();
        assert_eq!(e[0].at, "geometry.coordinates[0][1]");
        let e = parse_geometry(&json!(null)).unwrap_err();
        assert!(e[0].message.contains("null"));
    }
}
