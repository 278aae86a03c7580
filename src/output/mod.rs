//! Writing a run folder: the tidy CSV tables ([`tables`]), the results GeoJSON
//! ([`geojson`]) and the atomic output folder and file writes ([`outdir`]).

pub mod geojson;
pub mod outdir;
pub mod pet;
pub mod tables;
