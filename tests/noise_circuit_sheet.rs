//! `NOISE.CIRCUIT.DENSITY` and `NOISE.CIRCUIT.TOTAL` the way a sheet uses them:
//! the circuit document in a cell, the functions pointing at it, errors as error
//! values naming what the user typed.

use loopwright::sheet::{ErrorKind, Sheet, Value};

const K: f64 = 1.380649e-23;

/// A 10 kΩ resistor from the source to node a and a 10 nF capacitor from a to
/// ground, with the source a voltage source (a short for noise).
const DOC: &str = r#"{"format":"loopwright-circuit","version":1,"elements":[
 {"name":"Vs","kind":"voltage-source","nodes":["s","0"],"value":1},
 {"name":"R1","kind":"resistor","nodes":["s","a"],"value":"10k"},
 {"name":"C1","kind":"capacitor","nodes":["a","0"],"value":"10n"}]}"#;

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

#[test]
fn a_circuit_in_a_cell_gives_its_density_and_band_noise() {
    let mut s = Sheet::new();
    s.set("A1", DOC).unwrap();
    s.set("B1", "=NOISE.CIRCUIT.DENSITY(A1; \"a\"; 10 Hz)")
        .unwrap();
    s.set("B2", "=NOISE.CIRCUIT.TOTAL(A1; \"a\"; 0; 100 MHz; 300)")
        .unwrap();
    // Far below fc = 1.59 kHz the capacitor is open: √(4kT·10 kΩ) = 12.87 nV/√Hz
    // (Johnson–Nyquist), times 1/√(1 + (10/1592)²).
    let fc = 1.0 / (2.0 * std::f64::consts::PI * 1e4 * 1e-8);
    let want = (4.0 * K * 300.0 * 1e4f64).sqrt() / (1.0 + (10.0 / fc).powi(2)).sqrt();
    assert!((num(&s, "B1") / want - 1.0).abs() < 1e-12);
    // The whole band is kT/C (common practice, no source): 643.6 nV; the band
    // stops at 100 MHz, fc·(π/2 − atan(10⁸/fc)) ≈ fc²/10⁸ short of π/2·fc.
    let total = (K * 300.0 / 1e-8 * (2.0 / std::f64::consts::PI) * (1e8 / fc).atan()).sqrt();
    assert!((num(&s, "B2") / total - 1.0).abs() < 1e-8);
}

#[test]
fn faults_are_error_values_naming_the_parameter() {
    let mut s = Sheet::new();
    s.set("A1", DOC).unwrap();
    s.set("B1", "=NOISE.CIRCUIT.DENSITY(A1; \"b\"; 10 Hz)")
        .unwrap();
    let (_, detail) = error(&s, "B1");
    assert!(
        detail.contains("output") && detail.contains("(b)"),
        "{detail}"
    );
    s.set("B2", "=NOISE.CIRCUIT.DENSITY(A1; \"a\"; 10 Hz; -4)")
        .unwrap();
    let (_, detail) = error(&s, "B2");
    assert!(
        detail.starts_with("NOISE.CIRCUIT.DENSITY: temperature: "),
        "{detail}"
    );
    s.set("B3", "=NOISE.CIRCUIT.TOTAL(A1; \"a\"; 1 kHz; 10 Hz)")
        .unwrap();
    let (_, detail) = error(&s, "B3");
    assert!(
        detail.starts_with("NOISE.CIRCUIT.TOTAL: f_low: "),
        "{detail}"
    );
    s.set("B4", "=NOISE.CIRCUIT.DENSITY(\"{\"; \"a\"; 10 Hz)")
        .unwrap();
    // Text that is not a circuit document: refused naming the document's text.
    let (_, detail) = error(&s, "B4");
    assert!(detail.contains("json"), "{detail}");
}
