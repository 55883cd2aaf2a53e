//! The JS boundary of the stage area, run in a real browser through
//! wasm-bindgen-test: stage documents and circuits (objects or JSON text) in,
//! loop gain, closed-loop gain, impedances and poles out as typed arrays and
//! plain objects, compared with the stage reference data
//! (tests/reference/stage_sympy.py → tests/reference/data/stage_sympy.json:
//! sympy's exact loop gain, mpmath's closed-loop solve, numpy's impedances,
//! sympy's roots of the characteristic polynomial); errors name the caller's
//! field with its path.
#![cfg(target_arch = "wasm32")]

use loopwright::wasm::stage as api;
use serde_json::Value;
use wasm_bindgen::JsValue;
use wasm_bindgen_test::*;

wasm_bindgen_test_configure!(run_in_browser);

#[path = "support/js.rs"]
mod js;
use js::{field, num, text, typed};

/// Loop and closed-loop gain against sympy/mpmath at 30 digits: the native
/// reference test (tests/stage_reference.rs) holds 1e-12; wasm computes the same
/// bits (libm everywhere), so the same tolerance.
const EXACT_REL: f64 = 1e-12;
/// Impedances against numpy's double-precision solve: as tests/stage_reference.rs.
const NUMPY_REL: f64 = 1e-9;
/// Poles against sympy's roots at 30 digits: as tests/stage_reference.rs.
const POLE_REL: f64 = 1e-10;

const REFERENCE: &str = include_str!("reference/data/stage_sympy.json");

/// The reference case whose label starts with `label`.
fn case(label: &str) -> Value {
    let all: Value = serde_json::from_str(REFERENCE).unwrap();
    all["cases"]
        .as_array()
        .unwrap()
        .iter()
        .find(|c| c["label"].as_str().unwrap().starts_with(label))
        .unwrap()
        .clone()
}

/// A JS value of a JSON value (plain objects, arrays, numbers, strings).
fn js_of(v: &Value) -> JsValue {
    js_sys::JSON::parse(&v.to_string()).unwrap()
}

fn options(v: Value) -> JsValue {
    js_of(&v)
}

/// Worst relative difference of (re, im) arrays against reference pairs.
fn worst(re: &[f64], im: &[f64], want: &Value) -> f64 {
    let want = want.as_array().unwrap();
    assert_eq!(re.len(), want.len());
    re.iter()
        .zip(im)
        .zip(want)
        .map(|((r, i), w)| {
            let (wr, wi) = (w[0].as_f64().unwrap(), w[1].as_f64().unwrap());
            let d = ((r - wr).powi(2) + (i - wi).powi(2)).sqrt();
            d / (wr * wr + wi * wi).sqrt().max(1e-300)
        })
        .fold(0.0, f64::max)
}

#[wasm_bindgen_test]
fn loop_gain_of_a_stage_document_matches_sympy() {
    for label in [
        "transimpedance with photodiode",
        "capacitive load with isolation",
    ] {
        let c = case(label);
        let r = api::circuit_loop_gain(options(serde_json::json!({
            "circuit": c["stage"], "frequenciesHz": c["freqs"],
        })))
        .unwrap();
        // tests/reference/data/stage_sympy.json, loop_gain (sympy exact).
        let e = worst(&typed(&r, "re"), &typed(&r, "im"), &c["loop_gain"]);
        assert!(e < EXACT_REL, "{label}: loop gain {e}");
        assert_eq!(
            typed(&r, "freqHz").len(),
            c["freqs"].as_array().unwrap().len()
        );
        assert_eq!(typed(&r, "magnitudeDb").len(), typed(&r, "phaseDeg").len());
    }
}

#[wasm_bindgen_test]
fn the_stage_as_json_text_and_its_written_circuit_give_the_same_gain() {
    let c = case("feedback capacitor");
    let written = api::stage_circuit(JsValue::from(c["stage"].to_string())).unwrap();
    assert_eq!(text(&written, "amplifier"), "U1");
    assert_eq!(text(&written, "source"), "Vs");
    assert_eq!(text(&written, "output"), "out");
    assert_eq!(text(&written, "gainUnit"), "V/V");
    assert!(field(&written, "outputCurrent").is_null());
    let circuit = text(&written, "circuit");
    let by_circuit = api::circuit_gain(options(serde_json::json!({
        "circuit": circuit, "input": "Vs", "output": "out", "frequenciesHz": c["freqs"],
    })))
    .unwrap();
    let by_stage = api::circuit_gain(options(serde_json::json!({
        "circuit": c["stage"], "frequenciesHz": c["freqs"],
    })))
    .unwrap();
    // tests/reference/data/stage_sympy.json, closed_loop (mpmath solve).
    let e = worst(
        &typed(&by_stage, "re"),
        &typed(&by_stage, "im"),
        &c["closed_loop"],
    );
    assert!(e < EXACT_REL, "closed loop {e}");
    assert_eq!(typed(&by_circuit, "re"), typed(&by_stage, "re"));
    assert_eq!(typed(&by_circuit, "im"), typed(&by_stage, "im"));
}

#[wasm_bindgen_test]
fn impedances_of_a_stage_match_numpy() {
    let c = case("transimpedance with photodiode");
    for (port, key) in [("output", "zout"), ("input", "zin")] {
        let z = api::circuit_impedance(options(serde_json::json!({
            "circuit": c["stage"], "port": port, "frequenciesHz": c["freqs"],
        })))
        .unwrap();
        // tests/reference/data/stage_sympy.json, zout and zin (numpy solve);
        // zout is floored at 1 mΩ as in tests/stage_reference.rs (ZERO_OHM).
        let (re, im) = (typed(&z, "re"), typed(&z, "im"));
        let want = c[key].as_array().unwrap();
        let e = re
            .iter()
            .zip(&im)
            .zip(want)
            .map(|((r, i), w)| {
                let (wr, wi) = (w[0].as_f64().unwrap(), w[1].as_f64().unwrap());
                ((r - wr).powi(2) + (i - wi).powi(2)).sqrt() / (wr.hypot(wi)).max(1e-3)
            })
            .fold(0.0, f64::max);
        assert!(e < NUMPY_REL, "{port}: {e}");
        assert_eq!(typed(&z, "magnitudeOhm").len(), want.len());
    }
}

#[wasm_bindgen_test]
fn poles_of_a_stage_match_sympy_and_say_stable() {
    let c = case("capacitive load with isolation");
    let p = api::circuit_poles_js(options(serde_json::json!({ "circuit": c["stage"] }))).unwrap();
    // tests/reference/data/stage_sympy.json, poles (sympy roots at 30 digits), stable.
    assert_eq!(text(&p, "verdict"), "stable");
    assert!(c["stable"].as_bool().unwrap());
    let poles: js_sys::Array = field(&p, "poles").into();
    let want = c["poles"].as_array().unwrap();
    assert_eq!(poles.length() as usize, want.len());
    for w in want {
        let (wr, wi) = (w[0].as_f64().unwrap(), w[1].as_f64().unwrap());
        let best = poles
            .iter()
            .map(|q| (num(&q, "re") - wr).hypot(num(&q, "im") - wi) / wr.hypot(wi))
            .fold(f64::INFINITY, f64::min);
        assert!(best < POLE_REL, "pole {wr} {wi}: {best}");
    }
}

#[wasm_bindgen_test]
fn open_loop_gain_of_a_single_pole_amplifier() {
    // A0 = 1e5, GBW = 1 MHz: one pole at 10 Hz; at 10 Hz |A| = A0/√2 (−3.01 dB)
    // and −45°; at 1 MHz |A| ≈ 1 (GBW/f) and ≈ −90°. Single-pole algebra, common
    // practice, no source.
    let r = api::amplifier_open_loop(options(serde_json::json!({
        "amplifier": { "a0": 1e5, "gbwHz": "1M" }, "frequenciesHz": [10.0, 1e6],
    })))
    .unwrap();
    let (db, ph) = (typed(&r, "magnitudeDb"), typed(&r, "phaseDeg"));
    assert!((db[0] - (100.0 - 10.0 * 2f64.log10())).abs() < 1e-9);
    assert!((ph[0] + 45.0).abs() < 1e-9);
    let exact_db = 20.0 * (1e5 / (1.0 + 1e10f64).sqrt()).log10();
    assert!((db[1] - exact_db).abs() < 1e-9);
    // The low end of the A0 spread under hold-gbw: the same GBW, a higher pole.
    let low = api::amplifier_open_loop(options(serde_json::json!({
        "amplifier": { "a0": { "min": 2e4, "typ": 1e5 }, "gbwHz": "1M" },
        "frequenciesHz": [1e6], "spreadPoint": "min",
    })))
    .unwrap();
    let exact_low = 20.0 * (2e4 / (1.0 + (1e6f64 / 50.0).powi(2)).sqrt()).log10();
    assert!((typed(&low, "magnitudeDb")[0] - exact_low).abs() < 1e-9);
}

#[wasm_bindgen_test]
fn errors_name_the_callers_field_with_its_path() {
    let c = case("feedback capacitor");
    let mut bad = c["stage"].clone();
    bad["parts"]["rf"] = Value::from("-10k");
    js::assert_thrown(api::stage_circuit(js_of(&bad)), "out_of_domain", "parts.rf");
    let mut bad = c["stage"].clone();
    bad["amplifier"]["gbwHz"] = Value::from(0);
    js::assert_thrown(
        api::circuit_poles_js(options(serde_json::json!({ "circuit": bad }))),
        "out_of_domain",
        "circuit.amplifier.gbwHz",
    );
    let mut bad = c["stage"].clone();
    bad["parts"]["rx"] = Value::from(1);
    js::assert_thrown(api::stage_circuit(js_of(&bad)), "unknown_field", "parts.rx");
    js::assert_thrown(
        api::amplifier_open_loop(options(serde_json::json!({
            "amplifier": { "a0": 1e5, "gbwHz": "1M", "complexPoles": [{ "freqHz": 1e7, "q": 0 }] },
            "frequenciesHz": [1.0],
        }))),
        "out_of_domain",
        "amplifier.complexPoles",
    );
    js::assert_thrown(
        api::circuit_loop_gain(options(serde_json::json!({
            "circuit": c["stage"], "frequenciesHz": [-1.0],
        }))),
        "out_of_domain",
        "frequenciesHz",
    );
    js::assert_thrown(
        api::circuit_loop_gain(options(serde_json::json!({
            "circuit": c["stage"], "frequenciesHz": [1.0], "spreadPoint": "low",
        }))),
        "unknown_name",
        "spreadPoint",
    );
    js::assert_thrown(
        api::circuit_gain(options(serde_json::json!({
            "circuit": c["stage"], "frequencies": [1.0],
        }))),
        "unknown_field",
        "frequencies",
    );
    js::assert_thrown(
        api::circuit_loop_gain(options(serde_json::json!({
            "circuit": c["stage"], "controlled": "Rf", "frequenciesHz": [1.0],
        }))),
        "out_of_domain",
        "controlled",
    );
    js::assert_thrown(
        api::circuit_poles_js(options(serde_json::json!({ "circuit": 3 }))),
        "wrong_type",
        "circuit",
    );
    js::assert_thrown(
        api::circuit_poles_js(options(serde_json::json!({ "spreadPoint": "min" }))),
        "missing",
        "circuit",
    );
    js::assert_thrown(
        api::amplifier_open_loop(options(serde_json::json!({
            "amplifier": { "a0": 1e5, "gbwHz": "1M" },
        }))),
        "missing",
        "frequenciesHz",
    );
    // NaN in a document object reads as JSON.stringify writes it, null: the reader
    // refuses it at its path.
    let bad = js_of(&c["stage"]);
    let amplifier = js::field(&bad, "amplifier");
    js_sys::Reflect::set(&amplifier, &"gbwHz".into(), &f64::NAN.into()).unwrap();
    let o = js_sys::Object::new();
    js_sys::Reflect::set(&o, &"circuit".into(), &bad).unwrap();
    js::assert_thrown(
        api::circuit_poles_js(o.into()),
        "out_of_domain",
        "circuit.amplifier.gbwHz",
    );
}

/// Margins against python-control polished on sympy's exact loop gain
/// (tests/reference/stage_loop.py → data/stage_loop.json): 1e-6° and 1e-9
/// relative in frequency, as tests/stage_loop_reference.rs holds them.
const MARGIN_ABS: f64 = 1e-6;
const CROSSOVER_REL: f64 = 1e-9;

#[wasm_bindgen_test]
fn margins_and_nyquist_of_a_stage_match_python_control() {
    let all: Value = serde_json::from_str(include_str!("reference/data/stage_loop.json")).unwrap();
    for label in ["transimpedance with photodiode", "unstable follower"] {
        let c = all["cases"]
            .as_array()
            .unwrap()
            .iter()
            .find(|c| c["label"].as_str().unwrap().starts_with(label))
            .unwrap();
        let m =
            api::circuit_margins_js(options(serde_json::json!({ "circuit": c["stage"] }))).unwrap();
        let pm = c["phase_margin_deg"].as_f64().unwrap();
        let fc = c["crossover_hz"].as_f64().unwrap();
        assert!(
            (num(&m, "phaseMarginDeg") - pm).abs() < MARGIN_ABS,
            "{label}"
        );
        assert!(
            (num(&m, "crossoverHz") / fc - 1.0).abs() < CROSSOVER_REL,
            "{label}"
        );
        let n =
            api::circuit_nyquist_js(options(serde_json::json!({ "circuit": c["stage"] }))).unwrap();
        let enc = field(&n, "encirclements");
        // stage_loop.json: brute-force encirclement count and the verdict.
        assert_eq!(
            num(&enc, "clockwise") as i64,
            c["clockwise"].as_i64().unwrap(),
            "{label}"
        );
        let stable = c["stable"].as_bool().unwrap();
        assert_eq!(text(&enc, "verdict") == "stable", stable, "{label}");
    }
}

#[wasm_bindgen_test]
fn design_helpers_match_the_reference_scan() {
    // tests/reference/stage_design.py (an independent scan + brentq) →
    // data/stage_design.json; loopwright refines to VALUE_REL_TOL = 1e-6 in
    // ln(value): twice that, as tests/stage_design.rs.
    let all: Value =
        serde_json::from_str(include_str!("reference/data/stage_design.json")).unwrap();
    for q in all["questions"].as_array().unwrap().iter().take(3) {
        let part = q["part"].as_str().unwrap();
        let r = api::stage_design(options(serde_json::json!({
            "stage": q["stage"], "part": part,
            "targetPhaseMarginDeg": q["target_pm_deg"],
        })))
        .unwrap();
        let want = q["value"].as_f64().unwrap();
        assert!(
            (num(&r, "value") / want - 1.0).abs() < 2e-6,
            "{part}: {}",
            num(&r, "value")
        );
        assert_eq!(text(&r, "part"), part);
    }
    let q = &all["questions"][0];
    js::assert_thrown(
        api::stage_design(options(serde_json::json!({
            "stage": q["stage"], "part": "rx", "targetPhaseMarginDeg": 45,
        }))),
        "unknown_name",
        "part",
    );
}

/// The output a response is read at, chosen the same way by circuitGain,
/// circuitStep and circuitGainWithin: `output` and `outputElement` together are
/// refused at `outputElement`; a written circuit (no stage to take the output
/// from) without either is refused at `output`; a stage with neither reads its
/// own output node, so naming that node gives the same bits (an identity, no
/// reference needed).
#[wasm_bindgen_test]
fn the_output_is_chosen_alike_by_gain_step_and_gain_within() {
    let c = case("feedback capacitor");
    let circuit = text(&api::stage_circuit(js_of(&c["stage"])).unwrap(), "circuit");
    let both = serde_json::json!({
        "circuit": c["stage"], "output": "out", "outputElement": "Rf",
        "frequenciesHz": [1.0], "targetGain": 2.0, "tolerance": 0.01,
    });
    let neither = serde_json::json!({
        "circuit": circuit, "input": "Vs",
        "frequenciesHz": [1.0], "targetGain": 2.0, "tolerance": 0.01,
    });
    for (name, call) in [
        (
            "circuitGain",
            api::circuit_gain as fn(JsValue) -> Result<JsValue, JsValue>,
        ),
        ("circuitStep", api::circuit_step_js),
        ("circuitGainWithin", api::circuit_gain_within),
    ] {
        let mut b = both.clone();
        let mut n = neither.clone();
        if name == "circuitStep" {
            for o in [&mut b, &mut n] {
                let m = o.as_object_mut().unwrap();
                for k in ["frequenciesHz", "targetGain", "tolerance"] {
                    m.remove(k);
                }
            }
        } else if name == "circuitGain" {
            for o in [&mut b, &mut n] {
                let m = o.as_object_mut().unwrap();
                m.remove("targetGain");
                m.remove("tolerance");
            }
        } else {
            for o in [&mut b, &mut n] {
                o.as_object_mut().unwrap().remove("frequenciesHz");
            }
        }
        js::assert_thrown(call(options(b)), "out_of_domain", "outputElement");
        js::assert_thrown(call(options(n)), "missing", "output");
    }
    let default =
        api::circuit_step_js(options(serde_json::json!({ "circuit": c["stage"] }))).unwrap();
    let named = api::circuit_step_js(options(serde_json::json!({
        "circuit": c["stage"], "output": "out",
    })))
    .unwrap();
    assert_eq!(typed(&default, "output"), typed(&named, "output"));
    assert_eq!(num(&default, "finalValue"), num(&named, "finalValue"));
}
