//! Whole-stage tolerance on circuit documents (src/tolerance, docs/tolerance.md):
//! the Monte Carlo and worst case of a circuit no stage document describes
//! against tests/reference/tolerance_stage.py ("rcloop": numpy Monte Carlo,
//! brute-force corners), every figure of a stage read again on the stage's own
//! circuit as a document, and the errors naming the field.
#![cfg(not(target_arch = "wasm32"))]

use loopwright::circuit::json::read_circuit;
use loopwright::circuit::tolerance::Tolerance;
use loopwright::stage::{Amplifier, Spread, SpreadPoint, Stage, StageKind, StageParts};
use loopwright::tolerance::{
    monte_carlo, sensitivity, worst_case, AmplifierSpread, CircuitPorts, Figure, Limit,
    MonteCarloOptions, PartSpread, TolStage, WorstCaseMethod,
};
use serde_json::Value;

include!("fixtures/tolerance_circuit.rs");

fn reference() -> Value {
    serde_json::from_str(include_str!("reference/data/tolerance_stage.json")).unwrap()
}

fn num(v: &Value, path: &[&str]) -> f64 {
    path.iter().fold(v, |v, k| &v[*k]).as_f64().unwrap()
}

fn ports(controlled: Option<&str>) -> CircuitPorts {
    CircuitPorts {
        input: "Vs".into(),
        output: "out".into(),
        output_minus: None,
        output_element: None,
        controlled: controlled.map(String::from),
    }
}

const GBW: Spread = Spread {
    min: 7e6,
    typ: 1e7,
    max: 1.3e7,
};

fn rcloop() -> TolStage {
    let c = read_circuit(RCLOOP).unwrap();
    let amp = AmplifierSpread {
        gbw_hz: Some(GBW),
        ro: None,
    };
    TolStage::from_circuit(&c, ports(None), &[("U1".into(), amp)], [25.0, 25.0]).unwrap()
}

fn limit(figure: Figure, lower: Option<f64>) -> Limit {
    Limit {
        figure,
        lower,
        upper: None,
    }
}

fn rcloop_spec() -> [Limit; 2] {
    [
        limit(Figure::GainDb { freq_hz: 1e4 }, None),
        limit(Figure::PhaseMarginDeg, Some(65.0)),
    ]
}

fn options(seed: u64, trials: usize) -> MonteCarloOptions {
    MonteCarloOptions {
        seed,
        trials,
        bins: 20,
        keep_failures: 5,
    }
}

/// Two estimates agree within 4 standard errors of their difference.
fn within_4se(rust: f64, numpy: f64, se: f64, what: &str) {
    assert!(
        (rust - numpy).abs() <= 4.0 * se,
        "{what}: rust {rust} numpy {numpy} (4 se = {})",
        4.0 * se
    );
}

#[test]
fn rcloop_varies_the_documents_spreads_and_the_amplifier() {
    let ts = rcloop();
    let names: Vec<&str> = ts.varied.iter().map(|v| v.name.as_str()).collect();
    assert_eq!(names, ["R3", "C3", "Rf", "Rg", "U1.a0", "U1.gbwHz"]);
    assert!(ts.stage().is_none());
}

#[test]
fn rcloop_monte_carlo_agrees_with_numpy() {
    // Expected: numpy Monte Carlo of the same circuit and distributions
    // (tolerance_stage.py "rcloop", 20 000 trials). Standard error of the
    // difference of two independent estimates: means sqrt(sd²/N + sd²/Nnp),
    // yields sqrt(p(1 − p)(1/N + 1/Nnp)).
    let r = reference();
    let n = 1000;
    let mc = monte_carlo(&rcloop(), &rcloop_spec(), options(5, n)).unwrap();
    let nn = num(&r, &["rcloop", "trials"]);
    for (k, name) in ["gainDb", "phaseMarginDeg"].into_iter().enumerate() {
        let sd = num(&r, &["rcloop", name, "sd"]);
        let s = mc.limits[k].stats.as_ref().unwrap();
        within_4se(
            s.mean,
            num(&r, &["rcloop", name, "mean"]),
            (sd * sd / n as f64 + sd * sd / nn).sqrt(),
            name,
        );
        assert_eq!(mc.limits[k].undefined, 0);
    }
    let p = num(&r, &["rcloop", "phaseMarginDeg", "yield"]);
    within_4se(
        mc.yield_fraction,
        p,
        (p * (1.0 - p) * (1.0 / n as f64 + 1.0 / nn)).sqrt(),
        "yield",
    );
    // Nominal figures: the closed forms of the script at nominal values.
    assert!((mc.limits[0].nominal[0] - num(&r, &["rcloop", "nominalGainDb"])).abs() < 1e-9);
    assert!((mc.limits[1].nominal[0] - num(&r, &["rcloop", "nominalPhaseMarginDeg"])).abs() < 1e-6);
}

#[test]
fn rcloop_monte_carlo_is_seeded_and_its_identity_bits_hold() {
    let ts = rcloop();
    let spec = rcloop_spec();
    let a = monte_carlo(&ts, &spec, options(RCLOOP_SEED, RCLOOP_TRIALS)).unwrap();
    let b = monte_carlo(&ts, &spec, options(RCLOOP_SEED, RCLOOP_TRIALS)).unwrap();
    assert_eq!(a, b);
    let mean = a.limits[1].stats.as_ref().unwrap().mean;
    assert_eq!(a.yield_fraction.to_bits(), RCLOOP_YIELD_BITS);
    assert_eq!(mean.to_bits(), RCLOOP_MEAN_PM_BITS);
}

#[test]
fn rcloop_corners_match_brute_force_enumeration() {
    // Expected: tolerance_stage.py "rcloop.corners" (closed forms at all 64
    // corners); the gain within 1e-9 dB, the phase margin within 1e-6°.
    let r = reference();
    let wc = worst_case(&rcloop(), &rcloop_spec(), 64).unwrap();
    assert_eq!(wc.method, WorstCaseMethod::Corners);
    for (k, (name, tol)) in [("gainDb", 1e-9), ("phaseMarginDeg", 1e-6)]
        .into_iter()
        .enumerate()
    {
        let f = &wc.figures[k];
        for (ext, key) in [(&f.min, "min"), (&f.max, "max")] {
            let want = num(&r, &["rcloop", "corners", name, key]);
            assert!(
                (ext.value - want).abs() < tol,
                "{name} {key}: {} vs {want}",
                ext.value
            );
            let values = r["rcloop"]["corners"][name][&format!("{key}Values")]
                .as_array()
                .unwrap();
            for (got, want) in ext.values.iter().zip(values) {
                let want = want.as_f64().unwrap();
                assert!(
                    (got / want - 1.0).abs() < 1e-12,
                    "{name} {key}: {got} vs {want}"
                );
            }
        }
    }
}

fn full_stage() -> Stage {
    let mut amplifier = Amplifier::from_gbw(
        Spread {
            min: 5e4,
            typ: 2e5,
            max: 1e6,
        },
        1e7,
    )
    .with_pole(3e7)
    .with_ro(50.0);
    // A finite input resistance: the input impedance is defined.
    amplifier.rd = Some(1e6);
    Stage {
        kind: StageKind::NonInverting,
        amplifier,
        point: SpreadPoint::Typ,
        parts: StageParts {
            rf: Some(9e3),
            rg: Some(1e3),
            cf: Some(4.7e-12),
            ..StageParts::default()
        },
    }
}

/// Every figure that both subjects read the same way, on a stage and on the
/// stage's own circuit given as a circuit document with the same spreads:
/// the same worst case, value for value (the stage path is itself checked
/// against numpy and closed forms in tests/tolerance_stage.rs).
#[test]
fn a_stage_as_a_circuit_document_gives_the_stages_figures() {
    let stage = full_stage();
    let tol = |p| Some(Tolerance::Uniform { percent: p });
    let spreads = [
        PartSpread {
            part: "rf",
            tolerance: tol(1.0),
            tempco_ppm: Some(100.0),
        },
        PartSpread {
            part: "rg",
            tolerance: tol(2.0),
            tempco_ppm: None,
        },
        PartSpread {
            part: "cf",
            tolerance: tol(10.0),
            tempco_ppm: Some(-30.0),
        },
    ];
    let amp = AmplifierSpread {
        gbw_hz: Some(GBW),
        ro: Some(Spread {
            min: 30.0,
            typ: 50.0,
            max: 80.0,
        }),
    };
    let range = [-40.0, 85.0];
    let by_stage = TolStage::new(&stage, &spreads, amp, range).unwrap();
    let mut c = stage.circuit().unwrap().circuit;
    c.set_spread("Rf", tol(1.0), Some(100.0)).unwrap();
    c.set_spread("Rg", tol(2.0), None).unwrap();
    c.set_spread("Cf", tol(10.0), Some(-30.0)).unwrap();
    let by_circuit =
        TolStage::from_circuit(&c, ports(Some("U1")), &[("U1".into(), amp)], range).unwrap();
    let spec: Vec<Limit> = [
        Figure::GainDb { freq_hz: 1e5 },
        Figure::PhaseDeg { freq_hz: 1e5 },
        Figure::GainErrorPercent {
            freq_hz: 1e4,
            target: 10.0,
        },
        Figure::BandwidthHz,
        Figure::PeakingDb,
        Figure::PhaseMarginDeg,
        Figure::InputImpedanceOhm { freq_hz: 1e5 },
        Figure::OutputImpedanceOhm { freq_hz: 1e5 },
        Figure::OutputNoiseRms {
            band_hz: [10.0, 1e5],
        },
        Figure::InputNoiseRms {
            band_hz: [10.0, 1e5],
        },
        Figure::SettlingTimeS { band: 0.01 },
    ]
    .into_iter()
    .map(|f| limit(f, None))
    .collect();
    let a = worst_case(&by_stage, &spec, 256).unwrap();
    let b = worst_case(&by_circuit, &spec, 256).unwrap();
    let mut names_a = a.parts.clone();
    let mut names_b = b.parts.clone();
    names_a.sort();
    names_b.sort();
    assert_eq!(names_a, names_b);
    for (fa, fb) in a.figures.iter().zip(&b.figures) {
        let name = fa.limit.figure.name();
        for (x, y) in [
            (fa.nominal, fb.nominal),
            (fa.min.value, fb.min.value),
            (fa.max.value, fb.max.value),
        ] {
            assert!(
                (x - y).abs() <= 1e-9 * x.abs().max(1e-12),
                "{name}: stage {x} circuit {y}"
            );
        }
    }
    let sa = sensitivity(&by_stage, &spec[..1]).unwrap();
    let sb = sensitivity(&by_circuit, &spec[..1]).unwrap();
    assert_eq!(sa.tighten_first, sb.tighten_first);
}

fn from(doc: &str, p: CircuitPorts, amps: &[(String, AmplifierSpread)]) -> (String, String) {
    let c = read_circuit(doc).unwrap();
    let e = TolStage::from_circuit(&c, p, amps, [25.0, 25.0]).unwrap_err();
    (e.error.param().to_string(), e.name.as_str().to_string())
}

#[test]
fn bad_ports_and_spreads_name_the_field() {
    let p =
        |input: &str, output: &str, minus: Option<&str>, controlled: Option<&str>| CircuitPorts {
            input: input.into(),
            output: output.into(),
            output_minus: minus.map(String::from),
            output_element: None,
            controlled: controlled.map(String::from),
        };
    let none: &[(String, AmplifierSpread)] = &[];
    assert_eq!(
        from(RCLOOP, p("R3", "out", None, None), none),
        ("input".into(), "R3".into())
    );
    assert_eq!(
        from(RCLOOP, p("Vs", "nowhere", None, None), none).0,
        "output"
    );
    assert_eq!(
        from(RCLOOP, p("Vs", "out", Some("zz"), None), none).0,
        "outputMinus"
    );
    assert_eq!(
        from(RCLOOP, p("Vs", "out", None, Some("Rf")), none),
        ("controlled".into(), "Rf".into())
    );
    let amp = AmplifierSpread {
        gbw_hz: Some(GBW),
        ro: None,
    };
    assert_eq!(
        from(RCLOOP, ports(None), &[("R3".into(), amp)]),
        ("amplifierSpread".into(), "R3".into())
    );
    let bad_typ = AmplifierSpread {
        gbw_hz: Some(Spread {
            min: 7e6,
            typ: 9e6,
            max: 1.3e7,
        }),
        ro: None,
    };
    assert_eq!(
        from(RCLOOP, ports(None), &[("U1".into(), bad_typ)]),
        ("gbwHz".into(), "U1".into())
    );
    let c = read_circuit(RCLOOP).unwrap();
    let e = TolStage::from_circuit(&c, ports(None), none, [85.0, -40.0]).unwrap_err();
    assert_eq!(e.error.param(), "temperature");
    // Two amplifiers and no `controlled`: the margins refuse, naming it; the
    // gain is still read.
    let two = RCLOOP.replace(
        r#"{"name":"R3","#,
        r#"{"name":"U2","kind":"amplifier","nodes":["y","0"],"control":["x","y"],"model":{"a0":{"typ":1e5},"gbwHz":1e6}},
 {"name":"Ry","kind":"resistor","nodes":["y","0"],"value":"10k"},
 {"name":"R3","#,
    );
    let c = read_circuit(&two).unwrap();
    let ts = TolStage::from_circuit(&c, ports(None), none, [25.0, 25.0]).unwrap();
    let e = monte_carlo(&ts, &rcloop_spec(), options(1, 10)).unwrap_err();
    assert_eq!(e.error.param(), "controlled");
    let e = worst_case(&ts, &rcloop_spec(), 64).unwrap_err();
    assert_eq!(e.error.param(), "controlled");
    assert!(monte_carlo(&ts, &rcloop_spec()[..1], options(1, 10)).is_ok());
    let ts = TolStage::from_circuit(&c, ports(Some("U1")), none, [25.0, 25.0]).unwrap();
    assert!(monte_carlo(&ts, &rcloop_spec(), options(1, 10)).is_ok());
}

fn two_gbw() -> [(String, AmplifierSpread); 2] {
    [
        (
            "U1".into(),
            AmplifierSpread {
                gbw_hz: Some(GBW),
                ro: None,
            },
        ),
        (
            "U2".into(),
            AmplifierSpread {
                gbw_hz: Some(Spread {
                    min: 3.5e6,
                    typ: 5e6,
                    max: 6.5e6,
                }),
                ro: None,
            },
        ),
    ]
}

fn twoamp() -> TolStage {
    let c = read_circuit(TWOAMP).unwrap();
    TolStage::from_circuit(&c, ports(None), &two_gbw(), [25.0, 25.0]).unwrap()
}

fn twoamp_spec() -> [Limit; 2] {
    [
        limit(Figure::GainDb { freq_hz: 2e5 }, None),
        limit(Figure::BandwidthHz, Some(6e5)),
    ]
}

/// Each extreme of `wc` against the script's brute-force corners at `key`:
/// the value within `tols[k]` (absolute) and the part values giving it.
fn corners_match(wc: &loopwright::tolerance::WorstCase, key: &str, names: &[(&str, f64)]) {
    let r = reference();
    for (k, (name, tol)) in names.iter().enumerate() {
        let f = &wc.figures[k];
        for (ext, side) in [(&f.min, "min"), (&f.max, "max")] {
            let want = num(&r, &[key, "corners", name, side]);
            assert!(
                (ext.value - want).abs() <= *tol,
                "{key} {name} {side}: {} vs {want}",
                ext.value
            );
            let values = r[key]["corners"][name][&format!("{side}Values")]
                .as_array()
                .unwrap();
            assert_eq!(ext.values.len(), values.len());
            for (got, want) in ext.values.iter().zip(values) {
                let want = want.as_f64().unwrap();
                assert!(
                    (got / want - 1.0).abs() < 1e-12,
                    "{key} {name} {side}: {got} vs {want}"
                );
            }
        }
    }
}

#[test]
fn twoamp_varies_both_amplifiers_by_name() {
    let names: Vec<String> = twoamp().varied.iter().map(|v| v.name.clone()).collect();
    assert_eq!(
        names,
        ["Rf1", "Rg1", "Rf2", "Rg2", "U1.a0", "U1.gbwHz", "U2.gbwHz"]
    );
}

#[test]
fn twoamp_corners_match_brute_force_enumeration() {
    // Expected: tolerance_stage.py "twoamp.corners" (closed forms at all 128
    // corners); the gain within 1e-9 dB, the bandwidth within 1e-6 of itself
    // (the −3 dB point is bisected to 2^-40 of a tenth of a decade).
    let wc = worst_case(&twoamp(), &twoamp_spec(), 128).unwrap();
    assert_eq!(wc.method, WorstCaseMethod::Corners);
    assert!(wc.evaluations >= 128, "{}", wc.evaluations);
    corners_match(&wc, "twoamp", &[("gainDb", 1e-9), ("bandwidthHz", 0.5)]);
}

#[test]
fn twoamp_monte_carlo_agrees_with_numpy() {
    // Expected: numpy Monte Carlo of the same circuit and distributions
    // (tolerance_stage.py "twoamp", 20 000 trials); standard error of the
    // difference of two independent estimates as in rcloop above:
    // means sqrt(sd²/N + sd²/Nnp), yield sqrt(p(1 − p)(1/N + 1/Nnp)).
    let r = reference();
    let n = 1000;
    let mc = monte_carlo(&twoamp(), &twoamp_spec(), options(7, n)).unwrap();
    let nn = num(&r, &["twoamp", "trials"]);
    for (k, name) in ["gainDb", "bandwidthHz"].into_iter().enumerate() {
        let sd = num(&r, &["twoamp", name, "sd"]);
        let s = mc.limits[k].stats.as_ref().unwrap();
        within_4se(
            s.mean,
            num(&r, &["twoamp", name, "mean"]),
            (sd * sd / n as f64 + sd * sd / nn).sqrt(),
            name,
        );
        assert_eq!(mc.limits[k].undefined, 0);
    }
    let p = num(&r, &["twoamp", "bandwidthHz", "yield"]);
    within_4se(
        mc.yield_fraction,
        p,
        (p * (1.0 - p) * (1.0 / n as f64 + 1.0 / nn)).sqrt(),
        "yield",
    );
    assert!((mc.limits[0].nominal[0] - num(&r, &["twoamp", "nominalGainDb"])).abs() < 1e-9);
    let bw = num(&r, &["twoamp", "nominalBandwidthHz"]);
    assert!((mc.limits[1].nominal[0] / bw - 1.0).abs() < 1e-6);
}

fn transcond() -> TolStage {
    let c = read_circuit(TRANSCOND).unwrap();
    let p = CircuitPorts {
        input: "Vs".into(),
        output: String::new(),
        output_minus: None,
        output_element: Some("RL".into()),
        controlled: None,
    };
    TolStage::from_circuit(&c, p, &[("U1".into(), two_gbw()[0].1)], [25.0, 25.0]).unwrap()
}

fn transcond_spec() -> [Limit; 2] {
    [
        limit(Figure::GainDb { freq_hz: 1e5 }, None),
        Limit {
            figure: Figure::GainErrorPercent {
                freq_hz: 2e4,
                target: 1e-3,
            },
            lower: Some(-0.5),
            upper: Some(0.0),
        },
    ]
}

#[test]
fn a_current_output_matches_brute_force_corners() {
    // Expected: tolerance_stage.py "transcond.corners", I(RL)/Vs =
    // A/(RL + Rs + A·Rs) at the 16 corners; within 1e-9 dB and 1e-9 %.
    let wc = worst_case(&transcond(), &transcond_spec(), 16).unwrap();
    assert_eq!(wc.method, WorstCaseMethod::Corners);
    corners_match(
        &wc,
        "transcond",
        &[("gainDb", 1e-9), ("gainErrorPercent", 1e-9)],
    );
}

#[test]
fn a_current_output_monte_carlo_agrees_with_numpy() {
    // Expected: numpy Monte Carlo of "transcond" (100 000 trials); the
    // standard errors of the difference as above.
    let r = reference();
    let n = 4000;
    let mc = monte_carlo(&transcond(), &transcond_spec(), options(3, n)).unwrap();
    let nn = num(&r, &["transcond", "trials"]);
    for (k, name) in ["gainDb", "gainErrorPercent"].into_iter().enumerate() {
        let sd = num(&r, &["transcond", name, "sd"]);
        let s = mc.limits[k].stats.as_ref().unwrap();
        within_4se(
            s.mean,
            num(&r, &["transcond", name, "mean"]),
            (sd * sd / n as f64 + sd * sd / nn).sqrt(),
            name,
        );
    }
    let p = num(&r, &["transcond", "gainErrorPercent", "yield"]);
    within_4se(
        mc.yield_fraction,
        p,
        (p * (1.0 - p) * (1.0 / n as f64 + 1.0 / nn)).sqrt(),
        "yield",
    );
    assert!((mc.limits[0].nominal[0] - num(&r, &["transcond", "nominalGainDb"])).abs() < 1e-9);
}

#[test]
fn a_current_output_refuses_what_it_cannot_be() {
    let c = read_circuit(TRANSCOND).unwrap();
    let p = |output: &str, element: &str| CircuitPorts {
        input: "Vs".into(),
        output: output.into(),
        output_minus: None,
        output_element: Some(element.into()),
        controlled: None,
    };
    let err = |ports| {
        let e = TolStage::from_circuit(&c, ports, &[], [25.0, 25.0]).unwrap_err();
        (e.error.param().to_string(), e.name.as_str().to_string())
    };
    assert_eq!(err(p("", "Rx")), ("outputElement".into(), "Rx".into()));
    assert_eq!(err(p("o", "RL")), ("outputElement".into(), "RL".into()));
    // An output impedance has no meaning for a current output: the figure is
    // undefined in every trial, the worst case refuses naming it.
    let ts = transcond();
    let spec = [limit(Figure::OutputImpedanceOhm { freq_hz: 1e3 }, None)];
    let e = worst_case(&ts, &spec, 16).unwrap_err();
    assert_eq!(e.error.param(), "outputImpedanceOhm");
}
