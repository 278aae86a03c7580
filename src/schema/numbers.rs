//! Number formats of the output tables: fixed decimals, byte-stable, never NaN.

/// Formats a finite number with `decimals` places (−0 written as 0); empty when
/// the number is not finite.
#[inline]
pub fn num(v: f64, decimals: usize) -> String {
    if !v.is_finite() {
        return String::new();
    }
    let s = format!("{v:.decimals$}");
    if s.starts_with('-') && s[1..].chars().all(|c| c == '0' || c == '.') {
        s[1..].to_string()
    } else {
        s
    }
}

/// Formats an optional number (empty when `None`).
#[inline]
pub fn opt_num(v: Option<f64>, decimals: usize) -> String {
    v.map(|x| num(x, decimals)).unwrap_or_default()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn negative_zero_and_non_finite() {
        assert_eq!(num(-0.0001, 2), "0.00");
        assert_eq!(num(-1.5, 1), "-1.5");
        assert_eq!(num(f64::NAN, 2), "");
        assert_eq!(opt_num(None, 2), "");
        assert_eq!(opt_num(Some(2.0), 0), "2");
    }
}
