//! Catchment boundaries and maps: geodesic areas against an independent geodesy
//! library, the demo boundaries against the demo table, the results GeoJSON
//! round trip against `summary.csv`, refusal of bad GeoJSON, and the maps.

use geo::{Contains, MultiPolygon, Point, Polygon, Winding};
use std::collections::HashMap;
use std::path::{Path, PathBuf};
use std::process::Command;
use std::sync::OnceLock;
use yieldshift::input::gis::{self, area_mismatches, geodesic_area_ha, read_boundaries, Boundaries};
use yieldshift::output::geojson::write_results_geojson;
use yieldshift::plot::maps::draw_maps;
use yieldshift::{Error, Problem};

/// Relative tolerance against geographiclib: both evaluate Karney's (2013) series
/// in double precision, so they should agree to rounding error (~1e-12); 1e-9
/// leaves room for a different summation order without hiding a real error
/// (a wrong ellipsoid changes a 1° cell's area by ~1e-3).
const GEODESIC_REL: f64 = 1e-9;

fn root() -> &'static Path {
    Path::new(env!("CARGO_MANIFEST_DIR"))
}

// ---------------------------------------------------------------------------
// Geodesic area against geographiclib
// ---------------------------------------------------------------------------

struct Reference {
    shape: MultiPolygon<f64>,
    area_m2: f64,
}

fn ring(text: &str) -> Vec<(f64, f64)> {
    let mut pts: Vec<(f64, f64)> = text
        .split(';')
        .map(|p| {
            let mut it = p.split_whitespace().map(|v| v.parse::<f64>().unwrap());
            (it.next().unwrap(), it.next().unwrap())
        })
        .collect();
    pts.push(pts[0]);
    pts
}

fn references() -> HashMap<String, Reference> {
    let text = std::fs::read_to_string(root().join("tests/fixtures/geodesic_area.csv")).unwrap();
    let mut r = csv::ReaderBuilder::new().comment(Some(b'#')).from_reader(text.as_bytes());
    let mut out = HashMap::new();
    for rec in r.records() {
        let rec = rec.unwrap();
        let holes = if rec[2].is_empty() { vec![] } else { vec![ring(&rec[2]).into()] };
        let shape = MultiPolygon(vec![Polygon::new(ring(&rec[1]).into(), holes)]);
        out.insert(rec[0].to_string(), Reference { shape, area_m2: rec[3].parse().unwrap() });
    }
    out
}

fn check_reference(refs: &HashMap<String, Reference>, case: &str) {
    let r = &refs[case];
    let ha = geodesic_area_ha(&r.shape);
    let want_ha = r.area_m2 / 1e4;
    assert!(((ha - want_ha) / want_ha).abs() < GEODESIC_REL, "{case}: {ha} ha vs geographiclib {want_ha} ha");
}

#[test]
fn one_degree_cells_match_geographiclib() {
    let refs = references();
    // Source: geographiclib 2.1 Geodesic.WGS84 Polygon, lon 0–1°, lat 0–1° (tests/fixtures/geodesic_area.csv, scripts/geodesic_reference.py)
    check_reference(&refs, "equator_cell_0_1");
    // Source: geographiclib 2.1 Geodesic.WGS84 Polygon, lon 10–11°, lat −0.5–0.5°
    check_reference(&refs, "equator_cell_centred");
    // Source: geographiclib 2.1 Geodesic.WGS84 Polygon, lon 0–1°, lat 45–46° N
    check_reference(&refs, "north_45_cell");
    // Source: geographiclib 2.1 Geodesic.WGS84 Polygon, lon −73–−72°, lat 44.5–45.5° N
    check_reference(&refs, "north_45_cell_centred");
    // Source: geographiclib 2.1 Geodesic.WGS84 Polygon, lon 170–171°, lat 46–45° S
    check_reference(&refs, "south_45_cell");
    // Source: geographiclib 2.1 Geodesic.WGS84 Polygon, lon 170–171°, lat 45.5–44.5° S
    check_reference(&refs, "south_45_cell_centred");
    // Source: geographiclib 2.1 Geodesic.WGS84 Polygon, lon 20–21°, lat 80–81° N
    check_reference(&refs, "north_80_cell");
    // The two hemispheres mirror each other exactly on the ellipsoid.
    assert_eq!(geodesic_area_ha(&refs["north_45_cell"].shape), geodesic_area_ha(&refs["south_45_cell"].shape));
    // Sanity of the fixture itself: an equatorial 1° cell is about 111.3 km × 110.6 km.
    // From memory: 1° of longitude at the equator ≈ 111.32 km, 1° of latitude near the equator ≈ 110.57 km.
    assert!((refs["equator_cell_0_1"].area_m2 / 1e6 - 111.32 * 110.57).abs() < 30.0);
}

#[test]
fn irregular_polygons_and_holes_match_geographiclib() {
    let refs = references();
    // Source: geographiclib 2.1 Geodesic.WGS84 Polygon, invented hexagon near 44.35° S 99.96° E
    check_reference(&refs, "south_44_irregular");
    // Source: geographiclib 2.1 Geodesic.WGS84 Polygon, the same hexagon minus an invented quadrilateral hole
    check_reference(&refs, "south_44_irregular_with_hole");
    assert_eq!(refs.len(), 9, "every fixture row is checked by name above");
}

#[test]
fn ring_orientation_does_not_change_the_area() {
    let refs = references();
    for (case, r) in &refs {
        let mut flipped = r.shape.clone();
        for p in &mut flipped.0 {
            p.exterior_mut(|e| e.0.reverse());
            p.interiors_mut(|hs| hs.iter_mut().for_each(|h| h.0.reverse()));
        }
        let (a, b) = (geodesic_area_ha(&r.shape), geodesic_area_ha(&flipped));
        // Source: geographiclib 2.1 Geodesic.WGS84 Polygon (same fixture row, traversed the other way)
        assert!(((b - r.area_m2 / 1e4) / (r.area_m2 / 1e4)).abs() < GEODESIC_REL, "{case}: {a} vs {b}");
    }
}

// ---------------------------------------------------------------------------
// The demo boundaries
// ---------------------------------------------------------------------------

/// `(id, area_ha)` of the demo catchment table.
fn demo_table() -> Vec<(String, f64)> {
    let mut r = csv::Reader::from_path(root().join("demo-data/catchments.csv")).unwrap();
    let h = r.headers().unwrap().clone();
    let (id, area) = (h.iter().position(|c| c == "id").unwrap(), h.iter().position(|c| c == "area_ha").unwrap());
    r.records().map(|rec| rec.unwrap()).map(|rec| (rec[id].to_string(), rec[area].parse().unwrap())).collect()
}

fn demo_boundaries() -> Boundaries {
    let table = demo_table();
    let ids: Vec<&str> = table.iter().map(|(i, _)| i.as_str()).collect();
    read_boundaries(&root().join("demo-data/catchments.geojson"), "id", &ids).unwrap_or_else(|p| panic!("{p:#?}"))
}

#[test]
fn demo_polygons_agree_with_the_demo_table_within_5_percent() {
    let b = demo_boundaries();
    let table = demo_table();
    assert_eq!(b.len(), table.len());
    for (id, area_ha) in &table {
        let got = b.get(id).unwrap().area_ha();
        // Source: demo-data/catchments.csv area_ha (the invented demo table); 5% is the default [gis] area_tolerance.
        assert!((got / area_ha - 1.0).abs() < 0.05, "{id}: boundary {got:.1} ha vs table {area_ha} ha");
    }
    assert!(area_mismatches(&b, &table, gis::DEFAULT_AREA_TOLERANCE).is_empty());
    // The demo exercises a hole and a MultiPolygon.
    assert!(b.iter().any(|f| f.geometry().0.iter().any(|p| !p.interiors().is_empty())), "a polygon with a hole");
    assert!(b.iter().any(|f| f.is_multi() && f.geometry().0.len() > 1), "a MultiPolygon");
    // Invented placement: open ocean around 44° S 100° E, no land within about 1,700 km (DEVELOPERS.md, Demo data).
    for f in b.iter() {
        for c in f.geometry().0.iter().flat_map(|p| p.exterior().0.iter()) {
            assert!((99.7..100.2).contains(&c.x) && (-44.5..-44.1).contains(&c.y), "{c:?}");
        }
    }
}

#[test]
fn neighbouring_demo_catchments_do_not_overlap() {
    // Shared edges are generated once, so neighbours meet without overlapping:
    // a point inside each catchment lies in no other catchment.
    let b = demo_boundaries();
    let all: Vec<_> = b.iter().collect();
    for f in &all {
        let p = &f.geometry().0[0];
        let probe: Point<f64> = geo::InteriorPoint::interior_point(p).unwrap();
        for g in &all {
            if g.id() != f.id() {
                assert!(!g.geometry().contains(&probe), "{} lies partly inside {}", f.id(), g.id());
            }
        }
    }
}

#[test]
fn area_mismatches_are_reported_with_both_areas() {
    let b = demo_boundaries();
    let inflated: Vec<(String, f64)> = demo_table().into_iter().map(|(id, a)| (id, a * 1.25)).collect();
    let m = area_mismatches(&b, &inflated, 0.05);
    assert_eq!(m.len(), 6);
    let skelvane = m.iter().find(|x| x.catchment == "skelvane").unwrap();
    assert_eq!(skelvane.table_area_ha, 3000.0);
    assert!((skelvane.relative_difference - (skelvane.geometry_area_ha / 3000.0 - 1.0)).abs() < 1e-12);
    assert!(skelvane.relative_difference < -0.19 && skelvane.relative_difference > -0.21);
    let msg = skelvane.message();
    assert!(
        msg.contains("'skelvane'")
            && msg.contains("table's area_ha is 3000 ha")
            && msg.contains("is 2398 ha")
            && msg.contains("area_from_geometry"),
        "{msg}"
    );
    // Within a 25% tolerance nothing is reported.
    assert!(area_mismatches(&b, &inflated, 0.25).is_empty());
}

// ---------------------------------------------------------------------------
// Bad GeoJSON
// ---------------------------------------------------------------------------

const IDS: [&str; 3] = ["skelvane", "corvisk", "tamsquil"];

fn square(x0: f64, y0: f64) -> String {
    let d = 0.05;
    format!("[[[{x0}, {y0}], [{}, {y0}], [{}, {}], [{x0}, {}], [{x0}, {y0}]]]", x0 + d, x0 + d, y0 + d, y0 + d)
}

fn feature(props: &str, geometry: &str) -> String {
    format!("{{\"type\": \"Feature\", \"properties\": {{{props}}}, \"geometry\": {geometry}}}")
}

fn polygon(coords: &str) -> String {
    format!("{{\"type\": \"Polygon\", \"coordinates\": {coords}}}")
}

fn good_features() -> Vec<String> {
    vec![
        feature("\"id\": \"skelvane\"", &polygon(&square(100.0, -44.3))),
        feature("\"id\": \"corvisk\"", &polygon(&square(100.05, -44.3))),
        feature("\"id\": \"tamsquil\"", &polygon(&square(100.1, -44.3))),
    ]
}

/// Reads a collection of these features; the problems as text.
fn refused(features: &[String]) -> Vec<String> {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("bad.geojson");
    std::fs::write(&path, format!("{{\"type\": \"FeatureCollection\", \"features\": [\n{}\n]}}\n", features.join(",\n"))).unwrap();
    let problems = read_boundaries(&path, "id", &IDS).expect_err("refused");
    check_exit_code_2(&problems);
    problems.iter().map(|p| p.to_string()).collect()
}

/// The problems are invalid input (which the command line turns into exit code 2).
fn check_exit_code_2(problems: &[Problem]) {
    assert!(Error::Invalid(problems.to_vec()).is_invalid_input());
}

#[test]
fn good_collection_is_read() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("ok.geojson");
    std::fs::write(&path, format!("{{\"type\": \"FeatureCollection\", \"features\": [{}]}}", good_features().join(","))).unwrap();
    let b = read_boundaries(&path, "id", &IDS).unwrap();
    assert_eq!(b.len(), 3);
}

#[test]
fn missing_id_is_refused_naming_the_feature() {
    let mut f = good_features();
    f[1] = feature("\"name\": \"Corvisk Water\", \"ID\": \"corvisk\"", &polygon(&square(100.05, -44.3)));
    let p = refused(&f);
    assert!(
        p.iter().any(|m| m.contains("row 3")
            && m.contains("features[1].properties.id")
            && m.contains("feature 2: has no property 'id'")
            && m.contains("did you mean 'ID'")),
        "{p:#?}"
    );
    // ... and the catchment is then reported as having no boundary.
    assert!(p.iter().any(|m| m.contains("catchment 'corvisk' of the catchment table has no feature")), "{p:#?}");
}

#[test]
fn unknown_id_is_refused_with_a_suggestion() {
    let mut f = good_features();
    f[2] = feature("\"id\": \"tamsqil\"", &polygon(&square(100.1, -44.3)));
    let p = refused(&f);
    assert!(
        p.iter().any(|m| m.contains("feature 3 (id 'tamsqil')")
            && m.contains("not a catchment of the catchment table")
            && m.contains("did you mean 'tamsquil'")),
        "{p:#?}"
    );
}

#[test]
fn duplicate_id_is_refused() {
    let mut f = good_features();
    f[2] = feature("\"id\": \"skelvane\"", &polygon(&square(100.1, -44.3)));
    let p = refused(&f);
    assert!(p.iter().any(|m| m.contains("feature 3 (id 'skelvane')") && m.contains("also used by feature 1")), "{p:#?}");
}

#[test]
fn unclosed_ring_is_refused_naming_the_feature() {
    let mut f = good_features();
    f[0] = feature("\"id\": \"skelvane\"", &polygon("[[[100.0, -44.3], [100.05, -44.3], [100.05, -44.25], [100.0, -44.25]]]"));
    let p = refused(&f);
    assert!(
        p.iter().any(|m| m.contains("feature 1 (id 'skelvane')")
            && m.contains("exterior ring is not closed")
            && m.contains("features[0].geometry.coordinates[0]")),
        "{p:#?}"
    );
}

#[test]
fn projected_coordinates_are_refused_naming_the_feature() {
    let mut f = good_features();
    // Metres of a national transverse Mercator grid, as a GIS export without reprojection gives.
    f[1] = feature(
        "\"id\": \"corvisk\"",
        &polygon("[[[1370000, 5090000], [1372000, 5090000], [1372000, 5092000], [1370000, 5092000], [1370000, 5090000]]]"),
    );
    let p = refused(&f);
    assert!(p.iter().any(|m| m.contains("feature 2 (id 'corvisk')") && m.contains("look projected")), "{p:#?}");
    assert!(p.iter().any(|m| m.contains("GeoJSON must be WGS84 longitude/latitude")), "{p:#?}");
}

#[test]
fn self_intersection_is_refused_naming_the_feature() {
    let mut f = good_features();
    f[2] =
        feature("\"id\": \"tamsquil\"", &polygon("[[[100.1, -44.3], [100.15, -44.25], [100.15, -44.3], [100.1, -44.22], [100.1, -44.3]]]"));
    let p = refused(&f);
    assert!(p.iter().any(|m| m.contains("feature 3 (id 'tamsquil')") && m.contains("crosses or touches itself near")), "{p:#?}");
}

#[test]
fn other_geometry_types_and_broken_json_are_refused() {
    let mut f = good_features();
    f[0] = feature("\"id\": \"skelvane\"", "{\"type\": \"LineString\", \"coordinates\": [[100, -44], [100.1, -44.1]]}");
    f[1] = feature("\"id\": \"corvisk\"", "null");
    let p = refused(&f);
    assert!(p.iter().any(|m| m.contains("feature 1 (id 'skelvane')") && m.contains("is a LineString")), "{p:#?}");
    assert!(p.iter().any(|m| m.contains("feature 2 (id 'corvisk')") && m.contains("has no geometry")), "{p:#?}");

    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("broken.geojson");
    std::fs::write(&path, "{\"type\": \"FeatureCollection\",\n\"features\": [\n{\"type\": \"Feature\" \"properties\": {}}]}").unwrap();
    let p = read_boundaries(&path, "id", &IDS).unwrap_err();
    check_exit_code_2(&p);
    assert_eq!(p.len(), 1);
    assert_eq!(p[0].row, Some(3));
    assert!(p[0].to_string().contains("is not valid JSON"), "{}", p[0]);
    // A missing file is refused too (as invalid input, naming it).
    let p = read_boundaries(&dir.path().join("nope.geojson"), "id", &IDS).unwrap_err();
    assert!(p[0].to_string().contains("nope.geojson"));
}

#[test]
fn every_problem_in_the_file_is_listed_together() {
    let f = vec![
        feature("\"id\": \"skelvane\"", &polygon("[[[100.0, -44.3], [100.05, -44.3], [100.05, -44.25], [100.0, -44.25]]]")),
        feature("\"id\": \"Corvisk\"", &polygon(&square(100.05, -44.3))),
        feature("\"nom\": \"tamsquil\"", &polygon(&square(100.1, -44.3))),
    ];
    let p = refused(&f);
    // unclosed ring (skelvane), unknown id 'Corvisk', missing id, and the two catchments
    // without a feature (corvisk, tamsquil; skelvane's feature exists, its ring is the fault)
    assert_eq!(p.len(), 5, "{p:#?}");
    assert!(p[2].contains("has no property 'id' holding the catchment id (its properties: nom)"), "{p:#?}");
}

// ---------------------------------------------------------------------------
// A real run folder: results GeoJSON and maps
// ---------------------------------------------------------------------------

/// A run folder of the demo scenario, made once by the real binary.
fn demo_run() -> &'static Path {
    static RUN: OnceLock<PathBuf> = OnceLock::new();
    RUN.get_or_init(|| {
        let out = Path::new(env!("CARGO_TARGET_TMPDIR")).join("gis-demo-run");
        let _ = std::fs::remove_dir_all(&out);
        let o = Command::new(env!("CARGO_BIN_EXE_yieldshift"))
            .args([
                "run",
                root().join("demo-data/scenario.toml").to_str().unwrap(),
                "--out",
                out.to_str().unwrap(),
                "--quiet",
                "--figures",
                "none",
            ])
            .output()
            .expect("binary runs");
        assert!(o.status.success(), "{}{}", String::from_utf8_lossy(&o.stdout), String::from_utf8_lossy(&o.stderr));
        out
    })
}

/// `summary.csv` as text cells: (catchment, strategy) → column → cell (first row of each pair).
fn summary_cells(dir: &Path) -> HashMap<(String, String), HashMap<String, String>> {
    let mut r = csv::Reader::from_path(dir.join("summary.csv")).unwrap();
    let h: Vec<String> = r.headers().unwrap().iter().map(str::to_string).collect();
    let mut out = HashMap::new();
    for rec in r.records() {
        let rec = rec.unwrap();
        let row: HashMap<String, String> = h.iter().cloned().zip(rec.iter().map(str::to_string)).collect();
        out.entry((row["catchment"].clone(), row["strategy"].clone())).or_insert(row);
    }
    out
}

/// The text of property `key` in a feature's line of the results file (the
/// writer puts one feature per line): a JSON number or `null`.
fn raw_property<'a>(line: &'a str, key: &str) -> &'a str {
    let pat = format!("\"{key}\":");
    let start = line.find(&pat).unwrap_or_else(|| panic!("no property {key}")) + pat.len();
    let rest = &line[start..];
    &rest[..rest.find([',', '}']).unwrap()]
}

/// A property equals a CSV cell: empty ↔ null, otherwise the same number. The
/// number is read from the file's text with std's correctly rounded parser
/// (serde_json's default float parsing may be one unit in the last place off,
/// which says nothing about the file).
fn assert_same(line: &str, key: &str, cell: &str, what: &str) {
    let text = raw_property(line, key);
    if cell.is_empty() {
        assert_eq!(text, "null", "{what}: expected null for an empty cell");
    } else {
        let got: f64 = text.parse().unwrap_or_else(|_| panic!("{what}: '{text}' is not a number"));
        assert_eq!(got, cell.parse::<f64>().unwrap(), "{what}: '{text}' vs summary.csv '{cell}'");
    }
}

#[test]
fn results_geojson_round_trip_keeps_every_feature_and_equals_summary_csv() {
    let dir = demo_run();
    let b = demo_boundaries();
    let path = write_results_geojson(dir, &b).unwrap();
    assert_eq!(path, dir.join("catchments.geojson"));
    let text = std::fs::read_to_string(&path).unwrap();

    // It parses as RFC 7946 GeoJSON with the geojson crate.
    let fc: geojson::FeatureCollection = text.parse().unwrap();
    assert_eq!(fc.features.len(), b.len());
    let raw: serde_json::Value = serde_json::from_str(&text).unwrap();
    assert!(raw.get("crs").is_none(), "RFC 7946 has no crs member");

    let cells = summary_cells(dir);
    let strategies = ["contain-early", "best-value", "dense-first"];
    let lines: Vec<&str> = text.lines().filter(|l| l.starts_with("{\"type\":\"Feature\"")).collect();
    assert_eq!(lines.len(), b.len());
    let mut ids = Vec::new();
    for ((f, input), line) in fc.features.iter().zip(b.iter()).zip(&lines) {
        let props = f.properties.as_ref().unwrap();
        let id = props["id"].as_str().unwrap();
        assert_eq!(id, input.id(), "file order kept");
        ids.push(id.to_string());
        // Input properties kept.
        assert_eq!(props["name"], input.properties()["name"]);
        let nc = &cells[&(id.to_string(), "no-control".to_string())];
        for col in [
            "yield_change_10y_pct",
            "yield_change_20y_pct",
            "yield_change_50y_pct",
            "yield_change_horizon_pct",
            "change_vs_uninvaded_horizon_pct",
            "water_lost_horizon_m3_per_yr",
            "nitrate_n_first_exceedance_year",
            "total_p_first_exceedance_year",
        ] {
            assert_same(line, col, &nc[col], &format!("{id} {col}"));
        }
        assert_same(line, "area_table_ha", &nc["area_ha"], "area_ha");
        assert!((props["area_geodesic_ha"].as_f64().unwrap() - input.area_ha()).abs() < 0.001);
        assert_eq!(props["horizon_year"], 2087);
        for s in strategies {
            let row = &cells[&(id.to_string(), s.to_string())];
            let suffix = s.replace('-', "_");
            for col in ["cost_per_m3", "levelised_cost_per_m3", "water_saved_m3", "total_cost", "yield_change_horizon_pct"] {
                assert_same(line, &format!("{col}_{suffix}"), &row[col], &format!("{id} {s} {col}"));
            }
        }
        // Exterior rings counter-clockwise, holes clockwise (RFC 7946 §3.1.6), same area as the input.
        let g: geo::Geometry<f64> = f.geometry.clone().unwrap().try_into().unwrap();
        let mp: MultiPolygon<f64> = match g {
            geo::Geometry::Polygon(p) => MultiPolygon(vec![p]),
            geo::Geometry::MultiPolygon(m) => m,
            other => panic!("{other:?}"),
        };
        assert_eq!(mp.0.len(), input.geometry().0.len());
        for p in &mp.0 {
            assert!(p.exterior().is_ccw());
            assert!(p.interiors().iter().all(|h| h.is_cw()));
        }
        assert!((geodesic_area_ha(&mp) - input.area_ha()).abs() < 1e-6 * input.area_ha());
    }
    let mut want: Vec<String> = demo_table().into_iter().map(|(i, _)| i).collect();
    want.sort();
    ids.sort();
    assert_eq!(ids, want, "every catchment id kept");
    // At least one guideline year is a number and one is null in the demo, so both paths are checked.
    let years: Vec<&serde_json::Value> =
        fc.features.iter().map(|f| &f.properties.as_ref().unwrap()["total_p_first_exceedance_year"]).collect();
    assert!(years.iter().any(|v| v.is_i64()) && years.iter().any(|v| v.is_null()), "{years:?}");

    // With the demo's ensemble, percentiles come from ensemble.csv.
    let mut r = csv::Reader::from_path(dir.join("ensemble.csv")).unwrap();
    let h: Vec<String> = r.headers().unwrap().iter().map(str::to_string).collect();
    let col = |n: &str| h.iter().position(|x| x == n).unwrap();
    let row = r
        .records()
        .map(|x| x.unwrap())
        .find(|x| {
            &x[col("catchment")] == "corvisk"
                && &x[col("scope")] == "local"
                && &x[col("strategy")] == "no-control"
                && &x[col("year")] == "2087"
                && &x[col("variable")] == "yield_change_10yr_mean_pct"
        })
        .unwrap();
    let corvisk = lines.iter().find(|l| l.contains("\"id\":\"corvisk\"")).unwrap();
    assert_same(corvisk, "yield_change_horizon_pct_p50", &row[col("p50")], "corvisk p50");
    assert_same(corvisk, "yield_change_horizon_pct_p5", &row[col("p5")], "corvisk p5");
    assert_same(corvisk, "yield_change_horizon_pct_p95", &row[col("p95")], "corvisk p95");

    // The results file reads back as boundaries, without the results it carried.
    let ids: Vec<&str> = want.iter().map(String::as_str).collect();
    let again = read_boundaries(&path, "id", &ids).unwrap();
    assert_eq!(again.len(), b.len());
    for f in again.iter() {
        assert!(!f.properties().contains_key("yield_change_20y_pct"));
        assert!(f.properties().contains_key("name"));
        assert!((f.area_ha() - b.get(f.id()).unwrap().area_ha()).abs() < 1e-6 * f.area_ha());
    }
}

fn png_size_and_colours(path: &Path) -> ((u32, u32), usize) {
    let decoder = png::Decoder::new(std::fs::File::open(path).unwrap());
    let mut reader = decoder.read_info().unwrap();
    let mut buf = vec![0; reader.output_buffer_size()];
    let info = reader.next_frame(&mut buf).unwrap();
    let mut colours = std::collections::HashSet::new();
    for px in buf[..info.buffer_size()].chunks(info.color_type.samples()) {
        colours.insert(px.to_vec());
    }
    ((info.width, info.height), colours.len())
}

#[test]
fn maps_are_drawn_for_no_control_and_every_strategy() {
    let dir = demo_run();
    let b = demo_boundaries();
    let n = draw_maps(dir, &b, yieldshift::plot::Formats::default()).unwrap();
    // year 20 and horizon (no control) + one per demo strategy
    assert_eq!(n, 5);
    for stem in [
        "map_yield_change_20y",
        "map_yield_change_horizon",
        "map_yield_change_horizon_contain-early",
        "map_yield_change_horizon_best-value",
        "map_yield_change_horizon_dense-first",
    ] {
        let png = dir.join("figures").join(format!("{stem}.png"));
        let (size, colours) = png_size_and_colours(&png);
        assert_eq!(size, yieldshift::plot::SIZE, "{stem}");
        assert!(colours > 20, "{stem}: {colours} colours, the map looks empty");
        let svg = std::fs::read_to_string(dir.join("figures").join(format!("{stem}.svg"))).unwrap();
        assert!(svg.contains("<polygon"), "{stem}");
        for text in ["Yield change vs baseline (%)", " km", "Projection: equirectangular", "flows into", "Skelvane Creek", "Corvisk Water"]
        {
            assert!(svg.contains(text), "{stem}.svg lacks '{text}'");
        }
    }
}

// ---------------------------------------------------------------------------
// Random input never panics
// ---------------------------------------------------------------------------

mod random_input {
    use super::*;
    use proptest::prelude::*;

    /// Small integer grid coordinates make crossings, touches, spikes and
    /// collinear edges common; a few far-out values test the range checks.
    fn coord() -> impl Strategy<Value = f64> {
        prop_oneof![
            8 => (0i32..6).prop_map(|v| 100.0 + v as f64 * 0.01),
            1 => Just(1_370_000.0),
            1 => (-200i32..200).prop_map(f64::from),
        ]
    }

    fn ring() -> impl Strategy<Value = Vec<(f64, f64)>> {
        (prop::collection::vec((coord(), coord().prop_map(|v| v - 214.3)), 0..9), any::<bool>()).prop_map(|(mut pts, close)| {
            if close && !pts.is_empty() {
                pts.push(pts[0]);
            }
            pts
        })
    }

    fn ring_json(r: &[(f64, f64)]) -> String {
        format!("[{}]", r.iter().map(|(x, y)| format!("[{x}, {y}]")).collect::<Vec<_>>().join(", "))
    }

    proptest! {
        #![proptest_config(ProptestConfig { cases: 1000, .. ProptestConfig::default() })]

        #[test]
        fn random_polygons_are_read_or_refused_never_panic(
            parts in prop::collection::vec(prop::collection::vec(ring(), 1..3), 1..3),
            multi in any::<bool>(),
            id in prop::sample::select(vec!["skelvane", "corvisk", "tamsquil", "other", ""]),
        ) {
            let polys: Vec<String> = parts.iter().map(|rings| format!("[{}]", rings.iter().map(|r| ring_json(r)).collect::<Vec<_>>().join(", "))).collect();
            let geometry = if multi {
                format!("{{\"type\": \"MultiPolygon\", \"coordinates\": [{}]}}", polys.join(", "))
            } else {
                polygon(&polys[0])
            };
            let mut f = good_features();
            f[0] = feature(&format!("\"id\": \"{id}\""), &geometry);
            let dir = tempfile::tempdir().unwrap();
            let path = dir.path().join("r.geojson");
            std::fs::write(&path, format!("{{\"type\": \"FeatureCollection\", \"features\": [{}]}}", f.join(","))).unwrap();
            match read_boundaries(&path, "id", &IDS) {
                Ok(b) => {
                    // Whatever is accepted has a finite, positive area and is valid by
                    // the geo crate's own OGC simple-features checks (an independent oracle).
                    for g in b.iter() {
                        prop_assert!(g.area_ha().is_finite() && g.area_ha() > 0.0);
                        prop_assert!(geo::Validation::is_valid(g.geometry()), "{:?}", geo::Validation::validation_errors(g.geometry()));
                    }
                }
                Err(p) => {
                    prop_assert!(!p.is_empty());
                    prop_assert!(p.iter().all(|x| x.file.as_deref() == Some(path.as_path())));
                }
            }
        }

        #[test]
        fn mutated_files_never_panic(cut in 0usize..17_000, insert in prop::sample::select(vec!["", "]", "}", ",", "\"", "null", "[0,0]", "1e999", "\u{00e9}"])) {
            let text = std::fs::read_to_string(root().join("demo-data/catchments.geojson")).unwrap();
            let mut bytes = text.into_bytes();
            let at = cut.min(bytes.len());
            bytes.splice(at..at, insert.bytes());
            let dir = tempfile::tempdir().unwrap();
            let path = dir.path().join("m.geojson");
            std::fs::write(&path, &bytes).unwrap();
            let ids = ["skelvane", "fennigrue", "tamsquil", "corvisk", "wendlescar", "quessendale-lower"];
            let _ = read_boundaries(&path, "id", &ids);
        }
    }
}

/// A short run with no strategies and no ensemble: a horizon of 10 years.
fn short_run() -> &'static Path {
    static RUN: OnceLock<PathBuf> = OnceLock::new();
    RUN.get_or_init(|| {
        let base = Path::new(env!("CARGO_TARGET_TMPDIR")).join("gis-short-run");
        let _ = std::fs::remove_dir_all(&base);
        std::fs::create_dir_all(&base).unwrap();
        for f in ["catchments.csv", "climate.csv", "catchments.geojson"] {
            std::fs::copy(root().join("demo-data").join(f), base.join(f)).unwrap();
        }
        let demo = std::fs::read_to_string(root().join("demo-data/scenario.toml")).unwrap();
        let mut text = String::new();
        let mut skip = false;
        for line in demo.lines() {
            if line.starts_with("# ---- Control programmes") {
                break;
            }
            if line.starts_with('[') {
                skip = line.trim() == "[ensemble]";
            }
            if !skip {
                text.push_str(&line.replace("horizon_years = 60", "horizon_years = 10"));
                text.push('\n');
            }
        }
        assert!(text.contains("horizon_years = 10") && !text.contains("[ensemble]") && !text.contains("[[strategy]]"));
        std::fs::write(base.join("scenario.toml"), text).unwrap();
        let out = base.join("out");
        let o = Command::new(env!("CARGO_BIN_EXE_yieldshift"))
            .args(["run", base.join("scenario.toml").to_str().unwrap(), "--out", out.to_str().unwrap(), "--quiet", "--figures", "none"])
            .output()
            .expect("binary runs");
        assert!(o.status.success(), "{}{}", String::from_utf8_lossy(&o.stdout), String::from_utf8_lossy(&o.stderr));
        out
    })
}

#[test]
fn a_run_without_strategies_or_year_20_writes_nulls_and_one_map() {
    let dir = short_run();
    let b = demo_boundaries();
    let path = write_results_geojson(dir, &b).unwrap();
    let text = std::fs::read_to_string(&path).unwrap();
    let cells = summary_cells(dir);
    for line in text.lines().filter(|l| l.starts_with("{\"type\":\"Feature\"")) {
        let id = raw_property(line, "id").trim_matches('"').to_string();
        let nc = &cells[&(id.clone(), "no-control".to_string())];
        // Past a 10-year horizon, the 20- and 50-year changes are empty cells and null here.
        assert_eq!(nc["yield_change_20y_pct"], "");
        assert_same(line, "yield_change_20y_pct", "", &id);
        assert_same(line, "yield_change_50y_pct", "", &id);
        assert_same(line, "yield_change_10y_pct", &nc["yield_change_10y_pct"], &id);
        assert_same(line, "yield_change_horizon_pct", &nc["yield_change_horizon_pct"], &id);
        assert!(!line.contains("cost_per_m3_"), "no strategy properties without strategies");
        assert!(!line.contains("_p50"), "no percentiles without an ensemble");
    }
    let n = draw_maps(dir, &b, yieldshift::plot::Formats { png: true, svg: false }).unwrap();
    assert_eq!(n, 1, "only the horizon map: the horizon does not reach year 20 and there are no strategies");
    assert!(dir.join("figures/map_yield_change_horizon.png").exists());
    assert!(!dir.join("figures/map_yield_change_horizon.svg").exists());
    assert!(!dir.join("figures/map_yield_change_20y.png").exists());
}

#[test]
fn results_need_the_run_folder_files() {
    let dir = tempfile::tempdir().unwrap();
    let b = demo_boundaries();
    let e = write_results_geojson(dir.path(), &b).unwrap_err();
    assert!(e.to_string().contains("summary.csv"), "{e}");
    // A summary from another basin is refused, not written with gaps.
    std::fs::copy(short_run().join("summary.csv"), dir.path().join("summary.csv")).unwrap();
    std::fs::copy(short_run().join("run_info.json"), dir.path().join("run_info.json")).unwrap();
    let text = std::fs::read_to_string(dir.path().join("summary.csv")).unwrap().replace("skelvane,", "other,");
    std::fs::write(dir.path().join("summary.csv"), text).unwrap();
    let e = write_results_geojson(dir.path(), &b).unwrap_err();
    assert!(e.to_string().contains("no no-control row for catchment 'skelvane'"), "{e}");
}
