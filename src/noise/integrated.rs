//! Output noise density versus frequency and integrated (rms) output noise of an
//! op-amp stage over its closed-loop response.
//!
//! The output PSD is S_out(f) = S₀(f)·|H(f)|², with S₀ the sum of the six squared
//! source terms of [`super::stage`] (1/f parts included) and H the closed-loop
//! response of [`super::ClosedLoopResponse`]. The rms output noise from f_low to
//! f_high is √(∫ S_out df), computed by [`super::quadrature::integrate`] on
//! pieces split at every corner, at f_c and at every extra pole:
//!
//! - a piece [a, b] with a > 0 is integrated in t = ln f (∫ S·|H|²·f dt), which
//!   keeps 1/f noise and wide frequency ranges smooth;
//! - a piece starting at 0 Hz (allowed only without 1/f corners) in f itself;
//! - the tail [F, ∞) in s = F/f ∈ (0, 1] (∫ S(F/s)·|H(F/s)|²·F/s² ds), finite
//!   because |H|² falls at least as 1/f² above f_c.
//!
//! The rms input-referred noise is the output rms divided by |signal gain|.
//! As a check the result also carries the single-pole estimate, white density
//! times √(π/2·f_c).

use super::amplifier::AmplifierNoise;
use super::quadrature::integrate;
use super::response::ClosedLoopResponse;
use super::stage::{density_frequency, output_psd, Stage};
use crate::check;
use crate::error::{Error, Result};
use alloc::vec::Vec;

/// Relative tolerance of each piece of the integral.
pub const REL_TOL: f64 = 1e-10;

/// Most points of a density sweep.
pub const MAX_SWEEP_POINTS: usize = 2000;

/// Most pieces of the split integral: 2 ends, 2 corners, f_c, 2 poles, tail start.
const MAX_BREAKS: usize = 8;

/// Output noise density (V/√Hz) at `frequency_hz`, after the closed-loop roll-off:
/// √S₀(f)·|H(f)|.
///
/// # Errors
/// As [`super::noise_contributions`].
///
/// # Example
/// ```
/// use loopwright::noise::{output_noise_density, AmplifierNoise, ClosedLoopResponse, Stage, StageKind};
/// let s = Stage::new(StageKind::NonInverting, 9e3, 1e3, 0.0, 300.0).unwrap();
/// let amp = AmplifierNoise::new(10e-9, 0.0, 0.0, 0.0).unwrap();
/// let h = ClosedLoopResponse::new(s.noise_gain(), 1e6, &[]).unwrap();
/// let flat = output_noise_density(&s, &amp, &h, 10.0).unwrap();
/// let at_fc = output_noise_density(&s, &amp, &h, 1e5).unwrap();
/// assert!((at_fc / flat - 0.5f64.sqrt()).abs() < 1e-6);
/// assert!(output_noise_density(&s, &amp, &h, f64::NAN).is_err());
/// ```
pub fn output_noise_density(
    stage: &Stage,
    amp: &AmplifierNoise,
    response: &ClosedLoopResponse,
    frequency_hz: f64,
) -> Result<f64> {
    let f = density_frequency(amp, frequency_hz)?;
    check::result(
        "output_noise_density",
        crate::float::sqrt(output_psd(stage, amp, f) * response.magnitude_squared(f)),
    )
}

/// Output and input-referred noise density over log-spaced frequencies.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct NoiseSweep {
    /// Frequencies, Hz.
    pub frequencies: Vec<f64>,
    /// Output density after the closed-loop roll-off, V/√Hz.
    pub output_density: Vec<f64>,
    /// Density referred to the signal input, √S₀(f)/|signal gain|, V/√Hz.
    pub input_referred_density: Vec<f64>,
}

/// [`output_noise_density`] over `points` log-spaced frequencies from `f_start`
/// to `f_stop`, with the input-referred density.
///
/// # Errors
/// Frequencies not finite or not positive, `f_stop ≤ f_start`; `points` outside
/// 2…2000.
///
/// # Example
/// ```
/// use loopwright::noise::{output_noise_sweep, AmplifierNoise, ClosedLoopResponse, Stage, StageKind};
/// let s = Stage::new(StageKind::Inverting, 10e3, 1e3, 0.0, 300.0).unwrap();
/// let amp = AmplifierNoise::new(5e-9, 5.0, 1e-12, 50.0).unwrap();
/// let h = ClosedLoopResponse::new(s.noise_gain(), 5e6, &[]).unwrap();
/// let w = output_noise_sweep(&s, &amp, &h, 1.0, 1e7, 71).unwrap();
/// assert_eq!(w.frequencies.len(), 71);
/// assert_eq!(output_noise_sweep(&s, &amp, &h, 1.0, 1e7, 1).unwrap_err().param(), "points");
/// ```
pub fn output_noise_sweep(
    stage: &Stage,
    amp: &AmplifierNoise,
    response: &ClosedLoopResponse,
    f_start: f64,
    f_stop: f64,
    points: usize,
) -> Result<NoiseSweep> {
    let a = check::positive("f_start", f_start)?;
    let b = check::positive("f_stop", f_stop)?;
    if b <= a {
        return Err(Error::OutOfDomain {
            param: "f_stop",
            requirement: "must be greater than f_start",
        });
    }
    if points > MAX_SWEEP_POINTS {
        return Err(Error::TooLarge {
            param: "points",
            limit: MAX_SWEEP_POINTS as u64,
        });
    }
    if points < 2 {
        return Err(Error::OutOfDomain {
            param: "points",
            requirement: "must be at least 2",
        });
    }
    let gain = libm::fabs(stage.signal_gain());
    let mut out = NoiseSweep {
        frequencies: Vec::with_capacity(points),
        output_density: Vec::with_capacity(points),
        input_referred_density: Vec::with_capacity(points),
    };
    for i in 0..points {
        let f = a * libm::pow(b / a, i as f64 / (points - 1) as f64);
        let s0 = output_psd(stage, amp, f);
        out.frequencies.push(f);
        out.output_density.push(check::result(
            "output_density",
            crate::float::sqrt(s0 * response.magnitude_squared(f)),
        )?);
        out.input_referred_density.push(check::result(
            "input_referred_density",
            crate::float::sqrt(s0) / gain,
        )?);
    }
    Ok(out)
}

/// The integrated noise of a stage and the figures to judge it by.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct IntegratedNoise {
    /// rms output noise over the band, V.
    pub output_rms: f64,
    /// rms noise referred to the signal input (output / |signal gain|), V.
    pub input_referred_rms: f64,
    /// Lower end of the band, Hz.
    pub f_low: f64,
    /// Upper end of the band, Hz; `None` for an unbounded band.
    pub f_high: Option<f64>,
    /// Noise gain NG.
    pub noise_gain: f64,
    /// Signal gain.
    pub signal_gain: f64,
    /// f_c = GBW/NG, Hz.
    pub loop_crossover_hz: f64,
    /// Closed-loop −3 dB bandwidth, Hz.
    pub bandwidth_hz: f64,
    /// ∫ |H|² df over the band integrated, f_low … f_high (∞ allowed), by the
    /// same quadrature, Hz: the bandwidth a white density is integrated over.
    pub noise_bandwidth_hz: f64,
    /// π/2·f_c, the single-pole noise bandwidth, Hz.
    pub single_pole_noise_bandwidth_hz: f64,
    /// White-noise estimate: √(S₀(∞)·π/2·f_c), V rms (1/f parts and band limits ignored).
    pub single_pole_estimate_rms: f64,
    /// Estimated relative error of `output_rms`.
    pub relative_error: f64,
}

/// ∫ g(f) df over [f_low, f_high] (f_high = +∞ allowed), split at `breaks`.
fn integrate_band<G: Fn(f64) -> f64>(
    g: &G,
    f_low: f64,
    f_high: f64,
    breaks: &[f64],
) -> Result<(f64, f64)> {
    let mut pts = [0.0f64; MAX_BREAKS + 2];
    let mut n = 0;
    pts[n] = f_low;
    n += 1;
    let mut sorted = [0.0f64; MAX_BREAKS];
    let mut m = 0;
    for &b in breaks {
        if b > f_low && b < f_high && m < MAX_BREAKS {
            sorted[m] = b;
            m += 1;
        }
    }
    let sorted = &mut sorted[..m];
    sorted.sort_unstable_by(f64::total_cmp);
    for &b in sorted.iter() {
        if b > pts[n - 1] {
            pts[n] = b;
            n += 1;
        }
    }
    let finite_top = f_high.is_finite();
    if finite_top {
        pts[n] = f_high;
        n += 1;
    }
    let mut total = 0.0;
    let mut err = 0.0;
    for w in pts[..n].windows(2) {
        let (a, b) = (w[0], w[1]);
        let q = if a == 0.0 {
            integrate(g, 0.0, b, REL_TOL, 0.0)?
        } else {
            integrate(
                |t: f64| {
                    let f = libm::exp(t);
                    g(f) * f
                },
                libm::log(a),
                libm::log(b),
                REL_TOL,
                0.0,
            )?
        };
        total += q.value;
        err += q.error;
    }
    if !finite_top {
        let top = pts[n - 1];
        // The tail piece starts at the last break (or f_low); if that is 0 Hz,
        // start it at the first positive break instead, which exists (f_c).
        let start = if top > 0.0 {
            top
        } else {
            return Err(Error::OutOfDomain {
                param: "f_high",
                requirement: "must be finite when the band has no break above 0 Hz",
            });
        };
        let q = integrate(
            |s: f64| {
                let f = start / s;
                g(f) * start / (s * s)
            },
            0.0,
            1.0,
            REL_TOL,
            0.0,
        )?;
        total += q.value;
        err += q.error;
    }
    Ok((total, err))
}

/// rms output and input-referred noise of `stage` with amplifier noise `amp`
/// through the closed-loop response `response`, over `f_low`…`f_high` Hz.
///
/// `f_high` may be `f64::INFINITY` for the whole band; `f_low` may be 0 only when
/// the amplifier has no 1/f corners. `response` should be built with the stage's
/// noise gain ([`ClosedLoopResponse::new`]); an unstable loop is refused there.
///
/// # Errors
/// `f_low` negative or not finite, or 0 with a 1/f corner; `f_high` NaN or not
/// above `f_low`; [`Error::OutOfDomain`] on `noise_gain` when `response` was built
/// for another noise gain; quadrature failures ([`Error::NoConvergence`]).
///
/// # Example
/// ```
/// use loopwright::noise::{integrated_output_noise, AmplifierNoise, ClosedLoopResponse, Stage, StageKind};
/// let s = Stage::new(StageKind::NonInverting, 9e3, 1e3, 0.0, 300.0).unwrap();
/// let amp = AmplifierNoise::new(10e-9, 0.0, 0.0, 0.0).unwrap();
/// let h = ClosedLoopResponse::new(s.noise_gain(), 1e6, &[]).unwrap();
/// let n = integrated_output_noise(&s, &amp, &h, 0.0, f64::INFINITY).unwrap();
/// // White noise through one pole: the π/2 noise bandwidth.
/// assert!((n.output_rms / n.single_pole_estimate_rms - 1.0).abs() < 1e-9);
/// assert_eq!(integrated_output_noise(&s, &amp, &h, -1.0, 1e3).unwrap_err().param(), "f_low");
/// ```
pub fn integrated_output_noise(
    stage: &Stage,
    amp: &AmplifierNoise,
    response: &ClosedLoopResponse,
    f_low: f64,
    f_high: f64,
) -> Result<IntegratedNoise> {
    let f_low = check::non_negative("f_low", f_low)?;
    if f_low == 0.0 && amp.has_flicker() {
        return Err(Error::OutOfDomain {
            param: "f_low",
            requirement:
                "must be greater than zero when a 1/f corner is set (1/f noise integrates to infinity at 0 Hz)",
        });
    }
    if f_high.is_nan() || f_high <= f_low {
        return Err(Error::OutOfDomain {
            param: "f_high",
            requirement: "must be greater than f_low (infinity allowed)",
        });
    }
    let ng = stage.noise_gain();
    if libm::fabs(response.noise_gain() - ng) > 1e-12 * ng {
        return Err(Error::OutOfDomain {
            param: "noise_gain",
            requirement: "the response must be built with the stage's noise gain",
        });
    }
    let fc = response.loop_crossover_hz();
    // Breaks of the response alone (f_c, a decade above, the extra poles), then
    // of the densities (the 1/f corners) as well.
    let mut breaks = [0.0f64; MAX_BREAKS];
    breaks[0] = fc;
    breaks[1] = 10.0 * fc;
    let mut nb = 2;
    for &p in response.extra_poles_hz() {
        breaks[nb] = p;
        nb += 1;
    }
    let shape_breaks = nb;
    for b in [amp.voltage_corner_hz, amp.current_corner_hz] {
        if b > 0.0 {
            breaks[nb] = b;
            nb += 1;
        }
    }
    let g = |f: f64| output_psd(stage, amp, f) * response.magnitude_squared(f);
    let (power, err) = integrate_band(&g, f_low, f_high, &breaks[..nb])?;
    let (nbw, _) = integrate_band(
        &|f: f64| response.magnitude_squared(f),
        f_low,
        f_high,
        &breaks[..shape_breaks],
    )?;
    let output_rms = check::result("output_rms", crate::float::sqrt(power))?;
    let signal_gain = stage.signal_gain();
    let white = AmplifierNoise {
        voltage_corner_hz: 0.0,
        current_corner_hz: 0.0,
        ..*amp
    };
    let single = response.single_pole_noise_bandwidth_hz();
    Ok(IntegratedNoise {
        output_rms,
        input_referred_rms: check::result(
            "input_referred_rms",
            output_rms / libm::fabs(signal_gain),
        )?,
        f_low,
        f_high: if f_high.is_finite() {
            Some(f_high)
        } else {
            None
        },
        noise_gain: ng,
        signal_gain,
        loop_crossover_hz: fc,
        bandwidth_hz: response.bandwidth_hz()?,
        noise_bandwidth_hz: check::result("noise_bandwidth_hz", nbw)?,
        single_pole_noise_bandwidth_hz: single,
        single_pole_estimate_rms: check::result(
            "single_pole_estimate_rms",
            crate::float::sqrt(output_psd(stage, &white, 1.0) * single),
        )?,
        relative_error: if power > 0.0 { 0.5 * err / power } else { 0.0 },
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::noise::stage::StageKind;
    use core::f64::consts::PI;

    fn white_stage() -> (Stage, AmplifierNoise) {
        (
            Stage::new(StageKind::NonInverting, 9e3, 1e3, 100.0, 300.0).unwrap(),
            AmplifierNoise::new(7e-9, 0.0, 1e-12, 0.0).unwrap(),
        )
    }

    #[test]
    fn single_pole_noise_bandwidth_is_pi_over_2_fc() {
        // The π/2 noise-bandwidth factor of one pole, e.g. Motchenbacher &
        // Connelly, *Low-Noise Electronic System Design*, 1993 (from memory).
        let (s, amp) = white_stage();
        let h = ClosedLoopResponse::new(s.noise_gain(), 2e6, &[]).unwrap();
        let n = integrated_output_noise(&s, &amp, &h, 0.0, f64::INFINITY).unwrap();
        assert!((n.noise_bandwidth_hz / (PI / 2.0 * 2e5) - 1.0).abs() < 1e-9);
        assert!((n.output_rms / n.single_pole_estimate_rms - 1.0).abs() < 1e-9);
        assert!(n.relative_error < 1e-9);
    }

    #[test]
    fn one_extra_pole_keeps_the_noise_bandwidth() {
        // Second-order identity ∫|H|² df = π/2·f0·Q with f0·Q = f_c (see response.rs):
        // a second pole changes the shape but not the white-noise bandwidth.
        let (s, amp) = white_stage();
        let h = ClosedLoopResponse::new(s.noise_gain(), 2e6, &[3e5]).unwrap();
        let n = integrated_output_noise(&s, &amp, &h, 0.0, f64::INFINITY).unwrap();
        assert!((n.noise_bandwidth_hz / (PI / 2.0 * 2e5) - 1.0).abs() < 1e-9);
    }

    #[test]
    fn finite_band_of_a_single_pole_is_an_arctangent() {
        // ∫₀^B df/(1 + (f/fc)²) = fc·atan(B/fc), integral of the Lorentzian.
        let (s, amp) = white_stage();
        let h = ClosedLoopResponse::new(s.noise_gain(), 2e6, &[]).unwrap();
        let n = integrated_output_noise(&s, &amp, &h, 0.0, 1e5).unwrap();
        let s0 = output_psd(&s, &amp, 1.0);
        let expected = (s0 * 2e5 * (0.5f64).atan()).sqrt();
        assert!((n.output_rms / expected - 1.0).abs() < 1e-9);
        // The noise bandwidth is that of the band integrated: fc·atan(B/fc), not
        // π/2·fc (issue 15, item 10: it was π/2·fc whatever f_high was).
        assert!((n.noise_bandwidth_hz / (2e5 * (0.5f64).atan()) - 1.0).abs() < 1e-9);
        // Band from 1 kHz: subtract the arctangent at 1 kHz.
        let n = integrated_output_noise(&s, &amp, &h, 1e3, 1e5).unwrap();
        let expected = (s0 * 2e5 * ((0.5f64).atan() - (1e3f64 / 2e5).atan())).sqrt();
        assert!((n.output_rms / expected - 1.0).abs() < 1e-9);
        let nbw = 2e5 * ((0.5f64).atan() - (1e3f64 / 2e5).atan());
        assert!((n.noise_bandwidth_hz / nbw - 1.0).abs() < 1e-9);
    }

    #[test]
    fn flicker_noise_adds_a_logarithm() {
        // ∫ e²·fce/f df from f1 to f2 = e²·fce·ln(f2/f1), well below f_c where
        // |H| ≈ 1 (checked within the roll-off's 1e-6 share).
        let s = Stage::new(StageKind::NonInverting, 0.0, 1e3, 0.0, 300.0).unwrap();
        let amp = AmplifierNoise::new(10e-9, 100.0, 0.0, 0.0).unwrap();
        let h = ClosedLoopResponse::new(1.0, 1e9, &[]).unwrap();
        let n = integrated_output_noise(&s, &amp, &h, 0.1, 10.0).unwrap();
        let expected = (1e-16 * (9.9 + 100.0 * 100f64.ln())).sqrt();
        assert!((n.output_rms / expected - 1.0).abs() < 1e-9);
    }

    #[test]
    fn bad_bands_are_named() {
        let (s, amp) = white_stage();
        let h = ClosedLoopResponse::new(s.noise_gain(), 2e6, &[]).unwrap();
        assert_eq!(
            integrated_output_noise(&s, &amp, &h, 10.0, 10.0)
                .unwrap_err()
                .param(),
            "f_high"
        );
        assert_eq!(
            integrated_output_noise(&s, &amp, &h, 0.0, f64::NAN)
                .unwrap_err()
                .param(),
            "f_high"
        );
        let flick = AmplifierNoise::new(7e-9, 3.0, 0.0, 0.0).unwrap();
        assert_eq!(
            integrated_output_noise(&s, &flick, &h, 0.0, 1e3)
                .unwrap_err()
                .param(),
            "f_low"
        );
        let other = ClosedLoopResponse::new(3.0, 2e6, &[]).unwrap();
        assert_eq!(
            integrated_output_noise(&s, &amp, &other, 1.0, 1e3)
                .unwrap_err()
                .param(),
            "noise_gain"
        );
    }
}
