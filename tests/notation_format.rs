//! The one display against Python's `decimal` (tests/reference/notation_format.py):
//! significant digits rounded from the exact double, ties to even; SI prefixes
//! f … T (SI Brochure, BIPM, 9th ed., 2019, table 7); a space between number and
//! unit with the prefix on the unit (§5.4.3). Includes every prefix boundary
//! (999.95 k → 1.00 M), subnormals, 0 and ±max (issue 16 item 4: `format_si` of a
//! subnormal used to loop for ever).
#![cfg(not(target_arch = "wasm32"))]

use loopwright::notation::{format_full, format_si, format_value, read, ReadOptions};
use serde_json::Value;

#[test]
fn displays_match_the_decimal_reference() {
    let text = include_str!("reference/data/notation_format.json");
    let doc: Value = serde_json::from_str(text).unwrap();
    let cases = doc["cases"].as_array().unwrap();
    assert!(cases.len() > 1000);
    let mut bad = Vec::new();
    for c in cases {
        let x: f64 = c["x"].as_str().unwrap().parse().unwrap();
        let d = c["digits"].as_u64().unwrap() as u32;
        let display = format_value(x, "Ω", d).unwrap();
        let si = format_si(x, d).unwrap();
        if display != c["display"].as_str().unwrap() || si != c["si"].as_str().unwrap() {
            bad.push(format!("{x:e} @ {d}: {display:?} / {si:?} vs {c}"));
        }
    }
    assert!(
        bad.is_empty(),
        "{} differ:\n{}",
        bad.len(),
        bad[..bad.len().min(20)].join("\n")
    );
}

#[test]
fn prefix_boundaries_round_up_into_the_next_prefix() {
    // Hand arithmetic: 999.95 k at 4 digits is 1000 k, written 1 M; at 5 digits
    // it stays 999.95 k.
    assert_eq!(format_value(999_950.0, "Hz", 4).unwrap(), "1 MHz");
    assert_eq!(format_value(999_950.0, "Hz", 5).unwrap(), "999.95 kHz");
    assert_eq!(format_si(999_950.0, 3).unwrap(), "1.00 M");
    assert_eq!(format_si(-999.96e-9, 4).unwrap(), "-1.000 µ");
}

#[test]
fn every_display_reads_back_through_the_one_reader() {
    // The display is the reader's input too: within half a unit of the last
    // shown digit (relative 0.5·10^(1−d) of the mantissa; common practice, no source).
    for &x in &[4700.0, 1e-7, 50_760.0, 2.5e18, 3.3e-13, 999_950.0, 0.000123] {
        for d in 1..=15u32 {
            let shown = format_value(x, "Ω", d).unwrap();
            let back = read(&shown, &ReadOptions::VALUE).unwrap().value;
            let bound = 0.5 * 10f64.powi(1 - d as i32) * (1.0 + 1e-12);
            assert!(
                (back / x - 1.0).abs() <= bound,
                "{x} @ {d}: {shown} → {back}"
            );
        }
        let full = format_full(x, "Ω").unwrap();
        assert_eq!(read(&full, &ReadOptions::VALUE).unwrap().value, x, "{full}");
    }
}
