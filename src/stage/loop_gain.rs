//! The loop gain of a circuit across frequency: the return ratio at a
//! controlled source — the amplifier element's, or any named `vcvs`, `vccs`,
//! `ccvs`, `cccs`.
//!
//! At each frequency: set every independent source to zero, replace the
//! controlled source by an independent source of the same kind with value 1
//! (its gain is gone: for an amplifier the output source behind Ro becomes
//! 1 V, its input parts and output resistance stay), solve, read the control
//! quantity x it returns (the input voltage V(+) − V(−), or the controlling
//! current), and
//!
//! T(jω) = −k(jω)·x / 1,
//!
//! with k(jω) = A(jω) of the amplifier's model (evaluated directly,
//! [`crate::stage::Amplifier::open_loop_gain`]) or the source's constant gain.
//! T is the return ratio of Bode and of Blackman; with the loop's sign
//! convention, negative feedback has T > 0 at low frequency. Source:
//! H. W. Bode, *Network Analysis and Feedback Amplifier Design*, Van Nostrand,
//! 1945, ch. 4; the same quantity as `circuit::blackman::return_ratio` at one
//! frequency (from memory).
//!
//! The results are plain arrays (frequency, magnitude in dB, continuous phase
//! in degrees, real and imaginary parts), ready for a margin search on the
//! evaluated loop gain — the documented next step, once the pole-list margin
//! engine of `crate::freq` takes sampled loops.

use crate::check;
use crate::circuit::mna::{node_voltage, Sweeper, MAX_SWEEP};
use crate::circuit::{Circuit, CircuitError, CircuitResult, Control, ElementKind, Name};
use crate::error::Error;
use crate::freq::unwrap_phase_deg;
use alloc::vec::Vec;
use num_complex::Complex64;

/// A complex response sampled over frequency.
#[derive(Debug, Clone, PartialEq, Default)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct ResponseSweep {
    /// Frequencies, Hz, as given.
    pub freq_hz: Vec<f64>,
    /// 20·log10|H|, dB.
    pub magnitude_db: Vec<f64>,
    /// ∠H, degrees, continuous across the sweep (the first point in (−180°, 180°]).
    pub phase_deg: Vec<f64>,
    /// Re H.
    pub re: Vec<f64>,
    /// Im H.
    pub im: Vec<f64>,
}

/// A response sample z at `f` Hz as [`ResponseSweep::from_samples`] takes it,
/// with its magnitude in dB, 20·log10|z|.
///
/// # Errors
/// z not finite (param `param`); |z| zero or overflowing in dB
/// ([`Error::Overflow`], named by the frequency).
pub(crate) fn checked_sample(
    param: &'static str,
    f: f64,
    z: Complex64,
) -> CircuitResult<(Complex64, f64)> {
    let z = check::result_complex(param, z)?;
    let db = 20.0 * libm::log10(z.norm());
    if !db.is_finite() {
        return Err(CircuitError::named(
            Error::Overflow { param },
            &alloc::format!("{f} Hz"),
        ));
    }
    Ok((z, db))
}

impl ResponseSweep {
    /// Build from complex samples; magnitude and phase checked finite.
    ///
    /// # Errors
    /// [`Error::Overflow`] (param `param`) for a zero or non-finite sample.
    pub(crate) fn from_samples(
        param: &'static str,
        freq_hz: &[f64],
        h: &[Complex64],
    ) -> CircuitResult<ResponseSweep> {
        let mut r = ResponseSweep {
            freq_hz: freq_hz.to_vec(),
            ..ResponseSweep::default()
        };
        for (&f, z) in freq_hz.iter().zip(h) {
            let (z, db) = checked_sample(param, f, *z)?;
            r.magnitude_db.push(db);
            r.phase_deg
                .push(crate::float::atan2(z.im, z.re).to_degrees());
            r.re.push(z.re);
            r.im.push(z.im);
        }
        unwrap_phase_deg(&mut r.phase_deg);
        Ok(r)
    }

    /// The samples as complex numbers.
    pub fn complex(&self) -> Vec<Complex64> {
        self.re
            .iter()
            .zip(&self.im)
            .map(|(&re, &im)| Complex64::new(re, im))
            .collect()
    }
}

/// The loop's reference source: where it is and how it is opened.
pub(crate) struct Opened {
    /// The circuit with sources zeroed and the reference opened (test value 1).
    pub circuit: Circuit,
    /// Index of the reference element.
    pub index: usize,
}

/// The gain k(jω) of the reference source (A(jω) for an amplifier).
pub(crate) fn reference_gain(c: &Circuit, index: usize, f_hz: f64) -> CircuitResult<Complex64> {
    let e = c
        .elements()
        .get(index)
        .ok_or(CircuitError::from(Error::UnknownName {
            param: "controlled",
            expected: "",
        }))?;
    match e.amplifier() {
        Some(part) => part
            .model
            .open_loop_gain(f_hz, part.point)
            .map_err(|err| CircuitError::new(err, e.name())),
        None => Ok(Complex64::new(e.value(), 0.0)),
    }
}

/// Find the reference source, check it, and make a copy of the circuit with
/// the reference replaced by a test source of value `u` (other sources as in `c`).
pub(crate) fn open_at(c: &Circuit, controlled: &str, u: f64) -> CircuitResult<Opened> {
    let index = c.element_index(controlled).map_err(|e| {
        CircuitError::new(
            Error::UnknownName {
                param: "controlled",
                expected: "the name of an amplifier or controlled source of the circuit",
            },
            e.name,
        )
    })?;
    let kind = c.elements().get(index).map(|e| e.kind());
    if !matches!(kind, Some(k) if k.is_controlled() || k == ElementKind::Amplifier) {
        return Err(CircuitError::named(
            Error::OutOfDomain {
                param: "controlled",
                requirement:
                    "must name an amplifier or a controlled source (vcvs, vccs, ccvs, cccs)",
            },
            controlled,
        ));
    }
    let mut circuit = c.clone();
    circuit.replace_with_source(index, u);
    Ok(Opened { circuit, index })
}

/// The control quantity of element `index` of `c` (V(c+) − V(c−) or the
/// controlling current) in an unknown vector of the sweeper's circuit.
pub(crate) fn control_in(
    c: &Circuit,
    index: usize,
    sweeper: &Sweeper<'_>,
    x: &[Complex64],
) -> CircuitResult<Complex64> {
    let e = c.elements().get(index);
    match e.map(|e| e.control()) {
        Some(Control::Nodes([p, n])) => Ok(node_voltage(x, p) - node_voltage(x, n)),
        Some(Control::Element(name)) => {
            let j = sweeper.circuit.element_index(name.as_str())?;
            let br = sweeper.lay.branch.get(j).copied().flatten();
            Ok(br.and_then(|r| x.get(r).copied()).unwrap_or_default())
        }
        _ => Err(CircuitError::new(
            Error::OutOfDomain {
                param: "controlled",
                requirement: "has no control",
            },
            e.map(|e| e.name()).unwrap_or(Name::EMPTY),
        )),
    }
}

fn check_count(frequencies_hz: &[f64]) -> CircuitResult<()> {
    if frequencies_hz.len() > MAX_SWEEP {
        return Err(CircuitError::from(Error::TooLarge {
            param: "frequencies",
            limit: MAX_SWEEP as u64,
        }));
    }
    Ok(())
}

/// The return ratio T(jω) at the controlled source `controlled` at each of
/// `frequencies_hz`, as complex samples.
///
/// # Errors
/// More than [`MAX_SWEEP`] frequencies; `controlled` unknown or not an
/// amplifier or controlled source (param `controlled`); a negative or
/// non-finite frequency (param `frequency`); a singular circuit, named.
pub fn return_ratio_samples(
    c: &Circuit,
    controlled: &str,
    frequencies_hz: &[f64],
) -> CircuitResult<Vec<Complex64>> {
    check_count(frequencies_hz)?;
    let mut quiet = c.clone();
    quiet.zero_sources();
    let opened = open_at(&quiet, controlled, 1.0)?;
    let mut sweeper = Sweeper::new(&opened.circuit)?;
    let mut x = alloc::vec![Complex64::new(0.0, 0.0); sweeper.unknowns()];
    let mut out = Vec::with_capacity(frequencies_hz.len());
    for &f in frequencies_hz {
        sweeper.solve_into(f, &mut x)?;
        let returned = control_in(c, opened.index, &sweeper, &x)?;
        let k = reference_gain(c, opened.index, f)?;
        out.push(check::result_complex("loopGain", -(k * returned))?);
    }
    Ok(out)
}

/// The loop gain (return ratio) of a circuit at its controlled source
/// `controlled`, over `frequencies_hz`: magnitude (dB), continuous phase
/// (degrees), real and imaginary parts.
///
/// # Errors
/// As [`return_ratio_samples`]; a loop gain of exactly zero at some frequency
/// (no loop: param `loopGain`, [`Error::Overflow`] on its dB value).
///
/// # Example
/// ```
/// use loopwright::circuit::Circuit;
/// use loopwright::stage::loop_gain::loop_gain;
/// use loopwright::stage::{Amplifier, Spread, SpreadPoint};
/// // A follower: T = A(jω) (β = 1); A0 = 1e5, GBW = 1 MHz.
/// let mut c = Circuit::new();
/// c.voltage_source("Vs", "in", "0", 1.0).unwrap();
/// c.amplifier("U1", "out", "0", "in", "out", Amplifier::from_gbw(Spread::fixed(1e5), 1e6), SpreadPoint::Typ).unwrap();
/// let t = loop_gain(&c, "U1", &[0.01, 1e6]).unwrap();
/// assert!((t.magnitude_db[0] - 100.0).abs() < 1e-3);  // A0 well below the 10 Hz pole
/// assert!(t.magnitude_db[1].abs() < 1e-3);              // |T| ≈ 1 at the GBW
/// assert!((t.phase_deg[1] + 90.0).abs() < 1e-3);
/// assert_eq!(loop_gain(&c, "Vs", &[1.0]).unwrap_err().error.param(), "controlled");
/// ```
pub fn loop_gain(
    c: &Circuit,
    controlled: &str,
    frequencies_hz: &[f64],
) -> CircuitResult<ResponseSweep> {
    let t = return_ratio_samples(c, controlled, frequencies_hz)?;
    ResponseSweep::from_samples("loopGain", frequencies_hz, &t)
}
