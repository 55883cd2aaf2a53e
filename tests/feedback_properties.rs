//! Property tests of the feedback relations: identities that must hold for every
//! input, on seeded random cases (proptest's default deterministic runner seeds
//! are replaced by a fixed seed so failures reproduce).

use loopwright::feedback::*;
use num_complex::Complex64;
use proptest::prelude::*;
use proptest::test_runner::{Config, RngAlgorithm, TestRng, TestRunner};

/// Relative tolerance for identities that cost a few roundings.
const REL: f64 = 1e-12;

fn runner() -> TestRunner {
    TestRunner::new_with_rng(
        Config {
            cases: 512,
            ..Config::default()
        },
        TestRng::from_seed(RngAlgorithm::ChaCha, &[7u8; 32]),
    )
}

/// Open-loop gains from 1 to 10⁸ in magnitude, either sign.
fn gain() -> impl Strategy<Value = f64> {
    (0.0f64..8.0, prop::bool::ANY)
        .prop_map(|(e, neg)| if neg { -(10f64.powf(e)) } else { 10f64.powf(e) })
}

/// A positive loop gain T from 10⁻³ to 10⁶ (negative feedback).
fn positive_loop_gain() -> impl Strategy<Value = f64> {
    (-3.0f64..6.0).prop_map(|e| 10f64.powf(e))
}

fn close(x: f64, y: f64, rel: f64) -> bool {
    (x - y).abs() <= rel * x.abs().max(y.abs())
}

#[test]
fn closed_loop_gain_times_d_is_a() {
    runner()
        .run(&(gain(), positive_loop_gain()), |(a, t)| {
            let beta = t / a;
            let af = closed_loop_gain(a, beta).unwrap();
            let d = feedback_amount(a, beta).unwrap();
            prop_assert!(close(af * d, a, REL), "Af·D = {} vs A = {a}", af * d);
            Ok(())
        })
        .unwrap();
}

#[test]
fn sensitivity_is_one_over_d() {
    runner()
        .run(&(gain(), positive_loop_gain()), |(a, t)| {
            let beta = t / a;
            let s = gain_sensitivity(a, beta).unwrap();
            prop_assert!(close(s, 1.0 / feedback_amount(a, beta).unwrap(), REL));
            Ok(())
        })
        .unwrap();
}

#[test]
fn closed_loop_gain_approaches_one_over_beta() {
    // |Af·β − 1| = 1/(1 + T) exactly, so it falls as T grows.
    runner()
        .run(
            &(
                prop::num::f64::POSITIVE.prop_filter("useful β", |b| *b > 1e-4 && *b < 1e2),
                2.0f64..9.0,
            ),
            |(beta, e)| {
                let a = 10f64.powf(e) / beta;
                let err = (closed_loop_gain(a, beta).unwrap() * beta - 1.0).abs();
                prop_assert!(close(err, 1.0 / (1.0 + a * beta), 1e-6), "err {err}");
                let err10 = (closed_loop_gain(10.0 * a, beta).unwrap() * beta - 1.0).abs();
                prop_assert!(err10 < err);
                Ok(())
            },
        )
        .unwrap();
}

#[test]
fn inverse_design_round_trips() {
    runner()
        .run(&(gain(), 1e-6f64..1.0), |(a, fraction)| {
            // β for Af = fraction·A, then Af back from β.
            let target = a * fraction;
            let beta = beta_for_gain(a, target).unwrap();
            prop_assert!(close(closed_loop_gain(a, beta).unwrap(), target, 1e-9));
            // Least A for a gain error, then the error back from A.
            let eps = fraction.clamp(1e-6, 0.5);
            let a_min = min_open_loop_gain(beta.abs().max(1e-9), eps).unwrap();
            let b = beta.abs().max(1e-9);
            prop_assert!(close(
                1.0 - closed_loop_gain(a_min, b).unwrap() * b,
                eps,
                1e-9
            ));
            // Gain ceiling for D_req = 1/fraction is the target itself.
            let c = max_closed_loop_gain(a, 1.0 / fraction).unwrap();
            prop_assert!(close(c.closed_loop_gain, target, 1e-12));
            Ok(())
        })
        .unwrap();
}

#[test]
fn impedance_identities_per_topology() {
    // Series-shunt and shunt-series: one port × D, the other ÷ D, so Zif·Zof = Zi·Zo.
    // Series-series: both × D, so Zif·Zof = Zi·Zo·D². Shunt-shunt: both ÷ D.
    let z = || (0.0f64..1e6, -1e6f64..1e6).prop_map(|(re, im)| Complex64::new(re, im));
    let phasor = || (1.0f64..1e6, -3.0f64..3.0).prop_map(|(m, ph)| Complex64::from_polar(m, ph));
    runner()
        .run(&(z(), z(), phasor(), 1e-3f64..10.0), |(zi, zo, a, beta)| {
            let beta = Complex64::new(beta, 0.0);
            let d = Complex64::new(1.0, 0.0) + a * beta;
            for t in Topology::ALL {
                let Ok(r) = impedances_with_feedback(t, zi, zo, a, beta) else {
                    continue;
                };
                let lhs = r.input * r.output;
                let rhs = match t {
                    Topology::SeriesShunt | Topology::ShuntSeries => zi * zo,
                    Topology::SeriesSeries => zi * zo * d * d,
                    Topology::ShuntShunt => zi * zo / (d * d),
                };
                prop_assert!(
                    (lhs - rhs).norm() <= 1e-9 * rhs.norm().max(1e-300),
                    "{t}: {lhs} vs {rhs}"
                );
            }
            Ok(())
        })
        .unwrap();
}

#[test]
fn nothing_returned_is_nan_or_infinite() {
    // Any f64 at all, including NaN, ±∞, subnormals and extremes: a finite answer or
    // a typed error, never a panic.
    let any = prop_oneof![
        Just(f64::NAN),
        Just(f64::INFINITY),
        Just(f64::NEG_INFINITY),
        Just(0.0),
        Just(-0.0),
        Just(f64::MAX),
        Just(f64::MIN_POSITIVE),
        prop::num::f64::ANY,
        -1e3f64..1e3,
    ];
    runner()
        .run(
            &(any.clone(), any.clone(), any.clone(), any),
            |(a, b, c, d)| {
                let finite = |r: loopwright::Result<f64>| r.map_or(true, |x| x.is_finite());
                prop_assert!(finite(closed_loop_gain(a, b)));
                prop_assert!(finite(loop_gain(a, b)));
                prop_assert!(finite(feedback_amount(a, b)));
                prop_assert!(finite(feedback_amount_db(a, b)));
                prop_assert!(finite(gain_sensitivity(a, b)));
                prop_assert!(finite(beta_for_gain(a, b)));
                prop_assert!(finite(min_open_loop_gain(a, b)));
                if let Ok(g) = max_closed_loop_gain(a, b) {
                    prop_assert!(g.closed_loop_gain.is_finite() && g.beta.is_finite());
                }
                if let Ok(s) = gain_spread(a, b, c, d) {
                    for x in [
                        s.at_min,
                        s.at_typ,
                        s.at_max,
                        s.spread_percent,
                        s.spread_ppm,
                        s.low_percent,
                        s.high_percent,
                        s.sensitivity,
                    ] {
                        prop_assert!(x.is_finite());
                    }
                }
                if let Ok(r) =
                    resistances_with_feedback(Topology::SeriesSeries, a.abs(), b.abs(), c, d)
                {
                    prop_assert!(r.0.is_finite() && r.1.is_finite());
                }
                if let Ok(s) = summarize(Topology::ShuntShunt, a, b) {
                    prop_assert!(
                        s.closed_loop_gain.is_finite() && s.feedback_amount_db.is_finite()
                    );
                }
                Ok(())
            },
        )
        .unwrap();
}
