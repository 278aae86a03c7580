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
//! * Any distribution truncated to `[lo, hi]` ([`Distribution::truncated`], to hold
//!   draws to a parameter's allowed range): `x = F⁻¹(F(lo) + u·(F(hi) − F(lo)))`,
//!   the inverse CDF of the renormalised distribution, so no probability piles up
//!   on a bound (as clamping the value would).
//! * Beta-PERT(a, m, b): `x = a + (b − a)·Beta⁻¹(u; α, β)` with
//!   `α = 1 + 4(m − a)/(b − a)`, `β = 1 + 4(b − m)/(b − a)`; mean `(a + 4m + b)/6`
//!   (Vose 2008, *Risk Analysis*, 3rd ed., §10.3.5).
//! * Latin hypercube (McKay, Beckman & Conover 1979): for `M` members, dimension `d`
//!   uses a random permutation `π_d` of `0..M` and `u = (π_d(m) + v)/M`, `v ∈ (0, 1)`
//!   uniform: exactly one draw per stratum `[k/M, (k + 1)/M)` in every dimension.
//! * Streams: `stream(seed, d, m)` is ChaCha8 (Bernstein 2008, as implemented by
//!   `rand_chacha`) keyed by `seed_from_u64(seed ⊕ rotl(d, 17) ⊕ 0x9E3779B97F4A7C15)`
//!   on stream number `m`; the Latin-hypercube permutation uses stream `2⁶⁴ − 1`.
//! * Dimension names: [`stable_hash`] is 64-bit FNV-1a, `h₀ = 14695981039346656037`,
//!   `h ← (h ⊕ byte)·1099511628211 mod 2⁶⁴` over the key's UTF-8 bytes.
//!
//! # Symbols
//! * `u` — uniform probability in (0, 1), held to `[1e-12, 1 − 1e-12]` by [`Distribution::quantile`].
//! * `F`, `F⁻¹` — a distribution's CDF and inverse CDF; `Φ` — standard normal CDF.
//! * `a`/`min`, `m`/`mode`, `b`/`max` — bounds and mode, in the parameter's unit,
//!   `a < b`, `a ≤ m ≤ b`; `μ`, `σ` — normal mean and standard deviation (> 0), in the
//!   parameter's unit; log-normal median (> 0, parameter's unit) and `σ_ln`, the
//!   standard deviation of `ln x` (> 0, dimensionless).
//! * `lo`, `hi` — truncation bounds, `lo < hi` (either may be infinite).
//! * `M` — ensemble members; `m` — member index; `d` — sampling dimension (64-bit).
//!
//! # Assumptions
//! * Uncertain parameters are independent of each other; the Latin hypercube
//!   stratifies each dimension's marginal only.
//! * Holding `u` to `[1e-12, 1 − 1e-12]` cuts unbounded tails at about ±7 standard
//!   normal deviates.
//! * A truncation range must hold at least [`MIN_TRUNCATED_MASS`] of probability.
//!   `F` is computed, not its complement, so a range deep in an upper tail
//!   (`F(lo)` within about 10⁻⁹ of 1) is resolved only coarsely.
//! * Draws are reproducible for given versions of `rand` and `rand_chacha`. Two
//!   `(seed, d)` pairs with the same `seed ⊕ rotl(d, 17)` share a stream; hashed
//!   dimension names under one seed make this improbable.
//!
//! # References
//! McKay, M. D., Beckman, R. J., & Conover, W. J. (1979). A comparison of three
//! methods for selecting values of input variables in the analysis of output from a
//! computer code. *Technometrics*, 21(2), 239–245.
//! Vose, D. (2008). *Risk Analysis: A Quantitative Guide* (3rd ed.). Wiley.
//! Bernstein, D. J. (2008). ChaCha, a variant of Salsa20. *Workshop Record of SASC
//! 2008: The State of the Art of Stream Ciphers*.
//! Fowler, G., Noll, L. C., & Vo, K.-P. FNV hash: the 64-bit FNV-1a parameters as
//! published by its authors at <http://www.isthe.com/chongo/tech/comp/fnv/>.

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
    /// Another distribution restricted to `[min, max]` and renormalised (sampled
    /// by inverse CDF, so no probability piles up on a bound). Made by
    /// [`Distribution::truncated`], which keeps `min`/`max` inside the inner
    /// distribution's support and never nests one `Truncated` in another.
    Truncated {
        /// The distribution before truncation.
        dist: Box<Distribution>,
        /// Lower bound.
        min: f64,
        /// Upper bound.
        max: f64,
    },
}

/// Least probability a truncation interval must hold (as in the truncated normal's check).
pub const MIN_TRUNCATED_MASS: f64 = 1e-9;

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
            Distribution::Truncated { ref dist, min, max } => {
                dist.validate()?;
                ok(min < max, "needs truncation bounds min < max")?;
                ok(dist.cdf(max) - dist.cdf(min) > MIN_TRUNCATED_MASS, "the truncation interval holds no probability")
            }
        }
    }

    /// This distribution restricted to `[min, max]` (either may be infinite) and
    /// renormalised: `F_T(x) = (F(x) − F(min)) / (F(max) − F(min))`, sampled by
    /// inverse CDF ([`Self::quantile`]), so draws lie in `[min, max]` with no
    /// probability mass piled on a bound.
    ///
    /// Use it to hold draws to a parameter's allowed range. When the range already
    /// contains the whole support the distribution is returned unchanged (so
    /// untruncated draws are bit-for-bit the same). A uniform or normal is returned
    /// as the same kind with narrower bounds; a fixed value must lie in the range;
    /// truncating a truncated distribution intersects the ranges. Errors (with a
    /// message naming the rule) when the distribution is invalid, `min < max` does
    /// not hold, or the range holds less than [`MIN_TRUNCATED_MASS`] of probability.
    pub fn truncated(&self, min: f64, max: f64) -> Result<Distribution, String> {
        self.validate()?;
        if min.is_nan() || max.is_nan() || min >= max {
            return Err(format!("truncation needs min < max (got {min} and {max})"));
        }
        let (lo, hi) = self.support();
        if min <= lo && max >= hi {
            return Ok(self.clone());
        }
        let (lo, hi) = (min.max(lo), max.min(hi));
        let out = match *self {
            Distribution::Fixed { value } => {
                return if (min..=max).contains(&value) {
                    Ok(self.clone())
                } else {
                    Err(format!("the fixed value {value} is outside the truncation range {min}–{max}"))
                };
            }
            Distribution::Uniform { .. } if lo < hi => Distribution::Uniform { min: lo, max: hi },
            Distribution::Normal { mean, sd, .. } => Distribution::Normal { mean, sd, min: lo, max: hi },
            Distribution::Truncated { ref dist, .. } => return dist.truncated(lo, hi),
            _ => Distribution::Truncated { dist: Box::new(self.clone()), min: lo, max: hi },
        };
        out.validate()?;
        Ok(out)
    }

    /// Cumulative distribution function `F(x) = P(X ≤ x)`, in 0–1 (for a normal,
    /// of the normal truncated to its own `[min, max]`).
    pub fn cdf(&self, x: f64) -> f64 {
        if x.is_nan() {
            return f64::NAN;
        }
        let (lo, hi) = self.support();
        if x < lo {
            return 0.0;
        }
        if x >= hi {
            return 1.0;
        }
        let v = match *self {
            Distribution::Fixed { value } => {
                if x < value {
                    0.0
                } else {
                    1.0
                }
            }
            Distribution::Uniform { min, max } => (x - min) / (max - min),
            Distribution::Triangular { min, mode, max } => Triangular::new(min, max, mode).map(|d| d.cdf(x)).unwrap_or(f64::NAN),
            Distribution::Normal { mean, sd, min, max } => {
                let n = Normal::new(0.0, 1.0).expect("standard normal");
                let (a, b) = (n.cdf((min - mean) / sd), n.cdf((max - mean) / sd));
                (n.cdf((x - mean) / sd) - a) / (b - a)
            }
            Distribution::LogNormal { median, sigma_log } => LogNormal::new(median.ln(), sigma_log).map(|d| d.cdf(x)).unwrap_or(f64::NAN),
            Distribution::Pert { min, mode, max } => {
                let r = max - min;
                let (a, b) = (1.0 + 4.0 * (mode - min) / r, 1.0 + 4.0 * (max - mode) / r);
                Beta::new(a, b).map(|d| d.cdf((x - min) / r)).unwrap_or(f64::NAN)
            }
            Distribution::Truncated { ref dist, min, max } => {
                let (a, b) = (dist.cdf(min), dist.cdf(max));
                (dist.cdf(x) - a) / (b - a)
            }
        };
        v.clamp(0.0, 1.0)
    }

    /// Value at cumulative probability `u` (inverse CDF), `u` in `(0, 1)`; `u` is
    /// held to `[1e-12, 1 − 1e-12]` and a NaN `u` gives NaN. Draws lie in
    /// [`Self::support`].
    pub fn quantile(&self, u: f64) -> f64 {
        if u.is_nan() {
            return f64::NAN;
        }
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
            Distribution::Truncated { ref dist, min, max } => {
                // Inverse CDF of the truncated distribution: the inner quantile at
                // F(min) + u·(F(max) − F(min)); the clamp only absorbs rounding.
                let (a, b) = (dist.cdf(min), dist.cdf(max));
                dist.quantile(a + u * (b - a)).clamp(min, max)
            }
        }
    }

    /// The value used for the deterministic (central) run: the mode of triangular
    /// and PERT, the median of log-normal, the mean of uniform and (untruncated) normal;
    /// for a normal or a truncated distribution, that value clamped into the
    /// truncation interval.
    pub fn central(&self) -> f64 {
        match *self {
            Distribution::Fixed { value } => value,
            Distribution::Uniform { min, max } => 0.5 * (min + max),
            Distribution::Triangular { mode, .. } | Distribution::Pert { mode, .. } => mode,
            Distribution::Normal { mean, min, max, .. } => mean.clamp(min, max),
            Distribution::LogNormal { median, .. } => median,
            Distribution::Truncated { ref dist, min, max } => dist.central().clamp(min, max),
        }
    }

    /// Smallest and largest values the distribution can produce.
    pub fn support(&self) -> (f64, f64) {
        match *self {
            Distribution::Fixed { value } => (value, value),
            Distribution::Uniform { min, max } | Distribution::Triangular { min, max, .. } | Distribution::Pert { min, max, .. } => {
                (min, max)
            }
            Distribution::Normal { min, max, .. } | Distribution::Truncated { min, max, .. } => (min, max),
            Distribution::LogNormal { .. } => (0.0, f64::INFINITY),
        }
    }

    /// Short name as written in scenarios (a truncated distribution has its inner kind's name).
    pub fn name(&self) -> &'static str {
        match self {
            Distribution::Fixed { .. } => "fixed",
            Distribution::Uniform { .. } => "uniform",
            Distribution::Triangular { .. } => "triangular",
            Distribution::Normal { .. } => "normal",
            Distribution::LogNormal { .. } => "lognormal",
            Distribution::Pert { .. } => "pert",
            Distribution::Truncated { ref dist, .. } => dist.name(),
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

    /// `n` probabilities spread over (0, 1), plus the extremes `quantile` accepts.
    fn probabilities(n: usize) -> Vec<f64> {
        let mut u: Vec<f64> = (0..n).map(|i| (i as f64 + 0.5) / n as f64).collect();
        u.extend([1e-300, 1e-15, 1e-12, 1e-9, 1.0 - 1e-9, 1.0 - 1e-12, 1.0 - 1e-16, 0.0, 1.0]);
        u.sort_by(f64::total_cmp);
        u
    }

    /// Every kind, with parameters like a scenario's.
    fn kinds() -> Vec<Distribution> {
        vec![
            Distribution::Fixed { value: 0.6 },
            Distribution::Uniform { min: 0.2, max: 0.9 },
            Distribution::Triangular { min: 0.1, mode: 0.5, max: 1.4 },
            Distribution::Normal { mean: 0.8, sd: 0.3, min: f64::NEG_INFINITY, max: f64::INFINITY },
            Distribution::LogNormal { median: 0.8, sigma_log: 0.5 },
            Distribution::Pert { min: 0.05, mode: 0.9, max: 1.3 },
        ]
    }

    #[test]
    fn truncated_lognormal_never_leaves_its_bounds() {
        // A log-normal closure `max_fraction` (allowed 0–1) with median 0.8: about a
        // third of its untruncated draws exceed 1.
        let d = Distribution::LogNormal { median: 0.8, sigma_log: 0.5 };
        let u = probabilities(200_000);
        let above = u.iter().filter(|&&u| d.quantile(u) > 1.0).count();
        assert!(above > 50_000, "the untruncated log-normal should exceed 1 often ({above})");
        for (lo, hi) in [(0.0, 1.0), (0.3, 1.2), (1e-3, 0.5), (2.0, 40.0)] {
            let t = d.truncated(lo, hi).unwrap();
            assert!(matches!(t, Distribution::Truncated { .. }), "{t:?}");
            assert_eq!(t.support(), (lo, hi));
            let mut at_hi = 0;
            for &u in &u {
                let x = t.quantile(u);
                assert!(x >= lo && x <= hi, "[{lo}, {hi}] u = {u}: {x}");
                at_hi += usize::from(x == hi);
            }
            // Inverse-CDF truncation, not clamping: no mass piles up on the bound
            // (clamping would put every draw above `hi` there).
            assert!(at_hi <= 4, "[{lo}, {hi}]: {at_hi} draws on the upper bound");
        }
    }

    #[test]
    fn truncated_lognormal_is_the_exponential_of_a_truncated_normal() {
        // Source: closed form. ln is increasing and ln X ~ N(ln median, σ²), so X
        // restricted to [lo, hi] is exp of N(ln median, σ²) restricted to
        // [ln lo, ln hi]: x(u) = exp(μ + σ·Φ⁻¹(Φ(α) + u·(Φ(β) − Φ(α)))), computed here
        // with the standard normal only.
        let (median, sigma, lo, hi) = (0.8f64, 0.5, 0.3f64, 1.0f64);
        let t = Distribution::LogNormal { median, sigma_log: sigma }.truncated(lo, hi).unwrap();
        let n = Normal::new(0.0, 1.0).unwrap();
        let (pa, pb) = (n.cdf((lo.ln() - median.ln()) / sigma), n.cdf((hi.ln() - median.ln()) / sigma));
        for u in [0.001, 0.1, 0.25, 0.5, 0.75, 0.9, 0.999] {
            let want = (median.ln() + sigma * n.inverse_cdf(pa + u * (pb - pa))).exp();
            assert!((t.quantile(u) - want).abs() < 1e-9 * want, "u = {u}: {} vs {want}", t.quantile(u));
            // And the truncated CDF inverts the truncated quantile.
            assert!((t.cdf(t.quantile(u)) - u).abs() < 1e-9, "u = {u}");
        }
        assert_eq!(t.cdf(lo), 0.0);
        assert_eq!(t.cdf(hi), 1.0);
        assert_eq!(t.central(), median);
        assert_eq!(t.name(), "lognormal");
    }

    #[test]
    fn truncated_quantiles_are_monotone_and_inside_the_bounds() {
        let u = probabilities(20_000);
        for d in kinds() {
            for (lo, hi) in [(0.0, 1.0), (0.55, 0.65), (0.3, f64::INFINITY), (f64::NEG_INFINITY, 0.7)] {
                let Ok(t) = d.truncated(lo, hi) else {
                    // Only a fixed value outside the range may be refused.
                    assert!(matches!(d, Distribution::Fixed { .. }) && !(lo..=hi).contains(&d.central()), "{d:?} on [{lo}, {hi}]");
                    continue;
                };
                let x: Vec<f64> = u.iter().map(|&u| t.quantile(u)).collect();
                assert!(x.windows(2).all(|w| w[0] <= w[1]), "{t:?} is not monotone");
                assert!(x.iter().all(|&x| x >= lo && x <= hi), "{t:?} leaves [{lo}, {hi}]");
                let (a, b) = t.support();
                assert!(a >= lo && b <= hi, "{t:?}");
                assert!(t.central() >= a && t.central() <= b, "{t:?}");
            }
        }
    }

    #[test]
    fn infinite_or_wider_bounds_change_nothing() {
        let u = probabilities(5_000);
        for d in kinds() {
            let (a, b) = d.support();
            for (lo, hi) in [(f64::NEG_INFINITY, f64::INFINITY), (a - 1.0, b + 1.0), (a, b)] {
                if lo >= hi {
                    continue; // a fixed value's own support is a single point
                }
                let t = d.truncated(lo, hi).unwrap();
                assert_eq!(t, d);
                assert!(u.iter().all(|&u| t.quantile(u).to_bits() == d.quantile(u).to_bits()), "{d:?}");
            }
        }
    }

    #[test]
    fn truncation_keeps_the_kind_where_it_can_and_intersects_ranges() {
        let n = Distribution::Normal { mean: 0.8, sd: 0.3, min: 0.0, max: f64::INFINITY };
        assert_eq!(n.truncated(-1.0, 1.0).unwrap(), Distribution::Normal { mean: 0.8, sd: 0.3, min: 0.0, max: 1.0 });
        let uni = Distribution::Uniform { min: 0.2, max: 0.9 };
        assert_eq!(uni.truncated(0.5, 2.0).unwrap(), Distribution::Uniform { min: 0.5, max: 0.9 });
        let l = Distribution::LogNormal { median: 0.8, sigma_log: 0.5 };
        let twice = l.truncated(0.0, 1.0).unwrap().truncated(0.5, 3.0).unwrap();
        assert_eq!(twice, l.truncated(0.5, 1.0).unwrap());
        assert_eq!(Distribution::Fixed { value: 0.6 }.truncated(0.0, 1.0).unwrap(), Distribution::Fixed { value: 0.6 });
    }

    #[test]
    fn impossible_truncations_are_errors() {
        let l = Distribution::LogNormal { median: 1.0, sigma_log: 0.1 };
        assert!(l.truncated(100.0, 200.0).unwrap_err().contains("no probability"));
        assert!(l.truncated(1.0, 1.0).unwrap_err().contains("min < max"));
        assert!(l.truncated(f64::NAN, 2.0).is_err());
        assert!(Distribution::Fixed { value: 2.0 }.truncated(0.0, 1.0).unwrap_err().contains("outside"));
        assert!(Distribution::LogNormal { median: -1.0, sigma_log: 0.1 }.truncated(0.0, 1.0).is_err());
        assert!(Distribution::Uniform { min: 0.0, max: 1.0 }.truncated(2.0, 3.0).is_err());
        // A hand-made truncated distribution is checked by validate too.
        let bad = Distribution::Truncated { dist: Box::new(l.clone()), min: 100.0, max: 200.0 };
        assert!(bad.validate().is_err());
        assert!(l.quantile(f64::NAN).is_nan());
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
