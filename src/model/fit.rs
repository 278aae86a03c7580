//! Fitting a catchment's water-balance curve parameter to its gauge record.
//!
//! One parameter is fitted per catchment — the grass/tussock curve parameter by
//! default (Zhang's `w_grass` or Fu's `omega_grass`), or the forest one — with
//! every other parameter held at the catchment's scenario value. The catchment's
//! current cover is held over the whole record (canopy fraction `f` from
//! [`super::projection::starting_canopy_fraction`]).
//!
//! # Formula
//! Simulated yield of record year `t` for parameter value `θ` (the projection's
//! own formula, [`super::projection::et_and_yield_mm`]; Zhang et al. 2001 mixing):
//!
//! `Q_t(θ) = P_t − [f·ET_forest(P_t, E0f_t) + (1 − f)·ET_grass(P_t, E0_t)]`
//!
//! where the fitted cover's curve uses `θ`. `Q_t` falls monotonically as `θ` rises
//! (more evaporation), which both fits rely on.
//!
//! 1. **Long-term mean fit.** The root `θ_mean` of
//!    `g(θ) = (1/n)·Σ_t Q_t(θ) − (1/n)·Σ_t Q_obs,t`
//!    on the parameter's allowed range, found by Brent's bracketed method
//!    ([`super::roots::brent_root`]) to `1e-12` in `θ` (see [`ROOT_TOL`]). The
//!    fitted model therefore reproduces the observed mean yield over the years
//!    used (percent bias 0). When `g` has no sign change on the range, the
//!    observed mean is impossible for the curve and a [`FitError`] says which way.
//!    A mean-annual record ([`GaugeRecord::long_term`]) is the case `n = 1`: the
//!    root of `Q(θ) − Q_obs` for the long-term means themselves.
//! 2. **Annual-series fit.** The minimum of the sum of squares
//!    `S(θ) = Σ_w (Q̄_w(θ) − Q̄_obs,w)²` over the allowed range, where `Q̄_w` is the
//!    mean of window `w` of `k` consecutive calendar years (`k = 1`: the annual
//!    yields themselves). Windows never span a year left out of the record. `S` is
//!    scanned on [`GRID_POINTS`] log-spaced values and the best grid bracket
//!    refined by Brent's minimiser ([`super::roots::brent_minimum`]).
//! 3. **Bootstrap interval.** The `n` record years are resampled with replacement
//!    `B` times and the long-term mean fit repeated on each resample; the
//!    interval is the percentile interval (Efron & Tibshirani 1993) at level
//!    `1 − α`: the `α/2` and `1 − α/2` quantiles of the `B` fitted values
//!    ([`super::stats::percentile_sorted`]: Hyndman & Fan 1996 definition 7, linear
//!    interpolation between order statistics at `h = (B − 1)·p`). A
//!    resample whose mean is impossible for the curve counts at the bound it
//!    points to (reported as `at_bound`).
//! 4. **Random numbers.** The model's one seeded stream,
//!    [`super::uncertainty::stream`]`(seed, d, b)`: resample `b` (0-based) draws its
//!    `n` year indices, each uniform on `0..n` (`rand`'s unbiased integer
//!    sampling), from its own stream, in sampling dimension
//!    `d = stable_hash("fit.bootstrap@<catchment id>")` ([`BOOTSTRAP_DIMENSION`]
//!    without `@<id>` for a record built without a catchment id;
//!    [`super::uncertainty::stable_hash`]). Resample `b` therefore depends only on
//!    the seed, the catchment and `b` — not on `B` or on other catchments.
//!
//! # Symbols
//! * `θ` — the fitted parameter: Zhang's `w` (dimensionless, allowed
//!   [`ZHANG_W_RANGE`]) or Fu's `ω` (dimensionless, allowed [`FU_OMEGA_RANGE`]),
//!   the same ranges the scenario file accepts.
//! * `P_t` — rainfall, mm/yr; `E0_t`, `E0f_t` — grass and forest PET, mm/yr.
//! * `Q_obs,t` — observed yield (gauged flow depth), mm/yr.
//! * `f` — ET-equivalent forest (canopy) fraction of the catchment, 0–1.
//! * `k` — moving-average window, years (1–[`MAX_MOVING_AVERAGE_YR`]).
//! * `B` — bootstrap resamples; `α` — 1 − interval level.
//!
//! # Assumptions
//! * Today's cover stood over the whole record; if the invasion grew during the
//!   record, the fitted grass parameter absorbs part of that change.
//! * A mean-annual curve applied to single years ignores storage carry-over
//!   between years; the moving average damps it for the series fit, and the
//!   long-term mean fit (the value written for scenarios) is the least affected.
//! * The bootstrap treats years as independent; persistent (autocorrelated)
//!   records make the interval too narrow.
//!
//! # References
//! Zhang, L., Dawes, W. R., & Walker, G. R. (2001). Response of mean annual
//! evapotranspiration to vegetation changes at catchment scale. *Water Resources
//! Research*, 37(3), 701–708. doi:10.1029/2000WR900325
//!
//! Fu, B. P. (1981). On the calculation of the evaporation from land surface.
//! *Scientia Atmospherica Sinica*, 5(1), 23–31.
//!
//! Brent, R. P. (1973). *Algorithms for Minimization without Derivatives*.
//! Prentice-Hall.
//!
//! Efron, B., & Tibshirani, R. J. (1993). *An Introduction to the Bootstrap*.
//! Chapman & Hall, New York.
//!
//! Hyndman, R. J., & Fan, Y. (1996). Sample quantiles in statistical packages.
//! *The American Statistician*, 50(4), 361–365.

use super::budyko::CoverCurves;
use super::catchment::{Catchment, ClimateYear, ModelParams};
use super::interception::{mixed_et_mm, CanopyInterception};
use super::params::ParamId;
use super::projection::starting_canopy_fraction;
use super::roots::{brent_minimum, brent_root, RootError};
use super::stats::percentile_sorted;
use super::uncertainty::{stable_hash, stream};
use rand::RngExt;
use std::fmt;

/// Allowed range of Zhang's `w` for fitting (the scenario file's range, from the parameter table).
pub const ZHANG_W_RANGE: (f64, f64) = ParamId::WGrass.range().bounds();
/// Allowed range of Fu's `ω` for fitting (the scenario file's range, from the parameter table).
pub const FU_OMEGA_RANGE: (f64, f64) = ParamId::OmegaGrass.range().bounds();
/// Fewest record years (and moving-average windows) a fit accepts.
pub const MIN_YEARS: usize = 3;
/// Longest moving-average window, years.
pub const MAX_MOVING_AVERAGE_YR: usize = 15;
/// Absolute tolerance of the long-term mean fit in the parameter.
pub const ROOT_TOL: f64 = 1e-12;
/// Absolute tolerance of the series fit's minimiser in the parameter (its
/// relative resolution is also limited to about `1.5e-8·θ` by the method).
pub const SERIES_TOL: f64 = 1e-10;
/// Grid values scanned before the series fit's minimiser refines the best one.
pub const GRID_POINTS: usize = 121;
/// The `year` of the single entry of a long-term mean record ([`GaugeRecord::long_term`]).
pub const LONG_TERM_YEAR: i32 = 0;
/// Key of the bootstrap's sampling dimension; a record with a catchment id uses
/// `"fit.bootstrap@<id>"` ([`GaugeRecord::bootstrap_dimension`]).
pub const BOOTSTRAP_DIMENSION: &str = "fit.bootstrap";

/// Which cover's curve parameter is fitted.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Cover {
    /// Grass, tussock and other short vegetation (`w_grass` / `omega_grass`).
    Grass,
    /// Forest: existing forest and closed invader canopy (`w_forest` / `omega_forest`).
    Forest,
}

impl Cover {
    /// `grass` or `forest`.
    pub fn name(self) -> &'static str {
        match self {
            Cover::Grass => "grass",
            Cover::Forest => "forest",
        }
    }

    /// The scenario key of this cover's parameter under `curves`' method
    /// (`w_grass`, `w_forest`, `omega_grass`, `omega_forest`).
    pub fn key(self, curves: &CoverCurves) -> &'static str {
        match (curves, self) {
            (CoverCurves::Zhang { .. }, Cover::Grass) => "w_grass",
            (CoverCurves::Zhang { .. }, Cover::Forest) => "w_forest",
            (CoverCurves::Fu { .. }, Cover::Grass) => "omega_grass",
            (CoverCurves::Fu { .. }, Cover::Forest) => "omega_forest",
        }
    }

    /// This cover's parameter value in `curves`.
    pub fn value(self, curves: &CoverCurves) -> f64 {
        match (*curves, self) {
            (CoverCurves::Zhang { w_grass, .. }, Cover::Grass) => w_grass,
            (CoverCurves::Zhang { w_forest, .. }, Cover::Forest) => w_forest,
            (CoverCurves::Fu { omega_grass, .. }, Cover::Grass) => omega_grass,
            (CoverCurves::Fu { omega_forest, .. }, Cover::Forest) => omega_forest,
        }
    }

    /// `curves` with this cover's parameter set to `value` (the other unchanged).
    pub fn with_value(self, curves: &CoverCurves, value: f64) -> CoverCurves {
        match (*curves, self) {
            (CoverCurves::Zhang { w_forest, .. }, Cover::Grass) => CoverCurves::Zhang { w_forest, w_grass: value },
            (CoverCurves::Zhang { w_grass, .. }, Cover::Forest) => CoverCurves::Zhang { w_forest: value, w_grass },
            (CoverCurves::Fu { omega_forest, .. }, Cover::Grass) => CoverCurves::Fu { omega_forest, omega_grass: value },
            (CoverCurves::Fu { omega_grass, .. }, Cover::Forest) => CoverCurves::Fu { omega_forest: value, omega_grass },
        }
    }

    /// Allowed range of the parameter under `curves`' method.
    pub fn bounds(self, curves: &CoverCurves) -> (f64, f64) {
        let id = match (curves, self) {
            (CoverCurves::Zhang { .. }, Cover::Grass) => ParamId::WGrass,
            (CoverCurves::Zhang { .. }, Cover::Forest) => ParamId::WForest,
            (CoverCurves::Fu { .. }, Cover::Grass) => ParamId::OmegaGrass,
            (CoverCurves::Fu { .. }, Cover::Forest) => ParamId::OmegaForest,
        };
        id.range().bounds()
    }
}

/// Why a fit could not be made. Every message says what was wrong and what is allowed.
#[derive(Debug, Clone, PartialEq)]
pub enum FitError {
    /// Too few record years (or moving-average windows) to fit.
    TooFewYears {
        /// Years (or windows) available.
        available: usize,
        /// Fewest accepted ([`MIN_YEARS`]).
        needed: usize,
        /// Window length, years (1 for plain years).
        window_yr: usize,
    },
    /// A record year holds an impossible value.
    InvalidYear {
        /// The year.
        year: i32,
        /// What is wrong.
        what: String,
    },
    /// The canopy fraction is not within 0–1.
    InvalidCanopyFraction(f64),
    /// The fitted cover is absent, so the parameter has no effect on yield.
    NoSensitivity {
        /// The cover whose parameter was to be fitted.
        cover: Cover,
        /// The catchment's canopy fraction.
        canopy_fraction: f64,
    },
    /// The observed mean yield is not below the mean rainfall.
    MeanYieldNotBelowRain {
        /// Mean observed yield, mm/yr.
        observed_mm: f64,
        /// Mean rainfall of the same years, mm/yr.
        rain_mm: f64,
    },
    /// The observed mean yield is above what the curve gives even at the lowest
    /// allowed parameter (the catchment would need less evaporation than the curve allows).
    MeanYieldAboveCurve {
        /// Mean observed yield, mm/yr.
        observed_mm: f64,
        /// Highest mean yield the curve gives on the allowed range, mm/yr.
        highest_mm: f64,
        /// Parameter key (`w_grass`, ...).
        key: &'static str,
        /// The lower bound of the parameter, where that highest yield is reached.
        bound: f64,
    },
    /// The observed mean yield is below what the curve gives even at the highest
    /// allowed parameter (the catchment would need more evaporation than the curve allows).
    MeanYieldBelowCurve {
        /// Mean observed yield, mm/yr.
        observed_mm: f64,
        /// Lowest mean yield the curve gives on the allowed range, mm/yr.
        lowest_mm: f64,
        /// Parameter key.
        key: &'static str,
        /// The upper bound of the parameter, where that lowest yield is reached.
        bound: f64,
    },
    /// The moving-average window is outside 1–[`MAX_MOVING_AVERAGE_YR`] years.
    InvalidWindow(usize),
    /// Bootstrap settings are invalid (fewer than 2 resamples, or a level outside 0–1).
    InvalidBootstrap {
        /// Resamples asked for.
        samples: usize,
        /// Interval level asked for.
        level: f64,
    },
    /// The numerical method failed (not expected for valid inputs).
    Numerical(RootError),
}

impl fmt::Display for FitError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            FitError::TooFewYears { available, needed, window_yr: 1 } => {
                write!(f, "only {available} year(s) with both an observed flow and climate; at least {needed} are needed")
            }
            FitError::TooFewYears { available, needed, window_yr } => write!(
                f,
                "only {available} window(s) of {window_yr} consecutive years; at least {needed} are needed (use a shorter moving average)"
            ),
            FitError::InvalidYear { year, what } => write!(f, "year {year}: {what}"),
            FitError::InvalidCanopyFraction(v) => write!(f, "canopy fraction {v} is outside 0–1"),
            FitError::NoSensitivity { cover, canopy_fraction } => write!(
                f,
                "the {} parameter cannot be fitted: the catchment has canopy fraction {canopy_fraction:.4}, so {} cover has no effect on its yield; fit the {} parameter instead",
                cover.name(),
                cover.name(),
                match cover {
                    Cover::Grass => "forest",
                    Cover::Forest => "grass",
                }
            ),
            FitError::MeanYieldNotBelowRain { observed_mm, rain_mm } => write!(
                f,
                "mean observed yield {observed_mm:.1} mm/yr is not below the mean rainfall of the same years ({rain_mm:.1} mm/yr); \
                 no evaporation curve can produce it — check the flow units, the catchment area and the climate table"
            ),
            FitError::MeanYieldAboveCurve { observed_mm, highest_mm, key, bound } => write!(
                f,
                "mean observed yield {observed_mm:.1} mm/yr is more than the curve gives even at the lowest allowed {key} = {bound} \
                 ({highest_mm:.1} mm/yr); the record needs less evaporation than the curve allows — check the flow units, the area, \
                 the rainfall, or whether the gauge receives water from outside the catchment"
            ),
            FitError::MeanYieldBelowCurve { observed_mm, lowest_mm, key, bound } => write!(
                f,
                "mean observed yield {observed_mm:.1} mm/yr is less than the curve gives even at the highest allowed {key} = {bound} \
                 ({lowest_mm:.1} mm/yr); the record needs more evaporation than the curve allows — check the flow units, the area, \
                 the rainfall, or for abstractions and losses upstream of the gauge"
            ),
            FitError::InvalidWindow(k) => write!(f, "moving average of {k} years is outside the allowed 1 to {MAX_MOVING_AVERAGE_YR} years"),
            FitError::InvalidBootstrap { samples, level } => {
                write!(f, "bootstrap of {samples} resamples at level {level}: needs at least 2 resamples and a level strictly between 0 and 1")
            }
            FitError::Numerical(e) => write!(f, "numerical failure: {e}"),
        }
    }
}

impl std::error::Error for FitError {}

/// One record year: climate and observed yield.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct GaugeYear {
    /// Calendar year.
    pub year: i32,
    /// Rainfall, mm/yr (> 0).
    pub rain_mm: f64,
    /// PET over grass, mm/yr (≥ 0).
    pub pet_mm: f64,
    /// PET over forest, mm/yr (≥ 0).
    pub pet_forest_mm: f64,
    /// Observed yield (gauged flow depth), mm/yr (≥ 0).
    pub observed_yield_mm: f64,
}

/// A catchment's gauge record, ready to fit: fixed cover, the curves to start
/// from and which cover's parameter is fitted.
#[derive(Debug, Clone, PartialEq)]
pub struct GaugeRecord {
    id: Option<String>,
    curves: CoverCurves,
    cover: Cover,
    canopy_fraction: f64,
    interception: CanopyInterception,
    years: Vec<GaugeYear>,
}

/// The long-term mean fit.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MeanFit {
    /// Fitted parameter value.
    pub value: f64,
    /// Mean observed yield of the years used, mm/yr.
    pub observed_mm: f64,
    /// Mean simulated yield at the fitted value, mm/yr (equals `observed_mm`).
    pub simulated_mm: f64,
    /// Mean rainfall of the years used, mm/yr.
    pub rain_mm: f64,
    /// Lowest and highest mean yield the curve can give on the allowed range, mm/yr.
    pub range_mm: (f64, f64),
    /// Function evaluations of the root finder.
    pub evaluations: usize,
}

/// Which bound a fitted value sits on.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Bound {
    /// The lower end of the allowed range.
    Lower,
    /// The upper end of the allowed range.
    Upper,
}

/// The annual-series (least-squares) fit.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SeriesFit {
    /// Fitted parameter value.
    pub value: f64,
    /// Sum of squared window residuals at the fitted value, mm².
    pub sse_mm2: f64,
    /// Moving-average window, years.
    pub window_yr: usize,
    /// Windows compared.
    pub windows: usize,
    /// Set when the minimum lies on a bound of the allowed range.
    pub at_bound: Option<Bound>,
}

/// A bootstrap percentile interval of the long-term mean fit.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BootstrapInterval {
    /// Interval level, e.g. 0.95.
    pub level: f64,
    /// Lower end (quantile `(1 − level)/2`).
    pub low: f64,
    /// Upper end (quantile `(1 + level)/2`).
    pub high: f64,
    /// Median of the resampled fits.
    pub median: f64,
    /// Resamples drawn.
    pub samples: usize,
    /// Resamples whose mean was impossible for the curve, counted at a bound.
    pub at_bound: usize,
    /// Seed of the random numbers.
    pub seed: u64,
}

/// Settings of [`GaugeRecord::fit`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FitSettings {
    /// Moving-average window of the series fit, years (1 = annual values).
    pub moving_average_yr: usize,
    /// Bootstrap resamples (0 = no interval).
    pub bootstrap_samples: usize,
    /// Seed of the bootstrap's random numbers.
    pub seed: u64,
    /// Interval level (e.g. 0.95).
    pub level: f64,
}

impl Default for FitSettings {
    fn default() -> Self {
        FitSettings { moving_average_yr: 1, bootstrap_samples: 1000, seed: 1, level: 0.95 }
    }
}

/// Everything fitted for one catchment.
#[derive(Debug, Clone, PartialEq)]
pub struct CatchmentFit {
    /// Parameter key (`w_grass`, ...).
    pub key: &'static str,
    /// The catchment's value before fitting (scenario or earlier calibration).
    pub scenario_value: f64,
    /// Long-term mean fit (the value written for scenarios).
    pub mean: MeanFit,
    /// Annual-series fit.
    pub series: SeriesFit,
    /// Bootstrap interval of the mean fit, when resamples were asked for.
    pub interval: Option<BootstrapInterval>,
}

impl GaugeRecord {
    /// A record from its parts, checking every value.
    ///
    /// `curves` are the catchment's curves before fitting; `canopy_fraction` is held
    /// over all years. Years are used in the order given (calendar order expected
    /// for the moving average; windows only join consecutive years).
    pub fn new(curves: CoverCurves, cover: Cover, canopy_fraction: f64, years: Vec<GaugeYear>) -> Result<GaugeRecord, FitError> {
        if !(0.0..=1.0).contains(&canopy_fraction) {
            return Err(FitError::InvalidCanopyFraction(canopy_fraction));
        }
        for y in &years {
            let bad = |what: &str| Err(FitError::InvalidYear { year: y.year, what: what.to_string() });
            if !(y.rain_mm.is_finite() && y.rain_mm > 0.0) {
                return bad("rainfall must be a positive number of mm/yr");
            }
            if !(y.pet_mm.is_finite() && y.pet_mm >= 0.0 && y.pet_forest_mm.is_finite() && y.pet_forest_mm >= 0.0) {
                return bad("PET must be a non-negative number of mm/yr");
            }
            if !(y.observed_yield_mm.is_finite() && y.observed_yield_mm >= 0.0) {
                return bad("observed yield must be a non-negative number of mm/yr");
            }
        }
        if years.len() < MIN_YEARS {
            return Err(FitError::TooFewYears { available: years.len(), needed: MIN_YEARS, window_yr: 1 });
        }
        Ok(GaugeRecord { id: None, curves, cover, canopy_fraction, interception: CanopyInterception::NONE, years })
    }

    /// A record of one long-term mean (the mean-annual fit mode): mean rainfall, PET
    /// and observed yield, all mm/yr, held as a single record entry with year
    /// [`LONG_TERM_YEAR`]. Only [`Self::fit_mean`] applies to it (the series fit and the
    /// bootstrap need [`MIN_YEARS`] years). Values are checked as in [`Self::new`].
    pub fn long_term(curves: CoverCurves, cover: Cover, canopy_fraction: f64, mean: GaugeYear) -> Result<GaugeRecord, FitError> {
        let mut three = GaugeRecord::new(curves, cover, canopy_fraction, vec![mean; MIN_YEARS])?;
        three.years.truncate(1);
        three.years[0].year = LONG_TERM_YEAR;
        Ok(three)
    }

    /// The record of catchment `c` under `params`: its curves (with any earlier
    /// calibration), its starting canopy fraction held over the record, and its
    /// forest PET. `years` are `(year, climate, observed yield mm/yr)`.
    pub fn for_catchment(
        c: &Catchment,
        params: &ModelParams,
        cover: Cover,
        years: &[(i32, ClimateYear, f64)],
    ) -> Result<GaugeRecord, FitError> {
        let years = years
            .iter()
            .map(|&(year, cl, q)| GaugeYear {
                year,
                rain_mm: cl.rain_mm,
                pet_mm: cl.pet_mm,
                pet_forest_mm: c.forest_pet_mm(cl.pet_mm, params.forest_pet_factor),
                observed_yield_mm: q,
            })
            .collect();
        Ok(GaugeRecord::new(*c.curves(params), cover, starting_canopy_fraction(c, params), years)?
            .with_id(&c.id)
            .with_interception(params.interception))
    }

    /// The same record with canopy interception on its forest share (a record made
    /// by [`Self::new`] has none; [`Self::for_catchment`] takes the scenario's).
    pub fn with_interception(self, interception: CanopyInterception) -> GaugeRecord {
        GaugeRecord { interception, ..self }
    }

    /// The same record labelled with catchment id `id`, which names the bootstrap's
    /// sampling dimension (so catchments fitted with one seed get independent resamples).
    pub fn with_id(self, id: &str) -> GaugeRecord {
        GaugeRecord { id: Some(id.to_string()), ..self }
    }

    /// The catchment id, when the record has one ([`Self::for_catchment`], [`Self::with_id`]).
    pub fn id(&self) -> Option<&str> {
        self.id.as_deref()
    }

    /// Sampling dimension of the bootstrap for [`super::uncertainty::stream`]:
    /// `stable_hash("fit.bootstrap@<id>")`, or `stable_hash("fit.bootstrap")` without an id.
    pub fn bootstrap_dimension(&self) -> u64 {
        match &self.id {
            Some(id) => stable_hash(&format!("{BOOTSTRAP_DIMENSION}@{id}")),
            None => stable_hash(BOOTSTRAP_DIMENSION),
        }
    }

    /// The record years.
    pub fn years(&self) -> &[GaugeYear] {
        &self.years
    }

    /// The canopy fraction held over the record.
    pub fn canopy_fraction(&self) -> f64 {
        self.canopy_fraction
    }

    /// The cover whose parameter is fitted.
    pub fn cover(&self) -> Cover {
        self.cover
    }

    /// The curves before fitting.
    pub fn curves(&self) -> &CoverCurves {
        &self.curves
    }

    /// Scenario key of the fitted parameter.
    pub fn key(&self) -> &'static str {
        self.cover.key(&self.curves)
    }

    /// The parameter's value before fitting.
    pub fn scenario_value(&self) -> f64 {
        self.cover.value(&self.curves)
    }

    /// Allowed range of the fitted parameter.
    pub fn bounds(&self) -> (f64, f64) {
        self.cover.bounds(&self.curves)
    }

    /// The curves with the fitted parameter set to `value`.
    pub fn curves_with(&self, value: f64) -> CoverCurves {
        self.cover.with_value(&self.curves, value)
    }

    fn yield_with(&self, curves: &CoverCurves, y: &GaugeYear) -> f64 {
        let et = mixed_et_mm(curves, &self.interception, y.rain_mm, y.pet_forest_mm, y.pet_mm, self.canopy_fraction);
        (y.rain_mm - et).max(0.0)
    }

    /// Simulated yield of every record year with the parameter at `value`, mm/yr.
    pub fn simulated_yield_mm(&self, value: f64) -> Vec<f64> {
        let curves = self.curves_with(value);
        self.years.iter().map(|y| self.yield_with(&curves, y)).collect()
    }

    /// Observed yield of every record year, mm/yr.
    pub fn observed_yield_mm(&self) -> Vec<f64> {
        self.years.iter().map(|y| y.observed_yield_mm).collect()
    }

    /// The catchment's evaporative ratio `ET/P` at aridity index `phi = E0/P`
    /// (grass PET over rainfall) with the parameter at `value`: the curve drawn in
    /// Budyko space. Forest PET is scaled from grass PET by the record's mean ratio.
    pub fn evaporative_ratio(&self, value: f64, phi: f64) -> f64 {
        let ratio = {
            let (sf, sg) = self.years.iter().fold((0.0, 0.0), |(a, b), y| (a + y.pet_forest_mm, b + y.pet_mm));
            if sg > 0.0 {
                sf / sg
            } else {
                1.0
            }
        };
        let rain = 1000.0;
        let pet = phi.max(0.0) * rain;
        mixed_et_mm(&self.curves_with(value), &self.interception, rain, pet * ratio, pet, self.canopy_fraction) / rain
    }

    fn check_sensitivity(&self) -> Result<(), FitError> {
        let absent = match self.cover {
            Cover::Grass => self.canopy_fraction >= 1.0,
            Cover::Forest => self.canopy_fraction <= 0.0,
        };
        if absent {
            return Err(FitError::NoSensitivity { cover: self.cover, canopy_fraction: self.canopy_fraction });
        }
        Ok(())
    }

    /// Weighted mean simulated yield, `Σ c_i·Q_i(θ) / Σ c_i`, over `(index, count)` pairs.
    fn weighted_mean_yield(&self, value: f64, counts: &[(usize, usize)], total: usize) -> f64 {
        let curves = self.curves_with(value);
        counts.iter().map(|&(i, c)| c as f64 * self.yield_with(&curves, &self.years[i])).sum::<f64>() / total as f64
    }

    /// Long-term mean fit over the years given as `(index, count)` pairs.
    fn mean_fit_on(&self, counts: &[(usize, usize)], total: usize) -> Result<MeanFit, FitError> {
        self.check_sensitivity()?;
        let wmean = |f: &dyn Fn(&GaugeYear) -> f64| counts.iter().map(|&(i, c)| c as f64 * f(&self.years[i])).sum::<f64>() / total as f64;
        let observed_mm = wmean(&|y| y.observed_yield_mm);
        let rain_mm = wmean(&|y| y.rain_mm);
        let (lo, hi) = self.bounds();
        let key = self.key();
        if observed_mm >= rain_mm {
            return Err(FitError::MeanYieldNotBelowRain { observed_mm, rain_mm });
        }
        let highest_mm = self.weighted_mean_yield(lo, counts, total);
        let lowest_mm = self.weighted_mean_yield(hi, counts, total);
        if highest_mm - lowest_mm <= 1e-9 * (1.0 + highest_mm.abs()) {
            return Err(FitError::NoSensitivity { cover: self.cover, canopy_fraction: self.canopy_fraction });
        }
        if observed_mm > highest_mm {
            return Err(FitError::MeanYieldAboveCurve { observed_mm, highest_mm, key, bound: lo });
        }
        if observed_mm < lowest_mm {
            return Err(FitError::MeanYieldBelowCurve { observed_mm, lowest_mm, key, bound: hi });
        }
        let sol =
            brent_root(|v| self.weighted_mean_yield(v, counts, total) - observed_mm, lo, hi, ROOT_TOL).map_err(FitError::Numerical)?;
        Ok(MeanFit {
            value: sol.x,
            observed_mm,
            simulated_mm: self.weighted_mean_yield(sol.x, counts, total),
            rain_mm,
            range_mm: (lowest_mm, highest_mm),
            evaluations: sol.evaluations,
        })
    }

    /// Fits the parameter so the mean simulated yield equals the mean observed yield.
    ///
    /// Errors when the observed mean is not below rainfall, or outside what the
    /// curve can give over the parameter's allowed range — never a clamped value.
    pub fn fit_mean(&self) -> Result<MeanFit, FitError> {
        let counts: Vec<(usize, usize)> = (0..self.years.len()).map(|i| (i, 1)).collect();
        self.mean_fit_on(&counts, self.years.len())
    }

    /// Windows of `k` consecutive calendar years: each is the list of year indices.
    pub fn windows(&self, k: usize) -> Vec<Vec<usize>> {
        let mut out = Vec::new();
        if k == 0 {
            return out;
        }
        let mut run_start = 0;
        for i in 0..self.years.len() {
            if i > run_start && self.years[i].year != self.years[i - 1].year + 1 {
                run_start = i;
            }
            if i + 1 >= run_start + k {
                out.push((i + 1 - k..=i).collect());
            }
        }
        out
    }

    /// Fits the parameter by least squares on annual yields (`moving_average_yr = 1`)
    /// or on `k`-year moving averages, within the allowed range.
    pub fn fit_series(&self, moving_average_yr: usize) -> Result<SeriesFit, FitError> {
        let k = moving_average_yr;
        if k == 0 || k > MAX_MOVING_AVERAGE_YR {
            return Err(FitError::InvalidWindow(k));
        }
        self.check_sensitivity()?;
        let windows = self.windows(k);
        if windows.len() < MIN_YEARS {
            return Err(FitError::TooFewYears { available: windows.len(), needed: MIN_YEARS, window_yr: k });
        }
        let obs: Vec<f64> = windows.iter().map(|w| w.iter().map(|&i| self.years[i].observed_yield_mm).sum::<f64>() / k as f64).collect();
        let sse = |v: f64| -> f64 {
            let sim = self.simulated_yield_mm(v);
            windows
                .iter()
                .zip(&obs)
                .map(|(w, o)| {
                    let s = w.iter().map(|&i| sim[i]).sum::<f64>() / k as f64;
                    (s - o) * (s - o)
                })
                .sum()
        };
        let (lo, hi) = self.bounds();
        let grid: Vec<f64> = (0..GRID_POINTS).map(|j| lo * (hi / lo).powf(j as f64 / (GRID_POINTS - 1) as f64)).collect();
        let values: Vec<f64> = grid.iter().map(|&v| sse(v)).collect();
        let best = values.iter().enumerate().fold(0, |b, (j, v)| if *v < values[b] { j } else { b });
        let a = grid[best.saturating_sub(1)];
        let b = grid[(best + 1).min(GRID_POINTS - 1)];
        let sol = brent_minimum(sse, a, b, SERIES_TOL).map_err(FitError::Numerical)?;
        // Keep the better of the refined point and the best grid value (the grid
        // includes both bounds, where the minimiser can only come within `tol`).
        let (value, sse_mm2) = if values[best] < sol.fx { (grid[best], values[best]) } else { (sol.x, sol.fx) };
        let span = hi - lo;
        let at_bound = if value - lo <= 1e-7 * span {
            Some(Bound::Lower)
        } else if hi - value <= 1e-7 * span {
            Some(Bound::Upper)
        } else {
            None
        };
        Ok(SeriesFit { value, sse_mm2, window_yr: k, windows: windows.len(), at_bound })
    }

    /// Bootstrap percentile interval of the long-term mean fit: `samples`
    /// resamples of the record years with replacement, seeded by `seed` (resample
    /// `b` from `uncertainty::stream(seed, self.bootstrap_dimension(), b)`).
    pub fn bootstrap_mean(&self, samples: usize, seed: u64, level: f64) -> Result<BootstrapInterval, FitError> {
        if samples < 2 || !(level > 0.0 && level < 1.0) {
            return Err(FitError::InvalidBootstrap { samples, level });
        }
        self.check_sensitivity()?;
        let n = self.years.len();
        let (lo, hi) = self.bounds();
        let dimension = self.bootstrap_dimension();
        let mut fitted = Vec::with_capacity(samples);
        let mut at_bound = 0;
        let mut counts = vec![0usize; n];
        let mut pairs = Vec::with_capacity(n);
        for b in 0..samples {
            let mut rng = stream(seed, dimension, b as u64);
            counts.iter_mut().for_each(|c| *c = 0);
            for _ in 0..n {
                counts[rng.random_range(0..n)] += 1;
            }
            pairs.clear();
            pairs.extend(counts.iter().enumerate().filter(|(_, &c)| c > 0).map(|(i, &c)| (i, c)));
            match self.mean_fit_on(&pairs, n) {
                Ok(m) => fitted.push(m.value),
                Err(FitError::MeanYieldAboveCurve { .. } | FitError::MeanYieldNotBelowRain { .. }) => {
                    fitted.push(lo);
                    at_bound += 1;
                }
                Err(FitError::MeanYieldBelowCurve { .. }) => {
                    fitted.push(hi);
                    at_bound += 1;
                }
                Err(e) => return Err(e),
            }
        }
        fitted.sort_by(f64::total_cmp);
        Ok(BootstrapInterval {
            level,
            low: percentile_sorted(&fitted, (1.0 - level) / 2.0),
            high: percentile_sorted(&fitted, (1.0 + level) / 2.0),
            median: percentile_sorted(&fitted, 0.5),
            samples,
            at_bound,
            seed,
        })
    }

    /// The long-term mean fit, the series fit and (when asked) the bootstrap interval.
    pub fn fit(&self, s: &FitSettings) -> Result<CatchmentFit, FitError> {
        let mean = self.fit_mean()?;
        let series = self.fit_series(s.moving_average_yr)?;
        let interval = if s.bootstrap_samples > 0 { Some(self.bootstrap_mean(s.bootstrap_samples, s.seed, s.level)?) } else { None };
        Ok(CatchmentFit { key: self.key(), scenario_value: self.scenario_value(), mean, series, interval })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    fn record(w: f64, f: f64) -> GaugeRecord {
        let curves = CoverCurves::Zhang { w_forest: 2.0, w_grass: 0.5 };
        let truth = Cover::Grass.with_value(&curves, w);
        let years = (0..12)
            .map(|t| {
                let rain_mm = 900.0 + 90.0 * ((t * 7) % 11) as f64;
                let pet_mm = 850.0 - 4.0 * t as f64;
                let et = mixed_et_mm(&truth, &CanopyInterception::NONE, rain_mm, pet_mm * 1.1, pet_mm, f);
                GaugeYear { year: 2000 + t, rain_mm, pet_mm, pet_forest_mm: pet_mm * 1.1, observed_yield_mm: rain_mm - et }
            })
            .collect();
        GaugeRecord::new(curves, Cover::Grass, f, years).unwrap()
    }

    #[test]
    fn windows_join_only_consecutive_years() {
        let mut r = record(0.7, 0.1);
        r.years.remove(5); // 2005 left out: runs 2000–2004 and 2006–2011
        assert_eq!(r.windows(1).len(), 11);
        let w3 = r.windows(3);
        assert!(w3.iter().all(|w| r.years[w[2]].year - r.years[w[0]].year == 2));
        assert_eq!(w3.len(), 3 + 4);
    }

    #[test]
    fn mean_and_series_fits_recover_the_generating_value() {
        let r = record(0.83, 0.2);
        assert_abs_diff_eq!(r.fit_mean().unwrap().value, 0.83, epsilon = 1e-9);
        assert_abs_diff_eq!(r.fit_series(1).unwrap().value, 0.83, epsilon = 1e-6);
        assert_abs_diff_eq!(r.fit_series(3).unwrap().value, 0.83, epsilon = 1e-6);
    }

    #[test]
    fn bootstrap_stream_is_named_by_the_catchment() {
        let r = GaugeRecord::new(CoverCurves::ZHANG_DEFAULT, Cover::Grass, 0.2, noisy_years()).unwrap();
        assert_eq!(r.id(), None);
        assert_eq!(r.bootstrap_dimension(), stable_hash("fit.bootstrap"));
        let a = r.clone().with_id("upper");
        assert_eq!(a.id(), Some("upper"));
        assert_eq!(a.bootstrap_dimension(), stable_hash("fit.bootstrap@upper"));
        // Same seed, same catchment: the same interval; another catchment id (or
        // seed) draws other resamples.
        let ia = a.bootstrap_mean(200, 5, 0.9).unwrap();
        assert_eq!(ia, a.bootstrap_mean(200, 5, 0.9).unwrap());
        let ib = r.clone().with_id("lower").bootstrap_mean(200, 5, 0.9).unwrap();
        assert_ne!((ia.low, ia.high), (ib.low, ib.high));
        let ic = a.bootstrap_mean(200, 6, 0.9).unwrap();
        assert_ne!((ia.low, ia.high), (ic.low, ic.high));
        assert!(ia.low < ia.high && ia.low <= ia.median && ia.median <= ia.high, "{ia:?}");
    }

    /// Twelve years whose yields do not lie on one curve, so resamples differ.
    fn noisy_years() -> Vec<GaugeYear> {
        let truth = CoverCurves::Zhang { w_forest: 2.0, w_grass: 0.8 };
        (0..12)
            .map(|t| {
                let rain_mm = 900.0 + 90.0 * ((t * 7) % 11) as f64;
                let pet_mm = 850.0 - 4.0 * t as f64;
                let et = mixed_et_mm(&truth, &CanopyInterception::NONE, rain_mm, pet_mm * 1.1, pet_mm, 0.2);
                let wiggle_mm = 40.0 * (((t * 5) % 7) as f64 - 3.0) / 3.0;
                GaugeYear { year: 2000 + t, rain_mm, pet_mm, pet_forest_mm: pet_mm * 1.1, observed_yield_mm: rain_mm - et + wiggle_mm }
            })
            .collect()
    }

    #[test]
    fn absent_cover_cannot_be_fitted() {
        let r = record(0.83, 0.0);
        let forest = GaugeRecord { cover: Cover::Forest, ..r };
        assert!(matches!(forest.fit_mean(), Err(FitError::NoSensitivity { cover: Cover::Forest, .. })));
    }
}
