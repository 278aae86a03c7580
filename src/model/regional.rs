//! A curve parameter over a region: which long-term records can be fitted at all,
//! the distribution of the values fitted at gauged catchments, and a distribution
//! fitted to them for ungauged catchments.
//!
//! # Formula
//! **Water and energy limits.** A long-term record with mean rainfall `P`, PET `E0`
//! and flow `Q` (mm/yr) has evapotranspiration `ET = P − Q`. Every Budyko-type curve
//! lies in `0 < ET ≤ min(P, E0)` (Budyko 1974), so a record is outside the curves,
//! and left out by [`limit_violation`], when
//! * `ET ≤ 0` (`Q ≥ P`, evaporative ratio `ET/P ≤ 0`: [`LimitViolation::NoEvaporation`]), or
//! * `ET > E0` (above the energy limit: [`LimitViolation::AboveEnergyLimit`]).
//!
//! `ET > P` (the water limit) needs `Q < 0`, which the input reader refuses.
//!
//! **Summary** ([`summarise`]) of `n` fitted values `θ_i`: mean `θ̄`, sample
//! standard deviation `s = √(Σ(θ_i − θ̄)²/(n − 1))`, and the sample quantiles
//! `q_p` at `p` ∈ [`QUANTILE_PROBS`] (Hyndman & Fan 1996 definition 7,
//! [`super::stats::percentile_sorted`]).
//!
//! **Distribution for ungauged catchments** ([`fit_distribution`]), one of the
//! scenario file's distributions ([`super::uncertainty::Distribution`]), chosen by
//! the data from two candidates:
//! * *truncated normal*: `μ = θ̄`, `σ = s`, truncated to the parameter's allowed
//!   range `[lo, hi]` (moment estimates of the untruncated normal);
//! * *Beta-PERT*: `min = q_e`, `max = q_(1−e)` (sample quantiles, held within
//!   `[lo, hi]`) and the mode `m` at which the PERT median equals the sample median
//!   `q_0.5`, found by Brent's root finder ([`super::roots::brent_root`]; when no
//!   mode in `[min, max]` reaches it, the nearer end). The tail share `e` is chosen
//!   in `[0, `[`PERT_MAX_TAIL`]`]` to minimise the misfit `D` below: a scan of
//!   [`PERT_GRID`] values refined by Brent's minimiser ([`super::roots::brent_minimum`]).
//!
//! * *log-normal*: `median = exp(mean of ln θ_i)`, `σ_ln` = sample standard deviation
//!   of `ln θ_i`, truncated to `[lo, hi]` as the scenario reader truncates it.
//!
//! Each candidate's misfit is `D = Σ_p (F⁻¹(p) − q_p)² / (q_0.75 − q_0.25)²` over
//! `p` ∈ [`QUANTILE_PROBS`], with `F⁻¹` the candidate's inverse CDF; the smaller `D`
//! is chosen (in the order normal, log-normal, PERT on a tie). The normal suits a
//! symmetric spread; the log-normal a positive one with a long upper tail (typical
//! of Zhang's `w`); the PERT a bounded, skewed one.
//!
//! # Symbols
//! * `θ` — the fitted parameter (Zhang's `w` or Fu's `ω`), dimensionless.
//! * `P`, `E0`, `Q`, `ET` — long-term mean rainfall, PET, flow and evapotranspiration, mm/yr.
//! * `n` — fitted catchments, at least [`MIN_CATCHMENTS`] for a distribution.
//! * `lo`, `hi` — the parameter's allowed range (from the parameter table).
//!
//! # Assumptions
//! * The gauged catchments are a sample of the catchments the distribution is for;
//!   a parameter fitted in one region need not transfer to another (Reaver et al.
//!   2022 found `n` and `w` not transferable between catchments), so the distribution
//!   is a screening prior, not a prediction.
//! * The fitted values are treated as independent draws; spatial correlation
//!   between neighbouring catchments is ignored.
//!
//! # References
//! Budyko, M. I. (1974). *Climate and Life*. Academic Press, New York.
//!
//! Hyndman, R. J., & Fan, Y. (1996). Sample quantiles in statistical packages.
//! *The American Statistician*, 50(4), 361–365.
//!
//! Vose, D. (2008). *Risk Analysis: A Quantitative Guide* (3rd ed.). Wiley (Beta-PERT).
//!
//! Reaver, N. G. F., Kaplan, D. A., Klammler, H., & Jawitz, J. W. (2022). Theoretical
//! and empirical evidence against the Budyko catchment trajectory conjecture.
//! *Hydrology and Earth System Sciences*, 26, 1507–1525. doi:10.5194/hess-26-1507-2022

use super::roots::{brent_minimum, brent_root};
use super::stats::percentile_sorted;
use super::uncertainty::Distribution;
use std::fmt;

/// Probabilities of the quantiles reported and matched: 5, 25, 50, 75 and 95 %.
pub const QUANTILE_PROBS: [f64; 5] = [0.05, 0.25, 0.5, 0.75, 0.95];
/// Fewest fitted catchments for a regional distribution.
pub const MIN_CATCHMENTS: usize = 5;
/// Largest tail share `e` of the PERT candidate's ends (`min = q_e`, `max = q_(1−e)`).
pub const PERT_MAX_TAIL: f64 = 0.1;
/// Values of `e` scanned before Brent's minimiser refines the best.
pub const PERT_GRID: usize = 21;

/// Why a long-term record lies outside every Budyko-type curve.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LimitViolation {
    /// `ET = P − Q ≤ 0`: the flow is not below the rainfall.
    NoEvaporation,
    /// `ET = P − Q > E0`: more evaporation than the energy limit allows.
    AboveEnergyLimit,
}

impl LimitViolation {
    /// Short code written in tables.
    pub fn code(self) -> &'static str {
        match self {
            LimitViolation::NoEvaporation => "no_evaporation",
            LimitViolation::AboveEnergyLimit => "above_energy_limit",
        }
    }
}

/// Checks a long-term record against the water and energy limits (all mm/yr).
pub fn limit_violation(rain_mm: f64, pet_mm: f64, flow_mm: f64) -> Option<LimitViolation> {
    let et = rain_mm - flow_mm;
    if !(et > 0.0) {
        Some(LimitViolation::NoEvaporation)
    } else if et > pet_mm {
        Some(LimitViolation::AboveEnergyLimit)
    } else {
        None
    }
}

/// Summary of fitted values.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Summary {
    /// Values summarised.
    pub n: usize,
    /// Mean.
    pub mean: f64,
    /// Sample standard deviation (divisor `n − 1`).
    pub sd: f64,
    /// Smallest value.
    pub min: f64,
    /// Largest value.
    pub max: f64,
    /// Quantiles at [`QUANTILE_PROBS`].
    pub quantiles: [f64; 5],
}

impl Summary {
    /// The median.
    pub fn median(&self) -> f64 {
        self.quantiles[2]
    }

    /// Interquartile range.
    pub fn iqr(&self) -> f64 {
        self.quantiles[3] - self.quantiles[1]
    }
}

/// Summarises `values` (at least 2, all finite); `None` otherwise.
pub fn summarise(values: &[f64]) -> Option<Summary> {
    if values.len() < 2 || values.iter().any(|v| !v.is_finite()) {
        return None;
    }
    let mut s = values.to_vec();
    s.sort_by(f64::total_cmp);
    let n = s.len();
    let mean = s.iter().sum::<f64>() / n as f64;
    let sd = (s.iter().map(|v| (v - mean) * (v - mean)).sum::<f64>() / (n - 1) as f64).sqrt();
    let quantiles = QUANTILE_PROBS.map(|p| percentile_sorted(&s, p));
    Some(Summary { n, mean, sd, min: s[0], max: s[n - 1], quantiles })
}

/// The candidate shapes of a regional distribution.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Shape {
    /// Normal truncated to the allowed range.
    TruncatedNormal,
    /// Log-normal truncated to the allowed range.
    LogNormal,
    /// Beta-PERT.
    Pert,
}

impl Shape {
    /// Name as written in outputs.
    pub fn name(self) -> &'static str {
        match self {
            Shape::TruncatedNormal => "truncated normal",
            Shape::LogNormal => "log-normal",
            Shape::Pert => "Beta-PERT",
        }
    }
}

/// One candidate distribution and its misfit.
#[derive(Debug, Clone, PartialEq)]
pub struct Candidate {
    /// Shape.
    pub shape: Shape,
    /// The distribution, as the scenario reader builds it.
    pub dist: Distribution,
    /// Quantile misfit `D` (dimensionless).
    pub misfit: f64,
    /// The candidate's quantiles at [`QUANTILE_PROBS`].
    pub quantiles: [f64; 5],
}

/// The regional distribution chosen, with both candidates.
#[derive(Debug, Clone, PartialEq)]
pub struct RegionalFit {
    /// Index of the chosen candidate in `candidates`.
    pub chosen: usize,
    /// Truncated normal, log-normal, then Beta-PERT.
    pub candidates: Vec<Candidate>,
}

impl RegionalFit {
    /// The chosen candidate.
    pub fn best(&self) -> &Candidate {
        &self.candidates[self.chosen]
    }
}

/// Why no regional distribution could be fitted.
#[derive(Debug, Clone, PartialEq)]
pub enum RegionalError {
    /// Fewer than [`MIN_CATCHMENTS`] fitted values.
    TooFew {
        /// Values available.
        n: usize,
    },
    /// The values do not spread (standard deviation or interquartile range 0).
    NoSpread,
    /// A candidate could not be built (not expected for valid inputs).
    Candidate(String),
}

impl fmt::Display for RegionalError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            RegionalError::TooFew { n } => {
                write!(f, "only {n} catchment(s) fitted; a regional distribution needs at least {MIN_CATCHMENTS}")
            }
            RegionalError::NoSpread => write!(f, "the fitted values do not spread (their quartiles are equal); no distribution is fitted"),
            RegionalError::Candidate(m) => write!(f, "no distribution could be built: {m}"),
        }
    }
}

impl std::error::Error for RegionalError {}

fn candidate(shape: Shape, dist: Distribution, s: &Summary) -> Result<Candidate, RegionalError> {
    dist.validate().map_err(RegionalError::Candidate)?;
    let quantiles = QUANTILE_PROBS.map(|p| dist.quantile(p));
    let misfit = misfit_of(&dist, s);
    Ok(Candidate { shape, dist, misfit, quantiles })
}

/// The PERT with ends at the sample quantiles `e` and `1 − e` of `sorted` and its
/// median at the sample median, within `bounds`; `None` when the ends meet.
fn pert_for_tail(sorted: &[f64], median: f64, e: f64, bounds: (f64, f64)) -> Option<Distribution> {
    let a = percentile_sorted(sorted, e).clamp(bounds.0, bounds.1);
    let b = percentile_sorted(sorted, 1.0 - e).clamp(bounds.0, bounds.1);
    if !(b > a) {
        return None;
    }
    let median_at = |m: f64| Distribution::Pert { min: a, mode: m, max: b }.quantile(0.5) - median;
    let mode = if median_at(a) >= 0.0 {
        a
    } else if median_at(b) <= 0.0 {
        b
    } else {
        brent_root(median_at, a, b, 1e-12 * (b - a)).ok()?.x
    };
    Some(Distribution::Pert { min: a, mode, max: b })
}

fn misfit_of(dist: &Distribution, s: &Summary) -> f64 {
    let iqr2 = s.iqr() * s.iqr();
    QUANTILE_PROBS.iter().zip(&s.quantiles).map(|(&p, q)| (dist.quantile(p) - q).powi(2)).sum::<f64>() / iqr2
}

/// Fits the regional distribution to the fitted `values` within the parameter's
/// allowed range `bounds`.
pub fn fit_distribution(values: &[f64], bounds: (f64, f64)) -> Result<RegionalFit, RegionalError> {
    let (lo, hi) = bounds;
    let Some(s) = summarise(values) else { return Err(RegionalError::TooFew { n: values.len() }) };
    if s.n < MIN_CATCHMENTS {
        return Err(RegionalError::TooFew { n: s.n });
    }
    if !(s.sd > 0.0 && s.iqr() > 0.0) {
        return Err(RegionalError::NoSpread);
    }
    let mut sorted = values.to_vec();
    sorted.sort_by(f64::total_cmp);
    let normal = Distribution::Normal { mean: s.mean.clamp(lo, hi), sd: s.sd, min: lo, max: hi };
    let cost = |e: f64| pert_for_tail(&sorted, s.median(), e, bounds).map(|d| misfit_of(&d, &s)).unwrap_or(f64::INFINITY);
    let grid: Vec<f64> = (0..PERT_GRID).map(|j| PERT_MAX_TAIL * j as f64 / (PERT_GRID - 1) as f64).collect();
    let costs: Vec<f64> = grid.iter().map(|&e| cost(e)).collect();
    let best = costs.iter().enumerate().fold(0, |b, (j, c)| if *c < costs[b] { j } else { b });
    let (ga, gb) = (grid[best.saturating_sub(1)], grid[(best + 1).min(PERT_GRID - 1)]);
    let e = match brent_minimum(cost, ga, gb, 1e-6) {
        Ok(sol) if sol.fx < costs[best] => sol.x,
        _ => grid[best],
    };
    let pert = pert_for_tail(&sorted, s.median(), e, bounds).ok_or(RegionalError::NoSpread)?;
    let logs: Vec<f64> = values.iter().map(|v| v.max(f64::MIN_POSITIVE).ln()).collect();
    let log_mean = logs.iter().sum::<f64>() / logs.len() as f64;
    let log_sd = (logs.iter().map(|l| (l - log_mean).powi(2)).sum::<f64>() / (logs.len() - 1) as f64).sqrt();
    let log_normal =
        Distribution::LogNormal { median: log_mean.exp(), sigma_log: log_sd }.truncated(lo, hi).map_err(RegionalError::Candidate)?;
    let candidates = vec![
        candidate(Shape::TruncatedNormal, normal, &s)?,
        candidate(Shape::LogNormal, log_normal, &s)?,
        candidate(Shape::Pert, pert, &s)?,
    ];
    let chosen = (1..candidates.len()).fold(0, |b, i| if candidates[i].misfit < candidates[b].misfit { i } else { b });
    Ok(RegionalFit { chosen, candidates })
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    #[test]
    fn limits_are_the_water_and_energy_limits() {
        // Source: Budyko (1974): 0 < ET ≤ min(P, E0) for a long-term balance.
        assert_eq!(limit_violation(1000.0, 800.0, 1000.0), Some(LimitViolation::NoEvaporation));
        assert_eq!(limit_violation(1000.0, 800.0, 1200.0), Some(LimitViolation::NoEvaporation));
        assert_eq!(limit_violation(1000.0, 800.0, 150.0), Some(LimitViolation::AboveEnergyLimit));
        assert_eq!(limit_violation(1000.0, 800.0, 200.0), None); // ET = E0 exactly is on the limit
        assert_eq!(limit_violation(1000.0, 800.0, 500.0), None);
    }

    #[test]
    fn summary_matches_hand_values() {
        // Common practice, no published source: mean, n − 1 standard deviation and
        // the linear-interpolation quantiles of 1..=5.
        let s = summarise(&[5.0, 1.0, 3.0, 2.0, 4.0]).unwrap();
        assert_eq!(s.n, 5);
        assert_abs_diff_eq!(s.mean, 3.0);
        assert_abs_diff_eq!(s.sd, 2.5f64.sqrt(), epsilon = 1e-12);
        assert_abs_diff_eq!(s.quantiles[0], 1.2, epsilon = 1e-12);
        assert_abs_diff_eq!(s.quantiles[2], 3.0);
        assert_abs_diff_eq!(s.quantiles[4], 4.8, epsilon = 1e-12);
        assert!(summarise(&[1.0]).is_none());
        assert!(summarise(&[1.0, f64::NAN]).is_none());
    }

    #[test]
    fn each_shape_is_chosen_for_a_sample_of_its_own_kind() {
        // Symmetric: evenly spaced normal scores around 3 (quantiles of N(3, 0.8)).
        let normal = Distribution::Normal { mean: 3.0, sd: 0.8, min: f64::NEG_INFINITY, max: f64::INFINITY };
        let sym: Vec<f64> = (0..400).map(|i| normal.quantile((i as f64 + 0.5) / 400.0)).collect();
        let fit = fit_distribution(&sym, (1.01, 20.0)).unwrap();
        assert_eq!(fit.best().shape, Shape::TruncatedNormal, "{fit:?}");
        // Skewed: quantiles of a log-normal with median 1.6 and sigma_log 0.7.
        let ln = Distribution::LogNormal { median: 1.6, sigma_log: 0.7 };
        let skew: Vec<f64> = (0..400).map(|i| ln.quantile((i as f64 + 0.5) / 400.0)).collect();
        let s = summarise(&skew).unwrap();
        let fit = fit_distribution(&skew, (0.01, 20.0)).unwrap();
        assert_eq!(fit.best().shape, Shape::LogNormal, "{fit:?}");
        assert_abs_diff_eq!(fit.best().dist.quantile(0.5), s.median(), epsilon = 0.01);
        // The PERT candidate's median is the sample median, and its quantiles come
        // close to a PERT sample's.
        let pert = Distribution::Pert { min: 1.0, mode: 1.5, max: 4.0 };
        let bounded: Vec<f64> = (0..400).map(|i| pert.quantile((i as f64 + 0.5) / 400.0)).collect();
        let s = summarise(&bounded).unwrap();
        let fit = fit_distribution(&bounded, (1.01, 20.0)).unwrap();
        let c = &fit.candidates[2];
        assert_eq!(c.shape, Shape::Pert);
        assert_abs_diff_eq!(c.dist.quantile(0.5), s.median(), epsilon = 1e-9);
        assert!(c.misfit < 0.1, "{c:?}");
    }

    #[test]
    fn too_few_or_no_spread_is_an_error() {
        assert_eq!(fit_distribution(&[1.0, 2.0, 3.0], (0.01, 20.0)), Err(RegionalError::TooFew { n: 3 }));
        assert_eq!(fit_distribution(&[2.0; 8], (0.01, 20.0)), Err(RegionalError::NoSpread));
    }
}
