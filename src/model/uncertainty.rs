//! Uncertain parameters: distributions, and reproducible sampling (plain Monte
//! Carlo and Latin hypercube).
//!
//! Every uncertain quantity is drawn through its inverse CDF from a uniform
//! `u ∈ (0, 1)`: `x = F⁻¹(u)`. The `u` of member `m` in sampling dimension `d`
//! depends only on `(seed, d, m)` — never on thread scheduling, shard or the order
//! catchments are processed — so runs are byte-reproducible.
//!
//! # Formula
//! * Uniform(a, b), Triangular(a, c, b), Normal(μ, σ), LogNormal(ln median, σ_ln) via statrs.
//! * Truncated normal on `[lo, hi]`: `x = μ + σ·Φ⁻¹(Φ(α) + u·(Φ(β) − Φ(α)))`,
//!   `α = (lo − μ)/σ`, `β = (hi − μ)/σ`.
//! * Beta-PERT(a, m, b): `x = a + (b − a)·Beta⁻¹(u; α, β)` with
//!   `α = 1 + 4(m − a)/(b − a)`, `β = 1 + 4(b − m)/(b − a)`; mean `(a + 4m + b)/6`
//!   (Vose 2008, *Risk Analysis*, 3rd ed., §10.3.5).
//! * Latin hypercube (McKay, Beckman & Conover 1979): for `M` members, dimension `d`
//!   uses a random permutation `π_d` of `0..M` and `u = (π_d(m) + v)/M`, `v ∈ (0, 1)`
//!   uniform: exactly one draw per stratum `[k/M, (k + 1)/M)` in every dimension.
//!
//! # References
//! McKay, M. D., Beckman, R. J., & Conover, W. J. (1979). A comparison of three
//! methods for selecting values of input variables in the analysis of output from a
//! computer code. *Technometrics*, 21(2), 239–245.
//! Vose, D. (2008). *Risk Analysis: A Quantitative Guide* (3rd ed.). Wiley.

use rand::{Rng, RngExt, SeedableRng};
use rand_chacha::ChaCha8Rng;
use statrs::distribution::{Beta, ContinuousCDF, LogNormal, Normal, Triangular, Uniform};

/// A probability distribution for an uncertain parameter.
#[derive(Debug, Clone, PartialEq)]
pub enum Distribution {
    /// Always `value`.
    Fixed {
        /// The value.
        value: f64,
    },
    /// Uniform on `[min, max]`.
    Uniform {
        /// Lower bound.
        min: f64,
        /// Upper bound.
        max: f64,
    },
    /// Triangular with `min ≤ mode ≤ max`.
    Triangular {
        /// Lower bound.
        min: f64,
        /// Most likely value.
        mode: f64,
        /// Upper bound.
        max: f64,
    },
    /// Normal, truncated to `[min, max]` (which may be infinite).
    Normal {
        /// Mean of the untruncated normal.
        mean: f64,
        /// Standard deviation, > 0.
        sd: f64,
        /// Lower truncation bound.
        min: f64,
        /// Upper truncation bound.
        max: f64,
    },
    /// Log-normal: `ln x ~ Normal(ln median, sigma_log)`.
    LogNormal {
        /// Median, > 0.
        median: f64,
        /// Standard deviation of `ln x`, > 0.
        sigma_log: f64,
    },
    /// Beta-PERT with `min < max`, `min ≤ mode ≤ max`.
    Pert {
        /// Lower bound.
        min: f64,
        /// Most likely value.
        mode: f64,
        /// Upper bound.
        max: f64,
    },
}

impl Distribution {
    /// Checks the parameters; returns a message naming the rule broken.
    pub fn validate(&self) -> Result<(), String> {
        let ok = |c: bool, m: &str| if c { Ok(()) } else { Err(m.to_string()) };
        match *self {
            Distribution::Fixed { value } => ok(value.is_finite(), "value must be finite"),
            Distribution::Uniform { min, max } => ok(min.is_finite() && max.is_finite() && min < max, "needs min < max"),
            Distribution::Triangular { min, mode, max } | Distribution::Pert { min, mode, max } => {
                ok(min.is_finite() && max.is_finite() && min < max && mode >= min && mode <= max, "needs min < max and min ≤ mode ≤ max")
            }
            Distribution::Normal { mean, sd, min, max } => {
                ok(mean.is_finite() && sd.is_finite() && sd > 0.0, "needs a finite mean and sd > 0")?;
                ok(min < max, "needs min < max")?;
                let n = Normal::new(0.0, 1.0).map_err(|e| e.to_string())?;
                ok(n.cdf((max - mean) / sd) - n.cdf((min - mean) / sd) > 1e-9, "the truncation interval holds no probability")
            }
            Distribution::LogNormal { median, sigma_log } => {
                ok(median.is_finite() && median > 0.0 && sigma_log.is_finite() && sigma_log > 0.0, "needs median > 0 and sigma_log > 0")
            }
        }
    }

    /// Value at cumulative probability `u` (inverse CDF), `u` in `(0, 1)`.
    pub fn quantile(&self, u: f64) -> f64 {
        let u = u.clamp(1e-12, 1.0 - 1e-12);
        match *self {
            Distribution::Fixed { value } => value,
            Distribution::Uniform { min, max } => Uniform::new(min, max).map(|d| d.inverse_cdf(u)).unwrap_or(min),
            Distribution::Triangular { min, mode, max } => Triangular::new(min, max, mode).map(|d| d.inverse_cdf(u)).unwrap_or(mode),
            Distribution::Normal { mean, sd, min, max } => {
                let n = Normal::new(0.0, 1.0).expect("standard normal");
                let (a, b) = (n.cdf((min - mean) / sd), n.cdf((max - mean) / sd));
                let p = (a + u * (b - a)).clamp(1e-15, 1.0 - 1e-15);
                (mean + sd * n.inverse_cdf(p)).clamp(min, max)
            }
            Distribution::LogNormal { median, sigma_log } => {
                LogNormal::new(median.ln(), sigma_log).map(|d| d.inverse_cdf(u)).unwrap_or(median)
            }
            Distribution::Pert { min, mode, max } => {
                let r = max - min;
                let (a, b) = (1.0 + 4.0 * (mode - min) / r, 1.0 + 4.0 * (max - mode) / r);
                Beta::new(a, b).map(|d| min + r * d.inverse_cdf(u)).unwrap_or(mode)
            }
        }
    }

    /// The value used for the deterministic (central) run: the mode of triangular
    /// and PERT, the median of log-normal, the mean of uniform and (untruncated) normal,
    /// clamped into the truncation interval.
    pub fn central(&self) -> f64 {
        match *self {
            Distribution::Fixed { value } => value,
            Distribution::Uniform { min, max } => 0.5 * (min + max),
            Distribution::Triangular { mode, .. } | Distribution::Pert { mode, .. } => mode,
            Distribution::Normal { mean, min, max, .. } => mean.clamp(min, max),
            Distribution::LogNormal { median, .. } => median,
        }
    }

    /// Smallest and largest values the distribution can produce.
    pub fn support(&self) -> (f64, f64) {
        match *self {
            Distribution::Fixed { value } => (value, value),
            Distribution::Uniform { min, max } | Distribution::Triangular { min, max, .. } | Distribution::Pert { min, max, .. } => {
                (min, max)
            }
            Distribution::Normal { min, max, .. } => (min, max),
            Distribution::LogNormal { .. } => (0.0, f64::INFINITY),
        }
    }

    /// Short name as written in scenarios.
    pub fn name(&self) -> &'static str {
        match self {
            Distribution::Fixed { .. } => "fixed",
            Distribution::Uniform { .. } => "uniform",
            Distribution::Triangular { .. } => "triangular",
            Distribution::Normal { .. } => "normal",
            Distribution::LogNormal { .. } => "lognormal",
            Distribution::Pert { .. } => "pert",
        }
    }
}

/// How member values are drawn.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Sampling {
    /// Independent uniform draws.
    MonteCarlo,
    /// Latin hypercube: one draw per stratum in every dimension.
    LatinHypercube,
}

/// A stable 64-bit hash (FNV-1a) of a text key, used to name sampling dimensions.
pub fn stable_hash(key: &str) -> u64 {
    let mut h: u64 = 0xcbf2_9ce4_8422_2325;
    for b in key.bytes() {
        h ^= b as u64;
        h = h.wrapping_mul(0x0100_0000_01b3);
    }
    h
}

/// A random stream that depends only on `(seed, dimension, member)`.
pub fn stream(seed: u64, dimension: u64, member: u64) -> ChaCha8Rng {
    let mut rng = ChaCha8Rng::seed_from_u64(seed ^ dimension.rotate_left(17) ^ 0x9e37_79b9_7f4a_7c15);
    rng.set_stream(member);
    rng
}

/// Draws the uniform `u` of every member in one dimension.
///
/// Plain Monte Carlo: one independent draw per member. Latin hypercube: a
/// permutation of the `members` strata, jittered within each stratum.
pub fn uniforms(sampling: Sampling, seed: u64, dimension: u64, members: usize) -> Vec<f64> {
    match sampling {
        Sampling::MonteCarlo => (0..members).map(|m| open01(&mut stream(seed, dimension, m as u64))).collect(),
        Sampling::LatinHypercube => {
            let mut perm: Vec<usize> = (0..members).collect();
            let mut rng = stream(seed, dimension, u64::MAX);
            for i in (1..members).rev() {
                let j = rng.random_range(0..=i);
                perm.swap(i, j);
            }
            (0..members).map(|m| (perm[m] as f64 + open01(&mut stream(seed, dimension, m as u64))) / members as f64).collect()
        }
    }
}

/// A uniform draw in the open interval (0, 1).
pub fn open01(rng: &mut impl Rng) -> f64 {
    loop {
        let u: f64 = rng.random();
        if u > 0.0 && u < 1.0 {
            return u;
        }
    }
}

/// A standard normal draw (inverse CDF of a uniform, for reproducibility).
pub fn standard_normal(rng: &mut impl Rng) -> f64 {
    let n = Normal::new(0.0, 1.0).expect("standard normal");
    n.inverse_cdf(open01(rng))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn latin_hypercube_has_one_draw_per_stratum() {
        let m = 50;
        for d in 0..5 {
            let u = uniforms(Sampling::LatinHypercube, 7, d, m);
            let mut strata: Vec<usize> = u.iter().map(|&x| (x * m as f64).floor() as usize).collect();
            strata.sort_unstable();
            assert_eq!(strata, (0..m).collect::<Vec<_>>());
        }
    }

    #[test]
    fn draws_depend_only_on_seed_dimension_member() {
        let a = uniforms(Sampling::MonteCarlo, 1, 2, 10);
        let b = uniforms(Sampling::MonteCarlo, 1, 2, 20);
        assert_eq!(a[..], b[..10]);
        assert_ne!(uniforms(Sampling::MonteCarlo, 1, 3, 10), a);
    }
}

/// A scenario parameter given as a distribution.
#[derive(Debug, Clone, PartialEq)]
pub struct UncertainParam {
    /// Dotted key path in the scenario, e.g. `invasion.spread_rate_per_yr` or
    /// `contaminant[1].open_export_kg_per_ha_yr`.
    pub path: String,
    /// Its distribution.
    pub dist: Distribution,
    /// Drawn independently for each catchment (otherwise once per member for the basin).
    pub per_catchment: bool,
}

impl UncertainParam {
    /// Name of the sampling dimension for this parameter (and catchment, if drawn per catchment).
    pub fn dimension(&self, catchment_id: Option<&str>) -> u64 {
        match (self.per_catchment, catchment_id) {
            (true, Some(id)) => stable_hash(&format!("param:{}@{}", self.path, id)),
            _ => stable_hash(&format!("param:{}", self.path)),
        }
    }
}
