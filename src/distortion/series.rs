//! A weakly nonlinear amplifier as a power series, and the same amplifier inside a
//! feedback loop.
//!
//! The amplifier is y = a1·x + a2·x² + a3·x³ (x the input signal, y the output, in
//! the units of the topology: V/V for a voltage amplifier). Put it in a loop with a
//! linear feedback factor β, so that its input is the error signal u = x − β·y, and
//! the closed loop is again a power series y = b1·x + b2·x² + b3·x³ + …, whose first
//! three coefficients follow exactly by series reversion. With D = 1 + a1·β:
//!
//! - b1 = a1 / D
//! - b2 = a2 / D³
//! - b3 = (a3·D − 2·a2²·β) / D⁵
//!
//! The −2·a2²·β term is the second-order distortion fed back and mixed again into
//! third order: feedback does not simply divide every coefficient by D.
//!
//! Source: Gray, Hurst, Lewis & Meyer, *Analysis and Design of Analog Integrated
//! Circuits*, 5th ed., ch. 8 (feedback), on the effect of feedback on distortion (from
//! memory); checked symbolically by `tests/reference/distortion_series_sympy.py`.

use crate::check;
use crate::error::{Error, Result};

/// Relative size below which D = 1 + a1·β counts as zero: |D| ≤ ZERO_D·(1 + |a1·β|),
/// a few ulps of the terms that formed it.
const ZERO_D: f64 = 4.0 * f64::EPSILON;

/// The coefficients of y = a1·x + a2·x² + a3·x³.
///
/// `a1` is the small-signal gain in the amplifier's gain unit; `a2` and `a3` carry
/// that unit divided by the input unit once and twice (for a voltage amplifier,
/// V/V², V/V³).
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct PowerSeries {
    /// Linear gain a1 (never zero).
    pub a1: f64,
    /// Second-order coefficient a2.
    pub a2: f64,
    /// Third-order coefficient a3.
    pub a3: f64,
}

impl PowerSeries {
    /// A checked power series.
    ///
    /// # Errors
    /// `a1` zero or not finite; `a2` or `a3` not finite.
    ///
    /// # Example
    /// ```
    /// use loopwright::distortion::PowerSeries;
    /// let amp = PowerSeries::new(1000.0, 50.0, -20.0).unwrap();
    /// assert_eq!(amp.output(0.001), 1000.0 * 0.001 + 50.0 * 1e-6 - 20.0 * 1e-9);
    /// assert_eq!(PowerSeries::new(0.0, 1.0, 1.0).unwrap_err().param(), "a1");
    /// ```
    pub fn new(a1: f64, a2: f64, a3: f64) -> Result<Self> {
        Ok(PowerSeries {
            a1: check::nonzero("a1", a1)?,
            a2: check::finite("a2", a2)?,
            a3: check::finite("a3", a3)?,
        })
    }

    /// y = a1·x + a2·x² + a3·x³, by Horner's rule.
    pub fn output(&self, x: f64) -> f64 {
        x * (self.a1 + x * (self.a2 + x * self.a3))
    }

    /// The incremental gain dy/dx = a1 + 2·a2·x + 3·a3·x².
    pub fn slope(&self, x: f64) -> f64 {
        self.a1 + x * (2.0 * self.a2 + x * 3.0 * self.a3)
    }
}

/// The return difference D = 1 + a1·β of the linearised loop, checked to be a
/// negative-feedback (or weak positive-feedback) loop, D > 0.
///
/// # Errors
/// `beta` not finite; [`Error::Oscillation`] when D = 0; [`Error::OutOfDomain`]
/// on `beta` when D < 0 (the static loop latches and the closed-loop transfer
/// curve has no branch through the origin to expand about).
pub fn return_difference(open: &PowerSeries, beta: f64) -> Result<f64> {
    let beta = check::finite("beta", beta)?;
    let t = check::result("loop_gain", open.a1 * beta)?;
    let d = 1.0 + t;
    if libm::fabs(d) <= ZERO_D * (1.0 + libm::fabs(t)) {
        return Err(Error::Oscillation { param: "beta" });
    }
    if d < 0.0 {
        return Err(Error::OutOfDomain {
            param: "beta",
            requirement: "must give 1 + a1·beta > 0; with 1 + a1·beta < 0 the loop latches",
        });
    }
    Ok(d)
}

/// The closed-loop series b1, b2, b3 of `open` under feedback factor `beta`.
///
/// b1 = a1/D, b2 = a2/D³, b3 = (a3·D − 2·a2²·β)/D⁵ with D = 1 + a1·β (see the
/// module notes). `beta` is in the reciprocal of a1's unit. β = 0 returns the
/// open-loop series.
///
/// # Errors
/// As [`return_difference`], and [`Error::Overflow`] when a coefficient
/// overflows (D very close to zero).
///
/// # Example
/// ```
/// use loopwright::distortion::{closed_loop_series, PowerSeries};
/// // a1 = 1000, β = 0.099: D = 100, so b1 = 10, b2 = a2/10⁶.
/// let amp = PowerSeries::new(1000.0, 200.0, -50.0).unwrap();
/// let cl = closed_loop_series(&amp, 0.099).unwrap();
/// assert!((cl.a1 - 10.0).abs() < 1e-12 && (cl.a2 - 2e-4).abs() < 1e-18);
/// assert_eq!(closed_loop_series(&amp, -0.001).unwrap_err().code(), "oscillation");
/// ```
pub fn closed_loop_series(open: &PowerSeries, beta: f64) -> Result<PowerSeries> {
    let d = return_difference(open, beta)?;
    let b1 = check::result("b1", open.a1 / d)?;
    let d3 = d * d * d;
    let b2 = check::result("b2", open.a2 / d3)?;
    // (a3·D − 2·a2²·β)/D⁵ written as (a3 − 2·a2²·β/D)/D⁴ to keep the
    // intermediate products in range for large D.
    let b3 = check::result(
        "b3",
        (open.a3 - 2.0 * open.a2 * open.a2 * beta / d) / (d3 * d),
    )?;
    Ok(PowerSeries {
        a1: b1,
        a2: b2,
        a3: b3,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn beta_zero_keeps_the_open_loop_series() {
        // Identity: no feedback, D = 1.
        let amp = PowerSeries::new(300.0, -12.0, 4.0).unwrap();
        assert_eq!(closed_loop_series(&amp, 0.0).unwrap(), amp);
    }

    #[test]
    fn closed_loop_series_satisfies_the_loop_equation_to_third_order() {
        // Identity: y(x) = A(x − β·y(x)) must hold up to x³; the residual of the
        // truncated series is O(x⁴), so it falls 16× for each halving of x.
        let amp = PowerSeries::new(500.0, 80.0, -30.0).unwrap();
        let beta = 0.002;
        let cl = closed_loop_series(&amp, beta).unwrap();
        let residual = |x: f64| cl.output(x) - amp.output(x - beta * cl.output(x));
        let r1 = residual(2e-2).abs();
        let r2 = residual(1e-2).abs();
        assert!(r1 > 0.0 && (r1 / r2 - 16.0).abs() < 0.5, "r1={r1} r2={r2}");
    }

    #[test]
    fn gray_meyer_third_order_with_no_second_order_term() {
        // Gray, Hurst, Lewis & Meyer, 5th ed., ch. 8 (from memory): with a2 = 0,
        // b3 = a3/(1 + a1·β)⁴.
        let amp = PowerSeries::new(2000.0, 0.0, -7.0).unwrap();
        let cl = closed_loop_series(&amp, 0.0045).unwrap();
        assert!((cl.a3 / (-7.0 / 10f64.powi(4)) - 1.0).abs() < 1e-14);
    }

    #[test]
    fn bad_inputs_name_the_parameter() {
        assert_eq!(
            PowerSeries::new(f64::NAN, 0.0, 0.0).unwrap_err().param(),
            "a1"
        );
        assert_eq!(
            PowerSeries::new(1.0, f64::INFINITY, 0.0)
                .unwrap_err()
                .param(),
            "a2"
        );
        assert_eq!(
            PowerSeries::new(1.0, 0.0, f64::NAN).unwrap_err().param(),
            "a3"
        );
        let amp = PowerSeries::new(100.0, 1.0, 1.0).unwrap();
        assert_eq!(
            closed_loop_series(&amp, f64::NAN).unwrap_err().param(),
            "beta"
        );
        assert_eq!(
            closed_loop_series(&amp, -0.01).unwrap_err().code(),
            "oscillation"
        );
        assert_eq!(
            closed_loop_series(&amp, -0.02).unwrap_err().code(),
            "out_of_domain"
        );
    }
}
