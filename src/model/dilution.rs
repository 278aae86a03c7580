//! Contaminant loads and their concentration by dilution in annual runoff.
//!
//! # Formula
//! Long-term mean diffuse load from a catchment of area `A` with ET-equivalent canopy
//! fraction `f`, plus point sources:
//!
//! `L̄_d = A·[f·e_forest + (1 − f)·e_open]`,  `L̄ = L̄_d + L_point`   (kg/yr)
//!
//! Flow-dependent diffuse load (concentration–discharge power law, Godsey et al. 2009):
//! a diffuse source delivers at concentration `C_d = a·Q^b`; `a` is set so that the
//! load at the long-term mean runoff `Q̄` equals the export-coefficient load, hence
//!
//! `L_d(Q) = L̄_d · (Q/Q̄)^(1 + b)`,  `C_d(Q) = C̄_d · (Q/Q̄)^b`,  `C̄_d = 1000·L̄_d/V̄`.
//!
//! Point-source loads do not depend on flow (they are pure dilution, `b = −1`).
//! The year's load is `L(Q) = L_d(Q) + L_point`.
//!
//! Flow-weighted mean concentration of the year's runoff volume `V`:
//!
//! `C = 1000 · L / V`   (mg/L, with `L` in kg/yr and `V` in m³/yr; 1 kg/m³ = 1000 mg/L)
//!
//! equivalently, for an areal load `l` (kg/ha/yr) and runoff depth `Q` (mm/yr),
//! `C = 100 · l / Q` (1 mm over 1 ha = 10 m³).
//!
//! Screening ([`ConcentrationCeiling`]): a concentration is not stated but flagged when
//! the runoff depth is below `Q_min` ([`ScreenedFlag::LowRunoff`]), or when it
//! exceeds `k·C̄` (`C̄ = 1000·L̄/V̄`, the concentration at the long-term mean) or an
//! absolute ceiling `C_max` ([`ScreenedFlag::AboveCeiling`]).
//!
//! # Symbols
//! * `e_open`, `e_forest` — export coefficients of open land and of conifer canopy, kg/ha/yr, ≥ 0.
//! * `L_point` — point-source load, kg/yr, ≥ 0.
//! * `V = 10·Q·A` — runoff volume, m³/yr (`Q` mm, `A` ha); `V̄ = 10·Q̄·A`.
//! * `Q`, `Q̄` — the year's and the long-term mean runoff depth, mm/yr.
//! * `b` — concentration–discharge exponent, dimensionless, −1 ≤ b ≤ 2: `b = −1` pure
//!   dilution of a fixed load (today's behaviour), `b = 0` chemostatic (constant
//!   concentration, load proportional to flow), `b > 0` enrichment with flow.
//! * `Q_min` — runoff depth below which no concentration is stated, mm/yr (scenario
//!   `min_runoff_mm`).
//! * `k` — ceiling as a multiple of the long-term mean concentration, > 1 (default 10).
//! * `C_max` — optional absolute ceiling, mg/L, > 0.
//!
//! # Assumptions
//! Loads are conservative (no in-stream loss) and fully mixed in the annual runoff.
//! The export-coefficient approach gives long-term average loads; it does not
//! describe storm events or seasonal concentration peaks. The power law is applied
//! to annual flow-weighted values, year against long-term mean; `Q̄` is the runoff
//! under which the export coefficients are taken to hold. Recommended: the
//! catchment's long-term mean yield with its starting cover, so that with `b = 0` the
//! concentration stays at its present mean whatever the invasion does to the flow,
//! and with `b = −1` the load stays fixed (the worst case for lost water).
//! Below a minimum runoff depth the concentration is not computed but flagged (the
//! quotient is meaningless as `Q → 0`). Above `k·C̄` it is flagged too: with
//! `b = −1`, `k = 10` means a year with less than a tenth of the mean runoff, where an
//! annual water balance that ignores storage carry-over (see [`super::budyko`]) and a
//! load fixed in time both stop being credible (common practice, no published source).
//! No function here returns NaN or an infinity: every case without a finite,
//! screened value is a flag.
//!
//! # References
//! Export-coefficient modelling after Johnes, P. J. (1996). Evaluation and management
//! of the impact of land use change on the nitrogen and phosphorus load delivered to
//! surface waters: the export coefficient modelling approach. *Journal of Hydrology*,
//! 183, 323–349.
//!
//! Godsey, S. E., Kirchner, J. W., & Clow, D. W. (2009). Concentration–discharge
//! relationships reflect chemostatic characteristics of US catchments. *Hydrological
//! Processes*, 23, 1844–1864. (`b = −1` pure dilution, `b ≈ 0` chemostatic.)

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

impl ConcentrationFlag {
    /// Short label for output flags (`low-runoff`).
    pub fn name(self) -> &'static str {
        match self {
            ConcentrationFlag::LowRunoff => "low-runoff",
        }
    }
}

/// Why a screened concentration ([`concentration_at_flow_mg_per_l`]) is not stated.
///
/// A superset of [`ConcentrationFlag`], kept separate so that code matching on
/// `ConcentrationFlag` exhaustively is unaffected until it moves to the screened path.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ScreenedFlag {
    /// Runoff below the minimum depth: too little water to state a concentration.
    LowRunoff,
    /// The computed concentration is above the ceiling ([`ConcentrationCeiling`]):
    /// not credible for an annual screening model, so not stated.
    AboveCeiling,
}

impl ScreenedFlag {
    /// Short label for output flags (`low-runoff`, `above-ceiling`).
    pub fn name(self) -> &'static str {
        match self {
            ScreenedFlag::LowRunoff => "low-runoff",
            ScreenedFlag::AboveCeiling => "above-ceiling",
        }
    }
}

impl From<ConcentrationFlag> for ScreenedFlag {
    fn from(f: ConcentrationFlag) -> ScreenedFlag {
        match f {
            ConcentrationFlag::LowRunoff => ScreenedFlag::LowRunoff,
        }
    }
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

/// Why a concentration–discharge exponent or a ceiling was refused.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum DilutionParamError {
    /// `b` outside −1..=2 or not finite.
    Exponent(f64),
    /// Ratio ceiling not above 1 or not finite.
    Ratio(f64),
    /// Absolute ceiling not above 0 or not finite.
    Absolute(f64),
}

impl std::fmt::Display for DilutionParamError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            DilutionParamError::Exponent(v) => write!(f, "concentration-discharge exponent b = {v} is not allowed: it must be a finite number in -1..=2 (-1 pure dilution, 0 chemostatic)"),
            DilutionParamError::Ratio(v) => write!(f, "concentration ceiling of {v} times the long-term mean is not allowed: it must be a finite number above 1"),
            DilutionParamError::Absolute(v) => write!(f, "concentration ceiling of {v} mg/L is not allowed: it must be a finite number above 0"),
        }
    }
}

impl std::error::Error for DilutionParamError {}

/// Concentration–discharge behaviour of a diffuse load: `C ∝ Q^b` (module header).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ConcentrationDischarge {
    exponent_b: f64,
}

impl ConcentrationDischarge {
    /// Smallest allowed `b`: pure dilution of a fixed load.
    pub const MIN_EXPONENT: f64 = -1.0;
    /// Largest allowed `b`. From memory: suspended-sediment rating curves have load
    /// exponents of roughly 1.5–3 (concentration exponents 0.5–2); steeper is not screened.
    pub const MAX_EXPONENT: f64 = 2.0;
    /// `b = −1`: the load does not depend on flow (today's behaviour, worst case for lost water).
    pub const PURE_DILUTION: ConcentrationDischarge = ConcentrationDischarge { exponent_b: -1.0 };
    /// `b = 0`: constant concentration, load proportional to flow (Godsey et al. 2009).
    pub const CHEMOSTATIC: ConcentrationDischarge = ConcentrationDischarge { exponent_b: 0.0 };

    /// A power law with exponent `b` in −1..=2.
    pub fn new(exponent_b: f64) -> Result<ConcentrationDischarge, DilutionParamError> {
        if exponent_b.is_finite() && (Self::MIN_EXPONENT..=Self::MAX_EXPONENT).contains(&exponent_b) {
            Ok(ConcentrationDischarge { exponent_b })
        } else {
            Err(DilutionParamError::Exponent(exponent_b))
        }
    }

    /// The exponent `b`.
    pub fn exponent(&self) -> f64 {
        self.exponent_b
    }

    /// Diffuse load at runoff `yield_mm`, kg/yr: `L̄_d·(Q/Q̄)^(1 + b)`.
    ///
    /// Documented clamps: negative `yield_mm` counts as 0; when `mean_yield_mm` is not
    /// a positive finite number the flow ratio is undefined and the mean load is
    /// returned, as it is when the scaled load overflows (a mean runoff near 0, where
    /// the concentration is flagged anyway). With `b = −1` the result is exactly
    /// `mean_load_kg_per_yr` (the exponent is exactly 0).
    #[inline]
    pub fn load_kg_per_yr(&self, mean_load_kg_per_yr: f64, yield_mm: f64, mean_yield_mm: f64) -> f64 {
        let ratio = if mean_yield_mm > 0.0 && mean_yield_mm.is_finite() { yield_mm.max(0.0) / mean_yield_mm } else { 1.0 };
        let scaled = mean_load_kg_per_yr * ratio.powf(1.0 + self.exponent_b);
        if scaled.is_finite() {
            scaled
        } else {
            mean_load_kg_per_yr
        }
    }

    /// Concentration, mg/L, of an areal diffuse load whose long-term mean is
    /// `mean_load_kg_per_ha_yr` (kg/ha/yr) in runoff depth `yield_mm`:
    /// `100·l(Q)/Q = C̄·(Q/Q̄)^b`. `None` when `yield_mm ≤ 0` or the result is not finite.
    /// With `b = −1` this equals [`concentration_from_depth_mg_per_l`] exactly.
    pub fn concentration_from_depth_mg_per_l(&self, mean_load_kg_per_ha_yr: f64, yield_mm: f64, mean_yield_mm: f64) -> Option<f64> {
        let l = self.load_kg_per_yr(mean_load_kg_per_ha_yr, yield_mm, mean_yield_mm);
        concentration_from_depth_mg_per_l(l, yield_mm).filter(|c| c.is_finite())
    }
}

/// The year's runoff of one catchment against its long-term mean.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Runoff {
    /// The year's runoff depth `Q`, mm/yr.
    pub yield_mm: f64,
    /// Long-term mean runoff depth `Q̄` at which the export coefficients hold, mm/yr.
    pub mean_yield_mm: f64,
    /// Catchment area `A`, ha.
    pub area_ha: f64,
}

/// When a computed concentration is too high to state (module header, "Screening").
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ConcentrationCeiling {
    max_ratio_to_mean: Option<f64>,
    max_mg_per_l: Option<f64>,
}

impl ConcentrationCeiling {
    /// Default ratio `k`: ten times the long-term mean concentration (common practice,
    /// no published source; see the module header).
    pub const DEFAULT_RATIO_TO_MEAN: f64 = 10.0;
    /// No ceiling: only the minimum-runoff rule applies (today's behaviour).
    pub const NONE: ConcentrationCeiling = ConcentrationCeiling { max_ratio_to_mean: None, max_mg_per_l: None };
    /// The default: `k` = [`Self::DEFAULT_RATIO_TO_MEAN`], no absolute ceiling.
    pub const DEFAULT: ConcentrationCeiling =
        ConcentrationCeiling { max_ratio_to_mean: Some(Self::DEFAULT_RATIO_TO_MEAN), max_mg_per_l: None };

    /// A ceiling of `max_ratio_to_mean` times the long-term mean concentration (> 1)
    /// and/or an absolute `max_mg_per_l` (> 0); `None` leaves that test out.
    pub fn new(max_ratio_to_mean: Option<f64>, max_mg_per_l: Option<f64>) -> Result<ConcentrationCeiling, DilutionParamError> {
        if let Some(k) = max_ratio_to_mean {
            if !(k.is_finite() && k > 1.0) {
                return Err(DilutionParamError::Ratio(k));
            }
        }
        if let Some(c) = max_mg_per_l {
            if !(c.is_finite() && c > 0.0) {
                return Err(DilutionParamError::Absolute(c));
            }
        }
        Ok(ConcentrationCeiling { max_ratio_to_mean, max_mg_per_l })
    }

    /// True when `mg_per_l` exceeds the ceiling. `mean_mg_per_l` is the concentration at
    /// the long-term mean; when it is not a positive finite number the ratio test is
    /// left out (the absolute one still applies).
    pub fn exceeded(&self, mg_per_l: f64, mean_mg_per_l: Option<f64>) -> bool {
        let over_ratio = match (self.max_ratio_to_mean, mean_mg_per_l) {
            (Some(k), Some(m)) if m > 0.0 && m.is_finite() => mg_per_l > k * m,
            _ => false,
        };
        let over_absolute = self.max_mg_per_l.is_some_and(|c| mg_per_l > c);
        over_ratio || over_absolute
    }
}

/// The year's load, kg/yr: flow-dependent diffuse load plus the fixed point load,
/// `L̄_d·(Q/Q̄)^(1 + b) + L_point`. With `b = −1` this is exactly
/// `diffuse_mean_kg_per_yr + point_kg_per_yr`, i.e. [`load_kg_per_yr`]'s value.
#[inline]
pub fn load_at_flow_kg_per_yr(diffuse_mean_kg_per_yr: f64, point_kg_per_yr: f64, cq: ConcentrationDischarge, runoff: Runoff) -> f64 {
    cq.load_kg_per_yr(diffuse_mean_kg_per_yr, runoff.yield_mm, runoff.mean_yield_mm) + point_kg_per_yr
}

/// The year's flow-weighted concentration, mg/L, screened: [`load_at_flow_kg_per_yr`]
/// over the year's volume, `Err(LowRunoff)` below `min_runoff_mm` (as
/// [`concentration_mg_per_l`]), `Err(AboveCeiling)` above `ceiling`, where the ratio
/// test compares with the concentration at the long-term mean, `1000·L̄/V̄`.
///
/// With `cq = PURE_DILUTION` and `ceiling = NONE` the result equals today's
/// `concentration_mg_per_l(load_kg_per_yr(..), volume_m3(Q, A), A, min_runoff_mm)` exactly
/// (with the flag converted by `ScreenedFlag::from`).
pub fn concentration_at_flow_mg_per_l(
    diffuse_mean_kg_per_yr: f64,
    point_kg_per_yr: f64,
    cq: ConcentrationDischarge,
    runoff: Runoff,
    min_runoff_mm: f64,
    ceiling: &ConcentrationCeiling,
) -> Result<f64, ScreenedFlag> {
    let load = load_at_flow_kg_per_yr(diffuse_mean_kg_per_yr, point_kg_per_yr, cq, runoff);
    screened_concentration_mg_per_l(
        load,
        volume_m3(runoff.yield_mm, runoff.area_ha),
        runoff.area_ha,
        min_runoff_mm,
        diffuse_mean_kg_per_yr + point_kg_per_yr,
        volume_m3(runoff.mean_yield_mm, runoff.area_ha),
        ceiling,
    )
}

/// Concentration, mg/L, of `load_kg_per_yr` in `volume_m3` over `area_ha`, screened:
/// `Err(LowRunoff)` as [`concentration_mg_per_l`], `Err(AboveCeiling)` when it exceeds
/// `ceiling`, whose ratio test compares with `1000·L̄/V̄` (the mean load
/// `mean_load_kg_per_yr` in the mean volume `mean_volume_m3`; left out when `V̄ ≤ 0`).
/// Used for one catchment and for the pooled flow of a receiving node alike.
pub fn screened_concentration_mg_per_l(
    load_kg_per_yr: f64,
    volume_m3: f64,
    area_ha: f64,
    min_runoff_mm: f64,
    mean_load_kg_per_yr: f64,
    mean_volume_m3: f64,
    ceiling: &ConcentrationCeiling,
) -> Result<f64, ScreenedFlag> {
    let c = concentration_mg_per_l(load_kg_per_yr, volume_m3, area_ha, min_runoff_mm)?;
    let mean_c = (mean_volume_m3 > 0.0).then(|| 1000.0 * mean_load_kg_per_yr / mean_volume_m3);
    if ceiling.exceeded(c, mean_c) {
        Err(ScreenedFlag::AboveCeiling)
    } else {
        Ok(c)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    fn runoff(yield_mm: f64, mean_yield_mm: f64) -> Runoff {
        Runoff { yield_mm, mean_yield_mm, area_ha: 1000.0 }
    }

    #[test]
    fn unit_conversions_at_the_mean_flow_for_any_exponent() {
        // Source: SCIENCE.md §4 [derived, unit conversion]: 2 kg/ha/yr at 500 mm → 0.40 mg/L;
        // 10 kg/ha/yr at 250 mm → 4.0 mg/L. At Q = Q̄ every exponent gives the mean.
        for b in [-1.0, -0.5, 0.0, 0.5, 2.0] {
            let cq = ConcentrationDischarge::new(b).unwrap();
            let c = concentration_at_flow_mg_per_l(2.0 * 1000.0, 0.0, cq, runoff(500.0, 500.0), 1.0, &ConcentrationCeiling::DEFAULT);
            assert_abs_diff_eq!(c.unwrap(), 0.40, epsilon = 1e-12);
            let c = concentration_at_flow_mg_per_l(10.0 * 1000.0, 0.0, cq, runoff(250.0, 250.0), 1.0, &ConcentrationCeiling::DEFAULT);
            assert_abs_diff_eq!(c.unwrap(), 4.0, epsilon = 1e-12);
            assert_abs_diff_eq!(cq.concentration_from_depth_mg_per_l(2.0, 500.0, 500.0).unwrap(), 0.40, epsilon = 1e-12);
        }
    }

    #[test]
    fn pure_dilution_raises_concentration_by_the_lost_water() {
        // Source: SCIENCE.md §4 [derived]: unchanged load, 40 % less runoff → 1/0.6 = 1.67×.
        let cq = ConcentrationDischarge::PURE_DILUTION;
        let c0 = concentration_at_flow_mg_per_l(2000.0, 0.0, cq, runoff(500.0, 500.0), 1.0, &ConcentrationCeiling::NONE).unwrap();
        let c1 = concentration_at_flow_mg_per_l(2000.0, 0.0, cq, runoff(300.0, 500.0), 1.0, &ConcentrationCeiling::NONE).unwrap();
        assert_abs_diff_eq!(c1 / c0, 1.0 / 0.6, epsilon = 1e-12);
        assert_abs_diff_eq!(c1, 0.6667, epsilon = 1e-4);
    }

    #[test]
    fn pure_dilution_reproduces_todays_numbers_exactly() {
        // Today's path: load_kg_per_yr then concentration_mg_per_l (bit-for-bit equal).
        let cq = ConcentrationDischarge::PURE_DILUTION;
        for &area in &[0.0, 1.0, 250.0, 12_345.6] {
            for &f in &[0.0, 0.37, 1.0] {
                for &(eo, ef, pt) in &[(2.0, 1.0, 0.0), (8.5, 1.5, 340.0), (0.0, 0.0, 12.0)] {
                    for &q in &[0.0, 0.5, 1.0, 3.7, 123.4, 870.0] {
                        for &q_mean in &[0.0, 50.0, 870.0] {
                            let today = concentration_mg_per_l(load_kg_per_yr(area, f, eo, ef, pt), volume_m3(q, area), area, 1.0);
                            let diffuse = load_kg_per_yr(area, f, eo, ef, 0.0);
                            let r = Runoff { yield_mm: q, mean_yield_mm: q_mean, area_ha: area };
                            assert_eq!(load_at_flow_kg_per_yr(diffuse, pt, cq, r), load_kg_per_yr(area, f, eo, ef, pt));
                            let new = concentration_at_flow_mg_per_l(diffuse, pt, cq, r, 1.0, &ConcentrationCeiling::NONE);
                            assert_eq!(new, today.map_err(ScreenedFlag::from), "area {area} f {f} q {q} mean {q_mean}");
                        }
                    }
                }
            }
        }
        for &(l, q) in &[(2.0, 500.0), (10.0, 250.0), (3.0, 0.0), (3.0, 1e-9)] {
            assert_eq!(cq.concentration_from_depth_mg_per_l(l, q, 400.0), concentration_from_depth_mg_per_l(l, q));
        }
    }

    #[test]
    fn chemostatic_concentration_does_not_depend_on_flow() {
        // Source: Godsey, Kirchner & Clow (2009): b ≈ 0 is chemostatic (constant C).
        let cq = ConcentrationDischarge::CHEMOSTATIC;
        let mean = concentration_at_flow_mg_per_l(2000.0, 0.0, cq, runoff(500.0, 500.0), 1.0, &ConcentrationCeiling::DEFAULT).unwrap();
        for q in [2.0, 40.0, 300.0, 500.0, 1500.0] {
            let c = concentration_at_flow_mg_per_l(2000.0, 0.0, cq, runoff(q, 500.0), 1.0, &ConcentrationCeiling::DEFAULT).unwrap();
            assert_abs_diff_eq!(c, mean, epsilon = 1e-12);
            // The load scales with flow instead: L = L̄·Q/Q̄.
            assert_abs_diff_eq!(load_at_flow_kg_per_yr(2000.0, 0.0, cq, runoff(q, 500.0)), 2000.0 * q / 500.0, epsilon = 1e-9);
        }
        // A point source is still diluted: 1000 kg/yr diffuse + 1000 kg/yr point at half
        // the mean flow → (500 + 1000)·1000 / (10·250·1000) = 0.6 mg/L vs 0.4 at the mean.
        let c = concentration_at_flow_mg_per_l(1000.0, 1000.0, cq, runoff(250.0, 500.0), 1.0, &ConcentrationCeiling::NONE).unwrap();
        assert_abs_diff_eq!(c, 0.6, epsilon = 1e-12);
    }

    #[test]
    fn intermediate_exponent_follows_the_power_law() {
        // Derived: C(Q) = C̄·(Q/Q̄)^b; b = −0.5 at a quarter of the mean flow doubles C.
        let cq = ConcentrationDischarge::new(-0.5).unwrap();
        let c = concentration_at_flow_mg_per_l(2000.0, 0.0, cq, runoff(125.0, 500.0), 1.0, &ConcentrationCeiling::DEFAULT).unwrap();
        assert_abs_diff_eq!(c, 0.80, epsilon = 1e-12);
    }

    #[test]
    fn ceilings_flag_instead_of_stating() {
        let cq = ConcentrationDischarge::PURE_DILUTION;
        // Mean 0.40 mg/L; a twentieth of the mean flow gives 8.0 mg/L = 20× the mean: flagged
        // by the default ratio 10; a fifth gives 2.0 mg/L = 5×: stated.
        let at = |q: f64, ceiling: &ConcentrationCeiling| concentration_at_flow_mg_per_l(2000.0, 0.0, cq, runoff(q, 500.0), 1.0, ceiling);
        assert_eq!(at(25.0, &ConcentrationCeiling::DEFAULT), Err(ScreenedFlag::AboveCeiling));
        assert_eq!(at(25.0, &ConcentrationCeiling::NONE).map(|c| (c * 1e9).round() / 1e9), Ok(8.0));
        assert_abs_diff_eq!(at(100.0, &ConcentrationCeiling::DEFAULT).unwrap(), 2.0, epsilon = 1e-12);
        // Exactly at the ratio boundary (Q = Q̄/10, C = 10·C̄) is still stated.
        assert_abs_diff_eq!(at(50.0, &ConcentrationCeiling::DEFAULT).unwrap(), 4.0, epsilon = 1e-12);
        // An absolute ceiling of 1 mg/L (e.g. a user's limit of credibility) flags 2.0.
        let abs = ConcentrationCeiling::new(None, Some(1.0)).unwrap();
        assert_eq!(at(100.0, &abs), Err(ScreenedFlag::AboveCeiling));
        assert_abs_diff_eq!(at(500.0, &abs).unwrap(), 0.4, epsilon = 1e-12);
        // Below the minimum runoff the low-runoff flag wins.
        assert_eq!(at(0.5, &ConcentrationCeiling::DEFAULT), Err(ScreenedFlag::LowRunoff));
        assert_eq!(ScreenedFlag::AboveCeiling.name(), "above-ceiling");
        assert_eq!(ScreenedFlag::LowRunoff.name(), "low-runoff");
        assert_eq!(ConcentrationFlag::LowRunoff.name(), "low-runoff");
    }

    #[test]
    fn never_nan_or_infinite() {
        let bs = [-1.0, -0.3, 0.0, 1.0, 2.0];
        let qs = [0.0, 1e-300, 1e-9, 0.99, 1.0, 1.01, 500.0, 1e12, f64::MAX];
        let ceilings =
            [ConcentrationCeiling::NONE, ConcentrationCeiling::DEFAULT, ConcentrationCeiling::new(Some(2.0), Some(50.0)).unwrap()];
        for b in bs {
            let cq = ConcentrationDischarge::new(b).unwrap();
            for &q in &qs {
                for &q_mean in &[0.0, 1e-300, 1.0, 500.0, f64::MAX] {
                    for &area in &[0.0, 1.0, 1e6] {
                        for &diffuse in &[0.0, 1.0, 1e12] {
                            let r = Runoff { yield_mm: q, mean_yield_mm: q_mean, area_ha: area };
                            assert!(load_at_flow_kg_per_yr(diffuse, 5.0, cq, r).is_finite());
                            for ceiling in &ceilings {
                                if let Ok(c) = concentration_at_flow_mg_per_l(diffuse, 5.0, cq, r, 1.0, ceiling) {
                                    assert!(c.is_finite() && c >= 0.0, "b {b} q {q} mean {q_mean} area {area}: {c}");
                                }
                            }
                            if let Some(c) = cq.concentration_from_depth_mg_per_l(diffuse, q, q_mean) {
                                assert!(c.is_finite());
                            }
                        }
                    }
                }
            }
        }
    }

    #[test]
    fn parameters_outside_their_ranges_are_refused() {
        for b in [-1.01, 2.5, f64::NAN, f64::INFINITY] {
            let e = ConcentrationDischarge::new(b).unwrap_err();
            assert!(e.to_string().contains("must be a finite number in -1..=2"), "{e}");
        }
        assert!(ConcentrationDischarge::new(-1.0).is_ok() && ConcentrationDischarge::new(2.0).is_ok());
        assert!(matches!(ConcentrationCeiling::new(Some(1.0), None), Err(DilutionParamError::Ratio(_))));
        assert!(matches!(ConcentrationCeiling::new(Some(f64::NAN), None), Err(DilutionParamError::Ratio(_))));
        assert!(matches!(ConcentrationCeiling::new(None, Some(0.0)), Err(DilutionParamError::Absolute(_))));
        assert_eq!(ConcentrationCeiling::new(None, None).unwrap(), ConcentrationCeiling::NONE);
    }
}
