//! One-dimensional root finding and minimisation on a bracket, after Brent (1973).
//!
//! Used by [`super::fit`] to fit a curve parameter: a bracketed root of a monotone
//! function (the long-term mean fit) and a bounded minimum (least squares on the
//! annual series). Both methods never leave the bracket they are given, so a
//! parameter's allowed range is respected by construction.
//!
//! # Formula
//! * [`brent_root`] — Brent's zero finder (Brent 1973, ch. 4, procedure *zero*):
//!   each step tries inverse quadratic interpolation through the last three points
//!   (or the secant through two), and falls back to bisection of the bracket
//!   `[b, c]` (`f(b)·f(c) ≤ 0`) whenever the interpolated step would leave the
//!   bracket or fails to shrink it fast enough. It stops when
//!   `|c − b|/2 ≤ 2·ε·|b| + tol/2` (ε = machine epsilon), so the returned point is
//!   within `4·ε·|b| + tol` of a sign change.
//! * [`brent_minimum`] — Brent's minimiser (Brent 1973, ch. 5, procedure
//!   *localmin*): golden-section search (ratio `c = (3 − √5)/2`) combined with
//!   successive parabolic interpolation; stops when the bracket around the best
//!   point `x` satisfies `|x − m| ≤ 2·t − (b − a)/2` with `m = (a + b)/2` and
//!   `t = √ε·|x| + tol/3`.
//!
//! # Symbols
//! * `a`, `b` — ends of the bracket, finite (any order but `a ≠ b` for the root;
//!   `a < b` for the minimum); an empty bracket is [`RootError::EmptyBracket`].
//! * `tol` — absolute tolerance in `x`, > 0.
//!
//! # Assumptions
//! The root finder needs `f(a)` and `f(b)` of opposite sign (or one of them zero);
//! it then converges for any function continuous on the bracket. The minimiser
//! finds a local minimum; callers that cannot rule out several minima scan a grid
//! first and give it the bracket around the best grid point.
//!
//! # References
//! Brent, R. P. (1973). *Algorithms for Minimization without Derivatives*.
//! Prentice-Hall, Englewood Cliffs, NJ. Chapter 4 (zero) and chapter 5 (localmin).

use std::fmt;

/// Most function evaluations either method makes before giving up.
pub const MAX_ITERATIONS: usize = 500;

/// A root or minimum found, with the work it took.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Solution {
    /// The abscissa found.
    pub x: f64,
    /// The function value there.
    pub fx: f64,
    /// Function evaluations made.
    pub evaluations: usize,
}

/// Why a bracketed method could not run.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum RootError {
    /// `f(a)` and `f(b)` have the same sign, so the bracket holds no sign change.
    NotBracketed {
        /// `f(a)`.
        fa: f64,
        /// `f(b)`.
        fb: f64,
    },
    /// A bracket end, the tolerance or a function value is not a finite number
    /// (or the tolerance is not positive).
    NotFinite,
    /// The bracket is empty or degenerate: `a == b` for the root finder, `a ≥ b`
    /// for the minimiser (which needs `a < b`).
    EmptyBracket {
        /// The first bracket end given.
        a: f64,
        /// The second bracket end given.
        b: f64,
    },
    /// [`MAX_ITERATIONS`] evaluations were made without meeting the tolerance.
    NoConvergence {
        /// Best point so far.
        x: f64,
    },
}

impl fmt::Display for RootError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            RootError::NotBracketed { fa, fb } => {
                write!(f, "the bracket holds no sign change (f(a) = {fa}, f(b) = {fb})")
            }
            RootError::NotFinite => {
                write!(f, "a bracket end, the tolerance or a function value is not finite (or the tolerance is not positive)")
            }
            RootError::EmptyBracket { a, b } => {
                write!(f, "the bracket [{a}, {b}] is empty: its ends must differ (and, for a minimum, the first must be below the second)")
            }
            RootError::NoConvergence { x } => {
                write!(f, "no convergence after {MAX_ITERATIONS} evaluations (best point {x})")
            }
        }
    }
}

impl std::error::Error for RootError {}

/// A root of `f` in the bracket `[a, b]` (Brent 1973, ch. 4), to absolute tolerance `tol`.
///
/// Requires `a ≠ b` (either order) and `f(a)·f(b) ≤ 0`. The result lies in the
/// bracket and within `4·ε·|x| + tol` of a sign change of `f`.
pub fn brent_root(mut f: impl FnMut(f64) -> f64, a: f64, b: f64, tol: f64) -> Result<Solution, RootError> {
    if !(a.is_finite() && b.is_finite() && tol.is_finite() && tol > 0.0) {
        return Err(RootError::NotFinite);
    }
    if a == b {
        return Err(RootError::EmptyBracket { a, b });
    }
    let (mut a, mut b) = (a, b);
    let mut fa = f(a);
    let mut fb = f(b);
    let mut n = 2;
    if !(fa.is_finite() && fb.is_finite()) {
        return Err(RootError::NotFinite);
    }
    if fa == 0.0 {
        return Ok(Solution { x: a, fx: fa, evaluations: n });
    }
    if fb == 0.0 {
        return Ok(Solution { x: b, fx: fb, evaluations: n });
    }
    if fa.signum() == fb.signum() {
        return Err(RootError::NotBracketed { fa, fb });
    }
    // `c` is the other end of the bracket [b, c]: f(b) and f(c) always differ in sign.
    let (mut c, mut fc) = (a, fa);
    let mut d = b - a;
    let mut e = d;
    loop {
        if fb.signum() == fc.signum() {
            // The root is between a (the previous b) and b: restart the bracket there.
            c = a;
            fc = fa;
            d = b - a;
            e = d;
        }
        if fc.abs() < fb.abs() {
            // Keep b the best estimate.
            a = b;
            b = c;
            c = a;
            fa = fb;
            fb = fc;
            fc = fa;
        }
        let tol1 = 2.0 * f64::EPSILON * b.abs() + 0.5 * tol;
        let xm = 0.5 * (c - b);
        if xm.abs() <= tol1 || fb == 0.0 {
            return Ok(Solution { x: b, fx: fb, evaluations: n });
        }
        if n >= MAX_ITERATIONS {
            return Err(RootError::NoConvergence { x: b });
        }
        if e.abs() >= tol1 && fa.abs() > fb.abs() {
            // Try interpolation.
            let s = fb / fa;
            let (mut p, mut q);
            if a == c {
                // Secant (linear interpolation).
                p = 2.0 * xm * s;
                q = 1.0 - s;
            } else {
                // Inverse quadratic interpolation.
                let qq = fa / fc;
                let r = fb / fc;
                p = s * (2.0 * xm * qq * (qq - r) - (b - a) * (r - 1.0));
                q = (qq - 1.0) * (r - 1.0) * (s - 1.0);
            }
            if p > 0.0 {
                q = -q;
            } else {
                p = -p;
            }
            if 2.0 * p < (3.0 * xm * q - (tol1 * q).abs()).min((e * q).abs()) {
                // Accept the interpolated step.
                e = d;
                d = p / q;
            } else {
                // Interpolation failed: bisect.
                d = xm;
                e = d;
            }
        } else {
            // Bounds shrink too slowly: bisect.
            d = xm;
            e = d;
        }
        a = b;
        fa = fb;
        b += if d.abs() > tol1 { d } else { tol1.copysign(xm) };
        fb = f(b);
        n += 1;
        if !fb.is_finite() {
            return Err(RootError::NotFinite);
        }
    }
}

/// A local minimum of `f` on `[a, b]` (Brent 1973, ch. 5), to absolute tolerance `tol`.
///
/// Requires `a < b`. The minimum found lies inside the interval; when the function
/// decreases towards an end, the result is within about `tol` of that end.
pub fn brent_minimum(mut f: impl FnMut(f64) -> f64, a: f64, b: f64, tol: f64) -> Result<Solution, RootError> {
    if !(a.is_finite() && b.is_finite() && tol.is_finite() && tol > 0.0) {
        return Err(RootError::NotFinite);
    }
    if a >= b {
        return Err(RootError::EmptyBracket { a, b });
    }
    // Golden-section ratio (3 − √5)/2 and the square root of machine epsilon.
    let golden = 0.5 * (3.0 - 5f64.sqrt());
    let sqrt_eps = f64::EPSILON.sqrt();
    let (mut a, mut b) = (a, b);
    let mut x = a + golden * (b - a);
    let (mut w, mut v) = (x, x);
    let mut fx = f(x);
    if !fx.is_finite() {
        return Err(RootError::NotFinite);
    }
    let (mut fw, mut fv) = (fx, fx);
    let mut d = 0.0f64;
    let mut e = 0.0f64;
    let mut n = 1;
    loop {
        let xm = 0.5 * (a + b);
        let tol1 = sqrt_eps * x.abs() + tol / 3.0;
        let tol2 = 2.0 * tol1;
        if (x - xm).abs() <= tol2 - 0.5 * (b - a) {
            return Ok(Solution { x, fx, evaluations: n });
        }
        if n >= MAX_ITERATIONS {
            return Err(RootError::NoConvergence { x });
        }
        let mut golden_step = true;
        if e.abs() > tol1 {
            // Fit a parabola through x, v, w.
            let r = (x - w) * (fx - fv);
            let mut q = (x - v) * (fx - fw);
            let mut p = (x - v) * q - (x - w) * r;
            q = 2.0 * (q - r);
            if q > 0.0 {
                p = -p;
            }
            q = q.abs();
            let e_prev = e;
            e = d;
            if p.abs() < (0.5 * q * e_prev).abs() && p > q * (a - x) && p < q * (b - x) {
                // Parabolic interpolation step.
                d = p / q;
                let u = x + d;
                if u - a < tol2 || b - u < tol2 {
                    d = tol1.copysign(xm - x);
                }
                golden_step = false;
            }
        }
        if golden_step {
            e = if x >= xm { a - x } else { b - x };
            d = golden * e;
        }
        let u = if d.abs() >= tol1 { x + d } else { x + tol1.copysign(d) };
        let fu = f(u);
        n += 1;
        if !fu.is_finite() {
            return Err(RootError::NotFinite);
        }
        if fu <= fx {
            if u >= x {
                a = x;
            } else {
                b = x;
            }
            v = w;
            fv = fw;
            w = x;
            fw = fx;
            x = u;
            fx = fu;
        } else {
            if u < x {
                a = u;
            } else {
                b = u;
            }
            if fu <= fw || w == x {
                v = w;
                fv = fw;
                w = u;
                fw = fu;
            } else if fu <= fv || v == x || v == w {
                v = u;
                fv = fu;
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    #[test]
    fn roots_of_known_functions() {
        // Source: closed forms: √2 is the root of x² − 2; cos x = x at the Dottie
        // number 0.7390851332151607 (From memory: value of the fixed point of cos,
        // checked here by the residual cos(x) − x ≈ 0).
        let r = brent_root(|x| x * x - 2.0, 0.0, 2.0, 1e-15).unwrap();
        assert_abs_diff_eq!(r.x, 2f64.sqrt(), epsilon = 1e-14);
        let r = brent_root(|x| x.cos() - x, 0.0, 1.0, 1e-15).unwrap();
        assert_abs_diff_eq!(r.x.cos() - r.x, 0.0, epsilon = 1e-14);
        assert_abs_diff_eq!(r.x, 0.7390851332151607, epsilon = 1e-14);
        // Reversed bracket and a root at an end.
        let r = brent_root(|x| x - 1.0, 3.0, -1.0, 1e-12).unwrap();
        assert_abs_diff_eq!(r.x, 1.0, epsilon = 1e-12);
        assert_eq!(brent_root(|x| x - 1.0, 1.0, 5.0, 1e-12).unwrap().x, 1.0);
    }

    #[test]
    fn a_step_function_is_bisected_to_its_jump() {
        // A discontinuous function still converges to the sign change (bisection fallback).
        let r = brent_root(|x| if x < 0.3 { -1.0 } else { 1.0 }, 0.0, 1.0, 1e-12).unwrap();
        assert_abs_diff_eq!(r.x, 0.3, epsilon = 1e-11);
    }

    #[test]
    fn no_sign_change_is_an_error() {
        assert!(matches!(brent_root(|x| x * x + 1.0, -1.0, 1.0, 1e-9), Err(RootError::NotBracketed { .. })));
        assert!(matches!(brent_root(|x| x, f64::NAN, 1.0, 1e-9), Err(RootError::NotFinite)));
    }

    #[test]
    fn empty_brackets_are_their_own_error() {
        // A zero-width bracket holds no interval to search, even where f is zero.
        assert_eq!(brent_root(|x| x, 0.0, 0.0, 1e-9), Err(RootError::EmptyBracket { a: 0.0, b: 0.0 }));
        assert_eq!(brent_root(|x| x - 1.0, 2.0, 2.0, 1e-9), Err(RootError::EmptyBracket { a: 2.0, b: 2.0 }));
        // The minimiser needs a < b: equal or reversed ends are empty brackets.
        assert_eq!(brent_minimum(|x| x * x, 1.0, 1.0, 1e-9), Err(RootError::EmptyBracket { a: 1.0, b: 1.0 }));
        assert_eq!(brent_minimum(|x| x * x, 1.0, -1.0, 1e-9), Err(RootError::EmptyBracket { a: 1.0, b: -1.0 }));
        let msg = RootError::EmptyBracket { a: 1.0, b: -1.0 }.to_string();
        assert!(msg.contains("[1, -1] is empty") && !msg.contains("not finite"), "{msg}");
        // Non-finite ends are still reported as such, before the bracket is checked.
        assert_eq!(brent_minimum(|x| x, f64::NAN, f64::NAN, 1e-9), Err(RootError::NotFinite));
        assert_eq!(brent_minimum(|x| x, 0.0, 1.0, 0.0), Err(RootError::NotFinite));
    }

    #[test]
    fn minima_of_known_functions() {
        // Source: closed forms: (x − 0.7)² has its minimum at 0.7; x·ln x at 1/e.
        let m = brent_minimum(|x| (x - 0.7) * (x - 0.7), 0.0, 3.0, 1e-12).unwrap();
        assert_abs_diff_eq!(m.x, 0.7, epsilon = 1e-7);
        let m = brent_minimum(|x| x * x.ln(), 0.05, 2.0, 1e-12).unwrap();
        assert_abs_diff_eq!(m.x, (-1f64).exp(), epsilon = 1e-7);
        // Decreasing towards the upper end: the minimum is found at that end.
        let m = brent_minimum(|x| -x, 0.0, 1.0, 1e-10).unwrap();
        assert_abs_diff_eq!(m.x, 1.0, epsilon = 1e-7);
    }
}
