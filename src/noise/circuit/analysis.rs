//! One circuit noise analysis: the sources, the output and the adjoint solve,
//! evaluated at one frequency at a time.
//!
//! At f the output power spectral density is
//!
//!   S_out(f) = Σ_k |H_k(f)|²·S_k(f)
//!
//! (uncorrelated sources add in power), with H_k the transfer of source k to
//! the output read from the adjoint solution ([`super::adjoint`]). The signal
//! gain G(f) is the transfer from the named independent source (its branch row
//! for a voltage source, V/V or A/V; the current it drives for a current
//! source, V/A or A/A); the noise gain is the transfer of the amplifier's input
//! voltage noise, the gain 1/β the loop gives to its input (V/V to a voltage
//! output).

use super::adjoint::Adjoint;
use super::output::{selector, Selector};
use super::setup::NoiseSetup;
use super::sources::{collect, Injection, NoiseSource};
use crate::circuit::{Circuit, CircuitError, CircuitResult, ElementKind};
use crate::error::Error;
use alloc::vec::Vec;
use num_complex::Complex64;

/// The transfers at one frequency.
#[derive(Debug, Clone, PartialEq)]
pub struct NoisePoint {
    /// Frequency, Hz.
    pub frequency_hz: f64,
    /// Each source's output PSD |H_k|²·S_k, in the order of
    /// [`CircuitNoise::sources`], V²/Hz (or A²/Hz to a current output).
    pub source_psd: Vec<f64>,
    /// Their sum.
    pub total_psd: f64,
    /// The signal gain from the input source, if one was named.
    pub signal_gain: Option<Complex64>,
    /// The noise gain of the amplifier, if the circuit has one.
    pub noise_gain: Option<Complex64>,
}

/// A circuit prepared for noise analysis.
pub struct CircuitNoise<'a> {
    adjoint: Adjoint<'a>,
    selector: Selector,
    sources: Vec<NoiseSource>,
    signal: Option<Injection>,
    amplifier: Option<Injection>,
}

impl<'a> CircuitNoise<'a> {
    /// Lay out the circuit, list its sources and build the output.
    ///
    /// # Errors
    /// `temperature_k` not greater than zero; an output node or element that
    /// does not exist (param `output`); `input_source` not an independent
    /// source (param `input_source`); `amplifier` not an amplifier element
    /// (param `amplifier`); a bad `current_noise` entry (see
    /// [`super::sources`]); the circuit's own faults as [`crate::circuit::solve`].
    pub fn new(c: &'a Circuit, setup: &NoiseSetup) -> CircuitResult<CircuitNoise<'a>> {
        let adjoint = Adjoint::new(c)?;
        let lay = &adjoint.sweeper.lay;
        let sources = collect(c, lay, setup.temperature_k, &setup.current_noise)?;
        let selector = selector(c, lay, &setup.output)?;
        let signal = match &setup.input_source {
            Some(name) => Some(signal_injection(c, lay, name)?),
            None => None,
        };
        let amplifier = amplifier_injection(c, lay, setup.amplifier.as_deref())?;
        Ok(CircuitNoise {
            adjoint,
            selector,
            sources,
            signal,
            amplifier,
        })
    }

    /// The noise sources, in the order of [`NoisePoint::source_psd`].
    pub fn sources(&self) -> &[NoiseSource] {
        &self.sources
    }

    /// True when any source has a 1/f part (densities need f > 0; every
    /// frequency must be above 0 Hz anyway).
    pub fn has_flicker(&self) -> bool {
        self.sources
            .iter()
            .any(|s| s.density.corner_hz > 0.0 && s.density.density > 0.0)
    }

    /// True when a signal source was named.
    pub fn has_signal(&self) -> bool {
        self.signal.is_some()
    }

    /// Every transfer and PSD at `frequency_hz` (> 0).
    ///
    /// # Errors
    /// As [`Adjoint::solve`]; a non-finite PSD (param `output_psd`).
    pub fn at(&mut self, frequency_hz: f64) -> CircuitResult<NoisePoint> {
        let z = self.adjoint.solve(frequency_hz, &self.selector)?;
        let mut source_psd = Vec::with_capacity(self.sources.len());
        let mut total_psd = 0.0;
        for s in &self.sources {
            let h = transfer(&z, &s.injection);
            let p = h.norm_sqr() * s.psd_at(frequency_hz);
            if !p.is_finite() {
                return Err(CircuitError::named(
                    Error::Overflow {
                        param: "output_psd",
                    },
                    &s.name,
                ));
            }
            total_psd += p;
            source_psd.push(p);
        }
        Ok(NoisePoint {
            frequency_hz,
            source_psd,
            total_psd,
            signal_gain: self.signal.as_ref().map(|i| transfer(&z, i)),
            noise_gain: self.amplifier.as_ref().map(|i| transfer(&z, i)),
        })
    }
}

/// scale·(z[plus] − z[minus]).
pub(crate) fn transfer(z: &[Complex64], i: &Injection) -> Complex64 {
    let at = |k: Option<usize>| k.and_then(|k| z.get(k).copied()).unwrap_or_default();
    (at(i.plus) - at(i.minus)) * i.scale
}

fn signal_injection(
    c: &Circuit,
    lay: &crate::circuit::mna::Layout,
    name: &str,
) -> CircuitResult<Injection> {
    let refuse = |err| CircuitError::named(err, name);
    let i = c.element_index(name).map_err(|_| {
        refuse(Error::UnknownName {
            param: "input_source",
            expected: "the name of an independent source of the circuit",
        })
    })?;
    let e = c.elements().get(i).ok_or(refuse(Error::Missing {
        param: "input_source",
    }))?;
    let [a, b] = e.nodes();
    match e.kind() {
        // V(a) − V(b) = value: the value sits in the branch row.
        ElementKind::VoltageSource => Ok(Injection {
            plus: lay.branch.get(i).copied().flatten(),
            minus: None,
            scale: 1.0,
        }),
        // The value flows from a through the source to b: it enters at b.
        ElementKind::CurrentSource => Ok(Injection {
            plus: b.checked_sub(1),
            minus: a.checked_sub(1),
            scale: 1.0,
        }),
        _ => Err(refuse(Error::OutOfDomain {
            param: "input_source",
            requirement: "must name an independent voltage or current source",
        })),
    }
}

fn amplifier_injection(
    c: &Circuit,
    lay: &crate::circuit::mna::Layout,
    name: Option<&str>,
) -> CircuitResult<Option<Injection>> {
    let found = c.elements().iter().enumerate().find(|(_, e)| match name {
        Some(n) => e.name().as_str() == n,
        None => e.kind() == ElementKind::Amplifier,
    });
    let Some((i, e)) = found else {
        return match name {
            Some(n) => Err(CircuitError::named(
                Error::UnknownName {
                    param: "amplifier",
                    expected: "the name of an amplifier element of the circuit",
                },
                n,
            )),
            None => Ok(None),
        };
    };
    match (e.amplifier(), lay.internal.get(i).copied().flatten()) {
        (Some(part), Some(first)) => Ok(Some(Injection {
            plus: Some(first),
            minus: None,
            scale: part.model.a0.at(part.point),
        })),
        _ => Err(CircuitError::new(
            Error::OutOfDomain {
                param: "amplifier",
                requirement: "must name an amplifier element",
            },
            e.name(),
        )),
    }
}
