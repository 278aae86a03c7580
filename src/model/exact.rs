//! Order-independent sums for basin totals.
//!
//! Basin totals are sums over catchments. Floating-point addition is not
//! associative, so a total computed over shards and then combined would differ in
//! its last bits from one computed in a single run. [`ExactSum`] adds values as
//! fixed-point integers (resolution 2⁻³² ≈ 2.3 × 10⁻¹⁰ of the unit), which is
//! exactly associative: any grouping and order gives the same total, bit for bit.
//!
//! # Formula
//! `S = Σ_i round(x_i · 2³²)` in 128-bit integers; value `S / 2³²`.
//! Each term's rounding error is at most 2⁻³³ units; totals up to about 10²⁷ units fit.
//!
//! # Symbols
//! * `x_i` — a value added, in the unit of the total (m³, kg, ha, $, ...), finite.
//! * `S` — the fixed-point total, a signed 128-bit integer of 2⁻³² units.
//!
//! # Assumptions
//! * Non-finite values are ignored (left out of the total), not propagated.
//! * Values below 2⁻³³ units are lost; each term's magnitude must stay below about
//!   4·10²⁸ units (the `i128` range over 2³²; larger values saturate).
//!
//! # References
//! Common practice, no published source: fixed-point integer accumulation for sums
//! that do not depend on order or grouping.

const SCALE: f64 = 4_294_967_296.0; // 2^32

/// A fixed-point accumulator whose total does not depend on the order of addition.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct ExactSum(pub i128);

impl ExactSum {
    /// Adds a finite value (non-finite values are ignored).
    #[inline]
    pub fn add(&mut self, v: f64) {
        if v.is_finite() {
            self.0 += (v * SCALE).round() as i128;
        }
    }

    /// Adds another accumulator.
    #[inline]
    pub fn merge(&mut self, o: ExactSum) {
        self.0 += o.0;
    }

    /// The total as a float.
    #[inline]
    pub fn value(self) -> f64 {
        self.0 as f64 / SCALE
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn order_and_grouping_do_not_matter() {
        let xs: Vec<f64> = (0..1000).map(|i| ((i * 7919) % 1013) as f64 * 1.37e5 + 0.1 / (i as f64 + 1.0)).collect();
        let mut a = ExactSum::default();
        xs.iter().for_each(|&x| a.add(x));
        let mut b = ExactSum::default();
        xs.iter().rev().for_each(|&x| b.add(x));
        let (mut c1, mut c2) = (ExactSum::default(), ExactSum::default());
        xs[..300].iter().for_each(|&x| c1.add(x));
        xs[300..].iter().for_each(|&x| c2.add(x));
        c1.merge(c2);
        assert_eq!(a, b);
        assert_eq!(a, c1);
        let plain: f64 = xs.iter().sum();
        assert!((a.value() - plain).abs() < 1e-6 * plain.abs());
    }
}
