//! Forest water use in humid climates: evaporation of rain intercepted by a closed
//! conifer canopy, added to a Budyko-type curve for the water that reaches the ground.
//!
//! In humid climates a conifer canopy uses more water than tussock or grass mainly
//! because it intercepts rain and evaporates it from the wet canopy (Fahey 1994);
//! tussock transpires at rates similar to forest, and its wet canopy evaporates
//! intercepted water more slowly (Murray et al., tussock lysimeter). A Budyko-type
//! curve capped at the grass-reference demand `E0` cannot show this: where
//! `E0/P < (w − 1)/w` Zhang's forest curve is cut back to `E0`, so `w_forest` stops
//! mattering and the forest–grass contrast shrinks to the PET ratio. Wet-canopy
//! evaporation runs on advected energy (it proceeds at the same rate by night as by
//! day: Pearce, Rowe & Stewart 1980), so it is largely outside the radiation-limited
//! demand that caps the curve. This file adds it explicitly.
//!
//! # Formula
//! Forest (closed-canopy) evapotranspiration, mm/yr:
//!
//! `I = c_i · P`  (interception loss, annual form)
//!
//! `E0_T = max(E0_f − β · I, 0)`  (demand left for transpiration)
//!
//! `ET_forest = I + f(P − I, E0_T)`
//!
//! where `f(P, E0)` is the forest curve already in use ([`CoverCurves::forest_et_mm`]:
//! Zhang et al. 2001 eq. 8 with `w_forest`, or Fu 1981 with `ω_forest`), capped by
//! its own contract at `min(P, E0)`. Catchment ET for an ET-equivalent canopy
//! fraction `f_c`:
//!
//! `ET = f_c · ET_forest + (1 − f_c) · ET_grass(P, E0)`   ([`mixed_et_mm`])
//!
//! Properties: `0 ≤ I ≤ P` and `0 ≤ f(P − I, ·) ≤ P − I`, so `0 ≤ ET_forest ≤ P`
//! always. With `c_i = 0`, `ET_forest = f(P, E0_f)` exactly (today's behaviour).
//! `ET_forest` may exceed `E0` (by up to `(1 − β)·I`): wet-canopy evaporation drawing
//! on advected energy, which the grass-reference demand does not contain.
//!
//! Optional annual reduction of the sparse-canopy analytical model (Gash 1979;
//! Gash, Lloyd & Lachaud 1995), to estimate `c_i` from canopy properties
//! ([`GashCanopy`]): with `n` rain days a year, each taken as one storm of `P/n`,
//! the rain needed to saturate the canopy is
//!
//! `P'_G = −(R̄/Ē_c) · S_c · ln(1 − Ē_c/R̄)`
//!
//! and, per unit ground area (trunk terms left out),
//!
//! `I = c · P`  if `P/n < P'_G` (no storm saturates the canopy), otherwise
//! `I = n · c · P'_G + c · (Ē_c/R̄) · (P − n · P'_G)`
//!
//! (wetting-up plus drying after rain, `n·c·P'_G`, and evaporation from the saturated
//! canopy during the rest of each storm).
//!
//! # Symbols
//! * `P` — precipitation, mm/yr, ≥ 0; `E0` — grass-reference PET, mm/yr, ≥ 0;
//!   `E0_f` — PET over forest, mm/yr (`forest_pet_factor · E0` in a scenario).
//! * `c_i` — annual interception loss of a closed canopy as a fraction of gross
//!   rainfall, 0..=0.6 (closed conifer stands in humid climates: about 0.22–0.29; see
//!   References; default [`CanopyInterception::DEFAULT_FRACTION`] = 0.25).
//! * `I` — interception loss, mm/yr.
//! * `β` — share of the interception loss that uses the same demand as transpiration,
//!   0..=1: `β = 0` interception entirely additional (advected energy), `β = 1` every
//!   millimetre intercepted displaces a millimetre of transpiration. Default
//!   [`CanopyInterception::DEFAULT_DEMAND_SHARE`] = 0.6.
//! * `E0_T` — demand seen by the transpiration part, mm/yr.
//! * `f_c` — ET-equivalent closed-canopy fraction of the catchment, 0..=1.
//! * Gash: `c` canopy cover fraction (0, 1]; `S_c` canopy storage per unit cover area,
//!   mm, ≥ 0; `Ē_c/R̄` ratio of the mean wet-canopy evaporation rate (per unit cover) to
//!   the mean rainfall rate during saturated conditions, in (0, 1); `n` rain days (storms)
//!   per year, ≥ 1; `P'_G` rain to saturate the canopy, mm.
//!
//! # Assumptions
//! * Interception is a fixed fraction of the year's rainfall for a closed canopy; the
//!   canopy fraction `f_c` (closure with stand age) scales it for young or sparse stands.
//!   In drier climates the fraction is lower (across New Zealand radiata sites of
//!   800–3000 mm the lowest interception was at the driest; Meason et al. 2025); the
//!   fixed fraction then overstates forest ET somewhat.
//! * What `E0_T` is, and why: transpiration happens in daylight; intercepted water
//!   evaporated at night (40–50 % of the gross interception loss at a New Zealand
//!   evergreen forest; Pearce, Rowe & Stewart 1980) takes nothing from the daytime
//!   demand, while intercepted water evaporated in daylight wets the canopy and stops
//!   transpiration meanwhile. `β` is therefore at most the daylight share of the
//!   interception loss, 0.5–0.6; since a wet canopy evaporates faster than a dry one
//!   transpires, the demand actually displaced is less. The default takes the upper
//!   end, 0.6, which gives the smaller (conservative) yield loss of the two ends and
//!   keeps the humid-site loss within the 30–45 % field range (β = 0.5 gives 46.0 % at
//!   P 1300, E0 800).
//! * The grass/tussock curve is left as it is: its interception is inside the curve
//!   (small, slow wet-canopy evaporation; Murray et al.).
//! * Use this or a forest PET factor of 1.28 (Zhang et al. 2001's E0 1410/1100 mm),
//!   not both: both represent the forest's extra demand, and together they give
//!   49–59 % loss at P 1300–1500, E0 700–800 mm, above the field range.
//! * Gash reduction: every rain day is one storm of equal depth; trunk storage and
//!   stemflow are left out; `Ē_c/R̄` and `S_c` are constant through the year.
//!
//! # Choosing the forest's extra water use (whole catchment tussock → closed conifer)
//! Yield loss `100·(Q_grass − Q_forest)/Q_grass`, Zhang curves `w` 2.0 forest, 0.5
//! grass, full canopy (`f_c = 1`); values are computed in this file's tests:
//!
//! | P mm | E0 mm | Q grass mm | today (factor 1, no I) | A: E0_f = 1.28·E0 | B: c_i 0.25, β 0.6 |
//! |---|---|---|---|---|---|
//! | 1300 | 700 | 772 | 20.5 % | 36.3 % | 38.5 % (298 mm) |
//! | 1300 | 800 | 720 | 23.9 % | 40.5 % | 43.4 % (312 mm) |
//! | 1400 | 750 | 834 | 20.4 % | 36.1 % | 38.4 % (320 mm) |
//! | 1500 | 700 | 952 | 16.0 % | 31.9 % | 31.7 % (302 mm) |
//! | 1500 | 800 | 895 | 20.3 % | 36.0 % | 38.2 % (342 mm) |
//! | 2000 | 750 | 1384 | 9.7 % | 24.9 % | 24.1 % (334 mm) |
//! | 1000 | 800 | 472 | 31.2 % | 48.7 % | 52.8 % (249 mm) |
//! | 800 | 900 | 290 | 40.8 % | 58.2 % | 63.6 % (184 mm) |
//! | 600 | 1000 | 148 | 50.7 % | 66.9 % | 72.8 % (108 mm) |
//!
//! Field ranges: 30–45 % for tussock/grass to pine at such humid sites (issue
//! records); pines on grassland 40 ± 3 % on average, proportional losses larger and
//! absolute losses smaller at drier sites (Farley et al. 2005); about 40 mm/yr per
//! 10 % of conifer cover, i.e. about 400 mm at full cover (Bosch & Hewlett 1982).
//! Option B (the default here) gives 31.7–43.4 % over P 1300–1500, E0 700–800 mm,
//! 298–342 mm; at most 373 mm for P ≤ 2500 mm, E0 ≤ 800 mm; and at dry sites
//! (grass runoff 150–400 mm) 60–73 %, below the total losses recorded at dry
//! grassland (a stream dried up at Mokobulaan: Scott & Lesch 1997). Option A gives
//! 31.9–40.5 % in the humid box and somewhat smaller losses at dry sites.
//!
//! # References
//! * Fahey, B. D. (1994). *New Zealand Journal of Forestry*, 39(3), 18–25 (abstract:
//!   forests change yield mainly through increased canopy interception; tussock
//!   grassland to forest 25–30 %). From memory: title "The effect of plantation
//!   forestry on water yield in New Zealand".
//! * Murray, D. L., Jackson, R. M., Campbell, D. I., & Fahey, B. D. Predicting effects of
//!   modifying tussock grassland. ASCE conference proceedings paper, year not confirmed
//!   (abstract: snow tussock lysimeter in Otago; tussock transpiration similar to forest
//!   in rate and controls, wet-canopy interception losses at lower rates than forest).
//! * Pearce, A. J., Rowe, L. K., & Stewart, J. B. (1980). Nighttime, wet canopy
//!   evaporation rates and the water balance of an evergreen mixed forest. *Water
//!   Resources Research*, 16(5), 955–959 (abstract: 0.37 mm/h by night and by day,
//!   advected energy; night losses 40–50 % of gross interception). From memory:
//!   journal volume and pages.
//! * Interception fractions (abstracts confirmed): radiata pine, New Zealand, 9–27 %
//!   of rainfall over sites of 800–3000 mm, lowest at the driest (Meason et al. 2025,
//!   *New Zealand Journal of Forestry* 70(1), 25–32); old-growth Douglas-fir–western
//!   hemlock 22.8 % and 25.0 % (Link, Unsworth & Marks 2004, *Agricultural and Forest
//!   Meteorology* 124, 171–191); pole-stage lodgepole pine 33, 29, 26 % in three years,
//!   29 % on average (UK; From memory: Anderson & Pyatt 1986, *Forestry* 59, 29–38);
//!   evergreen beech forest, Nelson, 29 % of 1530 mm (Rowe 1983, *Journal of Hydrology*
//!   66; From memory: volume).
//! * Zhang, L., Dawes, W. R., & Walker, G. R. (2001). *Water Resources Research*, 37(3),
//!   701–708 (w 2.0/0.5; E0 1410 mm forest, 1100 mm grass).
//! * Farley, K. A., Jobbágy, E. G., & Jackson, R. B. (2005). *Global Change Biology*, 11,
//!   1565–1576. Bosch, J. M., & Hewlett, J. D. (1982). *Journal of Hydrology*, 55, 3–23.
//! * Gash, J. H. C. (1979). An analytical model of rainfall interception by forests.
//!   *Quarterly Journal of the Royal Meteorological Society*, 105, 43–55. Gash, J. H. C.,
//!   Lloyd, C. R., & Lachaud, G. (1995). Estimating sparse forest rainfall interception
//!   with an analytical model. *Journal of Hydrology*, 170, 79–86.

use super::budyko::{CoverCurves, WaterBalance};

/// Why interception parameters were refused. Each message states the rule.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum InterceptionError {
    /// Interception fraction outside 0..=0.6 or not finite.
    Fraction(f64),
    /// Demand share outside 0..=1 or not finite.
    DemandShare(f64),
    /// Canopy cover outside (0, 1] or not finite.
    Cover(f64),
    /// Canopy storage negative or not finite.
    Storage(f64),
    /// Evaporation-to-rainfall-rate ratio outside (0, 1) or not finite.
    EvaporationRatio(f64),
    /// Rain days below 1 or not finite.
    RainDays(f64),
}

impl std::fmt::Display for InterceptionError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            InterceptionError::Fraction(v) => write!(f, "interception fraction {v} is not allowed: it must be a finite number in 0..=0.6 (closed conifer canopies in humid climates: about 0.22-0.29)"),
            InterceptionError::DemandShare(v) => write!(f, "interception demand share {v} is not allowed: it must be a finite number in 0..=1"),
            InterceptionError::Cover(v) => write!(f, "canopy cover {v} is not allowed: it must be a finite number above 0 and at most 1"),
            InterceptionError::Storage(v) => write!(f, "canopy storage {v} mm is not allowed: it must be a finite number at or above 0"),
            InterceptionError::EvaporationRatio(v) => write!(f, "ratio of wet-canopy evaporation rate to rainfall rate {v} is not allowed: it must be a finite number above 0 and below 1"),
            InterceptionError::RainDays(v) => write!(f, "{v} rain days per year is not allowed: it must be a finite number at or above 1"),
        }
    }
}

impl std::error::Error for InterceptionError {}

/// Interception loss of a closed canopy and how it shares the evaporative demand.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CanopyInterception {
    fraction_of_rain: f64,
    demand_share: f64,
}

impl CanopyInterception {
    /// Largest allowed interception fraction (mature, dense spruce reaches about 0.5).
    pub const MAX_FRACTION: f64 = 0.6;
    /// Default interception fraction `c_i` of a closed conifer canopy in a humid climate.
    /// Source: confirmed closed-conifer averages 0.228–0.29, single years to 0.33, New
    /// Zealand radiata up to 0.27 (module header, References).
    pub const DEFAULT_FRACTION: f64 = 0.25;
    /// Default demand share `β` (module header, Assumptions). Source: upper end of the
    /// daylight share 0.5–0.6 implied by night losses of 40–50 % (Pearce et al. 1980).
    pub const DEFAULT_DEMAND_SHARE: f64 = 0.6;
    /// No interception term: forest ET is the forest curve alone (today's behaviour).
    pub const NONE: CanopyInterception = CanopyInterception { fraction_of_rain: 0.0, demand_share: 0.0 };
    /// The recommended default: `c_i` = 0.25, `β` = 0.6.
    pub const DEFAULT: CanopyInterception =
        CanopyInterception { fraction_of_rain: Self::DEFAULT_FRACTION, demand_share: Self::DEFAULT_DEMAND_SHARE };

    /// Interception fraction `c_i` (0..=0.6) and demand share `β` (0..=1), checked.
    pub fn new(fraction_of_rain: f64, demand_share: f64) -> Result<CanopyInterception, InterceptionError> {
        if !(fraction_of_rain.is_finite() && (0.0..=Self::MAX_FRACTION).contains(&fraction_of_rain)) {
            return Err(InterceptionError::Fraction(fraction_of_rain));
        }
        if !(demand_share.is_finite() && (0.0..=1.0).contains(&demand_share)) {
            return Err(InterceptionError::DemandShare(demand_share));
        }
        Ok(CanopyInterception { fraction_of_rain, demand_share })
    }

    /// Interception fraction `c_i`.
    pub fn fraction_of_rain(&self) -> f64 {
        self.fraction_of_rain
    }

    /// Demand share `β`.
    pub fn demand_share(&self) -> f64 {
        self.demand_share
    }

    /// Interception loss `I = c_i·P`, mm/yr (negative rainfall counts as 0).
    #[inline]
    pub fn interception_mm(&self, rain_mm: f64) -> f64 {
        self.fraction_of_rain * rain_mm.max(0.0)
    }

    /// Demand left for transpiration, `E0_T = max(E0_f − β·I, 0)`, mm/yr.
    #[inline]
    pub fn transpiration_pet_mm(&self, rain_mm: f64, pet_forest_mm: f64) -> f64 {
        (pet_forest_mm - self.demand_share * self.interception_mm(rain_mm)).max(0.0)
    }

    /// Closed-canopy evapotranspiration `I + f(P − I, E0_T)`, mm/yr, with any curve `f`.
    /// Always in `0..=max(rain_mm, 0)`.
    #[inline]
    pub fn et_mm<W: WaterBalance>(&self, curve: &W, rain_mm: f64, pet_forest_mm: f64) -> f64 {
        let i = self.interception_mm(rain_mm);
        i + curve.et_mm(rain_mm - i, self.transpiration_pet_mm(rain_mm, pet_forest_mm))
    }

    /// Closed-canopy evapotranspiration with a scenario's forest curve, mm/yr.
    #[inline]
    pub fn forest_et_mm(&self, curves: &CoverCurves, rain_mm: f64, pet_forest_mm: f64) -> f64 {
        let i = self.interception_mm(rain_mm);
        i + curves.forest_et_mm(rain_mm - i, self.transpiration_pet_mm(rain_mm, pet_forest_mm))
    }
}

/// Catchment evapotranspiration for a mixed cover with canopy interception, mm/yr:
/// `f_c·[I + f_forest(P − I, E0_T)] + (1 − f_c)·f_grass(P, E0)`.
///
/// With [`CanopyInterception::NONE`] this equals [`super::budyko::mixed_et_mm`] exactly.
#[inline]
pub fn mixed_et_mm(
    curves: &CoverCurves,
    interception: &CanopyInterception,
    rain_mm: f64,
    pet_forest_mm: f64,
    pet_grass_mm: f64,
    canopy_fraction: f64,
) -> f64 {
    let f = canopy_fraction.clamp(0.0, 1.0);
    f * interception.forest_et_mm(curves, rain_mm, pet_forest_mm) + (1.0 - f) * curves.grass_et_mm(rain_mm, pet_grass_mm)
}

/// Canopy properties of the sparse-canopy analytical interception model (Gash et al.
/// 1995), for an annual estimate of the interception fraction (module header).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct GashCanopy {
    cover: f64,
    storage_mm: f64,
    evaporation_to_rain_ratio: f64,
}

impl GashCanopy {
    /// Canopy cover `c` in (0, 1], storage per unit cover area `S_c` (mm, ≥ 0) and
    /// `Ē_c/R̄` in (0, 1), checked.
    pub fn new(cover: f64, storage_mm: f64, evaporation_to_rain_ratio: f64) -> Result<GashCanopy, InterceptionError> {
        if !(cover.is_finite() && cover > 0.0 && cover <= 1.0) {
            return Err(InterceptionError::Cover(cover));
        }
        if !(storage_mm.is_finite() && storage_mm >= 0.0) {
            return Err(InterceptionError::Storage(storage_mm));
        }
        let r = evaporation_to_rain_ratio;
        if !(r.is_finite() && r > 0.0 && r < 1.0) {
            return Err(InterceptionError::EvaporationRatio(r));
        }
        Ok(GashCanopy { cover, storage_mm, evaporation_to_rain_ratio: r })
    }

    /// Rain needed to saturate the canopy, `P'_G = −(R̄/Ē_c)·S_c·ln(1 − Ē_c/R̄)`, mm.
    pub fn saturating_rain_mm(&self) -> f64 {
        let r = self.evaporation_to_rain_ratio;
        -(self.storage_mm / r) * (-r).ln_1p()
    }

    /// Annual interception loss, mm/yr, for `rain_mm` falling on `rain_days_per_yr`
    /// equal storms (module header). Refuses fewer than one rain day.
    pub fn annual_interception_mm(&self, rain_mm: f64, rain_days_per_yr: f64) -> Result<f64, InterceptionError> {
        if !(rain_days_per_yr.is_finite() && rain_days_per_yr >= 1.0) {
            return Err(InterceptionError::RainDays(rain_days_per_yr));
        }
        let p = rain_mm.max(0.0);
        let n = rain_days_per_yr;
        let p_sat = self.saturating_rain_mm();
        let c = self.cover;
        Ok(if p / n < p_sat { c * p } else { n * c * p_sat + c * self.evaporation_to_rain_ratio * (p - n * p_sat) })
    }

    /// Interception fraction `I/P` for the same inputs (0 when `rain_mm ≤ 0`), usable
    /// as `c_i` in [`CanopyInterception::new`] when it does not exceed 0.6.
    pub fn fraction_of_rain(&self, rain_mm: f64, rain_days_per_yr: f64) -> Result<f64, InterceptionError> {
        let i = self.annual_interception_mm(rain_mm, rain_days_per_yr)?;
        Ok(if rain_mm > 0.0 { i / rain_mm } else { 0.0 })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::budyko::{mixed_et_mm as budyko_mixed_et_mm, Fu1981, Zhang2001};
    use approx::assert_abs_diff_eq;

    const ZHANG: CoverCurves = CoverCurves::ZHANG_DEFAULT;
    /// Source: Zhang, Dawes & Walker (2001): simplified curves with E0 1410 mm forest,
    /// 1100 mm grass (ratio 1.2818).
    const ZHANG_PET_RATIO: f64 = 1410.0 / 1100.0;

    /// Whole-catchment yield loss, %, grass → closed canopy with `interception` and forest
    /// PET `factor·E0`.
    fn loss_pct(interception: &CanopyInterception, factor: f64, rain_mm: f64, pet_mm: f64) -> f64 {
        let q_grass = rain_mm - mixed_et_mm(&ZHANG, interception, rain_mm, factor * pet_mm, pet_mm, 0.0);
        let q_forest = rain_mm - mixed_et_mm(&ZHANG, interception, rain_mm, factor * pet_mm, pet_mm, 1.0);
        100.0 * (q_grass - q_forest) / q_grass
    }

    fn loss_mm(interception: &CanopyInterception, factor: f64, rain_mm: f64, pet_mm: f64) -> f64 {
        mixed_et_mm(&ZHANG, interception, rain_mm, factor * pet_mm, pet_mm, 1.0)
            - mixed_et_mm(&ZHANG, interception, rain_mm, factor * pet_mm, pet_mm, 0.0)
    }

    /// The humid box of the issue: P 1300–1500 mm, E0 700–800 mm, every 50 mm.
    fn humid_box() -> Vec<(f64, f64)> {
        let mut v = Vec::new();
        for p in [1300.0, 1350.0, 1400.0, 1450.0, 1500.0] {
            for e in [700.0, 725.0, 750.0, 775.0, 800.0] {
                v.push((p, e));
            }
        }
        v
    }

    #[test]
    fn zero_interception_is_todays_forest_curve_bit_for_bit() {
        let none = CanopyInterception::NONE;
        let zero_with_share = CanopyInterception::new(0.0, 0.7).unwrap();
        let fu = CoverCurves::Fu { omega_forest: 2.9, omega_grass: 2.2 };
        for &p in &[0.0, 1.0, 300.0, 1400.0, 5000.0] {
            for &e in &[0.0, 1.0, 700.0, 1410.0, 3000.0] {
                for curves in [ZHANG, fu] {
                    assert_eq!(none.forest_et_mm(&curves, p, e), curves.forest_et_mm(p, e));
                    assert_eq!(zero_with_share.forest_et_mm(&curves, p, e), curves.forest_et_mm(p, e));
                    for f in [0.0, 0.3, 1.0] {
                        assert_eq!(mixed_et_mm(&curves, &none, p, 1.1 * e, e, f), budyko_mixed_et_mm(&curves, p, 1.1 * e, e, f));
                    }
                }
                assert_eq!(none.et_mm(&Zhang2001 { w: 2.0 }, p, e), Zhang2001 { w: 2.0 }.et_mm(p, e));
            }
        }
    }

    #[test]
    fn evapotranspiration_stays_between_zero_and_rain() {
        let cases = [CanopyInterception::DEFAULT, CanopyInterception::new(0.6, 0.0).unwrap(), CanopyInterception::new(0.6, 1.0).unwrap()];
        let fu = Fu1981 { omega: 2.6 };
        for ci in cases {
            for &p in &[-5.0, 0.0, 1e-9, 10.0, 500.0, 1400.0, 4000.0, 1e9] {
                for &e in &[-1.0, 0.0, 100.0, 750.0, 2000.0, 1e9] {
                    let et = ci.forest_et_mm(&ZHANG, p, e);
                    assert!(et.is_finite() && et >= 0.0 && et <= p.max(0.0) * (1.0 + 1e-15), "{ci:?} P {p} E0 {e}: {et}");
                    let et_fu = ci.et_mm(&fu, p, e);
                    assert!(et_fu >= 0.0 && et_fu <= p.max(0.0) * (1.0 + 1e-15));
                    // With β = 0 the interception term never makes the forest use less water
                    // than no term (a Budyko curve rises by at most 1 mm per mm of rain).
                    if ci.demand_share() == 0.0 {
                        assert!(et >= ZHANG.forest_et_mm(p, e) - 1e-9 * p.abs().max(1.0), "P {p} E0 {e}");
                    }
                }
            }
        }
    }

    #[test]
    fn formula_written_out_at_one_humid_point() {
        // Hand computation: P 1400, E0 750, c_i 0.25, β 0.6: I = 350; E0_T = 750 − 210 = 540;
        // P − I = 1050, φ = 540/1050 = 0.514286; Zhang w 2 (eq. 8 in the form
        // 1 − 1/(1 + φ + wφ²)): 1 + 0.514286 + 0.528980 = 2.043265 → ET/P 0.510588 →
        // 536.117 mm (< E0_T, not capped). ET_forest = 886.117 mm, above E0 = 750.
        let ci = CanopyInterception::DEFAULT;
        assert_abs_diff_eq!(ci.interception_mm(1400.0), 350.0, epsilon = 1e-12);
        assert_abs_diff_eq!(ci.transpiration_pet_mm(1400.0, 750.0), 540.0, epsilon = 1e-12);
        assert_abs_diff_eq!(ci.forest_et_mm(&ZHANG, 1400.0, 750.0), 886.117, epsilon = 1e-3);
    }

    #[test]
    fn todays_default_is_below_the_field_records_in_the_humid_box() {
        // Source: issue text: default parameters give 15–23 % (22 years on); published
        // records for tussock/grass to pine at such sites are about 30–45 %.
        // Full closure here: 16.0–23.9 %, all below 30 %.
        let (mut lo, mut hi) = (f64::MAX, f64::MIN);
        for (p, e) in humid_box() {
            let l = loss_pct(&CanopyInterception::NONE, 1.0, p, e);
            lo = lo.min(l);
            hi = hi.max(l);
        }
        assert_abs_diff_eq!(lo, 16.0, epsilon = 0.1);
        assert_abs_diff_eq!(hi, 23.9, epsilon = 0.1);
        assert!(hi < 30.0);
    }

    #[test]
    fn both_options_land_in_the_field_range_in_the_humid_box() {
        // Source: issue text (records about 30–45 % at P 1300–1500, E0 700–800 mm);
        // Farley et al. (2005): pines on grassland 40 ± 3 % on average.
        let b = CanopyInterception::DEFAULT;
        let (mut a_lo, mut a_hi, mut b_lo, mut b_hi) = (f64::MAX, f64::MIN, f64::MAX, f64::MIN);
        for (p, e) in humid_box() {
            let a = loss_pct(&CanopyInterception::NONE, ZHANG_PET_RATIO, p, e);
            let l = loss_pct(&b, 1.0, p, e);
            assert!((30.0..=45.0).contains(&a), "option A at P {p} E0 {e}: {a}");
            assert!((30.0..=45.0).contains(&l), "option B at P {p} E0 {e}: {l}");
            (a_lo, a_hi, b_lo, b_hi) = (a_lo.min(a), a_hi.max(a), b_lo.min(l), b_hi.max(l));
        }
        // Derived here (Zhang 2001 eq. 8; independent hand-coded check of the table):
        // A 31.9–40.5 %, B 31.7–43.4 %.
        assert_abs_diff_eq!(a_lo, 31.9, epsilon = 0.1);
        assert_abs_diff_eq!(a_hi, 40.5, epsilon = 0.1);
        assert_abs_diff_eq!(b_lo, 31.7, epsilon = 0.1);
        assert_abs_diff_eq!(b_hi, 43.4, epsilon = 0.1);
        // The centre of the box is close to Farley's 40 ± 3 % for pines on grassland.
        assert_abs_diff_eq!(loss_pct(&b, 1.0, 1400.0, 750.0), 38.4, epsilon = 0.1);
        // β at the other end of its evidence range (0.5) overshoots 45 % at P 1300, E0 800.
        let b05 = CanopyInterception::new(0.25, 0.5).unwrap();
        assert_abs_diff_eq!(loss_pct(&b05, 1.0, 1300.0, 800.0), 46.0, epsilon = 0.1);
    }

    #[test]
    fn the_header_table_is_what_the_code_computes() {
        // (P, E0, Q grass, today %, option A %, option B %, option B mm), module header table.
        let rows = [
            (1300.0, 700.0, 772.0, 20.5, 36.3, 38.5, 298.0),
            (1300.0, 800.0, 720.0, 23.9, 40.5, 43.4, 312.0),
            (1400.0, 750.0, 834.0, 20.4, 36.1, 38.4, 320.0),
            (1500.0, 700.0, 952.0, 16.0, 31.9, 31.7, 302.0),
            (1500.0, 800.0, 895.0, 20.3, 36.0, 38.2, 342.0),
            (2000.0, 750.0, 1384.0, 9.7, 24.9, 24.1, 334.0),
            (1000.0, 800.0, 472.0, 31.2, 48.7, 52.8, 249.0),
            (800.0, 900.0, 290.0, 40.8, 58.2, 63.6, 184.0),
            (600.0, 1000.0, 148.0, 50.7, 66.9, 72.8, 108.0),
        ];
        let none = CanopyInterception::NONE;
        let b = CanopyInterception::DEFAULT;
        for (p, e, q, today, a, b_pct, b_mm) in rows {
            assert_abs_diff_eq!(p - ZHANG.grass_et_mm(p, e), q, epsilon = 0.5);
            assert_abs_diff_eq!(loss_pct(&none, 1.0, p, e), today, epsilon = 0.05);
            assert_abs_diff_eq!(loss_pct(&none, ZHANG_PET_RATIO, p, e), a, epsilon = 0.05);
            assert_abs_diff_eq!(loss_pct(&b, 1.0, p, e), b_pct, epsilon = 0.05);
            assert_abs_diff_eq!(loss_mm(&b, 1.0, p, e), b_mm, epsilon = 0.5);
        }
    }

    #[test]
    fn combining_both_options_double_counts() {
        // Interception and the 1.28 PET factor both stand for the forest's extra demand:
        // together they give 48.9–59.0 % in the humid box, above the 30–45 % records.
        for (p, e) in humid_box() {
            let l = loss_pct(&CanopyInterception::DEFAULT, ZHANG_PET_RATIO, p, e);
            assert!(l > 45.0, "P {p} E0 {e}: {l}");
        }
    }

    #[test]
    fn wetter_and_drier_sites_follow_the_published_pattern() {
        // Source: Farley, Jobbágy & Jackson (2005): for grasslands, absolute reductions
        // greatest at wetter sites, proportional reductions larger at drier sites.
        // Bosch & Hewlett (1982): about 40 mm/yr per 10 % conifer cover (≈ 400 mm at 100 %).
        let b = CanopyInterception::DEFAULT;
        for e in [700.0, 800.0] {
            let mut last_pct = 0.0;
            let mut last_mm = f64::MAX;
            for p in [2500.0, 2000.0, 1500.0, 1200.0, 1000.0, 800.0, 600.0, 500.0, 400.0] {
                let pct = loss_pct(&b, 1.0, p, e);
                let mm = loss_mm(&b, 1.0, p, e);
                assert!(pct > last_pct, "proportional loss should grow towards dry sites: P {p} E0 {e}: {pct} %");
                assert!(mm < last_mm, "absolute loss should fall towards dry sites: P {p} E0 {e}: {mm} mm after {last_mm}");
                assert!(mm <= 400.0, "absolute loss above Bosch & Hewlett's ~400 mm at full cover: P {p} E0 {e}: {mm}");
                assert!(pct < 100.0);
                last_pct = pct;
                last_mm = mm;
            }
        }
        // Derived here: 18.2 % (345 mm) at P 2500, E0 700; 373 mm at P 2500, E0 800 (the most
        // in this range); 72.8 % (108 mm) at P 600, E0 1000.
        assert_abs_diff_eq!(loss_pct(&b, 1.0, 2500.0, 700.0), 18.2, epsilon = 0.1);
        assert_abs_diff_eq!(loss_mm(&b, 1.0, 2500.0, 700.0), 345.1, epsilon = 0.2);
        assert_abs_diff_eq!(loss_mm(&b, 1.0, 2500.0, 800.0), 373.2, epsilon = 0.2);
        assert_abs_diff_eq!(loss_pct(&b, 1.0, 600.0, 1000.0), 72.8, epsilon = 0.1);
        // Dry grassland records reach far higher proportional losses (a stream dried up by
        // about year 12 at Mokobulaan, natural runoff ≈ 217 mm: Scott & Lesch 1997, secondary
        // summary), so 60–73 % at sites yielding 150–400 mm under grass does not exceed them.
        assert_abs_diff_eq!(loss_pct(&b, 1.0, 800.0, 900.0), 63.6, epsilon = 0.1);
    }

    #[test]
    fn glendhu_is_not_exceeded() {
        // Source: Fahey & Jackson (1997): 67 % of the catchment planted in pine; yield 270 mm/yr
        // lower on average over 1991–1996, 31 % of the tussock control's runoff (≈ 870 mm,
        // derived). From memory: upland tussock rainfall there ≈ 1350 mm. With P = 1350 mm,
        // E0 = 607.9 mm makes the Zhang grass curve yield the control's 870 mm (derived by
        // bisection on Zhang 2001 eq. 8, w = 0.5).
        let (p, e) = (1350.0, 607.9);
        let q_grass = p - mixed_et_mm(&ZHANG, &CanopyInterception::DEFAULT, p, e, e, 0.0);
        assert_abs_diff_eq!(q_grass, 870.0, epsilon = 0.5);
        let q_planted = p - mixed_et_mm(&ZHANG, &CanopyInterception::DEFAULT, p, e, e, 0.67);
        let loss = q_grass - q_planted;
        // The default gives 176 mm (20.2 %): below the record, i.e. conservative there. The
        // control yields so much that the w = 0.5 grass curve matches it only with this low
        // E0, where the transpiration demand E0_T caps the forest curve; both options
        // (A gives 180 mm) under-predict this record by about a third.
        assert_abs_diff_eq!(loss, 176.2, epsilon = 1.0);
        assert!(loss < 270.0);
    }

    #[test]
    fn gash_annual_reduction_limits_and_continuity() {
        // Derived from Gash et al. (1995): as Ē_c/R̄ → 0, P'_G → S_c (−ln(1 − x)/x → 1)
        // and I → n·c·S_c (the store filled and dried once per storm).
        let g = GashCanopy::new(0.8, 1.5, 1e-9).unwrap();
        assert_abs_diff_eq!(g.saturating_rain_mm(), 1.5, epsilon = 1e-8);
        assert_abs_diff_eq!(g.annual_interception_mm(1500.0, 150.0).unwrap(), 150.0 * 0.8 * 1.5, epsilon = 1e-5);
        // Written out: S_c 1.2 mm, Ē_c/R̄ 0.15: P'_G = −(1.2/0.15)·ln(0.85) = 8 × 0.162519 =
        // 1.300151 mm; c 1, n 160, P 1400: I = 160 × 1.300151 + 0.15 × (1400 − 208.024) =
        // 208.024 + 178.796 = 386.820 mm (27.6 % of P).
        let g = GashCanopy::new(1.0, 1.2, 0.15).unwrap();
        assert_abs_diff_eq!(g.saturating_rain_mm(), 1.300151, epsilon = 1e-6);
        assert_abs_diff_eq!(g.annual_interception_mm(1400.0, 160.0).unwrap(), 386.820, epsilon = 1e-3);
        // Continuity where the storms just saturate the canopy (P/n = P'_G): both branches give c·P.
        let n = 100.0;
        let p_edge = n * g.saturating_rain_mm();
        assert_abs_diff_eq!(g.annual_interception_mm(p_edge, n).unwrap(), p_edge, epsilon = 1e-9);
        assert_abs_diff_eq!(g.annual_interception_mm(p_edge * (1.0 - 1e-12), n).unwrap(), p_edge, epsilon = 1e-6);
        // With many large storms the fraction tends to c·Ē_c/R̄.
        assert_abs_diff_eq!(g.fraction_of_rain(1e9, 160.0).unwrap(), 0.15, epsilon = 1e-6);
        // Small storms only: everything the canopy catches is lost.
        let sparse = GashCanopy::new(0.6, 2.0, 0.2).unwrap();
        assert_abs_diff_eq!(sparse.fraction_of_rain(100.0, 100.0).unwrap(), 0.6, epsilon = 1e-12);
        assert_eq!(sparse.fraction_of_rain(0.0, 100.0).unwrap(), 0.0);
    }

    #[test]
    fn parameters_outside_their_ranges_are_refused_with_the_rule() {
        for c in [-0.01, 0.61, f64::NAN, f64::INFINITY] {
            let e = CanopyInterception::new(c, 0.6).unwrap_err();
            assert!(e.to_string().contains("must be a finite number in 0..=0.6"), "{e}");
        }
        for b in [-0.1, 1.1, f64::NAN] {
            assert!(matches!(CanopyInterception::new(0.25, b), Err(InterceptionError::DemandShare(_))));
        }
        assert_eq!(CanopyInterception::new(0.25, 0.6).unwrap(), CanopyInterception::DEFAULT);
        assert!(matches!(GashCanopy::new(0.0, 1.0, 0.1), Err(InterceptionError::Cover(_))));
        assert!(matches!(GashCanopy::new(1.0, -1.0, 0.1), Err(InterceptionError::Storage(_))));
        assert!(matches!(GashCanopy::new(1.0, 1.0, 1.0), Err(InterceptionError::EvaporationRatio(_))));
        let g = GashCanopy::new(1.0, 1.0, 0.1).unwrap();
        assert!(matches!(g.annual_interception_mm(1000.0, 0.5), Err(InterceptionError::RainDays(_))));
        assert!(matches!(g.annual_interception_mm(1000.0, f64::NAN), Err(InterceptionError::RainDays(_))));
    }
}
