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

/// The script's "twoamp" with the spreads of both amplifiers given by name.
fn twoamp(extra: Value) -> JsValue {
    let mut o = json!({
        "circuit": TWOAMP,
        "input": "Vs",
        "output": "out",
        "amplifierSpread": {
            "U1": { "gbwHz": { "min": 7e6, "typ": 1e7, "max": 1.3e7 } },
            "U2": { "gbwHz": { "min": 3.5e6, "typ": 5e6, "max": 6.5e6 } }
        },
        "spec": [
            { "figure": "gainDb", "freqHz": 2e5 },
            { "figure": "bandwidthHz", "lower": 6e5 }
        ],
        "analyses": ["worstCase"],
        "maxCorners": 128
    });
    for (k, v) in extra.as_object().unwrap() {
        o[k] = v.clone();
    }
    js_of(&o)
}

/// `worstCase.figures[k]`'s extremes against the script's corners of `key`.
fn js_corners_match(out: &JsValue, key: &str, names: &[(&str, f64)]) {
    let r: Value = serde_json::from_str(REFERENCE).unwrap();
    let wc = field(out, "worstCase");
    assert_eq!(text(&wc, "method"), "corners");
    let figures = js_sys::Array::from(&field(&wc, "figures"));
    for (k, (name, tol)) in names.iter().enumerate() {
        let f = figures.get(k as u32);
        for side in ["min", "max"] {
            let want = r[key]["corners"][name][side].as_f64().unwrap();
            let got = num(&field(&f, side), "value");
            assert!((got - want).abs() <= *tol, "{key} {name} {side}");
        }
    }
}

#[wasm_bindgen_test]
fn spreads_by_amplifier_name_vary_both_amplifiers() {
    // Expected: tolerance_stage.py "twoamp.corners" (128 corners), as
    // tests/tolerance_circuit.rs: gain within 1e-9 dB, bandwidth 0.5 Hz.
    let out = api::stage_tolerance(twoamp(json!({}))).unwrap();
    let parts = js_sys::Array::from(&field(&out, "parts"));
    let names: Vec<String> = parts.iter().map(|p| text(&p, "name")).collect();
    assert_eq!(
        names,
        ["Rf1", "Rg1", "Rf2", "Rg2", "U1.a0", "U1.gbwHz", "U2.gbwHz"]
    );
    js_corners_match(&out, "twoamp", &[("gainDb", 1e-9), ("bandwidthHz", 0.5)]);
}

#[wasm_bindgen_test]
fn output_element_reads_the_current_in_an_element() {
    // Expected: tolerance_stage.py "transcond.corners", I(RL)/Vs at 16 corners.
    let o = json!({
        "circuit": TRANSCOND,
        "input": "Vs",
        "outputElement": "RL",
        "amplifierSpread": { "gbwHz": { "min": 7e6, "typ": 1e7, "max": 1.3e7 } },
        "spec": [
            { "figure": "gainDb", "freqHz": 1e5 },
            { "figure": "gainErrorPercent", "freqHz": 2e4, "target": 1e-3, "lower": -0.5, "upper": 0 }
        ],
        "analyses": ["worstCase"]
    });
    let out = api::stage_tolerance(js_of(&o)).unwrap();
    js_corners_match(
        &out,
        "transcond",
        &[("gainDb", 1e-9), ("gainErrorPercent", 1e-9)],
    );
    let mut both = o.clone();
    both["output"] = json!("o");
    assert_thrown(
        api::stage_tolerance(js_of(&both)),
        "out_of_domain",
        "outputElement",
    );
    let mut unknown = o;
    unknown["outputElement"] = json!("Rx");
    assert_thrown(
        api::stage_tolerance(js_of(&unknown)),
        "out_of_domain",
        "outputElement",
    );
}

#[wasm_bindgen_test]
fn amplifier_spreads_by_name_name_the_callers_path() {
    let u2 = |gbw: Value| {
        json!({ "amplifierSpread": {
            "U1": { "gbwHz": { "min": 7e6, "typ": 1e7, "max": 1.3e7 } },
            "U2": { "gbwHz": gbw }
        } })
    };
    assert_thrown(
        api::stage_tolerance(twoamp(u2(json!({ "min": 6e6, "typ": 5e6, "max": 6.5e6 })))),
        "out_of_domain",
        "amplifierSpread.U2.gbwHz.min",
    );
    assert_thrown(
        api::stage_tolerance(twoamp(u2(
            json!({ "min": 3.5e6, "typ": 4e6, "max": 6.5e6 }),
        ))),
        "out_of_domain",
        "amplifierSpread.U2.gbwHz.typ",
    );
    assert_thrown(
        api::stage_tolerance(twoamp(u2(
            json!({ "min": 3.5e6, "typ": 5e6, "max": "6.5M" }),
        ))),
        "wrong_type",
        "amplifierSpread.U2.gbwHz.max",
    );
    assert_thrown(
        api::stage_tolerance(twoamp(json!({ "amplifierSpread": {
            "Rf1": { "gbwHz": { "min": 7e6, "typ": 1e7, "max": 1.3e7 } }
        } }))),
        "out_of_domain",
        "amplifierSpread.Rf1",
    );
    // The one-amplifier form on a circuit of two, no `controlled`: refused.
    assert_thrown(
        api::stage_tolerance(twoamp(json!({ "amplifierSpread": {
            "gbwHz": { "min": 7e6, "typ": 1e7, "max": 1.3e7 }
        } }))),
        "out_of_domain",
        "amplifierSpread",
    );
    // The one-amplifier form keeps its path, down to the field.
    assert_thrown(
        api::stage_tolerance(rcloop(json!({ "amplifierSpread": {
            "gbwHz": { "min": 7e6, "typ": 1e7, "max": 6e6 }
        } }))),
        "out_of_domain",
        "amplifierSpread.gbwHz.max",
    );
}

#[wasm_bindgen_test]
fn a_stage_takes_its_amplifier_by_name_too() {
    // {U1: {gbwHz}} on a stage is {gbwHz}: the same Monte Carlo bits.
    let spread = json!({ "min": 7e6, "typ": 1e7, "max": 1.3e7 });
    let one = api::stage_tolerance(gain48(json!({
        "amplifierSpread": { "gbwHz": spread }, "analyses": ["monteCarlo"]
    })))
    .unwrap();
    let named = api::stage_tolerance(gain48(json!({
        "amplifierSpread": { "U1": { "gbwHz": spread } }, "analyses": ["monteCarlo"]
    })))
    .unwrap();
    let y = |r: &JsValue| num(&field(r, "monteCarlo"), "yieldFraction").to_bits();
    assert_eq!(y(&one), y(&named));
    let parts = js_sys::Array::from(&field(&named, "parts"));
    assert!(parts.iter().any(|p| text(&p, "name") == "U1.gbwHz"));
    assert_thrown(
        api::stage_tolerance(gain48(json!({
            "amplifierSpread": { "U1": { "gbwHz": { "min": 7e6, "typ": 1e7, "max": 6e6 } } }
        }))),
        "out_of_domain",
        "amplifierSpread.U1.gbwHz.max",
    );
    assert_thrown(
        api::stage_tolerance(gain48(
            json!({ "amplifierSpread": { "U2": { "gbwHz": spread } } }),
        )),
        "unknown_name",
        "amplifierSpread.U2",
    );
}
