//! Gain stability: how much of a change in A reaches Af.
//!
//! - Sensitivity S = (dAf/Af)/(dA/A) = 1/(1 + A·β) = 1/D: a fractional change in
//!   A is divided by D in Af (desensitivity factor D).
//! - Over an open-loop gain range A_min…A_max, Af = A/(1 + A·β) is monotonic in
//!   A on either side of its pole A = −1/β, so its extremes over a range that does
//!   not contain the pole are at the ends of the range.
//!
//! Source: Sedra & Smith, *Microelectronic Circuits*, 7th ed., section 10.2
//! (from memory).

use super::gain::{closed_loop_gain, feedback_sense, FeedbackSense};
use crate::check;
use crate::error::{Error, Result};

/// Gain sensitivity S = (dAf/Af)/(dA/A) = 1/(1 + A·β), dimensionless.
///
/// # Errors
/// As [`closed_loop_gain`].
///
/// # Example
/// ```
/// use loopwright::feedback::gain_sensitivity;
/// // D = 1000: a 10 % change in A moves Af by about 0.01 %.
/// assert!((gain_sensitivity(99_900.0, 0.01).unwrap() - 1e-3).abs() < 1e-15);
/// assert_eq!(gain_sensitivity(-1.0, 1.0).unwrap_err().code(), "oscillation");
/// ```
pub fn gain_sensitivity(a: f64, beta: f64) -> Result<f64> {
    let af = closed_loop_gain(a, beta)?;
    // 1/D = Af/A, computed without forming D again.
    Ok(af / a)
}

/// Closed-loop gain over an open-loop gain range, and its spread.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct GainSpread {
    /// Af at A_min, in the units of A.
    pub at_min: f64,
    /// Af at A_typ.
    pub at_typ: f64,
    /// Af at A_max.
    pub at_max: f64,
    /// Deviation of the lower of the end values from Af(A_typ), % (≤ 0).
    pub low_percent: f64,
    /// Deviation of the higher of the end values from Af(A_typ), % (≥ 0).
    pub high_percent: f64,
    /// Total spread (Af_high − Af_low)/|Af(A_typ)|, %.
    pub spread_percent: f64,
    /// The same spread in parts per million.
    pub spread_ppm: f64,
    /// Sensitivity 1/D at A_typ.
    pub sensitivity: f64,
    /// True when any point of the range has |D| < 1 (positive feedback).
    pub positive_feedback: bool,
}

/// Closed-loop gain at A_min, A_typ and A_max with the spread in % and ppm.
///
/// Af(A) = A/(1 + A·β) at each end; spread = (max − min)/|Af(A_typ)|.
/// `beta` in the topology's β unit; the gains in its reciprocal.
///
/// # Errors
/// Non-finite or zero gains; `a_min ≤ a_typ ≤ a_max` violated or the gains of
/// mixed sign (`a_typ` named); [`Error::Oscillation`] when the range contains the
/// oscillation point A = −1/β.
///
/// # Example
/// ```
/// use loopwright::feedback::gain_spread;
/// // β = 0.01, A from 50 000 to 200 000: Af moves from 99.80 to 99.95.
/// let s = gain_spread(0.01, 5e4, 1e5, 2e5).unwrap();
/// assert!((s.spread_percent - 0.1497).abs() < 1e-3 && !s.positive_feedback);
/// assert_eq!(gain_spread(0.01, 2e5, 1e5, 5e4).unwrap_err().param(), "a_typ");
/// ```
pub fn gain_spread(beta: f64, a_min: f64, a_typ: f64, a_max: f64) -> Result<GainSpread> {
    let beta = check::finite("beta", beta)?;
    let a_min = check::nonzero("a_min", a_min)?;
    let a_typ = check::nonzero("a_typ", a_typ)?;
    let a_max = check::nonzero("a_max", a_max)?;
    if !(a_min <= a_typ && a_typ <= a_max) {
        return Err(Error::OutOfDomain {
            param: "a_typ",
            requirement: "must lie between a_min and a_max",
        });
    }
    if a_min.signum() != a_max.signum() {
        return Err(Error::OutOfDomain {
            param: "a_min",
            requirement: "must have the same sign as a_max",
        });
    }
    if beta != 0.0 {
        let pole = -1.0 / beta;
        if a_min <= pole && pole <= a_max {
            return Err(Error::Oscillation { param: "beta" });
        }
    }
    let at_min = closed_loop_gain(a_min, beta)?;
    let at_typ = closed_loop_gain(a_typ, beta)?;
    let at_max = closed_loop_gain(a_max, beta)?;
    let (low, high) = if at_min <= at_max {
        (at_min, at_max)
    } else {
        (at_max, at_min)
    };
    let scale = 100.0 / at_typ.abs();
    let spread_percent = check::result("spread_percent", (high - low) * scale)?;
    // |D| is smallest where A·β is closest to −1; on a range without the pole
    // that is at one of the ends.
    let positive_feedback = [a_min, a_max].iter().any(|&a| {
        let t = a * beta;
        feedback_sense((1.0 + t).into(), t.into()) == FeedbackSense::Positive
    });
    Ok(GainSpread {
        at_min,
        at_typ,
        at_max,
        low_percent: check::result("low_percent", (low - at_typ) * scale)?,
        high_percent: check::result("high_percent", (high - at_typ) * scale)?,
        spread_percent,
        spread_ppm: check::result("spread_ppm", spread_percent * 1e4)?,
        sensitivity: at_typ / a_typ,
        positive_feedback,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sensitivity_matches_a_finite_difference() {
        // Identity: S = (dAf/Af)/(dA/A) by central difference.
        let (a, beta) = (2e4, 0.003);
        let h = a * 1e-6;
        let daf = closed_loop_gain(a + h, beta).unwrap() - closed_loop_gain(a - h, beta).unwrap();
        let s_numeric = (daf / closed_loop_gain(a, beta).unwrap()) / (2.0 * h / a);
        assert!((s_numeric / gain_sensitivity(a, beta).unwrap() - 1.0).abs() < 1e-6);
    }

    #[test]
    fn spread_of_a_factor_of_four_in_a() {
        // β = 0.01 and A from 5·10⁴ to 2·10⁵: Af(A) = A/(1 + A/100).
        let s = gain_spread(0.01, 5e4, 1e5, 2e5).unwrap();
        let af = |a: f64| a / (1.0 + a * 0.01);
        assert_eq!(s.at_min, af(5e4));
        assert!(((s.spread_percent) - (af(2e5) - af(5e4)) / af(1e5) * 100.0).abs() < 1e-12);
        assert!((s.spread_ppm - s.spread_percent * 1e4).abs() < 1e-9);
        assert!(s.low_percent <= 0.0 && s.high_percent >= 0.0);
    }

    #[test]
    fn range_through_the_oscillation_point_is_refused() {
        assert_eq!(
            gain_spread(-0.01, 50.0, 100.0, 200.0).unwrap_err().code(),
            "oscillation"
        );
    }

    #[test]
    fn positive_feedback_is_flagged() {
        let s = gain_spread(-0.001, 100.0, 200.0, 300.0).unwrap();
        assert!(s.positive_feedback);
        assert!(s.at_typ > 200.0);
    }

    #[test]
    fn mixed_signs_and_order_are_refused() {
        assert_eq!(
            gain_spread(0.1, -10.0, 10.0, 20.0).unwrap_err().param(),
            "a_min"
        );
        assert_eq!(
            gain_spread(0.1, 10.0, 30.0, 20.0).unwrap_err().param(),
            "a_typ"
        );
        assert_eq!(
            gain_spread(0.1, 0.0, 30.0, 40.0).unwrap_err().param(),
            "a_min"
        );
    }
}
