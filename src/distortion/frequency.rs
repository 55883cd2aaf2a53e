//! Distortion under feedback at a signal frequency: the loop gain there, complex,
//! instead of its DC value.
//!
//! Model (weakly nonlinear, leading order in the amplitude): the amplifier is a
//! linear dominant-pole section L(jf) = 1/(1 + j·f/f_p) followed by the memoryless
//! power series y = a1·v + a2·v² + a3·v³ (v the pole section's output), in a loop
//! with a flat feedback factor β: v = L·(x − β·y). This is the usual op-amp
//! picture with the distortion made in the output stage, after the integrating
//! (dominant-pole) stage. The loop gain is T(f) = a1·β·L(jf). Each harmonic made
//! by the series is fed back and corrected by the loop gain at its own frequency:
//! with V1 the phasor of v at the fundamental,
//!
//! - Y1 = a1·V1, and V1 = L(f)·X/(1 + T(f)) for an input peak X;
//! - Y2 = a2·V1²/2 / (1 + T(2f));
//! - Y3 = (a3·V1³/4 + a2·V1·V2) / (1 + T(3f)), V2 = −β·L(2f)·Y2 (the second
//!   harmonic fed back and mixed again with the fundamental);
//!
//! so HD2 = |Y2|/|Y1| = |a2|·|V1| / (2·|a1|·|1 + T(2f)|) and
//! HD3 = |V1|²·|a3/4 − a2²·β·L(2f)/(2·(1 + T(2f)))| / (|a1|·|1 + T(3f)|).
//! At f → 0 (L = 1) these are exactly the static results of
//! [`super::feedback_distortion`] (b2 = a2/D³, b3 = (a3·D − 2·a2²·β)/D⁵).
//!
//! Validity: small amplitudes (the closed loop's own compression and the DC shift
//! are left out, as in the static series); the nonlinearity after the pole. A
//! nonlinearity before the pole (an input stage) sees the error signal and has its
//! harmonics filtered by the pole as well; it is not this model. The simpler
//! quasi-static reading (every harmonic divided by |1 + T(f)| at the fundamental)
//! overstates the correction of the harmonics when 2f and 3f lie above f_p.
//!
//! Source: the harmonic-input (Volterra) treatment of a weakly nonlinear feedback
//! loop, e.g. P. Wambacq & W. Sansen, *Distortion Analysis of Analog Integrated
//! Circuits*, 1998, ch. 6–7 (from memory); checked against a time-domain solution
//! of the loop by `tests/reference/distortion_frequency.py` (scipy).

use super::leading_order::{AmplitudeAt, Distortion};
use super::series::{closed_loop_series, return_difference, PowerSeries};
use crate::check;
use crate::error::Result;
use num_complex::Complex64;

/// The loop gain at one frequency, as magnitude and phase.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct LoopGainAt {
    /// Frequency, Hz.
    pub frequency_hz: f64,
    /// |T|.
    pub magnitude: f64,
    /// ∠T, degrees in (−180, 180].
    pub phase_deg: f64,
}

impl LoopGainAt {
    fn new(frequency_hz: f64, t: Complex64) -> LoopGainAt {
        LoopGainAt {
            frequency_hz,
            magnitude: t.norm(),
            phase_deg: t.arg().to_degrees(),
        }
    }
}

/// Open- and closed-loop distortion at a signal frequency, with the loop gains used.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct FrequencyDistortion {
    /// The signal frequency, Hz.
    pub frequency_hz: f64,
    /// The amplifier's dominant pole, Hz.
    pub pole_hz: f64,
    /// The loop gain at DC, a1·β.
    pub dc_loop_gain: f64,
    /// The loop gain at f, 2f and 3f.
    pub loop_gains: [LoopGainAt; 3],
    /// Which amplitude the figures are quoted at.
    pub amplitude_at: AmplitudeAt,
    /// The amplifier alone at the amplitude (at f: driven at its input, the pole
    /// section's gain |L(f)| comes first).
    pub open: Distortion,
    /// In the loop at the same amplitude, at f.
    pub closed: Distortion,
    /// In the loop at the same amplitude with the DC loop gain (the static series):
    /// what the result would be below the pole.
    pub closed_at_dc: Distortion,
    /// HD2 closed / HD2 open; `None` when the open-loop HD2 is zero.
    pub hd2_ratio: Option<f64>,
    /// HD3 closed / HD3 open; `None` when the open-loop HD3 is zero.
    pub hd3_ratio: Option<f64>,
}

/// L(jf) = 1/(1 + j·f/f_p).
fn pole_section(f: f64, pole_hz: f64) -> Complex64 {
    Complex64::new(1.0, 0.0) / Complex64::new(1.0, f / pole_hz)
}

/// HD2 and HD3 of the amplifier with and without feedback at a signal frequency,
/// the loop gain taken at f, 2f and 3f (model and formulas in the module doc).
///
/// `pole_hz` is the amplifier's dominant pole and `frequency_hz` the signal
/// frequency (Hz; 0 gives the static result); `amplitude` is a peak at the
/// `at` port.
///
/// # Errors
/// `beta` as [`super::closed_loop_series`] (D = 1 + a1·β must be positive: a
/// latching loop is refused); `pole_hz` not finite or ≤ 0; `frequency_hz` not
/// finite or < 0; `amplitude` not finite or ≤ 0; [`crate::Error::Overflow`].
///
/// # Example
/// ```
/// use loopwright::distortion::{feedback_distortion_at, AmplitudeAt, PowerSeries};
/// // a1 = 416.7k, β = 0.01: DC loop gain 4167, dominant pole 12 Hz.
/// let amp = PowerSeries::new(4.167e5, 1e8, -2e12).unwrap();
/// let r = feedback_distortion_at(&amp, 0.01, 12.0, 1e3, 1.0, AmplitudeAt::Output).unwrap();
/// // At 1 kHz the loop gain is about 50, not 4167.
/// assert!((r.loop_gains[0].magnitude - 50.0).abs() < 0.05);
/// assert!(r.closed.hd2 > 40.0 * r.closed_at_dc.hd2);
/// assert_eq!(feedback_distortion_at(&amp, 0.01, 0.0, 1e3, 1.0, AmplitudeAt::Output).unwrap_err().param(), "pole_hz");
/// ```
pub fn feedback_distortion_at(
    open: &PowerSeries,
    beta: f64,
    pole_hz: f64,
    frequency_hz: f64,
    amplitude: f64,
    at: AmplitudeAt,
) -> Result<FrequencyDistortion> {
    let d0 = return_difference(open, beta)?;
    let pole_hz = check::positive("pole_hz", pole_hz)?;
    let f = check::non_negative("frequency_hz", frequency_hz)?;
    let amplitude = check::positive("amplitude", amplitude)?;
    let (a1, a2, a3) = (open.a1, open.a2, open.a3);
    let t0 = d0 - 1.0;
    let l = [1.0, 2.0, 3.0].map(|k| pole_section(k * f, pole_hz));
    let t = l.map(|lk| lk * t0);
    let one = Complex64::new(1.0, 0.0);
    // |V1| from the amplitude: at the output Y = |a1|·|V1|; at the input
    // V1 = L(f)·X/(1 + T(f)).
    let v1 = match at {
        AmplitudeAt::Output => amplitude / libm::fabs(a1),
        AmplitudeAt::Input => amplitude * (l[0] / (one + t[0])).norm(),
    };
    let v1 = check::result("input_amplitude", v1)?;
    let y1 = libm::fabs(a1) * v1;
    let x = check::result(
        "input_amplitude",
        y1 * (one + t[0]).norm() / (libm::fabs(a1) * l[0].norm()),
    )?;
    let hd2 = libm::fabs(a2) * v1 / (2.0 * libm::fabs(a1) * (one + t[1]).norm());
    let mix = Complex64::new(a3 / 4.0, 0.0) - l[1] * (a2 * a2 * beta) / ((one + t[1]) * 2.0);
    let hd3 = v1 * v1 * mix.norm() / (libm::fabs(a1) * (one + t[2]).norm());
    let closed = Distortion {
        input_amplitude: x,
        output_amplitude: check::result("output_amplitude", y1)?,
        hd2: check::result("hd2", hd2)?,
        hd3: check::result("hd3", hd3)?,
    };
    // The amplifier alone: memoryless series after |L(f)|.
    let v_open = match at {
        AmplitudeAt::Output => v1,
        AmplitudeAt::Input => amplitude * l[0].norm(),
    };
    let open_d = Distortion {
        input_amplitude: match at {
            AmplitudeAt::Output => check::result("input_amplitude", v_open / l[0].norm())?,
            AmplitudeAt::Input => amplitude,
        },
        output_amplitude: check::result("output_amplitude", libm::fabs(a1) * v_open)?,
        hd2: check::result("hd2", libm::fabs(a2) * v_open / (2.0 * libm::fabs(a1)))?,
        hd3: check::result(
            "hd3",
            libm::fabs(a3) * v_open * v_open / (4.0 * libm::fabs(a1)),
        )?,
    };
    let static_series = closed_loop_series(open, beta)?;
    let closed_at_dc = super::harmonic_distortion(&static_series, amplitude, at)?;
    let ratio = |c: f64, o: f64| (o > 0.0).then(|| c / o).filter(|r| r.is_finite());
    Ok(FrequencyDistortion {
        frequency_hz: f,
        pole_hz,
        dc_loop_gain: t0,
        loop_gains: [0, 1, 2].map(|k| LoopGainAt::new((k + 1) as f64 * f, t[k])),
        amplitude_at: at,
        open: open_d,
        closed,
        closed_at_dc,
        hd2_ratio: ratio(closed.hd2, open_d.hd2),
        hd3_ratio: ratio(closed.hd3, open_d.hd3),
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::distortion::feedback_distortion;

    #[test]
    fn zero_frequency_is_the_static_series() {
        // Identity: L = 1 gives b2 = a2/D³ and b3 = (a3·D − 2·a2²·β)/D⁵.
        let amp = PowerSeries::new(2e4, 3e5, -4e7).unwrap();
        for at in [AmplitudeAt::Output, AmplitudeAt::Input] {
            let r = feedback_distortion_at(&amp, 0.002, 30.0, 0.0, 0.3, at).unwrap();
            let s = feedback_distortion(&amp, 0.002, 0.3, at).unwrap();
            for (x, y) in [
                (r.closed.hd2, s.closed.hd2),
                (r.closed.hd3, s.closed.hd3),
                (r.open.hd2, s.open.hd2),
                (r.closed.input_amplitude, s.closed.input_amplitude),
            ] {
                assert!((x / y - 1.0).abs() < 1e-13, "{at:?}: {x} vs {y}");
            }
        }
    }

    #[test]
    fn bad_inputs_are_named() {
        let amp = PowerSeries::new(1e3, 1.0, 1.0).unwrap();
        let e = |beta: f64, p: f64, f: f64, a: f64| {
            feedback_distortion_at(&amp, beta, p, f, a, AmplitudeAt::Output)
                .unwrap_err()
                .param()
        };
        assert_eq!(e(0.01, f64::NAN, 1e3, 1.0), "pole_hz");
        assert_eq!(e(0.01, 10.0, -1.0, 1.0), "frequency_hz");
        assert_eq!(e(0.01, 10.0, 1e3, 0.0), "amplitude");
        // Loop gain −10: latching, refused by the shared classification.
        assert_eq!(e(-0.01, 10.0, 1e3, 1.0), "beta");
    }
}
