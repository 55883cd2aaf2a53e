//! The stage area against sources outside the project:
//! - loop gain, closed-loop gain, output and input impedance and closed-loop poles
//!   of nine stages, from tests/reference/stage_sympy.py (sympy exact rational
//!   loop gain, mpmath closed-loop solve, numpy impedances, sympy roots of the
//!   characteristic polynomial cross-checked there with scipy's generalized
//!   eigenvalues) → tests/reference/data/stage_sympy.json;
//! - facts of the trade about stage loop gains, each marked with its source.

use loopwright::circuit::blackman::Output;
use loopwright::freq::Verdict;
use loopwright::stage::closed_loop::{gain_sweep, impedance_sweep};
use loopwright::stage::loop_gain::loop_gain;
use loopwright::stage::poles::circuit_poles;
use loopwright::stage::{read_stage, Amplifier, Spread, SpreadPoint, Stage, StageKind, StageParts};
use num_complex::Complex64;
use serde::Deserialize;
use std::f64::consts::TAU;

/// Loop gain and closed-loop gain against sympy/mpmath at 30 digits: the nodal
/// solve equilibrates and refines once; the worst measured is 1.1e-15 (printed
/// by the test); 1e-12 leaves room across platforms and library versions.
const EXACT_REL: f64 = 1e-12;
/// Impedances against numpy.linalg.solve in double precision without
/// refinement: numpy's own rounding on the worse-conditioned input ports is
/// the larger part of the difference (worst measured 3.1e-11).
const NUMPY_REL: f64 = 1e-9;
/// Poles against the sympy roots (30 digits) of the characteristic
/// polynomial: the refined eigenvalues reach 5e-16 (measured); 1e-10 leaves room.
const POLE_REL: f64 = 1e-10;

#[derive(Deserialize)]
struct Case {
    label: String,
    stage: serde_json::Value,
    freqs: Vec<f64>,
    loop_gain: Vec<[f64; 2]>,
    closed_loop: Vec<[f64; 2]>,
    zout: Vec<[f64; 2]>,
    zin: Option<Vec<[f64; 2]>>,
    poles: Vec<[f64; 2]>,
    stable: bool,
}

#[derive(Deserialize)]
struct Reference {
    cases: Vec<Case>,
}

fn reference() -> Reference {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/reference/data/stage_sympy.json"
    );
    serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap()
}

/// Impedances below this count as zero (Ω): an ideal output (Ro = 0) has
/// exactly zero output impedance, which numpy finds exactly and loopwright's
/// solve to rounding (about 1e-12 Ω: the loop's A0 = 1e6 times ε times the
/// network's 1e5 Ω scale, measured); the smallest resistance in the cases
/// is 10 Ω, so 1 mΩ is zero for all of them.
const ZERO_OHM: f64 = 1e-3;

/// Worst relative difference, against max(|want|, floor).
fn worst_floor(got: &[Complex64], want: &[[f64; 2]], floor: f64) -> f64 {
    assert_eq!(got.len(), want.len());
    got.iter()
        .zip(want)
        .map(|(g, w)| {
            let w = Complex64::new(w[0], w[1]);
            (g - w).norm() / w.norm().max(floor)
        })
        .fold(0.0, f64::max)
}

fn worst(got: &[Complex64], want: &[[f64; 2]]) -> f64 {
    assert_eq!(got.len(), want.len());
    got.iter()
        .zip(want)
        .map(|(g, w)| {
            let w = Complex64::new(w[0], w[1]);
            // Both exactly zero (an ideal source's output impedance) is agreement.
            (g - w).norm() / w.norm().max(f64::MIN_POSITIVE)
        })
        .fold(0.0, f64::max)
}

#[test]
fn nine_stages_match_the_reference() {
    let r = reference();
    assert!(r.cases.len() >= 8);
    for c in &r.cases {
        let stage = read_stage(&c.stage.to_string()).unwrap();
        let b = stage.circuit().unwrap();
        let t = loop_gain(&b.circuit, "U1", &c.freqs).unwrap();
        let e_t = worst(&t.complex(), &c.loop_gain);
        let h = gain_sweep(&b.circuit, b.source, Output::Voltage("out", "0"), &c.freqs).unwrap();
        let e_h = worst(&h.complex(), &c.closed_loop);
        let zo = impedance_sweep(&b.circuit, "out", "0", &c.freqs).unwrap();
        let e_zo = worst_floor(&zo.complex(), &c.zout, ZERO_OHM);
        let input = b.input_impedance_circuit().unwrap();
        let zi = impedance_sweep(&input, b.input, "0", &c.freqs);
        let e_zi = match (&c.zin, zi) {
            (Some(want), Ok(got)) => worst_floor(&got.complex(), want, ZERO_OHM),
            // numpy found the input floating; loopwright must name it.
            (None, Err(e)) => {
                assert_eq!(
                    (e.error.code(), e.name.as_str()),
                    ("singular", b.input),
                    "{}",
                    c.label
                );
                0.0
            }
            (want, got) => panic!("{}: zin {:?} vs {:?}", c.label, want.is_some(), got.is_ok()),
        };
        println!(
            "{}: T {e_t:.1e}, Af {e_h:.1e}, Zout {e_zo:.1e}, Zin {e_zi:.1e}",
            c.label
        );
        assert!(e_t < EXACT_REL, "{}: loop gain {e_t}", c.label);
        assert!(e_h < EXACT_REL, "{}: closed loop {e_h}", c.label);
        assert!(e_zo < NUMPY_REL, "{}: zout {e_zo}", c.label);
        assert!(e_zi < NUMPY_REL, "{}: zin {e_zi}", c.label);
        let p = circuit_poles(&b.circuit).unwrap();
        assert_eq!(p.poles.len(), c.poles.len(), "{}: {:?}", c.label, p.poles);
        let mut e_p: f64 = 0.0;
        for (g, w) in p.poles.iter().zip(&c.poles) {
            let (g, w) = (Complex64::new(g.re, g.im), Complex64::new(w[0], w[1]));
            e_p = e_p.max((g - w).norm() / w.norm());
        }
        println!("  poles {e_p:.1e}");
        assert!(e_p < POLE_REL, "{}: poles {e_p}", c.label);
        assert_eq!(p.verdict == Verdict::Stable, c.stable, "{}", c.label);
    }
}

fn ideal_amp() -> Amplifier {
    Amplifier::from_gbw(Spread::fixed(1e6), 1e7)
}

fn stage(kind: StageKind, amplifier: Amplifier, parts: StageParts) -> Stage {
    Stage {
        kind,
        amplifier,
        point: SpreadPoint::Typ,
        parts,
    }
}

/// T(jω)/A(jω): the feedback factor the loop sees, from the circuit's loop gain.
fn beta(s: &Stage, f: f64) -> Complex64 {
    let b = s.circuit().unwrap();
    let t = loop_gain(&b.circuit, "U1", &[f]).unwrap().complex()[0];
    t / s.amplifier.open_loop_gain(f, SpreadPoint::Typ).unwrap()
}

#[test]
fn input_capacitance_pole_sits_at_one_over_rf_parallel_rg_times_cin() {
    // Fact of the trade: the amplifier's input capacitance and the feedback
    // resistors put a pole in β at 1/(2π·(Rf‖Rg)·Cin). Common practice; e.g.
    // S. Franco, Design with Operational Amplifiers and Analog Integrated
    // Circuits, 4th ed., ch. 8 (from memory). Inverting stage, + input at
    // ground, so Cin = Cd + Ccm at the − input; ideal output (Ro = 0): exact.
    let (rf, rg, cd, ccm) = (100e3, 100e3, 8e-12, 4e-12);
    let s = stage(
        StageKind::Inverting,
        ideal_amp().with_input(None, cd, None, ccm),
        StageParts {
            rf: Some(rf),
            rg: Some(rg),
            ..StageParts::default()
        },
    );
    let fp = 1.0 / (TAU * (rf * rg / (rf + rg)) * (cd + ccm));
    let b = beta(&s, fp);
    let b0 = rg / (rf + rg);
    assert!((b.norm() - b0 / 2f64.sqrt()).abs() < 1e-9 * b0, "{b}");
    assert!((b.arg().to_degrees() + 45.0).abs() < 1e-7, "{b}");
}

#[test]
fn capacitive_load_pole_is_ro_times_cl() {
    // Fact of the trade: the output resistance and a capacitive load add a
    // pole to the loop gain at 1/(2π·Ro·Cl) (common practice, no source). With
    // the feedback network Rf + Rg across the output too, the exact pole is at
    // 1/(2π·(Ro‖(Rf + Rg))·Cl) and the divider scales β; check both.
    let (ro, cl, rf, rg) = (50.0, 10e-9, 1e3, 1e3);
    let s = stage(
        StageKind::NonInverting,
        ideal_amp().with_ro(ro),
        StageParts {
            rf: Some(rf),
            rg: Some(rg),
            cl: Some(cl),
            ..StageParts::default()
        },
    );
    let rn = rf + rg;
    let exact_pole = 1.0 / (TAU * (ro * rn / (ro + rn)) * cl);
    let b = beta(&s, exact_pole);
    let b0 = rg / rn * rn / (rn + ro);
    assert!((b.norm() - b0 / 2f64.sqrt()).abs() < 1e-9 * b0, "{b}");
    assert!((b.arg().to_degrees() + 45.0).abs() < 1e-7);
    // The rule of thumb 1/(2π·Ro·Cl) is within Ro/(Rf + Rg) = 2.5 % of it.
    let rule = 1.0 / (TAU * ro * cl);
    assert!((rule / exact_pole - 1.0).abs() < ro / rn * 1.01);
}

#[test]
fn isolation_resistor_adds_a_zero_at_riso_times_cl() {
    // Fact of the trade: with an isolation resistor between the amplifier and a
    // capacitive load, feedback taken at the amplifier's pin, β has the pole
    // 1/(2π·(Ro + Riso)·Cl) and the zero 1/(2π·Riso·Cl) (common practice, no
    // source). Rf + Rg = 2 MΩ makes the network's own loading 5e-5 of Ro, so
    // β ≈ β0·(1 + s·Riso·Cl)/(1 + s·(Ro + Riso)·Cl) within 1e-4.
    let (ro, riso, cl) = (50.0, 20.0, 10e-9);
    let s = stage(
        StageKind::NonInverting,
        ideal_amp().with_ro(ro),
        StageParts {
            rf: Some(1e6),
            rg: Some(1e6),
            cl: Some(cl),
            riso: Some(riso),
            ..StageParts::default()
        },
    );
    for f in [
        1e3,
        1e5,
        1.0 / (TAU * (ro + riso) * cl),
        1.0 / (TAU * riso * cl),
        1e7,
    ] {
        let w = TAU * f;
        let want =
            0.5 * Complex64::new(1.0, w * riso * cl) / Complex64::new(1.0, w * (ro + riso) * cl);
        let got = beta(&s, f);
        assert!(
            (got - want).norm() < 1e-4 * want.norm(),
            "{f}: {got} vs {want}"
        );
    }
}
