//! The JS boundary of the tolerance area (`stageTolerance`), run in a real
//! browser through wasm-bindgen-test: the worst case against the brute-force
//! corners of tests/reference/tolerance_stage.py, the Monte Carlo bit for bit
//! with the native run (tests/fixtures/tolerance_identity.rs), and errors
//! naming the caller's field; the same for a circuit document
//! (tests/fixtures/tolerance_circuit.rs, the "rcloop" of the script).
#![cfg(target_arch = "wasm32")]

use loopwright::wasm::tolerance as api;
use serde_json::{json, Value};
use wasm_bindgen::JsValue;
use wasm_bindgen_test::*;

wasm_bindgen_test_configure!(run_in_browser);

#[path = "support/js.rs"]
mod js;
use js::{assert_thrown, field, num, text};

include!("fixtures/tolerance_identity.rs");
include!("fixtures/tolerance_circuit.rs");

const REFERENCE: &str = include_str!("reference/data/tolerance_stage.json");

fn js_of(v: &Value) -> JsValue {
    js_sys::JSON::parse(&v.to_string()).unwrap()
}

fn gain48(extra: Value) -> JsValue {
    let mut o = json!({
        "stage": {
            "format": "loopwright-stage", "version": 1, "kind": "non-inverting",
            "amplifier": { "a0": { "min": 5e4, "typ": 2e5, "max": 1e6 }, "gbwHz": 1e7 },
            "parts": { "rf": 47000, "rg": 1000 }
        },
        "parts": [
            { "part": "rf", "tolerance": { "distribution": "uniform", "percent": 1 } },
            { "part": "rg", "tolerance": { "distribution": "normal", "percent": 1, "sigmas": 3 } }
        ],
        "spec": [
            { "figure": "gainDb", "freqHz": 2e4 },
            { "figure": "gainErrorPercent", "freqHz": 2e4, "target": 48, "lower": -1, "upper": 0 }
        ],
        "seed": IDENTITY_SEED,
        "trials": IDENTITY_TRIALS,
        "bins": 20,
        "keepFailures": 10
    });
    for (k, v) in extra.as_object().unwrap() {
        o[k] = v.clone();
    }
    js_of(&o)
}

#[wasm_bindgen_test]
fn monte_carlo_is_the_native_run_bit_for_bit() {
    let r = api::stage_tolerance(gain48(json!({ "analyses": ["monteCarlo"] }))).unwrap();
    let mc = field(&r, "monteCarlo");
    assert_eq!(num(&mc, "yieldFraction").to_bits(), IDENTITY_YIELD_BITS);
    let limits = js_sys::Array::from(&field(&mc, "limits"));
    let stats = field(&limits.get(0), "stats");
    assert_eq!(num(&stats, "mean").to_bits(), IDENTITY_MEAN_DB_BITS);
    let p = js_sys::Array::from(&field(&stats, "percentiles"));
    assert_eq!(num(&p.get(3), "value").to_bits(), IDENTITY_MEDIAN_DB_BITS);
    assert!(field(&r, "worstCase").is_null());
}

#[wasm_bindgen_test]
fn worst_case_matches_brute_force_corners() {
    // Expected: tolerance_stage.py "gain48.corners" (closed form at all 8 corners);
    // as tests/tolerance_stage.rs, within 1e-9.
    let r: Value = serde_json::from_str(REFERENCE).unwrap();
    let out = api::stage_tolerance(gain48(json!({ "analyses": ["worstCase"] }))).unwrap();
    let wc = field(&out, "worstCase");
    assert_eq!(text(&wc, "method"), "corners");
    let figures = js_sys::Array::from(&field(&wc, "figures"));
    for (k, name) in ["gainDb", "gainErrorPercent"].into_iter().enumerate() {
        let f = figures.get(k as u32);
        for key in ["min", "max"] {
            let want = r["gain48"]["corners"][name][key].as_f64().unwrap();
            let got = num(&field(&f, key), "value");
            assert!(
                (got - want).abs() < 1e-9 * want.abs().max(1.0),
                "{name} {key}"
            );
        }
    }
    assert!(field(&out, "monteCarlo").is_null());
}

#[wasm_bindgen_test]
fn bad_input_names_the_callers_field() {
    let bad_tol = json!({ "parts": [
        { "part": "rf", "tolerance": { "distribution": "uniform", "percent": 120 } }
    ] });
    assert_thrown(
        api::stage_tolerance(gain48(bad_tol)),
        "out_of_domain",
        "parts[0].tolerance",
    );
    let bad_spec = json!({ "spec": [
        { "figure": "gainDb", "freqHz": 1e3, "lower": 2, "upper": 1 }
    ] });
    assert_thrown(
        api::stage_tolerance(gain48(bad_spec)),
        "out_of_domain",
        "spec[0].upper",
    );
    assert_thrown(
        api::stage_tolerance(gain48(json!({ "trials": 100_001 }))),
        "too_large",
        "trials",
    );
    assert_thrown(
        api::stage_tolerance(gain48(json!({ "temperatureC": [85, -40] }))),
        "out_of_domain",
        "temperatureC",
    );
    assert_thrown(
        api::stage_tolerance(gain48(json!({ "spec": [{ "figure": "gainDb" }] }))),
        "missing",
        "spec[0].freqHz",
    );
}

fn rcloop(extra: Value) -> JsValue {
    let mut o = json!({
        "circuit": RCLOOP,
        "input": "Vs",
        "output": "out",
        "amplifierSpread": { "gbwHz": { "min": 7e6, "typ": 1e7, "max": 1.3e7 } },
        "spec": [
            { "figure": "gainDb", "freqHz": 1e4 },
            { "figure": "phaseMarginDeg", "lower": 65 }
        ],
        "seed": RCLOOP_SEED,
        "trials": RCLOOP_TRIALS,
        "bins": 20,
        "keepFailures": 5,
        "maxCorners": 64
    });
    for (k, v) in extra.as_object().unwrap() {
        o[k] = v.clone();
    }
    js_of(&o)
}

#[wasm_bindgen_test]
fn circuit_monte_carlo_is_the_native_run_bit_for_bit() {
    let r = api::stage_tolerance(rcloop(json!({ "analyses": ["monteCarlo"] }))).unwrap();
    let mc = field(&r, "monteCarlo");
    assert_eq!(num(&mc, "yieldFraction").to_bits(), RCLOOP_YIELD_BITS);
    let limits = js_sys::Array::from(&field(&mc, "limits"));
    let stats = field(&limits.get(1), "stats");
    assert_eq!(num(&stats, "mean").to_bits(), RCLOOP_MEAN_PM_BITS);
}

#[wasm_bindgen_test]
fn circuit_worst_case_matches_brute_force_corners() {
    // Expected: tolerance_stage.py "rcloop.corners" (closed forms at all 64
    // corners); as tests/tolerance_circuit.rs, gain within 1e-9 dB, PM 1e-6°.
    let r: Value = serde_json::from_str(REFERENCE).unwrap();
    let out = api::stage_tolerance(rcloop(json!({ "analyses": ["worstCase"] }))).unwrap();
    let wc = field(&out, "worstCase");
    assert_eq!(text(&wc, "method"), "corners");
    let figures = js_sys::Array::from(&field(&wc, "figures"));
    for (k, (name, tol)) in [("gainDb", 1e-9), ("phaseMarginDeg", 1e-6)]
        .into_iter()
        .enumerate()
    {
        let f = figures.get(k as u32);
        for key in ["min", "max"] {
            let want = r["rcloop"]["corners"][name][key].as_f64().unwrap();
            let got = num(&field(&f, key), "value");
            assert!((got - want).abs() < tol, "{name} {key}");
        }
    }
}

#[wasm_bindgen_test]
fn circuit_bad_input_names_the_callers_field() {
    assert_thrown(
        api::stage_tolerance(rcloop(json!({ "input": "R3" }))),
        "out_of_domain",
        "input",
    );
    assert_thrown(
        api::stage_tolerance(rcloop(json!({ "controlled": "Rf" }))),
        "out_of_domain",
        "controlled",
    );
    assert_thrown(
        api::stage_tolerance(rcloop(json!({ "parts": [{ "part": "rf" }] }))),
        "out_of_domain",
        "parts",
    );
    let bad = RCLOOP.replace(r#""percent":5"#, r#""percent":120"#);
    assert_thrown(
        api::stage_tolerance(rcloop(json!({ "circuit": bad }))),
        "out_of_domain",
        "circuit.elements[2].tolerance",
    );
    assert_thrown(
        api::stage_tolerance(rcloop(json!({ "stage": { "format": "loopwright-stage" } }))),
        "out_of_domain",
        "circuit",
    );
}
