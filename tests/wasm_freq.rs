//! The JS boundary of the frequency-response and stability engine, run in a real
//! browser (headless Chromium through wasm-bindgen-test): model objects in, typed
//! arrays and plain objects out, thrown errors with `code` and `param`.
#![cfg(target_arch = "wasm32")]

use js_sys::{Array, JSON};
use loopwright::wasm::freq as api;
use wasm_bindgen::{JsCast, JsValue};
use wasm_bindgen_test::*;

wasm_bindgen_test_configure!(run_in_browser);

#[path = "support/js.rs"]
mod js;
use js::{assert_thrown, checked, field, num, text, typed};

fn obj(json: &str) -> JsValue {
    JSON::parse(json).unwrap()
}

/// The options object of a sweep.
fn sweep(a: &JsValue, beta: JsValue, start_hz: f64, stop_hz: f64, points: u32) -> JsValue {
    js::object(&[
        ("amplifier", a.clone()),
        ("beta", beta),
        ("startHz", start_hz.into()),
        ("stopHz", stop_hz.into()),
        ("points", points.into()),
    ])
}

fn three_equal_poles(t0: f64) -> JsValue {
    obj(&format!(
        r#"{{"gain": {t0}, "polesHz": [1000, 1000, 1000]}}"#
    ))
}

#[wasm_bindgen_test]
fn sweeps_are_typed_arrays_with_continuous_phase() {
    let a = three_equal_poles(4.0);
    let s = api::loop_gain_sweep(sweep(&a, 1.0.into(), 1.0, 1e7, 701)).unwrap();
    let f = typed(&s, "freqHz");
    let m = typed(&s, "magnitudeDb");
    let p = typed(&s, "phaseDeg");
    assert_eq!((f.len(), m.len(), p.len()), (701, 701, 701));
    assert!((f[0] - 1.0).abs() < 1e-12 && (f[700] - 1e7).abs() < 1e-3);
    // |T(DC)| = 4 → 12.04 dB; three poles give −270° far above, without a wrap.
    // (At 1 Hz the poles take 1.3e-5 dB.)
    assert!((m[0] - 20.0 * 4f64.log10()).abs() < 1e-4);
    assert!(p[700] < -269.0 && p.windows(2).all(|w| w[1] <= w[0]));
    let c = api::closed_loop_sweep(sweep(&a, 1.0.into(), 1.0, 1e7, 101)).unwrap();
    // Af(DC) = 4/5 → −1.94 dB.
    assert!((typed(&c, "magnitudeDb")[0] - 20.0 * 0.8f64.log10()).abs() < 1e-4);
}

#[wasm_bindgen_test]
fn a_held_sweep_is_the_sweep_read_in_place() {
    // The entry module's `loopGainSweepInto`: the sweep kept in the module's memory
    // and read through views, `points` defaulting to the caller's length.
    let a = three_equal_poles(4.0);
    let s = api::loop_gain_sweep(sweep(&a, 1.0.into(), 1.0, 1e7, 301)).unwrap();
    let no_points = js::object(&[
        ("amplifier", a.clone()),
        ("beta", 1.0.into()),
        ("startHz", 1.0.into()),
        ("stopHz", 1e7.into()),
    ]);
    assert_eq!(api::sweep_held(no_points.clone(), false, 301).unwrap(), 301);
    for (k, name) in ["freqHz", "magnitudeDb", "phaseDeg"].iter().enumerate() {
        assert_eq!(
            api::held_sweep_view(k as u32).to_vec(),
            typed(&s, name),
            "{name}"
        );
    }
    let c = api::closed_loop_sweep(sweep(&a, 1.0.into(), 1.0, 1e7, 11)).unwrap();
    assert_eq!(api::sweep_held(no_points.clone(), true, 11).unwrap(), 11);
    assert_eq!(api::held_sweep_view(1).to_vec(), typed(&c, "magnitudeDb"));
    // `points` given must equal the length; a count refused by the core is named as
    // the place it came from.
    assert_thrown(
        api::sweep_held(sweep(&a, 1.0.into(), 1.0, 1e7, 300), false, 301),
        "out_of_domain",
        "into.freqHz",
    );
    assert_thrown(
        api::sweep_held(no_points.clone(), false, 1),
        "out_of_domain",
        "into.freqHz",
    );
    assert_thrown(
        api::sweep_held(sweep(&a, 1.0.into(), 1.0, 1e7, 1), false, 1),
        "out_of_domain",
        "points",
    );
    // A refused call leaves the held sweep as it was.
    assert_eq!(api::held_sweep_view(2).to_vec().len(), 11);
}

#[wasm_bindgen_test]
fn margins_poles_and_bandwidth_are_plain_objects() {
    // Three equal poles, T0 = 4: GM = 20·log10(8/4) dB at √3 times the pole
    // frequency (the T0 = 8 trade fact, common practice, no source).
    let m = api::stability_margins(three_equal_poles(4.0), 1.0.into(), JsValue::UNDEFINED).unwrap();
    assert!((num(&m, "gainMarginDb") - 20.0 * 2f64.log10()).abs() < 1e-9);
    assert!((num(&m, "phaseCrossoverHz") / (1e3 * 3f64.sqrt()) - 1.0).abs() < 1e-10);
    assert_eq!(text(&m, "validity"), "meaningful");
    assert!(Array::is_array(&field(&m, "gainCrossings")));

    // (1 + p)³ + 4 with ωn at the poles: the closed loop is 4/(5 + 3p + 3p² + p³).
    let t = api::closed_loop_transfer(three_equal_poles(4.0), 1.0.into()).unwrap();
    let den = Array::from(&field(&t, "denominator"));
    assert_eq!(den.length(), 4);
    assert!((den.get(0).as_f64().unwrap() - 5.0).abs() < 1e-12);

    let p = api::closed_loop_poles(three_equal_poles(12.0), 1.0.into()).unwrap();
    assert_eq!(text(&p, "verdict"), "unstable");
    assert_eq!(Array::from(&field(&p, "poles")).length(), 3);

    // One pole at 10 Hz, A0β = 1000: fHf = 10 Hz·1001 (single-pole closed form).
    let b =
        api::closed_loop_bandwidth(obj(r#"{"gain": 1e5, "polesHz": [10]}"#), 0.01.into()).unwrap();
    assert!((num(&b, "highHz") / 10_010.0 - 1.0).abs() < 1e-9);
    assert!(field(&b, "lowHz").is_null() && field(&b, "peakHz").is_null());

    // β as a model object (a feedback capacitor's zero) is accepted too.
    let beta = obj(r#"{"gain": 0.1, "zerosHz": [2e5], "polesHz": [2e6]}"#);
    let m = api::stability_margins(
        obj(r#"{"gain": 1e5, "polesHz": [10, 1e6, 1e7]}"#),
        beta,
        JsValue::UNDEFINED,
    )
    .unwrap();
    assert!(num(&m, "phaseMarginDeg") > 0.0);

    // No crossover: the margin is null (unbounded), not an error.
    let small = api::stability_margins(
        obj(r#"{"gain": 0.5, "polesHz": [1e3]}"#),
        1.0.into(),
        JsValue::UNDEFINED,
    )
    .unwrap();
    assert!(field(&small, "phaseMarginDeg").is_null());
}

#[wasm_bindgen_test]
fn step_response_has_metrics_and_a_waveform() {
    // Single pole: 10–90 % rise = ln 9·τ with τ = 1/(2π·10 010 Hz), no overshoot.
    let s = api::step_response(
        obj(r#"{"gain": 1e5, "polesHz": [10]}"#),
        0.01.into(),
        0.02,
        300,
    )
    .unwrap();
    let tau = 1.0 / (core::f64::consts::TAU * 10_010.0);
    assert!((num(&s, "riseTimeS") / (9f64.ln() * tau) - 1.0).abs() < 1e-8);
    assert_eq!(num(&s, "overshootPercent"), 0.0);
    assert_eq!(typed(&s, "timeS").len(), 300);
    assert_eq!(typed(&s, "output").len(), 300);
    let w = api::step_waveform(three_equal_poles(12.0), 1.0.into(), 1e-3, 50).unwrap();
    assert_eq!(typed(&w, "output").len(), 50);
}

#[wasm_bindgen_test]
fn analyze_loop_gathers_every_part() {
    // Three equal poles at T0 = 4 are stable; at T0 = 12 unstable (the T0 = 8
    // trade fact, common practice, no source), so the step is null with a note.
    let s = api::analyze_loop(three_equal_poles(4.0), 1.0.into(), 0.02, 100).unwrap();
    assert_eq!(text(&field(&s, "poles"), "verdict"), "stable");
    assert!((num(&field(&s, "margins"), "gainMarginDb") - 20.0 * 2f64.log10()).abs() < 1e-9);
    assert!(num(&field(&s, "step"), "overshootPercent") > 0.0);
    assert!(field(&s, "stepNote").is_null());
    let u = api::analyze_loop(three_equal_poles(12.0), 1.0.into(), 0.02, 100).unwrap();
    assert_eq!(text(&field(&u, "poles"), "verdict"), "unstable");
    assert!(field(&u, "step").is_null());
    assert!(text(&u, "stepNote").contains("not stable"));
}

#[wasm_bindgen_test]
fn closed_forms_and_compensation() {
    let r = api::two_pole_response(1e3, 1e6, 999.0).unwrap();
    // Q = √((1+T0)·f1·f2)/(f1+f2) (two-pole closed form).
    assert!((num(&r, "q") - (1e3f64 * 1e3 * 1e6).sqrt() / 1.001e6).abs() < 1e-12);
    assert!(
        (checked(api::single_pole_high_cutoff(10.0, 1e5, 0.01)).unwrap() - 10_010.0).abs() < 1e-9
    );
    assert!((checked(api::single_pole_low_cutoff(100.0, 1e3, 0.099)).unwrap() - 1.0).abs() < 1e-12);
    assert_eq!(checked(api::gain_bandwidth(1e5, 10.0)).unwrap(), 1e6);
    let c =
        api::dominant_pole_for_margin(obj(r#"{"gain": 1e5, "polesHz": [1e6, 1e7]}"#), 1.0, 60.0)
            .unwrap();
    assert!((num(&c, "phaseMarginDeg") - 60.0).abs() < 1e-6);
    let c = api::max_beta_for_margin(
        obj(r#"{"gain": 1e4, "polesHz": [1e3, 1e5, 1e6]}"#),
        45.0,
        1.0,
    )
    .unwrap();
    assert!((num(&c, "phaseMarginDeg") - 45.0).abs() < 1e-6);
}

#[wasm_bindgen_test]
fn margins_read_every_crossing_as_its_distance_to_minus_one() {
    // A resonance lifting |T| above 1 crosses twice, at ∠T = −28.5° (151.48°) and
    // −148.6° (31.39°); the margin is the smaller, the loop stable. Reference:
    // "resonance crossing unity twice, Q 20" in tests/reference/freq_loops.py
    // (python-control crossings, read by the definition).
    let a = obj(r#"{"gain": 0.1, "complexPoles": [{"freqHz": 1e6, "q": 20}]}"#);
    let m = api::stability_margins(a, 1.0.into(), JsValue::UNDEFINED).unwrap();
    assert!((num(&m, "phaseMarginDeg") - 31.392871767382786).abs() < 1e-8);
    assert_eq!(text(&m, "closedLoop"), "stable");
    let crossings = Array::from(&field(&m, "gainCrossings"));
    assert_eq!(crossings.length(), 2);
    assert!((num(&crossings.get(0), "margin") - 151.4758135796598).abs() < 1e-8);
    // The largest β where the margin dips and recovers (brute-force scan,
    // "max_beta" in tests/reference/freq_loops.py).
    let c = api::max_beta_for_margin(
        obj(r#"{"gain": 1e5, "polesHz": [10, 1e3, 3e5, 3e5], "zerosHz": [1e4]}"#),
        60.0,
        1.0,
    )
    .unwrap();
    assert!((num(&c, "value") / 0.557748041551195 - 1.0).abs() < 1e-8);
    assert!((num(&c, "holdsFrom") / 0.20626568857002642 - 1.0).abs() < 1e-8);
}

#[wasm_bindgen_test]
fn bad_input_throws_typed_errors() {
    let a = obj(r#"{"gain": 1e5, "polesHz": [10]}"#);
    assert_thrown(
        api::loop_gain_sweep(sweep(&a, 0.1.into(), 10.0, 1.0, 10)),
        "out_of_domain",
        "stopHz",
    );
    assert_thrown(
        api::loop_gain_sweep(sweep(&a, 0.1.into(), 1.0, 10.0, 100_001)),
        "too_large",
        "points",
    );
    assert_thrown(
        api::stability_margins(
            obj(r#"{"gain": 1e5, "polesHz": [-10]}"#),
            0.1.into(),
            JsValue::UNDEFINED,
        ),
        "out_of_domain",
        "amplifier.polesHz",
    );
    assert_thrown(
        api::stability_margins(
            obj(r#"{"gain": 1e5, "complexPoles": [{"freqHz": 1e3, "q": 0}]}"#),
            0.1.into(),
            JsValue::UNDEFINED,
        ),
        "out_of_domain",
        "amplifier.complexPoles",
    );
    assert_thrown(
        api::stability_margins(
            obj(r#"{"gain": 1e5, "poles": [10]}"#),
            0.1.into(),
            JsValue::UNDEFINED,
        ),
        "unknown_field",
        "amplifier.poles",
    );
    assert_thrown(
        api::stability_margins(obj(r#"{"gain": "big"}"#), 0.1.into(), JsValue::UNDEFINED),
        "wrong_type",
        "amplifier.gain",
    );
    // The path of a wrong element, and a missing gain.
    assert_thrown(
        api::stability_margins(
            obj(r#"{"gain": 1e5, "polesHz": [10, 20, "3"]}"#),
            0.1.into(),
            JsValue::UNDEFINED,
        ),
        "wrong_type",
        "amplifier.polesHz[2]",
    );
    assert_thrown(
        api::stability_margins(obj(r#"{"polesHz": [10]}"#), 0.1.into(), JsValue::UNDEFINED),
        "missing",
        "amplifier.gain",
    );
    assert_thrown(
        api::stability_margins(
            obj(r#"{"gain": 1e5, "polesHz": "10"}"#),
            0.1.into(),
            JsValue::UNDEFINED,
        ),
        "wrong_type",
        "amplifier.polesHz",
    );
    assert_thrown(
        api::closed_loop_sweep(obj(
            r#"{"amplifier": {"gain": 1e5}, "beta": 0.1, "startHz": 1}"#,
        )),
        "missing",
        "stopHz",
    );
    assert_thrown(
        api::closed_loop_poles(a.clone(), obj(r#"{"gain": 0.1, "zerosHz": [1, 2]}"#)),
        "out_of_domain",
        "beta.zerosHz",
    );
    assert_thrown(
        api::step_response(three_equal_poles(12.0), 1.0.into(), 0.02, 100),
        "unreachable",
        "closedLoop",
    );
    assert_thrown(
        api::two_pole_response(1e3, 1e6, -1.0),
        "out_of_domain",
        "t0",
    );
    assert_thrown(
        api::closed_loop_poles(a.clone(), obj(r#"{"gain": 0.1, "padeOrder": 4}"#)),
        "out_of_domain",
        "beta.padeOrder",
    );
    assert_thrown(
        api::closed_loop_poles(
            obj(r#"{"gain": 10, "delayS": 1e-6, "padeOrder": 0}"#),
            0.1.into(),
        ),
        "out_of_domain",
        "amplifier.padeOrder",
    );
    assert_thrown(
        api::closed_loop_bandwidth(a, JsValue::from(f64::NAN)),
        "not_finite",
        "beta.gain",
    );
}

#[wasm_bindgen_test]
fn margins_can_carry_the_poles_that_sign_them() {
    // Not a numeric oracle but an identity: with `{closedLoopPoles: true}` the margins
    // are those of the two-argument call and the poles those of `closedLoopPoles`
    // (both compared as JSON text, so every digit must agree). T0 = 12 with three equal
    // poles is past the T0 = 8 limit, so the margins are signed negative by the poles.
    let json = |v: &JsValue| JSON::stringify(v).unwrap().as_string().unwrap();
    for t0 in [4.0, 12.0] {
        let plain =
            api::stability_margins(three_equal_poles(t0), 1.0.into(), JsValue::UNDEFINED).unwrap();
        let asked = api::stability_margins(
            three_equal_poles(t0),
            1.0.into(),
            obj(r#"{"closedLoopPoles": true}"#),
        )
        .unwrap();
        let poles = api::closed_loop_poles(three_equal_poles(t0), 1.0.into()).unwrap();
        assert_eq!(json(&field(&asked, "closedLoopPoles")), json(&poles));
        js_sys::Reflect::delete_property(
            asked.unchecked_ref::<js_sys::Object>(),
            &"closedLoopPoles".into(),
        )
        .unwrap();
        assert_eq!(json(&asked), json(&plain));
        let not_asked = api::stability_margins(
            three_equal_poles(t0),
            1.0.into(),
            obj(r#"{"closedLoopPoles": false}"#),
        )
        .unwrap();
        assert!(field(&not_asked, "closedLoopPoles").is_undefined());
    }
    assert!(
        num(
            &api::stability_margins(three_equal_poles(12.0), 1.0.into(), JsValue::UNDEFINED)
                .unwrap(),
            "gainMarginDb"
        ) < 0.0
    );
    assert_thrown(
        api::stability_margins(
            three_equal_poles(4.0),
            1.0.into(),
            obj(r#"{"closedLoopPoles": 1}"#),
        ),
        "wrong_type",
        "closedLoopPoles",
    );
    assert_thrown(
        api::stability_margins(
            three_equal_poles(4.0),
            1.0.into(),
            obj(r#"{"poles": true}"#),
        ),
        "unknown_field",
        "poles",
    );
}
