//! Mean-annual water-balance curves of the Budyko family.
//!
//! Every curve answers one question: given long-term (or one year's) precipitation
//! `P` and potential evapotranspiration `E0`, both in mm/yr, how much actually
//! evaporates? Each formulation lives in its own file and implements
//! [`WaterBalance`]:
//!
//! * [`Zhang2001`] — Zhang, Dawes & Walker (2001), one parameter `w`.
//! * [`Fu1981`] — Fu (1981), one parameter `ω`.
//! * [`Budyko1974`] — Budyko's original parameter-free curve (used as a reference).
//!
//! # Formula
//! Each curve gives the evaporative ratio `r(φ) = ET/P` (its own file, with its
//! equation). From it, for every curve ([`WaterBalance`]):
//! * `ET = clamp(P·r(E0/P), 0, min(P, E0))`, and `ET = 0` when `P` or `E0` is 0;
//! * `Q = max(0, P − ET)`.
//!
//! For a catchment with forest fraction `f` ([`mixed_et_mm`]):
//! `ET = f·ET_forest(P, E0_forest) + (1 − f)·ET_grass(P, E0_grass)` (Zhang, Dawes &
//! Walker 2001).
//!
//! # Symbols
//! * `P` — precipitation, mm/yr, ≥ 0.
//! * `E0` — potential evapotranspiration (evaporative demand), mm/yr, ≥ 0.
//! * `φ = E0/P` — aridity index, dimensionless.
//! * `ET` — actual evapotranspiration, mm/yr; `Q = P − ET` is water yield, mm/yr.
//! * `f` — ET-equivalent forest (canopy) fraction, 0–1.
//!
//! # Invariants (tested for every curve)
//! `0 ≤ ET ≤ min(P, E0)`; `ET/P → 1` as `φ → ∞`; `ET → E0` as `φ → 0`;
//! ET rises with the curve parameter.
//!
//! # Assumptions
//! The curves describe long-term means. Applying them year by year ignores
//! storage carry-over between years (soil moisture, groundwater); annual values
//! are indicative only. Forest and grass parts of a catchment share its rainfall
//! and do not exchange water.
//!
//! # References
//! Zhang, L., Dawes, W. R., & Walker, G. R. (2001). Response of mean annual
//! evapotranspiration to vegetation changes at catchment scale. *Water Resources
//! Research*, 37(3), 701–708. doi:10.1029/2000WR900325
//!
//! Fu, B. P. (1981). On the calculation of the evaporation from land surface.
//! *Scientia Atmospherica Sinica*, 5(1), 23–31 (in Chinese).
//!
//! Budyko, M. I. (1974). *Climate and Life*. Academic Press, New York, 508 pp.

mod budyko1974;
mod fu1981;
mod zhang2001;

pub use budyko1974::Budyko1974;
pub use fu1981::Fu1981;
pub use zhang2001::Zhang2001;

/// A mean-annual curve that partitions precipitation into evapotranspiration and yield.
pub trait WaterBalance {
    /// Evaporative ratio `ET/P` at aridity index `phi = E0/P` (dimensionless).
    ///
    /// Implementations must return a finite value in `0..=min(1, phi)` for any
    /// `phi ≥ 0`, including `phi = 0` and `phi = +∞`.
    fn evaporative_ratio(&self, phi: f64) -> f64;

    /// Actual evapotranspiration, mm/yr, for precipitation `rain_mm` and
    /// potential evapotranspiration `pet_mm` (both mm/yr, ≥ 0).
    ///
    /// Returns 0 when either input is 0. The result never exceeds `rain_mm` or `pet_mm`.
    fn et_mm(&self, rain_mm: f64, pet_mm: f64) -> f64 {
        if rain_mm <= 0.0 || pet_mm <= 0.0 {
            return 0.0;
        }
        let et = rain_mm * self.evaporative_ratio(pet_mm / rain_mm);
        et.clamp(0.0, rain_mm.min(pet_mm))
    }

    /// Water yield `Q = P − ET`, mm/yr.
    fn yield_mm(&self, rain_mm: f64, pet_mm: f64) -> f64 {
        (rain_mm - self.et_mm(rain_mm, pet_mm)).max(0.0)
    }
}

/// Which curve family a scenario uses, with the parameter for each cover.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum CoverCurves {
    /// Zhang et al. (2001) with plant-available-water coefficients per cover.
    Zhang {
        /// `w` for forest (conifer canopy and existing forest); Zhang et al. (2001): 2.0.
        w_forest: f64,
        /// `w` for grass, tussock and other short vegetation; Zhang et al. (2001): 0.5.
        w_grass: f64,
    },
    /// Fu (1981) with `ω` per cover.
    Fu {
        /// `ω` for forest, > 1.
        omega_forest: f64,
        /// `ω` for grass and tussock, > 1.
        omega_grass: f64,
    },
}

impl CoverCurves {
    /// Zhang et al. (2001) with the published defaults (w = 2.0 forest, 0.5 grass).
    pub const ZHANG_DEFAULT: CoverCurves = CoverCurves::Zhang { w_forest: 2.0, w_grass: 0.5 };

    /// Evapotranspiration of fully forested land, mm/yr.
    #[inline]
    pub fn forest_et_mm(&self, rain_mm: f64, pet_mm: f64) -> f64 {
        match *self {
            CoverCurves::Zhang { w_forest, .. } => Zhang2001 { w: w_forest }.et_mm(rain_mm, pet_mm),
            CoverCurves::Fu { omega_forest, .. } => Fu1981 { omega: omega_forest }.et_mm(rain_mm, pet_mm),
        }
    }

    /// Evapotranspiration of grass/tussock land, mm/yr.
    #[inline]
    pub fn grass_et_mm(&self, rain_mm: f64, pet_mm: f64) -> f64 {
        match *self {
            CoverCurves::Zhang { w_grass, .. } => Zhang2001 { w: w_grass }.et_mm(rain_mm, pet_mm),
            CoverCurves::Fu { omega_grass, .. } => Fu1981 { omega: omega_grass }.et_mm(rain_mm, pet_mm),
        }
    }

    /// Short name of the method (`zhang` or `fu`), as written in outputs.
    pub fn method_name(&self) -> &'static str {
        match self {
            CoverCurves::Zhang { .. } => "zhang",
            CoverCurves::Fu { .. } => "fu",
        }
    }
}

/// Catchment evapotranspiration for a mixed cover, mm/yr (Zhang et al. 2001 mixing).
///
/// # Formula
/// `ET = f·ET_forest(P, E0_forest) + (1 − f)·ET_grass(P, E0_grass)`
/// (Zhang, Dawes & Walker 2001, eq. 9 applied to a forest fraction `f`).
///
/// # Symbols
/// * `canopy_fraction` `f` — ET-equivalent forest fraction of the catchment, 0–1.
/// * `pet_forest_mm`, `pet_grass_mm` — evaporative demand over each cover, mm/yr.
#[inline]
pub fn mixed_et_mm(curves: &CoverCurves, rain_mm: f64, pet_forest_mm: f64, pet_grass_mm: f64, canopy_fraction: f64) -> f64 {
    let f = canopy_fraction.clamp(0.0, 1.0);
    f * curves.forest_et_mm(rain_mm, pet_forest_mm) + (1.0 - f) * curves.grass_et_mm(rain_mm, pet_grass_mm)
}
