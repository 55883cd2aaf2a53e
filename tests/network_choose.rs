//! Choosing parts against a spec (src/network/choose.rs) against
//! tests/reference/data/network_choose.json, written by
//! tests/reference/network_choose.py: the brute-force feasibility of gain 48 ± 0.5 %
//! over the IEC 60063 tables (PyPI `eseries`), exact yields of two uniform
//! resistors by mpmath quadrature, and numpy Monte Carlo yields of two-part legs.
#![cfg(not(target_arch = "wasm32"))]

use loopwright::network::{
    best_pairs, choose_parts, pair_yield, ChooseSpec, Combine, Joint, Network, PairSpec,
    PairYieldSpec, Series, YieldMethod,
};
use serde::Deserialize;
use std::collections::BTreeMap;

/// The closed form is a sum of trapezoids of a piecewise-linear integrand, the
/// reference an mpmath quadrature at 30 digits: both exact up to rounding.
const EXACT_TOL: f64 = 1e-9;
/// Monte Carlo agreement: within 4 combined standard errors (numpy's at 2 000 000
/// draws and ours at 200 000), a false alarm about once in 16 000 runs.
const SIGMAS: f64 = 4.0;
const TRIALS: usize = 200_000;

#[derive(Deserialize)]
struct Feasible {
    best_abs_error: f64,
    pairs_within: u64,
}

#[derive(Deserialize)]
struct Single {
    network: String,
    target: f64,
    tolerance: f64,
    open_loop_gain: Option<f64>,
    r1: f64,
    r2: f64,
    grade: f64,
    #[serde(rename = "yield")]
    yield_: f64,
}

#[derive(Deserialize)]
struct TwoPart {
    network: String,
    target: f64,
    tolerance: f64,
    open_loop_gain: Option<f64>,
    r1: f64,
    first: f64,
    second: f64,
    joint: String,
    grade: f64,
    #[serde(rename = "yield")]
    yield_: f64,
    std_error: f64,
}

#[derive(Deserialize)]
struct Reference {
    feasibility_gain48: BTreeMap<String, Feasible>,
    single: Vec<Single>,
    two_part: Vec<TwoPart>,
}

fn reference() -> Reference {
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/reference/data/network_choose.json"
    ))
    .expect("run tests/reference/network_choose.py to write the reference data");
    serde_json::from_str(&text).expect("reference JSON")
}

#[test]
fn feasibility_of_gain_48_matches_brute_force() {
    for (name, f) in reference().feasibility_gain48 {
        let series: Series = name.parse().unwrap();
        // Total range wide enough for every ratio of the tables.
        let spec = PairSpec::new(Network::NonInverting, 48.0, series, 1e3, 1e9);
        let best = best_pairs(&spec).unwrap().candidates[0];
        assert!(
            (best.error.abs() - f.best_abs_error).abs() < 1e-12,
            "{name}: {} vs {}",
            best.error,
            f.best_abs_error
        );
        // No pair within the window exactly when the brute force finds none: then
        // no one-resistor choice of that series can meet the spec at any grade.
        let mut c = ChooseSpec::new(Network::NonInverting, 48.0, 0.005);
        c.series = vec![series];
        c.grades = vec![0.001];
        c.combine = Combine::None;
        c.total_min = 1e3;
        c.total_max = 1e9;
        let r = choose_parts(&c).unwrap();
        assert_eq!(r.recommended.is_some(), f.pairs_within > 0, "{name}");
    }
}

#[test]
fn exact_yields_match_mpmath() {
    for c in reference().single {
        let got = pair_yield(&PairYieldSpec {
            network: c.network.parse().unwrap(),
            target: c.target,
            tolerance: c.tolerance,
            open_loop_gain: c.open_loop_gain,
            r1: c.r1,
            r2: c.r2,
            r2_second: None,
            grade: c.grade,
            trials: 1000,
            seed: 1,
        })
        .unwrap();
        assert_eq!(got.method, YieldMethod::Exact);
        assert_eq!(got.yield_std_error, 0.0);
        assert!(
            (got.yield_ - c.yield_).abs() <= EXACT_TOL,
            "{} {} {}/{} at {}: {} vs {}",
            c.network,
            c.target,
            c.r1,
            c.r2,
            c.grade,
            got.yield_,
            c.yield_
        );
    }
}

#[test]
fn two_part_yields_match_numpy_monte_carlo() {
    for c in reference().two_part {
        let joint = if c.joint == "series" {
            Joint::Series
        } else {
            Joint::Parallel
        };
        let got = pair_yield(&PairYieldSpec {
            network: c.network.parse().unwrap(),
            target: c.target,
            tolerance: c.tolerance,
            open_loop_gain: c.open_loop_gain,
            r1: c.r1,
            r2: c.first,
            r2_second: Some((c.second, joint)),
            grade: c.grade,
            trials: TRIALS,
            seed: 11,
        })
        .unwrap();
        assert_eq!(got.method, YieldMethod::MonteCarlo);
        let se = (got.yield_std_error.powi(2) + c.std_error.powi(2)).sqrt();
        assert!(
            (got.yield_ - c.yield_).abs() <= SIGMAS * se,
            "{} {}+{} at {}: {} vs {} (se {se})",
            c.r1,
            c.first,
            c.second,
            c.grade,
            got.yield_,
            c.yield_
        );
        // The reported standard error is the binomial one of the reported yield.
        let y = got.yield_;
        assert!((got.yield_std_error - (y * (1.0 - y) / TRIALS as f64).sqrt()).abs() < 1e-15);
    }
}

#[test]
fn worked_case_gain_48() {
    // docs/network.md: gain 48 ± 0.5 %, E96 and E192, 10 k … 1 MΩ in total.
    let mut s = ChooseSpec::new(Network::NonInverting, 48.0, 0.005);
    s.series = vec![Series::E96, Series::E192];
    s.grades = vec![0.01, 0.005, 0.0025, 0.001];
    s.total_min = 1e4;
    s.total_max = 1e6;
    let r = choose_parts(&s).unwrap();
    let find = |series: Series, grade: f64, parts: usize| {
        r.choices
            .iter()
            .find(|c| c.series == series && c.grade == grade && c.parts == parts)
            .copied()
            .unwrap()
    };
    let reference = reference();
    let exact = |r1: f64, r2: f64, grade: f64| {
        reference
            .single
            .iter()
            .find(|c| c.r1 == r1 && c.r2 == r2 && c.grade == grade && c.open_loop_gain.is_none())
            .unwrap()
            .yield_
    };
    // E96 at 1 %: the best one-resistor pair is 243 / 11.5 k (+0.677 %), the
    // smallest total of that ratio in 10 k … 1 MΩ.
    let e96 = find(Series::E96, 0.01, 2);
    assert_eq!((e96.r1, e96.r2.value), (243.0, 11.5e3));
    assert!((e96.yield_ - exact(243.0, 11.5e3, 0.01)).abs() <= EXACT_TOL);
    // E96 at 0.1 %: the same pair is outside the window at nearly every build.
    let e96_tight = find(Series::E96, 0.001, 2);
    assert!((e96_tight.yield_ - exact(243.0, 11.5e3, 0.001)).abs() <= EXACT_TOL);
    // E192 at 0.1 % and 0.25 %: 1 k / 47 k is exactly 48 (the smallest total of the
    // exact pairs); every build passes.
    for g in [0.001, 0.0025] {
        let e192 = find(Series::E192, g, 2);
        assert_eq!((e192.r1, e192.r2.value, e192.yield_), (1e3, 47e3, 1.0));
    }
    assert!((exact(1e3, 47e3, 0.0025) - 1.0).abs() <= EXACT_TOL);
    // E192 at 0.5 %: the same pair, 76.05 %.
    let e192 = find(Series::E192, 0.005, 2);
    assert!((e192.yield_ - exact(10e3, 470e3, 0.005)).abs() <= EXACT_TOL);
    // The cheapest choice meeting 99 %: E192 at 0.25 %, two parts.
    let rec = r.recommended.unwrap();
    assert_eq!(
        (rec.series, rec.grade, rec.parts),
        (Series::E192, 0.0025, 2)
    );
}

fn spec_for(r1: f64, r2: f64, grade: f64, tolerance: f64) -> PairYieldSpec {
    PairYieldSpec {
        network: Network::NonInverting,
        target: 1.0 + r2 / r1,
        tolerance,
        open_loop_gain: None,
        r1,
        r2,
        r2_second: None,
        grade,
        trials: 1000,
        seed: 1,
    }
}

proptest::proptest! {
    #![proptest_config(proptest::prelude::ProptestConfig { cases: 64, rng_seed: proptest::test_runner::RngSeed::Fixed(18), ..proptest::prelude::ProptestConfig::default() })]

    /// A window wider than the worst case passes every build: yield exactly 1.
    #[test]
    fn yield_is_one_inside_a_wider_window(
        r1 in 100.0f64..1e5, q in 0.1f64..100.0, grade in 0.0005f64..0.05, margin in 1.001f64..2.0,
    ) {
        let r2 = q * r1;
        // The gain error at the worst corner is below (G − 1)/G·2p/(1 − p) < 2p/(1 − p).
        let tolerance = (margin * 2.0 * grade / (1.0 - grade)).min(0.9);
        let c = pair_yield(&spec_for(r1, r2, grade, tolerance)).unwrap();
        proptest::prop_assert!(c.worst_low >= c.nominal * (1.0 - tolerance));
        proptest::prop_assert_eq!(c.yield_, 1.0);
    }

    /// A gain set by R2/R1 is insensitive to scaling both: the same yield (to
    /// rounding) for the pair scaled by any factor.
    #[test]
    fn yield_is_unchanged_by_scaling_both_resistors(
        r1 in 100.0f64..1e5, q in 0.1f64..100.0, grade in 0.001f64..0.05, tol in 0.001f64..0.05,
        k in 0.01f64..100.0, offset in -0.01f64..0.01,
    ) {
        // The target a little off the pair's own gain, so the yield is not trivially 1.
        let mut a = spec_for(r1, q * r1, grade, tol);
        a.target *= 1.0 + offset;
        let mut b = a;
        b.r1 *= k;
        b.r2 *= k;
        let (ya, yb) = (pair_yield(&a).unwrap().yield_, pair_yield(&b).unwrap().yield_);
        proptest::prop_assert!((ya - yb).abs() <= 1e-9, "{} vs {}", ya, yb);
        // And the sensitivities of the ratio: S_R2 = −S_R1 = (G − 1)/G.
        let mut c = ChooseSpec::new(Network::NonInverting, a.target, tol);
        c.series = vec![Series::E24];
        c.grades = vec![0.01];
        c.combine = Combine::None;
        let s = choose_parts(&c).unwrap().sensitivity_r2;
        proptest::prop_assert!((s - (a.target - 1.0) / a.target).abs() < 1e-12);
    }
}
