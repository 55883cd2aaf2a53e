//! Harmonic distortion HD2 and HD3 of a power-series amplifier, open loop and
//! closed loop, at a given input or output amplitude.
//!
//! For y = a1·x + a2·x² + a3·x³ driven by x = X·cos ωt, the harmonics are
//! a2·X²/2 at 2ω and a3·X³/4 at 3ω, so to leading order in the amplitude
//!
//! - HD2 = |a2|·X / (2·|a1|)   = |a2|·Y / (2·a1²)
//! - HD3 = |a3|·X² / (4·|a1|)  = |a3|·Y² / (4·|a1|³)
//!
//! with X the input and Y ≈ |a1|·X the output amplitude (peak). The same formulas
//! applied to the closed-loop series b1, b2, b3 ([`super::closed_loop_series`]) give
//! the closed-loop distortion. At the same output amplitude HD2 falls by D = 1 + a1·β,
//! but HD3 by D / (1 − 2·a2²·β/(a3·D)): the fed-back second order adds third order.
//!
//! These are the leading-order (small-amplitude) values; the fundamental's own
//! compression (3·a3·X³/4) and higher-order terms of the closed loop are left out.
//! [`super::closed_loop_spectrum`] gives the full numeric answer.
//!
//! Source: Gray, Hurst, Lewis & Meyer, *Analysis and Design of Analog Integrated
//! Circuits*, 5th ed., ch. 5 (HD2, HD3 of a power series) and ch. 8 (feedback and
//! distortion) (from memory).

use super::series::{closed_loop_series, return_difference, PowerSeries};
use crate::check;
use crate::error::{Error, Result};

/// Which amplitude a distortion figure is quoted at.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "lowercase"))]
pub enum AmplitudeAt {
    /// The peak input amplitude X.
    Input,
    /// The peak output amplitude Y (of the fundamental, to leading order |a1|·X).
    Output,
}

impl core::str::FromStr for AmplitudeAt {
    type Err = Error;
    /// `input` or `output` (ASCII case ignored).
    fn from_str(s: &str) -> Result<Self> {
        if s.eq_ignore_ascii_case("input") {
            Ok(AmplitudeAt::Input)
        } else if s.eq_ignore_ascii_case("output") {
            Ok(AmplitudeAt::Output)
        } else {
            Err(Error::UnknownName {
                param: "amplitude_at",
                expected: "input, output",
            })
        }
    }
}

/// Leading-order distortion of one power series at one amplitude.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Distortion {
    /// Peak input amplitude X.
    pub input_amplitude: f64,
    /// Peak output amplitude of the fundamental, |a1|·X.
    pub output_amplitude: f64,
    /// Second-harmonic distortion, a fraction of the fundamental.
    pub hd2: f64,
    /// Third-harmonic distortion, a fraction of the fundamental.
    pub hd3: f64,
}

fn input_amplitude(series: &PowerSeries, amplitude: f64, at: AmplitudeAt) -> Result<f64> {
    let amplitude = check::positive("amplitude", amplitude)?;
    match at {
        AmplitudeAt::Input => Ok(amplitude),
        AmplitudeAt::Output => check::result("input_amplitude", amplitude / libm::fabs(series.a1)),
    }
}

/// HD2 and HD3 of `series` at a peak `amplitude` quoted at the input or output.
///
/// HD2 = |a2|·X/(2·|a1|), HD3 = |a3|·X²/(4·|a1|), X the input amplitude (from an
/// output amplitude Y, X = Y/|a1|). Fractions, not %; amplitude in the series'
/// input (or output) unit, peak.
///
/// # Errors
/// `amplitude` not finite or not greater than zero; [`Error::Overflow`].
///
/// # Example
/// ```
/// use loopwright::distortion::{harmonic_distortion, AmplitudeAt, PowerSeries};
/// let amp = PowerSeries::new(100.0, 20.0, -40.0).unwrap();
/// let d = harmonic_distortion(&amp, 0.01, AmplitudeAt::Input).unwrap();
/// assert!((d.hd2 - 0.001).abs() < 1e-15 && (d.hd3 - 1e-5).abs() < 1e-18);
/// assert_eq!(harmonic_distortion(&amp, -1.0, AmplitudeAt::Input).unwrap_err().param(), "amplitude");
/// ```
pub fn harmonic_distortion(
    series: &PowerSeries,
    amplitude: f64,
    at: AmplitudeAt,
) -> Result<Distortion> {
    let x = input_amplitude(series, amplitude, at)?;
    let a1 = libm::fabs(series.a1);
    Ok(Distortion {
        input_amplitude: x,
        output_amplitude: check::result("output_amplitude", a1 * x)?,
        hd2: check::result("hd2", libm::fabs(series.a2) * x / (2.0 * a1))?,
        hd3: check::result("hd3", libm::fabs(series.a3) * x * x / (4.0 * a1))?,
    })
}

/// The power series whose leading-order HD2 and HD3 at an amplitude are the
/// measured ones.
///
/// a2 = 2·HD2·a1/X, a3 = 4·HD3·a1/X² with X the input amplitude (from an output
/// amplitude Y, X = Y/|a1|). `hd2` and `hd3` are fractions carrying the signs of
/// a2/a1 and a3/a1 (a measurement gives only the size; a negative `hd3` is the
/// usual compressive curve).
///
/// # Errors
/// `a1` zero or not finite; `hd2`, `hd3` not finite; `amplitude` not positive.
///
/// # Example
/// ```
/// use loopwright::distortion::{series_from_distortion, AmplitudeAt};
/// // 1 % HD2 and −0.1 % HD3 at 1 V out of a gain of 10.
/// let s = series_from_distortion(10.0, 0.01, -0.001, 1.0, AmplitudeAt::Output).unwrap();
/// assert!((s.a2 - 2.0).abs() < 1e-12 && (s.a3 + 4.0).abs() < 1e-12);
/// assert_eq!(series_from_distortion(10.0, f64::NAN, 0.0, 1.0, AmplitudeAt::Output).unwrap_err().param(), "hd2");
/// ```
pub fn series_from_distortion(
    a1: f64,
    hd2: f64,
    hd3: f64,
    amplitude: f64,
    at: AmplitudeAt,
) -> Result<PowerSeries> {
    let a1 = check::nonzero("a1", a1)?;
    let hd2 = check::finite("hd2", hd2)?;
    let hd3 = check::finite("hd3", hd3)?;
    let linear = PowerSeries {
        a1,
        a2: 0.0,
        a3: 0.0,
    };
    let x = input_amplitude(&linear, amplitude, at)?;
    PowerSeries::new(
        a1,
        check::result("a2", 2.0 * hd2 * a1 / x)?,
        check::result("a3", 4.0 * hd3 * a1 / (x * x))?,
    )
}

/// Open-loop and closed-loop distortion of one amplifier, and what feedback bought.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct FeedbackDistortion {
    /// The closed-loop coefficients b1, b2, b3.
    pub closed_series: PowerSeries,
    /// D = 1 + a1·β.
    pub feedback_amount: f64,
    /// Which amplitude both figures are quoted at.
    pub amplitude_at: AmplitudeAt,
    /// The amplifier alone at the amplitude.
    pub open: Distortion,
    /// The amplifier in the loop at the same amplitude.
    pub closed: Distortion,
    /// HD2 closed / HD2 open; `None` when the open-loop HD2 is zero.
    pub hd2_ratio: Option<f64>,
    /// HD3 closed / HD3 open; `None` when the open-loop HD3 is zero (feedback can
    /// still create third order from second order).
    pub hd3_ratio: Option<f64>,
}

/// HD2 and HD3 with and without feedback at the same input or output amplitude.
///
/// Uses [`closed_loop_series`] and [`harmonic_distortion`]. At the same output
/// amplitude: HD2 ratio = 1/D, HD3 ratio = (1 − 2·a2²·β/(a3·D))/D.
///
/// # Errors
/// As [`closed_loop_series`] and [`harmonic_distortion`].
///
/// # Example
/// ```
/// use loopwright::distortion::{feedback_distortion, AmplitudeAt, PowerSeries};
/// let amp = PowerSeries::new(1000.0, 0.0, -100.0).unwrap();
/// // D = 100, a2 = 0: at the same output both ratios are 1/D.
/// let f = feedback_distortion(&amp, 0.099, 1.0, AmplitudeAt::Output).unwrap();
/// assert!((f.hd3_ratio.unwrap() - 0.01).abs() < 1e-15 && f.hd2_ratio.is_none());
/// assert_eq!(feedback_distortion(&amp, 0.099, 0.0, AmplitudeAt::Output).unwrap_err().param(), "amplitude");
/// ```
pub fn feedback_distortion(
    open: &PowerSeries,
    beta: f64,
    amplitude: f64,
    at: AmplitudeAt,
) -> Result<FeedbackDistortion> {
    let d = return_difference(open, beta)?;
    let closed_series = closed_loop_series(open, beta)?;
    let open_d = harmonic_distortion(open, amplitude, at)?;
    let closed = harmonic_distortion(&closed_series, amplitude, at)?;
    let ratio = |c: f64, o: f64| {
        if o > 0.0 {
            Some(c / o).filter(|r| r.is_finite())
        } else {
            None
        }
    };
    Ok(FeedbackDistortion {
        closed_series,
        feedback_amount: d,
        amplitude_at: at,
        open: open_d,
        closed,
        hd2_ratio: ratio(closed.hd2, open_d.hd2),
        hd3_ratio: ratio(closed.hd3, open_d.hd3),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ratios_at_the_same_output_amplitude_follow_the_text() {
        // Gray, Hurst, Lewis & Meyer, 5th ed., ch. 8 (from memory): at equal output
        // amplitude HD2 falls by D, HD3 by D/(1 − 2·a2²·β/(a3·D)).
        let amp = PowerSeries::new(1000.0, 300.0, -40.0).unwrap();
        let beta = 0.009;
        let d = 1.0 + 1000.0 * beta;
        let f = feedback_distortion(&amp, beta, 0.5, AmplitudeAt::Output).unwrap();
        assert!((f.hd2_ratio.unwrap() * d - 1.0).abs() < 1e-13);
        let expected = (1.0 - 2.0 * 300.0 * 300.0 * beta / (-40.0 * d)) / d;
        assert!((f.hd3_ratio.unwrap() / expected - 1.0).abs() < 1e-13);
        // Here the second order makes the closed-loop HD3 worse than HD3/D.
        assert!(f.hd3_ratio.unwrap() > 1.0 / d);
    }

    #[test]
    fn at_the_same_input_amplitude_hd2_falls_by_d_squared() {
        // Identity from b2/b1 = (a2/a1)/D²: at equal input amplitude HD2 falls by D².
        let amp = PowerSeries::new(200.0, 10.0, 0.0).unwrap();
        let beta = 0.02;
        let d: f64 = 5.0;
        let f = feedback_distortion(&amp, beta, 0.01, AmplitudeAt::Input).unwrap();
        assert!((f.hd2_ratio.unwrap() * d * d - 1.0).abs() < 1e-13);
        // a3 = 0 open loop, yet the loop creates third order.
        assert!(f.hd3_ratio.is_none() && f.closed.hd3 > 0.0);
    }

    #[test]
    fn measured_distortion_round_trips() {
        // Identity: coefficients from HD figures give those figures back.
        let s = series_from_distortion(-50.0, 0.02, -0.003, 0.2, AmplitudeAt::Input).unwrap();
        let d = harmonic_distortion(&s, 0.2, AmplitudeAt::Input).unwrap();
        assert!((d.hd2 - 0.02).abs() < 1e-15 && (d.hd3 - 0.003).abs() < 1e-15);
        let s = series_from_distortion(50.0, 0.02, -0.003, 3.0, AmplitudeAt::Output).unwrap();
        let d = harmonic_distortion(&s, 3.0, AmplitudeAt::Output).unwrap();
        assert!((d.hd2 - 0.02).abs() < 1e-15 && (d.hd3 - 0.003).abs() < 1e-15);
        assert!((d.output_amplitude - 3.0).abs() < 1e-15);
    }

    #[test]
    fn names_parse_and_bad_names_are_typed() {
        assert_eq!("Output".parse::<AmplitudeAt>(), Ok(AmplitudeAt::Output));
        assert_eq!(
            "peak".parse::<AmplitudeAt>().unwrap_err().param(),
            "amplitude_at"
        );
        let amp = PowerSeries::new(10.0, 1.0, 1.0).unwrap();
        assert_eq!(
            harmonic_distortion(&amp, f64::INFINITY, AmplitudeAt::Output)
                .unwrap_err()
                .code(),
            "not_finite"
        );
    }
}
