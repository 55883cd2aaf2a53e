//! Compensation: the dominant pole for a target phase margin, and the largest β
//! that keeps a target phase margin.
//!
//! Both search one scalar x on the worst phase margin of
//! [`super::stability_margins`] (negative when the closed loop is unstable):
//! - dominant pole: a pole at fd is added to the amplifier (its gain and other
//!   poles unchanged). The answer is the highest fd whose margin still reaches
//!   the target.
//! - largest β: with the amplifier as it is and a constant β, the answer is the
//!   largest β ≤ the cap whose margin still reaches the target, i.e. the smallest
//!   closed-loop gain ≈ 1/β.
//!
//! The margin need not be monotonic in x: a zero between poles, or a pole pair,
//! can make it dip and recover (a loop that has 60° at β = 0.3 and 0.001 but not
//! at 0.01). So neither search bisects over the whole range. Method: scan ln x at
//! [`SCAN_POINTS_PER_DECADE`] points per decade, with extra points around every
//! value of x that puts the crossover on a corner of the model (a factor 2 either
//! side), evaluate the margin at each, take the highest scanned x that meets the
//! target, and bisect in ln x between it and the next scanned x (which misses)
//! to a relative width of [`SEARCH_REL_TOL`]. The lower end of the interval that
//! holds the answer is refined the same way and reported as `holds_from`. An
//! interval of x narrower than the scan step can be missed; the scan density and
//! the corner neighbourhoods make that rare for models with real corners.
//!
//! A loop with no crossover has an unbounded phase margin and meets any target,
//! unless its closed loop is unstable.

use super::margins::stability_margins;
use super::model::{FeedbackLoop, TransferModel};
use super::poles::Verdict;
use super::response::loop_log;
use crate::check;
use crate::error::{Error, Result};
use alloc::vec::Vec;

/// Relative width at which the searches stop.
pub const SEARCH_REL_TOL: f64 = 1e-10;
/// Points per decade of the scan that precedes the refinement.
pub const SCAN_POINTS_PER_DECADE: u32 = 16;
/// The corner neighbourhoods: x·{1/NEIGHBOUR, 1, NEIGHBOUR} around each value of
/// x that puts the crossover on a corner.
const NEIGHBOUR: f64 = 2.0;

/// A compensation result.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Compensation {
    /// The dominant-pole frequency (Hz) or the feedback factor β found.
    pub value: f64,
    /// Phase margin reached, degrees; `None` when there is no crossover.
    pub phase_margin_deg: Option<f64>,
    /// Unity-gain crossover frequency with this value, Hz.
    pub crossover_hz: Option<f64>,
    /// Closed-loop DC (or midband) gain A0/(1 + A0·β) with this value, unit of A.
    pub closed_loop_gain: f64,
    /// Lower end of the interval of values, containing `value`, over which the
    /// target holds; below it the margin misses the target again. The lower end
    /// of the search (1e-9 Hz, or 1e-12·cap for β) when it holds all the way down.
    pub holds_from: f64,
}

fn target(pm: f64) -> Result<f64> {
    let pm = check::finite("target_pm_deg", pm)?;
    if pm <= 0.0 || pm >= 180.0 {
        return Err(Error::OutOfDomain {
            param: "target_pm_deg",
            requirement: "must be between 0° and 180°",
        });
    }
    Ok(pm)
}

/// Worst phase margin, signed; without a crossover +∞, or −∞ when the closed
/// loop is unstable all the same (an open-loop unstable amplifier).
fn pm_of(l: &FeedbackLoop) -> Result<f64> {
    let m = stability_margins(l)?;
    Ok(match m.phase_margin_deg {
        Some(pm) => pm,
        None if m.closed_loop == Verdict::Unstable => f64::NEG_INFINITY,
        None => f64::INFINITY,
    })
}

fn result(l: &FeedbackLoop, value: f64, holds_from: f64) -> Result<Compensation> {
    let m = stability_margins(l)?;
    let a = l.amplifier().gain;
    let b = l.feedback().gain;
    let gain = if l.amplifier().origin_poles > 0 {
        1.0 / b
    } else {
        a / (1.0 + a * b)
    };
    Ok(Compensation {
        value,
        phase_margin_deg: m.phase_margin_deg,
        crossover_hz: m.crossover_hz,
        closed_loop_gain: check::result("closed_loop_gain", gain)?,
        holds_from,
    })
}

/// Bisection on ln x between `yes` (meets the target) and `no` (misses it), in
/// either order; returns the last x known to meet it.
fn bisect(meets: &dyn Fn(f64) -> Result<bool>, mut yes: f64, mut no: f64) -> Result<f64> {
    for _ in 0..200 {
        if libm::fabs(no / yes - 1.0) <= SEARCH_REL_TOL {
            break;
        }
        let mid = crate::float::sqrt(yes * no);
        if meets(mid)? {
            yes = mid;
        } else {
            no = mid;
        }
    }
    Ok(yes)
}

/// The scan points: a log grid over [lo, hi] at [`SCAN_POINTS_PER_DECADE`], and
/// `extra` values within (lo, hi) with their neighbours, ascending.
fn scan_points(lo: f64, hi: f64, extra: &[f64]) -> Vec<f64> {
    // A cap near the bottom of the float range (a subnormal β limit) puts `lo` at 0 and
    // the decade count at infinity: scan from the smallest normal number instead, and
    // where even that is above the cap, the cap alone.
    let lo = lo.max(f64::MIN_POSITIVE);
    if hi <= lo {
        return alloc::vec![hi];
    }
    let decades = libm::log10(hi / lo);
    let n = (crate::float::ceil(decades * f64::from(SCAN_POINTS_PER_DECADE)) as usize).max(1);
    let (a, b) = (libm::log(lo), libm::log(hi));
    // The ends exactly, the inside from the exponential.
    let mut x: Vec<f64> = (0..=n)
        .map(|i| match i {
            0 => lo,
            i if i == n => hi,
            i => libm::exp(a + (b - a) * i as f64 / n as f64),
        })
        .collect();
    for &e in extra {
        for v in [e / NEIGHBOUR, e, e * NEIGHBOUR] {
            if v.is_finite() && v > lo && v < hi {
                x.push(v);
            }
        }
    }
    crate::sort::sort_by(&mut x, f64::total_cmp);
    x.dedup();
    x
}

/// The highest x in [lo, hi] that meets the target and the lower end of its
/// interval: scan `points` from the top, then bisect both brackets.
/// `None` when no scanned point meets it.
fn largest_meeting(
    meets: &dyn Fn(f64) -> Result<bool>,
    points: &[f64],
) -> Result<Option<(f64, f64)>> {
    let mut top = None;
    for i in (0..points.len()).rev() {
        if meets(points[i])? {
            top = Some(i);
            break;
        }
    }
    let Some(i) = top else { return Ok(None) };
    let value = match points.get(i + 1) {
        Some(&miss) => bisect(meets, points[i], miss)?,
        None => points[i],
    };
    let mut bottom = points[0];
    for j in (0..i).rev() {
        if !meets(points[j])? {
            bottom = bisect(meets, points[j + 1], points[j])?;
            break;
        }
    }
    Ok(Some((value, bottom)))
}

/// |A(f)| at each corner of the amplifier.
fn gain_at_corners(amplifier: &TransferModel) -> Result<Vec<(f64, f64)>> {
    let l = FeedbackLoop::with_constant_beta(amplifier.clone(), 1.0)?;
    Ok(l.corners_hz()
        .into_iter()
        .map(|f| (f, libm::exp(loop_log(&l, f).ln_mag)))
        .collect())
}

/// The dominant-pole frequency that gives `target_pm_deg` of phase margin when
/// added to `amplifier` with the constant feedback factor `beta`.
///
/// Returns the highest such pole frequency (the widest bandwidth), Hz, with the
/// phase margin and crossover it gives.
///
/// # Errors
/// `target_pm_deg` outside (0°, 180°); `beta` zero or not finite; the model
/// checks of [`FeedbackLoop::new`]; [`Error::Unreachable`] (`target_pm_deg`) when
/// no dominant pole scanned in 1e-9…1e12 Hz reaches the target (a delay or RHP
/// zero too close, say).
///
/// # Example
/// ```
/// use loopwright::freq::{dominant_pole_for_margin, TransferModel};
/// // Other poles at 1 MHz and 10 MHz, A0 = 1e5, unity feedback, 60° target.
/// let a = TransferModel::constant(1e5).pole(1e6).pole(1e7);
/// let c = dominant_pole_for_margin(&a, 1.0, 60.0).unwrap();
/// assert!((c.phase_margin_deg.unwrap() - 60.0).abs() < 1e-6);
/// assert!(c.value < 10.0 && c.crossover_hz.unwrap() < 1e6);
/// assert_eq!(dominant_pole_for_margin(&a, 1.0, 200.0).unwrap_err().param(), "target_pm_deg");
/// ```
pub fn dominant_pole_for_margin(
    amplifier: &TransferModel,
    beta: f64,
    target_pm_deg: f64,
) -> Result<Compensation> {
    let pm = target(target_pm_deg)?;
    let beta = check::nonzero("beta", beta)?;
    let with = |fd: f64| FeedbackLoop::with_constant_beta(amplifier.clone().pole(fd), beta);
    // The pole must fit the model limits; validate once with a harmless pole.
    let _ = with(1.0)?;
    let meets = |fd: f64| -> Result<bool> { Ok(pm_of(&with(fd)?)? >= pm) };
    // A dominant pole at fd puts the crossover near |A0·β|·fd: the values of fd
    // that put it on a corner, and the corners themselves.
    let t0 = libm::fabs(amplifier.gain * beta);
    let extra: Vec<f64> = gain_at_corners(amplifier)?
        .into_iter()
        .flat_map(|(f, _)| [f, f / t0])
        .collect();
    let points = scan_points(super::model::MIN_HZ, super::model::MAX_HZ, &extra);
    match largest_meeting(&meets, &points)? {
        Some((fd, from)) => result(&with(fd)?, fd, from),
        None => Err(Error::Unreachable {
            param: "target_pm_deg",
            reason: "no dominant pole reaches this phase margin with the other poles, zeros and delay as they are",
        }),
    }
}

/// Largest constant β for which the amplifier still has `target_pm_deg` of phase
/// margin, with the closed-loop gain and the crossover that result.
///
/// `beta_limit` caps the search (1 for a passive voltage divider, say); when the
/// target holds at the cap, the cap is returned.
///
/// # Errors
/// `target_pm_deg` outside (0°, 180°); `beta_limit` not > 0; the model checks of
/// [`FeedbackLoop::new`]; [`Error::Unreachable`] (`target_pm_deg`) when no β
/// scanned in 1e-12·beta_limit…beta_limit meets the target.
///
/// # Example
/// ```
/// use loopwright::freq::{max_beta_for_margin, TransferModel};
/// // Three poles: 45° of margin limits how much feedback can be applied.
/// let a = TransferModel::constant(1e4).pole(1e3).pole(1e5).pole(1e6);
/// let c = max_beta_for_margin(&a, 45.0, 1.0).unwrap();
/// assert!((c.phase_margin_deg.unwrap() - 45.0).abs() < 1e-6 && c.value < 1.0);
/// assert_eq!(max_beta_for_margin(&a, 45.0, 0.0).unwrap_err().param(), "beta_limit");
/// ```
pub fn max_beta_for_margin(
    amplifier: &TransferModel,
    target_pm_deg: f64,
    beta_limit: f64,
) -> Result<Compensation> {
    let pm = target(target_pm_deg)?;
    let cap = check::positive("beta_limit", beta_limit)?;
    let with = |b: f64| FeedbackLoop::with_constant_beta(amplifier.clone(), b);
    let _ = with(cap)?;
    let meets = |b: f64| -> Result<bool> { Ok(pm_of(&with(b)?)? >= pm) };
    // β = 1/|A(fk)| puts the crossover on the corner fk.
    let extra: Vec<f64> = gain_at_corners(amplifier)?
        .into_iter()
        .map(|(_, g)| 1.0 / g)
        .collect();
    let points = scan_points(cap * MIN_BETA_FRACTION, cap, &extra);
    match largest_meeting(&meets, &points)? {
        Some((b, from)) => result(&with(b)?, b, from),
        None => Err(Error::Unreachable {
            param: "target_pm_deg",
            reason: "the amplifier misses this phase margin even with very little feedback",
        }),
    }
}

/// Smallest β searched, as a fraction of the cap.
const MIN_BETA_FRACTION: f64 = 1e-12;

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_subnormal_beta_limit_is_answered_not_a_runaway_scan() {
        // Found by the hostile-call campaign (tests/js/hostile.mjs): a β limit of
        // 5e-324 made the scan's decade count infinite and its allocation abort.
        let a = TransferModel::constant(1e5).pole(10.0).pole(1e6);
        // With so little feedback |T| never reaches 1: the cap itself meets the target,
        // with no crossover, and Af is A itself (1e5 / (1 + 1e5·5e-324) rounds to 1e5).
        let r = max_beta_for_margin(&a, 60.0, 5e-324).unwrap();
        assert_eq!(r.value, 5e-324);
        assert_eq!(r.crossover_hz, None);
        assert_eq!(r.closed_loop_gain, 1e5);
        assert_eq!(scan_points(0.0, 5e-324, &[]), alloc::vec![5e-324]);
        assert!(scan_points(5e-312, 1.0, &[]).len() < 16 * 320);
    }

    #[test]
    fn dominant_pole_for_45_degrees_puts_crossover_near_the_second_pole() {
        // Textbook rule (Sedra & Smith, from memory): with the second pole at f2 and
        // the others far above, 45° of margin puts the crossover at f2, where the
        // second pole takes 3 dB, so fd ≈ √2·f2/(A0β). Far poles make this exact
        // to ~1e-3.
        let a = TransferModel::constant(1e5).pole(1e6).pole(1e10);
        let c = dominant_pole_for_margin(&a, 1.0, 45.0).unwrap();
        assert!((c.crossover_hz.unwrap() / 1e6 - 1.0).abs() < 2e-3);
        assert!((c.value / (2f64.sqrt() * 1e6 / 1e5) - 1.0).abs() < 2e-3);
    }

    #[test]
    fn max_beta_meets_the_target_and_a_larger_one_misses() {
        let a = TransferModel::constant(1e4).pole(1e3).pole(1e5).pole(1e6);
        let c = max_beta_for_margin(&a, 60.0, 1.0).unwrap();
        let more = FeedbackLoop::with_constant_beta(a.clone(), c.value * 1.001).unwrap();
        assert!(stability_margins(&more).unwrap().phase_margin_deg.unwrap() < 60.0);
        assert!((c.closed_loop_gain - 1e4 / (1.0 + 1e4 * c.value)).abs() < 1e-9);
    }

    #[test]
    fn single_pole_never_needs_less_feedback() {
        // One pole: the margin never falls below 90°, so β hits its cap.
        let a = TransferModel::constant(1e5).pole(10.0);
        let c = max_beta_for_margin(&a, 60.0, 1.0).unwrap();
        assert_eq!(c.value, 1.0);
    }
}
