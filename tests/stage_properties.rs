//! Property tests of the stage area on seeded random stages (bounded case
//! counts so the suite stays fast):
//! - a stage built from its document and the same circuit typed by hand with
//!   the circuit API give the same loop gain, closed-loop gain and poles;
//! - the loop gain reproduces the direct closed-loop solve through the
//!   asymptotic-gain identity Af = G∞·T/(1 + T) + G0/(1 + T) (exact);
//! - the verdict from the poles says "stable" exactly when no pole has a
//!   positive real part.
#![cfg(not(target_arch = "wasm32"))] // proptest is a native-only dev-dependency

use loopwright::circuit::blackman::Output;
use loopwright::circuit::Circuit;
use loopwright::freq::Verdict;
use loopwright::stage::asymptotic::asymptotic_gain_at;
use loopwright::stage::closed_loop::gain_sweep;
use loopwright::stage::loop_gain::return_ratio_samples;
use loopwright::stage::poles::circuit_poles;
use loopwright::stage::{
    read_stage, write_stage, Amplifier, Spread, SpreadPoint, Stage, StageKind, StageParts,
};
use proptest::prelude::*;
use proptest::test_runner::{Config, RngAlgorithm, TestRng, TestRunner};

/// The identity is exact; 1e-9 allows for the conditioning of loops with A0 up
/// to 1e6 and parts over six decades.
const IDENTITY_REL: f64 = 1e-9;

fn runner(cases: u32, seed: u8) -> TestRunner {
    TestRunner::new_with_rng(
        Config {
            cases,
            ..Config::default()
        },
        TestRng::from_seed(RngAlgorithm::ChaCha, &[seed; 32]),
    )
}

fn log_uniform(lo: f64, hi: f64) -> impl Strategy<Value = f64> {
    (lo.log10()..hi.log10()).prop_map(|e| 10f64.powf(e))
}

fn opt(lo: f64, hi: f64) -> impl Strategy<Value = Option<f64>> {
    prop_oneof![Just(None), log_uniform(lo, hi).prop_map(Some)]
}

fn stage() -> impl Strategy<Value = Stage> {
    let amp = (
        log_uniform(1e3, 1e6),
        log_uniform(1e5, 1e8),
        opt(1e7, 1e9),
        opt(1e-13, 1e-11),
        log_uniform(1.0, 100.0),
    )
        .prop_map(|(a0, gbw, p2, cd, ro)| {
            let mut a = Amplifier::from_gbw(Spread::fixed(a0), gbw).with_ro(ro);
            if let Some(p) = p2 {
                a = a.with_pole(p.max(gbw * 1.5));
            }
            a.with_input(Some(1e6), cd.unwrap_or(0.0), None, 0.0)
        });
    let parts = (
        log_uniform(1e2, 1e6),
        log_uniform(1e2, 1e6),
        opt(1e-13, 1e-10),
        opt(1.0, 1e3),
        opt(1e-12, 1e-9),
        opt(1e2, 1e4),
        opt(1e-11, 1e-8),
        opt(1.0, 100.0),
    );
    (0..3usize, amp, parts).prop_map(|(k, amplifier, (rf, rg, cf, rs, cs, rl, cl, riso))| {
        let kind = StageKind::ALL[k];
        Stage {
            kind,
            amplifier,
            point: SpreadPoint::Typ,
            parts: StageParts {
                rf: Some(rf),
                rg: (kind != StageKind::Transimpedance).then_some(rg),
                cf,
                rs,
                cs,
                rl,
                cl,
                riso,
            },
        }
    })
}

/// The circuit of docs/stage.md's table, typed by hand with the circuit API.
fn by_hand(s: &Stage) -> Circuit {
    let p = &s.parts;
    let mut c = Circuit::new();
    let pin = if p.riso.is_some() { "amp" } else { "out" };
    match s.kind {
        StageKind::Transimpedance => {
            c.current_source("Is", "0", "fb", 1.0).unwrap();
            if let Some(v) = p.cs {
                c.capacitor("Cs", "fb", "0", v).unwrap();
            }
            if let Some(v) = p.rs {
                c.resistor("Rs", "fb", "0", v).unwrap();
            }
        }
        _ => {
            match p.rs {
                Some(v) => {
                    c.voltage_source("Vs", "src", "0", 1.0).unwrap();
                    c.resistor("Rs", "src", "in", v).unwrap();
                }
                None => c.voltage_source("Vs", "in", "0", 1.0).unwrap(),
            }
            if let Some(v) = p.cs {
                c.capacitor("Cs", "in", "0", v).unwrap();
            }
            if s.kind == StageKind::Inverting {
                c.resistor("Rg", "in", "fb", p.rg.unwrap()).unwrap();
            }
        }
    }
    let plus = if s.kind == StageKind::NonInverting {
        "in"
    } else {
        "0"
    };
    c.amplifier("U1", pin, "0", plus, "fb", s.amplifier.clone(), s.point)
        .unwrap();
    c.resistor("Rf", pin, "fb", p.rf.unwrap()).unwrap();
    if let Some(v) = p.cf {
        c.capacitor("Cf", pin, "fb", v).unwrap();
    }
    if s.kind == StageKind::NonInverting {
        c.resistor("Rg", "fb", "0", p.rg.unwrap()).unwrap();
    }
    if let Some(v) = p.riso {
        c.resistor("Riso", "amp", "out", v).unwrap();
    }
    if let Some(v) = p.rl {
        c.resistor("Rl", "out", "0", v).unwrap();
    }
    if let Some(v) = p.cl {
        c.capacitor("Cl", "out", "0", v).unwrap();
    }
    c
}

const FREQS: [f64; 6] = [1.0, 1e3, 1e5, 1e6, 1e7, 1e8];

#[test]
fn document_and_hand_typed_circuit_agree() {
    runner(48, 17)
        .run(&stage(), |s| {
            let doc = read_stage(&write_stage(&s)).unwrap();
            prop_assert_eq!(&doc, &s);
            let built = doc.circuit().unwrap();
            let hand = by_hand(&s);
            let t1 = return_ratio_samples(&built.circuit, "U1", &FREQS).unwrap();
            let t2 = return_ratio_samples(&hand, "U1", &FREQS).unwrap();
            // The same elements in an order the builder may differ in: the
            // solves differ by rounding only.
            for (a, b) in t1.iter().zip(&t2) {
                prop_assert!((a - b).norm() <= 1e-12 * b.norm(), "{a} vs {b}");
            }
            let h1 = gain_sweep(
                &built.circuit,
                built.source,
                Output::Voltage("out", "0"),
                &FREQS,
            )
            .unwrap();
            let h2 = gain_sweep(&hand, built.source, Output::Voltage("out", "0"), &FREQS).unwrap();
            for (a, b) in h1.complex().iter().zip(h2.complex()) {
                prop_assert!((a - b).norm() <= 1e-12 * b.norm());
            }
            let p1 = circuit_poles(&built.circuit).unwrap();
            let p2 = circuit_poles(&hand).unwrap();
            prop_assert_eq!(p1.poles.len(), p2.poles.len());
            prop_assert_eq!(p1.verdict, p2.verdict);
            Ok(())
        })
        .unwrap();
}

#[test]
fn loop_gain_reproduces_the_closed_loop_solve() {
    runner(48, 23)
        .run(&stage(), |s| {
            let b = s.circuit().unwrap();
            for f in FREQS {
                let g =
                    asymptotic_gain_at(&b.circuit, "U1", b.source, Output::Voltage("out", "0"), f)
                        .unwrap();
                prop_assert!(g.relative_error < IDENTITY_REL, "{f}: {}", g.relative_error);
            }
            Ok(())
        })
        .unwrap();
}

#[test]
fn poles_do_not_change_when_every_impedance_is_scaled() {
    // Impedance scaling (any network text, e.g. Van Valkenburg, Analog Filter
    // Design, 1982, ch. 1, from memory): every R times k and every C over k
    // keeps each RC product and each resistor ratio, so the natural
    // frequencies stay. Applied to the parts and the amplifier's Ro, Rd, Cd.
    let scaled = (stage(), log_uniform(1e-2, 1e2));
    runner(48, 31)
        .run(&scaled, |(s, k)| {
            let mut t = s.clone();
            let p = &mut t.parts;
            for r in [&mut p.rf, &mut p.rg, &mut p.rs, &mut p.rl, &mut p.riso] {
                *r = r.map(|v| v * k);
            }
            for c in [&mut p.cf, &mut p.cs, &mut p.cl] {
                *c = c.map(|v| v / k);
            }
            t.amplifier.ro *= k;
            t.amplifier.rd = t.amplifier.rd.map(|v| v * k);
            t.amplifier.cd /= k;
            let a = circuit_poles(&s.circuit().unwrap().circuit).unwrap();
            let b = circuit_poles(&t.circuit().unwrap().circuit).unwrap();
            prop_assert_eq!(a.poles.len(), b.poles.len());
            prop_assert_eq!(a.verdict, b.verdict);
            for (x, y) in a.poles.iter().zip(&b.poles) {
                let d = (x.re - y.re).hypot(x.im - y.im);
                prop_assert!(d <= 1e-8 * x.re.hypot(x.im), "{x:?} vs {y:?}");
            }
            prop_assert!(
                a.verdict != Verdict::Marginal
                    || a.poles
                        .iter()
                        .any(|q| q.re.abs() <= 1e-9 * q.re.hypot(q.im))
            );
            Ok(())
        })
        .unwrap();
}
