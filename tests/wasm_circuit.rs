//! The JS boundary of the circuit area, run in a real browser through
//! wasm-bindgen-test: the circuit JSON in and out, exact / two-port / ideal side by
//! side for all four topologies, Blackman and asymptotic gain, sweeps as typed
//! arrays, and thrown errors with `code`, `param` and `subject`.
#![cfg(target_arch = "wasm32")]

use loopwright::wasm::circuit as api;
use wasm_bindgen::{JsCast, JsValue};
use wasm_bindgen_test::*;

wasm_bindgen_test_configure!(run_in_browser);

#[path = "support/js.rs"]
mod js;
use js::{field, num, text};

fn assert_thrown(
    r: Result<impl core::fmt::Debug, JsValue>,
    code: &str,
    param: &str,
    subject: &str,
) {
    let e = js::assert_thrown(r, code, param);
    assert_eq!(text(&e, "subject"), subject);
}

/// The options object of a template stage: topology, ri, ro, gain, ci, co, rf, rg,
/// cf, rs, rl and, when given, frequencyHz.
fn template(topology: &str, v: impl IntoIterator<Item = f64>) -> JsValue {
    const NAMES: [&str; 11] = [
        "ri",
        "ro",
        "gain",
        "ci",
        "co",
        "rf",
        "rg",
        "cf",
        "rs",
        "rl",
        "frequencyHz",
    ];
    let mut fields = vec![("topology", JsValue::from(topology))];
    fields.extend(NAMES.iter().zip(v).map(|(n, x)| (*n, JsValue::from(x))));
    js::object(&fields)
}

/// The options object of a function that probes a circuit document.
fn probe(texts: &[(&str, &str)], frequencies: Option<&[f64]>) -> JsValue {
    let mut fields: Vec<(&str, JsValue)> =
        texts.iter().map(|(n, t)| (*n, JsValue::from(*t))).collect();
    if let Some(f) = frequencies {
        fields.push(("frequencies", js_sys::Float64Array::from(f).into()));
    }
    js::object(&fields)
}

fn re(obj: &JsValue, name: &str) -> f64 {
    num(&field(obj, name), "re")
}

const DIVIDER: &str = r#"{"format":"loopwright-circuit","version":1,"elements":[
  {"name":"V1","kind":"voltage-source","nodes":["in","0"],"value":10},
  {"name":"R1","kind":"resistor","nodes":["in","out"],"value":"3k"},
  {"name":"R2","kind":"resistor","nodes":["out","0"],"value":"1k0"}]}"#;

#[wasm_bindgen_test]
fn values_and_round_trip() {
    // The document round trip: "3k" is written back as 3000.0, and again unchanged.
    let once = api::circuit_normalize(DIVIDER).unwrap();
    assert!(
        once.contains("\"value\":3000.0") && once.contains("\"format\":\"loopwright-circuit\""),
        "{once}"
    );
    assert_eq!(api::circuit_normalize(&once).unwrap(), once);
}

#[wasm_bindgen_test]
fn solve_and_port_impedance() {
    // Divider: Vout = 10·1k/(3k + 1k) = 2.5 V; R1 ‖ R2 = 750 Ω (Ohm's law).
    let s = api::circuit_solve(DIVIDER, 0.0).unwrap();
    let volts: js_sys::Array = field(&s, "nodeVoltages").dyn_into().unwrap();
    let out = volts.iter().find(|v| text(v, "name") == "out").unwrap();
    assert!((num(&out, "re") - 2.5).abs() < 1e-12);
    let currents: js_sys::Array = field(&s, "elementCurrents").dyn_into().unwrap();
    assert_eq!(currents.length(), 3);
    let z = api::circuit_port_impedance(DIVIDER, "out", "0", 0.0).unwrap();
    assert!((num(&z, "re") - 750.0).abs() < 1e-9 && num(&z, "im") == 0.0);
    assert_thrown(
        api::circuit_port_impedance(DIVIDER, "out", "nowhere", 0.0),
        "unknown_name",
        "node",
        "nowhere",
    );
}

#[wasm_bindgen_test]
fn sweep_returns_typed_arrays() {
    let rc = DIVIDER.replace(
        r#""kind":"resistor","nodes":["out","0"],"value":"1k0""#,
        r#""kind":"capacitor","nodes":["out","0"],"value":"1u""#,
    );
    let freqs = [0.0, 1.0 / (2.0 * core::f64::consts::PI * 3e-3), 1e6];
    let h = api::circuit_sweep(probe(
        &[
            ("circuit", rc.as_str()),
            ("source", "V1"),
            ("plus", "out"),
            ("minus", "0"),
        ],
        Some(&freqs),
    ))
    .unwrap();
    let re: js_sys::Float64Array = field(&h, "re").dyn_into().unwrap();
    let im: js_sys::Float64Array = field(&h, "im").dyn_into().unwrap();
    assert_eq!(re.length(), 3);
    // First-order low-pass 1/(1 + jωRC) per unit source: 1 at DC, (1 − j)/2 at the corner.
    assert!((re.get_index(0) - 1.0).abs() < 1e-12);
    assert!((re.get_index(1) - 0.5).abs() < 1e-12 && (im.get_index(1) + 0.5).abs() < 1e-12);
    assert_thrown(
        api::circuit_sweep(probe(
            &[
                ("circuit", rc.as_str()),
                ("source", "R1"),
                ("plus", "out"),
                ("minus", "0"),
            ],
            Some(&freqs),
        )),
        "out_of_domain",
        "source",
        "R1",
    );
}

/// One stage per topology: (name, ri, ro, gain, rf, rg, ideal 1/β).
const STAGES: [(&str, f64, f64, f64, f64, f64, f64); 4] = [
    ("series-shunt", 1e5, 1e3, 1e4, 9e3, 1e3, 10.0),
    ("shunt-shunt", 100.0, 1e3, -1e8, 1e4, 0.0, -1e4),
    ("series-series", 1e5, 1e4, 1.0, 0.0, 100.0, 0.01),
    ("shunt-series", 100.0, 1e5, -1e4, 9e3, 1e3, -10.0),
];

#[wasm_bindgen_test]
fn exact_two_port_and_ideal_side_by_side_for_all_four_topologies() {
    for (name, ri, ro, gain, rf, rg, ideal) in STAGES {
        let r = api::circuit_two_port(template(
            name,
            [ri, ro, gain, 0.0, 0.0, rf, rg, 0.0, 1e3, 2e3, 0.0],
        ))
        .unwrap();
        assert_eq!(text(&r, "topology"), name);
        // Ideal 1/β of each network (Sedra & Smith, Microelectronic Circuits, 7th ed.,
        // ch. 10, from memory): 1 + Rf/Rg, −Rf, 1/Rsense, −(1 + Rf/Rg).
        assert!(
            (re(&r, "idealAf") - ideal).abs() <= 1e-12 * ideal.abs(),
            "{name} ideal"
        );
        let af = field(&r, "af");
        let (tp, exact) = (re(&af, "twoPort"), re(&af, "exact"));
        let err = num(&af, "relativeError");
        assert!(
            ((tp - exact) / exact).abs() - err < 1e-12,
            "{name} error field"
        );
        // With T ≫ 1 all three agree to within a few per cent; the exact answer is
        // closer to the two-port one than to the ideal one.
        assert!(
            err < 0.02 && num(&r, "idealAfError") < 0.05,
            "{name}: {err}"
        );
        for q in ["rif", "rof", "rin", "rout"] {
            let c = field(&r, q);
            assert!(
                re(&c, "exact").is_finite() && num(&c, "relativeError").is_finite(),
                "{name} {q}"
            );
        }
        assert_eq!(
            text(&field(&r, "parameters"), "kind"),
            ["h", "y", "z", "g"][STAGES.iter().position(|s| s.0 == name).unwrap()]
        );
        // The template's JSON goes back in and solves to the same exact gain.
        let json = api::circuit_template(template(
            name,
            [ri, ro, gain, 0.0, 0.0, rf, rg, 0.0, 1e3, 2e3],
        ))
        .unwrap();
        let s = api::circuit_solve(&json, 0.0).unwrap();
        let (list, key) = if name.ends_with("shunt") {
            ("nodeVoltages", "out")
        } else {
            ("elementCurrents", "Rl")
        };
        let arr: js_sys::Array = field(&s, list).dyn_into().unwrap();
        let v = arr.iter().find(|v| text(v, "name") == key).unwrap();
        assert!(
            ((num(&v, "re") - exact) / exact).abs() < 1e-12,
            "{name} template solve"
        );
    }
}

#[wasm_bindgen_test]
fn blackman_and_asymptotic_gain_agree_with_the_solve() {
    for (name, ri, ro, gain, rf, rg, _) in STAGES {
        // Exact rearrangements: agreement to rounding, here with capacitances at 1 MHz.
        let v = api::circuit_stage_views(template(
            name,
            [ri, ro, gain, 1e-12, 1e-12, rf, rg, 1e-12, 1e3, 2e3, 1e6],
        ))
        .unwrap();
        for part in ["gain", "input", "output"] {
            assert!(
                num(&field(&v, part), "relativeError") < 1e-9,
                "{name} {part}"
            );
        }
    }
    let json = api::circuit_template(template(
        "series-shunt",
        [1e5, 1e3, 1e4, 0.0, 0.0, 9e3, 1e3, 0.0, 1e3, 2e3],
    ))
    .unwrap();
    let g = api::circuit_asymptotic_gain(probe(
        &[
            ("circuit", json.as_str()),
            ("controlled", "A"),
            ("source", "Vs"),
            ("plus", "out"),
            ("minus", "0"),
        ],
        None,
    ))
    .unwrap();
    // G∞ = 1 + Rf/Rg = 10 (the null of the amplifier input forces the divider ratio).
    assert!((re(&g, "gInf") - 10.0).abs() < 1e-9);
    let b = api::circuit_blackman(probe(
        &[
            ("circuit", json.as_str()),
            ("controlled", "A"),
            ("plus", "out"),
            ("minus", "0"),
        ],
        None,
    ))
    .unwrap();
    assert!(num(&b, "relativeError") < 1e-9);
    let gi = api::circuit_asymptotic_gain_current(probe(
        &[
            ("circuit", json.as_str()),
            ("controlled", "A"),
            ("source", "Vs"),
            ("element", "Rl"),
        ],
        None,
    ))
    .unwrap();
    assert!((re(&gi, "exact") * 2e3 - re(&g, "exact")).abs() < 1e-9);
    assert_thrown(
        api::circuit_blackman(probe(
            &[
                ("circuit", json.as_str()),
                ("controlled", "Rf"),
                ("plus", "out"),
                ("minus", "0"),
            ],
            None,
        )),
        "out_of_domain",
        "controlled",
        "Rf",
    );
}

#[wasm_bindgen_test]
fn bad_input_throws_named_errors() {
    assert_thrown(
        api::circuit_normalize(&DIVIDER.replace("\"version\":1", "\"version\":3")),
        "out_of_domain",
        "version",
        "",
    );
    assert_thrown(
        api::circuit_normalize(&DIVIDER.replace("\"3k\"", "\"-3k\"")),
        "out_of_domain",
        "value",
        "R1",
    );
    assert_thrown(
        api::circuit_normalize(&DIVIDER.replace("\"name\":\"R2\"", "\"name\":\"R1\"")),
        "out_of_domain",
        "name",
        "R1",
    );
    let looped = DIVIDER.replace(
        r#"{"name":"R2""#,
        r#"{"name":"V2","kind":"voltage-source","nodes":["in","0"],"value":1},{"name":"R2""#,
    );
    assert_thrown(
        api::circuit_solve(&looped, 0.0),
        "singular",
        "element",
        "V2",
    );
    let floating = DIVIDER.replace(r#""nodes":["out","0"]"#, r#""nodes":["x","y"]"#);
    assert_thrown(api::circuit_solve(&floating, 0.0), "singular", "node", "x");
    assert_thrown(
        api::circuit_two_port(template(
            "sideways",
            [1.0, 1.0, 1.0, 0.0, 0.0, 1.0, 1.0, 0.0, 1.0, 1.0, 0.0],
        )),
        "unknown_name",
        "topology",
        "",
    );
    assert_thrown(
        api::circuit_two_port(template(
            "series-shunt",
            [-1.0, 1.0, 1.0, 0.0, 0.0, 1.0, 1.0, 0.0, 1.0, 1.0, 0.0],
        )),
        "out_of_domain",
        "ri",
        "",
    );
    assert_thrown(
        api::circuit_solve(DIVIDER, f64::NAN),
        "not_finite",
        "frequency",
        "",
    );
}
