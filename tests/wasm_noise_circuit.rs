//! The JS boundary of the circuit noise analysis (`circuitNoise`,
//! `circuitNoiseIntegral`), run in a real browser through wasm-bindgen-test:
//! typed arrays by source name, the noise gain of a transimpedance stage, the
//! band integral and SNR, and thrown errors naming the field.
#![cfg(target_arch = "wasm32")]

use loopwright::wasm::noise::circuit as api;
use wasm_bindgen::JsValue;
use wasm_bindgen_test::*;

wasm_bindgen_test_configure!(run_in_browser);

#[path = "support/js.rs"]
mod js;
use js::{field, num, text, typed};

const K: f64 = 1.380649e-23;

/// A transimpedance stage: photodiode current 100 nA with Cs = 100 pF, Rf = 1 MΩ ‖
/// Cf = 2 pF, an amplifier of 5 nV/√Hz and 100 GHz GBW (near-ideal).
const TIA: &str = r#"{"format":"loopwright-circuit","version":2,"elements":[
  {"name":"Ipd","kind":"current-source","nodes":["0","inv"],"value":1e-7},
  {"name":"Cs","kind":"capacitor","nodes":["inv","0"],"value":1e-10},
  {"name":"Rf","kind":"resistor","nodes":["out","inv"],"value":1e6},
  {"name":"Cf","kind":"capacitor","nodes":["out","inv"],"value":2e-12},
  {"name":"U1","kind":"amplifier","nodes":["out","0"],"control":["0","inv"],
   "model":{"a0":1e6,"gbwHz":1e11,"voltageNoise":{"density":5e-9,"cornerHz":0}}}]}"#;

fn options(fields: &[(&str, JsValue)]) -> JsValue {
    js::object(fields)
}

fn shot() -> JsValue {
    let arr = js_sys::Array::new();
    arr.push(&js::object(&[
        ("element", "Ipd".into()),
        ("shot", JsValue::TRUE),
    ]));
    arr.into()
}

#[wasm_bindgen_test]
fn densities_come_back_by_source_name() {
    let r = api::circuit_noise(options(&[
        ("circuit", TIA.into()),
        ("output", "out".into()),
        (
            "frequenciesHz",
            js_sys::Float64Array::from(&[1.0, 2e6][..]).into(),
        ),
        ("inputSource", "Ipd".into()),
        ("currentNoise", shot()),
    ]))
    .unwrap();
    let total = typed(&r, "total");
    let sources = field(&r, "sources");
    let rf = typed(&sources, "Rf");
    let ipd = typed(&sources, "Ipd");
    // Rf's thermal noise current √(4kT/Rf) through Rf at 1 Hz is √(4kT·Rf)
    // (Johnson–Nyquist, k exact in the 2019 SI); Ipd's shot noise √(2qI)·Rf.
    assert!((rf[0] / (4.0 * K * 300.0 * 1e6f64).sqrt() - 1.0).abs() < 1e-4);
    assert!((ipd[0] / ((2.0 * 1.602176634e-19 * 1e-7f64).sqrt() * 1e6) - 1.0).abs() < 1e-4);
    // Contributions add in power (uncorrelated sources).
    let en = typed(&sources, "U1.en");
    let sum = rf[0].powi(2) + ipd[0].powi(2) + en[0].powi(2);
    assert!((sum.sqrt() / total[0] - 1.0).abs() < 1e-12);
    // Noise gain 1 + Cs/Cf = 51 above the feedback pole (fact of the trade, e.g.
    // J. Graeme, Photodiode Amplifiers, 1996, from memory): 0.5 % at 2 MHz.
    let ng = typed(&r, "noiseGain");
    assert!((ng[1] / 51.0 - 1.0).abs() < 5e-3, "{}", ng[1]);
    assert_eq!(text(&field(&r, "kinds"), "Ipd"), "current-source");
    assert!(num(&field(&r, "noiseGainPeak"), "value") >= ng[1]);
}

#[wasm_bindgen_test]
fn band_integral_and_snr() {
    // A 1 kΩ resistor over 0…10 kHz: 4.07 nV/√Hz·100 = 407 nV rms.
    let doc = r#"{"format":"loopwright-circuit","version":1,"elements":[
      {"name":"R1","kind":"resistor","nodes":["a","0"],"value":1000}]}"#;
    let r = api::circuit_noise_integral(options(&[
        ("circuit", doc.into()),
        ("output", "a".into()),
        ("bandHz", js_sys::Float64Array::from(&[0.0, 1e4][..]).into()),
        ("signalRms", 1.0.into()),
    ]))
    .unwrap();
    let want = (4.0 * K * 300.0 * 1e3 * 1e4f64).sqrt();
    assert!((num(&r, "totalRms") / want - 1.0).abs() < 1e-8);
    assert!((num(&r, "snrDb") - 20.0 * (1.0 / want).log10()).abs() < 1e-8);
}

#[wasm_bindgen_test]
fn bad_input_names_the_field() {
    let f = || JsValue::from(js_sys::Float64Array::from(&[1e3][..]));
    let e = api::circuit_noise(options(&[
        ("circuit", TIA.into()),
        ("output", "nowhere".into()),
        ("frequenciesHz", f()),
    ]));
    let e = js::assert_thrown(e, "unknown_name", "output");
    assert_eq!(text(&e, "subject"), "nowhere");
    let e = api::circuit_noise(options(&[
        ("circuit", TIA.into()),
        ("output", "out".into()),
        ("frequenciesHz", f()),
        ("temperatureK", (-1.0).into()),
    ]));
    js::assert_thrown(e, "out_of_domain", "temperatureK");
    let e = api::circuit_noise_integral(options(&[
        ("circuit", TIA.into()),
        ("output", "out".into()),
        (
            "bandHz",
            js_sys::Float64Array::from(&[1e4, 10.0][..]).into(),
        ),
    ]));
    js::assert_thrown(e, "out_of_domain", "bandHz");
    let neg = js_sys::Array::new();
    neg.push(&js::object(&[
        ("element", "Ipd".into()),
        ("density", (-1e-12).into()),
    ]));
    let e = api::circuit_noise(options(&[
        ("circuit", TIA.into()),
        ("output", "out".into()),
        ("frequenciesHz", f()),
        ("currentNoise", neg.into()),
    ]));
    js::assert_thrown(e, "out_of_domain", "currentNoise");
    let e = api::circuit_noise(options(&[
        ("circuit", TIA.into()),
        ("output", "out".into()),
        ("frequenciesHz", f()),
        ("bandHz", f()),
    ]));
    js::assert_thrown(e, "unknown_field", "bandHz");
    // The object form of `output` is {plus, minus} or {element}: another field is
    // named by its path, a half-given pair is refused at `output`.
    let e = api::circuit_noise(options(&[
        ("circuit", TIA.into()),
        ("output", js::object(&[("node", "out".into())])),
        ("frequenciesHz", f()),
    ]));
    js::assert_thrown(e, "unknown_field", "output.node");
    let e = api::circuit_noise(options(&[
        ("circuit", TIA.into()),
        ("output", js::object(&[("plus", "out".into())])),
        ("frequenciesHz", f()),
    ]));
    js::assert_thrown(e, "out_of_domain", "output");
    let e = api::circuit_noise(options(&[
        ("circuit", TIA.into()),
        ("output", 3.into()),
        ("frequenciesHz", f()),
    ]));
    js::assert_thrown(e, "wrong_type", "output");
}
