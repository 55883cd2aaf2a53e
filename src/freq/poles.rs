//! Closed-loop poles, the stability verdict, and ζ and Q of each pole.
//!
//! The poles are the roots of the characteristic polynomial C(p) of
//! [`super::characteristic_polynomial`], p = s/ωn, scaled back by ωn. For a pole
//! s = σ + jω_d: natural frequency ω0 = |s| (f0 = ω0/2π), damping ratio
//! ζ = −σ/|s|, and for a complex pair Q = 1/(2ζ).
//!
//! Verdict: stable when every pole has σ < −tol·|s|, marginal when the largest
//! σ is within ±tol·|s| of the axis (or a pole sits at the origin), unstable
//! otherwise; tol = [`AXIS_TOL`]. With a delay the poles are those of the Padé
//! approximant; its order is reported.
//!
//! Source: the definitions in Franklin, Powell & Emami-Naeini, *Feedback Control of
//! Dynamic Systems*, 7th ed., section 3.3 (from memory).

use super::model::FeedbackLoop;
use super::poly::characteristic_polynomial;
use super::roots::roots;
use crate::check;
use crate::error::Result;
use alloc::vec::Vec;
use core::f64::consts::TAU;

/// Relative distance from the imaginary axis under which a pole counts as on it.
pub const AXIS_TOL: f64 = 1e-9;

/// Stability of the closed loop, from its poles.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "lowercase"))]
pub enum Verdict {
    /// Every pole in the open left half plane.
    Stable,
    /// No pole in the right half plane, at least one on the imaginary axis: the
    /// loop sits on the edge and oscillates (or drifts) without decay.
    Marginal,
    /// At least one pole in the right half plane.
    Unstable,
}

/// One closed-loop pole.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Pole {
    /// Real part σ, rad/s.
    pub re: f64,
    /// Imaginary part ω_d, rad/s.
    pub im: f64,
    /// Natural frequency |s|/2π, Hz.
    pub natural_hz: f64,
    /// Damping ratio ζ = −σ/|s| (1 for a real LHP pole, negative in the RHP; 0 at
    /// the origin).
    pub zeta: f64,
    /// Q = 1/(2ζ) for a complex pole with ζ > 0; `None` for a real pole.
    pub q: Option<f64>,
}

/// The closed-loop poles and what they say.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct ClosedLoopPoles {
    /// Poles sorted by natural frequency; complex ones as conjugate pairs.
    pub poles: Vec<Pole>,
    /// Stability verdict; the authority when margins are not meaningful.
    pub verdict: Verdict,
    /// The smallest damping ratio among the poles (the least damped mode).
    pub min_zeta: Option<f64>,
    /// Padé order used for a delay, or 0 when the loop has none.
    pub pade_order: u32,
}

/// Closed-loop poles of the loop: roots of 1 + A(s)·β(s) = 0.
///
/// # Errors
/// [`crate::Error::Overflow`] or [`crate::Error::Singular`] from the polynomial;
/// [`crate::Error::NoConvergence`] if the root finder fails.
///
/// # Example
/// ```
/// use loopwright::freq::{closed_loop_poles, FeedbackLoop, TransferModel, Verdict};
/// // Three equal poles: unstable once the DC loop gain exceeds 8.
/// let a = |t0: f64| TransferModel::constant(t0).pole(1e3).pole(1e3).pole(1e3);
/// let p = closed_loop_poles(&FeedbackLoop::with_constant_beta(a(7.0), 1.0).unwrap()).unwrap();
/// assert_eq!(p.verdict, Verdict::Stable);
/// let p = closed_loop_poles(&FeedbackLoop::with_constant_beta(a(9.0), 1.0).unwrap()).unwrap();
/// assert_eq!(p.verdict, Verdict::Unstable);
/// ```
pub fn closed_loop_poles(l: &FeedbackLoop) -> Result<ClosedLoopPoles> {
    let c = characteristic_polynomial(l)?;
    let wn = c.omega_n;
    let mut poles = Vec::new();
    for z in roots(&c.coeffs)? {
        let s = z * wn;
        let mag = check::result("poles", crate::float::modulus(s))?;
        let zeta = if mag > 0.0 { -s.re / mag } else { 0.0 };
        let q = if s.im != 0.0 && zeta > 0.0 {
            Some(1.0 / (2.0 * zeta))
        } else {
            None
        };
        poles.push(Pole {
            re: s.re,
            im: s.im,
            natural_hz: mag / TAU,
            zeta,
            q,
        });
    }
    crate::sort::sort_by(&mut poles, |a, b| {
        a.natural_hz
            .total_cmp(&b.natural_hz)
            .then(a.im.total_cmp(&b.im))
    });
    let verdict = verdict_of(&poles);
    let min_zeta = poles.iter().map(|p| p.zeta).min_by(f64::total_cmp);
    let has_delay = l.amplifier().delay_s > 0.0 || l.feedback().delay_s > 0.0;
    Ok(ClosedLoopPoles {
        poles,
        verdict,
        min_zeta,
        pade_order: if has_delay { l.pade_order() } else { 0 },
    })
}

/// Verdict from a list of poles.
pub(crate) fn verdict_of(poles: &[Pole]) -> Verdict {
    let mut v = Verdict::Stable;
    for p in poles {
        let mag = libm::hypot(p.re, p.im);
        if p.re > AXIS_TOL * mag {
            return Verdict::Unstable;
        }
        if p.re >= -AXIS_TOL * mag {
            v = Verdict::Marginal;
        }
    }
    v
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::freq::model::TransferModel;

    #[test]
    fn single_pole_moves_out_by_the_feedback_amount() {
        // Pole at fH·(1 + A0β) = 10 Hz · 1001 (single-pole bandwidth extension).
        let l = FeedbackLoop::with_constant_beta(TransferModel::constant(1e5).pole(10.0), 0.01)
            .unwrap();
        let p = closed_loop_poles(&l).unwrap();
        assert_eq!(p.poles.len(), 1);
        assert!((p.poles[0].natural_hz / 10_010.0 - 1.0).abs() < 1e-13);
        assert_eq!(p.poles[0].zeta, 1.0);
        assert_eq!(p.verdict, Verdict::Stable);
    }

    #[test]
    fn three_equal_poles_at_a_loop_gain_of_eight_sit_on_the_axis() {
        // Common practice, no source: three equal real poles oscillate at T0 = 8,
        // at √3 times the pole frequency.
        let a = TransferModel::constant(8.0).pole(1e3).pole(1e3).pole(1e3);
        let p = closed_loop_poles(&FeedbackLoop::with_constant_beta(a, 1.0).unwrap()).unwrap();
        assert_eq!(p.verdict, Verdict::Marginal);
        let osc = p.poles.iter().find(|q| q.im > 0.0).unwrap();
        assert!((osc.im / (TAU * 1e3 * 3f64.sqrt()) - 1.0).abs() < 1e-12);
    }

    #[test]
    fn two_pole_loop_q_matches_the_closed_form() {
        // Q = √((1+T0)·ω1·ω2)/(ω1+ω2) (two-pole closed form).
        let (t0, f1, f2) = (999.0, 1e3, 1e6);
        let l =
            FeedbackLoop::with_constant_beta(TransferModel::constant(t0).pole(f1).pole(f2), 1.0)
                .unwrap();
        let p = closed_loop_poles(&l).unwrap();
        let q = crate::float::sqrt((1.0 + t0) * f1 * f2) / (f1 + f2);
        assert!((p.poles[0].q.unwrap() - q).abs() < 1e-12 * q);
        assert_eq!(p.poles[0].re, p.poles[1].re);
    }

    #[test]
    fn integrator_with_low_cut_gives_a_pole_at_the_origin() {
        let a = TransferModel::constant(100.0)
            .integrator()
            .low_cut(1.0)
            .pole(1e4);
        let p = closed_loop_poles(&FeedbackLoop::with_constant_beta(a, 1.0).unwrap()).unwrap();
        assert_eq!(p.verdict, Verdict::Marginal);
        assert!(p.poles.iter().any(|q| q.natural_hz == 0.0));
    }

    #[test]
    fn delay_reports_the_pade_order() {
        let a = TransferModel::constant(10.0).pole(1e3).delay(1e-5);
        let l = FeedbackLoop::with_pade_order(a, TransferModel::constant(1.0), 3).unwrap();
        let p = closed_loop_poles(&l).unwrap();
        assert_eq!(p.pade_order, 3);
        assert_eq!(p.poles.len(), 4);
    }
}
