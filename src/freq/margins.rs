//! Phase margin and gain margin of the loop gain T = A·β, with their frequencies.
//!
//! Every crossing is read the same way: its margin is the smallest change that
//! puts T on the critical point −1.
//! - At each unity-gain crossover fc (|T| = 1), with ∠T wrapped into
//!   (−180°, 180°]: PM(fc) = 180° − |∠T(fc)|, the smaller of the phase lag and
//!   the phase lead that turn T onto −1. It lies in [0°, 180°] whether |T| falls
//!   or rises through 1 there.
//! - At each phase crossover f180 (∠T = −180° modulo 360°, so T = −|T|):
//!   GM(f180) = |20·log10|T(f180)|| dB, the gain increase (where |T| < 1) or the
//!   gain reduction (where |T| > 1, a conditionally stable loop) that puts T on −1.
//!   Crossovers where |T| < −240 dB are not searched.
//! - The reported phase margin and gain margin are the smallest over their
//!   crossings, made negative when the closed loop is unstable, as decided by the
//!   closed-loop poles ([`super::closed_loop_poles`]), never by a margin alone.
//! - No crossover of a kind is a result: that margin is unbounded (`None`).
//!
//! For a loop whose phase falls through −180° once, negative feedback at low
//! frequency and no low cut, this is the common reading PM = 180° + ∠T,
//! GM = −20·log10|T| at ∠T = −180°. It differs where that reading misleads: a
//! crossing where |T| rises through 1 (a low cut, a resonance) has phase lead
//! there, and 180° + ∠T reports a stable loop as unstable (docs/freq.md).
//!
//! The Bode reading of margins assumes a loop gain without right-half-plane poles
//! and with negative feedback at low frequency; otherwise the margins are still
//! computed but [`MarginValidity`] says they are not meaningful and the closed-loop
//! poles decide stability.
//!
//! Source: the definitions in Franklin, Powell & Emami-Naeini, *Feedback Control of
//! Dynamic Systems*, 7th ed., section 6.4 (from memory), read as distances to −1
//! at every crossing.

use super::crossings::{scan, DEFAULT_POINTS_PER_DECADE};
use super::evaluated::EvaluatedLoop;
use super::model::FeedbackLoop;
use super::poles::{closed_loop_poles, ClosedLoopPoles, Verdict};
use crate::error::Result;
use alloc::vec::Vec;

/// Whether the Bode margins say anything about stability for this loop.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "kebab-case"))]
pub enum MarginValidity {
    /// Open-loop stable, negative feedback at low frequency: margins apply.
    Meaningful,
    /// The loop gain has right-half-plane poles: use the closed-loop poles.
    OpenLoopUnstable,
    /// The loop gain is negative at low frequency (positive feedback there): use
    /// the closed-loop poles.
    PositiveFeedback,
}

/// One crossing frequency and the margin read there.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Crossing {
    /// Frequency, Hz.
    pub freq_hz: f64,
    /// The distance to −1 at this crossing, ≥ 0: the phase margin
    /// 180° − |∠T| (deg) at a unity-gain crossing, the gain margin
    /// |20·log10|T|| (dB) at a phase crossing. Unsigned: the sign of the
    /// reported worst margin comes from the closed-loop poles.
    pub margin: f64,
    /// At a unity-gain crossing: |T| rises through 1 as f rises (the low side of
    /// a loop with a low cut, the near side of a resonance). At a phase crossing:
    /// |T| > 1 there, so the gain margin is a gain reduction.
    pub rising: bool,
}

/// Stability margins of a loop.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Margins {
    /// Worst phase margin, degrees: the smallest over the unity-gain crossings,
    /// negative when the closed loop is unstable; `None` when |T| never reaches 1
    /// (unbounded).
    pub phase_margin_deg: Option<f64>,
    /// Unity-gain crossover frequency of the worst phase margin, Hz.
    pub crossover_hz: Option<f64>,
    /// Worst gain margin, dB: the smallest over the phase crossings, negative
    /// when the closed loop is unstable; `None` when the phase never reaches −180°
    /// (unbounded).
    pub gain_margin_db: Option<f64>,
    /// Phase crossover frequency of the worst gain margin, Hz.
    pub phase_crossover_hz: Option<f64>,
    /// Every unity-gain crossover with its phase margin, ascending in frequency.
    pub gain_crossings: Vec<Crossing>,
    /// Every −180° crossover with its gain margin, ascending in frequency.
    pub phase_crossings: Vec<Crossing>,
    /// Whether these margins decide stability for this loop.
    pub validity: MarginValidity,
    /// The closed-loop verdict from the poles, which signs the worst margins.
    pub closed_loop: Verdict,
}

/// Wrap an angle in degrees into (−180°, 180°].
pub(crate) fn wrap_deg(x: f64) -> f64 {
    let mut y = x - 360.0 * crate::float::round(x / 360.0);
    if y <= -180.0 {
        y += 360.0;
    }
    y
}

/// Stability margins of the loop, with the default grid density.
///
/// # Errors
/// As [`margins_with_density`].
///
/// # Example
/// ```
/// use loopwright::freq::{stability_margins, FeedbackLoop, TransferModel};
/// // Three equal poles, DC loop gain 4: GM = 20·log10(8/4) = 6.02 dB at √3·f_p.
/// let a = TransferModel::constant(4.0).pole(1e3).pole(1e3).pole(1e3);
/// let m = stability_margins(&FeedbackLoop::with_constant_beta(a, 1.0).unwrap()).unwrap();
/// assert!((m.gain_margin_db.unwrap() - 20.0 * 2f64.log10()).abs() < 1e-9);
/// // A loop gain below 1 everywhere: no crossover, unbounded phase margin.
/// let small = TransferModel::constant(0.5).pole(1e3);
/// assert_eq!(stability_margins(&FeedbackLoop::with_constant_beta(small, 1.0).unwrap()).unwrap().phase_margin_deg, None);
/// ```
pub fn stability_margins(l: &FeedbackLoop) -> Result<Margins> {
    margins_with_density(l, DEFAULT_POINTS_PER_DECADE)
}

/// Stability margins with a chosen search-grid density (points per decade,
/// 4…2000). The refined crossings do not depend on it beyond the crossing
/// tolerance, as long as crossings are a grid step apart.
///
/// # Errors
/// `points_per_decade` outside 4…2000; [`crate::Error::TooLarge`]
/// (`phase_crossings`) when a long delay turns the phase more than
/// [`super::crossings::MAX_PHASE_CROSSINGS`] times while |T| is still above
/// −240 dB; those of [`closed_loop_poles`], which sign the worst margins.
///
/// # Example
/// ```
/// use loopwright::freq::{margins_with_density, FeedbackLoop, TransferModel};
/// let a = TransferModel::constant(1e4).pole(1e3).pole(1e5).pole(1e6);
/// let l = FeedbackLoop::with_constant_beta(a, 0.01).unwrap();
/// let (coarse, fine) = (margins_with_density(&l, 8).unwrap(), margins_with_density(&l, 800).unwrap());
/// assert!((coarse.phase_margin_deg.unwrap() - fine.phase_margin_deg.unwrap()).abs() < 1e-9);
/// assert_eq!(margins_with_density(&l, 3).unwrap_err().param(), "points_per_decade");
/// ```
pub fn margins_with_density(l: &FeedbackLoop, points_per_decade: u32) -> Result<Margins> {
    margins_and_poles_with_density(l, points_per_decade).map(|(m, _)| m)
}

/// Stability margins with the default grid density, and the closed-loop poles that
/// sign them: the same two results as [`stability_margins`] and
/// [`closed_loop_poles`], for the price of computing the poles once.
///
/// # Errors
/// As [`margins_with_density`].
///
/// # Example
/// ```
/// use loopwright::freq::{closed_loop_poles, margins_and_poles, stability_margins, FeedbackLoop, TransferModel};
/// let a = TransferModel::constant(1e4).pole(1e3).pole(1e5).pole(1e6);
/// let l = FeedbackLoop::with_constant_beta(a, 0.01).unwrap();
/// let (m, p) = margins_and_poles(&l).unwrap();
/// assert_eq!(m, stability_margins(&l).unwrap());
/// assert_eq!(p, closed_loop_poles(&l).unwrap());
/// ```
pub fn margins_and_poles(l: &FeedbackLoop) -> Result<(Margins, ClosedLoopPoles)> {
    margins_and_poles_with_density(l, DEFAULT_POINTS_PER_DECADE)
}

fn margins_and_poles_with_density(
    l: &FeedbackLoop,
    points_per_decade: u32,
) -> Result<(Margins, ClosedLoopPoles)> {
    let validity = if l.open_loop_unstable() {
        MarginValidity::OpenLoopUnstable
    } else if l.amplifier().gain * l.feedback().gain < 0.0 {
        MarginValidity::PositiveFeedback
    } else {
        MarginValidity::Meaningful
    };
    let mut poles = None;
    let margins = margins_of(
        l,
        points_per_decade,
        || {
            let p = closed_loop_poles(l)?;
            let verdict = p.verdict;
            poles = Some(p);
            Ok(verdict)
        },
        validity,
    )?;
    // margins_of asks for the verdict whenever it succeeds; the fallback only keeps
    // this total without an unwrap.
    let poles = match poles {
        Some(p) => p,
        None => closed_loop_poles(l)?,
    };
    Ok((margins, poles))
}

/// The margins of any evaluated loop gain (a pole-list loop, a circuit's
/// return ratio, a measured loop): every crossing read as its distance to −1,
/// the worst of each kind signed by the verdict `closed_loop` returns (from
/// the caller's closed-loop poles; asked after the crossings are found), with
/// the caller's `validity`.
///
/// # Errors
/// `points_per_decade` outside 4…2000; [`crate::Error::TooLarge`]
/// (`phase_crossings`); [`crate::Error::Overflow`] (`loopGain`) when the loop
/// gain cannot be evaluated on the search grid; those of `closed_loop`.
pub fn margins_of<L: EvaluatedLoop + ?Sized>(
    l: &L,
    points_per_decade: u32,
    closed_loop: impl FnOnce() -> Result<Verdict>,
    validity: MarginValidity,
) -> Result<Margins> {
    let (gain_list, phase_list) = scan(l, points_per_decade)?;
    let gains: Vec<Crossing> = gain_list
        .into_iter()
        .map(|(f, rising)| Crossing {
            freq_hz: f,
            margin: phase_distance_deg(l.eval(f).1.to_degrees()),
            rising,
        })
        .collect();
    let phases: Vec<Crossing> = phase_list
        .into_iter()
        .map(|f| {
            let db = l.eval(f).0 * (20.0 / core::f64::consts::LN_10);
            Crossing {
                freq_hz: f,
                margin: libm::fabs(db),
                rising: db > 0.0,
            }
        })
        .collect();
    let worst = |v: &[Crossing]| {
        v.iter()
            .copied()
            .min_by(|a, b| a.margin.total_cmp(&b.margin))
    };
    let closed_loop = closed_loop()?;
    let signed = |c: Crossing| {
        if closed_loop == Verdict::Unstable {
            -c.margin
        } else {
            c.margin
        }
    };
    let pm = worst(&gains);
    let gm = worst(&phases);
    Ok(Margins {
        phase_margin_deg: pm.map(signed),
        crossover_hz: pm.map(|c| c.freq_hz),
        gain_margin_db: gm.map(signed),
        phase_crossover_hz: gm.map(|c| c.freq_hz),
        gain_crossings: gains,
        phase_crossings: phases,
        validity,
        closed_loop,
    })
}

/// The phase margin at one unity-gain crossing: the smallest phase change, lag
/// or lead, that puts T on −1, 180° − |∠T| with ∠T wrapped into (−180°, 180°]; deg.
pub(crate) fn phase_distance_deg(phase_deg: f64) -> f64 {
    180.0 - libm::fabs(wrap_deg(phase_deg))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::freq::model::TransferModel;

    #[test]
    fn wrap_keeps_the_half_open_interval() {
        assert_eq!(wrap_deg(180.0), 180.0);
        assert_eq!(wrap_deg(-180.0), 180.0);
        assert_eq!(wrap_deg(-190.0), 170.0);
        assert_eq!(wrap_deg(725.0), 5.0);
    }

    #[test]
    fn two_pole_phase_margin_matches_the_closed_form() {
        // T = T0/((1+s/ω1)(1+s/ω2)): at crossover |T| = 1 solved in closed form
        // (quadratic in f²), PM = 180° − atan(fc/f1) − atan(fc/f2).
        let (t0, f1, f2) = (1e3, 1e2, 1e5);
        let l =
            FeedbackLoop::with_constant_beta(TransferModel::constant(t0).pole(f1).pole(f2), 1.0)
                .unwrap();
        let m = stability_margins(&l).unwrap();
        let (a, b) = (f1 * f1, f2 * f2);
        // (1 + x/a)(1 + x/b) = t0², x = fc².
        let (qa, qb, qc) = (1.0 / (a * b), 1.0 / a + 1.0 / b, 1.0 - t0 * t0);
        let x = (-qb + crate::float::sqrt(qb * qb - 4.0 * qa * qc)) / (2.0 * qa);
        let fc = crate::float::sqrt(x);
        let pm = 180.0 - (libm::atan(fc / f1) + libm::atan(fc / f2)).to_degrees();
        assert!((m.crossover_hz.unwrap() / fc - 1.0).abs() < 1e-11);
        assert!((m.phase_margin_deg.unwrap() - pm).abs() < 1e-9);
        assert_eq!(m.gain_margin_db, None);
        assert_eq!(m.validity, MarginValidity::Meaningful);
    }

    #[test]
    fn unstable_open_loop_is_flagged() {
        let l = FeedbackLoop::with_constant_beta(TransferModel::constant(10.0).rhp_pole(1e3), 1.0)
            .unwrap();
        assert_eq!(
            stability_margins(&l).unwrap().validity,
            MarginValidity::OpenLoopUnstable
        );
        let p = FeedbackLoop::with_constant_beta(TransferModel::constant(-10.0).pole(1e3), 1.0)
            .unwrap();
        assert_eq!(
            stability_margins(&p).unwrap().validity,
            MarginValidity::PositiveFeedback
        );
    }

    #[test]
    fn a_crossing_is_read_as_its_distance_to_minus_one() {
        // 180° − |∠T| with ∠T in (−180°, 180°]: lag and lead count alike.
        assert_eq!(phase_distance_deg(-30.0), 150.0);
        assert_eq!(phase_distance_deg(30.0), 150.0);
        assert_eq!(phase_distance_deg(-150.0), 30.0);
        assert_eq!(phase_distance_deg(-200.0), 20.0);
        assert_eq!(phase_distance_deg(-180.0), 0.0);
        assert_eq!(phase_distance_deg(-390.0), 150.0);
    }

    #[test]
    fn an_unstable_loop_gets_negative_margins() {
        // Three equal poles, DC loop gain 12 > 8: unstable. GM = −20·log10(12/8)
        // at √3·f_p (common practice, no source).
        let a = TransferModel::constant(12.0).pole(1e3).pole(1e3).pole(1e3);
        let m = stability_margins(&FeedbackLoop::with_constant_beta(a, 1.0).unwrap()).unwrap();
        assert_eq!(m.closed_loop, Verdict::Unstable);
        assert!((m.gain_margin_db.unwrap() + 20.0 * libm::log10(1.5)).abs() < 1e-9);
        assert!(m.phase_margin_deg.unwrap() < 0.0);
        assert!(m.gain_crossings.iter().all(|c| c.margin >= 0.0));
    }

    #[test]
    fn worst_of_several_crossings() {
        // A conditionally shaped loop: two crossovers of |T| through a resonant dip.
        let a = TransferModel::constant(100.0)
            .pole(10.0)
            .complex_zero(1e4, 10.0)
            .complex_pole(1e4, 0.5)
            .pole(1e6);
        let l = FeedbackLoop::with_constant_beta(a, 1.0).unwrap();
        let m = stability_margins(&l).unwrap();
        let min = m
            .gain_crossings
            .iter()
            .map(|c| c.margin)
            .fold(f64::INFINITY, f64::min);
        assert_eq!(m.phase_margin_deg, Some(min));
    }
}
