//! Double injection (src/stage/injection.rs) against the return ratio at the
//! amplifier (src/stage/loop_gain.rs) where both apply: a loop with one path
//! through the break (no Cf across Rf), over seeded random stages. Two
//! independent routes: two solves of the circuit with injected sources and
//! Middlebrook's combination, against the controlled source opened.
#![cfg(not(target_arch = "wasm32"))] // proptest is a native-only dev-dependency

use loopwright::stage::injection::{double_injection, LoopDirection};
use loopwright::stage::loop_gain::return_ratio_samples;
use loopwright::stage::{Amplifier, Spread, SpreadPoint, Stage, StageKind, StageParts};
use proptest::prelude::*;
use proptest::test_runner::{Config, RngAlgorithm, TestRng, TestRunner};

/// The two routes agree to rounding of two solves and the combination
/// (T_v + T_i + 2 loses digits where both ratios are large); worst measured
/// in this run is printed. 1e-7 relative leaves room.
const SAME_T_REL: f64 = 1e-7;
const FREQS: [f64; 6] = [1.0, 1e3, 1e5, 1e6, 1e7, 1e8];

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
        log_uniform(1.0, 200.0),
        opt(1e-13, 1e-11),
    )
        .prop_map(|(a0, gbw, ro, cd)| {
            Amplifier::from_gbw(Spread::fixed(a0), gbw)
                .with_ro(ro)
                .with_input(Some(1e6), cd.unwrap_or(0.0), None, 0.0)
        });
    let parts = (
        log_uniform(1e2, 1e6),
        log_uniform(1e2, 1e6),
        opt(1.0, 1e3),
        opt(1e-12, 1e-9),
        opt(1e2, 1e4),
        opt(1e-11, 1e-8),
        opt(1.0, 100.0),
    );
    (0..3usize, amp, parts).prop_map(|(k, amplifier, (rf, rg, rs, cs, rl, cl, riso))| {
        let kind = StageKind::ALL[k];
        Stage {
            kind,
            amplifier,
            point: SpreadPoint::Typ,
            parts: StageParts {
                rf: Some(rf),
                rg: (kind != StageKind::Transimpedance).then_some(rg),
                rs,
                cs,
                rl,
                cl,
                riso,
                ..StageParts::default()
            },
        }
    })
}

#[test]
fn double_injection_equals_the_return_ratio() {
    let runner = TestRunner::new_with_rng(
        Config {
            cases: 48,
            ..Config::default()
        },
        TestRng::from_seed(RngAlgorithm::ChaCha, &[53; 32]),
    );
    let worst = std::cell::Cell::new(0.0f64);
    let mut runner = runner;
    runner
        .run(&stage(), |s| {
            let b = s.circuit().unwrap();
            let t = return_ratio_samples(&b.circuit, "U1", &FREQS).unwrap();
            let d = double_injection(&b.circuit, "fb", "Rf", LoopDirection::FromElement, &FREQS)
                .unwrap();
            for (a, w) in d.loop_gain.complex().iter().zip(&t) {
                let e = (a - w).norm() / w.norm();
                worst.set(worst.get().max(e));
                prop_assert!(e < SAME_T_REL, "{a} vs {w}: {s:?}");
            }
            Ok(())
        })
        .unwrap();
    println!("worst relative difference {:.1e}", worst.get());
}

#[test]
fn one_sided_ratios_differ_where_the_break_is_loaded() {
    // At the − input of an inverting stage the driver (Rf from the output)
    // and the load (the input's 1 MΩ ‖ Rg) are finite on both sides, so
    // neither T_v nor T_i alone is T, but their combination is.
    let s = Stage {
        kind: StageKind::Inverting,
        amplifier: Amplifier::from_gbw(Spread::fixed(1e5), 1e7)
            .with_ro(50.0)
            .with_input(Some(1e4), 0.0, None, 0.0),
        point: SpreadPoint::Typ,
        parts: StageParts {
            rf: Some(1e4),
            rg: Some(1e3),
            ..StageParts::default()
        },
    }
    .circuit()
    .unwrap();
    let f = [1e3];
    let d = double_injection(&s.circuit, "fb", "Rf", LoopDirection::FromElement, &f).unwrap();
    let t = return_ratio_samples(&s.circuit, "U1", &f).unwrap()[0];
    let (tv, ti) = (d.voltage_ratio.complex()[0], d.current_ratio.complex()[0]);
    assert!((tv - t).norm() > 1e-3 * t.norm() && (ti - t).norm() > 1e-3 * t.norm());
    assert!((d.loop_gain.complex()[0] - t).norm() < SAME_T_REL * t.norm());
}

#[test]
fn bad_break_points_are_typed_errors() {
    let s = Stage {
        kind: StageKind::Inverting,
        amplifier: Amplifier::from_gbw(Spread::fixed(1e5), 1e7),
        point: SpreadPoint::Typ,
        parts: StageParts {
            rf: Some(1e4),
            rg: Some(1e3),
            ..StageParts::default()
        },
    }
    .circuit()
    .unwrap();
    let c = &s.circuit;
    let way = LoopDirection::IntoElement;
    assert_eq!(
        double_injection(c, "in", "Rf", way, &[1.0])
            .unwrap_err()
            .error
            .param(),
        "node"
    );
    assert_eq!(
        double_injection(c, "out", "U1", way, &[1.0])
            .unwrap_err()
            .error
            .param(),
        "element"
    );
    assert_eq!(
        double_injection(c, "out", "Rf", way, &[0.0])
            .unwrap_err()
            .error
            .param(),
        "frequency"
    );
    assert_eq!(
        double_injection(c, "out", "Rx", way, &[1.0])
            .unwrap_err()
            .error
            .code(),
        "unknown_name"
    );
}
