//! Budyko (1974) parameter-free evapotranspiration curve, used as a reference.
//!
//! # Formula
//! `ET/P = [φ · tanh(1/φ) · (1 − exp(−φ))]^(1/2)`, `φ = E0/P`.
//!
//! # Symbols
//! * `φ = E0/P` — aridity index, dimensionless, ≥ 0 (`+∞` allowed: ratio 1).
//! * `ET/P` — evaporative ratio, 0–`min(1, φ)`.
//!
//! # Assumptions
//! Long-term means; no parameter, so no vegetation effect. The result is clamped to
//! the physical limits `0 ≤ ET/P ≤ min(1, φ)`.
//!
//! # References
//! Budyko, M. I. (1974). *Climate and Life*. Academic Press, New York, 508 pp.

use super::WaterBalance;

/// Budyko's (1974) curve. Has no parameter; not a scenario method, but the
/// yardstick other curves are compared against.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Budyko1974;

impl WaterBalance for Budyko1974 {
    fn evaporative_ratio(&self, phi: f64) -> f64 {
        if !(phi > 0.0) {
            return 0.0;
        }
        if phi.is_infinite() {
            return 1.0;
        }
        let r = (phi * (1.0 / phi).tanh() * (-phi).exp_m1().abs()).sqrt();
        r.clamp(0.0, phi.min(1.0))
    }
}
