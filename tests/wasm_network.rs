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

/// A plain JS object with the given fields (an options object).
fn obj(fields: &[(&str, JsValue)]) -> JsValue {
    let o = js_sys::Object::new();
    for (k, v) in fields {
        js_sys::Reflect::set(&o, &(*k).into(), v).unwrap();
    }
    o.into()
}

fn s(x: &str) -> JsValue {
    x.into()
}

fn n(x: f64) -> JsValue {
    x.into()
}

/// The inverting stage of the tests as `worstCase` options, with `extra` fields.
fn stage(extra: &[(&str, JsValue)]) -> JsValue {
    let mut f = vec![
        ("stage", s("inverting")),
        ("r1", n(10e3)),
        ("r2", n(47e3)),
        ("tolR1", n(0.01)),
        ("tolR2", n(0.01)),
        ("aMin", n(5e4)),
        ("aTyp", n(1e5)),
        ("aMax", n(2e5)),
        ("ri", n(1e6)),
        ("ro", n(75.0)),
        ("poleHz", n(5.0)),
    ];
    for (k, v) in extra {
        f.retain(|(x, _)| x != k);
        f.push((k, v.clone()));
    }
    obj(&f)
}

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
    let r = api::best_pairs(obj(&[
        ("network", s("non-inverting")),
        ("target", n(10.0)),
        ("series", s("E24")),
        ("totalMin", n(1e4)),
        ("totalMax", n(1e5)),
        ("maxError", n(1e-3)),
        ("count", n(5.0)),
    ]))
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
    let miss = api::best_pairs(obj(&[
        ("network", s("divider")),
        ("target", n(0.123_456)),
        ("series", s("E3")),
        ("totalMin", n(1e3)),
        ("totalMax", n(2e3)),
        ("maxError", n(1e-9)),
        ("combine", s("none")),
        ("count", n(3.0)),
    ]))
    .unwrap();
    assert_eq!(field(&miss, "meetsMaxError"), JsValue::FALSE);
    assert!(Array::from(&field(&miss, "candidates")).length() >= 1);
    // Gain 48 from E96 with two-part legs: the best has three parts (issue 15,
    // item 7; brute force in tests/network_pairs.rs).
    let two = api::best_pairs(obj(&[
        ("network", s("non-inverting")),
        ("target", n(48.0)),
        ("series", s("E96")),
        ("totalMin", n(1e4)),
        ("totalMax", n(1e5)),
        ("combine", s("either")),
    ]))
    .unwrap();
    let c: Array = field(&two, "candidates").dyn_into().unwrap();
    assert_eq!(c.length(), 10);
    assert_ne!(text(&field(&c.get(0), "r2"), "joint"), "single");
    let single = api::single_resistor(0.05, "E24", Some(0.005), "parallel").unwrap();
    let best = Array::from(&single).get(0);
    assert_eq!(text(&field(&best, "leg"), "joint"), "parallel");
}

#[wasm_bindgen_test]
fn worst_case_names_the_corners() {
    let w = api::worst_case(stage(&[])).unwrap();
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
    // GBW held by default: bandwidth = GBW·(1/A + β) at each corner; holding the
    // pole, pole·(1 + A·β) (closed forms, module doc of worstcase.rs).
    let held = field(&w, "bandwidthHz");
    let gbw = 1e5 * 5.0;
    let beta_lo = 9.9e3 / (9.9e3 + 47.47e3);
    assert!((num(&held, "min") / (gbw * (1.0 / 2e5 + beta_lo)) - 1.0).abs() < 1e-12);
    let pole = api::worst_case(stage(&[("hold", s("pole"))])).unwrap();
    let p = field(&pole, "bandwidthHz");
    assert!((num(&p, "min") / (5.0 * (1.0 + 5e4 * beta_lo)) - 1.0).abs() < 1e-12);
}

#[wasm_bindgen_test]
fn monte_carlo_equals_the_native_bits() {
    // Source: the native build (tests/fixtures/network_montecarlo.rs); the native
    // test asserts the same bits, so native == wasm for the same seed.
    for (i, (c, want)) in INPUTS.iter().zip(&EXPECTED).enumerate() {
        let r = api::monte_carlo(obj(&[
            ("stage", s(c.stage)),
            ("r1", n(c.r1)),
            ("r2", n(c.r2)),
            ("tolR1", n(c.tol_r1)),
            ("tolR2", n(c.tol_r2)),
            ("aMin", n(c.a_min)),
            ("aTyp", n(c.a_typ)),
            ("aMax", n(c.a_max)),
            ("ri", n(c.ri)),
            ("ro", n(c.ro)),
            ("poleHz", n(c.pole_hz)),
            ("resistorDistribution", s(c.resistor_distribution)),
            ("k", n(c.k)),
            ("gainDistribution", s(c.gain_distribution)),
            ("kGain", n(c.k_gain)),
            ("metric", s(c.metric)),
            ("trials", n(f64::from(c.trials))),
            ("seed", n(c.seed as f64)),
            ("lower", c.lower.map_or(JsValue::UNDEFINED, n)),
            ("upper", c.upper.map_or(JsValue::UNDEFINED, n)),
            ("bins", n(f64::from(c.bins))),
        ]))
        .unwrap();
        let st = field(&r, "stats");
        assert_eq!(num(&st, "mean").to_bits(), want.mean, "case {i} mean");
        assert_eq!(num(&st, "sd").to_bits(), want.sd, "case {i} sd");
        let p = Array::from(&field(&st, "percentiles"));
        assert_eq!(p.length(), 7);
        for j in 0..7u32 {
            assert_eq!(
                num(&p.get(j), "value").to_bits(),
                want.percentiles[j as usize],
                "case {i} percentile {j}"
            );
        }
        let y = field(&st, "yieldFraction");
        assert_eq!(
            y.as_f64().map(f64::to_bits),
            want.yield_fraction,
            "case {i} yield"
        );
        let h = field(&st, "histogram");
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
        api::best_pairs(obj(&[
            ("network", s("divider")),
            ("target", n(1.2)),
            ("series", s("E24")),
            ("totalMin", n(1e3)),
            ("totalMax", n(1e5)),
        ])),
        "out_of_domain",
        "target",
    );
    // The caller's names: totalMax, not total_max.
    assert_thrown(
        api::best_pairs(obj(&[
            ("network", s("divider")),
            ("target", n(0.5)),
            ("series", s("E24")),
            ("totalMin", n(1e3)),
            ("totalMax", n(10.0)),
        ])),
        "out_of_domain",
        "totalMax",
    );
    assert_thrown(
        api::worst_case(stage(&[("tolR1", n(0.0))])),
        "out_of_domain",
        "tolR1",
    );
    assert_thrown(
        api::worst_case(stage(&[("hold", s("gain"))])),
        "unknown_name",
        "hold",
    );
    let mc = |trials: f64, seed: f64, k: f64| {
        api::monte_carlo(stage(&[
            ("resistorDistribution", s("normal")),
            ("k", n(k)),
            ("trials", n(trials)),
            ("seed", n(seed)),
            ("bins", n(10.0)),
        ]))
    };
    assert_thrown(mc(1_000_001.0, 1.0, 3.0), "too_large", "trials");
    assert_thrown(mc(1000.0, 0.5, 3.0), "out_of_domain", "seed");
    assert_thrown(mc(1000.0, 1.0, -3.0), "out_of_domain", "k");
    assert_thrown(
        api::monte_carlo(stage(&[("gainDistribution", s("normal"))])),
        "unknown_name",
        "gainDistribution",
    );
    assert_thrown(
        api::monte_carlo(stage(&[
            ("gainDistribution", s("log-normal")),
            ("kGain", n(0.0)),
        ])),
        "out_of_domain",
        "kGain",
    );
}

#[wasm_bindgen_test]
fn worst_case_takes_the_amplifier_by_its_gain_bandwidth() {
    // fH = GBW/A0 (the single-pole gain–bandwidth product read backwards,
    // Sedra & Smith, Microelectronic Circuits, 7th ed., Sec. 2.8, from memory):
    // GBW 500 kHz at aTyp 100 000 is the 5 Hz pole of `stage`, bit for bit.
    let by_pole = api::worst_case(stage(&[])).unwrap();
    let without_pole = |extra: &[(&str, JsValue)]| {
        let o = stage(extra);
        js_sys::Reflect::delete_property(o.unchecked_ref::<js_sys::Object>(), &"poleHz".into())
            .unwrap();
        o
    };
    let by_gbw = api::worst_case(without_pole(&[("gbwHz", n(5e5))])).unwrap();
    for name in ["gain", "bandwidthHz", "outputImpedance"] {
        for end in ["min", "max", "nominal"] {
            assert_eq!(
                num(&field(&by_gbw, name), end),
                num(&field(&by_pole, name), end),
                "{name} {end}"
            );
        }
    }
    // Both or neither: refused, naming poleHz; a bad GBW names gbwHz.
    assert_thrown(
        api::worst_case(stage(&[("gbwHz", n(5e5))])),
        "out_of_domain",
        "poleHz",
    );
    assert_thrown(
        api::worst_case(without_pole(&[])),
        "out_of_domain",
        "poleHz",
    );
    assert_thrown(
        api::worst_case(without_pole(&[("gbwHz", n(-1.0))])),
        "out_of_domain",
        "gbwHz",
    );
    let mc = api::monte_carlo(without_pole(&[("gbwHz", n(5e5)), ("trials", n(100.0))]));
    assert!(mc.is_ok());
}
