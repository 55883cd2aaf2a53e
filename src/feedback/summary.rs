//! Everything the feedback relations say about one stage, in one call.

use super::gain::{loop_phasors, FeedbackSense};
use super::topology::Topology;
use crate::error::Result;
use num_complex::Complex64;

/// The feedback relations of a stage with real A and β, with their units.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct FeedbackSummary {
    /// The topology.
    pub topology: Topology,
    /// Unit of A and Af (V/V, A/A, A/V, V/A).
    pub gain_unit: &'static str,
    /// Unit of β.
    pub beta_unit: &'static str,
    /// Closed-loop gain Af = A/(1 + A·β).
    pub closed_loop_gain: f64,
    /// Loop gain T = A·β.
    pub loop_gain: f64,
    /// Amount of feedback D = 1 + A·β.
    pub feedback_amount: f64,
    /// 20·log10|D|, dB.
    pub feedback_amount_db: f64,
    /// Sensitivity (dAf/Af)/(dA/A) = 1/D.
    pub sensitivity: f64,
    /// Ideal closed-loop gain 1/β (as A → ∞); `None` when β = 0.
    pub ideal_gain: Option<f64>,
    /// Relative error of Af against 1/β, Af·β − 1 = −1/D; `None` when β = 0.
    pub gain_error: Option<f64>,
    /// The loop's sense by the shared classification ([`FeedbackSense`]): with
    /// `Latching` (D < 0) the closed-loop figures above are formula values of a
    /// stage that latches or is unstable, not of a working amplifier.
    pub sense: FeedbackSense,
}

/// Closed-loop gain, loop gain, D (ratio and dB), sensitivity, ideal gain and its
/// error for a stage of the given topology.
///
/// Formulas as in [`super::closed_loop_gain`]; ideal gain 1/β; gain error
/// Af·β − 1 = −1/(1 + A·β).
///
/// # Errors
/// As [`super::closed_loop_gain`].
///
/// # Example
/// ```
/// use loopwright::feedback::{summarize, Topology, FeedbackSense};
/// let s = summarize(Topology::SeriesSeries, 5.0, 200.0).unwrap(); // 5 A/V, 200 V/A
/// assert_eq!(s.gain_unit, "A/V");
/// assert!((s.closed_loop_gain - 5.0 / 1001.0).abs() < 1e-15);
/// assert_eq!(s.sense, FeedbackSense::Negative);
/// assert!(summarize(Topology::SeriesSeries, 5.0, -0.2).is_err()); // Aβ = −1
/// ```
pub fn summarize(topology: Topology, a: f64, beta: f64) -> Result<FeedbackSummary> {
    let p = loop_phasors(Complex64::new(a, 0.0), Complex64::new(beta, 0.0))?;
    let af = p.closed_loop_gain.re;
    let (ideal_gain, gain_error) = if beta == 0.0 {
        (None, None)
    } else {
        (Some(1.0 / beta), Some(af * beta - 1.0))
    };
    Ok(FeedbackSummary {
        topology,
        gain_unit: topology.gain_unit(),
        beta_unit: topology.beta_unit(),
        closed_loop_gain: af,
        loop_gain: p.loop_gain.re,
        feedback_amount: p.feedback_amount.re,
        feedback_amount_db: p.feedback_amount_db,
        sensitivity: af / a,
        ideal_gain,
        gain_error,
        sense: p.sense,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn gain_error_is_minus_one_over_d() {
        let s = summarize(Topology::SeriesShunt, 1e4, 0.1).unwrap();
        assert!((s.gain_error.unwrap() + 1.0 / s.feedback_amount).abs() < 1e-15);
        assert!((s.sensitivity - 1.0 / s.feedback_amount).abs() < 1e-15);
    }

    #[test]
    fn loop_gain_below_minus_one_is_latching() {
        // Issue 15, item 8: A = 100k, β = −1e-4 gives T = −10, D = −9. Before,
        // the sense was "negative" (|D| > 1); D < 0 is a latching loop.
        let s = summarize(Topology::SeriesShunt, 1e5, -1e-4).unwrap();
        assert_eq!((s.loop_gain, s.feedback_amount), (-10.0, -9.0));
        assert_eq!(s.sense, FeedbackSense::Latching);
    }

    #[test]
    fn no_feedback_has_no_ideal_gain() {
        let s = summarize(Topology::ShuntShunt, -2e3, 0.0).unwrap();
        assert_eq!(
            (s.ideal_gain, s.gain_error, s.sense),
            (None, None, FeedbackSense::Neutral)
        );
        assert_eq!(s.closed_loop_gain, -2e3);
    }
}
