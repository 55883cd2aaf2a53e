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

/// The sense of a loop, from its return difference D = 1 + T (T = A·β): the one
/// classification every area uses (feedback summary, feedback card, distortion).
///
/// For a real loop gain (A and β real: the midband or DC loop):
/// - D > 1 (T > 0): negative feedback, the gain is reduced by D;
/// - D = 1 (T = 0, no loop): neutral;
/// - 0 < D < 1 (−1 < T < 0): positive feedback, the gain is raised by 1/D;
/// - D = 0 (T = −1): the oscillation condition (Barkhausen);
/// - D < 0 (T < −1): latching. The loop gain is below −1: a static loop has a
///   closed-loop transfer curve that folds back (it latches to a rail), and a loop
///   with any dynamics has a real right-half-plane pole, so it is unstable. A/D
///   is then a number with no stage behind it, and |D| > 1 is never read as
///   negative feedback.
///
/// For a complex loop gain (a phasor at one frequency) the sign of D is not
/// defined; |D| says whether the loop reduces (|D| > 1, `Negative`) or raises
/// (|D| < 1, `Positive`) the gain at that frequency. Whether such a loop is stable
/// is a question for its poles or its margins ([`crate::freq`]), not for one
/// phasor.
///
/// Source: the return-difference reading of Bode, *Network Analysis and Feedback
/// Amplifier Design*, 1945, ch. 4 (from memory); the latching case is the sign
/// rule of a static loop (common practice, no source).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "lowercase"))]
pub enum FeedbackSense {
    /// D > 1 (real), or |D| > 1 (phasor): the feedback reduces the gain.
    Negative,
    /// D = 1 (real), or |D| = 1 (phasor): the loop neither reduces nor raises the gain.
    Neutral,
    /// 0 < D < 1 (real), or |D| < 1 (phasor): the feedback raises the gain.
    Positive,
    /// D = 0: the oscillation condition (Barkhausen), A·β = −1.
    Oscillation,
    /// D < 0, a real loop gain below −1: latching, or unstable with dynamics.
    Latching,
}

impl FeedbackSense {
    /// A short description for people, with the condition that gave it.
    pub fn description(self) -> &'static str {
        match self {
            FeedbackSense::Negative => "negative feedback (D > 1)",
            FeedbackSense::Neutral => "no net feedback (D = 1)",
            FeedbackSense::Positive => "positive feedback (0 < D < 1): gain raised",
            FeedbackSense::Oscillation => "oscillation condition (D = 0)",
            FeedbackSense::Latching => {
                "latching or unstable (D < 0: loop gain below −1); not negative feedback"
            }
        }
    }
}

/// Classify a return difference D against the loop gain T that formed it (see
/// [`FeedbackSense`]). D counts as 0 or 1 within a few ulps of the terms that
/// formed it, |D| ≤ ZERO_D·(1 + |T|).
#[inline]
pub fn feedback_sense(d: Complex64, t: Complex64) -> FeedbackSense {
    let scale = 1.0 + t.norm();
    if d.norm() <= ZERO_D * scale {
        return FeedbackSense::Oscillation;
    }
    let real = d.im == 0.0 && t.im == 0.0;
    // The size that decides: D itself for a real loop, |D| for a phasor.
    let size = if real { d.re } else { d.norm() };
    if real && size < 0.0 {
        FeedbackSense::Latching
    } else if (size - 1.0).abs() <= ZERO_D * scale {
        FeedbackSense::Neutral
    } else if size > 1.0 {
        FeedbackSense::Negative
    } else {
        FeedbackSense::Positive
    }
}

/// [`feedback_sense`] of a real loop gain T = A·β.
///
/// # Example
/// ```
/// use loopwright::feedback::{real_feedback_sense, FeedbackSense};
/// assert_eq!(real_feedback_sense(10.0), FeedbackSense::Negative);
/// // A = 100k, β = −1e-4: T = −10, D = −9: latching, not negative feedback.
/// assert_eq!(real_feedback_sense(1e5 * -1e-4), FeedbackSense::Latching);
/// ```
pub fn real_feedback_sense(t: f64) -> FeedbackSense {
    feedback_sense(Complex64::new(1.0 + t, 0.0), Complex64::new(t, 0.0))
}

#[inline]
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
#[inline]
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
        // D < 0 is a loop gain below −1: latching, never negative feedback (issue
        // 15, item 8; before, |D| > 1 read T = −3 as negative feedback).
        assert_eq!(c(-2.0), FeedbackSense::Latching);
        assert_eq!(c(-3.0), FeedbackSense::Latching);
        assert_eq!(c(-10.0), FeedbackSense::Latching);
        // A phasor is judged by |D|: T = −2 + 0.1j reduces the gain a little.
        let p = |t: Complex64| feedback_sense(t + 1.0, t);
        assert_eq!(p(Complex64::new(-3.0, 0.1)), FeedbackSense::Negative);
        assert_eq!(p(Complex64::new(-0.5, 0.1)), FeedbackSense::Positive);
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
