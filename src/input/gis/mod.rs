//! Catchment boundaries in, results out: GeoJSON exchange with GIS and map figures.
//!
//! * [`read_boundaries`] reads an RFC 7946 FeatureCollection of catchment
//!   polygons (Polygon or MultiPolygon, holes allowed), matches each feature to
//!   a catchment of the table through one property (the *id property*), and
//!   refuses anything a GIS would choke on or that would silently give wrong
//!   areas: missing, unknown or repeated ids, catchments without a boundary,
//!   unclosed rings, rings that cross themselves or each other, holes outside
//!   their polygon, and coordinates that are not WGS84 longitude/latitude. Every
//!   problem in the file is reported at once, named by feature number, JSON path
//!   and id, with the line of the file where the feature starts.
//! * [`geodesic_area_ha`] measures each boundary on the WGS84 ellipsoid
//!   ([`area`]); [`area_mismatches`] compares it with the table's `area_ha`.
//! * [`write_results_geojson`] writes `catchments.geojson` into a run folder: the
//!   input geometry with the run's per-catchment results as properties, taken
//!   number for number from `summary.csv` (and `ensemble.csv` when present).
//! * [`draw_maps`] draws choropleth maps of yield change into `figures/`, in a
//!   locally scaled projection ([`projection`]).
//!
//! Property names, scenario keys and the maps are described in `docs/gis.md`.
//!
//! ```
//! use geo::{polygon, MultiPolygon};
//! // A 1/100° square at the equator is about 1.11 km × 1.11 km ≈ 123 ha.
//! let cell = MultiPolygon(vec![polygon![(x: 0.0, y: 0.0), (x: 0.01, y: 0.0), (x: 0.01, y: 0.01), (x: 0.0, y: 0.01)]]);
//! let ha = yieldshift::input::gis::geodesic_area_ha(&cell);
//! assert!((ha - 123.09).abs() < 0.01, "{ha}");
//! ```

pub mod area;
pub(crate) mod json_lines;
mod read;
mod validate;

pub use area::{area_mismatches, geodesic_area_ha, AreaMismatch};
pub use read::{read_boundaries, MAX_GEOJSON_BYTES};

use geo::MultiPolygon;
use std::collections::HashMap;
use std::path::{Path, PathBuf};

/// Default property holding the catchment id.
pub const DEFAULT_ID_PROPERTY: &str = "id";

/// Default tolerance of the area check: warn when the geodesic area differs
/// from the table's `area_ha` by more than this fraction (the scenario default
/// of `[gis] area_tolerance`, from the parameter table).
pub const DEFAULT_AREA_TOLERANCE: f64 = match crate::model::params::ParamId::AreaTolerance.default_value() {
    Some(v) => v,
    None => 0.0,
};

/// The boundary of one catchment, as read from the GeoJSON file.
#[derive(Debug, Clone)]
pub struct Boundary {
    id: String,
    geometry: MultiPolygon<f64>,
    multi: bool,
    properties: serde_json::Map<String, serde_json::Value>,
    feature_id: Option<serde_json::Value>,
    area_ha: f64,
    index: usize,
}

impl Boundary {
    /// The catchment id (the value of the id property).
    pub fn id(&self) -> &str {
        &self.id
    }

    /// The geometry: longitude/latitude in degrees (WGS84), every polygon with
    /// its holes. A GeoJSON Polygon is held as a MultiPolygon of one polygon.
    pub fn geometry(&self) -> &MultiPolygon<f64> {
        &self.geometry
    }

    /// True when the file gave a MultiPolygon (written back as one).
    pub fn is_multi(&self) -> bool {
        self.multi
    }

    /// The feature's properties as read, kept for the round trip (results
    /// written by an earlier run are dropped, see [`crate::schema::RESULTS_MEMBER`]).
    pub fn properties(&self) -> &serde_json::Map<String, serde_json::Value> {
        &self.properties
    }

    /// The feature's own `id` member (RFC 7946 §3.2), if it had one.
    pub fn feature_id(&self) -> Option<&serde_json::Value> {
        self.feature_id.as_ref()
    }

    /// Geodesic area on the WGS84 ellipsoid, holes subtracted, ha.
    pub fn area_ha(&self) -> f64 {
        self.area_ha
    }

    /// Position of the feature in the file (0-based).
    pub fn feature_index(&self) -> usize {
        self.index
    }
}

/// Every catchment's boundary, in file order.
#[derive(Debug, Clone)]
pub struct Boundaries {
    path: PathBuf,
    id_property: String,
    features: Vec<Boundary>,
    by_id: HashMap<String, usize>,
}

impl Boundaries {
    fn new(path: &Path, id_property: &str, features: Vec<Boundary>) -> Boundaries {
        let by_id = features.iter().enumerate().map(|(i, b)| (b.id.clone(), i)).collect();
        Boundaries { path: path.to_path_buf(), id_property: id_property.to_string(), features, by_id }
    }

    /// The GeoJSON file read.
    pub fn path(&self) -> &Path {
        &self.path
    }

    /// The property that holds the catchment id.
    pub fn id_property(&self) -> &str {
        &self.id_property
    }

    /// Number of boundaries.
    pub fn len(&self) -> usize {
        self.features.len()
    }

    /// True when there are none (never, for boundaries that were read).
    pub fn is_empty(&self) -> bool {
        self.features.is_empty()
    }

    /// The boundaries in file order.
    pub fn iter(&self) -> impl Iterator<Item = &Boundary> {
        self.features.iter()
    }

    /// The boundary of a catchment.
    pub fn get(&self, id: &str) -> Option<&Boundary> {
        self.by_id.get(id).map(|&i| &self.features[i])
    }

    /// `(catchment id, geodesic area in ha)` in file order: what
    /// `area_from_geometry = true` puts in place of the table's `area_ha`.
    pub fn areas_ha(&self) -> Vec<(String, f64)> {
        self.features.iter().map(|b| (b.id.clone(), b.area_ha)).collect()
    }
}
