//! Compensation: the dominant pole for a target phase margin, and the largest β
//! that keeps a target phase margin.
//!
//! Both search one scalar by bisection in its logarithm on the worst phase margin
//! of [`super::stability_margins`]:
//! - dominant pole: a pole at fd is added to the amplifier (its gain and other
//!   poles unchanged); lowering fd lowers the crossover and raises the margin.
//!   The answer is the highest fd whose margin still reaches the target.
//! - largest β: with the amplifier as it is and a constant β, raising β raises the
//!   crossover and lowers the margin; the answer is the largest β whose margin
//!   still reaches the target, i.e. the smallest closed-loop gain ≈ 1/β.
//!
//! A loop with no crossover has an unbounded phase margin and meets any target.
//! The bisection stops at a relative width of [`SEARCH_REL_TOL`].
//!
//! Source: dominant-pole compensation as in Sedra & Smith, *Microelectronic
//! Circuits*, 7th ed., section 10.12 (from memory).

use super::margins::stability_margins;
use super::model::{FeedbackLoop, TransferModel};
use crate::check;
use crate::error::{Error, Result};

/// Relative width at which the searches stop.
pub const SEARCH_REL_TOL: f64 = 1e-10;

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

/// Worst phase margin, +∞ when unbounded.
fn pm_of(l: &FeedbackLoop) -> Result<(f64, Option<f64>)> {
    let m = stability_margins(l)?;
    Ok((m.phase_margin_deg.unwrap_or(f64::INFINITY), m.crossover_hz))
}

fn result(l: &FeedbackLoop, value: f64) -> Result<Compensation> {
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
    })
}

/// Bisection on ln x between `lo` (meets the target) and `hi` (misses it).
fn bisect(meets: &dyn Fn(f64) -> Result<bool>, mut lo: f64, mut hi: f64) -> Result<f64> {
    for _ in 0..200 {
        if hi / lo - 1.0 <= SEARCH_REL_TOL {
            break;
        }
        let mid = crate::float::sqrt(lo * hi);
        if meets(mid)? {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    Ok(lo)
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
/// even a dominant pole at 1e-9 Hz does not reach the target (a delay or RHP
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
    let meets = |fd: f64| -> Result<bool> { Ok(pm_of(&with(fd)?)?.0 >= pm) };
    let lo = super::model::MIN_HZ;
    if !meets(lo)? {
        return Err(Error::Unreachable {
            param: "target_pm_deg",
            reason: "no dominant pole reaches this phase margin with the other poles, zeros and delay as they are",
        });
    }
    let hi = super::model::MAX_HZ;
    if meets(hi)? {
        // Even a pole at the top of the range keeps the margin: no compensation needed.
        return result(&with(hi)?, hi);
    }
    let fd = bisect(&meets, lo, hi)?;
    result(&with(fd)?, fd)
}

/// Largest constant β for which the amplifier still has `target_pm_deg` of phase
/// margin, with the closed-loop gain and the crossover that result.
///
/// `beta_limit` caps the search (1 for a passive voltage divider, say); when the
/// target holds at the cap, the cap is returned.
///
/// # Errors
/// `target_pm_deg` outside (0°, 180°); `beta_limit` not > 0; the model checks of
/// [`FeedbackLoop::new`]; [`Error::Unreachable`] (`target_pm_deg`) when even
/// β = 1e-12·beta_limit misses the target.
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
    let meets = |b: f64| -> Result<bool> { Ok(pm_of(&with(b)?)?.0 >= pm) };
    if meets(cap)? {
        return result(&with(cap)?, cap);
    }
    let lo = cap * 1e-12;
    if !meets(lo)? {
        return Err(Error::Unreachable {
            param: "target_pm_deg",
            reason: "the amplifier misses this phase margin even with very little feedback",
        });
    }
    let b = bisect(&meets, lo, cap)?;
    result(&with(b)?, b)
}

#[cfg(test)]
mod tests {
    use super::*;

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
