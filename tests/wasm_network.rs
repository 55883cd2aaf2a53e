//! The JS boundary of network synthesis and tolerance, run in a real browser
//! through wasm-bindgen-test: numbers, typed arrays, structured results, thrown
//! errors with `code` and `param`, and Monte Carlo results bit-identical to the
//! native build for the same seed.
#![cfg(target_arch = "wasm32")]

use js_sys::{Array, Float64Array};
use loopwright::wasm::network as api;
use wasm_bindgen::{JsCast, JsValue};
use wasm_bindgen_test::*;

wasm_bindgen_test_configure!(run_in_browser);

#[path = "support/js.rs"]
mod js;
use js::{assert_thrown, checked, field, num, text};

include!("fixtures/network_montecarlo.rs");

#[wasm_bindgen_test]
fn standard_values_and_notation() {
    // IEC 60063 E12 (from memory): 4.7 and 5.6 neighbour 5.0.
    assert_eq!(
        checked(api::standard_value("E12", 5000.0, "nearest")).unwrap(),
        4700.0
    );
    assert_eq!(
        checked(api::standard_value("e12", 5000.0, "up")).unwrap(),
        5600.0
    );
    assert_eq!(checked(api::series_tolerance("E96")).unwrap(), 0.01);
    let n = api::standard_neighbours("E24", 50.0).unwrap();
    assert_eq!(
        (num(&n, "down"), num(&n, "up"), num(&n, "nearest")),
        (47.0, 51.0, 51.0)
    );
    assert_eq!(text(&n, "series"), "E24");
    // IEC 60062 letter codes (from memory): 4K7 = 4.7 kΩ, R47 = 0.47 Ω.
    assert_eq!(checked(api::parse_value("4k7")).unwrap(), 4700.0);
    assert_eq!(checked(api::parse_value("R47")).unwrap(), 0.47);
    assert_eq!(checked(api::parse_value("2.2 µF")).unwrap(), 2.2e-6);
    assert_eq!(api::letter_code(1.5e6, 2).unwrap(), "1M5");
    assert_eq!(api::format_si(4700.0, 2).unwrap(), "4.7 k");
}

#[wasm_bindgen_test]
fn series_values_are_a_float64_array() {
    let v: JsValue = api::series_values("E6", 1.0, 10.0).unwrap().into();
    let arr: Float64Array = v.dyn_into().expect("a Float64Array");
    assert_eq!(arr.to_vec(), [1.0, 1.5, 2.2, 3.3, 4.7, 6.8, 10.0]);
}

#[wasm_bindgen_test]
fn best_pairs_are_ranked_objects() {
    // Gain 10 = 1 + 9: E24 has exact pairs (18 k/2.0 k, 27 k/3.0 k…).
    let r = api::best_pairs(
        "non-inverting",
        10.0,
        "E24",
        1e4,
        1e5,
        None,
        Some(1e-3),
        "none",
        5.0,
    )
    .unwrap();
    assert_eq!(text(&r, "network"), "non-inverting");
    assert_eq!(field(&r, "meetsMaxError"), JsValue::TRUE);
    let c: Array = field(&r, "candidates").dyn_into().unwrap();
    assert_eq!(c.length(), 5);
    let first = c.get(0);
    assert_eq!(num(&first, "error"), 0.0);
    let r2 = field(&first, "r2");
    assert_eq!(text(&r2, "joint"), "single");
    assert!(field(&r2, "second").is_null());
    assert_eq!(num(&r2, "value") / num(&first, "r1"), 9.0);
    // An unreachable error target is a result with the best miss, not a throw.
    let miss = api::best_pairs(
        "divider",
        0.123_456,
        "E3",
        1e3,
        2e3,
        None,
        Some(1e-9),
        "none",
        3.0,
    )
    .unwrap();
    assert_eq!(field(&miss, "meetsMaxError"), JsValue::FALSE);
    assert!(Array::from(&field(&miss, "candidates")).length() >= 1);
    let single = api::single_resistor(0.05, "E24", Some(0.005), "parallel").unwrap();
    let best = Array::from(&single).get(0);
    assert_eq!(text(&field(&best, "leg"), "joint"), "parallel");
}

#[wasm_bindgen_test]
fn worst_case_names_the_corners() {
    let w = api::worst_case(
        "inverting",
        10e3,
        47e3,
        0.01,
        0.01,
        5e4,
        1e5,
        2e5,
        1e6,
        75.0,
        5.0,
    )
    .unwrap();
    let g = field(&w, "gain");
    let corner = field(&g, "minCorner");
    // |Af| is largest with R1 low, R2 high, A high (monotonic, see worstcase.rs).
    assert_eq!(
        (
            text(&corner, "r1"),
            text(&corner, "r2"),
            text(&corner, "openLoopGain")
        ),
        ("low".into(), "high".into(), "high".into())
    );
    assert!(num(&g, "min") < num(&g, "nominal") && num(&g, "nominal") < num(&g, "max"));
    for name in ["inputImpedance", "outputImpedance", "bandwidthHz"] {
        let e = field(&w, name);
        assert!(num(&e, "min") <= num(&e, "max"), "{name}");
    }
}

#[wasm_bindgen_test]
fn monte_carlo_equals_the_native_bits() {
    // Source: the native build (tests/fixtures/network_montecarlo.rs); the native
    // test asserts the same bits, so native == wasm for the same seed.
    for (i, (c, want)) in INPUTS.iter().zip(&EXPECTED).enumerate() {
        let r = api::monte_carlo(
            c.stage,
            c.r1,
            c.r2,
            c.tol_r1,
            c.tol_r2,
            c.a_min,
            c.a_typ,
            c.a_max,
            c.ri,
            c.ro,
            c.pole_hz,
            c.resistor_distribution,
            c.k,
            c.gain_distribution,
            c.k_gain,
            c.metric,
            f64::from(c.trials),
            c.seed as f64,
            c.lower,
            c.upper,
            f64::from(c.bins),
        )
        .unwrap();
        let s = field(&r, "stats");
        assert_eq!(num(&s, "mean").to_bits(), want.mean, "case {i} mean");
        assert_eq!(num(&s, "sd").to_bits(), want.sd, "case {i} sd");
        let p = Array::from(&field(&s, "percentiles"));
        assert_eq!(p.length(), 7);
        for j in 0..7u32 {
            assert_eq!(
                num(&p.get(j), "value").to_bits(),
                want.percentiles[j as usize],
                "case {i} percentile {j}"
            );
        }
        let y = field(&s, "yieldFraction");
        assert_eq!(
            y.as_f64().map(f64::to_bits),
            want.yield_fraction,
            "case {i} yield"
        );
        let h = field(&s, "histogram");
        let counts = Array::from(&field(&h, "counts"));
        assert_eq!(counts.length(), c.bins);
        assert_eq!(
            counts.get(0).as_f64(),
            Some(f64::from(want.first_bin)),
            "case {i} first bin"
        );
        assert_eq!(Array::from(&field(&h, "edges")).length(), c.bins + 1);
    }
}

#[wasm_bindgen_test]
fn bad_input_throws_typed_errors() {
    assert_thrown(
        checked(api::standard_value("E25", 1.0, "nearest")),
        "unknown_name",
        "series",
    );
    assert_thrown(
        checked(api::standard_value("E24", f64::NAN, "nearest")),
        "not_finite",
        "value",
    );
    assert_thrown(checked(api::parse_value("4k7k")), "syntax", "text");
    assert_thrown(
        api::best_pairs("divider", 1.2, "E24", 1e3, 1e5, None, None, "none", 5.0),
        "out_of_domain",
        "target",
    );
    assert_thrown(
        api::worst_case(
            "inverting",
            10e3,
            47e3,
            0.0,
            0.01,
            5e4,
            1e5,
            2e5,
            1e6,
            75.0,
            5.0,
        ),
        "out_of_domain",
        "tolR1",
    );
    let mc = |trials: f64, seed: f64, k: f64| {
        api::monte_carlo(
            "inverting",
            10e3,
            47e3,
            0.01,
            0.01,
            5e4,
            1e5,
            2e5,
            1e6,
            75.0,
            5.0,
            "normal",
            k,
            "uniform",
            3.0,
            "gain",
            trials,
            seed,
            None,
            None,
            10.0,
        )
    };
    assert_thrown(mc(1_000_001.0, 1.0, 3.0), "too_large", "trials");
    assert_thrown(mc(1000.0, 0.5, 3.0), "out_of_domain", "seed");
    assert_thrown(mc(1000.0, 1.0, -3.0), "out_of_domain", "k");
}
