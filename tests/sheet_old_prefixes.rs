//! Worksheets written before the areas were given one name each (package 0.1: `FB.`,
//! `LOOP.`, `RES.`, `CKT.`, `DIST.`) still load and compute, and keep their text as
//! typed; the new names give the same values.

use loopwright::sheet::{Sheet, Value};

/// A version-1 document as package 0.1 wrote it.
const OLD_DOCUMENT: &str = r#"{
  "format": "loopwright-sheet",
  "version": 1,
  "cells": {
    "A1": "100k",
    "B1": "=FB.GAIN(A1; 0.01)",
    "B2": "=LOOP.GBW(1e5; 10)",
    "B3": "=RES.NEAREST(4.75k; \"E24\")"
  },
  "names": {}
}
"#;

fn number(s: &Sheet, address: &str) -> f64 {
    match s.value(address).unwrap() {
        Value::Number(x, _) => x,
        other => panic!("{address} is {other:?}, not a number"),
    }
}

#[test]
fn an_old_document_loads_and_computes() {
    let mut s = Sheet::new();
    s.load_document(OLD_DOCUMENT).unwrap();
    // Af = A / (1 + A·β) = 1e5 / 1001 (the closed-loop gain's definition, exact arithmetic).
    assert!((number(&s, "B1") - 1e5 / 1001.0).abs() < 1e-12);
    // GBW = A0 · f_pole = 1e5 · 10 Hz = 1 MHz (definition).
    assert!((number(&s, "B2") - 1e6).abs() < 1e-6);
    // IEC 60063 E24 has 4.7 and 5.1 in the decade: 4.75 k rounds to 4.7 k (nearest on a log scale).
    assert!((number(&s, "B3") - 4.7e3).abs() < 1e-9);
    // The text stays as the user typed it: nothing is rewritten behind their back.
    assert_eq!(
        s.input(loopwright::sheet::CellRef::parse("B1").unwrap()),
        Some("=FB.GAIN(A1; 0.01)")
    );
}

#[test]
fn old_and_new_names_agree() {
    let mut s = Sheet::new();
    s.set("A1", "=FB.GAIN(1e5; 0.00999)").unwrap();
    s.set("A2", "=FEEDBACK.GAIN(1e5; 0.00999)").unwrap();
    assert_eq!(number(&s, "A1"), number(&s, "A2"));
}
