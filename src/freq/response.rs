//! Loop gain T(jω) and closed-loop gain Af(jω) at any frequency, log-spaced
//! sweeps, and continuous phase.
//!
//! The phase of T is the sum of the phases of its factors, each continuous in f
//! (a real pole goes 0 → −90°, a pair 0 → −180°, a delay −360°·f·τ), so it is
//! the unwrapped phase directly, with no jumps to repair; |T| is kept as a
//! natural log so it cannot overflow at extreme frequencies. A negative gain
//! contributes −180°. The evaluation itself is the fast product form of
//! [`super::eval`], checked against the factor-by-factor sum.
//!
//! The closed-loop phase is not a sum of factors; [`unwrap_phase_deg`] makes a
//! sampled phase continuous by removing jumps larger than 180°.

use super::model::FeedbackLoop;
#[cfg(test)]
use super::model::TransferModel;
use crate::check;
use crate::error::{Error, Result};
use alloc::vec::Vec;
#[cfg(test)]
use core::f64::consts::{PI, TAU};
use num_complex::Complex64;

/// Most points in one sweep.
pub const MAX_SWEEP_POINTS: usize = 100_000;
/// Lowest sweep frequency, Hz.
pub const MIN_SWEEP_HZ: f64 = 1e-12;
/// Highest sweep frequency, Hz.
pub const MAX_SWEEP_HZ: f64 = 1e15;

/// Natural-log magnitude and phase in radians of a model at f Hz.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct LogPhasor {
    pub ln_mag: f64,
    pub phase: f64,
}

impl LogPhasor {
    pub(crate) fn sub(self, o: LogPhasor) -> LogPhasor {
        LogPhasor {
            ln_mag: self.ln_mag - o.ln_mag,
            phase: self.phase - o.phase,
        }
    }
    pub(crate) fn complex(self) -> Complex64 {
        Complex64::from_polar(libm::exp(self.ln_mag), self.phase)
    }
    pub(crate) fn db(self) -> f64 {
        self.ln_mag * (20.0 / core::f64::consts::LN_10)
    }
    pub(crate) fn deg(self) -> f64 {
        self.phase.to_degrees()
    }
}

/// ln|1 + j·x| and its phase atan(x).
#[cfg(test)]
fn first_order(x: f64) -> (f64, f64) {
    (libm::log(libm::hypot(1.0, x)), libm::atan(x))
}

/// ln|1 − x² + j·x/Q| and its phase in [0, π].
#[cfg(test)]
fn second_order(x: f64, q: f64) -> (f64, f64) {
    let re = (1.0 - x) * (1.0 + x);
    let im = x / q;
    (libm::log(libm::hypot(re, im)), libm::atan2(im, re))
}

/// ln|model(j·2π·f)| and its continuous phase, f > 0, factor by factor: the slow
/// reference for the fast product form of [`super::eval`].
#[cfg(test)]
pub(crate) fn model_log(m: &TransferModel, f: f64) -> LogPhasor {
    let mut ln = libm::log(libm::fabs(m.gain));
    let mut ph = if m.gain < 0.0 { -PI } else { 0.0 };
    for &p in &m.poles_hz {
        let (l, a) = first_order(f / p);
        ln -= l;
        ph -= a;
    }
    for &z in &m.zeros_hz {
        let (l, a) = first_order(f / z);
        ln += l;
        ph += a;
    }
    for &z in &m.rhp_zeros_hz {
        let (l, a) = first_order(f / z);
        ln += l;
        ph -= a;
    }
    for &p in &m.rhp_poles_hz {
        let (l, a) = first_order(f / p);
        ln -= l;
        ph += a;
    }
    for c in &m.complex_poles {
        let (l, a) = second_order(f / c.freq_hz, c.q);
        ln -= l;
        ph -= a;
    }
    for c in &m.complex_zeros {
        let (l, a) = second_order(f / c.freq_hz, c.q);
        ln += l;
        ph += a;
    }
    // (ω1/s)^k with ω1 = 2π·1 Hz: magnitude f^−k, phase −90°·k.
    let k = f64::from(m.origin_poles);
    ln -= k * libm::log(f);
    ph -= k * (PI / 2.0);
    // j·x/(1 + j·x): magnitude x/√(1+x²), phase 90° − atan(x).
    for &fl in &m.low_cuts_hz {
        let x = f / fl;
        let (l, a) = first_order(x);
        ln += libm::log(x) - l;
        ph += PI / 2.0 - a;
    }
    ph -= TAU * f * m.delay_s;
    LogPhasor {
        ln_mag: ln,
        phase: ph,
    }
}

/// Loop gain T = A·β at f Hz as log magnitude and continuous phase.
pub(crate) fn loop_log(l: &FeedbackLoop, f: f64) -> LogPhasor {
    let (ln_mag, phase) = l.fast_loop().eval(f);
    LogPhasor { ln_mag, phase }
}

/// Closed-loop gain A/(1 + T) at f Hz as log magnitude and principal phase.
pub(crate) fn closed_log(l: &FeedbackLoop, f: f64) -> LogPhasor {
    let (ln_a, ph_a) = l.fast_amp().eval(f);
    let a = LogPhasor {
        ln_mag: ln_a,
        phase: ph_a,
    };
    let t = loop_log(l, f);
    // 1 + T in log form: ln|1+T| = ln|T| + ln|1 + 1/T| is safer for large T.
    let d = if t.ln_mag > 0.0 {
        let inv = LogPhasor {
            ln_mag: -t.ln_mag,
            phase: -t.phase,
        }
        .complex();
        let w = Complex64::new(1.0, 0.0) + inv;
        LogPhasor {
            ln_mag: t.ln_mag + libm::log(w.norm()),
            phase: t.phase + w.arg(),
        }
    } else {
        let w = Complex64::new(1.0, 0.0) + t.complex();
        LogPhasor {
            ln_mag: libm::log(w.norm()),
            phase: w.arg(),
        }
    };
    a.sub(d)
}

fn frequency(f_hz: f64) -> Result<f64> {
    let f = check::positive("f_hz", f_hz)?;
    if !(MIN_SWEEP_HZ..=MAX_SWEEP_HZ).contains(&f) {
        return Err(Error::OutOfDomain {
            param: "f_hz",
            requirement: "must be between 1e-12 Hz and 1e15 Hz",
        });
    }
    Ok(f)
}

/// Loop gain T(j·2π·f) = A·β as a complex number (dimensionless).
///
/// # Errors
/// `f_hz` not in 1e-12…1e15 Hz; [`Error::Overflow`] when |T| overflows.
///
/// # Example
/// ```
/// use loopwright::freq::{loop_gain_at, FeedbackLoop, TransferModel};
/// let l = FeedbackLoop::with_constant_beta(TransferModel::constant(1e3).pole(1e3), 0.1).unwrap();
/// // At the pole: T = 100/(1 + j) → |T| = 70.71, phase −45°.
/// let t = loop_gain_at(&l, 1e3).unwrap();
/// assert!((t.norm() - 100.0 / 2f64.sqrt()).abs() < 1e-9);
/// assert!(loop_gain_at(&l, 0.0).is_err());
/// ```
pub fn loop_gain_at(l: &FeedbackLoop, f_hz: f64) -> Result<Complex64> {
    let f = frequency(f_hz)?;
    check::result_complex("loop_gain", loop_log(l, f).complex())
}

/// Closed-loop gain Af(j·2π·f) = A/(1 + A·β), in the unit of A.
///
/// # Errors
/// As [`loop_gain_at`]; [`Error::Oscillation`] when 1 + T = 0 at this frequency.
///
/// # Example
/// ```
/// use loopwright::freq::{closed_loop_gain_at, FeedbackLoop, TransferModel};
/// // One pole at 10 Hz, A0 = 1e5, β = 0.01: Af = 99.9/(1 + j·f/10 010 Hz).
/// let l = FeedbackLoop::with_constant_beta(TransferModel::constant(1e5).pole(10.0), 0.01).unwrap();
/// let af = closed_loop_gain_at(&l, 10_010.0).unwrap();
/// assert!((af.norm() - 1e5 / 1001.0 / 2f64.sqrt()).abs() < 1e-9);
/// assert_eq!(closed_loop_gain_at(&l, f64::NAN).unwrap_err().param(), "f_hz");
/// ```
pub fn closed_loop_gain_at(l: &FeedbackLoop, f_hz: f64) -> Result<Complex64> {
    let f = frequency(f_hz)?;
    let c = closed_log(l, f);
    if !c.ln_mag.is_finite() && c.ln_mag > 0.0 {
        return Err(Error::Oscillation { param: "f_hz" });
    }
    check::result_complex("closed_loop_gain", c.complex())
}

/// A sampled frequency response: frequency, magnitude in dB and continuous phase
/// in degrees, one entry per point.
#[derive(Debug, Clone, PartialEq, Default)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Sweep {
    /// Frequencies, Hz, log-spaced.
    pub freq_hz: Vec<f64>,
    /// 20·log10|H|, dB.
    pub magnitude_db: Vec<f64>,
    /// ∠H, degrees, continuous across the sweep.
    pub phase_deg: Vec<f64>,
}

/// `points` log-spaced frequencies from `start_hz` to `stop_hz`, both included.
///
/// # Errors
/// `start_hz`, `stop_hz` not in 1e-12…1e15 Hz, `start_hz ≥ stop_hz` (`stop_hz`
/// named); `points` below 2 or above [`MAX_SWEEP_POINTS`].
///
/// # Example
/// ```
/// use loopwright::freq::log_frequencies;
/// let f = log_frequencies(1.0, 1e3, 4).unwrap();
/// assert!((f[1] - 10.0).abs() < 1e-12 && f[3] == 1e3);
/// assert_eq!(log_frequencies(10.0, 1.0, 4).unwrap_err().param(), "stop_hz");
/// ```
pub fn log_frequencies(start_hz: f64, stop_hz: f64, points: usize) -> Result<Vec<f64>> {
    let range = "must be between 1e-12 Hz and 1e15 Hz";
    let a = check::positive("start_hz", start_hz)?;
    let b = check::positive("stop_hz", stop_hz)?;
    if !(MIN_SWEEP_HZ..=MAX_SWEEP_HZ).contains(&a) {
        return Err(Error::OutOfDomain {
            param: "start_hz",
            requirement: range,
        });
    }
    if !(MIN_SWEEP_HZ..=MAX_SWEEP_HZ).contains(&b) {
        return Err(Error::OutOfDomain {
            param: "stop_hz",
            requirement: range,
        });
    }
    if a >= b {
        return Err(Error::OutOfDomain {
            param: "stop_hz",
            requirement: "must be greater than start_hz",
        });
    }
    if points < 2 {
        return Err(Error::OutOfDomain {
            param: "points",
            requirement: "must be at least 2",
        });
    }
    if points > MAX_SWEEP_POINTS {
        return Err(Error::TooLarge {
            param: "points",
            limit: MAX_SWEEP_POINTS as u64,
        });
    }
    Ok(geometric(a, b, points))
}

/// `n` ≥ 2 frequencies from `a` to `b` (0 < a < b, both finite), evenly spaced in
/// ln f: f_i = a·r^i with r = (b/a)^(1/(n − 1)), the ends exactly `a` and `b`.
///
/// A geometric progression by multiplication, re-anchored with exp every 64 points
/// so the rounding of the products cannot build up: each point is within
/// (64 + 2·|ln f|)·ε (about 2.3e-14 at 1 GHz) of exp(ln a + i·step), for one `exp`
/// per 64 points instead of one per point (the search grid of every margin call
/// is made here too).
pub(crate) fn geometric(a: f64, b: f64, n: usize) -> Vec<f64> {
    let (la, lb) = (libm::log(a), libm::log(b));
    let step = (lb - la) / (n - 1) as f64;
    const RESYNC: usize = 64;
    let ratio = libm::exp(step);
    let mut f: Vec<f64> = Vec::with_capacity(n);
    // RESYNC points at a time, each run extended in one go (no per-point
    // capacity check).
    for i in (0..n).step_by(RESYNC) {
        let mut x = libm::exp(la + step * i as f64);
        f.extend((i..n.min(i + RESYNC)).map(|_| {
            let y = x;
            x *= ratio;
            y
        }));
    }
    // Pin the ends exactly.
    if let Some(first) = f.first_mut() {
        *first = a;
    }
    if let Some(last) = f.last_mut() {
        *last = b;
    }
    f
}

fn finish(
    freq_hz: Vec<f64>,
    magnitude_db: Vec<f64>,
    phase_deg: Vec<f64>,
    what: &'static str,
) -> Result<Sweep> {
    for (&m, &p) in magnitude_db.iter().zip(&phase_deg) {
        check::result(what, m)?;
        check::result(what, p)?;
    }
    Ok(Sweep {
        freq_hz,
        magnitude_db,
        phase_deg,
    })
}

/// Loop-gain sweep: |T| in dB and the continuous phase of T in degrees at
/// `points` log-spaced frequencies.
///
/// # Errors
/// As [`log_frequencies`]; [`Error::Overflow`] when |T| leaves the f64 range.
///
/// # Example
/// ```
/// use loopwright::freq::{loop_gain_sweep, FeedbackLoop, TransferModel};
/// let a = TransferModel::constant(1e5).pole(10.0).pole(1e5).pole(1e6);
/// let l = FeedbackLoop::with_constant_beta(a, 0.1).unwrap();
/// let s = loop_gain_sweep(&l, 1.0, 1e9, 901).unwrap();
/// // Three poles: the phase runs continuously down towards −270°, no wrap to +90°.
/// assert!(*s.phase_deg.last().unwrap() < -269.0);
/// assert_eq!(loop_gain_sweep(&l, 1.0, 1e9, 200_000).unwrap_err().code(), "too_large");
/// ```
pub fn loop_gain_sweep(
    l: &FeedbackLoop,
    start_hz: f64,
    stop_hz: f64,
    points: usize,
) -> Result<Sweep> {
    let f = log_frequencies(start_hz, stop_hz, points)?;
    let (mut m, mut p) = (Vec::with_capacity(f.len()), Vec::with_capacity(f.len()));
    // dB and degrees (x·(180/π) is `f64::to_degrees`), written by the sweep.
    let units = (
        20.0 / core::f64::consts::LN_10,
        180.0 / core::f64::consts::PI,
    );
    l.fast_loop().sweep_in(&f, &mut m, &mut p, units);
    // Checked as `finish` checks.
    let finite = m.iter().zip(&p).all(|(a, b)| a.is_finite() & b.is_finite());
    if !finite {
        return Err(Error::Overflow { param: "loop_gain" });
    }
    Ok(Sweep {
        freq_hz: f,
        magnitude_db: m,
        phase_deg: p,
    })
}

/// Closed-loop sweep: |Af| in dB (of the unit of A) and the phase of Af in degrees,
/// unwrapped with [`unwrap_phase_deg`].
///
/// # Errors
/// As [`loop_gain_sweep`]; [`Error::Overflow`] when a point lands on 1 + T = 0.
///
/// # Example
/// ```
/// use loopwright::freq::{closed_loop_sweep, FeedbackLoop, TransferModel};
/// let l = FeedbackLoop::with_constant_beta(TransferModel::constant(1e5).pole(10.0), 0.01).unwrap();
/// let s = closed_loop_sweep(&l, 1.0, 1e7, 71).unwrap();
/// // 20·log10(1e5/1001) = 39.99 dB in the passband.
/// assert!((s.magnitude_db[0] - 20.0 * (1e5f64 / 1001.0).log10()).abs() < 1e-6);
/// assert_eq!(closed_loop_sweep(&l, 1.0, 1e7, 0).unwrap_err().param(), "points");
/// ```
pub fn closed_loop_sweep(
    l: &FeedbackLoop,
    start_hz: f64,
    stop_hz: f64,
    points: usize,
) -> Result<Sweep> {
    let f = log_frequencies(start_hz, stop_hz, points)?;
    let (mut m, mut p) = (Vec::with_capacity(f.len()), Vec::with_capacity(f.len()));
    for &fi in &f {
        let c = closed_log(l, fi);
        m.push(c.db());
        p.push(c.deg());
    }
    unwrap_phase_deg(&mut p);
    finish(f, m, p, "closed_loop_gain")
}

/// Make a sampled phase continuous: whenever two neighbours differ by more than
/// 180°, add the multiple of 360° that brings the later one within 180° of the
/// earlier one. The first sample is kept.
///
/// # Example
/// ```
/// use loopwright::freq::unwrap_phase_deg;
/// let mut p = [170.0, 179.0, -172.0, -160.0];
/// unwrap_phase_deg(&mut p);
/// assert_eq!(p, [170.0, 179.0, 188.0, 200.0]);
/// ```
pub fn unwrap_phase_deg(phase: &mut [f64]) {
    let mut offset = 0.0;
    let mut prev: Option<f64> = None;
    for p in phase.iter_mut() {
        let raw = *p;
        if let Some(q) = prev {
            let d = raw + offset - q;
            offset -= 360.0 * crate::float::round(d / 360.0);
        }
        *p = raw + offset;
        prev = Some(*p);
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::freq::model::TransferModel;

    fn direct(m: &TransferModel, f: f64) -> Complex64 {
        // Slow reference: multiply the complex factors as written in the model docs.
        let s = Complex64::new(0.0, TAU * f);
        let one = Complex64::new(1.0, 0.0);
        let mut h = Complex64::new(m.gain, 0.0);
        for &p in &m.poles_hz {
            h /= one + s / (TAU * p);
        }
        for &z in &m.zeros_hz {
            h *= one + s / (TAU * z);
        }
        for &z in &m.rhp_zeros_hz {
            h *= one - s / (TAU * z);
        }
        for &p in &m.rhp_poles_hz {
            h /= one - s / (TAU * p);
        }
        for c in &m.complex_poles {
            let w = TAU * c.freq_hz;
            h /= one + s / (c.q * w) + s * s / (w * w);
        }
        for c in &m.complex_zeros {
            let w = TAU * c.freq_hz;
            h *= one + s / (c.q * w) + s * s / (w * w);
        }
        for _ in 0..m.origin_poles {
            h *= Complex64::new(TAU, 0.0) / s;
        }
        for &fl in &m.low_cuts_hz {
            h *= s / (s + TAU * fl);
        }
        h * Complex64::new(0.0, -TAU * f * m.delay_s).exp()
    }

    #[test]
    fn factor_sum_matches_direct_product() {
        let m = TransferModel::constant(-3e4)
            .pole(12.0)
            .zero(3e5)
            .rhp_zero(4e6)
            .rhp_pole(7.0)
            .complex_pole(2e6, 3.0)
            .complex_zero(9e6, 0.4)
            .integrator()
            .low_cut(0.5)
            .delay(2e-8);
        for &f in &[0.01, 1.0, 333.0, 1.9e6, 2e6, 5e7] {
            let got = model_log(&m, f).complex();
            let want = direct(&m, f);
            assert!(
                (got - want).norm() <= 1e-12 * want.norm(),
                "f = {f}: {got} vs {want}"
            );
        }
    }

    #[test]
    fn phase_is_continuous_through_a_sharp_pair() {
        let l = FeedbackLoop::with_constant_beta(
            TransferModel::constant(10.0).complex_pole(1e3, 50.0),
            1.0,
        )
        .unwrap();
        let s = loop_gain_sweep(&l, 500.0, 2000.0, 2001).unwrap();
        for w in s.phase_deg.windows(2) {
            assert!(w[1] <= w[0] && w[0] - w[1] < 10.0);
        }
        assert!(s.phase_deg[0] > -1.0 && *s.phase_deg.last().unwrap() < -179.0);
    }

    #[test]
    fn closed_loop_matches_the_feedback_formula() {
        let l = FeedbackLoop::with_constant_beta(
            TransferModel::constant(1e4).pole(100.0).pole(1e5),
            0.01,
        )
        .unwrap();
        for &f in &[1.0, 1e3, 1e5, 1e7] {
            let a = direct(l.amplifier(), f);
            let want = a / (Complex64::new(1.0, 0.0) + a * 0.01);
            let got = closed_loop_gain_at(&l, f).unwrap();
            assert!((got - want).norm() <= 1e-12 * want.norm());
        }
    }

    #[test]
    fn geometric_points_are_the_exponentials_of_an_even_ln_grid() {
        // Reference: exp(ln a + i·(ln b − ln a)/(n − 1)) per point with libm's
        // exp. The progression differs by at most 63 products' roundings and 63
        // times the ratio's own (ε/2 each), plus the rounding of the exponent's
        // argument in the anchor and in the reference (|ln f|·ε each) and of the
        // two exps: (64 + 2·|ln f|)·ε; the ends are exact.
        for &(a, b, n) in &[
            (1.0, 1e9, 10_000),
            (1e-12, 1e15, 777),
            (0.01, 5e10, 508),
            (3.0, 4.0, 2),
        ] {
            let f = geometric(a, b, n);
            assert_eq!(f.len(), n);
            assert_eq!((f[0], f[n - 1]), (a, b));
            let (la, lb) = (libm::log(a), libm::log(b));
            for (i, &x) in f.iter().enumerate() {
                let want = libm::exp(la + (lb - la) * i as f64 / (n - 1) as f64);
                let bound = (64.0 + 2.0 * libm::fabs(libm::log(want))) * f64::EPSILON;
                assert!((x / want - 1.0).abs() <= bound, "{i}: {x} vs {want}");
            }
            assert!(f.windows(2).all(|w| w[0] < w[1]));
        }
    }

    #[test]
    fn sweep_limits_are_enforced() {
        let l =
            FeedbackLoop::with_constant_beta(TransferModel::constant(10.0).pole(1.0), 1.0).unwrap();
        assert_eq!(
            loop_gain_sweep(&l, 1.0, 1.0, 10).unwrap_err().param(),
            "stop_hz"
        );
        assert_eq!(
            loop_gain_sweep(&l, -1.0, 1.0, 10).unwrap_err().param(),
            "start_hz"
        );
        assert_eq!(
            loop_gain_sweep(&l, 1.0, 2.0, 1).unwrap_err().param(),
            "points"
        );
        assert_eq!(
            loop_gain_sweep(&l, 1.0, 1e16, 10).unwrap_err().param(),
            "stop_hz"
        );
        assert_eq!(
            closed_loop_sweep(&l, 1.0, f64::NAN, 10).unwrap_err().code(),
            "not_finite"
        );
        assert_eq!(
            loop_gain_sweep(&l, 1.0, 2.0, MAX_SWEEP_POINTS)
                .unwrap()
                .freq_hz
                .len(),
            MAX_SWEEP_POINTS
        );
    }

    #[test]
    fn unwrap_handles_multiple_turns() {
        let mut p = [0.0, -170.0, 20.0, -150.0, 40.0];
        unwrap_phase_deg(&mut p);
        assert_eq!(p, [0.0, -170.0, -340.0, -510.0, -680.0]);
    }
}
