//! Printing and parsing of values round-trip within the printed significance.
#![cfg(not(target_arch = "wasm32"))]

use loopwright::network::{format_si, letter_code, parse_value, parse_value_with_unit};
use proptest::prelude::*;

/// Rounding to d significant digits moves a value by at most half a unit in the
/// last digit: relative 0.5·10^(1−d) (plus a few ulps of the decimal conversion).
fn bound(d: u32) -> f64 {
    0.5 * 10f64.powi(1 - d as i32) * (1.0 + 1e-12)
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 400, rng_seed: proptest::test_runner::RngSeed::Fixed(60062), ..ProptestConfig::default() })]

    #[test]
    fn letter_codes_round_trip(exp in -3.0f64..14.9, d in 1u32..7) {
        let x = 10f64.powf(exp);
        let code = letter_code(x, d).unwrap();
        let back = parse_value(&code).unwrap();
        prop_assert!((back / x - 1.0).abs() <= bound(d), "{x} → {code} → {back}");
        // The code has exactly one letter, where the decimal point would be.
        prop_assert_eq!(code.chars().filter(|c| c.is_alphabetic()).count(), 1, "{}", code);
    }

    #[test]
    fn si_text_round_trips(exp in -20.0f64..20.0, d in 1u32..10, negative in any::<bool>()) {
        let x = if negative { -(10f64.powf(exp)) } else { 10f64.powf(exp) };
        let text = format_si(x, d).unwrap();
        let back = parse_value(&text).unwrap();
        prop_assert!((back / x - 1.0).abs() <= bound(d), "{x} → {text} → {back}");
    }

    #[test]
    fn unit_words_are_kept(value in 1u32..1000, unit in prop::sample::select(vec!["Ω", "ohm", "F", "H", "Hz", "V", "A", "W", "S", "s"])) {
        let text = format!("{value} k{unit}");
        let p = parse_value_with_unit(&text).unwrap();
        prop_assert_eq!(p.value, f64::from(value) * 1e3);
        prop_assert_eq!(p.unit, loopwright::notation::Unit::from_word(unit));
    }
}
