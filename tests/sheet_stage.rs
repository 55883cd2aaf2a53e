//! The worksheet functions of the stage area (STAGE.) used the way a sheet uses
//! them: a stage described in a range of name/value pairs or in one text, the
//! answers spilling beside the formula, errors naming the field, recalculation
//! after an edit of a part. Expected values come from
//! tests/reference/data/stage_sympy.json (tests/reference/stage_sympy.py:
//! sympy's exact loop gain, mpmath's closed-loop solve, numpy's impedances,
//! sympy's roots of the characteristic polynomial).

use loopwright::sheet::{ErrorKind, Sheet, Value};
use serde_json::Value as Json;

/// Loop and closed-loop gain against sympy/mpmath: 1e-12, as tests/stage_reference.rs.
const EXACT_REL: f64 = 1e-12;
/// Impedances against numpy's double-precision solve: 1e-9, as tests/stage_reference.rs.
const NUMPY_REL: f64 = 1e-9;
/// Poles against sympy's roots at 30 digits: 1e-10, as tests/stage_reference.rs.
const POLE_REL: f64 = 1e-10;

fn case(label: &str) -> Json {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/reference/data/stage_sympy.json"
    );
    let all: Json = serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap();
    all["cases"]
        .as_array()
        .unwrap()
        .iter()
        .find(|c| c["label"].as_str().unwrap().starts_with(label))
        .unwrap()
        .clone()
}

/// The reference value of `key` at frequency `f` as (magnitude, phase °).
fn at(c: &Json, key: &str, f: f64) -> (f64, f64) {
    let i = c["freqs"]
        .as_array()
        .unwrap()
        .iter()
        .position(|x| x.as_f64() == Some(f))
        .unwrap();
    let (re, im) = (
        c[key][i][0].as_f64().unwrap(),
        c[key][i][1].as_f64().unwrap(),
    );
    (re.hypot(im), im.atan2(re).to_degrees())
}

fn num(s: &Sheet, a: &str) -> f64 {
    match s.value(a).unwrap() {
        Value::Number(x, _) => x,
        v => panic!("{a}: {v:?}"),
    }
}

fn error(s: &Sheet, a: &str) -> (ErrorKind, String) {
    match s.value(a).unwrap() {
        Value::Error(e) => (e.kind, e.detail),
        v => panic!("{a}: not an error value: {v:?}"),
    }
}

fn close(got: f64, want: f64, rtol: f64) -> bool {
    (got - want).abs() <= rtol * want.abs()
}

/// The transimpedance front end of the reference data, typed as name/value
/// pairs in A1:B9 the way an engineer fills a sheet.
fn transimpedance_sheet() -> Sheet {
    let mut s = Sheet::new();
    let rows = [
        ("kind", "transimpedance"),
        ("a0", "1e6"),
        ("gbwHz", "20M"),
        ("cd", "4p"),
        ("ccm", "3p"),
        ("ro", "40"),
        ("rf", "100k"),
        ("cf", "1p5"),
        ("cs", "20p"),
    ];
    for (i, (name, value)) in rows.iter().enumerate() {
        s.set(&format!("A{}", i + 1), name).unwrap();
        s.set(&format!("B{}", i + 1), value).unwrap();
    }
    s.set("A10", "rs").unwrap();
    s.set("B10", "1G").unwrap();
    s
}

#[test]
fn a_stage_in_a_range_of_pairs_gives_the_reference_gain_loop_gain_and_impedances() {
    let c = case("transimpedance with photodiode");
    let mut s = transimpedance_sheet();
    s.set("D1", "=STAGE.GAIN(A1:B10; 1 MHz)").unwrap();
    s.set("D2", "=STAGE.LOOPGAIN(A1:B10; 1 MHz)").unwrap();
    s.set("D3", "=STAGE.ZOUT(A1:B10; 10 MHz)").unwrap();
    s.set("D4", "=STAGE.ZIN(A1:B10; 100 kHz)").unwrap();
    // stage_sympy.json, closed_loop at 1 MHz (mpmath): V/A.
    let (m, p) = at(&c, "closed_loop", 1e6);
    assert!(close(num(&s, "D1"), m, EXACT_REL), "{}", num(&s, "D1"));
    assert!(close(num(&s, "E1"), p, EXACT_REL));
    // loop_gain at 1 MHz (sympy exact), |T| in dB.
    let (m, p) = at(&c, "loop_gain", 1e6);
    assert!((num(&s, "D2") - 20.0 * m.log10()).abs() < EXACT_REL * 20.0 * m.log10().abs());
    assert!(close(num(&s, "E2"), p, EXACT_REL));
    // zout at 10 MHz and zin at 100 kHz (numpy).
    let (m, p) = at(&c, "zout", 1e7);
    assert!(close(num(&s, "D3"), m, NUMPY_REL) && close(num(&s, "E3"), p, NUMPY_REL));
    let (m, p) = at(&c, "zin", 1e5);
    assert!(close(num(&s, "D4"), m, NUMPY_REL) && close(num(&s, "E4"), p, NUMPY_REL));
}

#[test]
fn poles_spill_one_row_each_and_match_sympy() {
    let c = case("transimpedance with photodiode");
    let mut s = transimpedance_sheet();
    s.set("D1", "=STAGE.POLES(A1:B10)").unwrap();
    let want = c["poles"].as_array().unwrap();
    for (row, w) in want.iter().enumerate() {
        let (wr, wi) = (w[0].as_f64().unwrap(), w[1].as_f64().unwrap());
        let _ = row;
        // stage_sympy.json poles (sympy roots): some row holds σ/2π, ω/2π.
        let tau = std::f64::consts::TAU;
        let found = (1..=want.len()).any(|r| {
            let (sr, si) = (num(&s, &format!("D{r}")), num(&s, &format!("E{r}")));
            (sr - wr / tau).hypot(si - wi / tau) <= POLE_REL * wr.hypot(wi) / tau
        });
        assert!(found, "pole {wr} {wi}");
    }
    // Natural frequency and ζ of the first row agree with its σ and ω.
    let (sr, si, fnat, zeta) = (num(&s, "D1"), num(&s, "E1"), num(&s, "F1"), num(&s, "G1"));
    assert!(close(fnat, sr.hypot(si), 1e-12) && close(zeta, -sr / sr.hypot(si), 1e-12));
}

#[test]
fn the_text_form_and_the_range_form_agree_and_an_edit_recalculates() {
    let mut s = transimpedance_sheet();
    s.set(
        "D1",
        "=STAGE.GAIN(\"kind=transimpedance, a0=1e6, gbwHz=20M, cd=4p, ccm=3p, ro=40, rf=100k, cf=1p5, cs=20p, rs=1G\"; 1 MHz)",
    )
    .unwrap();
    s.set("D2", "=STAGE.GAIN(A1:B10; 1 MHz)").unwrap();
    assert_eq!(num(&s, "D1"), num(&s, "D2"));
    let before = num(&s, "D2");
    // Doubling Cf lowers the gain at 1 MHz (Rf ‖ Cf: the feedback impedance falls).
    s.set("B8", "3p").unwrap();
    assert!(num(&s, "D2") < before);
    assert_eq!(num(&s, "D1"), before);
}

#[test]
fn bad_stages_are_error_values_naming_the_field() {
    let mut s = transimpedance_sheet();
    s.set("B7", "-100k").unwrap();
    s.set("D1", "=STAGE.GAIN(A1:B10; 1 MHz)").unwrap();
    let (kind, detail) = error(&s, "D1");
    assert_eq!(kind, ErrorKind::Value);
    assert!(detail.contains("rf"), "{detail}");
    s.set("B7", "100k").unwrap();
    s.set("A3", "gbwx").unwrap();
    let (_, detail) = error(&s, "D1");
    assert!(detail.contains("unknown name \"gbwx\""), "{detail}");
    s.set("A3", "gbwHz").unwrap();
    s.set(
        "D2",
        "=STAGE.LOOPGAIN(\"kind=inverting, a0=1e5, gbwHz=1M, rf=10k\"; 1k)",
    )
    .unwrap();
    let (_, detail) = error(&s, "D2");
    assert!(detail.contains("rg"), "inverting needs rg: {detail}");
    s.set("D3", "=STAGE.GAIN(A1:B10; -1)").unwrap();
    assert!(error(&s, "D3").1.contains("frequency"));
    s.set("D4", "=STAGE.ZOUT(\"kind=non-inverting, a0\"; 1k)")
        .unwrap();
    assert!(error(&s, "D4").1.contains("not name=value"));
    // Nothing typed is lost: the cells keep their inputs.
    assert_eq!(
        s.input(loopwright::sheet::CellRef::parse("A3").unwrap()),
        Some("gbwHz")
    );
}

#[test]
fn phase_margin_and_crossover_match_python_control() {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/reference/data/stage_loop.json"
    );
    let all: Json = serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap();
    let c = all["cases"]
        .as_array()
        .unwrap()
        .iter()
        .find(|c| {
            c["label"]
                .as_str()
                .unwrap()
                .starts_with("transimpedance with photodiode")
        })
        .unwrap();
    let mut s = transimpedance_sheet();
    s.set("D1", "=STAGE.MARGIN(A1:B10)").unwrap();
    // stage_loop.json (tests/reference/stage_loop.py: python-control crossings
    // polished on sympy's exact T): to 1e-6° and 1e-9 relative, as
    // tests/stage_loop_reference.rs holds them.
    let pm = c["phase_margin_deg"].as_f64().unwrap();
    let fc = c["crossover_hz"].as_f64().unwrap();
    assert!(
        (num(&s, "D1") - pm).abs() < 1e-6,
        "{} vs {pm}",
        num(&s, "D1")
    );
    assert!(close(num(&s, "E1"), fc, 1e-9));
}
