//! The loop of any circuit through the one margin engine (`freq::margins_of`,
//! `freq::nyquist_of`):
//! - a follower's return ratio is A(jω) exactly, so its circuit margins equal
//!   the pole-list margins of the amplifier's model (an independent route: the
//!   nodal solve against the model's factor product);
//! - property tests on seeded random stages and pole-list loops: the verdict
//!   from the encirclement count (Z = N + P) equals the verdict from the
//!   closed-loop poles; margins do not change with the grid density;
//! - Nyquist cases with known answers (an integrator, an open-loop unstable
//!   loop held by feedback, an unstable three-pole loop).
#![cfg(not(target_arch = "wasm32"))] // proptest is a native-only dev-dependency

use loopwright::circuit::Circuit;
use loopwright::freq::{
    closed_loop_poles, nyquist, stability_margins, FeedbackLoop, TransferModel, Verdict,
};
use loopwright::stage::margins::{circuit_margins, circuit_margins_with_density};
use loopwright::stage::nyquist::circuit_nyquist;
use loopwright::stage::poles::circuit_poles;
use loopwright::stage::{Amplifier, Spread, SpreadPoint, Stage, StageKind, StageParts};
use proptest::prelude::*;
use proptest::test_runner::{Config, RngAlgorithm, TestRng, TestRunner};
use std::cell::Cell;

/// Crossing frequencies found on two routes to the same T: both are refined
/// by Brent to 1e-12 relative; the nodal solve and the factor product differ
/// by rounding (1e-15 relative on T), which moves a crossing by far less.
const SAME_T_FREQ_REL: f64 = 1e-9;
/// Margins on two routes to the same T, degrees or dB.
const SAME_T_MARGIN: f64 = 1e-7;
/// Margins at two grid densities: the same crossings refined to 1e-12
/// relative; 1e-6 deg (dB) leaves room for a crossing at a steep phase.
const DENSITY_MARGIN: f64 = 1e-6;

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

/// Random stages, stable and unstable: further poles from 1/20 of the
/// gain-bandwidth product up, sometimes a complex pair (Q 0.5…10), capacitive loads up to
/// 100 nF, feedback capacitors, photodiode capacitance.
fn stage() -> impl Strategy<Value = Stage> {
    let amp = (
        log_uniform(1e3, 1e6),
        log_uniform(1e5, 1e8),
        opt(0.05, 20.0),
        opt(0.2, 10.0),
        log_uniform(0.5, 10.0),
        log_uniform(1.0, 200.0),
        opt(1e-13, 1e-11),
    )
        .prop_map(|(a0, gbw, p2, pair, q, ro, cd)| {
            let mut a = Amplifier::from_gbw(Spread::fixed(a0), gbw).with_ro(ro);
            if let Some(k) = p2 {
                a = a.with_pole(k * gbw);
            }
            if let Some(k) = pair {
                a = a.with_complex_pole(k * gbw, q);
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
        opt(1e-11, 1e-7),
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

#[test]
fn a_followers_circuit_margins_equal_the_pole_list_margins() {
    // Ro = 0 and no input parts: the return ratio of a follower is A(jω)
    // itself (β = 1), so both routes read the same T.
    let amp = Amplifier::from_gbw(Spread::fixed(2e5), 1e7)
        .with_pole(2e7)
        .with_complex_pole(6e7, 2.0);
    let mut c = Circuit::new();
    c.voltage_source("Vs", "in", "0", 1.0).unwrap();
    c.amplifier("U1", "out", "0", "in", "out", amp.clone(), SpreadPoint::Typ)
        .unwrap();
    let got = circuit_margins(&c, "U1").unwrap();
    let l = FeedbackLoop::with_constant_beta(amp.transfer_model(SpreadPoint::Typ).unwrap(), 1.0)
        .unwrap();
    let want = stability_margins(&l).unwrap();
    assert_eq!(got.gain_crossings.len(), want.gain_crossings.len());
    assert_eq!(got.phase_crossings.len(), want.phase_crossings.len());
    assert_eq!(got.closed_loop, want.closed_loop);
    assert_eq!(got.validity, want.validity);
    for (g, w) in got
        .gain_crossings
        .iter()
        .chain(&got.phase_crossings)
        .zip(want.gain_crossings.iter().chain(&want.phase_crossings))
    {
        assert!(
            (g.freq_hz / w.freq_hz - 1.0).abs() < SAME_T_FREQ_REL,
            "{g:?} vs {w:?}"
        );
        assert!(
            (g.margin - w.margin).abs() < SAME_T_MARGIN,
            "{g:?} vs {w:?}"
        );
        assert_eq!(g.rising, w.rising);
    }
    // The Nyquist reading agrees too.
    let (nc, nl) = (circuit_nyquist(&c, "U1").unwrap(), nyquist(&l).unwrap());
    assert_eq!(nc.encirclements, nl.encirclements);
    assert!((nc.least_distance.distance / nl.least_distance.distance - 1.0).abs() < 1e-9);
}

#[test]
fn circuit_verdict_from_encirclements_equals_the_verdict_from_its_poles() {
    let (stable, unstable) = (Cell::new(0), Cell::new(0));
    runner(96, 17)
        .run(&stage(), |s| {
            let b = s.circuit().unwrap();
            let poles = circuit_poles(&b.circuit).unwrap();
            let n = circuit_nyquist(&b.circuit, "U1").unwrap();
            let rhp = poles.poles.iter().filter(|p| p.re > 0.0).count() as i64;
            prop_assert_eq!(n.encirclements.verdict, poles.verdict, "{:?}", s);
            prop_assert_eq!(n.encirclements.closed_loop_rhp_poles, rhp, "{:?}", s);
            if poles.verdict == Verdict::Stable {
                stable.set(stable.get() + 1);
            } else {
                unstable.set(unstable.get() + 1);
            }
            Ok(())
        })
        .unwrap();
    // The generator reaches both sides, or the property says little.
    let (stable, unstable) = (stable.get(), unstable.get());
    assert!(
        stable > 10 && unstable > 10,
        "{stable} stable, {unstable} unstable"
    );
}

/// Random pole-list loops with integrators, low cuts, right-half-plane poles
/// and zeros, complex pairs, either sign of feedback.
fn pole_list_loop() -> impl Strategy<Value = FeedbackLoop> {
    (
        (log_uniform(0.1, 1e5), any::<bool>(), 0..3u32, 0..2usize),
        proptest::collection::vec(log_uniform(1.0, 1e7), 0..4),
        proptest::collection::vec(log_uniform(1.0, 1e7), 0..2),
        opt(1.0, 1e7),
        opt(1.0, 1e7),
        (opt(10.0, 1e6), log_uniform(0.2, 20.0)),
    )
        .prop_map(
            |((k, neg, integ, cuts), poles, zeros, rhp_p, rhp_z, (pair, q))| {
                let mut m = TransferModel::constant(if neg { -k } else { k });
                for p in poles {
                    m = m.pole(p);
                }
                for z in zeros {
                    m = m.zero(z);
                }
                for _ in 0..integ {
                    m = m.integrator();
                }
                for i in 0..cuts {
                    m = m.low_cut(0.1 * (i + 1) as f64);
                }
                if let Some(p) = rhp_p {
                    m = m.rhp_pole(p);
                }
                if let Some(z) = rhp_z {
                    m = m.rhp_zero(z);
                }
                if let Some(f) = pair {
                    m = m.complex_pole(f, q);
                }
                m
            },
        )
        .prop_filter_map("proper loop", |m| {
            FeedbackLoop::with_constant_beta(m, 1.0).ok()
        })
}

#[test]
fn pole_list_verdict_from_encirclements_equals_the_verdict_from_its_poles() {
    let (stable, unstable) = (Cell::new(0), Cell::new(0));
    runner(160, 29)
        .run(&pole_list_loop(), |l| {
            let p = closed_loop_poles(&l).unwrap();
            let n = nyquist(&l).unwrap();
            // A loop whose curve grazes −1 is decided by rounding on both
            // sides; such draws are rare and skipped.
            if p.verdict == Verdict::Marginal || n.least_distance.distance < 1e-6 {
                return Ok(());
            }
            let rhp = p.poles.iter().filter(|q| q.re > 0.0).count() as i64;
            prop_assert_eq!(n.encirclements.closed_loop_rhp_poles, rhp, "{:?}", l);
            prop_assert_eq!(n.encirclements.verdict, p.verdict, "{:?}", l);
            if p.verdict == Verdict::Stable {
                stable.set(stable.get() + 1);
            } else {
                unstable.set(unstable.get() + 1);
            }
            Ok(())
        })
        .unwrap();
    let (stable, unstable) = (stable.get(), unstable.get());
    assert!(
        stable > 10 && unstable > 10,
        "{stable} stable, {unstable} unstable"
    );
}

#[test]
fn circuit_margins_do_not_depend_on_the_grid_density() {
    runner(24, 41)
        .run(&stage(), |s| {
            let b = s.circuit().unwrap();
            let coarse = circuit_margins_with_density(&b.circuit, "U1", 8).unwrap();
            let fine = circuit_margins_with_density(&b.circuit, "U1", 400).unwrap();
            prop_assert_eq!(coarse.gain_crossings.len(), fine.gain_crossings.len());
            prop_assert_eq!(coarse.phase_crossings.len(), fine.phase_crossings.len());
            for (a, b) in [
                (coarse.phase_margin_deg, fine.phase_margin_deg),
                (coarse.gain_margin_db, fine.gain_margin_db),
            ] {
                match (a, b) {
                    (Some(a), Some(b)) => prop_assert!((a - b).abs() < DENSITY_MARGIN, "{a} {b}"),
                    (a, b) => prop_assert_eq!(a, b),
                }
            }
            Ok(())
        })
        .unwrap();
}

#[test]
fn an_integrator_is_passed_on_the_right() {
    // T = K/s·1/(1 + s/ωp) (K = 1000·2π rad/s, fp = 1 MHz): the closed loop
    // s² /ωp + s + K = 0 has both roots in the left half plane (common
    // practice, no source); the curve comes from −j∞ and never circles −1.
    let m = TransferModel::constant(1e3).integrator().pole(1e6);
    let l = FeedbackLoop::with_constant_beta(m, 1.0).unwrap();
    let n = nyquist(&l).unwrap();
    assert_eq!(n.encirclements.origin_poles, 1);
    assert_eq!(n.encirclements.clockwise, 0);
    assert_eq!(n.encirclements.verdict, Verdict::Stable);
    // Three integrators: 1 + K/s³ has two roots in the right half plane (the
    // cube roots of −K: two at ±60°; common practice, no source).
    let m = TransferModel::constant(1.0)
        .integrator()
        .integrator()
        .integrator();
    let n = nyquist(&FeedbackLoop::with_constant_beta(m, 1.0).unwrap()).unwrap();
    assert_eq!(n.encirclements.origin_poles, 3);
    assert_eq!(n.encirclements.closed_loop_rhp_poles, 2);
    assert_eq!(n.encirclements.verdict, Verdict::Unstable);
}

#[test]
fn an_open_loop_unstable_loop_held_by_feedback_circles_counter_clockwise() {
    // T = K/(s/p − 1), K = 3: 1 + T = 0 at s = p·(1 − K) = −2p, stable with one
    // open-loop RHP pole, so N = Z − P = −1 (Nyquist's criterion; common
    // practice, no source).
    let m = TransferModel::constant(-3.0).rhp_pole(1e3);
    let n = nyquist(&FeedbackLoop::with_constant_beta(m, 1.0).unwrap()).unwrap();
    assert_eq!(n.encirclements.open_loop_rhp_poles, 1);
    assert_eq!(n.encirclements.clockwise, -1);
    assert_eq!(n.encirclements.verdict, Verdict::Stable);
    // K = 0.5 < 1: the pole stays at s = p/2 in the right half plane.
    let m = TransferModel::constant(-0.5).rhp_pole(1e3);
    let n = nyquist(&FeedbackLoop::with_constant_beta(m, 1.0).unwrap()).unwrap();
    assert_eq!(n.encirclements.clockwise, 0);
    assert_eq!(n.encirclements.closed_loop_rhp_poles, 1);
}

#[test]
fn least_distance_of_two_equal_poles_matches_a_dense_scan() {
    // T = K/(1 + jx)², x = f/fp: |1 + T|² = ((1 + K − x²)² + 4x²)/(1 + x²)²
    // (algebra on the two-pole loop); its minimum over x is found here by a
    // dense scan (10⁶ points in log x over four decades), an independent
    // brute force.
    let (k, fp) = (99.0, 1e3);
    let m = TransferModel::constant(k).pole(fp).pole(fp);
    let n = nyquist(&FeedbackLoop::with_constant_beta(m, 1.0).unwrap()).unwrap();
    let dist = |x: f64| {
        let num = (1.0 + k - x * x).powi(2) + 4.0 * x * x;
        (num / (1.0 + x * x).powi(2)).sqrt()
    };
    let (mut best, mut at) = (f64::INFINITY, 0.0);
    for i in 0..1_000_000 {
        let x = 10f64.powf(-2.0 + 4.0 * i as f64 / 1e6);
        if dist(x) < best {
            best = dist(x);
            at = x;
        }
    }
    // The scan's step is 9.2e-6 in ln x; near the minimum the distance is
    // flat to second order, so it agrees to about 1e-9.
    assert!((n.least_distance.distance - best).abs() < 1e-8 * best);
    assert!((n.least_distance.freq_hz / (at * fp) - 1.0).abs() < 1e-4);
}

#[test]
fn bad_names_are_typed_errors() {
    let s = Stage {
        kind: StageKind::Inverting,
        amplifier: Amplifier::from_gbw(Spread::fixed(1e5), 1e6),
        point: SpreadPoint::Typ,
        parts: StageParts {
            rf: Some(1e4),
            rg: Some(1e3),
            ..StageParts::default()
        },
    }
    .circuit()
    .unwrap();
    let e = circuit_margins(&s.circuit, "Rf").unwrap_err();
    assert_eq!(e.error.param(), "controlled");
    let e = circuit_nyquist(&s.circuit, "U9").unwrap_err();
    assert_eq!(e.error.param(), "controlled");
    let e = circuit_margins_with_density(&s.circuit, "U1", 2).unwrap_err();
    assert_eq!(e.error.param(), "points_per_decade");
}
