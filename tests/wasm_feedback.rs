//! The JS boundary of the feedback relations, run in a real browser (headless
//! Chromium and Firefox through wasm-bindgen-test): numbers, structured results
//! as plain objects, and thrown errors with `code` and `param`.
#![cfg(target_arch = "wasm32")]

use loopwright::wasm::feedback as api;
use wasm_bindgen::JsCast;
use wasm_bindgen_test::*;

wasm_bindgen_test_configure!(run_in_browser);

#[path = "support/js.rs"]
mod js;
use js::{assert_thrown, checked, field, num, object, text};
use wasm_bindgen::JsValue;

/// The options of `impedancesWithFeedback` with real impedances and gains.
fn impedance_options(topology: &str, zi: f64, zo: f64, a: f64, beta: f64) -> JsValue {
    object(&[
        ("topology", topology.into()),
        ("ziRe", zi.into()),
        ("zoRe", zo.into()),
        ("aRe", a.into()),
        ("betaRe", beta.into()),
    ])
}

#[wasm_bindgen_test]
fn scalar_functions_return_numbers() {
    // Sedra & Smith, Microelectronic Circuits, 7th ed., Example 10.1 (from memory):
    // A = 10⁴, Af = 10 → β = 0.0999, D = 1000 (60 dB).
    let beta = checked(api::beta_for_gain(1e4, 10.0)).unwrap();
    assert!((beta - 0.0999).abs() < 1e-15);
    assert!((checked(api::closed_loop_gain(1e4, beta)).unwrap() - 10.0).abs() < 1e-12);
    assert!((checked(api::loop_gain(1e4, beta)).unwrap() - 999.0).abs() < 1e-9);
    assert!((checked(api::feedback_amount(1e4, beta)).unwrap() - 1000.0).abs() < 1e-9);
    assert!((checked(api::feedback_amount_db(1e4, beta)).unwrap() - 60.0).abs() < 1e-9);
    assert!((checked(api::gain_sensitivity(1e4, beta)).unwrap() - 1e-3).abs() < 1e-15);
    assert!((checked(api::min_open_loop_gain(0.01, 0.001)).unwrap() - 99_900.0).abs() < 1e-8);
    // Ideal β = 1/Af (sympy limit, tests/reference/feedback_inverse_sympy.py): 1/10 = 0.1.
    assert_eq!(checked(api::ideal_beta(10.0)).unwrap(), 0.1);
}

#[wasm_bindgen_test]
fn structured_results_are_plain_objects() {
    let s = api::summarize_feedback("Voltage-Shunt", -1e5, -1e-3).unwrap();
    assert_eq!(text(&s, "topology"), "shunt-shunt");
    assert_eq!(text(&s, "gainUnit"), "V/A");
    assert_eq!(text(&s, "betaUnit"), "A/V");
    assert_eq!(text(&s, "sense"), "negative");
    assert!((num(&s, "closedLoopGain") + 1e5 / 101.0).abs() < 1e-9);
    assert!((num(&s, "idealGain") + 1e3).abs() < 1e-9);

    let none = api::summarize_feedback("series-shunt", 10.0, 0.0).unwrap();
    assert!(field(&none, "idealGain").is_null());

    let z =
        api::impedances_with_feedback(impedance_options("series-shunt", 1e6, 100.0, 1e4, 0.0999))
            .unwrap();
    assert!((num(&field(&z, "input"), "re") - 1e9).abs() < 1e-3);
    assert!((num(&field(&z, "output"), "magnitude") - 0.1).abs() < 1e-12);

    let p = api::loop_phasors(0.0, -1000.0, 0.1, 0.0).unwrap();
    let d = field(&p, "feedbackAmount");
    assert!((num(&d, "re") - 1.0).abs() < 1e-12 && (num(&d, "im") + 100.0).abs() < 1e-12);

    let c = api::max_closed_loop_gain(1e5, 100.0).unwrap();
    assert!((num(&c, "closedLoopGain") - 1000.0).abs() < 1e-9);

    let g = api::gain_spread(0.01, 5e4, 1e5, 2e5).unwrap();
    assert_eq!(field(&g, "positiveFeedback").as_bool(), Some(false));
    assert!((num(&g, "spreadPpm") - num(&g, "spreadPercent") * 1e4).abs() < 1e-6);

    let t = api::topology_info("current-series").unwrap();
    assert_eq!(text(&t, "name"), "series-series");
    assert_eq!(text(&t, "mixing"), "series");
    assert_eq!(text(&t, "sampling"), "current");
}

#[wasm_bindgen_test]
fn bad_input_throws_typed_errors() {
    assert_thrown(
        checked(api::closed_loop_gain(f64::NAN, 0.1)),
        "not_finite",
        "a",
    );
    assert_thrown(
        checked(api::closed_loop_gain(0.0, 0.1)),
        "out_of_domain",
        "a",
    );
    assert_thrown(
        checked(api::closed_loop_gain(-10.0, 0.1)),
        "oscillation",
        "beta",
    );
    assert_thrown(
        checked(api::beta_for_gain(100.0, 1000.0)),
        "unreachable",
        "targetGain",
    );
    assert_thrown(
        api::summarize_feedback("series-parallel", 1.0, 1.0),
        "unknown_name",
        "topology",
    );
    assert_thrown(
        api::impedances_with_feedback(impedance_options("shunt-shunt", -1.0, 1.0, 1.0, 1.0)),
        "out_of_domain",
        "ziRe",
    );
    // The options object: a misspelt field, a missing one, a wrong type, by name.
    assert_thrown(
        api::impedances_with_feedback(object(&[
            ("topology", "series-shunt".into()),
            ("ziRe", 1e6.into()),
            ("zoRe", 100.0.into()),
            ("aRe", 1e4.into()),
            ("betaRe", 0.1.into()),
            ("zoIM", 0.0.into()),
        ])),
        "unknown_field",
        "zoIM",
    );
    assert_thrown(
        api::impedances_with_feedback(object(&[
            ("topology", "series-shunt".into()),
            ("ziRe", 1e6.into()),
            ("aRe", 1e4.into()),
            ("betaRe", 0.1.into()),
        ])),
        "missing",
        "zoRe",
    );
    assert_thrown(
        api::impedances_with_feedback(object(&[
            ("topology", "series-shunt".into()),
            ("ziRe", "1e6".into()),
            ("zoRe", 100.0.into()),
            ("aRe", 1e4.into()),
            ("betaRe", 0.1.into()),
        ])),
        "wrong_type",
        "ziRe",
    );
    assert_thrown(
        api::impedances_with_feedback(JsValue::from(3.0)),
        "wrong_type",
        "options",
    );
    assert_thrown(checked(api::ideal_beta(0.0)), "out_of_domain", "targetGain");
    assert_thrown(
        checked(api::min_open_loop_gain(0.1, 2.0)),
        "out_of_domain",
        "gainError",
    );
    assert_thrown(
        api::gain_spread(0.1, 3.0, 2.0, 1.0),
        "out_of_domain",
        "aTyp",
    );
}

#[wasm_bindgen_test]
fn a_failed_scalar_call_keeps_its_error_for_one_take() {
    // The scalar exports return NaN on failure and keep the LoopwrightError for the
    // entry module to throw (src/wasm/mod.rs `scalar`, facade/loopwright.js).
    assert!(api::closed_loop_gain(-10.0, 0.1).is_nan());
    let e = loopwright::wasm::take_error();
    assert_eq!(text(&e, "code"), "oscillation");
    assert_eq!(text(&e, "param"), "beta");
    // Taken once: nothing stale is left for the next call.
    assert!(loopwright::wasm::take_error().is_undefined());
    // A success leaves nothing behind.
    assert_eq!(api::closed_loop_gain(1e5, 0.0), 1e5);
    assert!(loopwright::wasm::take_error().is_undefined());
    // Many failures in a row keep the module healthy (nothing leaks per call).
    for _ in 0..50_000 {
        assert!(api::loop_gain(f64::INFINITY, 0.1).is_nan());
    }
    assert_eq!(text(&loopwright::wasm::take_error(), "code"), "not_finite");
    assert_eq!(api::loop_gain(1e3, 0.1), 100.0);
}

#[wasm_bindgen_test]
fn packed_summary_matches_the_object_and_keeps_its_errors() {
    // The entry module builds summarizeFeedback from these (facade/loopwright.js).
    let index = checked(api::topology_index("Voltage-Shunt")).unwrap();
    assert_eq!(index, 3.0);
    assert_eq!(
        checked(api::summarize_feedback_packed(3, -1e5, -1e-3)),
        Ok(0.0)
    );
    let packed = loopwright::wasm::scratch_view();
    let object = api::summarize_feedback("shunt-shunt", -1e5, -1e-3).unwrap();
    let names = [
        "closedLoopGain",
        "loopGain",
        "feedbackAmount",
        "feedbackAmountDb",
        "sensitivity",
        "idealGain",
        "gainError",
    ];
    for (i, name) in names.iter().enumerate() {
        assert_eq!(packed.get_index(i as u32), num(&object, name), "{name}");
    }
    let labels = api::feedback_labels().unwrap();
    let senses: js_sys::Array = field(&labels, "senses").dyn_into().unwrap();
    assert_eq!(
        senses.get(packed.get_index(7) as u32).as_string().unwrap(),
        text(&object, "sense")
    );
    let shunt_shunt = js_sys::Array::from(&field(&labels, "topologies")).get(3);
    assert_eq!(text(&shunt_shunt, "gainUnit"), "V/A");
    // β = 0: no ideal gain, NaN in the packed form.
    assert_eq!(
        checked(api::summarize_feedback_packed(0, 10.0, 0.0)),
        Ok(0.0)
    );
    assert!(packed.get_index(5).is_nan());
    assert_thrown(
        checked(api::summarize_feedback_packed(4, 10.0, 0.1)),
        "out_of_domain",
        "topology",
    );
    assert_thrown(
        checked(api::topology_index("series-parallel")),
        "unknown_name",
        "topology",
    );
    // The view reads the module's memory in place: after the memory grows it is
    // empty (its buffer detached) and a fresh one reads the same numbers.
    let before = packed.get_index(0);
    // More bytes than the whole memory holds now, so it must grow.
    let size = packed.buffer().byte_length() as usize;
    let big: Vec<u8> = vec![1; size + 1];
    assert_eq!(big.len(), size + 1);
    assert_eq!(packed.length(), 0, "the old view is detached by the growth");
    assert_eq!(loopwright::wasm::scratch_view().get_index(0), before);
}
