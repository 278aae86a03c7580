//! How numbers are written in the report: fixed decimals, thousands grouped with
//! commas from 1,000, a true minus sign (U+2212), and an explicit `+` on changes.
//! Undefined values are written as an en dash. The digits come from
//! [`crate::schema::numbers`], shared with the figures.

use crate::schema::numbers::{readable, readable_signed, Thousands};

/// Text for a value that the run left undefined (an empty CSV cell).
pub const UNDEFINED: &str = "–";

/// `v` with `decimals` places, grouped, true minus sign ([`readable`]).
pub fn fixed(v: f64, decimals: usize) -> String {
    readable(v, decimals, Thousands::Grouped).unwrap_or_else(|| UNDEFINED.to_string())
}

/// A change: like [`fixed`] with a leading `+` when positive after rounding ([`readable_signed`]).
pub fn signed(v: f64, decimals: usize) -> String {
    readable_signed(v, decimals, Thousands::Grouped).unwrap_or_else(|| UNDEFINED.to_string())
}

/// `v` to `digits` significant figures (at most 6 decimals; whole numbers when large).
pub fn sig(v: f64, digits: usize) -> String {
    if !v.is_finite() {
        return UNDEFINED.to_string();
    }
    if v == 0.0 {
        return "0".to_string();
    }
    let mag = v.abs().log10().floor() as i64;
    let decimals = (digits as i64 - 1 - mag).clamp(0, 6) as usize;
    fixed(v, decimals)
}

/// A parameter value as a reader would write it: whole numbers plainly, others to
/// at most 6 significant figures with trailing zeros dropped (so a central value
/// stored as 0.5249999999999999 reads 0.525). Exact to the digits shown.
pub fn param(v: f64) -> String {
    if !v.is_finite() {
        return UNDEFINED.to_string();
    }
    if v.fract() == 0.0 && v.abs() < 1e15 {
        return format!("{v:.0}");
    }
    let mag = v.abs().log10().floor() as i64;
    let decimals = (5 - mag).clamp(0, 12) as usize;
    let s = format!("{v:.decimals$}");
    let s = if s.contains('.') { s.trim_end_matches('0').trim_end_matches('.').to_string() } else { s };
    s.replace('-', "\u{2212}")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn formats() {
        assert_eq!(fixed(1439178.61, 0), "1,439,179");
        assert_eq!(fixed(-2.7567, 1), "\u{2212}2.8");
        assert_eq!(fixed(-0.04, 1), "0.0");
        assert_eq!(fixed(999.4, 0), "999");
        assert_eq!(fixed(1000.0, 0), "1,000");
        assert_eq!(signed(1.9182, 1), "+1.9");
        assert_eq!(signed(0.04, 1), "0.0");
        assert_eq!(signed(-5.3388, 1), "\u{2212}5.3");
        assert_eq!(sig(0.003510, 3), "0.00351");
        assert_eq!(sig(23.8303, 3), "23.8");
        assert_eq!(sig(12345.6, 3), "12,346");
        assert_eq!(fixed(f64::NAN, 2), UNDEFINED);
        assert_eq!(param(0.5249999999999999), "0.525");
        assert_eq!(param(2.0), "2");
        assert_eq!(param(0.06), "0.06");
        assert_eq!(param(1.15), "1.15");
        assert_eq!(param(150000.0), "150000");
    }
}
