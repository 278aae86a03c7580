//! Climate sequences for ensemble members.
//!
//! # Formula
//! * Moving-block bootstrap (Künsch 1989): a member's sequence of `n` years is built
//!   from blocks of `L` consecutive record years, each block starting at a year
//!   drawn uniformly from the `N − L + 1` possible starts, concatenated and cut to
//!   `n`. Keeps within-block persistence and the record's distribution.
//! * Stochastic annual rainfall: `z_t = ρ·z_{t−1} + √(1 − ρ²)·ε_t`, `ε_t ~ N(0, 1)`,
//!   `z_0 ~ N(0, 1)`; `P_t = P̄ · exp(σ z_t − σ²/2)` with `σ² = ln(1 + CV²)`, so that
//!   `E[P_t] = P̄` and `CV[P_t] = CV` (log-normal moments; Aitchison & Brown 1957).
//!   PET likewise with its own CV (ρ = 0) when given.
//!
//! # Symbols
//! * `N` — record years; `n` — years in a member's sequence; `L` — block length,
//!   years (scenario: 1–100; clamped here to 1–`N`).
//! * `P̄` — a catchment's mean rainfall, mm/yr; `P_t` — the member's rainfall in year
//!   `t`, mm/yr (the series returned is the multiplier `P_t / P̄`, mean 1).
//! * `CV` — coefficient of variation of annual rainfall (scenario 0–2) or PET
//!   (scenario 0–1); `CV ≤ 0` gives a constant series of 1.
//! * `ρ` — lag-1 autocorrelation of `z` (= of `ln P`), scenario −0.95–0.95, clamped
//!   here to ±0.99; `z_t` — standard normal state; `ε_t` — standard normal innovation.
//! * `σ` — standard deviation of `ln P_t`.
//!
//! # Assumptions
//! * One sequence per member is shared by every catchment (fully correlated climate
//!   across the basin).
//! * The bootstrap treats the record as stationary and keeps persistence only within
//!   blocks; an empty record gives index 0 for every year.
//! * The AR(1) process starts in its stationary state (`z_0 ~ N(0, 1)`), so every year
//!   has the same distribution. `ρ` is the lag-1 correlation of `ln P`; that of `P`
//!   itself is `(exp(ρσ²) − 1)/(exp(σ²) − 1)`, slightly smaller (a property of the
//!   bivariate log-normal). Rainfall and PET multipliers are independent.
//!
//! # References
//! Künsch, H. R. (1989). The jackknife and the bootstrap for general stationary
//! observations. *Annals of Statistics*, 17(3), 1217–1241.
//! Aitchison, J., & Brown, J. A. C. (1957). *The Lognormal Distribution*. Cambridge University Press.

use super::uncertainty::standard_normal;
use rand::{Rng, RngExt};

/// Indices `0..record_len` of the record years making up an `n`-year bootstrap sequence.
pub fn block_bootstrap(record_len: usize, n: usize, block_years: usize, rng: &mut impl Rng) -> Vec<usize> {
    if record_len == 0 {
        return vec![0; n];
    }
    let l = block_years.clamp(1, record_len);
    let starts = record_len - l + 1;
    let mut out = Vec::with_capacity(n + l);
    while out.len() < n {
        let s = rng.random_range(0..starts);
        out.extend(s..s + l);
    }
    out.truncate(n);
    out
}

/// A standardised log-normal AR(1) multiplier series: `exp(σ z_t − σ²/2)`, mean 1.
pub fn lognormal_ar1_multipliers(n: usize, cv: f64, lag1: f64, rng: &mut impl Rng) -> Vec<f64> {
    if cv <= 0.0 {
        // Consume nothing: a fixed series.
        return vec![1.0; n];
    }
    let s2 = (1.0 + cv * cv).ln();
    let s = s2.sqrt();
    let rho = lag1.clamp(-0.99, 0.99);
    let innov = (1.0 - rho * rho).sqrt();
    let mut z = standard_normal(rng);
    let mut out = Vec::with_capacity(n);
    for t in 0..n {
        if t > 0 {
            z = rho * z + innov * standard_normal(rng);
        }
        out.push((s * z - s2 / 2.0).exp());
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::uncertainty::stream;

    #[test]
    fn bootstrap_uses_whole_blocks_within_the_record() {
        let idx = block_bootstrap(30, 61, 5, &mut stream(3, 4, 5));
        assert_eq!(idx.len(), 61);
        assert!(idx.iter().all(|&i| i < 30));
        for b in idx.chunks(5).filter(|c| c.len() == 5) {
            assert!(b.windows(2).all(|w| w[1] == w[0] + 1));
        }
    }

    #[test]
    fn lognormal_multipliers_have_mean_one_and_the_cv() {
        // Source: log-normal moments (Aitchison & Brown 1957): with σ² = ln(1 + CV²),
        // exp(σz − σ²/2) has mean 1 and coefficient of variation CV.
        let m = lognormal_ar1_multipliers(200_000, 0.2, 0.3, &mut stream(1, 2, 3));
        let mean = m.iter().sum::<f64>() / m.len() as f64;
        let var = m.iter().map(|x| (x - mean) * (x - mean)).sum::<f64>() / (m.len() - 1) as f64;
        assert!((mean - 1.0).abs() < 0.005, "{mean}");
        assert!((var.sqrt() / mean - 0.2).abs() < 0.005, "{}", var.sqrt());
        let lz: Vec<f64> = m.iter().map(|x| x.ln()).collect();
        let lm = lz.iter().sum::<f64>() / lz.len() as f64;
        let c1: f64 = lz.windows(2).map(|w| (w[0] - lm) * (w[1] - lm)).sum::<f64>();
        let c0: f64 = lz.iter().map(|x| (x - lm) * (x - lm)).sum::<f64>();
        assert!((c1 / c0 - 0.3).abs() < 0.01, "lag-1 {}", c1 / c0);
    }
}
