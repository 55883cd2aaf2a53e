//! The Nyquist reading of any evaluated loop gain: the curve T(j2πf), the
//! least distance |1 + T| from the critical point with its frequency, and the
//! count of encirclements of −1 with the stability verdict it gives.
//!
//! **Curve.** T is sampled on the crossing grid of [`super::crossings`]
//! (corners and resonances on it), and every step is halved in ln f until
//! neither ∠T nor ∠(1 + T) turns by more than [`MAX_TURN_RAD`] between
//! neighbours (down to a step of [`MIN_LN_STEP`] in ln f), so the curve is
//! resolved where it sweeps past −1 and the angle increments are unambiguous.
//!
//! **Encirclements.** The Nyquist contour goes up the jω axis from −j∞ to +j∞
//! and closes through the right half plane. A pole of T at s = 0 (an
//! integrator, k of them) is passed on a small half circle to its right, so it
//! counts as a left-half-plane pole. On that half circle of radius
//! ω_lo = 2π·f_lo (the grid's lowest frequency, at least three decades below
//! every corner) T is taken as T(jω_lo)·(jω_lo/s)^k, the origin poles alone
//! changing. The closed polygon — the mirror image T(−jω) = conj T(jω) from
//! f_hi down to f_lo, the half circle in [`ARC_STEPS_PER_POLE`] steps per
//! origin pole, T(jω) from f_lo up to f_hi, and back to the mirror start
//! (T(j∞) is real for a real loop) — winds around −1 W times counter-clockwise
//! (the sum of the angle increments of 1 + T over 2π). With P open-loop poles
//! of T in the right half plane, the closed loop has Z = P − W poles there
//! (Nyquist's criterion: N = −W clockwise encirclements, Z = N + P).
//! Other poles of T on the jω axis are not indented; a lossless resonance in
//! T makes the curve pass through infinity and the count is then unreliable
//! (the circuit's closed-loop poles remain the authority).
//!
//! Source: H. Nyquist, "Regeneration theory", *Bell System Technical Journal*
//! 11, 1932; the contour with indentations as in Franklin, Powell &
//! Emami-Naeini, *Feedback Control of Dynamic Systems*, 7th ed., section 6.3
//! (from memory).

use super::bandwidth::golden_max;
use super::crossings::{failed, grid, DEFAULT_POINTS_PER_DECADE};
use super::evaluated::{log_slope, EvaluatedLoop};
use super::model::FeedbackLoop;
use super::poles::Verdict;
use crate::error::{Error, Result};
use alloc::vec::Vec;
use core::f64::consts::{PI, TAU};
use num_complex::Complex64;

/// Largest turn of ∠T or ∠(1 + T) between neighbouring curve points, rad (π/8).
pub const MAX_TURN_RAD: f64 = PI / 8.0;
/// Smallest step in ln f that the curve refinement takes.
pub const MIN_LN_STEP: f64 = 1e-9;
/// Most points of one Nyquist curve.
pub const MAX_NYQUIST_POINTS: usize = 200_000;
/// Steps of the half circle around the origin, per origin pole.
pub const ARC_STEPS_PER_POLE: usize = 64;
/// |1 + T| at or below this (relative to 1) puts the curve on −1: marginal.
pub const ON_CRITICAL_POINT: f64 = 1e-9;
/// A log-log slope of |T| at the low end within this of −k counts as k
/// origin poles (when the evaluator does not know them).
const ORIGIN_SLOPE_TOL: f64 = 0.25;

/// The curve T(j2πf) for f > 0 (the mirror image for f < 0 is its conjugate).
#[derive(Debug, Clone, PartialEq, Default)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct NyquistCurve {
    /// Frequencies, Hz, ascending.
    pub freq_hz: Vec<f64>,
    /// Re T.
    pub re: Vec<f64>,
    /// Im T.
    pub im: Vec<f64>,
}

/// The nearest approach of T to −1.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct LeastDistance {
    /// min |1 + T(j2πf)| over f > 0 (1/max|S|, S the sensitivity 1/(1 + T)).
    pub distance: f64,
    /// Where, Hz.
    pub freq_hz: f64,
}

/// The encirclement count and what it says.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Encirclements {
    /// N: clockwise encirclements of −1 by T over the whole contour
    /// (negative for counter-clockwise).
    pub clockwise: i64,
    /// P: poles of T in the right half plane (given by the caller).
    pub open_loop_rhp_poles: u32,
    /// k: poles of T at the origin, passed on the right.
    pub origin_poles: u32,
    /// Z = N + P: closed-loop poles in the right half plane.
    pub closed_loop_rhp_poles: i64,
    /// Stable when Z = 0, unstable when Z > 0, marginal when the curve passes
    /// through −1 (the least distance at most [`ON_CRITICAL_POINT`]).
    pub verdict: Verdict,
}

/// Curve, least distance and encirclements of one loop gain.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Nyquist {
    /// The curve, resolved where it turns.
    pub curve: NyquistCurve,
    /// The nearest approach to −1.
    pub least_distance: LeastDistance,
    /// The encirclement count and verdict.
    pub encirclements: Encirclements,
}

fn complex(p: (f64, f64)) -> Complex64 {
    Complex64::from_polar(libm::exp(p.0), p.1)
}

/// Principal angle difference b − a, in (−π, π].
fn turn(a: Complex64, b: Complex64) -> f64 {
    let d = b.arg() - a.arg();
    let w = d - TAU * crate::float::round(d / TAU);
    if w <= -PI {
        w + TAU
    } else {
        w
    }
}

fn too_coarse(a: Complex64, b: Complex64) -> bool {
    let one = Complex64::new(1.0, 0.0);
    libm::fabs(turn(a, b)) > MAX_TURN_RAD || libm::fabs(turn(one + a, one + b)) > MAX_TURN_RAD
}

/// T sampled on the crossing grid, refined until it turns by at most
/// [`MAX_TURN_RAD`] per step.
///
/// # Errors
/// As [`super::crossings::grid`]; [`Error::TooLarge`] (`nyquist_points`);
/// [`Error::Overflow`] (`loopGain`) when T cannot be evaluated.
pub fn nyquist_curve<L: EvaluatedLoop + ?Sized>(l: &L, ppd: u32) -> Result<NyquistCurve> {
    let f = grid(l, ppd)?;
    let mut out = NyquistCurve::default();
    let at = |x: f64| -> Result<Complex64> {
        let t = complex(l.eval(x));
        if t.re.is_finite() && t.im.is_finite() {
            Ok(t)
        } else {
            Err(failed())
        }
    };
    let mut pts: Vec<(f64, Complex64)> = Vec::with_capacity(f.len());
    for &x in &f {
        let tb = at(x)?;
        if pts.is_empty() {
            pts.push((x, tb));
            continue;
        }
        let mut stack = alloc::vec![(x, tb)];
        while let Some(&(fb, tb)) = stack.last() {
            let (fa, ta) = pts.last().copied().unwrap_or((fb, tb));
            if too_coarse(ta, tb) && libm::log(fb / fa) > MIN_LN_STEP {
                let fm = crate::float::sqrt(fa * fb);
                stack.push((fm, at(fm)?));
            } else {
                pts.push((fb, tb));
                stack.pop();
            }
            if pts.len() + stack.len() > MAX_NYQUIST_POINTS {
                return Err(Error::TooLarge {
                    param: "nyquist_points",
                    limit: MAX_NYQUIST_POINTS as u64,
                });
            }
        }
    }
    for (x, t) in pts {
        out.freq_hz.push(x);
        out.re.push(t.re);
        out.im.push(t.im);
    }
    Ok(out)
}

/// The least |1 + T| on the curve, refined by golden section between the
/// neighbours of the nearest sample.
pub fn least_distance_on<L: EvaluatedLoop + ?Sized>(l: &L, c: &NyquistCurve) -> LeastDistance {
    let d = |i: usize| {
        libm::hypot(
            1.0 + c.re.get(i).copied().unwrap_or(f64::NAN),
            c.im.get(i).copied().unwrap_or(f64::NAN),
        )
    };
    let n = c.freq_hz.len();
    let mut best = 0;
    for i in 1..n {
        if d(i) < d(best) {
            best = i;
        }
    }
    let f = |i: usize| c.freq_hz.get(i).copied().unwrap_or(1.0);
    let (a, b) = (
        f(best.saturating_sub(1)),
        f((best + 1).min(n.saturating_sub(1))),
    );
    let h = |x: f64| -(Complex64::new(1.0, 0.0) + complex(l.eval(libm::exp(x)))).norm();
    let (x, v) = golden_max(&h, libm::log(a), libm::log(b));
    if -v < d(best) {
        LeastDistance {
            distance: -v,
            freq_hz: libm::exp(x),
        }
    } else {
        LeastDistance {
            distance: d(best),
            freq_hz: f(best),
        }
    }
}

/// The number of origin poles: the evaluator's own, or measured from the
/// log-log slope of |T| at the low end of the curve.
fn origin_order<L: EvaluatedLoop + ?Sized>(l: &L, f_lo: f64) -> u32 {
    if let Some(k) = l.origin_poles() {
        return k;
    }
    let s = -log_slope(l, 2.0 * f_lo);
    let k = crate::float::round(s);
    if k >= 1.0 && libm::fabs(s - k) <= ORIGIN_SLOPE_TOL {
        k as u32
    } else {
        0
    }
}

/// W: counter-clockwise turns of 1 + T around 0 over the closed contour.
fn winding(c: &NyquistCurve, k: u32) -> i64 {
    let one = Complex64::new(1.0, 0.0);
    let pts: Vec<Complex64> =
        c.re.iter()
            .zip(&c.im)
            .map(|(&re, &im)| one + Complex64::new(re, im))
            .collect();
    let (Some(&first), Some(&last)) = (pts.first(), pts.last()) else {
        return 0;
    };
    let mut total = 0.0;
    // Positive frequencies, f_lo → f_hi, and their mirror image (same sum).
    for w in pts.windows(2) {
        total += 2.0 * turn(w[0], w[1]);
    }
    // Closing at infinity: from 1 + T(j·f_hi) to its conjugate.
    total += turn(last, last.conj());
    // The half circle around the origin, from −jω_lo to +jω_lo.
    let t_lo = first - one;
    let steps = ARC_STEPS_PER_POLE * k.max(1) as usize;
    let arc = |i: usize| {
        let theta = -PI / 2.0 + PI * i as f64 / steps as f64;
        one + t_lo * Complex64::from_polar(1.0, f64::from(k) * (PI / 2.0 - theta))
    };
    let mut prev = first.conj();
    for i in 0..=steps {
        let z = arc(i);
        total += turn(prev, z);
        prev = z;
    }
    total += turn(prev, first);
    crate::float::round(total / TAU) as i64
}

/// The Nyquist reading of any evaluated loop gain with `open_loop_rhp_poles`
/// poles of T in the right half plane (the caller's count), at `ppd` grid
/// points per decade.
///
/// # Errors
/// As [`nyquist_curve`].
pub fn nyquist_of<L: EvaluatedLoop + ?Sized>(
    l: &L,
    ppd: u32,
    open_loop_rhp_poles: u32,
) -> Result<Nyquist> {
    let curve = nyquist_curve(l, ppd)?;
    let least = least_distance_on(l, &curve);
    let k = origin_order(l, curve.freq_hz.first().copied().unwrap_or(1.0));
    let w = winding(&curve, k);
    let z = i64::from(open_loop_rhp_poles) - w;
    let verdict = if least.distance <= ON_CRITICAL_POINT {
        Verdict::Marginal
    } else if z > 0 {
        Verdict::Unstable
    } else {
        Verdict::Stable
    };
    Ok(Nyquist {
        curve,
        least_distance: least,
        encirclements: Encirclements {
            clockwise: -w,
            open_loop_rhp_poles,
            origin_poles: k,
            closed_loop_rhp_poles: z,
            verdict,
        },
    })
}

/// The Nyquist reading of a pole-list loop (its right-half-plane poles and
/// integrators from the model), on the default grid.
///
/// # Errors
/// As [`nyquist_curve`].
///
/// # Example
/// ```
/// use loopwright::freq::{nyquist, FeedbackLoop, TransferModel, Verdict};
/// // Three equal poles, DC loop gain 12 > 8: two closed-loop poles in the right
/// // half plane, so −1 is encircled twice clockwise (common practice, no source).
/// let a = TransferModel::constant(12.0).pole(1e3).pole(1e3).pole(1e3);
/// let n = nyquist(&FeedbackLoop::with_constant_beta(a, 1.0).unwrap()).unwrap();
/// assert_eq!(n.encirclements.clockwise, 2);
/// assert_eq!(n.encirclements.verdict, Verdict::Unstable);
/// ```
pub fn nyquist(l: &FeedbackLoop) -> Result<Nyquist> {
    let p = l.amplifier().rhp_poles_hz.len() + l.feedback().rhp_poles_hz.len();
    nyquist_of(l, DEFAULT_POINTS_PER_DECADE, p as u32)
}
