//! Map figures of a run folder: choropleths of water-yield change by catchment.
//!
//! Maps drawn into `figures/` (PNG and/or SVG):
//!
//! * `map_yield_change_20y`: change against the baseline at year 20, no control
//!   (when the horizon reaches year 20);
//! * `map_yield_change_horizon`: the same at the horizon;
//! * `map_yield_change_horizon_<strategy>`: at the horizon under each control
//!   programme.
//!
//! All maps of a run share one set of class breaks, so a colour means the same
//! change on every map. Values are read from `summary.csv`; the drainage
//! network (`flows_to`) from the copy of the catchment table in `inputs/`.

use super::projection::LocalProjection;
use crate::error::{Error, Result};
use crate::input::gis::Boundaries;
use crate::output::geojson::Summary;
use crate::plot::map::{ChoroplethMap, Classes, MapArea, MapPolygon};
use crate::plot::{save_figure, Formats};
use crate::schema::columns::summary;
use crate::schema::numbers::{readable_signed, Thousands};
use crate::schema::run_info::RunInfo;
use crate::schema::{FIGURES_DIR, INPUTS_DIR, NO_CONTROL};
use geo::{Area, Centroid, Contains, InteriorPoint, LineString, Point, Polygon};
use std::path::Path;

/// Largest number of catchments whose maps carry labels and flow arrows.
pub const LABEL_LIMIT: usize = 60;

/// Target number of classes on the maps.
const TARGET_CLASSES: usize = 6;

/// `(from, to)` catchment ids of the drainage network, from the run's copy of
/// the catchment table.
fn read_flows(run_dir: &Path, info: &RunInfo) -> Result<Vec<(String, String)>> {
    let table = &info.catchment_table;
    let name = Path::new(table).file_name().ok_or_else(|| Error::Other(format!("catchment table '{table}' has no file name")))?;
    let path = run_dir.join(INPUTS_DIR).join(name);
    let t = crate::input::table::read_table(&path).map_err(Error::Invalid)?;
    let (Some(_), Some(_)) = (t.col("id"), t.col("flows_to")) else { return Ok(Vec::new()) };
    Ok(t.rows
        .iter()
        .filter_map(|(_, rec)| {
            let to = t.text(rec, "flows_to").trim();
            (!to.is_empty()).then(|| (t.text(rec, "id").trim().to_string(), to.to_string()))
        })
        .collect())
}

/// A boundary in map kilometres and its label anchor.
type Projected = (Vec<MapPolygon>, (f64, f64));

/// Projected polygons and the label anchor of each boundary.
fn project(b: &Boundaries) -> (LocalProjection, Vec<Projected>) {
    let mut bb = (f64::INFINITY, f64::INFINITY, f64::NEG_INFINITY, f64::NEG_INFINITY);
    for f in b.iter() {
        for p in &f.geometry().0 {
            for c in &p.exterior().0 {
                bb = (bb.0.min(c.x), bb.1.min(c.y), bb.2.max(c.x), bb.3.max(c.y));
            }
        }
    }
    let proj = LocalProjection::for_bounds(bb.0, bb.2, bb.1, bb.3);
    let ring = |ls: &LineString<f64>| ls.0.iter().map(|c| proj.project(c.x, c.y)).collect::<Vec<_>>();
    let out = b
        .iter()
        .map(|f| {
            let polys: Vec<MapPolygon> = f
                .geometry()
                .0
                .iter()
                .map(|p| MapPolygon { exterior: ring(p.exterior()), holes: p.interiors().iter().map(ring).collect() })
                .collect();
            // Anchor: centroid of the largest part when it lies inside it, else a point inside.
            let km: Vec<Polygon<f64>> = polys
                .iter()
                .map(|m| Polygon::new(LineString::from(m.exterior.clone()), m.holes.iter().map(|h| LineString::from(h.clone())).collect()))
                .collect();
            let largest = km.iter().max_by(|a, b| a.unsigned_area().total_cmp(&b.unsigned_area()));
            let anchor = largest
                .and_then(|p| p.centroid().filter(|c| p.contains(c)).or_else(|| p.interior_point()))
                .map(|c: Point<f64>| (c.x(), c.y()))
                .unwrap_or((0.0, 0.0));
            (polys, anchor)
        })
        .collect();
    (proj, out)
}

/// A change in percent for a label: sign always shown, two decimals below 1 %,
/// never thousands-grouped (as the legend).
fn percent_text(x: f64) -> String {
    let d = if x != 0.0 && x.abs() < 0.95 { 2 } else { 1 };
    format!("{} %", readable_signed(x, d, Thousands::Plain).unwrap_or_default())
}

/// One map to draw.
struct MapSpec {
    stem: String,
    title: String,
    strategy: String,
    column: String,
}

/// Draws the run's maps into `run_dir/figures/` and returns how many were
/// drawn. Needs `summary.csv`, `run_info.json` and the catchment table copied
/// into `inputs/`.
pub fn draw_maps(run_dir: &Path, b: &Boundaries, formats: Formats) -> Result<usize> {
    if b.is_empty() || !(formats.png || formats.svg) {
        return Ok(0);
    }
    let summary = Summary::read(run_dir)?;
    let info = RunInfo::read(run_dir)?;
    let flows = read_flows(run_dir, &info)?;
    let figdir = run_dir.join(FIGURES_DIR);
    std::fs::create_dir_all(&figdir).map_err(|e| Error::io(format!("creating {}", figdir.display()), e))?;

    let mut specs = Vec::new();
    let horizon = info.end_year();
    let year20 = summary::yield_change_at(20);
    if summary.has(&year20) && info.horizon_years >= 20 {
        specs.push(MapSpec {
            stem: "map_yield_change_20y".into(),
            title: format!("Water-yield change by {} (year 20), no control", info.start_year + 20),
            strategy: NO_CONTROL.into(),
            column: year20.clone(),
        });
    }
    specs.push(MapSpec {
        stem: "map_yield_change_horizon".into(),
        title: format!("Water-yield change by {horizon} (year {}), no control", info.horizon_years),
        strategy: NO_CONTROL.into(),
        column: summary::YIELD_CHANGE_HORIZON_PCT.into(),
    });
    for s in summary.strategies.iter().filter(|s| s.as_str() != NO_CONTROL) {
        specs.push(MapSpec {
            stem: format!("map_yield_change_horizon_{}", crate::schema::file_stem(s)),
            title: format!("Water-yield change by {horizon} (year {}) under {s}", info.horizon_years),
            strategy: s.clone(),
            column: summary::YIELD_CHANGE_HORIZON_PCT.into(),
        });
    }

    // Values of every map, then one set of classes for all of them.
    let mut values: Vec<Vec<Option<f64>>> = Vec::with_capacity(specs.len());
    for spec in &specs {
        let v = b.iter().map(|f| summary.number(f.id(), &spec.strategy, &spec.column)).collect::<Result<Vec<_>>>()?;
        values.push(v);
    }
    let all: Vec<f64> = values.iter().flatten().flatten().copied().collect();
    let classes = Classes::diverging(&all, TARGET_CLASSES);

    let (proj, shapes) = project(b);
    let index: std::collections::HashMap<&str, usize> = b.iter().enumerate().map(|(i, f)| (f.id(), i)).collect();
    let arrows: Vec<(usize, usize)> =
        flows.iter().filter_map(|(from, to)| Some((*index.get(from.as_str())?, *index.get(to.as_str())?))).collect();
    let show_labels = b.len() <= LABEL_LIMIT;
    let names: Vec<String> =
        b.iter().map(|f| summary.cell(f.id(), NO_CONTROL, summary::NAME).filter(|n| !n.is_empty()).unwrap_or(f.id()).to_string()).collect();

    let n_maps = values.iter().filter(|v| v.iter().any(Option::is_some)).count();
    let mut n = 0;
    for (spec, vals) in specs.iter().zip(&values) {
        if vals.iter().all(Option::is_none) {
            continue;
        }
        let areas: Vec<MapArea> = shapes
            .iter()
            .zip(vals)
            .zip(&names)
            .map(|(((polys, anchor), v), name)| MapArea {
                label: name.clone(),
                value: *v,
                value_text: v.map(percent_text).unwrap_or_else(|| "no value".into()),
                polygons: polys.clone(),
                anchor: *anchor,
            })
            .collect();
        let mut notes =
            vec!["Yield change: water yield against the baseline (today's cover held fixed), same climate; negative = less water."
                .to_string()];
        if n_maps > 1 {
            notes.push("Classes are the same on every yield map of this run.".to_string());
        }
        if !show_labels {
            notes.push(format!("Labels and flow arrows left out: {} catchments.", b.len()));
        }
        notes.push(proj.describe() + ".");
        notes.push("Boundaries: ".to_string() + &b.path().file_name().map(|f| f.to_string_lossy().into_owned()).unwrap_or_default() + ".");
        let map = ChoroplethMap {
            title: spec.title.clone(),
            subtitle: info.title.clone(),
            legend_title: "Yield change vs baseline (%)".into(),
            classes: classes.clone(),
            areas,
            arrows: arrows.clone(),
            show_labels,
            notes,
        };
        save_figure(&map, &figdir.join(&spec.stem), formats)?;
        n += 1;
    }
    Ok(n)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::plot::flow_arrows::{flow_arrow, inside_area, KmBox};

    /// The demo's boundaries projected as the maps project them, with ids, and
    /// its drainage links as indices.
    fn demo() -> (Vec<String>, Vec<Projected>, Vec<(usize, usize)>) {
        let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("demo-data");
        let t = crate::input::table::read_table(&root.join("catchments.csv")).unwrap();
        let ids: Vec<String> = t.rows.iter().map(|(_, r)| t.text(r, "id").to_string()).collect();
        let id_refs: Vec<&str> = ids.iter().map(String::as_str).collect();
        let b = crate::input::gis::read_boundaries(&root.join("catchments.geojson"), "id", &id_refs).unwrap();
        let order: Vec<String> = b.iter().map(|f| f.id().to_string()).collect();
        let at = |id: &str| order.iter().position(|o| o == id).unwrap();
        let links = t
            .rows
            .iter()
            .filter(|(_, r)| !t.text(r, "flows_to").trim().is_empty())
            .map(|(_, r)| (at(t.text(r, "id")), at(t.text(r, "flows_to").trim())))
            .collect();
        (order, project(&b).1, links)
    }

    /// Which areas a point lies in.
    fn areas_at(p: (f64, f64), shapes: &[Projected]) -> Vec<usize> {
        shapes.iter().enumerate().filter(|(_, (polys, _))| inside_area(p, polys)).map(|(i, _)| i).collect()
    }

    /// `from → to` is readable when the path starts in `from`, ends in `to`,
    /// passes from one to the other once, and touches no other area; returns
    /// the other areas it enters.
    fn trespasses(a: (f64, f64), b: (f64, f64), from: usize, to: usize, shapes: &[Projected]) -> Vec<usize> {
        let mut others = Vec::new();
        let mut reached_to = false;
        for k in 0..=400 {
            let t = k as f64 / 400.0;
            let p = (a.0 + t * (b.0 - a.0), a.1 + t * (b.1 - a.1));
            let here = areas_at(p, shapes);
            others.extend(here.iter().copied().filter(|&i| i != from && i != to));
            if here.contains(&to) {
                reached_to = true;
            }
            // Once in the downstream area, never back in the upstream one.
            assert!(!(reached_to && here.contains(&from)), "{from} → {to} turns back at {p:?}");
        }
        others.sort();
        others.dedup();
        others
    }

    /// Regression (issue 14): flow arrows drawn label to label crossed other
    /// catchments and their labels. Each arrow now crosses the boundary its two
    /// catchments share and stays within the two.
    #[test]
    fn demo_flow_arrows_stay_within_their_two_catchments() {
        let (ids, shapes, links) = demo();
        assert_eq!(links.len(), 4, "the demo's four drainage links");
        // The old route, anchor to anchor, does cross another catchment: the
        // check below can fail.
        let crossed: usize = links.iter().map(|&(f, t)| trespasses(shapes[f].1, shapes[t].1, f, t, &shapes).len()).sum();
        assert!(crossed > 0, "anchor-to-anchor arrows would cross no other catchment");
        // Label boxes (about what the map draws) at each anchor, to be avoided.
        let labels: Vec<KmBox> = shapes.iter().map(|(_, (x, y))| (x - 1.6, y - 0.45, x + 1.6, y + 0.45)).collect();
        for half_km in [0.6, 1.2] {
            for avoid in [&[][..], &labels[..]] {
                for &(f, t) in &links {
                    let (tail, head) = flow_arrow(&shapes[f].0, &shapes[t].0, half_km, avoid)
                        .unwrap_or_else(|| panic!("no arrow {} → {}", ids[f], ids[t]));
                    assert_eq!(areas_at(tail, &shapes), vec![f], "{} → {}: tail {tail:?}", ids[f], ids[t]);
                    assert_eq!(areas_at(head, &shapes), vec![t], "{} → {}: head {head:?}", ids[f], ids[t]);
                    let others = trespasses(tail, head, f, t, &shapes);
                    assert!(others.is_empty(), "{} → {} crosses {:?}", ids[f], ids[t], others.iter().map(|&i| &ids[i]).collect::<Vec<_>>());
                    let len = ((head.0 - tail.0).powi(2) + (head.1 - tail.1).powi(2)).sqrt();
                    assert!(len > 0.5 * half_km && len <= 2.0 * half_km + 1e-9, "{} → {}: {len} km", ids[f], ids[t]);
                }
            }
        }
    }
}
