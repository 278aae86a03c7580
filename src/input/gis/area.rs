//! Geodesic area of catchment boundaries on the WGS84 ellipsoid, and the check
//! of those areas against the catchment table.
//!
//! # Formula
//!
//! The area of a polygon whose edges are geodesics on the ellipsoid is computed
//! with Karney's (2013) method for polygonal areas, as implemented by the
//! `geographiclib-rs` port that the `geo` crate uses (`geo::GeodesicArea`): for
//! each edge, the area between the geodesic and the equator follows from the
//! edge's end azimuths plus a series correction for the ellipsoid's
//! flattening (the order-6 series of geographiclib-rs, `GEODESIC_ORDER = 6`), on
//! the WGS84 ellipsoid (`a` = 6 378 137 m, `f` = 1/298.257 223 563). The tests
//! check it against geographiclib 2.1, Karney's own implementation
//! (`tests/fixtures/geodesic_area.csv`).
//!
//! For a catchment made of polygons `P_k`, each with exterior ring `E_k` and
//! holes `H_kj`,
//!
//! `A = Σ_k ( |S(E_k)| − Σ_j |S(H_kj)| ) / 10 000` ha,
//!
//! where `S(R)` is the signed area of ring `R` in m² (positive when traversed
//! counter-clockwise). Taking magnitudes ring by ring makes the result the same
//! whichever way the rings are wound; GeoJSON's right-hand rule is recommended
//! but not required of files (RFC 7946 §3.1.6: parsers should not reject rings
//! wound the other way).
//!
//! # Assumptions
//!
//! * Rings are smaller than half the earth (true of any catchment).
//! * Holes lie inside their exterior ring and parts do not overlap; the reader
//!   ([`crate::input::gis::read_boundaries`]) refuses files where they do not.
//! * Edges are geodesics. A GIS that treats edges as straight lines in
//!   longitude/latitude differs by far less than 0.01% at the vertex spacing of
//!   digitised catchment boundaries.
//!
//! # References
//!
//! * Karney, C. F. F. (2013). Algorithms for geodesics. *Journal of Geodesy*,
//!   87(1), 43–55. <https://doi.org/10.1007/s00190-012-0578-z>
//! * National Imagery and Mapping Agency (2000). *Department of Defense World
//!   Geodetic System 1984*, TR8350.2, 3rd edition (the WGS84 constants).
//! * Butler, H., et al. (2016). *The GeoJSON Format*, RFC 7946, IETF.

use geo::{GeodesicArea, MultiPolygon, Polygon};

/// Square metres per hectare.
const M2_PER_HA: f64 = 10_000.0;

/// Geodesic area of a catchment on the WGS84 ellipsoid, holes subtracted, ha.
/// Independent of ring orientation (see the module docs).
pub fn geodesic_area_ha(mp: &MultiPolygon<f64>) -> f64 {
    let ring_m2 = |ring: &geo::LineString<f64>| Polygon::new(ring.clone(), vec![]).geodesic_area_signed().abs();
    let m2: f64 = mp.0.iter().map(|p| ring_m2(p.exterior()) - p.interiors().iter().map(ring_m2).sum::<f64>()).sum();
    m2 / M2_PER_HA
}

/// A catchment whose geodesic area differs from the table's `area_ha` by more
/// than the tolerance.
#[derive(Debug, Clone, PartialEq)]
pub struct AreaMismatch {
    /// Catchment id.
    pub catchment: String,
    /// Area in the catchment table, ha.
    pub table_area_ha: f64,
    /// Geodesic area of the boundary, ha.
    pub geometry_area_ha: f64,
    /// `(geometry − table) / table`, a fraction (e.g. 0.08 = 8% larger).
    pub relative_difference: f64,
}

impl AreaMismatch {
    /// One-line warning text, e.g. for the command line.
    pub fn message(&self) -> String {
        format!(
            "catchment '{}': the boundary's geodesic area is {} ha but the table's area_ha is {} ha ({:+.1}%); \
             check the boundary or the table, or set area_from_geometry = true in [gis] to use the boundary's area",
            self.catchment,
            fmt_ha(self.geometry_area_ha),
            fmt_ha(self.table_area_ha),
            100.0 * self.relative_difference
        )
    }
}

/// Hectares for messages: whole hectares, tenths below 100 ha.
fn fmt_ha(v: f64) -> String {
    if v.abs() < 100.0 {
        format!("{v:.1}")
    } else {
        format!("{v:.0}")
    }
}

impl std::fmt::Display for AreaMismatch {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(&self.message())
    }
}

/// Catchments whose geodesic area differs from `table_area_ha` (pairs of
/// catchment id and table area, ha) by more than `tolerance` (a fraction of the
/// table's area, e.g. 0.05), in the order of `table_area_ha`. Catchments
/// without a boundary are skipped; a table area of zero or less always counts
/// as a mismatch when the boundary has an area.
pub fn area_mismatches(b: &crate::input::gis::Boundaries, table_area_ha: &[(String, f64)], tolerance: f64) -> Vec<AreaMismatch> {
    let mut out = Vec::new();
    for (id, table) in table_area_ha {
        let Some(boundary) = b.get(id) else { continue };
        let geom = boundary.area_ha();
        let rel = if *table > 0.0 {
            (geom - table) / table
        } else if geom > 0.0 {
            f64::INFINITY
        } else {
            0.0
        };
        if rel.abs() > tolerance {
            out.push(AreaMismatch { catchment: id.clone(), table_area_ha: *table, geometry_area_ha: geom, relative_difference: rel });
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use geo::{polygon, LineString};

    fn square(x0: f64, y0: f64, d: f64) -> LineString<f64> {
        LineString::from(vec![(x0, y0), (x0 + d, y0), (x0 + d, y0 + d), (x0, y0 + d), (x0, y0)])
    }

    #[test]
    fn orientation_does_not_change_the_area() {
        let ccw = MultiPolygon(vec![Polygon::new(square(100.0, -44.0, 0.1), vec![])]);
        let mut rev = square(100.0, -44.0, 0.1);
        rev.0.reverse();
        let cw = MultiPolygon(vec![Polygon::new(rev, vec![])]);
        let a = geodesic_area_ha(&ccw);
        assert!(a > 0.0);
        assert_eq!(a, geodesic_area_ha(&cw));
    }

    #[test]
    fn holes_are_subtracted_whatever_their_winding() {
        let outer = square(100.0, -44.0, 0.1);
        let hole = square(100.02, -43.98, 0.02);
        let mut hole_rev = hole.clone();
        hole_rev.0.reverse();
        let whole = geodesic_area_ha(&MultiPolygon(vec![Polygon::new(outer.clone(), vec![])]));
        let lake = geodesic_area_ha(&MultiPolygon(vec![Polygon::new(hole.clone(), vec![])]));
        for h in [hole, hole_rev] {
            let with_hole = geodesic_area_ha(&MultiPolygon(vec![Polygon::new(outer.clone(), vec![h])]));
            assert!((with_hole - (whole - lake)).abs() < 1e-9 * whole, "{with_hole} vs {}", whole - lake);
        }
    }

    #[test]
    fn parts_add_up() {
        let a = polygon![(x: 100.0, y: -44.0), (x: 100.05, y: -44.0), (x: 100.05, y: -43.95)];
        let b = polygon![(x: 100.2, y: -44.0), (x: 100.25, y: -44.0), (x: 100.25, y: -43.95)];
        let both = geodesic_area_ha(&MultiPolygon(vec![a.clone(), b.clone()]));
        let sum = geodesic_area_ha(&MultiPolygon(vec![a])) + geodesic_area_ha(&MultiPolygon(vec![b]));
        assert!((both - sum).abs() < 1e-9 * both);
    }
}
