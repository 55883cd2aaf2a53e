//! Component values in the circuit document: numbers, or text as engineers write
//! it (`4k7`, `4.7k`, `100nF`, `2R2`), read by the crate's one value parser,
//! [`crate::notation`] (SI prefixes per the SI Brochure, 9th ed.; IEC 60062 letter
//! codes), with a length limit, the unit checked against the element's, and
//! errors named after the document field.

use crate::error::{Error, Result};
use crate::notation::{self, ReadOptions, Unit};

/// Longest value text accepted, in bytes.
pub const MAX_VALUE_LEN: usize = 40;

/// Parse a component value written as text, reporting errors under `param`.
///
/// The syntax is that of [`crate::notation::parse_value`]: a number, an SI prefix
/// or an IEC 60062 letter code, and an optional unit word (not checked against the
/// element kind).
///
/// # Errors
/// [`Error::TooLarge`] for text over [`MAX_VALUE_LEN`] bytes; otherwise the errors
/// of [`crate::notation::parse_value`], renamed to `param`.
///
/// # Example
/// ```
/// use loopwright::circuit::parse_value;
/// assert_eq!(parse_value("value", "4k7").unwrap(), 4700.0);
/// assert_eq!(parse_value("value", "4,7k").unwrap_err().param(), "value");
/// ```
pub fn parse_value(param: &'static str, text: &str) -> Result<f64> {
    parse_value_in(param, text, None)
}

/// [`parse_value`] for a value declared in `unit` (a resistor's in Ω, a
/// capacitor's in F…): a value written in another unit is refused.
///
/// # Errors
/// As [`parse_value`]; a unit word other than `unit` is an [`Error::Syntax`] at
/// the unit's column.
///
/// # Example
/// ```
/// use loopwright::circuit::value::parse_value_in;
/// use loopwright::notation::Unit;
/// assert_eq!(parse_value_in("value", "100 nF", Some(Unit::Farad)).unwrap(), 1e-7);
/// assert_eq!(parse_value_in("value", "100 nH", Some(Unit::Farad)).unwrap_err().code(), "syntax");
/// ```
pub fn parse_value_in(param: &'static str, text: &str, unit: Option<Unit>) -> Result<f64> {
    if text.len() > MAX_VALUE_LEN {
        return Err(Error::TooLarge {
            param,
            limit: MAX_VALUE_LEN as u64,
        });
    }
    let options = ReadOptions {
        unit,
        ..ReadOptions::VALUE
    };
    notation::read(text, &options)
        .map(|r| r.value)
        .map_err(|e| e.with_param(param))
}

#[cfg(test)]
mod tests {
    use super::*;

    // Expected values: the definitions of the SI prefixes (SI Brochure, 9th ed.)
    // and of the RKM code (IEC 60062, from memory).
    #[test]
    fn reads_plain_si_and_rkm_forms() {
        let cases: &[(&str, f64)] = &[
            ("4700", 4700.0),
            ("-2.5", -2.5),
            ("1e-9", 1e-9),
            (".5", 0.5),
            ("4.7k", 4700.0),
            ("4k7", 4700.0),
            ("2R2", 2.2),
            ("R47", 0.47),
            ("47R", 47.0),
            ("1M5", 1.5e6),
            ("1M", 1e6),
            ("10m", 0.01),
            ("4n7", 4.7e-9),
            ("100nF", 100e-9),
            ("2.2uH", 2.2e-6),
            ("2.2µ", 2.2e-6),
            ("4.7kΩ", 4700.0),
            ("10 mA", 0.01),
            ("3F", 3.0),
            ("1.5G", 1.5e9),
            (" 12 ", 12.0),
            ("5K6", 5600.0),
        ];
        for &(text, want) in cases {
            let got = parse_value("value", text).unwrap_or_else(|e| panic!("{text}: {e}"));
            assert!(
                (got - want).abs() <= 1e-15 * want.abs(),
                "{text}: {got} != {want}"
            );
        }
        // The two spellings give the same f64 exactly.
        assert_eq!(parse_value("v", "4k7"), parse_value("v", "4.7k"));
        assert_eq!(parse_value("v", "4n7"), parse_value("v", "4.7n"));
    }

    #[test]
    fn rejects_malformed_text_with_the_parameter() {
        for bad in [
            "", "k", "R", "4k7k", "1..2", "1e", "e3", "4 k 7", "abc", "1x", "4k7Ω2", "--1", "1F5F",
            "inf", "NaN",
        ] {
            let e = parse_value("value", bad).unwrap_err();
            assert_eq!(e.param(), "value", "{bad}");
        }
        assert_eq!(
            parse_value("value", "1e999").unwrap_err().code(),
            "overflow"
        );
        assert_eq!(
            parse_value("value", &"1".repeat(50)).unwrap_err().code(),
            "too_large"
        );
    }
}
