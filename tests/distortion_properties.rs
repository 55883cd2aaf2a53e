//! Properties of the distortion area over seeded random amplifiers and loops:
//! the series result against the numeric Newton + DFT path at small amplitude,
//! and identities of the closed-loop series.
#![cfg(not(target_arch = "wasm32"))]

use loopwright::distortion::{closed_loop_series, series_check, LoopSolver, PowerSeries};
use proptest::prelude::*;
use proptest::test_runner::{Config, RngAlgorithm, TestRng, TestRunner};

/// Cases per property: enough to cover the ranges, small enough to stay fast.
const CASES: u32 = 64;

fn runner(seed: u8) -> TestRunner {
    TestRunner::new_with_rng(
        Config {
            cases: CASES,
            failure_persistence: None,
            ..Config::default()
        },
        TestRng::from_seed(RngAlgorithm::ChaCha, &[seed; 32]),
    )
}

/// A compressive amplifier (a3 opposite in sign to a1, the usual case, so that
/// a3·D and 2·a2²·β never cancel in b3) in a loop with D = 1 … 1000.
fn amplifier_and_loop() -> impl Strategy<Value = (PowerSeries, f64)> {
    (
        1.0f64..4.0,
        0.0f64..3.0,
        -2.0f64..0.5,
        any::<bool>(),
        -2.0f64..0.5,
    )
        .prop_map(|(lg_a1, lg_d, lg_r2, neg2, lg_r3)| {
            let a1 = 10f64.powf(lg_a1);
            let d = 10f64.powf(lg_d);
            let a2 = a1 * 10f64.powf(lg_r2) * if neg2 { -1.0 } else { 1.0 };
            let a3 = -a1 * 10f64.powf(lg_r3);
            (PowerSeries::new(a1, a2, a3).unwrap(), (d - 1.0) / a1)
        })
}

#[test]
fn series_agrees_with_newton_and_dft_at_small_amplitude() {
    // The leading-order HD2 and HD3 of b1, b2, b3 and the numeric spectrum differ
    // by O((X/X_fold)²): below 1 % of the fold amplitude, by less than 1e-3
    // (largest seen with this seed about 8e-5; the bound leaves room, and a wrong
    // power of D in any coefficient would miss it by orders of magnitude).
    runner(11)
        .run(
            &(amplifier_and_loop(), 1e-3f64..1e-2),
            |((amp, beta), frac)| {
                let fold = LoopSolver::new(&amp, beta).unwrap().max_input_amplitude();
                let x = frac * fold;
                let c = series_check(&amp, beta, x, 64).unwrap();
                prop_assert!(
                    c.hd2_difference < 1e-3,
                    "hd2 {} vs {} at x = {x}",
                    c.series_hd2,
                    c.numeric_hd2
                );
                prop_assert!(
                    c.hd3_difference < 1e-3,
                    "hd3 {} vs {} at x = {x}",
                    c.series_hd3,
                    c.numeric_hd3
                );
                Ok(())
            },
        )
        .unwrap();
}

#[test]
fn difference_shrinks_as_the_square_of_amplitude() {
    // Halving the amplitude quarters the series/numeric HD3 difference (within
    // the O(X⁴) next term), while both stay above the DFT's rounding floor.
    runner(12)
        .run(&amplifier_and_loop(), |(amp, beta)| {
            let fold = LoopSolver::new(&amp, beta).unwrap().max_input_amplitude();
            let a = series_check(&amp, beta, 0.02 * fold, 64).unwrap();
            let b = series_check(&amp, beta, 0.01 * fold, 64).unwrap();
            let r = a.hd3_difference / b.hd3_difference;
            prop_assert!((r - 4.0).abs() < 0.05, "ratio {r}");
            Ok(())
        })
        .unwrap();
}

#[test]
fn loop_equation_holds_at_the_numeric_solution() {
    // Identity: y = A(x − β·y) to rounding, anywhere inside the fold.
    runner(13)
        .run(
            &(amplifier_and_loop(), -0.99f64..0.99),
            |((amp, beta), frac)| {
                let s = LoopSolver::new(&amp, beta).unwrap();
                let x = frac * s.max_input_amplitude();
                let y = s.output(x).unwrap();
                let r = y - amp.output(x - beta * y);
                prop_assert!(
                    r.abs() <= 1e-12 * (1.0 + y.abs()),
                    "residual {r} at x = {x}"
                );
                Ok(())
            },
        )
        .unwrap();
}

#[test]
fn closing_two_loops_in_turn_is_one_loop_with_the_sum() {
    // Identity: feedback β1 around A, then β2 around the result, equals β1 + β2
    // around A (the feedback signals add at the input), to third order.
    runner(14)
        .run(
            &(amplifier_and_loop(), 0.0f64..1.0),
            |((amp, beta), split)| {
                let b1 = beta * split;
                let b2 = beta - b1;
                let twice = closed_loop_series(&closed_loop_series(&amp, b1).unwrap(), b2).unwrap();
                let once = closed_loop_series(&amp, beta).unwrap();
                for (t, o) in [
                    (twice.a1, once.a1),
                    (twice.a2, once.a2),
                    (twice.a3, once.a3),
                ] {
                    prop_assert!((t - o).abs() <= 1e-9 * o.abs().max(1e-300), "{t} vs {o}");
                }
                Ok(())
            },
        )
        .unwrap();
}
