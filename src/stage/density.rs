//! A noise density with a 1/f corner, as datasheets give the amplifier's voltage
//! and current noise.

use crate::check;
use crate::error::Result;

/// A white density with a flicker (1/f) corner.
///
/// Density at f: d(f) = d·√(1 + fc/f) (V/√Hz or A/√Hz), the usual way to join a
/// white floor with a 1/f power rise that crosses it at the corner fc. Source:
/// C. D. Motchenbacher & J. A. Connelly, *Low-Noise Electronic System Design*,
/// Wiley, 1993, ch. 2 (from memory).
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct NoiseDensity {
    /// White (broadband) density, V/√Hz or A/√Hz, ≥ 0.
    pub density: f64,
    /// 1/f corner frequency, Hz, ≥ 0 (0 = no flicker part).
    pub corner_hz: f64,
}

impl NoiseDensity {
    /// Check both numbers, reporting under `param`.
    ///
    /// # Errors
    /// Either not finite or below zero.
    pub fn validate(&self, param: &'static str) -> Result<()> {
        check::non_negative(param, self.density)?;
        check::non_negative(param, self.corner_hz)?;
        Ok(())
    }

    /// The density at `f_hz` (> 0): d·√(1 + fc/f).
    ///
    /// # Errors
    /// `f_hz` not greater than zero (param `frequency`); an overflowing result.
    ///
    /// # Example
    /// ```
    /// use loopwright::stage::NoiseDensity;
    /// let en = NoiseDensity { density: 4e-9, corner_hz: 100.0 };
    /// // At the corner the 1/f and white powers are equal: √2 times the floor.
    /// assert!((en.at(100.0).unwrap() - 4e-9 * 2f64.sqrt()).abs() < 1e-22);
    /// assert!(en.at(0.0).is_err());
    /// ```
    pub fn at(&self, f_hz: f64) -> Result<f64> {
        check::positive("frequency", f_hz)?;
        check::result(
            "density",
            self.density * libm::sqrt(1.0 + self.corner_hz / f_hz),
        )
    }
}
