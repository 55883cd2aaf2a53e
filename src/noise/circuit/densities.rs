//! Noise densities of a circuit over a list of frequencies: the total, every
//! source's contribution and share, the input-referred density, and the noise
//! gain with its peak (the data of a log-scale density plot).
//!
//! Output density √S_out(f), each contribution |H_k(f)|·√S_k(f) (they add in
//! power: Σ contribution² = total²), share_k = contribution²/total², the
//! input-referred density √S_out/|G| (G the signal gain from the input source)
//! and |noise gain|. The peak of the noise gain is its largest magnitude over
//! the given frequencies, with its ratio to the value at the lowest one: the
//! rise of a transimpedance stage's noise gain from 1 towards 1 + Cin/Cf and
//! any peaking near the loop's crossover.

use super::analysis::CircuitNoise;
use super::setup::NoiseSetup;
use super::sources::SourceKind;
use crate::check;
use crate::circuit::{Circuit, CircuitError, CircuitResult};
use crate::error::Error;
use alloc::string::String;
use alloc::vec::Vec;

/// Most frequencies of one density analysis.
pub const MAX_FREQUENCIES: usize = 100_000;

/// One source's output-referred density and share at each frequency.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct SourceDensity {
    /// The source's name (see [`super::NoiseSource::name`]).
    pub name: String,
    /// What it is.
    pub kind: SourceKind,
    /// Its density at the output, V/√Hz (A/√Hz to a current output).
    pub density: Vec<f64>,
    /// Its share of the output power at each frequency, 0…1.
    pub share: Vec<f64>,
}

/// The largest noise gain over the analysed frequencies.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct NoiseGainPeak {
    /// Where, Hz.
    pub frequency_hz: f64,
    /// |noise gain| there.
    pub value: f64,
    /// value / |noise gain| at the lowest analysed frequency.
    pub over_lowest: f64,
}

/// Densities of a circuit over frequency.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct NoiseDensities {
    /// The frequencies, Hz, as given.
    pub frequencies_hz: Vec<f64>,
    /// Total output density, V/√Hz (A/√Hz to a current output).
    pub total: Vec<f64>,
    /// Every source.
    pub sources: Vec<SourceDensity>,
    /// |signal gain| from the input source (empty without one).
    pub signal_gain: Vec<f64>,
    /// Output density over |signal gain| (empty without an input source).
    pub input_referred: Vec<f64>,
    /// |noise gain| of the amplifier (empty without one).
    pub noise_gain: Vec<f64>,
    /// The largest noise gain, if there is an amplifier.
    pub noise_gain_peak: Option<NoiseGainPeak>,
}

/// The noise densities of `circuit` at each of `frequencies_hz` (each > 0).
///
/// # Errors
/// No frequencies or more than [`MAX_FREQUENCIES`] (param `frequencies_hz`); a
/// frequency not finite or not above zero; the setup's faults as
/// [`CircuitNoise::new`]; a signal gain of zero where the input-referred density
/// is asked (`overflow`, param `input_referred`).
///
/// # Example
/// ```
/// use loopwright::circuit::Circuit;
/// use loopwright::noise::circuit::{noise_densities, NoiseSetup};
/// // Two 1 kΩ resistors in parallel at 300 K: the noise of 500 Ω, 2.88 nV/√Hz.
/// let mut c = Circuit::new();
/// c.resistor("R1", "a", "0", 1e3).unwrap();
/// c.resistor("R2", "a", "0", 1e3).unwrap();
/// let d = noise_densities(&c, &NoiseSetup::at_node("a", 300.0), &[1e3]).unwrap();
/// assert!((d.total[0] - (4.0 * 1.380649e-23 * 300.0 * 500.0f64).sqrt()).abs() < 1e-21);
/// let e = noise_densities(&c, &NoiseSetup::at_node("b", 300.0), &[1e3]).unwrap_err();
/// assert_eq!((e.error.param(), e.name.as_str()), ("output", "b"));
/// ```
pub fn noise_densities(
    circuit: &Circuit,
    setup: &NoiseSetup,
    frequencies_hz: &[f64],
) -> CircuitResult<NoiseDensities> {
    if frequencies_hz.is_empty() {
        return Err(CircuitError::from(Error::OutOfDomain {
            param: "frequencies_hz",
            requirement: "must hold at least one frequency",
        }));
    }
    if frequencies_hz.len() > MAX_FREQUENCIES {
        return Err(CircuitError::from(Error::TooLarge {
            param: "frequencies_hz",
            limit: MAX_FREQUENCIES as u64,
        }));
    }
    let mut analysis = CircuitNoise::new(circuit, setup)?;
    let n = frequencies_hz.len();
    let mut out = NoiseDensities {
        frequencies_hz: frequencies_hz.to_vec(),
        total: Vec::with_capacity(n),
        sources: analysis
            .sources()
            .iter()
            .map(|s| SourceDensity {
                name: s.name.clone(),
                kind: s.kind,
                density: Vec::with_capacity(n),
                share: Vec::with_capacity(n),
            })
            .collect(),
        signal_gain: Vec::new(),
        input_referred: Vec::new(),
        noise_gain: Vec::new(),
        noise_gain_peak: None,
    };
    for &f in frequencies_hz {
        let p = analysis.at(f)?;
        let total = crate::float::sqrt(p.total_psd);
        out.total.push(total);
        for (s, &psd) in out.sources.iter_mut().zip(&p.source_psd) {
            s.density.push(crate::float::sqrt(psd));
            s.share.push(if p.total_psd > 0.0 {
                psd / p.total_psd
            } else {
                0.0
            });
        }
        if let Some(g) = p.signal_gain {
            out.signal_gain.push(g.norm());
            out.input_referred
                .push(check::result("input_referred", total / g.norm())?);
        }
        if let Some(g) = p.noise_gain {
            out.noise_gain.push(g.norm());
        }
    }
    out.noise_gain_peak = peak(&out.frequencies_hz, &out.noise_gain);
    Ok(out)
}

fn peak(frequencies: &[f64], gain: &[f64]) -> Option<NoiseGainPeak> {
    let first = *gain.first()?;
    let (k, &value) =
        gain.iter()
            .enumerate()
            .fold((0, &first), |best, x| if x.1 > best.1 { x } else { best });
    let lowest = frequencies
        .iter()
        .zip(gain)
        .fold(
            (f64::INFINITY, first),
            |a, (&f, &g)| if f < a.0 { (f, g) } else { a },
        )
        .1;
    Some(NoiseGainPeak {
        frequency_hz: frequencies.get(k).copied().unwrap_or_default(),
        value,
        over_lowest: if lowest > 0.0 { value / lowest } else { 0.0 },
    })
}
