//! Whole-stage tolerance (src/tolerance): Monte Carlo, worst case and
//! sensitivities against tests/reference/tolerance_stage.py (numpy Monte
//! Carlo, brute-force corners, sympy derivatives, a closed-form yield), and
//! the properties of the analyses.
#![cfg(not(target_arch = "wasm32"))]

use loopwright::circuit::tolerance::Tolerance;
use loopwright::stage::{Amplifier, Spread, SpreadPoint, Stage, StageKind, StageParts};
use loopwright::tolerance::{
    figure_value, monte_carlo, sensitivity, worst_case, AmplifierSpread, Figure, Limit,
    MonteCarloOptions, PartSpread, TolStage, WorstCaseMethod, DEFAULT_MAX_CORNERS,
};
use proptest::prelude::*;
use serde_json::Value;

include!("fixtures/tolerance_identity.rs");

fn reference() -> Value {
    serde_json::from_str(include_str!("reference/data/tolerance_stage.json")).unwrap()
}

fn num(v: &Value, path: &[&str]) -> f64 {
    path.iter().fold(v, |v, k| &v[*k]).as_f64().unwrap()
}

const A0: Spread = Spread {
    min: 5e4,
    typ: 2e5,
    max: 1e6,
};

fn non_inverting(rf: f64, rg: f64, amplifier: Amplifier) -> Stage {
    Stage {
        kind: StageKind::NonInverting,
        amplifier,
        point: SpreadPoint::Typ,
        parts: StageParts {
            rf: Some(rf),
            rg: Some(rg),
            ..StageParts::default()
        },
    }
}

fn spread(part: &'static str, tolerance: Tolerance) -> PartSpread {
    PartSpread {
        part,
        tolerance: Some(tolerance),
        tempco_ppm: None,
    }
}

fn uniform(part: &'static str, percent: f64) -> PartSpread {
    spread(part, Tolerance::Uniform { percent })
}

fn options(seed: u64, trials: usize) -> MonteCarloOptions {
    MonteCarloOptions {
        seed,
        trials,
        bins: 20,
        keep_failures: 10,
    }
}

/// Two estimates agree within 4 standard errors of their difference.
fn within_4se(rust: f64, numpy: f64, se: f64, what: &str) {
    assert!(
        (rust - numpy).abs() <= 4.0 * se,
        "{what}: rust {rust}, numpy {numpy}, 4 SE {}",
        4.0 * se
    );
}

#[test]
fn ideal_gain48_yield_matches_the_closed_form() {
    // Expected: the exact rational integral of tolerance_stage.py ("ideal48").
    // A0 = 1e12 moves the gain by 48²/1e12, far below the spec's resolution.
    let ts = TolStage::new(
        &non_inverting(47e3, 1e3, Amplifier::from_gbw(Spread::fixed(1e12), 1e7)),
        &[uniform("rf", 1.0), uniform("rg", 1.0)],
        AmplifierSpread::default(),
        [25.0, 25.0],
    )
    .unwrap();
    let spec = [Limit {
        figure: Figure::GainErrorPercent {
            freq_hz: 0.0,
            target: 48.0,
        },
        lower: Some(-0.5),
        upper: Some(0.5),
    }];
    let n = 40_000;
    let mc = monte_carlo(&ts, &spec, options(48, n)).unwrap();
    let p = num(&reference(), &["ideal48", "yield"]);
    let se = (p * (1.0 - p) / n as f64).sqrt();
    within_4se(mc.yield_fraction, p, se, "yield");
    assert_eq!(mc.limits[0].yield_fraction, mc.yield_fraction);
    assert_eq!(
        mc.failed_count,
        n - (mc.yield_fraction * n as f64).round() as usize
    );
    assert_eq!(mc.failed.len(), 10);
    assert!(
        mc.failed
            .iter()
            .all(|f| f.failed_limits == [0]
                && f.figures[0].iter().all(|y| !spec[0].meets(y.unwrap())))
    );
    // Same seed, same numbers; another seed, others.
    let again = monte_carlo(&ts, &spec, options(48, n)).unwrap();
    assert_eq!(again, mc);
    let other = monte_carlo(&ts, &spec, options(49, n)).unwrap();
    assert_ne!(other.yield_fraction, mc.yield_fraction);
}

fn gain48() -> (TolStage, [Limit; 2]) {
    let ts = TolStage::new(
        &non_inverting(47e3, 1e3, Amplifier::from_gbw(A0, 1e7)),
        &[
            uniform("rf", 1.0),
            spread(
                "rg",
                Tolerance::Normal {
                    percent: 1.0,
                    sigmas: 3.0,
                },
            ),
        ],
        AmplifierSpread::default(),
        [25.0, 25.0],
    )
    .unwrap();
    let spec = [
        Limit {
            figure: Figure::GainDb { freq_hz: 2e4 },
            lower: None,
            upper: None,
        },
        Limit {
            figure: Figure::GainErrorPercent {
                freq_hz: 2e4,
                target: 48.0,
            },
            lower: Some(-1.0),
            upper: Some(0.0),
        },
    ];
    (ts, spec)
}

#[test]
fn gain48_monte_carlo_agrees_with_numpy() {
    // Expected: numpy Monte Carlo of the same stage (tolerance_stage.py "gain48", 400 000 trials).
    let r = reference();
    let (ts, spec) = gain48();
    let n = 20_000;
    let mc = monte_carlo(&ts, &spec, options(7, n)).unwrap();
    let nn = num(&r, &["gain48", "trials"]);
    for (k, name) in ["gainDb", "gainErrorPercent"].into_iter().enumerate() {
        let s = mc.limits[k].stats.as_ref().unwrap();
        let sd = num(&r, &["gain48", name, "sd"]);
        within_4se(
            s.mean,
            num(&r, &["gain48", name, "mean"]),
            (sd * sd / n as f64 + sd * sd / nn).sqrt(),
            name,
        );
        // The sd of a sample of 20 000 is within 4 % of the population's (4 SE of
        // an sd is 4/√(2n) ≈ 2 % for a near-normal sample; 4 % allows for the tails).
        assert!((s.sd / sd - 1.0).abs() < 0.04, "{name} sd {} vs {sd}", s.sd);
    }
    let p = num(&r, &["gain48", "gainErrorPercent", "yield"]);
    within_4se(
        mc.limits[1].yield_fraction,
        p,
        (p * (1.0 - p) * (1.0 / n as f64 + 1.0 / nn)).sqrt(),
        "yield",
    );
    assert_eq!(mc.limits[0].yield_fraction, 1.0); // no limits: every trial meets it
    assert!(
        (mc.limits[0].nominal[0] - num(&r, &["gain48", "nominalGainDb"])).abs() < 1e-9,
        "nominal"
    );
}

#[test]
fn gain48_monte_carlo_is_the_same_natively_and_in_wasm() {
    // The native half of the identity check: tests/wasm_tolerance.rs runs the same
    // stage, spec and seed in the browser and compares with the same bits.
    let (ts, spec) = gain48();
    let mc = monte_carlo(&ts, &spec, options(IDENTITY_SEED, IDENTITY_TRIALS)).unwrap();
    let s = mc.limits[0].stats.as_ref().unwrap();
    assert_eq!(mc.yield_fraction.to_bits(), IDENTITY_YIELD_BITS);
    assert_eq!(s.mean.to_bits(), IDENTITY_MEAN_DB_BITS);
    assert_eq!(s.percentiles[3].value.to_bits(), IDENTITY_MEDIAN_DB_BITS);
}

#[test]
fn gain48_corners_match_brute_force_enumeration() {
    // Expected: every corner of Rf, Rg, A0 evaluated in closed form (tolerance_stage.py
    // "gain48.corners"); the circuit solve agrees with G = A/(1 + Aβ) to ~1e-12, so 1e-9.
    let r = reference();
    let (ts, spec) = gain48();
    let wc = worst_case(&ts, &spec, DEFAULT_MAX_CORNERS).unwrap();
    assert_eq!(wc.method, WorstCaseMethod::Corners);
    assert_eq!(wc.parts, ["Rf", "Rg", "U1.a0"]);
    for (k, name) in ["gainDb", "gainErrorPercent"].into_iter().enumerate() {
        let c = &r["gain48"]["corners"][name];
        let f = &wc.figures[k];
        for (got, key) in [(&f.min, "min"), (&f.max, "max")] {
            let want = c[key].as_f64().unwrap();
            assert!(
                (got.value - want).abs() < 1e-9 * want.abs().max(1.0),
                "{name} {key}"
            );
            let values = c[&format!("{key}Values")].as_array().unwrap();
            for (g, w) in got.values.iter().zip(values) {
                assert!(
                    (g / w.as_f64().unwrap() - 1.0).abs() < 1e-12,
                    "{name} {key}"
                );
            }
        }
        assert!(f.searched.is_empty(), "monotonic in every part");
    }
    // The gain error reaches below −1 % at a corner: the spec is not met.
    assert!(!wc.figures[1].meets && !wc.meets);
}

#[test]
fn gain48_sensitivities_match_sympy_derivatives() {
    // Expected: x·∂(20 log10|G|)/∂x by sympy at nominal (tolerance_stage.py
    // "gain48.sensitivityGainDb"); central differences with h = 1e-4·x are good
    // to ~h² relative, so 1e-6 of the largest.
    let r = reference();
    let (ts, spec) = gain48();
    let s = sensitivity(&ts, &spec).unwrap();
    let f = &s.figures[0];
    let want = &r["gain48"]["sensitivityGainDb"];
    let scale = want["Rf"].as_f64().unwrap().abs();
    for p in &f.parts {
        let w = want[p.part.as_str()].as_f64().unwrap();
        assert!(
            (p.per_unit - w).abs() < 1e-6 * scale,
            "{}: {} vs {w}",
            p.part,
            p.per_unit
        );
    }
    let shares: f64 = f.parts.iter().map(|p| p.variance_share).sum();
    assert!((shares - 1.0).abs() < 1e-12);
    // Rf is uniform ±1 % (σ = 0.577 %), Rg normal ±1 % at 3σ (σ ≈ 0.33 %): Rf first.
    assert_eq!(f.tighten_first.as_deref(), Some("Rf"));
}

#[test]
fn phase_margin_monte_carlo_agrees_with_numpy() {
    // Expected: numpy Monte Carlo with brentq crossovers (tolerance_stage.py "margin2").
    let r = reference();
    let ts = TolStage::new(
        &non_inverting(1e3, 1e3, Amplifier::from_gbw(A0, 1e7).with_pole(8e6)),
        &[uniform("rf", 1.0), uniform("rg", 1.0)],
        AmplifierSpread {
            gbw_hz: Some(Spread {
                min: 7e6,
                typ: 1e7,
                max: 1.3e7,
            }),
            ro: None,
        },
        [25.0, 25.0],
    )
    .unwrap();
    let spec = [Limit {
        figure: Figure::PhaseMarginDeg,
        lower: Some(61.0),
        upper: None,
    }];
    let n = 800;
    let mc = monte_carlo(&ts, &spec, options(3, n)).unwrap();
    let nn = num(&r, &["margin2", "trials"]);
    let sd = num(&r, &["margin2", "sd"]);
    let s = mc.limits[0].stats.as_ref().unwrap();
    within_4se(
        s.mean,
        num(&r, &["margin2", "mean"]),
        (sd * sd / n as f64 + sd * sd / nn).sqrt(),
        "mean",
    );
    let p = num(&r, &["margin2", "yield"]);
    within_4se(
        mc.yield_fraction,
        p,
        (p * (1.0 - p) * (1.0 / n as f64 + 1.0 / nn)).sqrt(),
        "yield",
    );
    assert!((mc.limits[0].nominal[0] - num(&r, &["margin2", "nominal"])).abs() < 1e-6);
}

/// Every trial's margins from the Monte Carlo's pole-free path (the nominal
/// stage's grid hints, signed by Nyquist's criterion) against the full path of
/// `figure_value` (the trial's own pole sets; itself checked against numpy in
/// `phase_margin_monte_carlo_agrees_with_numpy`), trial by trial.
fn margins_match_the_full_path(amplifier: Amplifier, gbw: Spread, figures: &[Figure]) -> usize {
    margins_of_stage_match(
        &non_inverting(1e3, 1e3, amplifier),
        &[uniform("rf", 5.0), uniform("rg", 5.0)],
        gbw,
        figures,
    )
}

fn margins_of_stage_match(
    stage: &Stage,
    parts: &[PartSpread],
    gbw: Spread,
    figures: &[Figure],
) -> usize {
    let ts = TolStage::new(
        stage,
        parts,
        AmplifierSpread {
            gbw_hz: Some(gbw),
            ro: None,
        },
        [25.0, 25.0],
    )
    .unwrap();
    // A limit no trial meets keeps every trial, with its figures.
    let spec: Vec<Limit> = figures
        .iter()
        .map(|&figure| Limit {
            figure,
            lower: Some(1e3),
            upper: None,
        })
        .collect();
    let n = 60;
    let mut o = options(11, n);
    o.keep_failures = n;
    let mc = monte_carlo(&ts, &spec, o).unwrap();
    assert_eq!(mc.failed.len(), n);
    let mut negative = 0;
    for t in &mc.failed {
        let stage = ts.stage_at(&t.values, 25.0).unwrap();
        for (k, l) in spec.iter().enumerate() {
            let full = figure_value(&stage, &l.figure, 25.0).ok();
            let fast = t.figures[k][0];
            match (full, fast) {
                (Some(a), Some(b)) => {
                    assert!((a - b).abs() < 1e-6, "trial {}: {a} vs {b}", t.trial);
                    negative += usize::from(b < 0.0);
                }
                (a, b) => assert_eq!(a, b, "trial {}", t.trial),
            }
        }
    }
    negative
}

#[test]
fn monte_carlo_margins_match_the_full_path_trial_by_trial() {
    // The "margin2" stage: stable in every trial.
    let gbw = Spread {
        min: 7e6,
        typ: 1e7,
        max: 1.3e7,
    };
    let stable = margins_match_the_full_path(
        Amplifier::from_gbw(A0, 1e7).with_pole(8e6),
        gbw,
        &[Figure::PhaseMarginDeg],
    );
    assert_eq!(stable, 0);
    // Gain 2 with two more poles at 3 MHz: the phase crosses −180° near the
    // unity-gain crossover, so trials fall on both sides of stability and the
    // unstable ones must carry negative margins (the full path's closed poles).
    let edge = margins_match_the_full_path(
        Amplifier::from_gbw(A0, 1e7).with_pole(3e6).with_pole(3e6),
        gbw,
        &[Figure::PhaseMarginDeg, Figure::GainMarginDb],
    );
    assert!(
        edge > 0,
        "no unstable trial: the case does not test the sign"
    );
}

#[test]
fn temperature_moves_parts_by_their_tempco() {
    // Rf +100 ppm/K and Rg −100 ppm/K over −40 … 85 °C (reference 25 °C):
    // at 85 °C the ratio is 47·(1.006/0.994), the gain 1 + that (the ideal
    // gain, A0 = 1e12); at −40 °C 47·(0.9935/1.0065).
    let sp = |part, tc| PartSpread {
        part,
        tolerance: None,
        tempco_ppm: Some(tc),
    };
    let ts = TolStage::new(
        &non_inverting(47e3, 1e3, Amplifier::from_gbw(Spread::fixed(1e12), 1e7)),
        &[sp("rf", 100.0), sp("rg", -100.0)],
        AmplifierSpread::default(),
        [-40.0, 85.0],
    )
    .unwrap();
    let spec = [Limit {
        figure: Figure::GainErrorPercent {
            freq_hz: 0.0,
            target: 48.0,
        },
        lower: None,
        upper: None,
    }];
    let wc = worst_case(&ts, &spec, DEFAULT_MAX_CORNERS).unwrap();
    let g = |r: f64| ((1.0 + 47.0 * r) / 48.0 - 1.0) * 100.0;
    let f = &wc.figures[0];
    assert!(
        (f.max.value - g(1.006 / 0.994)).abs() < 1e-8,
        "{}",
        f.max.value
    );
    assert_eq!(f.max.temperature_c, 85.0);
    assert!((f.min.value - g(0.9935 / 1.0065)).abs() < 1e-8);
    assert_eq!(f.min.temperature_c, -40.0);
}

#[test]
fn sensitivity_guided_method_finds_the_corner_extremes() {
    // An inverting stage with eight parts at ±1 %: the guided method (forced by
    // allowing fewer corners than 2^8) must find the extremes enumeration finds.
    // Expected: the ideal gain's closed form |G| = Rf/(Rs + Rg)·Rl/(Rl + Riso)
    // (A0 = 1e12, an ideal output) at the corners that raise and lower it.
    let stage = Stage {
        kind: StageKind::Inverting,
        amplifier: Amplifier::from_gbw(Spread::fixed(1e12), 1e7),
        point: SpreadPoint::Typ,
        parts: StageParts {
            rf: Some(10e3),
            rg: Some(1e3),
            cf: Some(1e-12),
            rs: Some(50.0),
            cs: Some(1e-12),
            rl: Some(10e3),
            cl: Some(1e-12),
            riso: Some(10.0),
        },
    };
    let names = ["rf", "rg", "cf", "rs", "cs", "rl", "cl", "riso"];
    let spreads: Vec<PartSpread> = names.iter().map(|p| uniform(p, 1.0)).collect();
    let ts = TolStage::new(&stage, &spreads, AmplifierSpread::default(), [25.0, 25.0]).unwrap();
    let spec = [Limit {
        figure: Figure::GainDb { freq_hz: 0.0 },
        lower: None,
        upper: None,
    }];
    let g = |rf: f64, rs: f64, rg: f64, rl: f64, ri: f64| {
        20.0 * (rf / (rs + rg) * rl / (rl + ri)).log10()
    };
    let hi = g(10.1e3, 49.5, 990.0, 10.1e3, 9.9);
    let lo = g(9.9e3, 50.5, 1010.0, 9.9e3, 10.1);
    let all = worst_case(&ts, &spec, 256).unwrap();
    let guided = worst_case(&ts, &spec, 255).unwrap();
    assert_eq!(all.method, WorstCaseMethod::Corners);
    assert_eq!(guided.method, WorstCaseMethod::SensitivityGuided);
    assert!(guided.evaluations < all.evaluations);
    for wc in [&all, &guided] {
        assert!(
            (wc.figures[0].max.value - hi).abs() < 1e-9,
            "{:?}",
            wc.method
        );
        assert!(
            (wc.figures[0].min.value - lo).abs() < 1e-9,
            "{:?}",
            wc.method
        );
    }
    assert_eq!(
        worst_case(&ts, &spec, 70_000).unwrap_err().error.param(),
        "maxCorners"
    );
}

#[test]
fn bad_input_names_the_field() {
    let (ts, spec) = gain48();
    let mut bad = spec;
    bad[1].lower = Some(1.0);
    assert_eq!(
        worst_case(&ts, &bad, DEFAULT_MAX_CORNERS)
            .unwrap_err()
            .error
            .param(),
        "upper"
    );
    let e = monte_carlo(&ts, &spec, options(1, 100_001)).unwrap_err();
    assert_eq!((e.error.param(), e.error.code()), ("trials", "too_large"));
    assert_eq!(
        monte_carlo(&ts, &spec, options(1, 1))
            .unwrap_err()
            .error
            .param(),
        "trials"
    );
    assert_eq!(sensitivity(&ts, &[]).unwrap_err().error.param(), "spec");
    let e = TolStage::new(
        &non_inverting(47e3, 1e3, Amplifier::from_gbw(A0, 1e7)),
        &[uniform("rf", -1.0)],
        AmplifierSpread::default(),
        [25.0, 25.0],
    )
    .unwrap_err();
    assert_eq!((e.error.param(), e.name.as_str()), ("tolerance", "Rf"));
    let bad_a0 = Spread {
        min: 3e5,
        typ: 2e5,
        max: 1e6,
    };
    let e = TolStage::new(
        &non_inverting(47e3, 1e3, Amplifier::from_gbw(bad_a0, 1e7)),
        &[],
        AmplifierSpread::default(),
        [25.0, 25.0],
    )
    .unwrap_err();
    assert_eq!(e.error.param(), "a0");
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 24, rng_seed: proptest::test_runner::RngSeed::Fixed(18), ..ProptestConfig::default() })]

    #[test]
    fn yield_is_one_when_every_limit_is_wider_than_the_worst_case(
        rf in 1e3f64..1e5, rg in 1e2f64..1e4, tol in 0.01f64..5.0, seed in 0u64..1000,
    ) {
        let ts = TolStage::new(
            &non_inverting(rf, rg, Amplifier::from_gbw(A0, 1e7)),
            &[uniform("rf", tol), uniform("rg", tol)],
            AmplifierSpread::default(),
            [25.0, 25.0],
        ).unwrap();
        let figure = Figure::GainDb { freq_hz: 1e3 };
        let open = [Limit { figure, lower: None, upper: None }];
        let wc = worst_case(&ts, &open, DEFAULT_MAX_CORNERS).unwrap();
        let (lo, hi) = (wc.figures[0].min.value, wc.figures[0].max.value);
        let margin = 1e-9 * hi.abs().max(1.0);
        let spec = [Limit { figure, lower: Some(lo - margin), upper: Some(hi + margin) }];
        let mc = monte_carlo(&ts, &spec, options(seed, 200)).unwrap();
        prop_assert_eq!(mc.yield_fraction, 1.0);
        prop_assert_eq!(mc.failed_count, 0);
    }

    #[test]
    fn sensitivities_of_a_ratio_set_gain_sum_to_zero(
        rf in 1e3f64..1e6, rg in 1e2f64..1e5, a0 in 1e3f64..1e7,
    ) {
        // G = A/(1 + A·Rg/(Rf + Rg)) depends on Rf/Rg only: scaling both leaves it,
        // so x·∂G/∂x summed over Rf and Rg is 0 (Euler's theorem, degree 0).
        let ts = TolStage::new(
            &non_inverting(rf, rg, Amplifier::from_gbw(Spread::fixed(a0), 1e7)),
            &[uniform("rf", 1.0), uniform("rg", 1.0)],
            AmplifierSpread::default(),
            [25.0, 25.0],
        ).unwrap();
        let spec = [Limit { figure: Figure::GainDb { freq_hz: 1e3 }, lower: None, upper: None }];
        let s = sensitivity(&ts, &spec).unwrap();
        let p = &s.figures[0].parts;
        let scale = p[0].per_unit.abs().max(1e-3);
        prop_assert!((p[0].per_unit + p[1].per_unit).abs() < 1e-6 * scale,
            "{} + {}", p[0].per_unit, p[1].per_unit);
    }
}

#[test]
fn a_figure_not_monotonic_in_a_part_is_searched_inside_its_range() {
    // Settling time of a transimpedance stage against its feedback capacitor:
    // too little Cf rings, too much is slow (Rf·Cf), so the settling time dips
    // near the damping between (common practice, no source). The worst case
    // must then search Cf inside its range rather than take a corner: the
    // least settling time lies inside, below both ends and the nominal.
    let stage = Stage {
        kind: StageKind::Transimpedance,
        amplifier: Amplifier::from_gbw(Spread::fixed(1e5), 1e7),
        point: SpreadPoint::Typ,
        parts: StageParts {
            rf: Some(100e3),
            cf: Some(6e-12),
            cs: Some(100e-12),
            ..StageParts::default()
        },
    };
    let ts = TolStage::new(
        &stage,
        &[uniform("cf", 60.0)],
        AmplifierSpread::default(),
        [25.0, 25.0],
    )
    .unwrap();
    let spec = [Limit {
        figure: Figure::SettlingTimeS { band: 0.001 },
        lower: None,
        upper: None,
    }];
    let wc = worst_case(&ts, &spec, DEFAULT_MAX_CORNERS).unwrap();
    let f = &wc.figures[0];
    assert_eq!(f.searched, ["Cf"]);
    let cf = f.min.values[0];
    assert!(cf > 6e-12 * 0.4 && cf < 6e-12 * 1.6, "{cf}");
    assert!(f.min.value <= f.nominal);
    let at = |cf: f64| {
        loopwright::tolerance::figure_value(
            &Stage {
                parts: StageParts {
                    cf: Some(cf),
                    ..stage.parts
                },
                ..stage.clone()
            },
            &spec[0].figure,
            25.0,
        )
        .unwrap()
    };
    assert!(f.min.value < at(6e-12 * 0.4) && f.min.value < at(6e-12 * 1.6));
    // The value reported is the figure at the part values reported.
    assert_eq!(f.min.value, at(cf));
}

fn follower(amplifier: Amplifier) -> Stage {
    Stage {
        kind: StageKind::NonInverting,
        amplifier,
        point: SpreadPoint::Typ,
        parts: StageParts::default(),
    }
}

#[test]
fn figures_match_their_closed_forms() {
    use loopwright::tolerance::figure_value;
    use num_complex::Complex64;
    let rel = |got: f64, want: f64| (got / want - 1.0).abs();
    // −3 dB bandwidth of a single-pole loop, gain 10: the closed-loop pole
    // fp·(1 + A0·β) (any feedback text, e.g. Sedra & Smith, Microelectronic
    // Circuits, 7th ed., ch. 11, from memory), fp = GBW/A0.
    let s = non_inverting(9e3, 1e3, Amplifier::from_gbw(Spread::fixed(1e5), 1e6));
    let bw = figure_value(&s, &Figure::BandwidthHz, 25.0).unwrap();
    assert!(rel(bw, 10.0 * (1.0 + 1e5 * 0.1)) < 1e-9, "{bw}");
    assert_eq!(figure_value(&s, &Figure::PeakingDb, 25.0).unwrap(), 0.0);
    // Peaking of a follower whose amplifier has a second pole f2: the closed
    // loop is 1/D with D = k + s·b + s²/(ωG·ω2), k = 1 + 1/A0,
    // b = 1/ωG + 1/(A0·ω2); as k·(1 + s/(Q·ω0) + s²/ω0²): ω0² = k·ωG·ω2 and
    // Q = k/(b·ω0); peak |H|/|H(0)| = Q/√(1 − 1/(4Q²)) for Q > 1/√2 (the
    // second-order resonance, e.g. Ogata, Modern Control Engineering, 5th ed.,
    // ch. 7, from memory).
    let (a0, gbw, f2) = (1e6, 1e7, 2.5e6);
    let s = follower(Amplifier::from_gbw(Spread::fixed(a0), gbw).with_pole(f2));
    let (wg, w2) = (std::f64::consts::TAU * gbw, std::f64::consts::TAU * f2);
    let k = 1.0 + 1.0 / a0;
    let w0 = (k * wg * w2).sqrt();
    let q = k / ((1.0 / wg + 1.0 / (a0 * w2)) * w0);
    let want = 20.0 * (q / (1.0 - 1.0 / (4.0 * q * q)).sqrt()).log10();
    let pk = figure_value(&s, &Figure::PeakingDb, 25.0).unwrap();
    assert!((pk - want).abs() < 1e-9, "{pk} vs {want}");
    // Output impedance of a follower with open-loop output resistance ro:
    // ro/(1 + A(jω)) (the shunt-sampled output, any feedback text, from memory).
    let s = follower(Amplifier::from_gbw(Spread::fixed(1e5), 1e6).with_ro(50.0));
    let f = 1e3;
    let a = Complex64::new(1e5, 0.0) / Complex64::new(1.0, f * 1e5 / 1e6);
    let want = 50.0 / (Complex64::new(1.0, 0.0) + a).norm();
    let z = figure_value(&s, &Figure::OutputImpedanceOhm { freq_hz: f }, 25.0).unwrap();
    assert!(rel(z, want) < 1e-9, "{z} vs {want}");
    // Noise of a follower whose only source is the amplifier's white voltage
    // noise en: the output density is en·|H|, H = A/(1 + A) a single pole at
    // fc = fp·(1 + A0) with DC gain A0/(1 + A0), so over 0 … B the output is
    // en·(A0/(1 + A0))·√(fc·atan(B/fc)) (the integral of a one-pole response,
    // common practice, no source); referred to the input it is en·√B.
    let en = 10e-9;
    let mut amp = Amplifier::from_gbw(Spread::fixed(1e5), 1e6);
    amp.voltage_noise = Some(loopwright::stage::NoiseDensity {
        density: en,
        corner_hz: 0.0,
    });
    let s = follower(amp);
    let band: f64 = 1e5;
    let fc: f64 = 10.0 * (1.0 + 1e5);
    let want = en * (1e5 / (1.0 + 1e5)) * (fc * (band / fc).atan()).sqrt();
    let out = figure_value(
        &s,
        &Figure::OutputNoiseRms {
            band_hz: [0.0, band],
        },
        25.0,
    )
    .unwrap();
    assert!(rel(out, want) < 1e-8, "{out} vs {want}");
    let inp = figure_value(
        &s,
        &Figure::InputNoiseRms {
            band_hz: [0.0, band],
        },
        25.0,
    )
    .unwrap();
    assert!(rel(inp, en * band.sqrt()) < 1e-8, "{inp}");
    // Phase of the gain-10 stage at its bandwidth: −45° (a single real pole).
    let s = non_inverting(9e3, 1e3, Amplifier::from_gbw(Spread::fixed(1e5), 1e6));
    let ph = figure_value(&s, &Figure::PhaseDeg { freq_hz: bw }, 25.0).unwrap();
    assert!((ph + 45.0).abs() < 1e-6, "{ph}");
}
