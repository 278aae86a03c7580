//! The locally scaled projection used by the maps: longitude/latitude to
//! kilometres east and north of the map's centre.
//!
//! # Formula
//!
//! An equirectangular projection about the centre `(λ0, φ0)` of the map, scaled
//! with the WGS84 ellipsoid's radii of curvature at `φ0`:
//!
//! `x = N(φ0) · cos φ0 · (λ − λ0)`,  `y = M(φ0) · (φ − φ0)`  (angles in radians),
//!
//! `M(φ) = a (1 − e²) / (1 − e² sin² φ)^(3/2)`,  `N(φ) = a / (1 − e² sin² φ)^(1/2)`,
//!
//! that is, longitude scaled by the cosine of the middle latitude, with the
//! east–west and north–south kilometre lengths of the ellipsoid at the centre
//! (the radii of curvature `M` and `N` and the equidistant cylindrical
//! projection are as in Snyder 1987).
//!
//! # Symbols
//!
//! * `λ, φ`: longitude and latitude; `λ0, φ0`: the middle of the map's
//!   longitude and latitude ranges.
//! * `a` = 6378.137 km, `e² = f (2 − f)`, `f` = 1/298.257 223 563 (WGS84).
//! * `M`: meridional radius of curvature; `N`: prime-vertical radius (km).
//!
//! # Assumptions
//!
//! Scale is true at the centre in every direction and true along every meridian
//! to within the change of `M` with latitude; east–west scale off the centre
//! parallel varies as `cos φ / cos φ0`: under 0.2% per 10 km of north–south
//! distance at 45°, so areas and shapes of catchment-sized maps are not visibly
//! distorted, and a scale bar is good to that accuracy. Not for maps spanning
//! many degrees of latitude or crossing the antimeridian (the reader refuses
//! rings that do).
//!
//! # References
//!
//! * Snyder, J. P. (1987). *Map Projections — A Working Manual*. U.S. Geological
//!   Survey Professional Paper 1395. <https://doi.org/10.3133/pp1395>
//! * National Imagery and Mapping Agency (2000). *Department of Defense World
//!   Geodetic System 1984*, TR8350.2, 3rd edition.

/// WGS84 semi-major axis, km.
pub const WGS84_A_KM: f64 = 6378.137;
/// WGS84 flattening.
pub const WGS84_F: f64 = 1.0 / 298.257_223_563;

/// Equirectangular projection about a centre, in kilometres.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LocalProjection {
    lon0_deg: f64,
    lat0_deg: f64,
    km_per_deg_lon: f64,
    km_per_deg_lat: f64,
}

impl LocalProjection {
    /// The projection about `(lon0_deg, lat0_deg)`.
    pub fn new(lon0_deg: f64, lat0_deg: f64) -> LocalProjection {
        let e2 = WGS84_F * (2.0 - WGS84_F);
        let phi = lat0_deg.to_radians();
        let w = 1.0 - e2 * phi.sin().powi(2);
        let m = WGS84_A_KM * (1.0 - e2) / w.powf(1.5);
        let n = WGS84_A_KM / w.sqrt();
        LocalProjection {
            lon0_deg,
            lat0_deg,
            km_per_deg_lon: n * phi.cos() * std::f64::consts::PI / 180.0,
            km_per_deg_lat: m * std::f64::consts::PI / 180.0,
        }
    }

    /// The projection about the middle of a longitude/latitude box.
    pub fn for_bounds(min_lon: f64, max_lon: f64, min_lat: f64, max_lat: f64) -> LocalProjection {
        LocalProjection::new((min_lon + max_lon) / 2.0, (min_lat + max_lat) / 2.0)
    }

    /// `(x, y)` in km east and north of the centre.
    pub fn project(&self, lon_deg: f64, lat_deg: f64) -> (f64, f64) {
        ((lon_deg - self.lon0_deg) * self.km_per_deg_lon, (lat_deg - self.lat0_deg) * self.km_per_deg_lat)
    }

    /// Centre longitude, degrees.
    pub fn lon0_deg(&self) -> f64 {
        self.lon0_deg
    }

    /// Centre latitude, degrees.
    pub fn lat0_deg(&self) -> f64 {
        self.lat0_deg
    }

    /// Kilometres per degree of longitude at the centre.
    pub fn km_per_deg_lon(&self) -> f64 {
        self.km_per_deg_lon
    }

    /// Kilometres per degree of latitude at the centre.
    pub fn km_per_deg_lat(&self) -> f64 {
        self.km_per_deg_lat
    }

    /// What the map says about its projection.
    pub fn describe(&self) -> String {
        format!(
            "Projection: equirectangular about {} {} (longitude × cos {:.2}°), WGS84; scale true at the centre",
            fmt_lat(self.lat0_deg),
            fmt_lon(self.lon0_deg),
            self.lat0_deg.abs()
        )
    }
}

/// `44.31° S` style latitude.
pub fn fmt_lat(lat: f64) -> String {
    format!("{:.2}° {}", lat.abs(), if lat < 0.0 { 'S' } else { 'N' })
}

/// `99.99° E` style longitude.
pub fn fmt_lon(lon: f64) -> String {
    format!("{:.2}° {}", lon.abs(), if lon < 0.0 { 'W' } else { 'E' })
}

#[cfg(test)]
mod tests {
    use super::*;
    use geo::{Distance, Geodesic, Point};

    #[test]
    fn short_distances_match_the_geodesic_near_the_centre() {
        // 5 km east and 5 km north of the centre, measured on the ellipsoid by
        // Karney's geodesic (geo's `Geodesic` metric): the projection is locally true.
        let p = LocalProjection::new(100.0, -44.3);
        let east = (100.0 + 5.0 / p.km_per_deg_lon(), -44.3);
        let north = (100.0, -44.3 + 5.0 / p.km_per_deg_lat());
        for (lon, lat) in [east, north] {
            let d_km = Geodesic.distance(Point::new(100.0, -44.3), Point::new(lon, lat)) / 1000.0;
            assert!((d_km - 5.0).abs() < 5.0 * 2e-4, "{d_km}");
            let (x, y) = p.project(lon, lat);
            assert!(((x * x + y * y).sqrt() - 5.0).abs() < 1e-9);
        }
    }

    #[test]
    fn centre_projects_to_origin() {
        let p = LocalProjection::for_bounds(99.8, 100.2, -44.5, -44.1);
        assert_eq!(p.project(100.0, -44.3), (0.0, 0.0));
        assert!(p.describe().contains("44.30° S"));
    }
}
