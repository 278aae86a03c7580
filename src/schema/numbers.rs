//! Number formats: of the output tables ([`num`], [`opt_num`]: fixed decimals,
//! byte-stable, never NaN) and for readers of the report and the figures
//! ([`readable`], [`readable_signed`]: a true minus sign, thousands grouped on
//! request, an explicit `+` on changes).

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

/// Thousands grouping of [`readable`] numbers.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Thousands {
    /// Commas between thousands from 1,000 (after rounding): the report's text,
    /// figure ticks and value labels.
    Grouped,
    /// No separators: years, and map legends and labels (which have always been
    /// written so; a percentage change can pass 1000).
    Plain,
}

/// `v` for a reader: `decimals` places, a true minus sign (U+2212), no sign on a
/// value that rounds to zero, thousands as asked. `None` when `v` is not finite
/// (each reader has its own text for that).
pub fn readable(v: f64, decimals: usize, thousands: Thousands) -> Option<String> {
    if !v.is_finite() {
        return None;
    }
    let s = format!("{:.*}", decimals, v.abs());
    let zero = s.bytes().all(|c| c == b'0' || c == b'.');
    let (int, frac) = match s.split_once('.') {
        Some((i, f)) => (i, Some(f)),
        None => (s.as_str(), None),
    };
    let mut out = String::with_capacity(s.len() + s.len() / 3 + 3);
    if v < 0.0 && !zero {
        out.push('\u{2212}');
    }
    let n = int.len();
    for (i, c) in int.chars().enumerate() {
        if thousands == Thousands::Grouped && i > 0 && (n - i) % 3 == 0 {
            out.push(',');
        }
        out.push(c);
    }
    if let Some(f) = frac {
        out.push('.');
        out.push_str(f);
    }
    Some(out)
}

/// A change for a reader: like [`readable`] with a leading `+` when positive
/// after rounding.
pub fn readable_signed(v: f64, decimals: usize, thousands: Thousands) -> Option<String> {
    let s = readable(v, decimals, thousands)?;
    Some(if v > 0.0 && s.bytes().any(|c| (b'1'..=b'9').contains(&c)) { format!("+{s}") } else { s })
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

    #[test]
    fn readable_numbers() {
        use Thousands::*;
        let r = |v, d, t| readable(v, d, t).unwrap();
        assert_eq!(r(1439178.61, 0, Grouped), "1,439,179");
        assert_eq!(r(1439178.61, 0, Plain), "1439179");
        assert_eq!(r(-2.7567, 1, Grouped), "\u{2212}2.8");
        assert_eq!(r(-0.04, 1, Grouped), "0.0");
        assert_eq!(r(-0.0, 1, Plain), "0.0");
        assert_eq!(r(999.4, 0, Grouped), "999");
        assert_eq!(r(999.6, 0, Grouped), "1,000");
        assert_eq!(r(-1_234_567.891, 2, Grouped), "\u{2212}1,234,567.89");
        assert_eq!(r(-1500.0, 0, Plain), "\u{2212}1500");
        assert_eq!(readable(f64::NAN, 1, Plain), None);
        assert_eq!(readable_signed(1.9182, 1, Grouped).unwrap(), "+1.9");
        assert_eq!(readable_signed(0.04, 1, Grouped).unwrap(), "0.0");
        assert_eq!(readable_signed(-5.3388, 1, Grouped).unwrap(), "\u{2212}5.3");
        assert_eq!(readable_signed(2500.0, 0, Plain).unwrap(), "+2500");
    }
}
