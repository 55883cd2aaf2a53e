//! The step response of a circuit: a unit step of one independent source
//! (every other at zero, the circuit at rest before), seen at a node voltage
//! or a resistor's current, with overshoot, rise and settling time.
//!
//! **Method: inverse Laplace transform by residues at the circuit's poles.**
//! The transfer H(s) from the source to the output is rational, its poles the
//! circuit's ([`super::poles::circuit_poles`], generalized eigenvalues of the
//! nodal pencil, refined). For simple poles p_k with residues r_k,
//!
//! y(t) = H(0) + Σ_k (r_k/p_k)·e^(p_k·t),  t > 0,
//!
//! (the step response of D + Σ r_k/(s − p_k); a standard partial-fraction
//! inversion, e.g. A. V. Oppenheim & A. S. Willsky, *Signals and Systems*,
//! 2nd ed., §9.3; from memory). Each residue is the contour integral
//! (1/2πj)∮H(s)ds on a circle around p_k, by the trapezoid rule on
//! [`RESIDUE_POINTS`] points, with radius a quarter of the distance to the
//! nearest other pole (so the error falls as 4^−N; Trefethen & Weideman,
//! "The exponentially convergent trapezoidal rule", *SIAM Review* 56, 2014;
//! from memory); H(s) at complex s is one nodal solve. Why this and not a
//! matrix exponential: the nodal pencil (G, C) is a descriptor system with a
//! singular C (an index-2 one with a capacitor on an ideal output), which a
//! matrix exponential needs reduced first; the poles are already refined to
//! full accuracy, and the residue form gives y(t) in closed form at any t.
//! The partial fractions are then checked: their sum must reproduce H(jω) at
//! [`CHECK_FREQUENCIES`] frequencies to [`PARTIAL_FRACTION_REL`], or the
//! answer is refused (a pole missed, a repeated pole, an improper H).
//!
//! The metrics are those of [`crate::freq::step_response`] (docs/freq.md):
//! rise 10 % → 90 % of the final value, settling the last exit from the band,
//! overshoot and undershoot relative to the final value, found on dense
//! samples and refined on the exact y(t).

use super::poles::circuit_poles;
use crate::check;
use crate::circuit::mna::{node_voltage, unit_source, Sweeper};
use crate::circuit::{Circuit, CircuitError, CircuitResult, ElementKind};
use crate::error::Error;
use crate::freq::step::Metrics;
use crate::freq::{StepResponse, StepWaveform};
use alloc::vec::Vec;
use core::f64::consts::TAU;
use num_complex::Complex64;

/// Trapezoid points on each residue's circle.
pub const RESIDUE_POINTS: usize = 32;
/// Frequencies at which the partial fractions are checked against the solve.
pub const CHECK_FREQUENCIES: usize = 8;
/// Largest relative difference of the partial fractions from the solve.
pub const PARTIAL_FRACTION_REL: f64 = 1e-6;
/// Samples over the simulated span (at least), and per period of the
/// fastest ringing mode while it lives.
const DETECT_SAMPLES: usize = 4000;
const SAMPLES_PER_PERIOD: f64 = 20.0;
/// Most detection samples.
const MAX_SAMPLES: usize = 400_000;

/// Where the step is seen.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum StepOutput<'a> {
    /// V(plus) − V(minus).
    Voltage(&'a str, &'a str),
    /// The current of a resistor, from its first node to its second.
    ResistorCurrent(&'a str),
}

/// H(s) of the circuit with the source at 1: the output read from a solve.
struct Transfer<'a> {
    sweeper: Sweeper<'a>,
    read: Read,
}

enum Read {
    Nodes(usize, usize),
    Resistor(usize, usize, f64),
}

impl Transfer<'_> {
    fn at(&mut self, s: Complex64) -> CircuitResult<Complex64> {
        let x = self.sweeper.solve_at_s(s)?;
        Ok(match self.read {
            Read::Nodes(p, m) => node_voltage(&x, p) - node_voltage(&x, m),
            Read::Resistor(a, b, r) => (node_voltage(&x, a) - node_voltage(&x, b)) / r,
        })
    }
}

fn read_of(c: &Circuit, output: StepOutput<'_>) -> CircuitResult<Read> {
    match output {
        StepOutput::Voltage(p, m) => Ok(Read::Nodes(c.node_index(p)?, c.node_index(m)?)),
        StepOutput::ResistorCurrent(name) => {
            let i = c.element_index(name)?;
            let e = c
                .elements()
                .get(i)
                .filter(|e| e.kind() == ElementKind::Resistor);
            let Some(e) = e else {
                return Err(CircuitError::named(
                    Error::OutOfDomain {
                        param: "output",
                        requirement: "a step current is read through a resistor",
                    },
                    name,
                ));
            };
            let [a, b] = e.nodes();
            Ok(Read::Resistor(a, b, e.value()))
        }
    }
}

/// y(t) = y0 + Σ c_k·e^(p_k·t): the closed form.
struct Response {
    final_value: f64,
    terms: Vec<(Complex64, Complex64)>,
}

impl Response {
    fn at(&self, t: f64) -> f64 {
        let sum: Complex64 = self.terms.iter().map(|&(c, p)| c * (p * t).exp()).sum();
        self.final_value + sum.re
    }
}

fn residues(h: &mut Transfer<'_>, poles: &[Complex64]) -> CircuitResult<Vec<Complex64>> {
    let mut out = Vec::with_capacity(poles.len());
    for (k, &p) in poles.iter().enumerate() {
        let near = poles
            .iter()
            .enumerate()
            .filter(|&(j, _)| j != k)
            .map(|(_, &q)| (q - p).norm())
            .fold(p.norm(), f64::min);
        let rho = 0.25 * near;
        let mut sum = Complex64::new(0.0, 0.0);
        for i in 0..RESIDUE_POINTS {
            let e = Complex64::from_polar(1.0, TAU * i as f64 / RESIDUE_POINTS as f64);
            sum += h.at(p + rho * e)? * e;
        }
        out.push(sum * (rho / RESIDUE_POINTS as f64));
    }
    Ok(out)
}

/// H at jω from the partial fractions, D = H(0) + Σ r/p.
fn partial_fractions(h0: Complex64, terms: &[(Complex64, Complex64)], s: Complex64) -> Complex64 {
    // terms hold (r/p, p): H(s) = H(0) + Σ (r/p)·s/(s − p).
    h0 + terms
        .iter()
        .map(|&(c, p)| c * s / (s - p))
        .sum::<Complex64>()
}

fn response(c: &Circuit, source: &str, output: StepOutput<'_>) -> CircuitResult<(Response, f64)> {
    let (c1, _) = unit_source(c, source)?;
    let read = read_of(&c1, output)?;
    let poles = circuit_poles(c)?;
    if poles.verdict != crate::freq::Verdict::Stable {
        return Err(Error::Unreachable {
            param: "closed_loop",
            reason: "the circuit is not stable, so its step response does not settle",
        }
        .into());
    }
    let p: Vec<Complex64> = poles
        .poles
        .iter()
        .map(|q| Complex64::new(q.re, q.im))
        .collect();
    let sigma = p.iter().map(|q| -q.re).fold(f64::INFINITY, f64::min);
    let mut h = Transfer {
        sweeper: Sweeper::new(&c1)?,
        read,
    };
    let h0 = h.at(Complex64::new(0.0, 0.0))?;
    let r = residues(&mut h, &p)?;
    let terms: Vec<(Complex64, Complex64)> = r.iter().zip(&p).map(|(&r, &p)| (r / p, p)).collect();
    // Check the partial fractions on the jω axis around the poles.
    for q in p.iter().take(CHECK_FREQUENCIES) {
        let s = Complex64::new(0.0, q.norm() * 1.3);
        let want = h.at(s)?;
        let got = partial_fractions(h0, &terms, s);
        if (got - want).norm() > PARTIAL_FRACTION_REL * want.norm().max(h0.norm()) {
            return Err(Error::NoConvergence {
                param: "step_output",
                reason: "the residues at the circuit's poles do not reproduce its transfer (a repeated pole or an improper transfer)",
            }
            .into());
        }
    }
    let final_value = check::result("final_value", h0.re).map_err(CircuitError::from)?;
    Ok((Response { final_value, terms }, sigma))
}

/// Detection samples over [0, span]: at least [`DETECT_SAMPLES`], and
/// [`SAMPLES_PER_PERIOD`] per period of the fastest mode alive (e^−40).
fn samples(resp: &Response, span: f64, yf: f64) -> CircuitResult<(Vec<f64>, Vec<f64>)> {
    let (mut t, mut y) = (Vec::new(), Vec::new());
    let mut time = 0.0;
    while time < span {
        t.push(time);
        y.push(resp.at(time) / yf);
        if t.len() > MAX_SAMPLES {
            return Err(Error::NoConvergence {
                param: "settling_time_s",
                reason: "the response rings for too many periods to resolve its settling",
            }
            .into());
        }
        let h = resp
            .terms
            .iter()
            .filter(|(_, p)| p.im > 0.0 && -p.re * time < 40.0)
            .map(|(_, p)| TAU / (SAMPLES_PER_PERIOD * p.im))
            .fold(span / (DETECT_SAMPLES - 1) as f64, f64::min);
        time += h;
    }
    t.push(span);
    y.push(resp.at(span) / yf);
    Ok((t, y))
}

/// The step response of `c` to a unit step of the independent source
/// `source`, seen at `output`; `settle_band` the settling band (relative,
/// 0…0.5), `points` the waveform's samples (2…100 000) over the span that
/// shows the settling.
///
/// # Errors
/// Unknown names; `source` not an independent source; an output current of
/// an element that is not a resistor (param `output`); `settle_band` or
/// `points` out of range; an unstable or marginal circuit, or a zero final
/// value ([`Error::Unreachable`], param `closed_loop`); partial fractions that
/// do not reproduce the transfer (param `step_output`).
///
/// # Example
/// ```
/// use loopwright::circuit::Circuit;
/// use loopwright::stage::step::{circuit_step, StepOutput};
/// // RC low pass, τ = 1 ms: rise time ln 9·τ, no overshoot.
/// let mut c = Circuit::new();
/// c.voltage_source("V1", "in", "0", 1.0).unwrap();
/// c.resistor("R1", "in", "out", 1e3).unwrap();
/// c.capacitor("C1", "out", "0", 1e-6).unwrap();
/// let s = circuit_step(&c, "V1", StepOutput::Voltage("out", "0"), 0.02, 100).unwrap();
/// assert!((s.rise_time_s / (9f64.ln() * 1e-3) - 1.0).abs() < 1e-9);
/// assert_eq!(s.overshoot_percent, 0.0);
/// ```
pub fn circuit_step(
    c: &Circuit,
    source: &str,
    output: StepOutput<'_>,
    settle_band: f64,
    points: usize,
) -> CircuitResult<StepResponse> {
    let band = check::positive("settle_band", settle_band)?;
    if band >= 0.5 {
        return Err(Error::OutOfDomain {
            param: "settle_band",
            requirement: "must be between 0 and 0.5",
        }
        .into());
    }
    if !(2..=crate::freq::MAX_SWEEP_POINTS).contains(&points) {
        return Err(Error::OutOfDomain {
            param: "points",
            requirement: "must be between 2 and 100000",
        }
        .into());
    }
    let (resp, sigma) = response(c, source, output)?;
    let yf = resp.final_value;
    if yf == 0.0 {
        return Err(Error::Unreachable {
            param: "closed_loop",
            reason: "the output is zero at DC, so there is no final value to settle to",
        }
        .into());
    }
    let mut span = (libm::log(1.0 / band) + 8.0) * 1.2 / sigma;
    for _ in 0..8 {
        let (t, y) = samples(&resp, span, yf)?;
        let outside = y.iter().rposition(|v| libm::fabs(v - 1.0) > band);
        if outside.is_some_and(|k| t[k] > 0.9 * span) {
            span *= 2.0;
            continue;
        }
        let m = Metrics::of(&|x| resp.at(x) / yf, band, &t, &y, outside);
        let time_s: Vec<f64> = (0..points)
            .map(|i| span * i as f64 / (points - 1) as f64)
            .collect();
        let output = time_s.iter().map(|&x| resp.at(x)).collect();
        return Ok(StepResponse {
            final_value: yf,
            overshoot_percent: check::result("overshoot_percent", m.overshoot)?,
            peak_time_s: m.peak_time,
            undershoot_percent: check::result("undershoot_percent", m.undershoot)?,
            rise_time_s: check::result("rise_time_s", m.rise)?,
            settling_time_s: check::result("settling_time_s", m.settle)?,
            settle_band: band,
            waveform: StepWaveform { time_s, output },
        });
    }
    Err(Error::NoConvergence {
        param: "settling_time_s",
        reason: "the response did not settle within the simulated span",
    }
    .into())
}
