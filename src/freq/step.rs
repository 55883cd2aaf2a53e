//! Closed-loop step response: sampled waveform, overshoot, 10–90 % rise time,
//! settling time.
//!
//! Method: the closed-loop transfer function Af(p) = N(p)/C(p) of
//! [`super::poly`] (p = s/ωn, delay by Padé) in controllable canonical state
//! space, augmented with the constant step input: z' = M·z, z(0) = (0, …, 0, 1).
//! Then z(t) = exp(M·t)·z(0) exactly, for any pole pattern (repeated poles need no
//! special case, unlike partial fractions). exp(M·t) is computed by scaling and
//! squaring with a Taylor polynomial; samples step with one exp(M·h).
//!
//! The metrics come from their own samples, not from the waveform's, so they do
//! not depend on the number of points asked for: at least 4000 over the span,
//! and at least 20 per period of the fastest oscillatory closed-loop mode while it
//! is alive, so every peak of the ringing is seen. Each metric is then refined
//! between samples on the exact response (Brent for crossings, golden section for
//! peaks). For the settling time the last sample outside the band brackets an
//! exit, and every later sampled peak of |y − 1| close to the band is maximised
//! on the exact response, so a peak that leaves the band between two samples
//! still counts.
//!
//! Metrics, with y normalised by the final value y(∞) = Af(0):
//! - overshoot = (max y − 1)·100 % (0 when y never exceeds 1), and the peak time;
//! - undershoot = −min y·100 % (initial wrong-way excursion, e.g. from an RHP zero);
//! - rise time = t(first y ≥ 0.9) − t(first y ≥ 0.1);
//! - settling time = the last time |y − 1| equals the band, after which it stays inside.
//!
//! Source: C. Moler & C. Van Loan, "Nineteen dubious ways to compute the
//! exponential of a matrix, twenty-five years later", SIAM Review 45 (2003)
//! (scaling and squaring; from memory).

use super::bandwidth::golden_max;
use super::crossings::brent;
use super::model::FeedbackLoop;
use super::poles::AXIS_TOL;
use super::poly::closed_loop_rational;
use super::response::MAX_SWEEP_POINTS;
use super::roots::roots;
use crate::check;
use crate::error::{Error, Result};
use alloc::vec;
use alloc::vec::Vec;

/// Taylor terms in each exponential after scaling to norm ≤ 1/2 (truncation
/// below 1e-16 relative).
const TAYLOR_TERMS: usize = 16;
/// Least number of samples used internally to locate the metrics.
const DETECT_SAMPLES: usize = 4000;
/// Detection samples per period of the fastest oscillation still alive: a
/// sampled peak of a sinusoid is then within cos(π/20) = 0.988 of the true one.
const SAMPLES_PER_PERIOD: f64 = 20.0;
/// A sampled local maximum of |y − 1| above this fraction of the band is
/// checked on the exact response for an excursion out of the band (below
/// cos(π/20), with room for the envelope's decay over one sample).
const PEAK_CHECK: f64 = 0.95;
/// An oscillatory mode counts as alive while σ·t < MODE_LIFE (e^−40 ≈ 4e-18 of
/// its start).
const MODE_LIFE: f64 = 40.0;
/// Most detection samples over the simulated span.
const MAX_DETECT_SAMPLES: usize = 400_000;
/// How many times the simulated span may double to reach settling.
const MAX_EXTENSIONS: u32 = 6;

/// A sampled step response.
#[derive(Debug, Clone, PartialEq, Default)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct StepWaveform {
    /// Sample times, s, from 0.
    pub time_s: Vec<f64>,
    /// Output for a unit step input, in the unit of A.
    pub output: Vec<f64>,
}

/// Step-response metrics and the waveform.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct StepResponse {
    /// Final value Af(0) for a unit step, in the unit of A.
    pub final_value: f64,
    /// Overshoot above the final value, % of it.
    pub overshoot_percent: f64,
    /// Time of the peak, s; `None` when there is no overshoot.
    pub peak_time_s: Option<f64>,
    /// Wrong-way excursion at the start, % of the final value (0 when none).
    pub undershoot_percent: f64,
    /// 10 % to 90 % rise time, s.
    pub rise_time_s: f64,
    /// Settling time into ±band of the final value, s.
    pub settling_time_s: f64,
    /// The settling band used, as a fraction (0.02 for ±2 %).
    pub settle_band: f64,
    /// The waveform, over a span that shows the settling.
    pub waveform: StepWaveform,
}

/// Dense n×n matrix, row-major.
#[derive(Clone)]
struct Mat {
    n: usize,
    a: Vec<f64>,
}

impl Mat {
    fn zeros(n: usize) -> Mat {
        Mat {
            n,
            a: vec![0.0; n * n],
        }
    }
    fn identity(n: usize) -> Mat {
        let mut m = Mat::zeros(n);
        for i in 0..n {
            m.a[i * n + i] = 1.0;
        }
        m
    }
    fn mul(&self, o: &Mat) -> Mat {
        let n = self.n;
        let mut r = Mat::zeros(n);
        for i in 0..n {
            for k in 0..n {
                let x = self.a[i * n + k];
                if x == 0.0 {
                    continue;
                }
                for j in 0..n {
                    r.a[i * n + j] += x * o.a[k * n + j];
                }
            }
        }
        r
    }
    fn norm1(&self) -> f64 {
        let n = self.n;
        (0..n)
            .map(|j| (0..n).map(|i| libm::fabs(self.a[i * n + j])).sum::<f64>())
            .fold(0.0, f64::max)
    }
    fn scaled(&self, k: f64) -> Mat {
        Mat {
            n: self.n,
            a: self.a.iter().map(|x| x * k).collect(),
        }
    }
    fn mul_vec(&self, v: &[f64]) -> Vec<f64> {
        let n = self.n;
        (0..n)
            .map(|i| (0..n).map(|j| self.a[i * n + j] * v[j]).sum())
            .collect()
    }
    /// exp(self·t) by scaling and squaring.
    fn expm(&self, t: f64) -> Mat {
        let m = self.scaled(t);
        let norm = m.norm1();
        let s = if norm > 0.5 {
            crate::float::ceil(libm::log2(norm / 0.5)) as i32
        } else {
            0
        };
        let s = s.clamp(0, 1000);
        let m = m.scaled(libm::pow(2.0, -f64::from(s)));
        let mut sum = Mat::identity(self.n);
        let mut term = Mat::identity(self.n);
        for k in 1..=TAYLOR_TERMS {
            term = term.mul(&m).scaled(1.0 / k as f64);
            for (a, b) in sum.a.iter_mut().zip(&term.a) {
                *a += b;
            }
        }
        for _ in 0..s {
            sum = sum.mul(&sum);
        }
        sum
    }
}

/// The closed loop as an augmented state-space system in normalised time.
struct System {
    m: Mat,
    c: Vec<f64>,
    d: f64,
    wn: f64,
    /// Slowest decay rate (−max Re p) in normalised units, when stable.
    sigma_min: Option<f64>,
    /// Latest first peak 1.5·π/ω_d among the oscillatory poles whose overshoot is
    /// above rounding level (ω_d ≥ σ/10), normalised time.
    first_peak: f64,
    /// Decay rate σ and angular frequency ω_d of each oscillatory pole (one per
    /// conjugate pair), normalised.
    modes: Vec<(f64, f64)>,
    final_value: f64,
}

impl System {
    fn new(l: &FeedbackLoop) -> Result<System> {
        let (num, den, wn) = closed_loop_rational(l)?;
        let n = den.len() - 1;
        if n == 0 {
            return Err(Error::Unreachable {
                param: "closed_loop",
                reason: "the closed loop has no poles, so its step response is a plain step",
            });
        }
        let lead = den[n];
        let a: Vec<f64> = den.iter().map(|x| x / lead).collect();
        let mut b: Vec<f64> = num.iter().map(|x| x / lead).collect();
        b.resize(n + 1, 0.0);
        let d = b[n];
        let c: Vec<f64> = (0..n).map(|i| b[i] - d * a[i]).collect();
        let mut m = Mat::zeros(n + 1);
        let w = n + 1;
        for i in 0..n.saturating_sub(1) {
            m.a[i * w + i + 1] = 1.0;
        }
        for (j, aj) in a.iter().take(n).enumerate() {
            m.a[(n - 1) * w + j] = -aj;
        }
        m.a[(n - 1) * w + n] = 1.0;
        let poles = roots(&den)?;
        let stable = poles.iter().all(|p| p.re < -AXIS_TOL * p.norm());
        let sigma_min = if stable {
            poles.iter().map(|p| -p.re).min_by(f64::total_cmp)
        } else {
            None
        };
        let final_value = if den[0] != 0.0 {
            num.first().copied().unwrap_or(0.0) / den[0]
        } else {
            0.0
        };
        let modes = poles
            .iter()
            .filter(|p| p.im > 0.0)
            .map(|p| (-p.re, p.im))
            .collect();
        let first_peak = poles
            .iter()
            .filter(|p| p.im > 0.0 && p.im >= 0.1 * -p.re)
            .map(|p| 1.5 * core::f64::consts::PI / p.im)
            .fold(0.0, f64::max);
        Ok(System {
            m,
            c,
            d,
            wn,
            sigma_min,
            first_peak,
            modes,
            final_value,
        })
    }

    /// Output at normalised time τ from rest.
    fn output_at(&self, tau: f64) -> f64 {
        let n = self.m.n;
        let e = self.m.expm(tau);
        let z: Vec<f64> = (0..n).map(|i| e.a[i * n + n - 1]).collect();
        self.c.iter().zip(&z).map(|(c, x)| c * x).sum::<f64>() + self.d
    }

    /// Samples from 0 to `span` (normalised) that find the metrics, divided by
    /// `yf`: at least [`DETECT_SAMPLES`] over the span, and at least
    /// [`SAMPLES_PER_PERIOD`] per period of the fastest oscillatory mode still
    /// alive (σ·t < [`MODE_LIFE`]), so a fast mode that dies early does not set
    /// the step for the whole span. Piecewise uniform; times and outputs.
    ///
    /// # Errors
    /// [`Error::NoConvergence`] (`settling_time_s`) past [`MAX_DETECT_SAMPLES`]
    /// (a mode that rings for tens of thousands of periods).
    fn detection_samples(&self, span: f64, yf: f64) -> Result<(Vec<f64>, Vec<f64>)> {
        let base = span / (DETECT_SAMPLES - 1) as f64;
        let step_of = |w: f64| core::f64::consts::TAU / (SAMPLES_PER_PERIOD * w);
        // Segment ends: the time each mode dies, and the span.
        let mut ends: Vec<f64> = self
            .modes
            .iter()
            .map(|&(sigma, _)| MODE_LIFE / sigma)
            .filter(|&d| d < span)
            .collect();
        ends.push(span);
        crate::sort::sort_by(&mut ends, f64::total_cmp);
        let mut plan = Vec::new();
        let (mut start, mut total) = (0.0, 0usize);
        for &end in &ends {
            if end <= start {
                continue;
            }
            let h = self
                .modes
                .iter()
                .filter(|&&(sigma, _)| MODE_LIFE / sigma > start)
                .map(|&(_, w)| step_of(w))
                .fold(base, f64::min);
            let n = crate::float::ceil((end - start) / h) as usize;
            total = total.saturating_add(n.max(1));
            if total > MAX_DETECT_SAMPLES {
                return Err(Error::NoConvergence {
                    param: "settling_time_s",
                    reason: "the response rings for too many periods to resolve its settling",
                });
            }
            plan.push((start, end, n.max(1)));
            start = end;
        }
        let n = self.m.n;
        let mut z = vec![0.0; n];
        if let Some(last) = z.last_mut() {
            *last = 1.0;
        }
        let out = |z: &[f64]| (self.c.iter().zip(z).map(|(c, x)| c * x).sum::<f64>() + self.d) / yf;
        let (mut t, mut y) = (vec![0.0], vec![out(&z)]);
        for (a, b, count) in plan {
            let h = (b - a) / count as f64;
            let phi = self.m.expm(h);
            for i in 1..=count {
                z = phi.mul_vec(&z);
                t.push(if i == count { b } else { a + h * i as f64 });
                y.push(out(&z));
            }
        }
        Ok((t, y))
    }

    /// `count` samples from 0 to `span` (normalised), by repeated exp(M·h).
    fn samples(&self, span: f64, count: usize) -> Vec<f64> {
        let n = self.m.n;
        let h = span / (count - 1) as f64;
        let phi = self.m.expm(h);
        let mut z = vec![0.0; n];
        if let Some(last) = z.last_mut() {
            *last = 1.0;
        }
        let mut out = Vec::with_capacity(count);
        for _ in 0..count {
            out.push(self.c.iter().zip(&z).map(|(c, x)| c * x).sum::<f64>() + self.d);
            z = phi.mul_vec(&z);
        }
        out
    }
}

fn point_count(points: usize) -> Result<usize> {
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
    Ok(points)
}

/// The step response sampled at `points` times from 0 to `duration_s`, for any
/// loop (an unstable one grows until it overflows, which is an error).
///
/// # Errors
/// `duration_s` not > 0; `points` outside 2…100 000; [`Error::Overflow`] when the
/// output leaves the f64 range.
///
/// # Example
/// ```
/// use loopwright::freq::{step_waveform, FeedbackLoop, TransferModel};
/// // One closed-loop pole at 10 Hz·1001: y(t) = Af(0)·(1 − exp(−t/τ)).
/// let l = FeedbackLoop::with_constant_beta(TransferModel::constant(1e5).pole(10.0), 0.01).unwrap();
/// let w = step_waveform(&l, 1e-4, 101).unwrap();
/// let tau = 1.0 / (core::f64::consts::TAU * 10_010.0);
/// let want = 1e5 / 1001.0 * (1.0 - (-1e-4f64 / tau).exp());
/// assert!((w.output[100] - want).abs() < 1e-9 * want);
/// assert_eq!(step_waveform(&l, 0.0, 101).unwrap_err().param(), "duration_s");
/// ```
pub fn step_waveform(l: &FeedbackLoop, duration_s: f64, points: usize) -> Result<StepWaveform> {
    let duration = check::positive("duration_s", duration_s)?;
    let points = point_count(points)?;
    let sys = System::new(l)?;
    let span = check::result("duration_s", duration * sys.wn)?;
    let output = sys.samples(span, points);
    for &y in &output {
        check::result("step_output", y)?;
    }
    let time_s = (0..points)
        .map(|i| duration * i as f64 / (points - 1) as f64)
        .collect();
    Ok(StepWaveform { time_s, output })
}

/// Step-response metrics of a stable loop and its waveform at `points` samples.
///
/// `settle_band` is the settling tolerance as a fraction of the final value
/// (0.02 for ±2 %), in (0, 0.5).
///
/// # Errors
/// `settle_band` outside (0, 0.5); `points` outside 2…100 000;
/// [`Error::Unreachable`] (`closed_loop`) when the closed loop is not stable
/// (no final value to settle to) or its DC gain is zero (a loop with a low cut);
/// [`Error::NoConvergence`] if it has not settled after 64 times the slowest time
/// constant times the band's log.
///
/// # Example
/// ```
/// use loopwright::freq::{step_response, FeedbackLoop, TransferModel};
/// // Single pole: no overshoot, rise time ln 9·τ.
/// let l = FeedbackLoop::with_constant_beta(TransferModel::constant(1e5).pole(10.0), 0.01).unwrap();
/// let s = step_response(&l, 0.02, 200).unwrap();
/// let tau = 1.0 / (core::f64::consts::TAU * 10_010.0);
/// assert!((s.rise_time_s / (9f64.ln() * tau) - 1.0).abs() < 1e-9);
/// assert_eq!(s.overshoot_percent, 0.0);
/// assert_eq!(step_response(&l, 0.7, 200).unwrap_err().param(), "settle_band");
/// ```
pub fn step_response(l: &FeedbackLoop, settle_band: f64, points: usize) -> Result<StepResponse> {
    let band = check::positive("settle_band", settle_band)?;
    if band >= 0.5 {
        return Err(Error::OutOfDomain {
            param: "settle_band",
            requirement: "must be between 0 and 0.5",
        });
    }
    let points = point_count(points)?;
    let sys = System::new(l)?;
    let sigma = sys.sigma_min.ok_or(Error::Unreachable {
        param: "closed_loop",
        reason: "the closed loop is not stable, so the step response does not settle",
    })?;
    let yf = sys.final_value;
    if yf == 0.0 || !yf.is_finite() {
        return Err(Error::Unreachable {
            param: "closed_loop",
            reason: "the closed-loop gain at DC is zero (a low cut), so there is no final value to settle to",
        });
    }
    let mut span =
        ((libm::log(1.0 / band) + 8.0) * 1.2 / sigma).max(sys.first_peak.min(200.0 / sigma));
    for _ in 0..=MAX_EXTENSIONS {
        let (t, y) = sys.detection_samples(span, yf)?;
        let last = t.len() - 1;
        let outside = y.iter().rposition(|v| libm::fabs(v - 1.0) > band);
        let top = arg_best(&y, |a, b| a > b);
        // Not settled in the first nine tenths, or still rising above the final
        // value at the end: simulate longer.
        if outside.is_some_and(|k| t[k] > 0.9 * span) || (y[top] > 1.0 && top == last) {
            span *= 2.0;
            continue;
        }
        for &v in &y {
            check::result("step_output", v)?;
        }
        let m = Metrics::of(&|tau| sys.output_at(tau) / yf, band, &t, &y, outside);
        let waveform = StepWaveform {
            time_s: (0..points)
                .map(|i| span / sys.wn * i as f64 / (points - 1) as f64)
                .collect(),
            output: sys.samples(span, points),
        };
        return Ok(StepResponse {
            final_value: yf,
            overshoot_percent: check::result("overshoot_percent", m.overshoot)?,
            peak_time_s: m.peak_time.map(|tp| tp / sys.wn),
            undershoot_percent: check::result("undershoot_percent", m.undershoot)?,
            rise_time_s: check::result("rise_time_s", m.rise / sys.wn)?,
            settling_time_s: check::result("settling_time_s", m.settle / sys.wn)?,
            settle_band: band,
            waveform,
        });
    }
    Err(Error::NoConvergence {
        param: "settling_time_s",
        reason: "the response did not settle within the simulated span",
    })
}

/// Index of the best sample by `better` (the first of equals).
fn arg_best(y: &[f64], better: impl Fn(f64, f64) -> bool) -> usize {
    let mut k = 0;
    for (i, &v) in y.iter().enumerate() {
        if better(v, y[k]) {
            k = i;
        }
    }
    k
}

/// The step metrics in normalised time, refined between detection samples on
/// the exact response.
pub(crate) struct Metrics {
    pub overshoot: f64,
    pub peak_time: Option<f64>,
    pub undershoot: f64,
    pub rise: f64,
    pub settle: f64,
}

impl Metrics {
    /// `yn`: the exact response over its final value at time τ; `t`, `y`:
    /// detection samples of it; `outside`: the last sample outside the band,
    /// if any.
    pub(crate) fn of(
        yn: &dyn Fn(f64) -> f64,
        band: f64,
        t: &[f64],
        y: &[f64],
        outside: Option<usize>,
    ) -> Metrics {
        let span = t[t.len() - 1];
        let first_at = |level: f64| -> f64 {
            match y.iter().position(|&v| v >= level) {
                None | Some(0) => 0.0,
                Some(k) => {
                    let g = |tau: f64| yn(tau) - level;
                    let (a, b) = (t[k - 1], t[k]);
                    brent(&g, a, b, g(a), g(b), 1e-13 * span)
                }
            }
        };
        let rise = first_at(0.9) - first_at(0.1);
        let last = t.len() - 1;
        let kmax = arg_best(y, |a, b| a > b);
        let (overshoot, peak_time) = if y[kmax] > 1.0 && kmax < last {
            let (tp, vp) = golden_max(&yn, t[kmax.saturating_sub(1)], t[kmax + 1]);
            ((vp.max(y[kmax]) - 1.0) * 100.0, Some(tp))
        } else {
            (0.0, None)
        };
        let kmin = arg_best(y, |a, b| a < b);
        let undershoot = if y[kmin] < 0.0 {
            let neg = |tau: f64| -yn(tau);
            let (_, v) = golden_max(&neg, t[kmin.saturating_sub(1)], t[(kmin + 1).min(last)]);
            v.max(-y[kmin]) * 100.0
        } else {
            0.0
        };
        Metrics {
            overshoot,
            peak_time,
            undershoot,
            rise,
            settle: last_exit(yn, band, t, y, outside),
        }
    }
}

/// The last time |y − 1| equals the band, after which it stays inside.
///
/// The last sample outside the band brackets an exit; but a peak of the ringing
/// between two later samples may still leave the band. Every later local
/// maximum of |y − 1| among the samples that comes within [`PEAK_CHECK`] of the
/// band is therefore maximised on the exact response (golden section), latest
/// first, and the exit after the latest true excursion is the settling time.
fn last_exit(
    yn: &dyn Fn(f64) -> f64,
    band: f64,
    t: &[f64],
    y: &[f64],
    outside: Option<usize>,
) -> f64 {
    let span = t[t.len() - 1];
    let g = |tau: f64| libm::fabs(yn(tau) - 1.0) - band;
    let exit_between = |a: f64, b: f64| brent(&g, a, b, g(a), g(b), 1e-13 * span);
    let e = |i: usize| libm::fabs(y[i] - 1.0);
    let from = outside.map_or(1, |k| k + 1);
    for j in (from.max(1)..t.len() - 1).rev() {
        if e(j) > PEAK_CHECK * band && e(j) >= e(j - 1) && e(j) >= e(j + 1) {
            let dev = |tau: f64| libm::fabs(yn(tau) - 1.0);
            let (tp, ep) = golden_max(&dev, t[j - 1], t[j + 1]);
            if ep > band {
                return exit_between(tp, t[j + 1]);
            }
        }
    }
    match outside {
        None => 0.0,
        Some(k) => exit_between(t[k], t[k + 1]),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::freq::model::TransferModel;

    #[test]
    fn expm_of_a_rotation() {
        // exp([[0, 1], [−1, 0]]·t) = [[cos t, sin t], [−sin t, cos t]].
        let m = Mat {
            n: 2,
            a: vec![0.0, 1.0, -1.0, 0.0],
        };
        let e = m.expm(10.0);
        assert!((e.a[0] - libm::cos(10.0)).abs() < 1e-13);
        assert!((e.a[1] - libm::sin(10.0)).abs() < 1e-13);
    }

    #[test]
    fn second_order_overshoot_matches_the_zeta_formula() {
        // Common practice, no source: a second-order step overshoots by
        // exp(−πζ/√(1−ζ²)). Two poles, T0 chosen for ζ = 0.3.
        let (f1, f2) = (1e3, 1e5);
        let zeta: f64 = 0.3;
        // ζ = (ω1+ω2)/(2√((1+T0)ω1ω2)) → 1+T0 = ((f1+f2)/(2ζ))²/(f1 f2).
        let t0 = ((f1 + f2) / (2.0 * zeta)).powi(2) / (f1 * f2) - 1.0;
        let l =
            FeedbackLoop::with_constant_beta(TransferModel::constant(t0).pole(f1).pole(f2), 1.0)
                .unwrap();
        let s = step_response(&l, 0.02, 500).unwrap();
        let os = 100.0 * (-core::f64::consts::PI * zeta / (1.0 - zeta * zeta).sqrt()).exp();
        assert!(
            (s.overshoot_percent - os).abs() < 1e-8,
            "{} vs {os}",
            s.overshoot_percent
        );
        assert_eq!(s.waveform.output.len(), 500);
    }

    #[test]
    fn repeated_closed_loop_poles_do_not_break_it() {
        // Two poles at 1 kHz and 4 kHz with T0 for ζ = 1 exactly:
        // 1 + T0 = (f1+f2)²/(4·f1·f2) = 25/16, a double closed-loop pole at
        // f0 = √((1+T0)·f1·f2) = 2.5 kHz; y = 1 − (1 + ω0 t)·exp(−ω0 t).
        let a = TransferModel::constant(9.0 / 16.0).pole(1e3).pole(4e3);
        let l = FeedbackLoop::with_constant_beta(a, 1.0).unwrap();
        let f = 2.5e3;
        let s = step_response(&l, 0.02, 100).unwrap();
        let w0 = core::f64::consts::TAU * f;
        let y = |t: f64| 1.0 - (1.0 + w0 * t) * libm::exp(-w0 * t);
        let solve = |lv: f64| {
            let (mut a, mut b) = (0.0, 20.0 / w0);
            for _ in 0..200 {
                let m = 0.5 * (a + b);
                if y(m) < lv {
                    a = m
                } else {
                    b = m
                }
            }
            a
        };
        let rise = solve(0.9) - solve(0.1);
        assert!(
            (s.rise_time_s / rise - 1.0).abs() < 1e-6,
            "{} vs {rise}",
            s.rise_time_s
        );
        assert!((s.settling_time_s / solve(0.98) - 1.0).abs() < 1e-6);
        assert_eq!(s.overshoot_percent, 0.0);
    }

    #[test]
    fn unstable_and_ac_coupled_loops_are_refused() {
        let a = TransferModel::constant(20.0).pole(1e3).pole(1e3).pole(1e3);
        let l = FeedbackLoop::with_constant_beta(a, 1.0).unwrap();
        assert_eq!(
            step_response(&l, 0.02, 100).unwrap_err().param(),
            "closed_loop"
        );
        let ac = TransferModel::constant(100.0).low_cut(10.0).pole(1e5);
        let l = FeedbackLoop::with_constant_beta(ac, 0.1).unwrap();
        assert_eq!(
            step_response(&l, 0.02, 100).unwrap_err().code(),
            "unreachable"
        );
        // The waveform itself is still available.
        assert!(step_waveform(&l, 1e-3, 50).is_ok());
    }

    #[test]
    fn rhp_zero_gives_undershoot() {
        let a = TransferModel::constant(10.0).pole(1e3).rhp_zero(1e4);
        let l = FeedbackLoop::with_constant_beta(a, 0.5).unwrap();
        let s = step_response(&l, 0.02, 100).unwrap();
        assert!(s.undershoot_percent > 0.0);
        // Initial value: Af(∞)/Af(0) = −(10·… ) via the feedthrough; y(0) < 0.
        assert!(s.waveform.output[0] < 0.0 || s.waveform.output[1] < 0.0);
    }
}
