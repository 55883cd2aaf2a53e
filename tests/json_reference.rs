//! The crate's JSON reader against Python's `json` module (RFC 8259):
//! `tests/reference/json_oracle.py` wrote 800 texts (random documents, hand-written
//! number forms, one-character mutations) and what Python reads from each, or
//! `error`. The writer's direction (Python reads what the crate writes back to
//! the same values) is checked by that script's `--check` through
//! `examples/json_echo.rs`.

#![cfg(not(target_arch = "wasm32"))]

use loopwright::json::parse;

#[path = "support/json_flat.rs"]
mod json_flat;

fn unhex(s: &str) -> String {
    let bytes: Vec<u8> = (0..s.len())
        .step_by(2)
        .map(|i| u8::from_str_radix(&s[i..i + 2], 16).unwrap())
        .collect();
    String::from_utf8(bytes).unwrap()
}

#[test]
fn reads_what_python_reads_and_refuses_what_it_refuses() {
    let data = include_str!("reference/data/json_oracle.txt");
    let (mut read, mut refused) = (0, 0);
    for (i, line) in data.lines().enumerate() {
        let (hex, want) = line.split_once('\t').unwrap();
        let text = unhex(hex);
        // Expected from Python's json.loads (tests/reference/json_oracle.py).
        match parse(&text) {
            Ok(v) => {
                assert_eq!(json_flat::flat(&v), want, "case {i}: {text:?}");
                read += 1;
            }
            Err(e) => {
                assert_eq!("error", want, "case {i}: {text:?} refused: {e}");
                refused += 1;
            }
        }
    }
    // The data is the one the script writes: all cases present.
    assert_eq!((read + refused, refused), (800, 192));
}

/// serde_json's text of `x` (what the circuit and stage documents were written
/// with before `src/json/`).
fn serde_text(x: f64) -> String {
    serde_json::to_string(&x).unwrap()
}

/// How many of the 100 000 random doubles may end in another of two equally
/// short last digits than serde_json's: measured 23; a bound well above that
/// and far below what a wrong rule would give (every 17-digit number).
const MAX_LAST_DIGIT_CHOICES: usize = 100;

#[test]
fn with_fraction_numbers_are_spelled_as_serde_json_spells_them() {
    use loopwright::json::{JsonWriter, NumberText};
    let spell = |x: f64| {
        let mut w = JsonWriter::new().with_numbers(NumberText::WithFraction);
        w.number(x);
        w.finish()
    };
    // Boundaries of the plain and exponent forms, zeros, extremes.
    let mut xs = vec![
        0.0,
        -0.0,
        1.0,
        3000.0,
        1e-5,
        9.99e-6,
        1e-6,
        1e15,
        9.999999999999998e15,
        1e16,
        1.5e16,
        1e21,
        5e-324,
        2.2250738585072014e-308,
        f64::MAX,
        f64::MIN,
        0.1,
        4700.000000000001,
    ];
    // 100 000 doubles from random bit patterns (xorshift64, fixed seed).
    let mut state = 0x2545_F491_4F6C_DD1Du64;
    while xs.len() < 100_000 {
        state ^= state << 13;
        state ^= state >> 7;
        state ^= state << 17;
        let x = f64::from_bits(state);
        if x.is_finite() {
            xs.push(x);
        }
    }
    let mut last_digit = 0;
    for x in xs {
        // Expected: serde_json's own writer (a well-kept crate, independent code).
        let (ours, theirs) = (spell(x), serde_text(x));
        assert_eq!(
            ours.parse::<f64>().unwrap().to_bits(),
            x.to_bits(),
            "{ours}"
        );
        if ours != theirs {
            // Where 17 digits are needed, two last digits can both read back to x:
            // Rust's formatter takes the nearer one, serde_json's not always.
            assert_eq!(theirs.parse::<f64>().unwrap().to_bits(), x.to_bits());
            assert_eq!(ours[..ours.len() - 1], theirs[..theirs.len() - 1]);
            last_digit += 1;
        }
    }
    // Measured: 23 of these 100 000 (all between 1e13 and 1e16, 17 digits).
    assert!(last_digit <= MAX_LAST_DIGIT_CHOICES, "{last_digit}");
}

#[test]
fn circuit_and_stage_documents_keep_the_bytes_serde_json_wrote() {
    use loopwright::circuit::json::{read_circuit, write_circuit};
    use loopwright::stage::{read_stage, write_stage};
    let circuits = [
        include_str!("../docs/circuit.md"),
        r#"{"format":"loopwright-circuit","version":2,"nodes":["in","out","fb"],"elements":[
        {"name":"Vs","kind":"voltage-source","nodes":["in","0"],"value":1,
         "tolerance":{"distribution":"normal","percent":0.1,"sigmas":3}},
        {"name":"U1","kind":"amplifier","nodes":["out","0"],"control":["in","fb"],
         "model":{"a0":{"min":5e4,"typ":2e5},"gbwHz":"10M","polesHz":["30M"],"rd":"1M","ro":60,
           "complexPoles":[{"freqHz":"120M","q":0.7}],"swing":{"lowV":-13,"highV":13},
           "voltageNoise":{"density":"8n","cornerHz":20}},
         "spreadPoint":"min"},
        {"name":"Rf","kind":"resistor","nodes":["out","fb"],"value":"9k09",
         "tolerance":{"distribution":"limits","min":9e3,"max":9.2e3},"tempco":25},
        {"name":"Y1","kind":"admittance","nodes":["fb","0"],"value":1e-3,"valueIm":-2.2e-17},
        {"name":"F1","kind":"cccs","nodes":["fb","0"],"controlElement":"Vs","value":-0.0}]}"#,
    ];
    for (i, text) in circuits.iter().enumerate() {
        let text = match text.find("```json") {
            Some(s) => &text[s + 7..s + 7 + text[s + 7..].find("```").unwrap()],
            None => text,
        };
        let written = write_circuit(&read_circuit(text).unwrap());
        // Expected: serde_json re-writing the same document (sorted map, its numbers).
        let by_serde =
            serde_json::to_string(&serde_json::from_str::<serde_json::Value>(&written).unwrap())
                .unwrap();
        assert_eq!(written, by_serde, "circuit {i}");
    }
    let stage = r#"{"format":"loopwright-stage","version":1,"kind":"transimpedance",
      "amplifier":{"a0":{"min":3e5,"typ":1e6},"gbwHz":"20M","cd":"4p","ccm":"3p","ro":40},
      "spreadPoint":"min","parts":{"rf":"100k","cf":"1p5","cs":"20p","rs":"1G"}}"#;
    let written = write_stage(&read_stage(stage).unwrap());
    let by_serde =
        serde_json::to_string(&serde_json::from_str::<serde_json::Value>(&written).unwrap())
            .unwrap();
    assert_eq!(written, by_serde);
}
