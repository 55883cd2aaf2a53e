//! Inverse design: which β, how much open-loop gain, how much closed-loop gain.
//!
//! From Af = A / (1 + A·β):
//! - the ideal β for a target gain (A → ∞, where Af → 1/β): β = 1/Af;
//! - β for a target closed-loop gain: β = 1/Af − 1/A = (A − Af)/(A·Af);
//! - with ideal gain 1/β, the relative gain error is ε = 1 − Af·β = 1/(1 + A·β), so the
//!   least open-loop gain for |ε| ≤ ε_max is A = (1 − ε_max)/(ε_max·β);
//! - a required amount of feedback D ≥ D_req caps the closed-loop gain at
//!   Af = A / D_req, reached with β = (D_req − 1)/A.
//!
//! Closed forms checked against sympy by `tests/reference/feedback_inverse_sympy.py`.

use crate::check;
use crate::error::{Error, Result};

/// Feedback factor β that turns open-loop gain A into closed-loop gain Af.
///
/// β = 1/Af − 1/A, in the reciprocal units of A. Negative feedback can only
/// reduce the gain, so Af must have the sign of A and |Af| ≤ |A|; the return
/// difference is then D = A/Af ≥ 1.
///
/// # Errors
/// `a` or `target_gain` zero or not finite; [`Error::Unreachable`] when
/// `target_gain` exceeds `a` in magnitude or has the opposite sign.
///
/// # Example
/// ```
/// use loopwright::feedback::beta_for_gain;
/// // A = 10⁵, Af = 100 → β = 0.01 − 10⁻⁵ = 0.00999.
/// assert!((beta_for_gain(1e5, 100.0).unwrap() - 0.00999).abs() < 1e-15);
/// assert_eq!(beta_for_gain(50.0, 100.0).unwrap_err().code(), "unreachable");
/// ```
pub fn beta_for_gain(a: f64, target_gain: f64) -> Result<f64> {
    let a = check::nonzero("a", a)?;
    let af = check::nonzero("target_gain", target_gain)?;
    if af.signum() != a.signum() {
        return Err(Error::Unreachable {
            param: "target_gain",
            reason: "negative feedback keeps the sign of the open-loop gain a",
        });
    }
    if af.abs() > a.abs() {
        return Err(Error::Unreachable {
            param: "target_gain",
            reason: "negative feedback can only lower the gain, and this target exceeds the open-loop gain a",
        });
    }
    check::result("beta", 1.0 / af - 1.0 / a)
}

/// The ideal feedback factor for a target closed-loop gain: the β whose ideal gain
/// 1/β is the target, as with an infinite open-loop gain.
///
/// β = 1/Af (the limit of β = 1/Af − 1/A as A → ∞), in the reciprocal unit of Af.
/// It is the β to pass to [`min_open_loop_gain`] when a gain is specified rather
/// than a network.
///
/// # Errors
/// `target_gain` zero or not finite; [`Error::Overflow`] when 1/Af is not finite
/// (a target gain below about 1e-308 in magnitude).
///
/// # Example
/// ```
/// use loopwright::feedback::ideal_beta;
/// // A gain of 100 wants β = 1/100 = 0.01.
/// assert_eq!(ideal_beta(100.0).unwrap(), 0.01);
/// assert_eq!(ideal_beta(0.0).unwrap_err().param(), "target_gain");
/// ```
pub fn ideal_beta(target_gain: f64) -> Result<f64> {
    let af = check::nonzero("target_gain", target_gain)?;
    check::result("beta", 1.0 / af)
}

/// Least open-loop gain A that keeps the gain error against 1/β within `gain_error`.
///
/// A = (1 − ε)/(ε·β), where ε = 1/(1 + A·β) is the relative shortfall of Af from
/// the ideal 1/β. The result has the sign of β (so that A·β > 0).
///
/// `beta` in the topology's β unit, `gain_error` a fraction (0.001 for 0.1 %),
/// 0 < ε < 1. Result in the reciprocal unit of β.
///
/// # Errors
/// `beta` zero or not finite; `gain_error` outside (0, 1).
///
/// # Example
/// ```
/// use loopwright::feedback::min_open_loop_gain;
/// // Gain of 100 (β = 0.01) within 0.1 %: A ≥ 0.999/(0.001·0.01) = 99 900.
/// assert!((min_open_loop_gain(0.01, 0.001).unwrap() - 99_900.0).abs() < 1e-8);
/// assert_eq!(min_open_loop_gain(0.01, 1.5).unwrap_err().param(), "gain_error");
/// ```
pub fn min_open_loop_gain(beta: f64, gain_error: f64) -> Result<f64> {
    let beta = check::nonzero("beta", beta)?;
    let eps = check::finite("gain_error", gain_error)?;
    if !(eps > 0.0 && eps < 1.0) {
        return Err(Error::OutOfDomain {
            param: "gain_error",
            requirement: "must be a fraction greater than 0 and less than 1 (0.001 for 0.1 %)",
        });
    }
    check::result("a", (1.0 - eps) / (eps * beta))
}

/// The largest closed-loop gain reachable with at least `feedback_amount` of feedback.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct GainCeiling {
    /// Largest closed-loop gain Af = A / D_req, in the units of A.
    pub closed_loop_gain: f64,
    /// The feedback factor that reaches it, β = (D_req − 1)/A.
    pub beta: f64,
}

/// The largest closed-loop gain reachable with open-loop gain `a` while keeping the
/// amount of feedback at least `feedback_amount` (a ratio, D_req ≥ 1).
///
/// Af_max = A / D_req, β = (D_req − 1)/A.
///
/// # Errors
/// `a` zero or not finite; `feedback_amount` below 1 or not finite.
///
/// # Example
/// ```
/// use loopwright::feedback::max_closed_loop_gain;
/// // A = 10⁵ and at least 40 dB (×100) of feedback: Af ≤ 1000, β = 99/10⁵.
/// let c = max_closed_loop_gain(1e5, 100.0).unwrap();
/// assert!((c.closed_loop_gain - 1000.0).abs() < 1e-9 && (c.beta - 99e-5).abs() < 1e-18);
/// assert_eq!(max_closed_loop_gain(1e5, 0.5).unwrap_err().param(), "feedback_amount");
/// ```
pub fn max_closed_loop_gain(a: f64, feedback_amount: f64) -> Result<GainCeiling> {
    let a = check::nonzero("a", a)?;
    let d = check::finite("feedback_amount", feedback_amount)?;
    if d < 1.0 {
        return Err(Error::OutOfDomain {
            param: "feedback_amount",
            requirement: "must be 1 or more (0 dB or more); below 1 the feedback is positive",
        });
    }
    Ok(GainCeiling {
        closed_loop_gain: a / d,
        beta: check::result("beta", (d - 1.0) / a)?,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::feedback::gain::closed_loop_gain;

    #[test]
    fn beta_for_gain_round_trips_through_closed_loop_gain() {
        for (a, af) in [(1e5, 100.0), (-2e4, -10.0), (50.0, 50.0), (1e9, 1.0)] {
            let beta = beta_for_gain(a, af).unwrap();
            assert!(
                (closed_loop_gain(a, beta).unwrap() / af - 1.0).abs() < 1e-12,
                "a={a} af={af}"
            );
        }
        assert_eq!(beta_for_gain(50.0, 50.0), Ok(0.0));
    }

    #[test]
    fn ideal_beta_is_the_limit_of_beta_for_gain() {
        // β = 1/Af − 1/A tends to 1/Af as A grows (closed form of the module doc);
        // at A = 10¹²·Af the two differ by 1e-12 relative.
        for af in [100.0, -47.0, 1e-3, 2.5e6] {
            let ideal = ideal_beta(af).unwrap();
            let near = beta_for_gain(af * 1e12, af).unwrap();
            assert!((near / ideal - 1.0).abs() < 1e-11, "af={af}");
        }
        assert_eq!(ideal_beta(f64::NAN).unwrap_err().param(), "target_gain");
        assert_eq!(
            ideal_beta(f64::INFINITY).unwrap_err().param(),
            "target_gain"
        );
        assert_eq!(ideal_beta(5e-324).unwrap_err().code(), "overflow");
    }

    #[test]
    fn unreachable_targets() {
        assert_eq!(
            beta_for_gain(100.0, -10.0).unwrap_err().code(),
            "unreachable"
        );
        assert_eq!(
            beta_for_gain(-100.0, -1000.0).unwrap_err().param(),
            "target_gain"
        );
        assert_eq!(
            beta_for_gain(100.0, 0.0).unwrap_err().code(),
            "out_of_domain"
        );
        assert_eq!(beta_for_gain(0.0, 1.0).unwrap_err().param(), "a");
    }

    #[test]
    fn min_gain_meets_the_error_exactly() {
        let beta = 1.0 / 47.0;
        let a = min_open_loop_gain(beta, 1e-4).unwrap();
        let af = closed_loop_gain(a, beta).unwrap();
        assert!((1.0 - af * beta - 1e-4).abs() < 1e-15);
        // Negative β (inverting convention) gives a negative A with Aβ > 0.
        assert!(min_open_loop_gain(-0.5, 0.01).unwrap() < 0.0);
    }

    #[test]
    fn domain_edges() {
        assert!(min_open_loop_gain(0.1, 0.0).is_err());
        assert!(min_open_loop_gain(0.1, 1.0).is_err());
        assert!(min_open_loop_gain(0.0, 0.1).is_err());
        assert_eq!(
            max_closed_loop_gain(1e3, 1.0).unwrap(),
            GainCeiling {
                closed_loop_gain: 1e3,
                beta: 0.0
            }
        );
        assert!(max_closed_loop_gain(1e3, f64::INFINITY).is_err());
    }
}
