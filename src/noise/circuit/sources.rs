//! The noise sources of a circuit and where each one enters the nodal equations.
//!
//! Every source is uncorrelated with every other and is described by its power
//! spectral density S(f) and its place in the right-hand side of the nodal
//! system M·x = b:
//!
//! | source | S(f) | enters |
//! |---|---|---|
//! | resistor R (Johnson–Nyquist) | 4·k·T/R, A²/Hz | a current from node a to node b, in parallel with R |
//! | admittance with Re Y = G > 0 | 4·k·T·G, A²/Hz | the same, in parallel with it |
//! | amplifier voltage noise `en` | e²·(1 + fc/f), V²/Hz | in series with the + input of the gain block: the row of the first state, (1 + s·τp)·x − A0·(V(+) + e − V(−)) = 0, gets A0·e |
//! | amplifier current noise `in+`, `in−` | i²·(1 + fc/f), A²/Hz each | a current from each input pin to ground |
//! | a current source given a density (option) | i²·(1 + fc/f), A²/Hz | a current from its node a to its node b |
//! | a current source as shot noise (option) | 2·q·\|I\|, A²/Hz | the same, I its value |
//!
//! The model's current noise is "per input" (`docs/circuit.md`): the one figure
//! is applied to each input as two sources of that density, uncorrelated with
//! each other. The voltage noise sits behind the input parts (Rd, Cd, Rcm, Ccm
//! see the pin voltages, the gain block sees the pins plus e): it is the
//! amplifier's own noise referred to its input, the datasheet's e_n.
//! Capacitors, inductors, controlled sources and the amplifier's Ro, Rd, Rcm
//! are noiseless; independent sources are zero (a voltage source is a short,
//! a current source open) apart from the noise given to a current source.
//! Every resistor is at the one stated temperature, at its nominal value.
//!
//! Sources: k = 1.380649e-23 J/K and q = 1.602176634e-19 C, exact in the 2019
//! SI (BIPM, *The International System of Units*, 9th ed., 2019); thermal
//! noise: H. Nyquist, Phys. Rev. 32, 1928; shot noise 2qI: W. Schottky, 1918
//! (both from memory); the amplifier's densities with 1/f corners:
//! [`crate::stage::NoiseDensity`].

use super::setup::{CurrentSourceNoise, SourceNoiseKind};
use crate::check;
use crate::circuit::mna::Layout;
use crate::circuit::{Circuit, CircuitError, CircuitResult, Control, ElementKind, Name};
use crate::error::Error;
use crate::noise::thermal::BOLTZMANN;
use crate::stage::NoiseDensity;
use alloc::string::String;
use alloc::vec::Vec;

/// The elementary charge, C, exact by definition of the SI (2019).
pub const ELEMENTARY_CHARGE: f64 = 1.602_176_634e-19;

/// What kind of source a contribution comes from.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "kebab-case"))]
pub enum SourceKind {
    /// Thermal noise of a resistor or of an admittance's real part.
    Thermal,
    /// An amplifier's input voltage noise.
    AmplifierVoltage,
    /// An amplifier's current noise at one input.
    AmplifierCurrent,
    /// The noise given to a current source (a density or shot noise).
    CurrentSource,
}

/// Where a source enters the right-hand side: its output transfer is
/// `scale·(z[plus] − z[minus])` for the adjoint solution z (a `None` index is
/// ground, contributing 0).
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct Injection {
    pub plus: Option<usize>,
    pub minus: Option<usize>,
    pub scale: f64,
}

/// One noise source.
#[derive(Debug, Clone, PartialEq)]
pub struct NoiseSource {
    /// Its name: the element's name, or `U1.en`, `U1.in+`, `U1.in-` for an
    /// amplifier's voltage noise and the current noise of each input.
    pub name: String,
    /// What it is.
    pub kind: SourceKind,
    /// The white density (A/√Hz or V/√Hz) and its 1/f corner.
    pub density: NoiseDensity,
    pub(crate) injection: Injection,
}

impl NoiseSource {
    /// Its power spectral density at `f_hz` > 0: d²·(1 + fc/f), A²/Hz or V²/Hz.
    pub fn psd_at(&self, f_hz: f64) -> f64 {
        let d = self.density.density;
        if self.density.corner_hz == 0.0 {
            d * d
        } else {
            d * d * (1.0 + self.density.corner_hz / f_hz)
        }
    }
}

/// Row of node `k` (ground has none).
fn row(node: usize) -> Option<usize> {
    node.checked_sub(1)
}

fn named(name: Name, suffix: &str) -> String {
    let mut s = String::from(name.as_str());
    s.push_str(suffix);
    s
}

/// A current from node a to node b: b gets +i, a gets −i.
fn current(a: usize, b: usize) -> Injection {
    Injection {
        plus: row(b),
        minus: row(a),
        scale: 1.0,
    }
}

/// Every noise source of the circuit at `temperature_k`, with the noise given to
/// current sources.
///
/// # Errors
/// `temperature_k` not greater than zero; a `current_noise` entry naming no
/// element (`unknown_name`) or an element that is not a current source, or
/// twice; a negative density or corner (param `current_noise`, naming it).
pub(crate) fn collect(
    c: &Circuit,
    lay: &Layout,
    temperature_k: f64,
    extra: &[CurrentSourceNoise],
) -> CircuitResult<Vec<NoiseSource>> {
    let t = check::positive("temperature_k", temperature_k)?;
    let four_kt = 4.0 * BOLTZMANN * t;
    let mut out = Vec::new();
    for (i, e) in c.elements().iter().enumerate() {
        let [a, b] = e.nodes();
        let thermal = |g: f64| NoiseSource {
            name: String::from(e.name().as_str()),
            kind: SourceKind::Thermal,
            density: NoiseDensity {
                density: crate::float::sqrt(four_kt * g),
                corner_hz: 0.0,
            },
            injection: current(a, b),
        };
        match e.kind() {
            ElementKind::Resistor => out.push(thermal(1.0 / e.value())),
            ElementKind::Admittance if e.value() > 0.0 => out.push(thermal(e.value())),
            ElementKind::Amplifier => {
                if let (Some(part), Control::Nodes([p, n]), Some(first)) = (
                    e.amplifier(),
                    e.control(),
                    lay.internal.get(i).copied().flatten(),
                ) {
                    amplifier_sources(e.name(), part, [p, n], first, &mut out);
                }
            }
            _ => {}
        }
    }
    for (k, x) in extra.iter().enumerate() {
        out.push(current_source_noise(c, x, &extra[..k])?);
    }
    Ok(out)
}

fn amplifier_sources(
    name: Name,
    part: &crate::circuit::AmplifierPart,
    [p, n]: [usize; 2],
    first: usize,
    out: &mut Vec<NoiseSource>,
) {
    let m = &part.model;
    if let Some(d) = m.voltage_noise {
        out.push(NoiseSource {
            name: named(name, ".en"),
            kind: SourceKind::AmplifierVoltage,
            density: d,
            injection: Injection {
                plus: Some(first),
                minus: None,
                scale: m.a0.at(part.point),
            },
        });
    }
    if let Some(d) = m.current_noise {
        for (pin, suffix) in [(p, ".in+"), (n, ".in-")] {
            out.push(NoiseSource {
                name: named(name, suffix),
                kind: SourceKind::AmplifierCurrent,
                density: d,
                injection: Injection {
                    plus: row(pin),
                    minus: None,
                    scale: 1.0,
                },
            });
        }
    }
}

fn current_source_noise(
    c: &Circuit,
    x: &CurrentSourceNoise,
    earlier: &[CurrentSourceNoise],
) -> CircuitResult<NoiseSource> {
    let e = c.element(&x.element).map_err(|e| {
        CircuitError::new(
            Error::UnknownName {
                param: "current_noise",
                expected: "the name of a current source of the circuit",
            },
            e.name,
        )
    })?;
    let refuse = |requirement| {
        CircuitError::named(
            Error::OutOfDomain {
                param: "current_noise",
                requirement,
            },
            &x.element,
        )
    };
    if e.kind() != ElementKind::CurrentSource {
        return Err(refuse("must name a current source"));
    }
    if earlier.iter().any(|y| y.element == x.element) {
        return Err(refuse("names this current source twice"));
    }
    let density = match x.kind {
        SourceNoiseKind::Density(d) => {
            d.validate("current_noise")
                .map_err(|err| CircuitError::named(err, &x.element))?;
            d
        }
        SourceNoiseKind::Shot => NoiseDensity {
            density: crate::float::sqrt(2.0 * ELEMENTARY_CHARGE * libm::fabs(e.value())),
            corner_hz: 0.0,
        },
    };
    let [a, b] = e.nodes();
    Ok(NoiseSource {
        name: String::from(e.name().as_str()),
        kind: SourceKind::CurrentSource,
        density,
        injection: current(a, b),
    })
}
