//! Closed-loop gain, loop gain and the amount of feedback, in real and phasor form.
//!
//! With open-loop gain A and feedback factor β (units per [`super::Topology`]):
//! - loop gain T = A·β (dimensionless),
//! - amount of feedback (return difference) D = 1 + A·β,
//! - closed-loop gain Af = A / (1 + A·β) = A / D.
//!
//! Source: H. S. Black's feedback equation, in every text on feedback amplifiers,
//! e.g. Sedra & Smith, *Microelectronic Circuits*, 7th ed., eq. 10.4 (from memory).

use crate::check;
use crate::error::{Error, Result};
use num_complex::Complex64;

/// Relative size below which D counts as zero: |D| ≤ ZERO_D·(1 + |T|).
/// A few ulps of the terms that were added to form D.
const ZERO_D: f64 = 4.0 * f64::EPSILON;

/// What kind of feedback the return difference D says this is.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "lowercase"))]
pub enum FeedbackSense {
    /// |D| > 1: the feedback reduces the gain (the usual design).
    Negative,
    /// |D| = 1: the loop neither reduces nor raises the gain (β = 0, or T = −2).
    Neutral,
    /// 0 < |D| < 1: the feedback raises the gain.
    Positive,
    /// D = 0: the oscillation condition (Barkhausen), Aβ = −1.
    Oscillation,
}

/// Classify a return difference D against the loop gain T that formed it.
pub fn feedback_sense(d: Complex64, t: Complex64) -> FeedbackSense {
    let mag = d.norm();
    let scale = 1.0 + t.norm();
    if mag <= ZERO_D * scale {
        FeedbackSense::Oscillation
    } else if (mag - 1.0).abs() <= ZERO_D * scale {
        FeedbackSense::Neutral
    } else if mag > 1.0 {
        FeedbackSense::Negative
    } else {
        FeedbackSense::Positive
    }
}

fn inputs(a: f64, beta: f64) -> Result<(f64, f64)> {
    Ok((check::nonzero("a", a)?, check::finite("beta", beta)?))
}

/// Loop gain T = A·β, dimensionless.
///
/// `a` is the open-loop gain and `beta` the feedback factor, in the reciprocal
/// units of each other (see [`super::Topology`]).
///
/// # Errors
/// `a` zero or not finite, `beta` not finite, or a product that overflows.
///
/// # Example
/// ```
/// use loopwright::feedback::loop_gain;
/// assert_eq!(loop_gain(2e5, 0.1).unwrap(), 2e4);
/// assert_eq!(loop_gain(0.0, 0.1).unwrap_err().param(), "a");
/// ```
pub fn loop_gain(a: f64, beta: f64) -> Result<f64> {
    let (a, beta) = inputs(a, beta)?;
    check::result("loop_gain", a * beta)
}

/// Amount of feedback (return difference) D = 1 + A·β, dimensionless.
///
/// # Errors
/// As [`loop_gain`].
///
/// # Example
/// ```
/// use loopwright::feedback::feedback_amount;
/// assert_eq!(feedback_amount(999.0, 1.0).unwrap(), 1000.0);
/// assert!(feedback_amount(999.0, f64::NAN).is_err());
/// ```
pub fn feedback_amount(a: f64, beta: f64) -> Result<f64> {
    Ok(1.0 + loop_gain(a, beta)?)
}

/// Amount of feedback in decibels, 20·log10|1 + A·β| dB.
///
/// # Errors
/// As [`loop_gain`], and [`Error::Oscillation`] when D = 0 (−∞ dB).
///
/// # Example
/// ```
/// use loopwright::feedback::feedback_amount_db;
/// assert!((feedback_amount_db(999.0, 1.0).unwrap() - 60.0).abs() < 1e-12);
/// assert_eq!(feedback_amount_db(-1.0, 1.0).unwrap_err().code(), "oscillation");
/// ```
pub fn feedback_amount_db(a: f64, beta: f64) -> Result<f64> {
    let t = loop_gain(a, beta)?;
    let d = 1.0 + t;
    if feedback_sense(d.into(), t.into()) == FeedbackSense::Oscillation {
        return Err(Error::Oscillation { param: "beta" });
    }
    Ok(20.0 * libm::log10(libm::fabs(d)))
}

/// Closed-loop gain Af = A / (1 + A·β), in the units of A.
///
/// # Errors
/// `a` zero or not finite, `beta` not finite, and [`Error::Oscillation`] when
/// 1 + A·β = 0.
///
/// # Example
/// ```
/// use loopwright::feedback::closed_loop_gain;
/// // A = 10⁵ V/V, β = 0.01: Af = 10⁵/1001 ≈ 99.9 V/V, close to 1/β = 100.
/// assert!((closed_loop_gain(1e5, 0.01).unwrap() - 1e5 / 1001.0).abs() < 1e-12);
/// assert_eq!(closed_loop_gain(-100.0, 0.01).unwrap_err().code(), "oscillation");
/// ```
pub fn closed_loop_gain(a: f64, beta: f64) -> Result<f64> {
    let t = loop_gain(a, beta)?;
    let d = 1.0 + t;
    if feedback_sense(d.into(), t.into()) == FeedbackSense::Oscillation {
        return Err(Error::Oscillation { param: "beta" });
    }
    check::result("closed_loop_gain", a / d)
}

/// The phasor (complex) forms of the feedback relations at one frequency.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LoopPhasors {
    /// Loop gain T = A·β.
    pub loop_gain: Complex64,
    /// Return difference D = 1 + A·β.
    pub feedback_amount: Complex64,
    /// Closed-loop gain Af = A / D, in the units of A.
    pub closed_loop_gain: Complex64,
    /// |D| in dB, 20·log10|D|.
    pub feedback_amount_db: f64,
    /// Kind of feedback by |D|.
    pub sense: FeedbackSense,
}

/// Loop gain, amount of feedback and closed-loop gain for phasors A(jω) and β(jω).
///
/// Same formulas as the real forms, in complex arithmetic:
/// T = A·β, D = 1 + T, Af = A / D.
///
/// # Errors
/// `a` zero or with a non-finite part, `beta` with a non-finite part,
/// [`Error::Oscillation`] when D = 0, [`Error::Overflow`] when a result overflows.
///
/// # Example
/// ```
/// use loopwright::feedback::loop_phasors;
/// use num_complex::Complex64;
/// // A = −j·1000 (an integrator past its pole), β = 0.1: D = 1 − j·100.
/// let p = loop_phasors(Complex64::new(0.0, -1000.0), Complex64::new(0.1, 0.0)).unwrap();
/// assert!((p.feedback_amount - Complex64::new(1.0, -100.0)).norm() < 1e-12);
/// assert!(loop_phasors(Complex64::new(0.0, 0.0), Complex64::new(0.1, 0.0)).is_err());
/// ```
pub fn loop_phasors(a: Complex64, beta: Complex64) -> Result<LoopPhasors> {
    let a = check::nonzero_complex("a", a)?;
    let beta = check::finite_complex("beta", beta)?;
    let t = check::result_complex("loop_gain", a * beta)?;
    let d = Complex64::new(1.0, 0.0) + t;
    let sense = feedback_sense(d, t);
    if sense == FeedbackSense::Oscillation {
        return Err(Error::Oscillation { param: "beta" });
    }
    Ok(LoopPhasors {
        loop_gain: t,
        feedback_amount: d,
        closed_loop_gain: check::result_complex("closed_loop_gain", a / d)?,
        feedback_amount_db: 20.0 * libm::log10(d.norm()),
        sense,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn beta_zero_gives_the_open_loop_gain() {
        // Identity: no feedback, Af = A and D = 1.
        assert_eq!(closed_loop_gain(1234.5, 0.0), Ok(1234.5));
        assert_eq!(feedback_amount(1234.5, 0.0), Ok(1.0));
        assert_eq!(feedback_amount_db(1234.5, 0.0), Ok(0.0));
    }

    #[test]
    fn oscillation_is_an_error_not_infinity() {
        assert_eq!(
            closed_loop_gain(-50.0, 0.02),
            Err(Error::Oscillation { param: "beta" })
        );
        // Rounding in 1 + Aβ still lands on the oscillation condition.
        assert_eq!(
            closed_loop_gain(3.0, -1.0 / 3.0).unwrap_err().code(),
            "oscillation"
        );
    }

    #[test]
    fn overflow_is_an_error() {
        assert_eq!(
            loop_gain(1e300, 1e300),
            Err(Error::Overflow { param: "loop_gain" })
        );
        assert_eq!(
            closed_loop_gain(1e300, 1e300).unwrap_err().code(),
            "overflow"
        );
    }

    #[test]
    fn bad_inputs_name_the_parameter() {
        assert_eq!(closed_loop_gain(0.0, 1.0).unwrap_err().param(), "a");
        assert_eq!(
            closed_loop_gain(f64::INFINITY, 1.0).unwrap_err().param(),
            "a"
        );
        assert_eq!(
            closed_loop_gain(10.0, f64::NAN).unwrap_err().param(),
            "beta"
        );
        assert_eq!(
            loop_phasors(Complex64::new(1.0, f64::NAN), Complex64::new(1.0, 0.0))
                .unwrap_err()
                .param(),
            "a"
        );
    }

    #[test]
    fn sense_classification() {
        let c = |t: f64| feedback_sense(Complex64::new(1.0 + t, 0.0), Complex64::new(t, 0.0));
        assert_eq!(c(9.0), FeedbackSense::Negative);
        assert_eq!(c(0.0), FeedbackSense::Neutral);
        assert_eq!(c(-0.5), FeedbackSense::Positive);
        assert_eq!(c(-1.0), FeedbackSense::Oscillation);
        assert_eq!(c(-2.0), FeedbackSense::Neutral);
        assert_eq!(c(-3.0), FeedbackSense::Negative);
    }

    #[test]
    fn real_and_phasor_forms_agree_on_the_real_axis() {
        let p = loop_phasors(Complex64::new(2e4, 0.0), Complex64::new(0.05, 0.0)).unwrap();
        assert_eq!(p.closed_loop_gain.re, closed_loop_gain(2e4, 0.05).unwrap());
        assert_eq!(p.closed_loop_gain.im, 0.0);
        assert_eq!(p.feedback_amount_db, feedback_amount_db(2e4, 0.05).unwrap());
    }

    #[test]
    fn phase_margin_45_degrees_gives_1_3_times_peaking_at_crossover() {
        // Common practice, no source: with |T| = 1 and 45° of phase margin
        // (∠T = −135°), |Af| at the crossover is 1/|1 + T| ≈ 1.307 times 1/β.
        let t = Complex64::from_polar(1.0, -135f64.to_radians());
        let beta = 0.1;
        let p = loop_phasors(t / beta, Complex64::new(beta, 0.0)).unwrap();
        assert!((p.closed_loop_gain.norm() * beta - 1.3066).abs() < 1e-4);
    }
}
