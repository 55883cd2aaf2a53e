//! The asymptotic-gain decomposition of a circuit's transfer at an amplifier
//! element (or any controlled source), with the frequency-dependent gain A(jω):
//! Af = G∞·T/(1 + T) + G0/(1 + T), beside the direct solve.
//!
//! With the reference source's output u as a second input, linearity gives
//! y = a·s + b·u and x = c·s + d·u (x its control quantity); then T = −k·d,
//! G0 = a and G∞ = a − b·c/d, exactly as `circuit::blackman::asymptotic_gain`
//! does for a constant gain k; here k = A(jω). Source: S. Rosenstark,
//! *Feedback Amplifier Principles*, Macmillan, 1986; R. D. Middlebrook, "The
//! general feedback theorem", 2006 (both from memory).
//!
//! An exact rearrangement: it agrees with the direct solve to rounding, which
//! makes it the check of the loop gain of [`super::loop_gain`].

use super::loop_gain::{open_at, reference_gain};
use crate::check;
use crate::circuit::blackman::{AsymptoticGain, Output};
use crate::circuit::mna::unit_source;
use crate::circuit::{solve, Circuit, CircuitError, CircuitResult, Control, Solution};
use crate::error::Error;
use num_complex::Complex64;

fn read(out: Output<'_>, s: &Solution) -> CircuitResult<Complex64> {
    match out {
        Output::Voltage(p, m) => s.voltage_between(p, m),
        Output::Current(e) => s.current(e),
    }
}

fn control(c: &Circuit, index: usize, s: &Solution) -> CircuitResult<Complex64> {
    let node = |i: usize| c.nodes().get(i).map(|n| n.as_str()).unwrap_or("0");
    match c.elements().get(index).map(|e| e.control()) {
        Some(Control::Nodes([p, n])) => s.voltage_between(node(p), node(n)),
        Some(Control::Element(name)) => s.current(name.as_str()),
        _ => Err(CircuitError::from(Error::OutOfDomain {
            param: "controlled",
            requirement: "has no control",
        })),
    }
}

/// G∞, G0, T and Af of the transfer from the independent source `source` to
/// `output`, with respect to `controlled`, at `frequency_hz`.
///
/// # Errors
/// As [`super::loop_gain::loop_gain`]; `source` not an independent source;
/// [`Error::Unreachable`] (param `t`) when the reference does not reach its own
/// control; [`Error::Oscillation`] when 1 + T = 0.
pub fn asymptotic_gain_at(
    c: &Circuit,
    controlled: &str,
    source: &str,
    output: Output<'_>,
    frequency_hz: f64,
) -> CircuitResult<AsymptoticGain> {
    let (with_source, _) = unit_source(c, source)?;
    let exact = read(output, &solve(&with_source, frequency_hz)?)?;
    let driven = open_at(&with_source, controlled, 0.0)?;
    let s1 = solve(&driven.circuit, frequency_hz)?;
    let (a, cc) = (read(output, &s1)?, control(c, driven.index, &s1)?);
    let mut quiet = c.clone();
    quiet.zero_sources();
    let test = open_at(&quiet, controlled, 1.0)?;
    let s2 = solve(&test.circuit, frequency_hz)?;
    let (b, d) = (read(output, &s2)?, control(c, test.index, &s2)?);
    let name = c
        .elements()
        .get(test.index)
        .map(|e| e.name())
        .unwrap_or(crate::circuit::Name::EMPTY);
    if d == Complex64::new(0.0, 0.0) {
        return Err(CircuitError::new(
            Error::Unreachable {
                param: "t",
                reason: "the controlled source does not reach its own control, so there is no loop",
            },
            name,
        ));
    }
    let k = reference_gain(c, test.index, frequency_hz)?;
    let t = check::result_complex("t", -(k * d))?;
    let g_inf = check::result_complex("g_inf", a - b * cc / d)?;
    let one = Complex64::new(1.0, 0.0);
    let dd = one + t;
    if dd.norm() <= 4.0 * f64::EPSILON * (1.0 + t.norm()) {
        return Err(CircuitError::new(Error::Oscillation { param: "t" }, name));
    }
    let af = check::result_complex("af", g_inf * t / dd + a / dd)?;
    let relative_error = if exact.norm() > 0.0 {
        check::result("relative_error", (af - exact).norm() / exact.norm())?
    } else {
        af.norm()
    };
    Ok(AsymptoticGain {
        g_inf,
        g0: a,
        t,
        af,
        exact,
        relative_error,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::stage::loop_gain::return_ratio_samples;
    use crate::stage::{Amplifier, Spread, SpreadPoint, Stage, StageKind, StageParts};

    /// The asymptotic-gain identity is exact, so the loop gain it uses must
    /// reproduce the direct closed-loop solve to rounding; 1e-9 allows for the
    /// conditioning of A0 = 1e6 loops.
    const IDENTITY_REL: f64 = 1e-9;

    fn stages() -> [Stage; 4] {
        let amp = Amplifier::from_gbw(
            Spread {
                min: 2e5,
                typ: 1e6,
                max: 3e6,
            },
            2e7,
        )
        .with_pole(6e7)
        .with_complex_pole(2e8, 0.9)
        .with_input(Some(1e7), 3e-12, Some(1e9), 2e-12)
        .with_ro(40.0);
        let s = |kind, parts| Stage {
            kind,
            amplifier: amp.clone(),
            point: SpreadPoint::Min,
            parts,
        };
        let p = StageParts::default();
        [
            s(
                StageKind::NonInverting,
                StageParts {
                    rf: Some(9e3),
                    rg: Some(1e3),
                    cf: Some(1e-12),
                    rs: Some(50.0),
                    rl: Some(1e3),
                    cl: Some(1e-9),
                    riso: Some(20.0),
                    ..p
                },
            ),
            s(
                StageKind::Inverting,
                StageParts {
                    rf: Some(20e3),
                    rg: Some(2e3),
                    cs: Some(10e-12),
                    rs: Some(100.0),
                    rl: Some(600.0),
                    ..p
                },
            ),
            s(
                StageKind::Transimpedance,
                StageParts {
                    rf: Some(1e5),
                    cf: Some(2e-12),
                    cs: Some(50e-12),
                    rs: Some(1e9),
                    ..p
                },
            ),
            s(
                StageKind::NonInverting,
                StageParts {
                    cl: Some(100e-12),
                    ..p
                },
            ),
        ]
    }

    #[test]
    fn loop_gain_reproduces_the_closed_loop_solve_through_the_asymptotic_gain() {
        let freqs = [1.0, 1e3, 1e5, 1e6, 1e7, 3e7, 1e8];
        for s in stages() {
            let b = s.circuit().unwrap();
            let t = return_ratio_samples(&b.circuit, "U1", &freqs).unwrap();
            for (&f, &tf) in freqs.iter().zip(&t) {
                let g =
                    asymptotic_gain_at(&b.circuit, "U1", b.source, Output::Voltage("out", "0"), f)
                        .unwrap();
                assert!(
                    g.relative_error < IDENTITY_REL,
                    "{:?} {f}: {}",
                    s.kind,
                    g.relative_error
                );
                // The same T by both routes (same solves, same formula).
                assert!((g.t - tf).norm() <= 1e-12 * tf.norm(), "{:?} {f}", s.kind);
            }
        }
    }

    #[test]
    fn a_follower_loop_gain_is_the_open_loop_gain_divided_by_the_output_divider() {
        // Follower with Ro into a load Rl: T = A(jω)·Rl/(Rl + Ro) (the output
        // divider is the whole feedback path; ideal inputs). Hand derivation.
        let amp = Amplifier::from_gbw(Spread::fixed(1e5), 1e7)
            .with_pole(3e7)
            .with_ro(100.0);
        let mut c = Circuit::new();
        c.voltage_source("Vs", "in", "0", 1.0).unwrap();
        c.amplifier("U1", "out", "0", "in", "out", amp.clone(), SpreadPoint::Typ)
            .unwrap();
        c.resistor("Rl", "out", "0", 900.0).unwrap();
        let freqs = [10.0, 1e6, 2e7];
        let t = return_ratio_samples(&c, "U1", &freqs).unwrap();
        for (&f, &tf) in freqs.iter().zip(&t) {
            let want = amp.open_loop_gain(f, SpreadPoint::Typ).unwrap() * 0.9;
            assert!((tf - want).norm() <= 1e-12 * want.norm(), "{f}");
        }
    }
}

#[cfg(test)]
mod current_output_tests {
    use super::*;
    use crate::stage::{Amplifier, Spread, SpreadPoint, Stage, StageKind, StageParts};

    #[test]
    fn current_output_stages_satisfy_the_identity_on_the_load_current() {
        // Exact rearrangement (module docs): 1e-9 as for the voltage stages.
        let amp = Amplifier::from_gbw(Spread::fixed(3e5), 1e7)
            .with_pole(5e7)
            .with_input(Some(1e6), 2e-12, None, 1e-12)
            .with_ro(30.0);
        let parts = StageParts {
            rf: Some(4.7e3),
            rg: Some(470.0),
            rl: Some(220.0),
            cl: Some(1e-9),
            cf: Some(2e-12),
            riso: Some(10.0),
            ..StageParts::default()
        };
        for (kind, parts) in [
            (StageKind::CurrentAmplifier, parts),
            (
                StageKind::Transconductance,
                StageParts { rf: None, ..parts },
            ),
        ] {
            let s = Stage {
                kind,
                amplifier: amp.clone(),
                point: SpreadPoint::Typ,
                parts,
            };
            let b = s.circuit().unwrap();
            for f in [1.0, 1e4, 1e6, 1e7, 1e8] {
                let g = asymptotic_gain_at(&b.circuit, "U1", b.source, Output::Current("Rl"), f)
                    .unwrap();
                assert!(
                    g.relative_error < 1e-9,
                    "{kind:?} {f}: {}",
                    g.relative_error
                );
            }
        }
    }
}
