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
        out.phase_deg.push(libm::atan2(z.im, z.re).to_degrees());
        out.re.push(z.re);
        out.im.push(z.im);
    }
    unwrap_phase_deg(&mut out.phase_deg);
    Ok(out)
}
