//! Everything about one loop at once: margins, closed-loop poles, bandwidth and
//! step response, for a page card or a worksheet row.
//!
//! The parts are those of [`super::stability_margins`],
//! [`super::closed_loop_poles`], [`super::closed_loop_bandwidth`] and
//! [`super::step_response`]. A part that does not exist for this loop (no step
//! metrics for an unstable or AC-coupled loop, no bandwidth when the midband loop
//! sits exactly on oscillation) is `None`, with the reason beside it; any other
//! error is returned.

use super::bandwidth::{closed_loop_bandwidth, Bandwidth};
use super::margins::{stability_margins, Margins};
use super::model::FeedbackLoop;
use super::poles::{closed_loop_poles, ClosedLoopPoles};
use super::step::{step_response, StepResponse};
use crate::error::{Error, Result};

/// The analysis of one loop.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct LoopSummary {
    /// Phase and gain margins with every crossing.
    pub margins: Margins,
    /// Closed-loop poles and the stability verdict (the authority).
    pub poles: ClosedLoopPoles,
    /// −3 dB bandwidth and peaking; `None` when the midband loop oscillates.
    pub bandwidth: Option<Bandwidth>,
    /// Why `bandwidth` is `None`.
    pub bandwidth_note: Option<&'static str>,
    /// Step metrics and waveform; `None` for a loop that does not settle or does
    /// not pass DC.
    pub step: Option<StepResponse>,
    /// Why `step` is `None`.
    pub step_note: Option<&'static str>,
}

/// Margins, poles, bandwidth and step response of a loop.
///
/// `settle_band` (fraction, 0…0.5) and `points` (2…100 000) are those of
/// [`step_response`].
///
/// # Errors
/// Those of [`stability_margins`] and [`closed_loop_poles`]; `settle_band` and
/// `points` as in [`step_response`]. A missing bandwidth or step is not an error.
///
/// # Example
/// ```
/// use loopwright::freq::{analyze_loop, FeedbackLoop, TransferModel, Verdict};
/// let a = TransferModel::constant(1e4).pole(1e3).pole(1e5).pole(1e6);
/// let s = analyze_loop(&FeedbackLoop::with_constant_beta(a.clone(), 0.01).unwrap(), 0.02, 200).unwrap();
/// assert_eq!(s.poles.verdict, Verdict::Stable);
/// assert!(s.step.is_some() && s.bandwidth.is_some());
/// // Too much feedback: unstable, so no step metrics, with the reason.
/// let s = analyze_loop(&FeedbackLoop::with_constant_beta(a, 1.0).unwrap(), 0.02, 200).unwrap();
/// assert_eq!(s.poles.verdict, Verdict::Unstable);
/// assert!(s.step.is_none() && s.step_note.is_some());
/// assert!(analyze_loop(&FeedbackLoop::with_constant_beta(TransferModel::constant(1.0).pole(1.0), 1.0).unwrap(), 0.9, 200).is_err());
/// ```
pub fn analyze_loop(l: &FeedbackLoop, settle_band: f64, points: usize) -> Result<LoopSummary> {
    let margins = stability_margins(l)?;
    let poles = closed_loop_poles(l)?;
    let (bandwidth, bandwidth_note) = match closed_loop_bandwidth(l) {
        Ok(b) => (Some(b), None),
        Err(Error::Oscillation { .. }) => (
            None,
            Some("the midband return difference 1 + A·β is zero: the loop oscillates"),
        ),
        Err(e) => return Err(e),
    };
    let (step, step_note) = match step_response(l, settle_band, points) {
        Ok(s) => (Some(s), None),
        Err(Error::Unreachable {
            param: "closed_loop",
            reason,
        }) => (None, Some(reason)),
        Err(e) => return Err(e),
    };
    Ok(LoopSummary {
        margins,
        poles,
        bandwidth,
        bandwidth_note,
        step,
        step_note,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::freq::model::TransferModel;

    #[test]
    fn parts_match_the_separate_calls() {
        let a = TransferModel::constant(2e4).pole(100.0).pole(2e5).pole(2e7);
        let l = FeedbackLoop::with_constant_beta(a, 0.02).unwrap();
        let s = analyze_loop(&l, 0.02, 300).unwrap();
        assert_eq!(s.margins, stability_margins(&l).unwrap());
        assert_eq!(s.poles, closed_loop_poles(&l).unwrap());
        assert_eq!(s.bandwidth, Some(closed_loop_bandwidth(&l).unwrap()));
        assert_eq!(s.step, Some(step_response(&l, 0.02, 300).unwrap()));
        assert_eq!((s.bandwidth_note, s.step_note), (None, None));
    }

    #[test]
    fn an_ac_coupled_loop_has_a_bandwidth_but_no_step_metrics() {
        let a = TransferModel::constant(1e3).low_cut(100.0).pole(1e5);
        let s = analyze_loop(
            &FeedbackLoop::with_constant_beta(a, 0.1).unwrap(),
            0.02,
            100,
        )
        .unwrap();
        assert!(s.bandwidth.is_some_and(|b| b.low_hz.is_some()));
        assert!(s.step.is_none() && s.step_note.is_some_and(|n| n.contains("DC")));
    }
}
