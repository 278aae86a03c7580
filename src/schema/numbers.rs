//! Number formats: of the output tables ([`num`], [`opt_num`]: fixed decimals,
//! byte-stable, never NaN), for readers of the report and the figures
//! ([`readable`], [`readable_signed`]: a true minus sign, thousands grouped on
//! request, an explicit `+` on changes), and of the numbers `run_info.json`
//! records ([`recorded`], [`RecordedJson`]: [`RECORDED_DIGITS`] significant
//! digits, so a derived 0.5249999999999999 reads 0.525).

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

/// Significant digits of every number `run_info.json` records ([`recorded`]).
///
/// Twelve digits keep every value a scenario can state (its inputs have at most
/// a few) and drop the last digits of binary arithmetic, which are noise to a
/// reader: the middle of a uniform 0.35–0.7 range is 0.5249999999999999 in
/// binary floating point and is recorded as 0.525.
pub const RECORDED_DIGITS: usize = 12;

/// `v` rounded to [`RECORDED_DIGITS`] significant digits (the nearest binary
/// value to that decimal); zero and non-finite values unchanged.
pub fn recorded(v: f64) -> f64 {
    if !v.is_finite() || v == 0.0 {
        return v;
    }
    format!("{:.*e}", RECORDED_DIGITS - 1, v).parse().unwrap_or(v)
}

/// The JSON layout of the run folder's JSON files: serde_json's pretty layout
/// (two-space indent), with every floating-point number written through
/// [`recorded`] and then in shortest round-trip form. The one place those files
/// format their numbers.
pub struct RecordedJson<'a>(serde_json::ser::PrettyFormatter<'a>);

impl Default for RecordedJson<'_> {
    fn default() -> Self {
        RecordedJson(serde_json::ser::PrettyFormatter::new())
    }
}

impl serde_json::ser::Formatter for RecordedJson<'_> {
    fn write_f64<W: ?Sized + std::io::Write>(&mut self, w: &mut W, v: f64) -> std::io::Result<()> {
        self.0.write_f64(w, recorded(v))
    }
    fn write_f32<W: ?Sized + std::io::Write>(&mut self, w: &mut W, v: f32) -> std::io::Result<()> {
        self.0.write_f64(w, recorded(f64::from(v)))
    }
    fn begin_array<W: ?Sized + std::io::Write>(&mut self, w: &mut W) -> std::io::Result<()> {
        self.0.begin_array(w)
    }
    fn end_array<W: ?Sized + std::io::Write>(&mut self, w: &mut W) -> std::io::Result<()> {
        self.0.end_array(w)
    }
    fn begin_array_value<W: ?Sized + std::io::Write>(&mut self, w: &mut W, first: bool) -> std::io::Result<()> {
        self.0.begin_array_value(w, first)
    }
    fn end_array_value<W: ?Sized + std::io::Write>(&mut self, w: &mut W) -> std::io::Result<()> {
        self.0.end_array_value(w)
    }
    fn begin_object<W: ?Sized + std::io::Write>(&mut self, w: &mut W) -> std::io::Result<()> {
        self.0.begin_object(w)
    }
    fn end_object<W: ?Sized + std::io::Write>(&mut self, w: &mut W) -> std::io::Result<()> {
        self.0.end_object(w)
    }
    fn begin_object_key<W: ?Sized + std::io::Write>(&mut self, w: &mut W, first: bool) -> std::io::Result<()> {
        self.0.begin_object_key(w, first)
    }
    fn begin_object_value<W: ?Sized + std::io::Write>(&mut self, w: &mut W) -> std::io::Result<()> {
        self.0.begin_object_value(w)
    }
    fn end_object_value<W: ?Sized + std::io::Write>(&mut self, w: &mut W) -> std::io::Result<()> {
        self.0.end_object_value(w)
    }
}

/// `value` as pretty JSON with its numbers [`recorded`] (no final line end).
pub fn recorded_json<T: serde::Serialize + ?Sized>(value: &T) -> serde_json::Result<String> {
    let mut out = Vec::with_capacity(1024);
    let mut ser = serde_json::Serializer::with_formatter(&mut out, RecordedJson::default());
    value.serialize(&mut ser)?;
    // serde_json writes only valid UTF-8.
    Ok(String::from_utf8(out).unwrap_or_default())
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

    #[test]
    fn recorded_numbers_drop_binary_noise_only() {
        // (0.35 + 0.7) / 2 in binary floating point: the middle of the demo's w_grass range.
        let mid = (0.35_f64 + 0.7) / 2.0;
        assert_eq!(mid.to_string(), "0.5249999999999999");
        assert_eq!(recorded(mid), 0.525);
        assert_eq!(recorded(0.1 + 0.2), 0.3);
        // Twelve significant digits survive; the thirteenth is rounded.
        assert_eq!(recorded(0.042881616962697), 0.0428816169627);
        assert_eq!(recorded(123_456_789_012.34), 123_456_789_012.0);
        assert_eq!(recorded(-2.5e-7), -2.5e-7);
        assert_eq!(recorded(0.0), 0.0);
        assert!(recorded(f64::NAN).is_nan());
        assert_eq!(recorded(f64::INFINITY), f64::INFINITY);
        // Within the relative half-unit of the twelfth digit.
        for v in [mid, std::f64::consts::PI, 1.0 / 3.0, 6.02214076e23, -9.87654321e-12] {
            assert!(((recorded(v) - v) / v).abs() <= 5e-12, "{v}");
        }
    }

    #[test]
    fn recorded_json_writes_what_a_reader_expects() {
        let v = serde_json::json!({"a": [(0.35_f64 + 0.7) / 2.0, 2.0, 7], "b": {"c": 0.04288161696269708, "d": "x"}, "e": 1e-20});
        let text = recorded_json(&v).unwrap();
        assert_eq!(
            text,
            "{\n  \"a\": [\n    0.525,\n    2.0,\n    7\n  ],\n  \"b\": {\n    \"c\": 0.0428816169627,\n    \"d\": \"x\"\n  },\n  \"e\": 1e-20\n}"
        );
        // The layout is serde_json's own pretty layout.
        let plain = serde_json::json!({"a": [0.525, 2.0, 7], "b": {"c": 0.0428816169627, "d": "x"}, "e": 1e-20});
        assert_eq!(text, serde_json::to_string_pretty(&plain).unwrap());
    }
}
