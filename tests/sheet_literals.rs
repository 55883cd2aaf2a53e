//! Engineering literals: SI prefixes against the SI Brochure, IEC 60062 letter
//! codes against the standard's examples, unit words and their checks.

use loopwright::sheet::literal::{parse_cell_number, scan};
use loopwright::sheet::{ErrorKind, Sheet, Unit, Value};

fn cell(input: &str) -> f64 {
    parse_cell_number(input)
        .unwrap_or_else(|| panic!("{input} is not a number"))
        .value
}

#[test]
fn si_prefixes_have_the_brochure_factors() {
    // The International System of Units (SI Brochure), 9th ed., 2019, Table 7:
    // pico 10⁻¹², nano 10⁻⁹, micro 10⁻⁶, milli 10⁻³, kilo 10³, mega 10⁶,
    // giga 10⁹, tera 10¹². Each must equal the f64 nearest the exact decimal.
    let table = [
        ("p", 1e-12),
        ("n", 1e-9),
        ("\u{b5}", 1e-6),
        ("\u{3bc}", 1e-6),
        ("u", 1e-6),
        ("m", 1e-3),
        ("k", 1e3),
        ("M", 1e6),
        ("G", 1e9),
        ("T", 1e12),
    ];
    for (prefix, factor) in table {
        assert_eq!(cell(&format!("1{prefix}")), factor, "1{prefix}");
        let expected: f64 = format!("4.7e{}", libm_log10_exact(factor)).parse().unwrap();
        assert_eq!(cell(&format!("4.7{prefix}")), expected, "4.7{prefix}");
    }
    // Brochure §3 (from memory): the prefix symbol is case-sensitive, m ≠ M.
    assert_ne!(cell("1m"), cell("1M"));
}

fn libm_log10_exact(power_of_ten: f64) -> i32 {
    // The exponents of the table above, recovered without floating-point logs.
    let s = format!("{power_of_ten:e}");
    s.split('e').nth(1).unwrap().parse().unwrap()
}

#[test]
fn iec_60062_resistance_codes() {
    // IEC 60062:2016, clause 4 "letter and digit code for resistance and
    // capacitance values" (examples from memory): R stands for the decimal point
    // with multiplier 1, K (or k) for 10³, M for 10⁶, G for 10⁹, T for 10¹².
    let examples = [
        ("R47", 0.47),
        ("R33", 0.33),
        ("3R3", 3.3),
        ("33R", 33.0),
        ("470R", 470.0),
        ("3K3", 3300.0),
        ("4k7", 4700.0),
        ("33K", 33e3),
        ("1M5", 1.5e6),
        ("3M3", 3.3e6),
        ("3G3", 3.3e9),
        ("3T3", 3.3e12),
    ];
    for (code, value) in examples {
        assert_eq!(cell(code), value, "{code}");
    }
}

#[test]
fn iec_60062_capacitance_codes() {
    // IEC 60062:2016, clause 4 (examples from memory): p 10⁻¹², n 10⁻⁹, µ 10⁻⁶,
    // m 10⁻³ in the decimal point's place.
    let examples = [
        ("p10", 0.1e-12),
        ("1p0", 1e-12),
        ("6p8", 6.8e-12),
        ("1n0", 1e-9),
        ("4n7", 4.7e-9),
        ("10n", 10e-9),
        ("\u{b5}22", 0.22e-6),
        ("2\u{b5}2", 2.2e-6),
        ("4u7", 4.7e-6),
        ("6m8", 6.8e-3),
    ];
    for (code, value) in examples {
        assert_eq!(cell(code), value, "{code}");
    }
}

#[test]
fn letter_codes_inside_formulas() {
    let mut s = Sheet::new();
    // In a formula R47 is the cell R47, so the literal is written 0R47.
    s.set("A1", "=0R47 + 4k7 + 2R2").unwrap();
    // 0.47 + 4700 + 2.2 = 4702.67 (hand arithmetic, in f64 order of evaluation).
    assert_eq!(
        s.value("A1").unwrap(),
        Value::Number(0.47 + 4700.0 + 2.2, None)
    );
    s.set("R47", "5").unwrap();
    s.set("A2", "=R47*2").unwrap();
    assert_eq!(s.value("A2").unwrap(), Value::Number(10.0, None));
}

#[test]
fn unit_words() {
    for (text, value, unit) in [
        ("10kΩ", 1e4, Unit::Ohm),
        ("10 kohm", 1e4, Unit::Ohm),
        ("10k\u{2126}", 1e4, Unit::Ohm),
        ("3.3 V", 3.3, Unit::Volt),
        ("20mA", 0.02, Unit::Ampere),
        ("5 mS", 0.005, Unit::Siemens),
        ("10 kHz", 1e4, Unit::Hertz),
        ("100nF", 100e-9, Unit::Farad),
        ("4u7H", 4.7e-6, Unit::Henry),
        ("-3 dB", -3.0, Unit::Decibel),
        ("4k7Ω", 4700.0, Unit::Ohm),
    ] {
        let q = parse_cell_number(text).unwrap_or_else(|| panic!("{text}"));
        assert_eq!((q.value, q.unit), (value, Some(unit)), "{text}");
    }
}

#[test]
fn malformed_literals_are_refused_not_guessed() {
    for bad in [
        "1Meg", "1kdB", "1k dB", "4k7k", "1x", "2.2.2", "1e", "1e99999",
    ] {
        assert!(
            !scan(bad).map(|(_, n)| n == bad.len()).unwrap_or(false),
            "{bad}"
        );
        assert!(parse_cell_number(bad).is_none(), "{bad}");
    }
    let mut s = Sheet::new();
    s.set("A1", "=1Meg*2").unwrap();
    assert!(matches!(s.value("A1").unwrap(), Value::Error(e) if e.kind == ErrorKind::Syntax));
}

#[test]
fn declared_units_are_checked() {
    let mut s = Sheet::new();
    s.set("A1", "1MΩ").unwrap();
    s.set("A2", "1 V").unwrap();
    s.set("B1", "=FEEDBACK.ZIN(\"series-shunt\"; A1; 100k; 0.01)")
        .unwrap();
    s.set("B2", "=FEEDBACK.ZIN(\"series-shunt\"; A2; 100k; 0.01)")
        .unwrap();
    s.set("B3", "=FEEDBACK.ZIN(\"series-shunt\"; 1000000; 100k; 0.01)")
        .unwrap();
    // 1 MΩ · (1 + 100000·0.01) = 1.001 GΩ.
    assert_eq!(
        s.value("B1").unwrap(),
        Value::Number(1.001e9, Some(Unit::Ohm))
    );
    match s.value("B2").unwrap() {
        Value::Error(e) => {
            assert_eq!(e.kind, ErrorKind::Value);
            assert!(
                e.detail.contains("given in V but the parameter is in Ω"),
                "{}",
                e.detail
            );
        }
        v => panic!("{v:?}"),
    }
    // A plain number is taken to be in the parameter's unit.
    assert_eq!(s.value("B3").unwrap(), s.value("B1").unwrap());
}

#[test]
fn agrees_with_the_network_notation_parser() {
    // Two readers of the same notation (the network area's for part values, this
    // one for worksheet cells) must give the same f64 wherever both accept the text.
    use loopwright::notation::parse_value;
    for text in [
        "4k7", "2R2", "R47", "1M5", "4n7", "2p2", "p68", "4.7k", "10R", "470R", "100nF", "4.7 kΩ",
        "10 kohm", "1e-9", ".47", "-2.5", "3K3", "4u7", "2\u{b5}2", "33 V", "1G", "1T5",
    ] {
        let network = parse_value(text).unwrap_or_else(|e| panic!("network refuses {text}: {e}"));
        assert_eq!(cell(text), network, "{text}");
    }
}

#[test]
fn function_results_carry_the_catalog_units() {
    // The catalog states FREQ.STEP's result units as "%; s; s" and FREQ.GBW's as
    // "Hz": the cells carry %, s and Hz (the overshoot's % is a display unit: the
    // number is the same, shown without an SI prefix).
    let mut s = Sheet::new();
    s.set("A1", "=FREQ.STEP(100k; 0.01; 2%; 10 Hz)").unwrap();
    s.set("A2", "=FREQ.GBW(100k; 10 Hz)").unwrap();
    assert!(matches!(
        s.value("A1").unwrap(),
        Value::Number(_, Some(Unit::Percent))
    ));
    assert!(matches!(
        s.value("B1").unwrap(),
        Value::Number(_, Some(Unit::Second))
    ));
    assert!(matches!(
        s.value("C1").unwrap(),
        Value::Number(_, Some(Unit::Second))
    ));
    assert!(matches!(
        s.value("A2").unwrap(),
        Value::Number(_, Some(Unit::Hertz))
    ));
}

#[test]
fn a_cell_that_begins_like_a_number_must_read_as_one() {
    // docs/notation.md: 4k7k is an error with its column, not text; words stay text.
    let mut s = Sheet::new();
    s.set("A1", "4k7k").unwrap();
    s.set("A2", "gain").unwrap();
    s.set("A3", "'4k7k").unwrap();
    match s.value("A1").unwrap() {
        Value::Error(e) => {
            assert_eq!(e.kind, ErrorKind::Syntax);
            assert!(e.detail.starts_with("column 4:"), "{}", e.detail);
        }
        v => panic!("{v:?}"),
    }
    assert_eq!(s.value("A2").unwrap(), Value::Text("gain".into()));
    assert_eq!(s.value("A3").unwrap(), Value::Text("4k7k".into()));
}
