//! A loop gain given by how to evaluate it: the one input of the margin,
//! distance and Nyquist engine.
//!
//! The pole-list loop ([`FeedbackLoop`]) and a circuit's return ratio
//! (`crate::stage::margins`) both implement [`EvaluatedLoop`]: T(j2πf) as
//! ln|T| and a phase, plus the frequencies where T can change quickly (its
//! corners and resonances) so that the search grid lands on them. The
//! crossings ([`super::crossings`]), the margins ([`super::margins`]) and the
//! Nyquist reading ([`super::nyquist`]) run the same code for both.

use super::model::{ComplexPair, FeedbackLoop};
use super::response::loop_log;
use alloc::vec::Vec;
use core::f64::consts::TAU;

/// Where a loop gain can change quickly: the search grid puts every corner on
/// itself and a local grid (spacing set by Q) around every complex pair.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct GridHints {
    /// Corner frequencies (real poles and zeros, and the natural frequency of
    /// every complex pair), Hz, > 0, any order.
    pub corners_hz: Vec<f64>,
    /// Complex pairs with `true` for a pole pair (|T| peaks near it) and
    /// `false` for a zero pair (|T| dips).
    pub pairs: Vec<(ComplexPair, bool)>,
}

impl GridHints {
    /// The corners sorted ascending, finite and positive only.
    pub(crate) fn sorted_corners(&self) -> Vec<f64> {
        let mut c: Vec<f64> = self
            .corners_hz
            .iter()
            .copied()
            .filter(|f| f.is_finite() && *f > 0.0)
            .collect();
        crate::sort::sort_by(&mut c, f64::total_cmp);
        c
    }
}

/// A loop gain T(j2πf) that can be evaluated at any frequency.
///
/// A failed evaluation returns a NaN ln|T|; the engine then stops with
/// an error (the implementor keeps the reason, see `crate::stage::margins`).
pub trait EvaluatedLoop {
    /// (ln|T|, ∠T in radians) at `f_hz` > 0. The phase may be on any branch
    /// unless [`EvaluatedLoop::continuous_phase`] is true.
    fn eval(&self, f_hz: f64) -> (f64, f64);

    /// True when [`EvaluatedLoop::eval`] returns a phase continuous in f (the
    /// pole-list models add up their factors' phases); false for a phase on
    /// the principal branch, which the engine unwraps along its grid.
    fn continuous_phase(&self) -> bool {
        false
    }

    /// Corners and resonances of T.
    fn hints(&self) -> GridHints;

    /// Order of the pole of T at s = 0 (integrators), 0 for none; `None` when
    /// the evaluator does not know it (the Nyquist reading then measures it
    /// from the slope of |T| at the low end of its range).
    fn origin_poles(&self) -> Option<u32> {
        None
    }

    /// The interval [lo, hi], Hz, where crossings are searched. The default
    /// spans the corners with [`MARGIN_DECADES`] to spare and extends either
    /// end past the unity crossing of the asymptote measured there.
    fn search_range(&self) -> (f64, f64) {
        default_search_range(self)
    }

    /// ln|T| and phase (radians) at every frequency of `f` (ascending), the
    /// phase continuous along `f`.
    fn sweep(&self, f: &[f64], ln_mag: &mut Vec<f64>, phase: &mut Vec<f64>) {
        let mut prev: Option<f64> = None;
        for &x in f {
            let (l, p) = self.eval(x);
            let p = match prev {
                Some(q) if !self.continuous_phase() => nearest_branch(p, q),
                _ => p,
            };
            prev = Some(p);
            ln_mag.push(l);
            phase.push(p);
        }
    }

    /// (ln|T|, phase) at `f_hz` with the phase on the branch nearest
    /// `hint_rad` (a continuous phase as it is).
    fn eval_near(&self, f_hz: f64, hint_rad: f64) -> (f64, f64) {
        let (l, p) = self.eval(f_hz);
        if self.continuous_phase() {
            (l, p)
        } else {
            (l, nearest_branch(p, hint_rad))
        }
    }
}

/// `p` moved by whole turns to lie within half a turn of `reference`.
pub(crate) fn nearest_branch(p: f64, reference: f64) -> f64 {
    p + TAU * crate::float::round((reference - p) / TAU)
}

/// Decades beyond the outermost corners that the search range covers.
pub const MARGIN_DECADES: f64 = 3.0;
/// Widest search span, decades.
pub(crate) const MAX_SPAN_DECADES: f64 = 40.0;
/// A log-log slope of |T| steeper than this (per decade of f, in units of
/// 20 dB) counts as an asymptote with a crossing beyond the range.
const ASYMPTOTE_MIN_SLOPE: f64 = 0.5;

/// The log-log slope of |T| between f/2 and f (d ln|T| / d ln f).
pub(crate) fn log_slope<L: EvaluatedLoop + ?Sized>(l: &L, f: f64) -> f64 {
    let (a, b) = (l.eval(0.5 * f).0, l.eval(f).0);
    (b - a) / core::f64::consts::LN_2
}

/// Keep [lo, hi] inside the sweep limits and at most [`MAX_SPAN_DECADES`]
/// wide, trimming the low end (margins live at the high end).
pub(crate) fn clamp_range(mut lo: f64, mut hi: f64) -> (f64, f64) {
    lo = lo.max(super::response::MIN_SWEEP_HZ);
    hi = hi.min(super::response::MAX_SWEEP_HZ);
    if libm::log10(hi / lo) > MAX_SPAN_DECADES {
        lo = hi / libm::pow(10.0, MAX_SPAN_DECADES);
    }
    (lo, hi)
}

/// The search range from the corners and measured asymptotes (see
/// [`EvaluatedLoop::search_range`]).
pub(crate) fn default_search_range<L: EvaluatedLoop + ?Sized>(l: &L) -> (f64, f64) {
    let corners = l.hints().sorted_corners();
    let (mut lo, mut hi) = match (corners.first(), corners.last()) {
        (Some(&a), Some(&b)) => (a, b),
        _ => (1.0, 1.0),
    };
    let spread = libm::pow(10.0, MARGIN_DECADES);
    lo /= spread;
    hi *= spread;
    // Above hi |T| falls as f^slope: its unity crossing inside, a decade to spare.
    let ln_hi = l.eval(hi).0;
    let s_hi = log_slope(l, hi);
    if ln_hi > 0.0 && s_hi < -ASYMPTOTE_MIN_SLOPE {
        let fx = hi * libm::exp(ln_hi / -s_hi);
        if fx.is_finite() && fx * 10.0 > hi {
            hi = fx * 10.0;
        }
    }
    // Below lo |T| rises with f (a low cut): its crossing inside too.
    let ln_lo = l.eval(lo).0;
    let s_lo = log_slope(l, 2.0 * lo);
    if ln_lo > 0.0 && s_lo > ASYMPTOTE_MIN_SLOPE {
        let fx = lo * libm::exp(-ln_lo / s_lo);
        if fx.is_finite() && fx > 0.0 && fx / 10.0 < lo {
            lo = fx / 10.0;
        }
    }
    clamp_range(lo, hi)
}

impl EvaluatedLoop for FeedbackLoop {
    fn eval(&self, f_hz: f64) -> (f64, f64) {
        let p = loop_log(self, f_hz);
        (p.ln_mag, p.phase)
    }

    fn continuous_phase(&self) -> bool {
        true
    }

    fn hints(&self) -> GridHints {
        let (a, b) = (self.amplifier(), self.feedback());
        let poles = a.complex_poles.iter().chain(&b.complex_poles);
        let zeros = a.complex_zeros.iter().chain(&b.complex_zeros);
        GridHints {
            corners_hz: self.corners_hz(),
            pairs: poles
                .map(|&p| (p, true))
                .chain(zeros.map(|&p| (p, false)))
                .collect(),
        }
    }

    fn origin_poles(&self) -> Option<u32> {
        Some(self.low_frequency_order().max(0) as u32)
    }

    fn search_range(&self) -> (f64, f64) {
        super::crossings::search_range(self)
    }

    fn sweep(&self, f: &[f64], ln_mag: &mut Vec<f64>, phase: &mut Vec<f64>) {
        self.fast_loop().sweep(f, ln_mag, phase);
    }
}
