//! Noise of a non-inverting or inverting op-amp stage at low frequency: every
//! source referred to the output through its ideal gain, the noise gain, and the
//! input-referred density.
//!
//! Both stages are the same circuit as far as noise goes: a resistor R_p at the
//! non-inverting input (the source resistance of a non-inverting stage, or the
//! bias-balance resistor of an inverting one), a resistor R_g from the inverting
//! input to ground (for an inverting stage, its input resistor plus the source
//! resistance), and R_f from output to the inverting input. With noise gain
//! NG = 1 + R_f/R_g, each uncorrelated source reaches the output as
//!
//! | source | output density |
//! |---|---|
//! | thermal noise of R_f | √(4kT·R_f) |
//! | thermal noise of R_g | √(4kT·R_g) · R_f/R_g |
//! | thermal noise of R_p | √(4kT·R_p) · NG |
//! | amplifier voltage noise | e_n(f) · NG |
//! | current noise into R_p | i_n(f) · R_p · NG |
//! | current noise at the inverting input | i_n(f) · R_f |
//!
//! and the total is their root sum of squares. The signal gain is NG for the
//! non-inverting stage and −R_f/R_g for the inverting one; the input-referred
//! density is the output density divided by |signal gain|. Above the closed-loop
//! bandwidth every term rolls off by the same |H(f)| ([`super::ClosedLoopResponse`]).
//!
//! Source: the standard op-amp noise model, e.g. Motchenbacher & Connelly,
//! *Low-Noise Electronic System Design*, 1993, and Analog Devices, *Op Amp
//! Applications Handbook*, 2005, ch. 1 (from memory).

use super::amplifier::AmplifierNoise;
use super::thermal::BOLTZMANN;
use crate::check;
use crate::error::{Error, Result};

/// Which op-amp stage.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "kebab-case"))]
pub enum StageKind {
    /// Signal into the non-inverting input; gain 1 + R_f/R_g.
    NonInverting,
    /// Signal through R_g into the inverting input; gain −R_f/R_g.
    Inverting,
}

impl core::str::FromStr for StageKind {
    type Err = Error;
    /// `non-inverting` (also `noninverting`) or `inverting`, ASCII case ignored.
    fn from_str(s: &str) -> Result<Self> {
        if s.eq_ignore_ascii_case("non-inverting") || s.eq_ignore_ascii_case("noninverting") {
            Ok(StageKind::NonInverting)
        } else if s.eq_ignore_ascii_case("inverting") {
            Ok(StageKind::Inverting)
        } else {
            Err(Error::UnknownName {
                param: "kind",
                expected: "non-inverting, inverting",
            })
        }
    }
}

/// An op-amp stage with its resistors and temperature.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Stage {
    /// Non-inverting or inverting.
    pub kind: StageKind,
    /// R_f, output to inverting input, Ω.
    pub r_feedback: f64,
    /// R_g, inverting input to ground (inverting stage: input resistor plus
    /// source resistance), Ω.
    pub r_gain: f64,
    /// R_p, resistance seen by the non-inverting input, Ω (0 allowed).
    pub r_plus: f64,
    /// Temperature of the resistors, K.
    pub temperature_k: f64,
}

impl Stage {
    /// A checked stage.
    ///
    /// # Errors
    /// Non-finite values; `r_gain` ≤ 0; `r_feedback` < 0 (and 0 for an inverting
    /// stage, which would have no gain); `r_plus` < 0; `temperature_k` ≤ 0.
    ///
    /// # Example
    /// ```
    /// use loopwright::noise::{Stage, StageKind};
    /// let s = Stage::new(StageKind::NonInverting, 9e3, 1e3, 50.0, 300.0).unwrap();
    /// assert_eq!(s.noise_gain(), 10.0);
    /// assert_eq!(Stage::new(StageKind::Inverting, 0.0, 1e3, 0.0, 300.0).unwrap_err().param(), "r_feedback");
    /// ```
    pub fn new(
        kind: StageKind,
        r_feedback: f64,
        r_gain: f64,
        r_plus: f64,
        temperature_k: f64,
    ) -> Result<Self> {
        let r_feedback = match kind {
            StageKind::NonInverting => check::non_negative("r_feedback", r_feedback)?,
            StageKind::Inverting => check::positive("r_feedback", r_feedback)?,
        };
        Ok(Stage {
            kind,
            r_feedback,
            r_gain: check::positive("r_gain", r_gain)?,
            r_plus: check::non_negative("r_plus", r_plus)?,
            temperature_k: check::positive("temperature_k", temperature_k)?,
        })
    }

    /// Noise gain NG = 1 + R_f/R_g = 1/β, V/V.
    pub fn noise_gain(&self) -> f64 {
        1.0 + self.r_feedback / self.r_gain
    }

    /// Signal gain: NG (non-inverting) or −R_f/R_g (inverting), V/V.
    pub fn signal_gain(&self) -> f64 {
        match self.kind {
            StageKind::NonInverting => self.noise_gain(),
            StageKind::Inverting => -self.r_feedback / self.r_gain,
        }
    }
}

/// Output-referred noise densities of each source at one frequency, before the
/// closed-loop roll-off, V/√Hz.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct NoiseContributions {
    /// Frequency, Hz.
    pub frequency_hz: f64,
    /// Noise gain NG.
    pub noise_gain: f64,
    /// Signal gain.
    pub signal_gain: f64,
    /// Thermal noise of R_f.
    pub r_feedback: f64,
    /// Thermal noise of R_g.
    pub r_gain: f64,
    /// Thermal noise of R_p.
    pub r_plus: f64,
    /// Amplifier voltage noise.
    pub amplifier_voltage: f64,
    /// Amplifier current noise through R_p.
    pub amplifier_current_plus: f64,
    /// Amplifier current noise at the inverting input, through R_f.
    pub amplifier_current_minus: f64,
    /// Root sum of squares of the above.
    pub total: f64,
    /// Total divided by |signal gain|: the density at the signal input.
    pub input_referred: f64,
}

/// The squared output densities (V²/Hz) of the six sources, in the order of
/// [`NoiseContributions`].
pub(crate) fn output_psd_terms(stage: &Stage, amp: &AmplifierNoise, f: f64) -> [f64; 6] {
    let four_kt = 4.0 * BOLTZMANN * stage.temperature_k;
    let ng = stage.noise_gain();
    let ng2 = ng * ng;
    let ratio = stage.r_feedback / stage.r_gain;
    let en2 = amp.voltage_psd_at(f);
    let in2 = amp.current_psd_at(f);
    [
        four_kt * stage.r_feedback,
        four_kt * stage.r_gain * ratio * ratio,
        four_kt * stage.r_plus * ng2,
        en2 * ng2,
        in2 * stage.r_plus * stage.r_plus * ng2,
        in2 * stage.r_feedback * stage.r_feedback,
    ]
}

/// Total output noise PSD before the closed-loop roll-off, V²/Hz.
pub(crate) fn output_psd(stage: &Stage, amp: &AmplifierNoise, f: f64) -> f64 {
    output_psd_terms(stage, amp, f).iter().sum()
}

/// Checks a density frequency: finite and positive (zero only without 1/f parts).
pub(crate) fn density_frequency(amp: &AmplifierNoise, frequency_hz: f64) -> Result<f64> {
    let f = check::non_negative("frequency_hz", frequency_hz)?;
    if f == 0.0 && amp.has_flicker() {
        return Err(Error::OutOfDomain {
            param: "frequency_hz",
            requirement: "must be greater than zero when a 1/f corner is set",
        });
    }
    Ok(f)
}

/// Each source's output noise density at `frequency_hz` in the flat part of the
/// closed-loop response (see the module table), their total and the
/// input-referred density.
///
/// # Errors
/// `frequency_hz` not finite or negative, or zero with a 1/f corner set.
///
/// # Example
/// ```
/// use loopwright::noise::{noise_contributions, AmplifierNoise, Stage, StageKind};
/// // Gain-of-10 stage, 9 kΩ/1 kΩ, with a noiseless amplifier: only R_f and R_g.
/// let s = Stage::new(StageKind::NonInverting, 9e3, 1e3, 0.0, 300.0).unwrap();
/// let n = noise_contributions(&s, &AmplifierNoise::new(0.0, 0.0, 0.0, 0.0).unwrap(), 1e3).unwrap();
/// assert!((n.total - (n.r_feedback.powi(2) + n.r_gain.powi(2)).sqrt()).abs() < 1e-24);
/// assert!(noise_contributions(&s, &AmplifierNoise::new(0.0, 0.0, 0.0, 0.0).unwrap(), -1.0).is_err());
/// ```
pub fn noise_contributions(
    stage: &Stage,
    amp: &AmplifierNoise,
    frequency_hz: f64,
) -> Result<NoiseContributions> {
    let f = density_frequency(amp, frequency_hz)?;
    let t = output_psd_terms(stage, amp, f);
    let total = crate::float::sqrt(t.iter().sum());
    let signal_gain = stage.signal_gain();
    Ok(NoiseContributions {
        frequency_hz: f,
        noise_gain: stage.noise_gain(),
        signal_gain,
        r_feedback: crate::float::sqrt(t[0]),
        r_gain: crate::float::sqrt(t[1]),
        r_plus: crate::float::sqrt(t[2]),
        amplifier_voltage: crate::float::sqrt(t[3]),
        amplifier_current_plus: crate::float::sqrt(t[4]),
        amplifier_current_minus: crate::float::sqrt(t[5]),
        total: check::result("total", total)?,
        input_referred: check::result("input_referred", total / libm::fabs(signal_gain))?,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::noise::thermal::thermal_noise_density;

    #[test]
    fn follower_sees_only_the_amplifier_and_the_source() {
        // R_f = 0: NG = 1, R_g's noise is shorted by the output.
        let s = Stage::new(StageKind::NonInverting, 0.0, 1e4, 1e3, 300.0).unwrap();
        let amp = AmplifierNoise::new(5e-9, 0.0, 1e-12, 0.0).unwrap();
        let n = noise_contributions(&s, &amp, 1e3).unwrap();
        assert_eq!((n.noise_gain, n.r_feedback, n.r_gain), (1.0, 0.0, 0.0));
        let expected =
            (25e-18 + thermal_noise_density(1e3, 300.0).unwrap().powi(2) + 1e-24 * 1e6).sqrt();
        assert!((n.total / expected - 1.0).abs() < 1e-14);
        assert!((n.input_referred - n.total).abs() < 1e-30);
    }

    #[test]
    fn inverting_stage_has_the_same_output_noise_but_less_signal_gain() {
        // Same resistors: same noise circuit, signal gain −R_f/R_g instead of NG.
        let amp = AmplifierNoise::new(8e-9, 20.0, 0.4e-12, 100.0).unwrap();
        let ni = Stage::new(StageKind::NonInverting, 20e3, 2e3, 1e3, 295.0).unwrap();
        let inv = Stage {
            kind: StageKind::Inverting,
            ..ni
        };
        let a = noise_contributions(&ni, &amp, 50.0).unwrap();
        let b = noise_contributions(&inv, &amp, 50.0).unwrap();
        assert_eq!(a.total, b.total);
        assert_eq!(b.signal_gain, -10.0);
        assert!((b.input_referred / a.input_referred - 11.0 / 10.0).abs() < 1e-14);
    }

    #[test]
    fn resistor_terms_are_4ktr_times_their_gains() {
        // Common practice, no source: R_g's noise reaches the output with gain
        // R_f/R_g, R_p's with NG, R_f's with 1.
        let s = Stage::new(StageKind::NonInverting, 99e3, 1e3, 10e3, 300.0).unwrap();
        let amp = AmplifierNoise::new(0.0, 0.0, 0.0, 0.0).unwrap();
        let n = noise_contributions(&s, &amp, 1.0).unwrap();
        let e = |r: f64| thermal_noise_density(r, 300.0).unwrap();
        assert!((n.r_feedback / e(99e3) - 1.0).abs() < 1e-14);
        assert!((n.r_gain / (e(1e3) * 99.0) - 1.0).abs() < 1e-14);
        assert!((n.r_plus / (e(10e3) * 100.0) - 1.0).abs() < 1e-14);
    }

    #[test]
    fn bad_inputs_are_named() {
        assert_eq!(
            Stage::new(StageKind::NonInverting, 1e3, 0.0, 0.0, 300.0)
                .unwrap_err()
                .param(),
            "r_gain"
        );
        assert_eq!(
            Stage::new(StageKind::NonInverting, 1e3, 1e3, -1.0, 300.0)
                .unwrap_err()
                .param(),
            "r_plus"
        );
        assert_eq!(
            Stage::new(StageKind::NonInverting, 1e3, 1e3, 0.0, -3.0)
                .unwrap_err()
                .param(),
            "temperature_k"
        );
        assert_eq!(
            "buffer".parse::<StageKind>().unwrap_err().code(),
            "unknown_name"
        );
        let s = Stage::new(StageKind::NonInverting, 1e3, 1e3, 0.0, 300.0).unwrap();
        let amp = AmplifierNoise::new(1e-9, 10.0, 0.0, 0.0).unwrap();
        assert_eq!(
            noise_contributions(&s, &amp, 0.0).unwrap_err().param(),
            "frequency_hz"
        );
    }
}
