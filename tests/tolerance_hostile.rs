//! Hostile input for the worksheet's TOLERANCE functions and the spreads reader
//! (src/sheet/functions/tolerance.rs, src/notation/spread.rs): seeded formulas
//! built from extreme, NaN-like, negative, huge, empty, unicode and very long
//! spreads texts, figures, frequencies, temperature ranges (reversed, at the
//! limits) and trial counts (2 and the maximum). Every cell must hold an error
//! value or finite values: no panic, no NaN or ±Infinity, no hang (the trial
//! counts are bounded by the functions' own maximum).
#![cfg(not(target_arch = "wasm32"))]

use loopwright::notation::{read_range, read_spread, ReadOptions};
use loopwright::sheet::{CellRef, Sheet, Value};
use std::panic::{catch_unwind, AssertUnwindSafe};

/// xorshift64: the same sequence on every machine.
struct Gen(u64);
impl Gen {
    fn next(&mut self) -> u64 {
        self.0 ^= self.0 << 13;
        self.0 ^= self.0 >> 7;
        self.0 ^= self.0 << 17;
        self.0
    }
    fn pick<'a>(&mut self, xs: &[&'a str]) -> &'a str {
        xs[(self.next() % xs.len() as u64) as usize]
    }
    /// Most of the time the first (sound) entry, else any: so that most
    /// formulas carry one hostile piece and reach the computing paths.
    fn mostly<'a>(&mut self, xs: &[&'a str]) -> &'a str {
        if self.next() % 4 != 0 {
            xs[0]
        } else {
            self.pick(xs)
        }
    }
}

const STAGES: &[&str] = &[
    "\"kind=non-inverting, a0=200k, a0Min=50k, a0Max=1M, gbwHz=10M, rf=47k, rg=1k\"",
    "\"kind=inverting, a0=1e12, gbwHz=1T, rf=1k, rg=1k, cf=10p\"",
    "\"kind=non-inverting, a0=1, gbwHz=1, rf=1e-300, rg=1e300\"",
    "\"kind=non-inverting, a0=200k, gbwHz=10M, rf=0, rg=1k\"",
    "\"kind=non-inverting, a0=200k, gbwHz=10M, rf=47k, rg=1k, rs=50, cs=1n, rl=2k, cl=100p, riso=0\"",
    "\"kind=non-inverting, a0=200k, gbwHz=10M, rf=47k, rg=1k, cl=1\"",
    "\"\"",
    "\"kind=bogus\"",
];

/// Spread words: sound ones and hostile ones.
const WORDS: &[&str] = &[
    "1%",
    "±1 %",
    "+/-0.1%",
    "0%",
    "100%",
    "99.9999999%",
    "-1%",
    "1e308%",
    "1e-320%",
    "NaN%",
    "inf%",
    "Infinity",
    "1",
    "normal",
    "uniform",
    "3σ",
    "0σ",
    "10 sigma",
    "1e9σ",
    "at 2 sigma",
    "25ppm/K",
    "-25 ppm/°C",
    "1e308ppm/K",
    "-1e308 ppm/K",
    "±25ppm/K",
    "46.5k…47.5k",
    "47.5k…46.5k",
    "0…1e308",
    "-1…1",
    "46k/47k/48k",
    "1/1/1",
    "0/0/0",
    "1e-320/1e-310/1e-300",
    "45k/47k",
    "/",
    "…",
    "..",
    "%",
    "σ",
    "ppm/K",
    "±",
    "ｒｆ",
    "𝟙%",
    "é",
    "\u{202e}1%",
    "1%\u{0}",
    "",
    " ",
];
const PARTS: &[&str] = &[
    "rf", "rg", "RF", "cf", "rs", "cs", "rl", "cl", "riso", "a0", "gbw", "gbwHz", "ro", "x", "",
    "rf rf",
];
const FIGURES: &[&str] = &[
    "\"gainDb\"",
    "\"phaseDeg\"",
    "\"phaseMarginDeg\"",
    "\"gainMarginDb\"",
    "\"gainErrorPercent 48\"",
    "\"gainErrorPercent 0\"",
    "\"gainErrorPercent -1e308\"",
    "\"gainErrorPercent 1e-320\"",
    "\"gainErrorPercent 1e308\"",
    "\"settlingTimeS 50%\"",
    "\"settlingTimeS 49.999%\"",
    "\"inputNoiseRms 10…1e308\"",
    "\"outputNoiseRms 1e-320…1e-319\"",
    "\"bandwidthHz\"",
    "\"peakingDb\"",
    "\"outputNoiseRms 10…20k\"",
    "\"outputNoiseRms 20k…10\"",
    "\"outputNoiseRms 0…1e308\"",
    "\"inputNoiseRms 1e-300…1e-299\"",
    "\"settlingTimeS 0.1%\"",
    "\"settlingTimeS 0%\"",
    "\"settlingTimeS 100%\"",
    "\"settlingTimeS 1e-300%\"",
    "\"inputImpedanceOhm\"",
    "\"outputImpedanceOhm\"",
    "\"\"",
    "\"gainDb gainDb\"",
    "1",
];
const FREQS: &[&str] = &[
    "1 kHz", "0", "-1", "1e308", "1e-320", "20 kHz", "\"x\"", "1/0", "\"\"",
];
const TEMPS: &[&str] = &[
    "",
    "; 25",
    "; -273.15",
    "; 1000",
    "; -273.16",
    "; 1000.001",
    "; \"0…70\"",
    "; \"70…0\"",
    "; \"-273.15…1000\"",
    "; \"-1e308…1e308\"",
    "; \"25…25\"",
    "; \"…\"",
    "; \"0…70…80\"",
    "; \"\"",
    "; 1/0",
    "; \"NaN\"",
    "; Z1:Z2",
    "; Z1:Z3",
    "; Z1",
    "; TRUE",
];
const SEEDS: &[&str] = &["1", "0", "-1", "1e308", "4294967296", "\"s\""];
const LIMITS: &[&str] = &[
    "33; 34",
    "34; 33",
    "-1e308; 1e308",
    "0; 0",
    "1/0; 1",
    "\"a\"; 1",
];

fn spreads(g: &mut Gen) -> String {
    let n = 1 + g.next() % 2;
    let mut items = Vec::new();
    for i in 0..n {
        // rf then rg mostly, each with one to two words.
        let part = if g.next() % 6 != 0 {
            ["rf", "rg"][i as usize]
        } else {
            g.pick(PARTS)
        };
        let mut spread = String::new();
        for _ in 0..(1 + g.next() % 2) {
            spread.push_str(g.mostly(WORDS));
            spread.push(' ');
        }
        items.push(format!("{part}={spread}"));
    }
    items.join(", ")
}

/// Every number of the value is finite (the rule), recursively through arrays.
fn finite(v: &Value) -> bool {
    match v {
        Value::Number(x, _) => x.is_finite(),
        Value::Array(a) => a.items().iter().all(finite),
        _ => true,
    }
}

/// The values of the formula in A1 (every cell of its spill): the first is A1's
/// own, an error value when the formula is refused.
fn run(formula: &str) -> Vec<Value> {
    let mut s = Sheet::new();
    s.set("A1", formula).unwrap();
    let origin = CellRef::parse("A1").unwrap();
    let (rows, cols) = s
        .spill_range(origin)
        .map_or((1, 1), |r| (r.rows(), r.cols()));
    let mut out = Vec::new();
    for r in 0..rows {
        for c in 0..cols {
            out.push(s.shown(origin.offset(r, c).unwrap()));
        }
    }
    out
}

/// Evaluates the formula: `Ok(true)` when it answers, `Ok(false)` when refused
/// (an error value), a panic or a non-finite number is the failure it returns.
fn hostile(formula: &str) -> Result<bool, String> {
    match catch_unwind(AssertUnwindSafe(|| run(formula))) {
        Err(_) => Err(format!("panic: {formula}")),
        Ok(v) if !v.iter().all(finite) => Err(format!("non-finite {v:?}: {formula}")),
        Ok(v) => Ok(!matches!(v[0], Value::Error(_))),
    }
}

fn formula(g: &mut Gen) -> String {
    let stage = g.mostly(STAGES);
    let sp = spreads(g);
    let figure = g.mostly(FIGURES);
    let f = g.mostly(FREQS);
    let t = g.mostly(TEMPS);
    match g.next() % 5 {
        0 => format!("=TOLERANCE.WORSTCASE({stage}; \"{sp}\"; {figure}; {f}{t})"),
        1 => format!("=TOLERANCE.SENSITIVITY({stage}; \"{sp}\"; {figure}; {f}{t})"),
        2 => format!("=TOLERANCE.TIGHTEN({stage}; \"{sp}\"; {figure}; {f}{t})"),
        3 => {
            // Cheap trial counts in the random mix; the maximum has its own test.
            let n = g.mostly(&["2", "1", "0", "-5", "100001", "1e308", "2.5", "\"2\"", "3"]);
            let seed = g.mostly(SEEDS);
            format!("=TOLERANCE.MONTECARLO({stage}; \"{sp}\"; {figure}; {f}; {n}; {seed}{t})")
        }
        _ => {
            let n = g.mostly(&["2", "1", "0", "100001", "-1", "7"]);
            let seed = g.mostly(SEEDS);
            let lim = g.mostly(LIMITS);
            format!("=TOLERANCE.YIELD({stage}; \"{sp}\"; {figure}; {f}; {lim}; {n}; {seed}{t})")
        }
    }
}

#[test]
fn tolerance_functions_refuse_or_answer_finitely() {
    // LOOPWRIGHT_HOSTILE_CALLS and LOOPWRIGHT_HOSTILE_SEED for a longer or another run.
    let env = |k: &str, d: u64| {
        std::env::var(k)
            .ok()
            .and_then(|v| v.parse().ok())
            .unwrap_or(d)
    };
    let mut g = Gen(env("LOOPWRIGHT_HOSTILE_SEED", 0x5eed_1818).max(1));
    let mut failures = Vec::new();
    let calls = env("LOOPWRIGHT_HOSTILE_CALLS", 3000) as usize;
    let mut answered = 0;
    for _ in 0..calls {
        let f = formula(&mut g);
        match hostile(&f) {
            Ok(a) => answered += usize::from(a),
            Err(e) => failures.push(e),
        }
    }
    // The mix reaches the computing paths, not only the refusals.
    println!("answered {answered} of {calls}");
    assert!(answered > calls / 20, "answered {answered} of {calls}");
    assert!(
        failures.is_empty(),
        "{} of {calls} formulas failed; first: {:#?}",
        failures.len(),
        &failures[..failures.len().min(8)]
    );
}

/// The largest trial count the functions take (100 000) and the smallest useful
/// one (2), on the cheapest figure: answered, finite, in bounded time.
#[test]
fn trial_counts_at_the_limits() {
    let stage = STAGES[0];
    for n in ["2", "100000"] {
        let f = format!(
            "=TOLERANCE.MONTECARLO({stage}; \"rf=1%, rg=1% normal\"; \"gainDb\"; 1 kHz; {n}; 3)"
        );
        let v = run(&f);
        // mean, sd and seven percentiles, every one a finite number.
        assert_eq!(v.len(), 9, "{f}: {v:?}");
        assert!(
            v.iter()
                .all(|x| matches!(x, Value::Number(x, _) if x.is_finite())),
            "{f}: {v:?}"
        );
    }
    // One past the maximum is refused as an error value naming the argument.
    let f = format!("=TOLERANCE.MONTECARLO({stage}; \"rf=1%\"; \"gainDb\"; 1 kHz; 100001; 3)");
    match &run(&f)[0] {
        Value::Error(e) => assert!(e.detail.contains("trials"), "{}", e.detail),
        v => panic!("{f}: {v:?}"),
    }
}

/// Tolerances of 0 % and just under 100 % answer; 100 % and above are refused
/// naming the part (docs/tolerance.md, "Refused").
#[test]
fn zero_and_hundred_percent() {
    let stage = STAGES[0];
    let worst = |sp: &str| {
        run(&format!(
            "=TOLERANCE.WORSTCASE({stage}; \"{sp}\"; \"gainDb\"; 1 kHz)"
        ))
    };
    // lowest, nominal, highest: all three finite numbers.
    let three = |v: &[Value]| {
        v.len() == 3
            && v.iter()
                .all(|x| matches!(x, Value::Number(x, _) if x.is_finite()))
    };
    let v = worst("rf=0%");
    assert!(three(&v), "{v:?}");
    // 0 % on the only varied part (no A0 limits in this stage): the three are the nominal.
    let bare = "\"kind=non-inverting, a0=200k, gbwHz=10M, rf=47k, rg=1k\"";
    let v = run(&format!(
        "=TOLERANCE.WORSTCASE({bare}; \"rf=0%\"; \"gainDb\"; 1 kHz)"
    ));
    assert!(three(&v) && v[0] == v[1] && v[1] == v[2], "{v:?}");
    let v = worst("rf=99.99%");
    assert!(three(&v), "{v:?}");
    for sp in ["rf=100%", "rf=150%", "rf=-1%"] {
        match &worst(sp)[0] {
            Value::Error(e) => assert!(e.detail.contains("Rf"), "{sp}: {}", e.detail),
            v => panic!("{sp}: {v:?}"),
        }
    }
}

/// Temperature ranges reversed or outside −273.15 … 1000 °C are refused naming
/// the temperature; the two limits themselves answer.
#[test]
fn temperature_limits() {
    let stage = STAGES[0];
    let worst = |t: &str| {
        run(&format!(
            "=TOLERANCE.WORSTCASE({stage}; \"rf=1% 25ppm/K\"; \"gainDb\"; 1 kHz; {t})"
        ))
    };
    for t in ["-273.15", "1000", "\"-273.15…1000\""] {
        let v = worst(t);
        assert!(
            v.len() == 3
                && v.iter()
                    .all(|x| matches!(x, Value::Number(x, _) if x.is_finite())),
            "{t}: {v:?}"
        );
    }
    for t in ["\"70…0\"", "-273.16", "1000.5", "\"-300…0\""] {
        match &worst(t)[0] {
            Value::Error(e) => assert!(e.detail.contains("temperature"), "{t}: {}", e.detail),
            v => panic!("{t}: {v:?}"),
        }
    }
}

/// The readers themselves: very long texts, every word soup and control
/// characters give a value or a typed error, never a panic; a value read is finite.
#[test]
fn spread_and_range_readers_on_hostile_text() {
    let mut g = Gen(0x0dd_5eed);
    let long = "1% ".repeat(50_000);
    let long_digits = format!("{}%", "9".repeat(100_000));
    let mut texts = vec![long, long_digits, "\u{0}".repeat(1000), "…".repeat(10_000)];
    for _ in 0..20_000 {
        let mut t = String::new();
        for _ in 0..(1 + g.next() % 4) {
            t.push_str(g.pick(WORDS));
            if g.next() % 2 == 0 {
                t.push(' ');
            }
        }
        texts.push(t);
    }
    for t in &texts {
        let r = catch_unwind(|| read_spread(t));
        let shown: String = t.chars().take(60).collect();
        match r {
            Err(_) => panic!("read_spread panicked on {shown:?}"),
            Ok(Ok(s)) => {
                if let Some(tc) = s.tempco_ppm {
                    assert!(tc.is_finite(), "{shown:?}: {s:?}");
                }
                let ok = match s.tolerance {
                    None => true,
                    Some(loopwright::notation::TypedTolerance::Uniform { percent }) => {
                        percent.is_finite()
                    }
                    Some(loopwright::notation::TypedTolerance::Normal { percent, sigmas }) => {
                        percent.is_finite() && sigmas.is_finite()
                    }
                    Some(loopwright::notation::TypedTolerance::Range { min, max }) => {
                        min.is_finite() && max.is_finite()
                    }
                    Some(loopwright::notation::TypedTolerance::MinTypMax { min, typ, max }) => {
                        min.is_finite() && typ.is_finite() && max.is_finite()
                    }
                };
                assert!(ok, "{shown:?}: {s:?}");
            }
            Ok(Err(_)) => {}
        }
        let r = catch_unwind(|| read_range(t, &ReadOptions::default()));
        match r {
            Err(_) => panic!("read_range panicked on {shown:?}"),
            Ok(Ok([a, b])) => assert!(a.is_finite() && b.is_finite(), "{shown:?}"),
            Ok(Err(_)) => {}
        }
    }
}

mod circuits {
    //! Circuit documents as the tolerance subject (the `{circuit, input, output,
    //! outputMinus, controlled, amplifierSpread}` form of stageTolerance): no
    //! amplifier, two amplifiers and no `controlled`, ports naming missing nodes,
    //! zero-value elements, tolerances of 0 % and 100 %, temperatures reversed
    //! or at the limits, 2 trials and the maximum.
    // The fixture's identity bits are for the tests that compare runs.
    #![allow(dead_code)]
    use loopwright::circuit::json::read_circuit;
    use loopwright::stage::Spread;
    use loopwright::tolerance::{
        monte_carlo, sensitivity, worst_case, AmplifierSpread, CircuitPorts, Figure, Limit,
        MonteCarloOptions, TolStage, MAX_TRIALS,
    };
    use std::panic::{catch_unwind, AssertUnwindSafe};

    include!("fixtures/tolerance_circuit.rs");

    const TWO_AMPS: &str = r#"{"format":"loopwright-circuit","version":2,"elements":[
 {"name":"Vs","kind":"voltage-source","nodes":["in","0"],"value":1},
 {"name":"U1","kind":"amplifier","nodes":["out","0"],"control":["in","fb"],
  "model":{"a0":{"min":5e4,"typ":2e5,"max":1e6},"gbwHz":1e7,"ro":0}},
 {"name":"U2","kind":"amplifier","nodes":["y","0"],"control":["out","y"],
  "model":{"a0":{"min":5e4,"typ":2e5,"max":1e6},"gbwHz":1e7,"ro":10}},
 {"name":"Rf","kind":"resistor","nodes":["out","fb"],"value":"9k",
  "tolerance":{"distribution":"uniform","percent":1}},
 {"name":"Rg","kind":"resistor","nodes":["fb","0"],"value":"1k",
  "tolerance":{"distribution":"uniform","percent":1}},
 {"name":"RL","kind":"resistor","nodes":["y","0"],"value":"2k"}
]}"#;

    const NO_AMP: &str = r#"{"format":"loopwright-circuit","version":2,"elements":[
 {"name":"Vs","kind":"voltage-source","nodes":["in","0"],"value":1},
 {"name":"R1","kind":"resistor","nodes":["in","out"],"value":"1k",
  "tolerance":{"distribution":"uniform","percent":1}},
 {"name":"C1","kind":"capacitor","nodes":["out","0"],"value":"1n",
  "tolerance":{"distribution":"normal","percent":5,"sigmas":3}}
]}"#;

    /// The documents: the fixture, its variants, and the two above.
    fn documents() -> Vec<(String, String)> {
        let mut d = vec![
            ("rcloop".to_string(), RCLOOP.to_string()),
            ("two amplifiers".into(), TWO_AMPS.into()),
            ("no amplifier".into(), NO_AMP.into()),
        ];
        let variants = [
            ("R3 = 0", r#""value":"1k","#, r#""value":0,"#),
            ("C3 = 0", r#""value":"100p","#, r#""value":0,"#),
            ("Rf = 0", r#""value":"9k","#, r#""value":0,"#),
            ("0 %", r#""percent":5}"#, r#""percent":0}"#),
            ("100 %", r#""percent":5}"#, r#""percent":100}"#),
            ("99.99 %", r#""percent":5}"#, r#""percent":99.99}"#),
            ("-1 %", r#""percent":5}"#, r#""percent":-1}"#),
            ("1e308 %", r#""percent":5}"#, r#""percent":1e308}"#),
            ("0 sigma", r#""sigmas":3"#, r#""sigmas":0"#),
            ("1e308 sigma", r#""sigmas":3"#, r#""sigmas":1e308"#),
            (
                "tempco",
                r#""percent":1}}"#,
                r#""percent":1},"tempco":1e308}"#,
            ),
            ("a0 zero", r#""min":5e4"#, r#""min":0"#),
            (
                "a0 reversed",
                r#""min":5e4,"typ":2e5,"max":1e6"#,
                r#""min":1e6,"typ":2e5,"max":5e4"#,
            ),
            ("gbw huge", r#""gbwHz":1e7"#, r#""gbwHz":1e300"#),
            ("gbw tiny", r#""gbwHz":1e7"#, r#""gbwHz":1e-300"#),
            ("ro huge", r#""ro":0"#, r#""ro":1e300"#),
        ];
        for (what, from, to) in variants {
            assert!(RCLOOP.contains(from), "{what}");
            d.push((what.to_string(), RCLOOP.replacen(from, to, 1)));
        }
        d
    }

    fn ports() -> Vec<CircuitPorts> {
        let p = |i: &str, o: &str, m: Option<&str>, c: Option<&str>| CircuitPorts {
            input: i.into(),
            output: o.into(),
            output_minus: m.map(String::from),
            output_element: None,
            controlled: c.map(String::from),
        };
        vec![
            p("Vs", "out", None, None),
            p("Vs", "out", None, Some("U1")),
            p("Vs", "out", Some("0"), Some("U2")),
            p("Vs", "x", Some("fb"), None),
            p("Vs", "nowhere", None, None),
            p("Vs", "out", Some("nowhere"), None),
            p("R3", "out", None, None),
            p("nothing", "out", None, None),
            p("Vs", "out", None, Some("Rf")),
            p("Vs", "out", None, Some("")),
            p("", "", None, None),
            p("Vs", "ｏｕｔ", None, None),
            p(&"V".repeat(10_000), "out", None, None),
        ]
    }

    fn spreads() -> Vec<Vec<(String, AmplifierSpread)>> {
        let s = |min: f64, typ: f64, max: f64| Some(Spread { min, typ, max });
        vec![
            vec![],
            vec![(
                "U1".into(),
                AmplifierSpread {
                    gbw_hz: s(7e6, 1e7, 1.3e7),
                    ro: None,
                },
            )],
            vec![(
                "U1".into(),
                AmplifierSpread {
                    gbw_hz: s(1.3e7, 1e7, 7e6),
                    ro: s(0.0, 0.0, 1e308),
                },
            )],
            vec![(
                "Rf".into(),
                AmplifierSpread {
                    gbw_hz: s(7e6, 1e7, 1.3e7),
                    ro: None,
                },
            )],
            vec![(
                "U1".into(),
                AmplifierSpread {
                    gbw_hz: s(0.0, 1e7, f64::MAX),
                    ro: None,
                },
            )],
        ]
    }

    const TEMPERATURES: [[f64; 2]; 7] = [
        [25.0, 25.0],
        [-273.15, 1000.0],
        [70.0, 0.0],
        [-273.16, 25.0],
        [25.0, 1000.01],
        [-1e308, 1e308],
        [f64::MIN_POSITIVE, f64::MIN_POSITIVE],
    ];

    fn specs() -> Vec<Vec<Limit>> {
        let l = |figure: Figure, lower: Option<f64>, upper: Option<f64>| Limit {
            figure,
            lower,
            upper,
        };
        vec![
            vec![l(Figure::GainDb { freq_hz: 1e3 }, Some(19.0), Some(21.0))],
            vec![l(Figure::PhaseMarginDeg, Some(45.0), None)],
            vec![
                l(Figure::GainMarginDb, Some(6.0), None),
                l(Figure::BandwidthHz, None, None),
                l(Figure::PeakingDb, None, Some(3.0)),
            ],
            vec![
                l(Figure::OutputImpedanceOhm { freq_hz: 1e5 }, None, None),
                l(Figure::InputImpedanceOhm { freq_hz: 0.0 }, None, None),
                l(Figure::PhaseDeg { freq_hz: 1e308 }, None, None),
            ],
            vec![l(
                Figure::OutputNoiseRms {
                    band_hz: [10.0, 2e4],
                },
                None,
                None,
            )],
            vec![l(Figure::SettlingTimeS { band: 1e-3 }, None, None)],
            vec![l(
                Figure::GainErrorPercent {
                    freq_hz: 1e3,
                    target: 10.0,
                },
                Some(-1.0),
                Some(1.0),
            )],
        ]
    }

    /// Debug text of a result holds no NaN or ±inf (every number it carries is finite).
    fn finite_text(s: &str) -> bool {
        !s.contains("NaN") && !s.contains("inf")
    }

    #[test]
    fn circuit_subjects_refuse_or_answer_finitely() {
        let mut failures = Vec::new();
        let (mut built, mut answered) = (0, 0);
        let docs = documents();
        let specs = specs();
        for (what, doc) in &docs {
            let Ok(c) = read_circuit(doc) else {
                continue;
            };
            for (pi, p) in ports().into_iter().enumerate() {
                for (si, amps) in spreads().into_iter().enumerate() {
                    for (ti, t) in TEMPERATURES.into_iter().enumerate() {
                        let case = format!("{what}, ports {pi}, spreads {si}, {t:?}");
                        let ts = catch_unwind(AssertUnwindSafe(|| {
                            TolStage::from_circuit(&c, p.clone(), &amps, t)
                        }));
                        let ts = match ts {
                            Err(_) => {
                                failures.push(format!("from_circuit panicked: {case}"));
                                continue;
                            }
                            Ok(Err(_)) => continue,
                            Ok(Ok(ts)) => ts,
                        };
                        built += 1;
                        // The spec varies with the case, all of them on a few.
                        let chosen: Vec<&Vec<Limit>> = if pi < 2 && si < 2 && ti < 2 {
                            specs.iter().collect()
                        } else {
                            // The cheap ones (gain, margin, impedances, gain error).
                            vec![&specs[[0, 1, 3, 6][(pi + si + ti) % 4]]]
                        };
                        for spec in chosen {
                            let r = catch_unwind(AssertUnwindSafe(|| {
                                let o = MonteCarloOptions {
                                    seed: 5,
                                    trials: 2,
                                    bins: 4,
                                    keep_failures: 2,
                                };
                                (
                                    format!("{:?}", worst_case(&ts, spec, 64)),
                                    format!("{:?}", monte_carlo(&ts, spec, o)),
                                    format!("{:?}", sensitivity(&ts, spec)),
                                )
                            }));
                            match r {
                                Err(_) => failures.push(format!("panic: {case}, {spec:?}")),
                                Ok((w, m, s)) => {
                                    for (name, text) in [("worst", w), ("mc", m), ("sens", s)] {
                                        if !finite_text(&text) {
                                            failures.push(format!(
                                                "{name} non-finite: {case}, {spec:?}: {}",
                                                &text[..text.len().min(400)]
                                            ));
                                        }
                                        answered += usize::from(text.starts_with("Ok"));
                                    }
                                }
                            }
                        }
                    }
                }
            }
        }
        println!("{built} subjects built, {answered} analyses answered");
        assert!(
            built > 50 && answered > 100,
            "{built} built, {answered} answered"
        );
        assert!(
            failures.is_empty(),
            "{} failures; first: {:#?}",
            failures.len(),
            &failures[..failures.len().min(6)]
        );
    }

    /// The refusals name the port: a missing node, a source that is not one,
    /// two amplifiers and no `controlled` asked for a margin.
    #[test]
    fn ports_and_amplifiers_are_named() {
        let c = read_circuit(RCLOOP).unwrap();
        let p = |i: &str, o: &str, m: Option<&str>, ctl: Option<&str>| CircuitPorts {
            input: i.into(),
            output: o.into(),
            output_minus: m.map(String::from),
            output_element: None,
            controlled: ctl.map(String::from),
        };
        let param = |ports: CircuitPorts| {
            TolStage::from_circuit(&c, ports, &[], [25.0, 25.0])
                .err()
                .map(|e| e.error.param())
        };
        assert_eq!(param(p("Vs", "nowhere", None, None)), Some("output"));
        assert_eq!(
            param(p("Vs", "out", Some("nowhere"), None)),
            Some("outputMinus")
        );
        assert_eq!(param(p("R3", "out", None, None)), Some("input"));
        assert_eq!(param(p("Vs", "out", None, Some("Rf"))), Some("controlled"));
        // Two amplifiers and no `controlled`: the subject builds (gain figures
        // need no loop), a margin is refused as a typed error, not a panic or NaN.
        let two = read_circuit(TWO_AMPS).unwrap();
        let ts = TolStage::from_circuit(&two, p("Vs", "y", None, None), &[], [25.0, 25.0]).unwrap();
        let gain = [Limit {
            figure: Figure::GainDb { freq_hz: 1e3 },
            lower: None,
            upper: None,
        }];
        let wc = worst_case(&ts, &gain, 64).unwrap();
        assert!(finite_text(&format!("{wc:?}")));
        let pm = [Limit {
            figure: Figure::PhaseMarginDeg,
            lower: Some(45.0),
            upper: None,
        }];
        let e = worst_case(&ts, &pm, 64).unwrap_err();
        assert!(e.error.param() == "controlled", "{e:?}");
    }

    /// 2 trials and the maximum, on the gain (the cheapest figure).
    #[test]
    fn two_trials_and_the_maximum() {
        let c = read_circuit(RCLOOP).unwrap();
        let ports = CircuitPorts {
            input: "Vs".into(),
            output: "out".into(),
            output_minus: None,
            output_element: None,
            controlled: None,
        };
        let ts = TolStage::from_circuit(&c, ports, &[], [0.0, 70.0]).unwrap();
        let spec = [Limit {
            figure: Figure::GainDb { freq_hz: 1e3 },
            lower: Some(19.0),
            upper: Some(21.0),
        }];
        for trials in [2, MAX_TRIALS] {
            let o = MonteCarloOptions {
                seed: 1,
                trials,
                bins: 20,
                keep_failures: 5,
            };
            let r = monte_carlo(&ts, &spec, o).unwrap();
            assert!(finite_text(&format!("{r:?}")), "{trials}");
        }
        let o = MonteCarloOptions {
            seed: 1,
            trials: MAX_TRIALS + 1,
            bins: 20,
            keep_failures: 5,
        };
        assert_eq!(
            monte_carlo(&ts, &spec, o).unwrap_err().error.param(),
            "trials"
        );
        let o = MonteCarloOptions { trials: 1, ..o };
        assert_eq!(
            monte_carlo(&ts, &spec, o).unwrap_err().error.param(),
            "trials"
        );
    }
}
