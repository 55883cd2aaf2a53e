//! Closed-loop −3 dB bandwidth (low and high corner) and peaking.
//!
//! Reference level: the midband closed-loop gain |Af_mid| = |AM/(1 + AM·βM)|,
//! where AM and βM are the model gains (low cuts taken as 1, the passband value);
//! with integrators in A, |Af_mid| = 1/|βM|. Without low cuts this is the DC
//! closed-loop gain.
//!
//! - High −3 dB frequency: the first frequency above midband where |Af| falls
//!   to |Af_mid|/√2.
//! - Low −3 dB frequency (only with low cuts): the first frequency below midband
//!   where |Af| falls to |Af_mid|/√2.
//! - Peaking: max |Af|/|Af_mid| in dB over all frequencies and where it is; 0 dB
//!   with no frequency when |Af| never exceeds |Af_mid|.
//!
//! Midband is the geometric mean of the highest low cut and the lowest other
//! corner. Frequencies are bracketed on the search grid of
//! [`super::crossings`] and refined to [`CROSSING_REL_TOL`]; the peak is
//! refined by golden-section search.
//!
//! Source: the −3 dB definition as in Sedra & Smith, *Microelectronic Circuits*,
//! 7th ed., section 1.6 (from memory).

use super::crossings::{brent, grid, CROSSING_REL_TOL, DEFAULT_POINTS_PER_DECADE};
use super::model::FeedbackLoop;
use super::response::closed_log;
use crate::check;
use crate::error::{Error, Result};
use core::f64::consts::LN_2;

/// Closed-loop bandwidth and peaking.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Bandwidth {
    /// |Af| in the passband, the 0 dB reference, in the unit of A.
    pub midband_gain: f64,
    /// Upper −3 dB frequency, Hz; `None` when |Af| stays above −3 dB in range.
    pub high_hz: Option<f64>,
    /// Lower −3 dB frequency, Hz; `None` for a loop that passes DC.
    pub low_hz: Option<f64>,
    /// Bandwidth high − low (or high alone), Hz.
    pub bandwidth_hz: Option<f64>,
    /// Peaking max|Af|/|Af_mid| in dB (0 when there is none).
    pub peaking_db: f64,
    /// Frequency of the peak, Hz; `None` when there is no peaking.
    pub peak_hz: Option<f64>,
}

/// ln|Af_mid|.
pub(crate) fn midband_ln_gain(l: &FeedbackLoop) -> Result<f64> {
    let a = l.amplifier();
    let b = l.feedback();
    if a.origin_poles > 0 {
        return Ok(-libm::log(libm::fabs(b.gain)));
    }
    let d = 1.0 + a.gain * b.gain;
    if libm::fabs(d) <= 4.0 * f64::EPSILON * (1.0 + libm::fabs(a.gain * b.gain)) {
        return Err(Error::Oscillation { param: "beta.gain" });
    }
    Ok(libm::log(libm::fabs(a.gain / d)))
}

/// Midband frequency, Hz, where the searches start.
fn midband_hz(l: &FeedbackLoop, lo: f64) -> f64 {
    let cuts = l
        .amplifier()
        .low_cuts_hz
        .iter()
        .chain(&l.feedback().low_cuts_hz)
        .copied()
        .fold(0.0, f64::max);
    if cuts == 0.0 {
        return lo;
    }
    let mut others = alloc::vec::Vec::new();
    let mut a = l.amplifier().clone();
    a.low_cuts_hz.clear();
    let mut b = l.feedback().clone();
    b.low_cuts_hz.clear();
    a.corners_hz(&mut others);
    b.corners_hz(&mut others);
    let above = others
        .iter()
        .copied()
        .filter(|&f| f > cuts)
        .fold(f64::INFINITY, f64::min);
    let top = if above.is_finite() { above } else { cuts * 1e6 };
    crate::float::sqrt(cuts * top)
}

/// Closed-loop −3 dB bandwidth and peaking.
///
/// # Errors
/// [`Error::Oscillation`] when the midband return difference 1 + AM·βM is zero;
/// [`Error::Overflow`] (`peaking_db`) when the loop sits exactly on an undamped
/// closed-loop pole at a search frequency.
///
/// # Example
/// ```
/// use loopwright::freq::{closed_loop_bandwidth, FeedbackLoop, TransferModel};
/// // One pole at 10 Hz, A0β = 1000: fHf = 10 Hz·1001.
/// let l = FeedbackLoop::with_constant_beta(TransferModel::constant(1e5).pole(10.0), 0.01).unwrap();
/// let b = closed_loop_bandwidth(&l).unwrap();
/// assert!((b.high_hz.unwrap() / 10_010.0 - 1.0).abs() < 1e-10);
/// assert_eq!(b.peaking_db, 0.0);
/// let osc = FeedbackLoop::with_constant_beta(TransferModel::constant(-2.0).pole(10.0), 0.5).unwrap();
/// assert_eq!(closed_loop_bandwidth(&osc).unwrap_err().code(), "oscillation");
/// ```
pub fn closed_loop_bandwidth(l: &FeedbackLoop) -> Result<Bandwidth> {
    let ref_ln = midband_ln_gain(l)?;
    let f = grid(l, DEFAULT_POINTS_PER_DECADE)?;
    let (lo, hi) = match (f.first(), f.last()) {
        (Some(&a), Some(&b)) => (a, b),
        _ => {
            return Err(Error::NoConvergence {
                param: "bandwidth",
                reason: "empty search grid",
            })
        }
    };
    let fm = midband_hz(l, lo).clamp(lo, hi);
    // g(x) = ln|Af(e^x)| − ln|Af_mid| + ln√2: zero at the −3 dB points.
    let g = |x: f64| closed_log(l, libm::exp(x)).ln_mag - ref_ln + 0.5 * LN_2;
    let xm = libm::log(fm);
    let gm = g(xm);
    let search = |upwards: bool| -> Option<f64> {
        let (mut xp, mut gp) = (xm, gm);
        let pts: alloc::vec::Vec<f64> = if upwards {
            f.iter().copied().filter(|&x| x > fm).collect()
        } else {
            f.iter().rev().copied().filter(|&x| x < fm).collect()
        };
        for fi in pts {
            let xi = libm::log(fi);
            let gi = g(xi);
            if gp >= 0.0 && gi < 0.0 {
                return Some(libm::exp(brent(&g, xp, xi, gp, gi, CROSSING_REL_TOL)));
            }
            xp = xi;
            gp = gi;
        }
        None
    };
    let high = search(true);
    let has_cuts = !(l.amplifier().low_cuts_hz.is_empty() && l.feedback().low_cuts_hz.is_empty());
    let low = if has_cuts { search(false) } else { None };
    // Peak: the largest grid value, then golden section between its neighbours.
    let h = |x: f64| closed_log(l, libm::exp(x)).ln_mag - ref_ln;
    let mut best = (0usize, f64::NEG_INFINITY);
    for (i, &fi) in f.iter().enumerate() {
        let v = h(libm::log(fi));
        if v > best.1 {
            best = (i, v);
        }
    }
    let (peaking_db, peak_hz) = if best.1 > 1e-12 {
        let i = best.0;
        let a = libm::log(f.get(i.saturating_sub(1)).copied().unwrap_or(lo));
        let b = libm::log(f.get(i + 1).copied().unwrap_or(hi));
        let (x, v) = golden_max(&h, a, b);
        (v * (20.0 / core::f64::consts::LN_10), Some(libm::exp(x)))
    } else {
        (0.0, None)
    };
    let bandwidth_hz = high.map(|h| h - low.unwrap_or(0.0));
    // A grid point exactly on an undamped closed-loop pole would make the peak
    // infinite: an error, never an infinite answer.
    Ok(Bandwidth {
        midband_gain: check::result("midband_gain", libm::exp(ref_ln))?,
        high_hz: high,
        low_hz: low,
        bandwidth_hz,
        peaking_db: check::result("peaking_db", peaking_db)?,
        peak_hz,
    })
}

/// Golden-section search for the maximum of `h` on [a, b]: (argmax, max).
pub(crate) fn golden_max(h: &dyn Fn(f64) -> f64, mut a: f64, mut b: f64) -> (f64, f64) {
    const R: f64 = 0.618_033_988_749_894_8;
    let mut c = b - R * (b - a);
    let mut d = a + R * (b - a);
    let (mut hc, mut hd) = (h(c), h(d));
    for _ in 0..200 {
        if libm::fabs(b - a) <= 1e-13 * (1.0 + libm::fabs(a)) {
            break;
        }
        if hc > hd {
            b = d;
            d = c;
            hd = hc;
            c = b - R * (b - a);
            hc = h(c);
        } else {
            a = c;
            c = d;
            hc = hd;
            d = a + R * (b - a);
            hd = h(d);
        }
    }
    if hc > hd {
        (c, hc)
    } else {
        (d, hd)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::freq::model::TransferModel;

    #[test]
    fn low_cut_bandwidth_shrinks_by_the_feedback_amount() {
        // fLf = fL/(1 + AMβ) for a single low cut (single-pole closed form).
        let a = TransferModel::constant(1e3).low_cut(100.0).pole(1e6);
        let l = FeedbackLoop::with_constant_beta(a, 0.099).unwrap();
        let b = closed_loop_bandwidth(&l).unwrap();
        let d = 1.0 + 1e3 * 0.099;
        assert!((b.midband_gain - 1e3 / d).abs() < 1e-9);
        // With the high pole four decades above, the corners interact by about
        // (fLf/fHf)·… ≲ 1e-6 relative.
        assert!(
            (b.low_hz.unwrap() / (100.0 / d) - 1.0).abs() < 1e-5,
            "{b:?}"
        );
        assert!((b.high_hz.unwrap() / (1e6 * d) - 1.0).abs() < 1e-5);
    }

    #[test]
    fn peaking_of_a_two_pole_loop_matches_the_q_formula() {
        // Closed loop is second order with Q = √((1+T0)f1f2)/(f1+f2);
        // peaking = Q/√(1 − 1/(4Q²)) for Q > 1/√2.
        let (t0, f1, f2) = (999.0, 1e3, 1e6);
        let l =
            FeedbackLoop::with_constant_beta(TransferModel::constant(t0).pole(f1).pole(f2), 1.0)
                .unwrap();
        let b = closed_loop_bandwidth(&l).unwrap();
        let q = crate::float::sqrt((1.0 + t0) * f1 * f2) / (f1 + f2);
        let mp = q / crate::float::sqrt(1.0 - 1.0 / (4.0 * q * q));
        assert!((b.peaking_db - 20.0 * libm::log10(mp)).abs() < 1e-9);
        let f0 = crate::float::sqrt((1.0 + t0) * f1 * f2);
        let fp = f0 * crate::float::sqrt(1.0 - 1.0 / (2.0 * q * q));
        assert!((b.peak_hz.unwrap() / fp - 1.0).abs() < 1e-6);
    }

    #[test]
    fn integrator_reference_is_one_over_beta() {
        let l = FeedbackLoop::with_constant_beta(
            TransferModel::constant(1e6).integrator().pole(1e7),
            0.1,
        )
        .unwrap();
        let b = closed_loop_bandwidth(&l).unwrap();
        assert!((b.midband_gain - 10.0).abs() < 1e-12);
        assert_eq!(b.low_hz, None);
    }
}
