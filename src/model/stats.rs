//! Sample statistics for ensembles: percentiles, ranks, Spearman rank correlation
//! and standardised regression coefficients.
//!
//! # Formula
//! * Percentile `p` of a sorted sample `x₁ ≤ … ≤ xₙ` by linear interpolation between
//!   order statistics (Hyndman & Fan 1996, definition 7; the default of R and NumPy):
//!   `h = (n − 1)·p`, `Q = x_{⌊h⌋+1} + (h − ⌊h⌋)(x_{⌊h⌋+2} − x_{⌊h⌋+1})`.
//! * Spearman's ρ: Pearson correlation of the ranks (ties get their mean rank).
//! * Standardised regression coefficients (SRC): least-squares coefficients of the
//!   output on the inputs, each standardised to zero mean and unit variance
//!   (Saltelli et al. 2008, §1.2.5); for independent inputs `Σ SRC² ≈ R²`.
//!
//! # Symbols
//! * `x₁ ≤ … ≤ xₙ` — a sorted sample of any unit; `n` — sample size; `p` — probability, 0–1.
//! * `ρ` — Spearman rank correlation, −1–1.
//! * SRC — standardised regression coefficient of an input, dimensionless (−1–1 for
//!   independent inputs); `R²` — coefficient of determination, 0–1.
//!
//! # Assumptions
//! * Standard deviations use the `n − 1` divisor; a constant sample has no
//!   correlation or SRC (`None`), never NaN.
//! * SRC describe a linear fit; for a non-linear model with independent inputs,
//!   `1 − Σ SRC²` is about the share of output variance the linear fit leaves unexplained.
//!
//! # References
//! Hyndman, R. J., & Fan, Y. (1996). Sample quantiles in statistical packages.
//! *The American Statistician*, 50(4), 361–365.
//!
//! Spearman, C. (1904). The proof and measurement of association between two
//! things. *The American Journal of Psychology*, 15(1), 72–101.
//!
//! Saltelli, A., Ratto, M., Andres, T., Campolongo, F., Cariboni, J., Gatelli, D.,
//! Saisana, M., & Tarantola, S. (2008). *Global Sensitivity Analysis: The Primer*.
//! John Wiley & Sons, Chichester.

/// Quantile `p` (0–1) of an already sorted (ascending) sample: Hyndman & Fan (1996)
/// definition 7, linear interpolation between order statistics.
///
/// With `n` values `x₁ ≤ … ≤ xₙ`: `h = (n − 1)·p`, `j = ⌊h⌋`,
/// `Q(p) = x_{j+1} + (h − j)·(x_{j+2} − x_{j+1})` (1-based; `x_{n+1} := xₙ`). So
/// `Q(0) = x₁`, `Q(1) = xₙ`, and `Q` is continuous and non-decreasing in `p`.
/// `p` outside 0–1 is clamped into it; a NaN `p` gives NaN. A single value is
/// returned for every `p`; an empty sample gives NaN (never a panic).
///
/// This is the one sample-quantile function of the model: ensemble percentiles and
/// the fit's bootstrap interval ([`super::fit`]) both use it.
pub fn percentile_sorted(sorted: &[f64], p: f64) -> f64 {
    match sorted.len() {
        0 => f64::NAN,
        1 => sorted[0],
        n => {
            let h = (n - 1) as f64 * p.clamp(0.0, 1.0);
            let lo = h.floor() as usize;
            let hi = (lo + 1).min(n - 1);
            sorted[lo] + (h - lo as f64) * (sorted[hi] - sorted[lo])
        }
    }
}

/// Mean of a sample.
pub fn mean(x: &[f64]) -> f64 {
    if x.is_empty() {
        f64::NAN
    } else {
        x.iter().sum::<f64>() / x.len() as f64
    }
}

/// Ranks `1..=n` with ties given their mean rank.
pub fn ranks(x: &[f64]) -> Vec<f64> {
    let mut idx: Vec<usize> = (0..x.len()).collect();
    idx.sort_by(|&a, &b| x[a].total_cmp(&x[b]));
    let mut r = vec![0.0; x.len()];
    let mut i = 0;
    while i < idx.len() {
        let mut j = i;
        while j + 1 < idx.len() && x[idx[j + 1]] == x[idx[i]] {
            j += 1;
        }
        let rank = (i + j) as f64 / 2.0 + 1.0;
        for k in i..=j {
            r[idx[k]] = rank;
        }
        i = j + 1;
    }
    r
}

/// Pearson correlation; `None` when either sample has no variance.
pub fn pearson(x: &[f64], y: &[f64]) -> Option<f64> {
    let (mx, my) = (mean(x), mean(y));
    let (mut sxy, mut sxx, mut syy) = (0.0, 0.0, 0.0);
    for (a, b) in x.iter().zip(y) {
        sxy += (a - mx) * (b - my);
        sxx += (a - mx) * (a - mx);
        syy += (b - my) * (b - my);
    }
    (sxx > 0.0 && syy > 0.0).then(|| sxy / (sxx * syy).sqrt())
}

/// Spearman rank correlation; `None` when either sample is constant.
pub fn spearman(x: &[f64], y: &[f64]) -> Option<f64> {
    pearson(&ranks(x), &ranks(y))
}

/// Standardised regression coefficients of `y` on the columns `xs` (each a sample
/// of the same length as `y`). Constant columns get `None`; `None` overall when
/// `y` is constant or the system is singular.
pub fn src(xs: &[Vec<f64>], y: &[f64]) -> Option<Vec<Option<f64>>> {
    let n = y.len();
    let sd = |v: &[f64]| {
        let m = mean(v);
        (v.iter().map(|a| (a - m) * (a - m)).sum::<f64>() / (n.max(2) - 1) as f64).sqrt()
    };
    let sy = sd(y);
    if !(sy > 0.0) || n < 3 {
        return None;
    }
    let my = mean(y);
    let zy: Vec<f64> = y.iter().map(|v| (v - my) / sy).collect();
    let live: Vec<usize> = (0..xs.len()).filter(|&j| sd(&xs[j]) > 0.0).collect();
    let z: Vec<Vec<f64>> = live
        .iter()
        .map(|&j| {
            let (m, s) = (mean(&xs[j]), sd(&xs[j]));
            xs[j].iter().map(|v| (v - m) / s).collect()
        })
        .collect();
    let p = z.len();
    // Normal equations (ZᵀZ) b = Zᵀ y, solved by Gaussian elimination with partial pivoting.
    let mut a = vec![vec![0.0; p + 1]; p];
    for i in 0..p {
        for j in 0..p {
            a[i][j] = z[i].iter().zip(&z[j]).map(|(u, v)| u * v).sum();
        }
        a[i][p] = z[i].iter().zip(&zy).map(|(u, v)| u * v).sum();
    }
    for col in 0..p {
        let piv = (col..p).max_by(|&r1, &r2| a[r1][col].abs().total_cmp(&a[r2][col].abs()))?;
        if a[piv][col].abs() < 1e-12 * n as f64 {
            return None;
        }
        a.swap(col, piv);
        for r in 0..p {
            if r != col {
                let f = a[r][col] / a[col][col];
                let pivot_row = a[col].clone();
                for (x, &pv) in a[r][col..=p].iter_mut().zip(&pivot_row[col..=p]) {
                    *x -= f * pv;
                }
            }
        }
    }
    let mut out = vec![None; xs.len()];
    for (k, &j) in live.iter().enumerate() {
        out[j] = Some(a[k][p] / a[k][k]);
    }
    Some(out)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    #[test]
    fn type7_percentiles() {
        // Source: Hyndman & Fan (1996) definition 7 (NumPy's default): for 1..=10,
        // the 25th percentile is 3.25 and the 95th is 9.55.
        let x: Vec<f64> = (1..=10).map(f64::from).collect();
        assert_abs_diff_eq!(percentile_sorted(&x, 0.25), 3.25, epsilon = 1e-12);
        assert_abs_diff_eq!(percentile_sorted(&x, 0.95), 9.55, epsilon = 1e-12);
        assert_abs_diff_eq!(percentile_sorted(&x, 0.5), 5.5, epsilon = 1e-12);
        // Source: Hyndman & Fan (1996) definition 7 by hand: for 1, 2, 3, 4,
        // h = 3p, so p = 0.25 → 1.75 and p = 0.5 → 2.5; the ends are the extremes.
        let v = [1.0, 2.0, 3.0, 4.0];
        assert_abs_diff_eq!(percentile_sorted(&v, 0.5), 2.5, epsilon = 1e-15);
        assert_abs_diff_eq!(percentile_sorted(&v, 0.25), 1.75, epsilon = 1e-15);
        assert_eq!(percentile_sorted(&v, 0.0), 1.0);
        assert_eq!(percentile_sorted(&v, 1.0), 4.0);
        // Out-of-range p is clamped; one value answers every p; empty is NaN, not a panic.
        assert_eq!(percentile_sorted(&v, -0.5), 1.0);
        assert_eq!(percentile_sorted(&v, 1.5), 4.0);
        assert_eq!(percentile_sorted(&[7.0], 0.3), 7.0);
        assert!(percentile_sorted(&[], 0.5).is_nan());
        assert!(percentile_sorted(&v, f64::NAN).is_nan());
    }

    #[test]
    fn ranks_with_ties_and_spearman() {
        assert_eq!(ranks(&[10.0, 20.0, 20.0, 5.0]), vec![2.0, 3.5, 3.5, 1.0]);
        let x = [1.0, 2.0, 3.0, 4.0, 5.0];
        let y = [1.0, 8.0, 27.0, 64.0, 125.0];
        assert_abs_diff_eq!(spearman(&x, &y).unwrap(), 1.0, epsilon = 1e-12);
    }

    #[test]
    fn src_recovers_linear_coefficients() {
        // y = 2 a − b with a, b uncorrelated, equal variance: SRC ∝ (2, −1)/√5.
        let a: Vec<f64> = (0..40).map(|i| (i % 8) as f64).collect();
        let b: Vec<f64> = (0..40).map(|i| (i / 8) as f64 * 1.0).collect();
        let y: Vec<f64> = a.iter().zip(&b).map(|(a, b)| 2.0 * a - 3.0 * b).collect();
        let s = src(&[a.clone(), b.clone()], &y).unwrap();
        let (sa, sb) = (s[0].unwrap(), s[1].unwrap());
        assert!(sa > 0.0 && sb < 0.0);
        assert_abs_diff_eq!(sa * sa + sb * sb, 1.0, epsilon = 1e-9);
    }
}
