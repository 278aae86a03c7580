//! The last steps shared by a whole run and a merge of shards: everything
//! basin-wide from the (possibly merged) exact partial sums, and the GIS outputs.

use crate::error::Result;
use crate::output::tables::{self, CsvOut};
use crate::plot::Formats;
use crate::run::basin_totals::Partials;
use std::path::Path;

/// Writes everything basin-wide from the (possibly merged) partial sums:
/// `summary.csv` (catchment rows per strategy, each followed by its basin row),
/// `delay.csv`, the basin rows of `sensitivity.csv` and the basin figures.
/// Returns the number of figures drawn.
pub fn finish_basin(dir: &Path, partials: &Partials, summary_rows: &[Vec<Vec<String>>], formats: Formats) -> Result<usize> {
    let names: Vec<(String, Option<f64>)> = partials.meta.contaminants.clone();
    let contaminants: Vec<crate::model::Contaminant> = names
        .iter()
        .map(|(n, g)| crate::model::Contaminant {
            name: n.clone(),
            open_export_kg_per_ha_yr: 0.0,
            forest_export_kg_per_ha_yr: 0.0,
            guideline_mg_per_l: *g,
            cq: crate::model::dilution::ConcentrationDischarge::PURE_DILUTION,
        })
        .collect();
    let mut summary = CsvOut::create(&dir.join("summary.csv"), &tables::summary_header(&contaminants))?;
    for (k, rows) in summary_rows.iter().enumerate() {
        for r in rows {
            summary.row(r.iter().map(String::as_str))?;
        }
        summary.row(partials.summary_row(k).iter().map(String::as_str))?;
    }
    summary.finish()?;
    partials.write_delay(dir)?;
    partials.append_ensemble(dir)?;
    partials.append_economics(dir)?;
    partials.append_sensitivity(dir)?;
    partials.draw_figures(dir, formats)
}

/// Writes `catchments.geojson` (results on the boundaries) and, when `maps`, the map figures.
pub fn gis_outputs(dir: &Path, b: &crate::input::gis::Boundaries, maps: bool, formats: Formats) -> Result<usize> {
    crate::output::geojson::write_results_geojson(dir, b)?;
    if maps {
        crate::plot::maps::draw_maps(dir, b, formats)
    } else {
        Ok(0)
    }
}
