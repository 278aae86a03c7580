//! Goodness of fit of a simulated series against an observed one: Nash–Sutcliffe
//! efficiency, Kling–Gupta efficiency, percent bias and root-mean-square error.
//!
//! # Formula
//! For simulated values `s_t` and observed values `o_t`, `t = 1..n`:
//!
//! * Nash–Sutcliffe efficiency (Nash & Sutcliffe 1970: their efficiency
//!   `R² = (F₀² − F²)/F₀²`, with `F²` the residual and `F₀²` the initial sum of squares):
//!   `NSE = 1 − Σ(s_t − o_t)² / Σ(o_t − ō)²`.
//!   1 is a perfect simulation; 0 means the simulation is no better than the
//!   observed mean; it is unbounded below.
//! * Kling–Gupta efficiency (Gupta et al. 2009; one minus the Euclidean distance
//!   from the ideal point of its three components):
//!   `KGE = 1 − √((r − 1)² + (α − 1)² + (β − 1)²)` with `r` the Pearson correlation
//!   of `s` and `o`, `α = σ_s/σ_o` (variability ratio) and `β = μ_s/μ_o`
//!   (bias ratio). Standard deviations use the same divisor for `s` and `o`, so `α`
//!   does not depend on it. 1 is a perfect simulation; `KGE = 1 − √2 ≈ −0.41`
//!   when simulating the observed mean.
//! * Percent bias: `PBIAS = 100 · Σ(s_t − o_t) / Σ o_t`, in %.
//!   **Sign convention: positive PBIAS means the simulation overestimates**
//!   (simulated total larger than observed). Some references and libraries
//!   (e.g. Moriasi et al. 2007 and the Python package hydroeval 0.1.0)
//!   define it as `100 · Σ(o_t − s_t)/Σ o_t`, the same magnitude with the opposite
//!   sign (positive = underestimation).
//! * Root-mean-square error: `RMSE = √(Σ(s_t − o_t)²/n)`, in the unit of the data
//!   (mm/yr for annual yield).
//!
//! # Symbols
//! * `s_t`, `o_t` — simulated and observed values (here annual water yield, mm/yr).
//! * `ō`, `μ` — means; `σ` — standard deviations; `n` — number of pairs.
//!
//! # Assumptions
//! Pairs are complete (no missing values: callers leave out years without an
//! observation). A statistic whose denominator is zero is undefined and reported
//! as an error rather than as NaN or infinity.
//!
//! # References
//! Nash, J. E., & Sutcliffe, J. V. (1970). River flow forecasting through
//! conceptual models part I — A discussion of principles. *Journal of Hydrology*,
//! 10(3), 282–290. doi:10.1016/0022-1694(70)90255-6
//!
//! Gupta, H. V., Kling, H., Yilmaz, K. K., & Martinez, G. F. (2009). Decomposition
//! of the mean squared error and NSE performance criteria: Implications for
//! improving hydrological modelling. *Journal of Hydrology*, 377(1–2), 80–91.
//! doi:10.1016/j.jhydrol.2009.08.003
//!
//! Moriasi, D. N., Arnold, J. G., Van Liew, M. W., Bingner, R. L., Harmel, R. D., &
//! Veith, T. L. (2007). Model evaluation guidelines for systematic quantification
//! of accuracy in watershed simulations. *Transactions of the ASABE*, 50(3), 885–900.

use std::fmt;

/// Why a statistic could not be computed.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SkillError {
    /// The simulated and observed series differ in length.
    LengthMismatch {
        /// Simulated values given.
        simulated: usize,
        /// Observed values given.
        observed: usize,
    },
    /// Fewer pairs than the statistic needs.
    TooFew {
        /// Pairs given.
        pairs: usize,
        /// Pairs needed.
        needed: usize,
    },
    /// A value is NaN or infinite.
    NotFinite {
        /// Position of the first such pair (0-based).
        index: usize,
    },
    /// Every observed value is the same, so the observed variance is zero.
    ConstantObserved,
    /// Every simulated value is the same, so the correlation is undefined.
    ConstantSimulated,
    /// The observed values sum to zero.
    ZeroObservedTotal,
}

impl fmt::Display for SkillError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            SkillError::LengthMismatch { simulated, observed } => {
                write!(f, "{simulated} simulated values but {observed} observed values; they must pair up")
            }
            SkillError::TooFew { pairs, needed } => write!(f, "{pairs} pairs given; at least {needed} needed"),
            SkillError::NotFinite { index } => write!(f, "pair {} holds a value that is not a finite number", index + 1),
            SkillError::ConstantObserved => write!(f, "the observed values do not vary, so the statistic is undefined"),
            SkillError::ConstantSimulated => write!(f, "the simulated values do not vary, so the correlation is undefined"),
            SkillError::ZeroObservedTotal => write!(f, "the observed values sum to zero, so the relative statistic is undefined"),
        }
    }
}

impl std::error::Error for SkillError {}

/// Checks pairing, length and finiteness.
fn check(sim: &[f64], obs: &[f64], needed: usize) -> Result<(), SkillError> {
    if sim.len() != obs.len() {
        return Err(SkillError::LengthMismatch { simulated: sim.len(), observed: obs.len() });
    }
    if sim.len() < needed {
        return Err(SkillError::TooFew { pairs: sim.len(), needed });
    }
    if let Some(index) = sim.iter().zip(obs).position(|(s, o)| !(s.is_finite() && o.is_finite())) {
        return Err(SkillError::NotFinite { index });
    }
    Ok(())
}

fn mean(x: &[f64]) -> f64 {
    x.iter().sum::<f64>() / x.len() as f64
}

/// Sum of squared deviations from the mean.
fn sum_sq_dev(x: &[f64], m: f64) -> f64 {
    x.iter().map(|v| (v - m) * (v - m)).sum()
}

/// True when the sum of squared deviations `ss` of `x` is more than rounding noise
/// (a series of equal values can leave `ss` of order `n·(ε·|x|)²`, not exactly 0).
fn varies(x: &[f64], ss: f64) -> bool {
    let scale = x.iter().fold(0.0f64, |a, v| a.max(v.abs()));
    let noise = 8.0 * f64::EPSILON * scale;
    ss > x.len() as f64 * noise * noise
}

/// Nash–Sutcliffe efficiency (Nash & Sutcliffe 1970): `1 − Σ(s − o)²/Σ(o − ō)²`.
///
/// Needs at least 2 pairs and observed values that vary.
pub fn nse(sim: &[f64], obs: &[f64]) -> Result<f64, SkillError> {
    check(sim, obs, 2)?;
    let m = mean(obs);
    let denom = sum_sq_dev(obs, m);
    if !varies(obs, denom) {
        return Err(SkillError::ConstantObserved);
    }
    let sse: f64 = sim.iter().zip(obs).map(|(s, o)| (s - o) * (s - o)).sum();
    Ok(1.0 - sse / denom)
}

/// The Kling–Gupta efficiency and its three components (Gupta et al. 2009).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Kge {
    /// `KGE = 1 − √((r − 1)² + (α − 1)² + (β − 1)²)`; 1 is perfect.
    pub kge: f64,
    /// Pearson correlation of simulated and observed values.
    pub r: f64,
    /// Variability ratio `α = σ_s/σ_o`.
    pub alpha: f64,
    /// Bias ratio `β = μ_s/μ_o`.
    pub beta: f64,
}

/// Kling–Gupta efficiency (Gupta et al. 2009) with its components.
///
/// Needs at least 2 pairs, observed and simulated values that vary, and an
/// observed mean other than zero.
pub fn kge(sim: &[f64], obs: &[f64]) -> Result<Kge, SkillError> {
    check(sim, obs, 2)?;
    let (ms, mo) = (mean(sim), mean(obs));
    let (ss, so) = (sum_sq_dev(sim, ms), sum_sq_dev(obs, mo));
    if !varies(obs, so) {
        return Err(SkillError::ConstantObserved);
    }
    if !varies(sim, ss) {
        return Err(SkillError::ConstantSimulated);
    }
    if mo == 0.0 {
        return Err(SkillError::ZeroObservedTotal);
    }
    let cov: f64 = sim.iter().zip(obs).map(|(s, o)| (s - ms) * (o - mo)).sum();
    let r = cov / (ss * so).sqrt();
    // σ_s/σ_o: the divisor (n or n − 1) cancels.
    let alpha = (ss / so).sqrt();
    let beta = ms / mo;
    let kge = 1.0 - ((r - 1.0).powi(2) + (alpha - 1.0).powi(2) + (beta - 1.0).powi(2)).sqrt();
    Ok(Kge { kge, r, alpha, beta })
}

/// Percent bias `100 · Σ(s − o)/Σ o`, %. **Positive: the simulation overestimates.**
///
/// This is the negative of hydroeval's and Moriasi et al.'s (2007) `pbias`.
/// Needs at least 1 pair and a non-zero observed total.
pub fn pbias_pct(sim: &[f64], obs: &[f64]) -> Result<f64, SkillError> {
    check(sim, obs, 1)?;
    let total: f64 = obs.iter().sum();
    if total == 0.0 {
        return Err(SkillError::ZeroObservedTotal);
    }
    let diff: f64 = sim.iter().zip(obs).map(|(s, o)| s - o).sum();
    Ok(100.0 * diff / total)
}

/// Root-mean-square error `√(Σ(s − o)²/n)`, in the unit of the data (mm/yr here).
pub fn rmse(sim: &[f64], obs: &[f64]) -> Result<f64, SkillError> {
    check(sim, obs, 1)?;
    let sse: f64 = sim.iter().zip(obs).map(|(s, o)| (s - o) * (s - o)).sum();
    Ok((sse / sim.len() as f64).sqrt())
}

/// All four statistics of one simulation; a statistic that is undefined for these
/// data (see [`SkillError`]) is `None`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Skill {
    /// Nash–Sutcliffe efficiency.
    pub nse: Option<f64>,
    /// Kling–Gupta efficiency with components.
    pub kge: Option<Kge>,
    /// Percent bias, % (positive = simulation overestimates).
    pub pbias_pct: Option<f64>,
    /// Root-mean-square error, in the unit of the data (mm/yr for yields).
    pub rmse_mm: Option<f64>,
}

impl Skill {
    /// Computes every statistic. Fails only when the series do not pair up, are
    /// empty or hold a non-finite value; otherwise undefined statistics are `None`.
    pub fn compute(sim: &[f64], obs: &[f64]) -> Result<Skill, SkillError> {
        check(sim, obs, 1)?;
        Ok(Skill { nse: nse(sim, obs).ok(), kge: kge(sim, obs).ok(), pbias_pct: pbias_pct(sim, obs).ok(), rmse_mm: rmse(sim, obs).ok() })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    #[test]
    fn hand_computed_example() {
        // Source: hand computation from the definitions above.
        // obs = [1, 2, 3], sim = [2, 2, 2]: ō = 2, Σ(o − ō)² = 2, Σ(s − o)² = 2 → NSE = 0;
        // PBIAS = 100·(6 − 6)/6 = 0; RMSE = √(2/3).
        let obs = [1.0, 2.0, 3.0];
        let sim = [2.0, 2.0, 2.0];
        assert_abs_diff_eq!(nse(&sim, &obs).unwrap(), 0.0, epsilon = 1e-15);
        assert_abs_diff_eq!(pbias_pct(&sim, &obs).unwrap(), 0.0, epsilon = 1e-15);
        assert_abs_diff_eq!(rmse(&sim, &obs).unwrap(), (2.0f64 / 3.0).sqrt(), epsilon = 1e-15);
        assert_eq!(kge(&sim, &obs), Err(SkillError::ConstantSimulated));
        // sim = 1.1·obs: r = 1, α = 1.1, β = 1.1 → KGE = 1 − √0.02; PBIAS = +10 % (overestimate).
        let sim: Vec<f64> = obs.iter().map(|o| 1.1 * o).collect();
        let k = kge(&sim, &obs).unwrap();
        assert_abs_diff_eq!(k.r, 1.0, epsilon = 1e-12);
        assert_abs_diff_eq!(k.alpha, 1.1, epsilon = 1e-12);
        assert_abs_diff_eq!(k.beta, 1.1, epsilon = 1e-12);
        assert_abs_diff_eq!(k.kge, 1.0 - 0.02f64.sqrt(), epsilon = 1e-12);
        assert_abs_diff_eq!(pbias_pct(&sim, &obs).unwrap(), 10.0, epsilon = 1e-12);
    }

    #[test]
    fn undefined_statistics_are_errors() {
        assert_eq!(nse(&[1.0, 2.0], &[3.0, 3.0]), Err(SkillError::ConstantObserved));
        assert_eq!(nse(&[1.0], &[1.0, 2.0]), Err(SkillError::LengthMismatch { simulated: 1, observed: 2 }));
        assert_eq!(nse(&[1.0], &[1.0]), Err(SkillError::TooFew { pairs: 1, needed: 2 }));
        assert_eq!(pbias_pct(&[1.0, 1.0], &[1.0, -1.0]), Err(SkillError::ZeroObservedTotal));
        assert_eq!(rmse(&[f64::NAN], &[1.0]), Err(SkillError::NotFinite { index: 0 }));
        let s = Skill::compute(&[1.0, 2.0], &[3.0, 3.0]).unwrap();
        assert!(s.nse.is_none() && s.kge.is_none());
        assert!(s.pbias_pct.is_some() && s.rmse_mm.is_some());
    }
}
