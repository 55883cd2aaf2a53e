//! Noise of a circuit integrated over a band: the rms total, every source's rms
//! and share, the input-referred rms, and the signal-to-noise ratio.
//!
//! N² = ∫ S_out(f) df from f_low to f_high, each source's N_k² = ∫ |H_k|²·S_k df
//! (so Σ N_k² = N²), the input-referred N_in² = ∫ S_out/|G|² df. The band is
//! cut into at most [`MAX_PIECES`] pieces of equal width in log f; each piece is
//! integrated in t = ln f (∫ S(eᵗ)·eᵗ dt, smooth across 1/f noise and wide
//! bands) by the adaptive Gauss–Kronrod rule of [`crate::noise::quadrature`]
//! to the relative tolerance [`REL_TOL`] of the piece's total; the sources'
//! integrals use the same tolerance in absolute terms (REL_TOL × the piece's
//! total), so a source far below the total does not drive the refinement. A
//! band from 0 Hz starts with a piece [0, f_high·10⁻⁹] integrated in f (no
//! 1/f corner allowed there). Every solve is kept by frequency, so the
//! sources' integrals reuse the total's evaluations where they meet.
//!
//! SNR = 20·log10(signal rms / noise rms), dB.

use super::analysis::CircuitNoise;
use super::setup::NoiseSetup;
use super::sources::SourceKind;
use crate::check;
use crate::circuit::{Circuit, CircuitError, CircuitResult};
use crate::error::{Error, Result};
use crate::noise::quadrature::integrate;
use alloc::collections::BTreeMap;
use alloc::string::String;
use alloc::vec::Vec;

/// Relative tolerance of each piece of a band integral: the adaptive rule stops
/// when its error estimate is below 1e-9 of the piece's value. Far below any
/// figure an engineer reads, and well inside the 1e-6 the reference comparison
/// asks (`tests/noise_circuit_reference.rs`).
pub const REL_TOL: f64 = 1e-9;

/// Most pieces of a band (one per decade up to this many).
pub const MAX_PIECES: usize = 32;

/// One source's rms over the band.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct SourceRms {
    /// The source's name.
    pub name: String,
    /// What it is.
    pub kind: SourceKind,
    /// Its rms at the output over the band, V (A to a current output).
    pub rms: f64,
    /// Its share of the output noise power, 0…1.
    pub share: f64,
}

/// The noise of a circuit over a band.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct BandNoise {
    /// The band, Hz.
    pub band_hz: [f64; 2],
    /// Total rms output noise, V (A to a current output).
    pub total_rms: f64,
    /// Every source, in the analysis's order.
    pub sources: Vec<SourceRms>,
    /// √∫ S_out/|G|² df, if an input source was named.
    pub input_referred_rms: Option<f64>,
    /// Solves of the adjoint system used.
    pub evaluations: usize,
}

impl BandNoise {
    /// 20·log10(`signal_rms` / total rms), dB, for a signal of that rms at the
    /// output.
    ///
    /// # Errors
    /// `signal_rms` not greater than zero; no noise (param `total_rms`).
    pub fn snr_db(&self, signal_rms: f64) -> Result<f64> {
        let s = check::positive("signal_rms", signal_rms)?;
        let n = check::positive("total_rms", self.total_rms)?;
        check::result("snr_db", 20.0 * libm::log10(s / n))
    }
}

/// Per frequency: [total, each source…, input-referred PSD].
struct Cache<'a, 'b> {
    analysis: &'b mut CircuitNoise<'a>,
    rows: BTreeMap<u64, Vec<f64>>,
    failed: Option<CircuitError>,
}

impl Cache<'_, '_> {
    /// Entry `k` of the row at f (NaN after a failure, which the quadrature
    /// turns into an error; the failure is kept).
    fn value(&mut self, f: f64, k: usize) -> f64 {
        if self.failed.is_some() {
            return f64::NAN;
        }
        if let Some(row) = self.rows.get(&f.to_bits()) {
            return row.get(k).copied().unwrap_or(f64::NAN);
        }
        match self.analysis.at(f) {
            Ok(p) => {
                let mut row = Vec::with_capacity(p.source_psd.len() + 2);
                row.push(p.total_psd);
                row.extend_from_slice(&p.source_psd);
                let g2 = p.signal_gain.map_or(0.0, |g| g.norm_sqr());
                row.push(if g2 > 0.0 { p.total_psd / g2 } else { f64::NAN });
                let v = row.get(k).copied().unwrap_or(f64::NAN);
                self.rows.insert(f.to_bits(), row);
                v
            }
            Err(e) => {
                self.failed = Some(e);
                f64::NAN
            }
        }
    }

    /// ∫ entry k over [a, b] (log pieces in ln f, the 0 Hz piece in f).
    fn integral(&mut self, k: usize, a: f64, b: f64, rel: f64, abs: f64) -> CircuitResult<f64> {
        let q = if a == 0.0 {
            integrate(|f| self.value(f, k), a, b, rel, abs)
        } else {
            let (ta, tb) = (libm::log(a), libm::log(b));
            integrate(
                |t| {
                    let f = libm::exp(t);
                    self.value(f, k) * f
                },
                ta,
                tb,
                rel,
                abs,
            )
        };
        match (q, self.failed) {
            (_, Some(e)) => Err(e),
            (Ok(q), None) => Ok(q.value),
            (Err(e), None) => Err(CircuitError::from(e)),
        }
    }
}

/// The band's pieces: [0, f_high·1e-9] first when it starts at 0 Hz, then
/// equal pieces in log f (the whole band in f when f_high·1e-9 is subnormal).
fn pieces(lo: f64, hi: f64) -> Vec<[f64; 2]> {
    let mut out = Vec::new();
    let mut start = lo;
    if lo == 0.0 {
        start = hi * 1e-9;
        if start < f64::MIN_POSITIVE {
            // A band so narrow that its log pieces would start below the normal
            // range: one piece in f.
            out.push([0.0, hi]);
            return out;
        }
        out.push([0.0, start]);
    }
    let decades = libm::log10(hi / start);
    let n = (libm::ceil(decades) as usize).clamp(1, MAX_PIECES);
    let mut a = start;
    for i in 1..=n {
        let b = if i == n {
            hi
        } else {
            start * libm::pow(hi / start, i as f64 / n as f64)
        };
        out.push([a, b]);
        a = b;
    }
    out
}

/// Check the band: 0 ≤ f_low < f_high < ∞.
fn check_band(band_hz: [f64; 2], flicker: bool) -> CircuitResult<(f64, f64)> {
    let lo = check::non_negative("band_hz", band_hz[0])?;
    let hi = check::positive("band_hz", band_hz[1])?;
    if lo >= hi {
        return Err(CircuitError::from(Error::OutOfDomain {
            param: "band_hz",
            requirement: "the lower edge must be below the upper edge",
        }));
    }
    if lo == 0.0 && flicker {
        return Err(CircuitError::from(Error::OutOfDomain {
            param: "band_hz",
            requirement: "must start above 0 Hz when a source has a 1/f corner (its integral from 0 Hz is infinite)",
        }));
    }
    Ok((lo, hi))
}

/// The rms noise of `circuit` over `band_hz` = [f_low, f_high], every source's
/// rms and share, and the input-referred rms when an input source is named.
///
/// # Errors
/// `band_hz` not 0 ≤ f_low < f_high < ∞, or from 0 Hz with a 1/f corner (param
/// `band_hz`); the setup's faults as [`CircuitNoise::new`]; a signal gain of
/// zero inside the band where the input-referred rms is asked; the quadrature
/// not converging (param `integrand`).
///
/// # Example
/// ```
/// use loopwright::circuit::Circuit;
/// use loopwright::noise::circuit::{band_noise, NoiseSetup};
/// // 1 kΩ with 1 µF to ground, 0…∞ would give √(kT/C) (common practice, no source);
/// // over 0…1 MHz (f_c = 159 Hz) it is within 0.02 % of it.
/// let mut c = Circuit::new();
/// c.resistor("R1", "a", "0", 1e3).unwrap();
/// c.capacitor("C1", "a", "0", 1e-6).unwrap();
/// let n = band_noise(&c, &NoiseSetup::at_node("a", 300.0), [0.0, 1e6]).unwrap();
/// let kt_c = (1.380649e-23 * 300.0 / 1e-6f64).sqrt();
/// assert!((n.total_rms / kt_c - 1.0).abs() < 2e-4);
/// assert_eq!(band_noise(&c, &NoiseSetup::at_node("a", 300.0), [10.0, 1.0]).unwrap_err().error.param(), "band_hz");
/// ```
pub fn band_noise(
    circuit: &Circuit,
    setup: &NoiseSetup,
    band_hz: [f64; 2],
) -> CircuitResult<BandNoise> {
    let mut analysis = CircuitNoise::new(circuit, setup)?;
    let (lo, hi) = check_band(band_hz, analysis.has_flicker())?;
    let names: Vec<(String, SourceKind)> = analysis
        .sources()
        .iter()
        .map(|s| (s.name.clone(), s.kind))
        .collect();
    let signal = analysis.has_signal();
    let mut cache = Cache {
        analysis: &mut analysis,
        rows: BTreeMap::new(),
        failed: None,
    };
    let mut total = 0.0;
    let mut per_source = alloc::vec![0.0; names.len()];
    let mut input = 0.0;
    for [a, b] in pieces(lo, hi) {
        let piece = cache.integral(0, a, b, REL_TOL, 0.0)?;
        total += piece;
        for (k, acc) in per_source.iter_mut().enumerate() {
            *acc += cache.integral(k + 1, a, b, 0.0, REL_TOL * piece.max(f64::MIN_POSITIVE))?;
        }
        if signal {
            input += cache.integral(names.len() + 1, a, b, REL_TOL, 0.0)?;
        }
    }
    let evaluations = cache.rows.len();
    let total_rms = check::result("total_rms", crate::float::sqrt(total))?;
    let sources = names
        .into_iter()
        .zip(per_source)
        .map(|((name, kind), p)| SourceRms {
            name,
            kind,
            rms: crate::float::sqrt(p.max(0.0)),
            share: if total > 0.0 { p.max(0.0) / total } else { 0.0 },
        })
        .collect();
    Ok(BandNoise {
        band_hz: [lo, hi],
        total_rms,
        sources,
        input_referred_rms: if signal {
            Some(check::result(
                "input_referred_rms",
                crate::float::sqrt(input),
            )?)
        } else {
            None
        },
        evaluations,
    })
}
