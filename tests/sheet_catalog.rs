//! Every catalog entry's worked example evaluates to its stated value, and the
//! catalog JSON describes every entry.

use loopwright::sheet::functions::{all, catalog_json, Expected, FunctionSpec};
use loopwright::sheet::{CellRef, Sheet, Value};

/// Relative tolerance for stated example values: they are written to 16
/// significant digits (or exactly), so only the last-digit rounding may differ.
const EXAMPLE_RTOL: f64 = 1e-13;

/// The reference data: every numeric example's formula, its independently
/// computed values and, for results the core finds by a numeric search,
/// integration or sampling, the relative tolerance it is held to (`rtol`, one
/// number or one per item, with the reason in `why`).
fn reference_cases() -> Vec<serde_json::Value> {
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/reference/data/sheet_catalog.json"
    ))
    .unwrap();
    let data: serde_json::Value = serde_json::from_str(&text).unwrap();
    data["cases"].as_array().unwrap().clone()
}

/// The reference case's tolerance for item `i`, if it states one.
fn case_rtol(cases: &[serde_json::Value], formula: &str, i: usize) -> Option<f64> {
    let case = cases.iter().find(|c| c["formula"] == formula)?;
    case["rtol"]
        .as_f64()
        .or_else(|| case["rtol"].get(i).and_then(serde_json::Value::as_f64))
}

/// The catalog's stated tolerance for item `i` of an example, or `default` (never
/// below it).
fn stated_rtol(f: &FunctionSpec, i: usize, default: f64) -> f64 {
    let t = f.example.tolerance;
    let r = if t.len() == 1 { t.first() } else { t.get(i) };
    r.map_or(default, |r| r.max(default))
}

/// Cell of item `i` of a result spilled `cols` wide, row by row.
fn item_cell(origin: CellRef, i: usize, cols: usize) -> CellRef {
    origin.offset((i / cols) as u32, (i % cols) as u32).unwrap()
}

/// A stated NaN marks a cell of the result that holds no figure (`#N/A`, the
/// reference's `null`).
fn is_not_available(v: &Value) -> bool {
    matches!(v, Value::Error(e) if e.kind == loopwright::sheet::ErrorKind::NotAvailable)
}

fn as_number(v: &Value) -> Option<f64> {
    match v {
        Value::Number(x, _) => Some(*x),
        Value::Bool(b) => Some(f64::from(u8::from(*b))),
        _ => None,
    }
}

#[test]
fn every_example_gives_its_stated_value() {
    let mut count = 0;
    for f in all() {
        let mut s = Sheet::new();
        s.set("A1", f.example.formula).unwrap();
        let origin = CellRef::parse("A1").unwrap();
        match f.example.expected {
            Expected::Numbers(xs) => {
                let mut cols = xs.len();
                if xs.len() > 1 {
                    let r = s
                        .spill_range(origin)
                        .unwrap_or_else(|| panic!("{}: no spill", f.name));
                    assert_eq!(r.area(), xs.len() as u64, "{}", f.name);
                    // The spill descriptions name the columns: one per item of a
                    // one-row result, one per column of a result of several rows.
                    cols = r.cols() as usize;
                    assert_eq!(f.spill.len(), cols, "{}: spill descriptions", f.name);
                }
                for (i, want) in xs.iter().enumerate() {
                    let rtol = stated_rtol(f, i, EXAMPLE_RTOL);
                    let c = item_cell(origin, i, cols);
                    let got = s.shown(c);
                    if want.is_nan() {
                        assert!(is_not_available(&got), "{} item {i}: {got:?}", f.name);
                        continue;
                    }
                    let got =
                        as_number(&got).unwrap_or_else(|| panic!("{} item {i}: {got:?}", f.name));
                    // Zero is stated for results that are exactly zero up to rounding
                    // of the other terms: compare it against the item scale instead.
                    let scale = xs
                        .iter()
                        .filter(|x| !x.is_nan())
                        .fold(0.0f64, |m, x| m.max(x.abs()));
                    let tol = rtol * if *want == 0.0 { scale } else { want.abs() };
                    assert!(
                        (got - want).abs() <= tol,
                        "{} item {i}: got {got:e}, stated {want:e}",
                        f.name
                    );
                }
            }
            Expected::Bool(b) => assert_eq!(s.shown(origin), Value::Bool(b), "{}", f.name),
            Expected::Text(t) => assert_eq!(s.shown(origin), Value::Text(t.into()), "{}", f.name),
        }
        count += 1;
    }
    assert!(count >= 30, "only {count} functions");
}

#[test]
fn catalog_json_lists_every_function_with_its_parts() {
    let v: serde_json::Value = serde_json::from_str(&catalog_json()).unwrap();
    assert_eq!(v["format"], "loopwright-functions");
    let list = v["functions"].as_array().unwrap();
    assert_eq!(list.len(), all().count());
    for (entry, f) in list.iter().zip(all()) {
        assert_eq!(entry["name"], f.name);
        assert_eq!(entry["params"].as_array().unwrap().len(), f.params.len());
        assert_eq!(entry["examples"][0]["formula"], f.example.formula);
        assert!(
            entry["result"].as_str().unwrap().contains(f.result_unit),
            "{}",
            f.name
        );
        assert_eq!(entry["resultUnit"], f.result_unit);
        assert_eq!(
            entry["examples"][0]["tolerance"].as_array().unwrap().len(),
            f.example.tolerance.len()
        );
    }
    let round = list.iter().find(|e| e["name"] == "ROUND").unwrap();
    assert_eq!(round["params"][1]["default"], 0.0);
    assert_eq!(round["params"][1]["optional"], true);
    let ceiling = list
        .iter()
        .find(|e| e["name"] == "FEEDBACK.CEILING")
        .unwrap();
    assert_eq!(
        ceiling["result"],
        "row of 2: closed-loop gain A/D; beta (D − 1)/A (as a; reciprocal of a's unit)"
    );
}

#[test]
fn the_required_functions_are_present() {
    for name in [
        "SUM",
        "MIN",
        "MAX",
        "AVERAGE",
        "ABS",
        "SQRT",
        "EXP",
        "LN",
        "LOG10",
        "PI",
        "IF",
        "AND",
        "OR",
        "NOT",
        "ROUND",
        "DB.VOLTAGE",
        "DB.POWER",
        "DB.VOLTAGERATIO",
        "DB.POWERRATIO",
        "FEEDBACK.GAIN",
        "FEEDBACK.LOOPGAIN",
        "FEEDBACK.AMOUNT",
        "FEEDBACK.AMOUNTDB",
        "FEEDBACK.SENSITIVITY",
        "FEEDBACK.BETA",
        "FEEDBACK.MINGAIN",
        "FEEDBACK.CEILING",
        "FEEDBACK.SPREAD",
        "FEEDBACK.ZIN",
        "FEEDBACK.ZOUT",
        "FEEDBACK.PHASOR",
        "FEEDBACK.SUMMARY",
        "FEEDBACK.IMPEDANCES",
        "FEEDBACK.SENSE",
        "FEEDBACK.GAINUNIT",
        "FEEDBACK.BETAUNIT",
        // The other areas.
        "FREQ.PM",
        "FREQ.GM",
        "FREQ.BANDWIDTH",
        "FREQ.PEAKING",
        "FREQ.STEP",
        "FREQ.POLES",
        "FREQ.EXTEND",
        "FREQ.LOWCUT",
        "FREQ.GBW",
        "FREQ.TWOPOLE",
        "FREQ.DOMINANT",
        "FREQ.MAXBETA",
        "NETWORK.NEAREST",
        "NETWORK.UP",
        "NETWORK.DOWN",
        "NETWORK.TOLERANCE",
        "NETWORK.PAIR",
        "NETWORK.WORSTCASE",
        "NETWORK.MONTECARLO",
        "NETWORK.YIELD",
        "NETWORK.CHOOSE",
        "CIRCUIT.GAIN",
        "CIRCUIT.RIN",
        "CIRCUIT.ROUT",
        "CIRCUIT.IDEAL",
        "DISTORTION.SERIES",
        "DISTORTION.HD",
        "DISTORTION.FPBW",
        "DISTORTION.MAXAMP",
        "DISTORTION.SLEWRATE",
        "NOISE.THERMAL",
        "NOISE.STAGE",
        "NOISE.TOTAL",
    ] {
        assert!(all().any(|f| f.name == name), "{name}");
    }
}

#[test]
fn feedback_functions_agree_with_the_core() {
    // The worksheet is a thin layer: the same inputs give the same f64 as the core.
    use loopwright::feedback as fb;
    let mut s = Sheet::new();
    s.set("A1", "=FEEDBACK.GAIN(2e4; 0.05)").unwrap();
    s.set("A2", "=FEEDBACK.BETA(-2e4; -10)").unwrap();
    s.set("A3", "=FEEDBACK.ZOUT(\"shunt-series\"; 50; 990; 0.1)")
        .unwrap();
    assert_eq!(
        as_number(&s.value("A1").unwrap()),
        Some(fb::closed_loop_gain(2e4, 0.05).unwrap())
    );
    assert_eq!(
        as_number(&s.value("A2").unwrap()),
        Some(fb::beta_for_gain(-2e4, -10.0).unwrap())
    );
    let (_, rout) =
        fb::resistances_with_feedback(fb::Topology::ShuntSeries, 0.0, 50.0, 990.0, 0.1).unwrap();
    assert_eq!(as_number(&s.value("A3").unwrap()), Some(rout));
    // Core errors arrive as error values carrying the core's sentence.
    s.set("A4", "=FEEDBACK.GAIN(-50; 0.02)").unwrap();
    match s.value("A4").unwrap() {
        Value::Error(e) => assert!(
            e.detail
                .starts_with("FEEDBACK.GAIN: beta: the return difference"),
            "{}",
            e.detail
        ),
        v => panic!("{v:?}"),
    }
    s.set("A5", "=FEEDBACK.ZIN(\"sideways\"; 1; 2; 3)").unwrap();
    assert_eq!(s.value("A5").unwrap().display(), "#VALUE!");
    s.set("A6", "=FEEDBACK.SUMMARY(\"voltage\"; 1000; 0)")
        .unwrap();
    assert_eq!(s.shown(CellRef::parse("F6").unwrap()).display(), "#N/A");
}

/// Reference tolerance: mpmath values rounded once to f64 against stated values
/// and double-precision evaluation (a few ulps of the largest item).
const REFERENCE_RTOL: f64 = 1e-12;

#[test]
fn stated_and_evaluated_values_match_the_mpmath_reference() {
    // tests/reference/sheet_catalog.py recomputes every numeric example with
    // mpmath at 40 digits from the textbook formulas.
    let cases = reference_cases();
    let mut covered = 0;
    for f in all() {
        let Expected::Numbers(stated) = f.example.expected else {
            continue;
        };
        let case = cases
            .iter()
            .find(|c| c["formula"] == f.example.formula)
            .unwrap_or_else(|| {
                panic!(
                    "{}: example {} missing from the reference data",
                    f.name, f.example.formula
                )
            });
        let reference: Vec<f64> = case["expected"]
            .as_array()
            .unwrap()
            .iter()
            .map(|v| v.as_f64().unwrap_or(f64::NAN))
            .collect();
        assert_eq!(reference.len(), stated.len(), "{}", f.name);
        let scale = reference
            .iter()
            .filter(|x| !x.is_nan())
            .fold(0.0f64, |m, x| m.max(x.abs()));
        let mut s = Sheet::new();
        s.set("A1", f.example.formula).unwrap();
        let origin = CellRef::parse("A1").unwrap();
        let cols = s.spill_range(origin).map_or(1, |r| r.cols() as usize);
        for (i, (want, said)) in reference.iter().zip(stated.iter()).enumerate() {
            if want.is_nan() || said.is_nan() {
                assert!(
                    want.is_nan() && said.is_nan(),
                    "{} item {i}: #N/A in one place only",
                    f.name
                );
                let got = s.shown(item_cell(origin, i, cols));
                assert!(is_not_available(&got), "{} item {i}: {got:?}", f.name);
                continue;
            }
            // Stated values are the reference values, so they agree to rounding;
            // the engine agrees to the case's search or sampling tolerance.
            let engine_rtol = stated_rtol(f, i, REFERENCE_RTOL);
            // The catalog states the tolerance the reference script gives, and
            // only where the script gives one.
            let script = case_rtol(&cases, f.example.formula, i);
            let catalog = (!f.example.tolerance.is_empty()).then(|| stated_rtol(f, i, 0.0));
            assert_eq!(
                script.is_some(),
                catalog.is_some(),
                "{} item {i}: tolerance stated in one place only",
                f.name
            );
            if let (Some(a), Some(b)) = (script, catalog) {
                assert!(
                    (a - b).abs() <= 1e-12 * a,
                    "{} item {i}: catalog tolerance {b:e}, reference {a:e}",
                    f.name
                );
            }
            let tol = REFERENCE_RTOL * if *want == 0.0 { scale } else { want.abs() };
            assert!(
                (said - want).abs() <= tol,
                "{} item {i}: catalog states {said:e}, reference {want:e}",
                f.name
            );
            let got = as_number(&s.shown(item_cell(origin, i, cols))).unwrap();
            let tol = engine_rtol * if *want == 0.0 { scale } else { want.abs() };
            assert!(
                (got - want).abs() <= tol,
                "{} item {i}: engine gives {got:e}, reference {want:e}",
                f.name
            );
        }
        covered += 1;
    }
    assert_eq!(
        covered,
        cases.len(),
        "every reference case belongs to a catalog example"
    );
}
