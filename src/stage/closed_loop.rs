//! Closed-loop behaviour of a circuit over frequency: the gain to any node
//! voltage or element current per unit of a source, and the impedance at any
//! port — each the exact nodal solution at each frequency, with the amplifier
//! elements' A(jω) inside.

use super::loop_gain::ResponseSweep;
use crate::check;
use crate::circuit::blackman::Output;
use crate::circuit::mna::{node_voltage, unit_source, Sweeper, MAX_SWEEP};
use crate::circuit::{solve, Circuit, CircuitError, CircuitResult, ElementKind};
use crate::error::Error;
use crate::freq::unwrap_phase_deg;
use alloc::vec::Vec;
use num_complex::Complex64;

fn check_count(frequencies_hz: &[f64]) -> CircuitResult<()> {
    if frequencies_hz.len() > MAX_SWEEP {
        return Err(CircuitError::from(Error::TooLarge {
            param: "frequencies",
            limit: MAX_SWEEP as u64,
        }));
    }
    Ok(())
}

/// The transfer from the independent source `source` (set to 1, every other
/// source to 0) to `output` — a voltage V(plus) − V(minus) in V per unit of
/// the source, or an element's current in A per unit — over `frequencies_hz`.
///
/// # Errors
/// More than [`MAX_SWEEP`] frequencies; unknown names; `source` not an
/// independent source (param `source`); a negative frequency; a singular
/// circuit, named; a zero transfer at some frequency (its dB value overflows).
///
/// # Example
/// ```
/// use loopwright::circuit::blackman::Output;
/// use loopwright::stage::closed_loop::gain_sweep;
/// use loopwright::stage::{Amplifier, Spread, SpreadPoint, Stage, StageKind, StageParts};
/// let s = Stage {
///     kind: StageKind::NonInverting,
///     amplifier: Amplifier::from_gbw(Spread::fixed(1e5), 1e6),
///     point: SpreadPoint::Typ,
///     parts: StageParts { rf: Some(9e3), rg: Some(1e3), ..StageParts::default() },
/// }.circuit().unwrap();
/// // Gain 10 with GBW 1 MHz: about −3 dB at 100 kHz.
/// let h = gain_sweep(&s.circuit, "Vs", Output::Voltage("out", "0"), &[1.0, 1e5]).unwrap();
/// assert!((h.magnitude_db[0] - 20.0).abs() < 1e-2);
/// assert!((h.magnitude_db[1] - 17.0).abs() < 0.1);
/// assert!(gain_sweep(&s.circuit, "Rf", Output::Voltage("out", "0"), &[1.0]).is_err());
/// ```
pub fn gain_sweep(
    c: &Circuit,
    source: &str,
    output: Output<'_>,
    frequencies_hz: &[f64],
) -> CircuitResult<ResponseSweep> {
    check_count(frequencies_hz)?;
    let (c1, _) = unit_source(c, source)?;
    let mut h = Vec::with_capacity(frequencies_hz.len());
    match output {
        Output::Voltage(p, m) => {
            let (p, m) = (c1.node_index(p)?, c1.node_index(m)?);
            let mut sweeper = Sweeper::new(&c1)?;
            let mut x = alloc::vec![Complex64::new(0.0, 0.0); sweeper.unknowns()];
            for &f in frequencies_hz {
                sweeper.solve_into(f, &mut x)?;
                h.push(node_voltage(&x, p) - node_voltage(&x, m));
            }
        }
        Output::Current(e) => {
            c1.element_index(e)?;
            for &f in frequencies_hz {
                h.push(solve(&c1, f)?.current(e)?);
            }
        }
    }
    ResponseSweep::from_samples("gain", frequencies_hz, &h)
}

/// An impedance sampled over frequency. Its magnitude is in Ω, not dB: an
/// ideal source's output impedance is exactly zero.
#[derive(Debug, Clone, PartialEq, Default)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct ImpedanceSweep {
    /// Frequencies, Hz, as given.
    pub freq_hz: Vec<f64>,
    /// |Z|, Ω.
    pub magnitude_ohm: Vec<f64>,
    /// ∠Z, degrees, continuous across the sweep.
    pub phase_deg: Vec<f64>,
    /// Re Z, Ω.
    pub re: Vec<f64>,
    /// Im Z, Ω.
    pub im: Vec<f64>,
}

impl ImpedanceSweep {
    /// The samples as complex numbers.
    pub fn complex(&self) -> Vec<Complex64> {
        self.re
            .iter()
            .zip(&self.im)
            .map(|(&re, &im)| Complex64::new(re, im))
            .collect()
    }
}

/// The impedance between `plus` and `minus` over `frequencies_hz`, Ω: a 1 A
/// test current into `plus` and out of `minus`, every independent source at
/// zero (voltage sources shorted, current sources open), Z = V(plus) − V(minus).
/// For a stage's input impedance remove its source (and source resistance)
/// first with [`Circuit::without`]; for its output impedance, its load.
///
/// # Errors
/// As [`gain_sweep`]; a port across which nothing conducts is a floating node.
pub fn impedance_sweep(
    c: &Circuit,
    plus: &str,
    minus: &str,
    frequencies_hz: &[f64],
) -> CircuitResult<ImpedanceSweep> {
    check_count(frequencies_hz)?;
    let (p, m) = (c.node_index(plus)?, c.node_index(minus)?);
    let mut c1 = c.clone();
    c1.zero_sources();
    c1.add_internal("test", ElementKind::CurrentSource, minus, plus, 1.0)?;
    let mut sweeper = Sweeper::new(&c1)?;
    let mut x = alloc::vec![Complex64::new(0.0, 0.0); sweeper.unknowns()];
    let mut out = ImpedanceSweep {
        freq_hz: frequencies_hz.to_vec(),
        ..ImpedanceSweep::default()
    };
    for &f in frequencies_hz {
        sweeper.solve_into(f, &mut x)?;
        let z = check::result_complex("impedance", node_voltage(&x, p) - node_voltage(&x, m))?;
        out.magnitude_ohm.push(z.norm());
        out.phase_deg
            .push(crate::float::atan2(z.im, z.re).to_degrees());
        out.re.push(z.re);
        out.im.push(z.im);
    }
    unwrap_phase_deg(&mut out.phase_deg);
    Ok(out)
}

/// Where a closed-loop gain leaves its tolerance band: the answer of
/// [`gain_within_band`].
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct GainWithin {
    /// The highest frequency, Hz, up to which |G| stays inside
    /// target·(1 ± tolerance) from `from_hz` on; `from_hz` itself when |G| is
    /// already outside there, `to_hz` when it never leaves.
    pub limit_hz: f64,
    /// `"leaves"`, `"within-to-end"` (never leaves over the range) or
    /// `"outside-at-start"` (outside the band at `from_hz`).
    pub status: &'static str,
    /// |G| at `from_hz`, in the unit of the gain.
    pub gain_at_start: f64,
}

/// Grid of the scan in [`gain_within_band`], points per decade.
const WITHIN_PPD: f64 = 50.0;

/// The frequency up to which the closed-loop gain magnitude |G(f)| from
/// `source` to `output` stays within `target·(1 − tolerance)` …
/// `target·(1 + tolerance)`, scanning from `from_hz` up to `to_hz`.
///
/// |G| is scanned at [`WITHIN_PPD`] points per decade (log spaced); the first
/// step that leaves the band is refined by bisection in ln f to 1e-10
/// relative. `target` is the magnitude of the specified gain (unit of the
/// gain), `tolerance` a fraction (0.005 for ±0.5 %), 0 < tolerance < 1.
/// A band edge crossed and recrossed between two grid points (a resonance
/// narrower than 1/50 decade) is not seen.
///
/// # Errors
/// A non-finite or non-positive target, tolerance or frequency, a tolerance
/// of 1 or more, `to_hz` not above `from_hz`; every error of [`gain_sweep`].
///
/// # Example
/// ```
/// use loopwright::circuit::{blackman::Output, Circuit};
/// use loopwright::stage::closed_loop::gain_within_band;
/// // An RC low pass, |G| = 1/√(1 + (f/fc)²): it leaves 1 − 1 % at
/// // fc·√(1/0.99² − 1) = 0.14249·fc.
/// let mut c = Circuit::new();
/// c.voltage_source("V1", "in", "0", 1.0).unwrap();
/// c.resistor("R1", "in", "out", 1e3).unwrap();
/// c.capacitor("C1", "out", "0", 1e-6).unwrap();
/// let fc = 1.0 / (2.0 * core::f64::consts::PI * 1e-3);
/// let w = gain_within_band(&c, "V1", Output::Voltage("out", "0"), 1.0, 0.01, 1.0, 1e6).unwrap();
/// assert_eq!(w.status, "leaves");
/// assert!((w.limit_hz / (fc * (1.0 / 0.99f64.powi(2) - 1.0).sqrt()) - 1.0).abs() < 1e-8);
/// ```
pub fn gain_within_band(
    c: &Circuit,
    source: &str,
    output: Output<'_>,
    target: f64,
    tolerance: f64,
    from_hz: f64,
    to_hz: f64,
) -> CircuitResult<GainWithin> {
    let target = check::positive("target", target)?;
    let tolerance = check::positive("tolerance", tolerance)?;
    if tolerance >= 1.0 {
        return Err(Error::OutOfDomain {
            param: "tolerance",
            requirement: "must be below 1 (a fraction: 0.005 for 0.5 %)",
        }
        .into());
    }
    let from_hz = check::positive("from_hz", from_hz)?;
    let to_hz = check::positive("to_hz", to_hz)?;
    if to_hz <= from_hz {
        return Err(Error::OutOfDomain {
            param: "to_hz",
            requirement: "must be above from_hz",
        }
        .into());
    }
    let (lo, hi) = (target * (1.0 - tolerance), target * (1.0 + tolerance));
    let inside = |g: f64| (lo..=hi).contains(&g);
    let magnitude = |f: &[f64]| -> CircuitResult<Vec<f64>> {
        let s = gain_sweep(c, source, output, f)?;
        Ok(s.re
            .iter()
            .zip(&s.im)
            .map(|(r, i)| libm::hypot(*r, *i))
            .collect())
    };
    let decades = libm::log10(to_hz / from_hz);
    let n = crate::float::ceil(decades * WITHIN_PPD).max(1.0) as usize;
    let grid: Vec<f64> = (0..=n)
        .map(|k| from_hz * libm::pow(10.0, decades * k as f64 / n as f64))
        .collect();
    let g = magnitude(&grid)?;
    let gain_at_start = g[0];
    if !inside(gain_at_start) {
        return Ok(GainWithin {
            limit_hz: from_hz,
            status: "outside-at-start",
            gain_at_start,
        });
    }
    let Some(k) = g.iter().position(|&v| !inside(v)) else {
        return Ok(GainWithin {
            limit_hz: to_hz,
            status: "within-to-end",
            gain_at_start,
        });
    };
    // Bisection in ln f between the last point inside and the first outside.
    let (mut a, mut b) = (libm::log(grid[k - 1]), libm::log(grid[k]));
    while b - a > 1e-10 {
        let m = 0.5 * (a + b);
        if inside(magnitude(&[libm::exp(m)])?[0]) {
            a = m;
        } else {
            b = m;
        }
    }
    Ok(GainWithin {
        limit_hz: libm::exp(0.5 * (a + b)),
        status: "leaves",
        gain_at_start,
    })
}
