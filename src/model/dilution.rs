//! Contaminant loads and their concentration by dilution in annual runoff.
//!
//! # Formula
//! Diffuse load from a catchment of area `A` with ET-equivalent canopy fraction `f`:
//!
//! `L = A·[f·e_forest + (1 − f)·e_open] + L_point`   (kg/yr)
//!
//! Flow-weighted mean concentration of the year's runoff volume `V`:
//!
//! `C = 1000 · L / V`   (mg/L, with `L` in kg/yr and `V` in m³/yr; 1 kg/m³ = 1000 mg/L)
//!
//! equivalently, for an areal load `l` (kg/ha/yr) and runoff depth `Q` (mm/yr),
//! `C = 100 · l / Q` (1 mm over 1 ha = 10 m³).
//!
//! # Symbols
//! * `e_open`, `e_forest` — export coefficients of open land and of conifer canopy, kg/ha/yr, ≥ 0.
//! * `L_point` — point-source load, kg/yr, ≥ 0.
//! * `V = 10·Q·A` — runoff volume, m³/yr (`Q` mm, `A` ha).
//!
//! # Assumptions
//! Loads are conservative (no in-stream loss) and fully mixed in the annual runoff.
//! The export-coefficient approach gives long-term average loads; it does not
//! describe storm events or seasonal concentration peaks. Below a minimum runoff
//! depth the concentration is not computed but flagged (the quotient is
//! meaningless as `Q → 0`).
//!
//! # References
//! Unit conversion only; export-coefficient modelling after Johnes, P. J. (1996).
//! Evaluation and management of the impact of land use change on the nitrogen and
//! phosphorus load delivered to surface waters: the export coefficient modelling
//! approach. *Journal of Hydrology*, 183, 323–349.

/// Cubic metres of water in 1 mm of depth over 1 hectare.
pub const M3_PER_MM_HA: f64 = 10.0;

/// Runoff volume, m³/yr, from depth `yield_mm` (mm/yr) over `area_ha` (ha).
#[inline]
pub fn volume_m3(yield_mm: f64, area_ha: f64) -> f64 {
    yield_mm * area_ha * M3_PER_MM_HA
}

/// Diffuse plus point load, kg/yr.
#[inline]
pub fn load_kg_per_yr(
    area_ha: f64,
    canopy_fraction: f64,
    open_export_kg_per_ha_yr: f64,
    forest_export_kg_per_ha_yr: f64,
    point_kg_per_yr: f64,
) -> f64 {
    let f = canopy_fraction.clamp(0.0, 1.0);
    area_ha * (f * forest_export_kg_per_ha_yr + (1.0 - f) * open_export_kg_per_ha_yr) + point_kg_per_yr
}

/// Why a concentration could not be computed.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ConcentrationFlag {
    /// Runoff below the minimum depth: too little water to state a concentration.
    LowRunoff,
}

/// Concentration, mg/L, of `load_kg_per_yr` in `volume_m3` of runoff.
///
/// Returns `Err(LowRunoff)` when the runoff depth (volume over `area_ha`) is below
/// `min_runoff_mm`, or the volume is not positive.
#[inline]
pub fn concentration_mg_per_l(load_kg_per_yr: f64, volume_m3: f64, area_ha: f64, min_runoff_mm: f64) -> Result<f64, ConcentrationFlag> {
    let depth_mm = if area_ha > 0.0 { volume_m3 / (area_ha * M3_PER_MM_HA) } else { 0.0 };
    if !(volume_m3 > 0.0) || depth_mm < min_runoff_mm {
        return Err(ConcentrationFlag::LowRunoff);
    }
    let c = 1000.0 * load_kg_per_yr / volume_m3;
    if c.is_finite() {
        Ok(c)
    } else {
        Err(ConcentrationFlag::LowRunoff)
    }
}

/// Concentration, mg/L, of an areal load `load_kg_per_ha_yr` in runoff depth `yield_mm`:
/// `C = 100·l/Q`. `None` when `yield_mm ≤ 0`.
#[inline]
pub fn concentration_from_depth_mg_per_l(load_kg_per_ha_yr: f64, yield_mm: f64) -> Option<f64> {
    (yield_mm > 0.0).then(|| 100.0 * load_kg_per_ha_yr / yield_mm)
}
