//! Component values written the way engineers write them.
//!
//! Accepted forms (surrounding spaces ignored):
//! - a plain number: `4700`, `-2.5`, `1e-9`, `.5`;
//! - a number with an SI prefix: `4.7k`, `100n`, `2.2u` (or `µ`), `1M`, `10m`;
//!   prefixes `f p n u µ m k M G T` (case matters: `m` is milli, `M` mega);
//! - an IEC 60062 letter-and-digit (RKM) code, the letter standing where the
//!   decimal point would be: `4k7` = 4.7e3, `2R2` = 2.2, `R47` = 0.47, `1M5` =
//!   1.5e6, `4n7` = 4.7e-9, `47R` = 47; letters `R` (×1), `F` (×1, farads), and the
//!   prefixes above (`K` is accepted for kilo as in the code's resistor use);
//! - optionally followed by one unit symbol: `Ω`, `ohm`, `F`, `H`, `V`, `A`, `S`
//!   (`4.7kΩ`, `100nF`). The unit is not checked against the element kind.
//!
//! A value is computed as the decimal mantissa (parsed by Rust's own float
//! parser) times the power of ten of the prefix, so `4k7` and `4.7k` give the same
//! f64. Source: IEC 60062:2016, *Marking codes for resistors and capacitors*,
//! clause on the RKM code (from memory); SI prefixes per the SI Brochure, 9th ed.

use crate::check;
use crate::error::{Error, Result};

/// What a value string must look like, for the error message.
const VALUE_FORM: &str = "must be a number, optionally with an SI prefix (4.7k, 100n) or an IEC 60062 code (4k7, 2R2, 1M5), \
and optionally a unit (Ω, ohm, F, H, V, A, S)";

/// Longest value text accepted, in bytes.
pub const MAX_VALUE_LEN: usize = 40;

/// The power of ten a prefix letter stands for; `R` and `F` (RKM only) are ×1.
fn prefix_exponent(c: char) -> Option<i32> {
    Some(match c {
        'f' => -15,
        'p' => -12,
        'n' => -9,
        'u' | 'µ' | 'μ' => -6,
        'm' => -3,
        'k' | 'K' => 3,
        'M' => 6,
        'G' => 9,
        'T' => 12,
        _ => return None,
    })
}

fn is_unit(s: &str) -> bool {
    matches!(s, "" | "Ω" | "ohm" | "Ohm" | "F" | "H" | "V" | "A" | "S")
}

fn scale(mantissa: f64, exp: i32) -> f64 {
    // Multiply or divide by an exact power of ten so 4.7k and 4k7 agree bit for bit
    // with the usual decimal reading (1e3 and 1e9 are exact in f64).
    let p = libm::pow(10.0, f64::from(exp.abs()));
    if exp >= 0 {
        mantissa * p
    } else {
        mantissa / p
    }
}

/// Parse a component value (see the module doc for the forms).
///
/// `param` names the value in the error (e.g. `"value"`). The result is finite.
///
/// # Errors
/// [`Error::OutOfDomain`] for text that is none of the accepted forms,
/// [`Error::TooLarge`] above [`MAX_VALUE_LEN`] bytes, [`Error::NotFinite`] when the
/// number overflows.
///
/// # Example
/// ```
/// use loopwright::circuit::parse_value;
/// assert_eq!(parse_value("value", "4k7").unwrap(), 4700.0);
/// assert_eq!(parse_value("value", "100nF").unwrap(), 100e-9);
/// assert_eq!(parse_value("value", "4k7k").unwrap_err().code(), "out_of_domain");
/// ```
pub fn parse_value(param: &'static str, text: &str) -> Result<f64> {
    let s = text.trim();
    if s.len() > MAX_VALUE_LEN {
        return Err(Error::TooLarge { param, limit: MAX_VALUE_LEN as u64 });
    }
    let bad = Error::OutOfDomain { param, requirement: VALUE_FORM };
    if s.is_empty() {
        return Err(bad);
    }
    let (negative, body) = match s.strip_prefix('-') {
        Some(rest) => (true, rest),
        None => (false, s.strip_prefix('+').unwrap_or(s)),
    };
    let v = parse_rkm(body).or_else(|| parse_si(body)).ok_or(bad)?;
    check::finite(param, if negative { -v } else { v })
}

/// `4k7`, `R47`, `47R`, `4n7`, `2F2`: digits, one letter, digits, optional unit.
fn parse_rkm(s: &str) -> Option<f64> {
    let letter_at = s.find(|c: char| !c.is_ascii_digit())?;
    let (int_part, rest) = s.split_at(letter_at);
    let mut chars = rest.chars();
    let letter = chars.next()?;
    let exp = match letter {
        'R' | 'F' => 0,
        c => prefix_exponent(c)?,
    };
    let after = chars.as_str();
    let frac_len = after.find(|c: char| !c.is_ascii_digit()).unwrap_or(after.len());
    let (frac_part, unit) = after.split_at(frac_len);
    if int_part.is_empty() && frac_part.is_empty() {
        return None;
    }
    // `47k` is the SI form; RKM needs the letter to mark the decimal point, which
    // also covers `47R` (no digits after the letter) for the R and F letters.
    if frac_part.is_empty() && !matches!(letter, 'R' | 'F') {
        return None;
    }
    if !is_unit(unit) || (letter == 'F' && !unit.is_empty()) {
        return None;
    }
    let mut buf = [0u8; MAX_VALUE_LEN + 2];
    let n = int_part.len() + 1 + frac_part.len();
    let dst = buf.get_mut(..n)?;
    dst[..int_part.len()].copy_from_slice(int_part.as_bytes());
    dst[int_part.len()] = b'.';
    dst[int_part.len() + 1..].copy_from_slice(frac_part.as_bytes());
    let text = core::str::from_utf8(dst).ok()?;
    if text == "." {
        return None;
    }
    // "R47" reads as ".47" and "47R" as "47.": Rust's float parser accepts both.
    let mantissa: f64 = text.parse().ok()?;
    Some(scale(mantissa, exp))
}

/// `4.7k`, `1e-9`, `100nF`, `10 mA`: a decimal number, an optional prefix, an optional unit.
fn parse_si(s: &str) -> Option<f64> {
    let bytes = s.as_bytes();
    let mut i = 0;
    while i < bytes.len() && (bytes[i].is_ascii_digit() || bytes[i] == b'.') {
        i += 1;
    }
    if i == 0 {
        return None;
    }
    // An exponent only when digits follow the e (so `1e` is rejected, not read as 1).
    if i < bytes.len() && (bytes[i] == b'e' || bytes[i] == b'E') {
        let mut j = i + 1;
        if j < bytes.len() && (bytes[j] == b'+' || bytes[j] == b'-') {
            j += 1;
        }
        let digits_start = j;
        while j < bytes.len() && bytes[j].is_ascii_digit() {
            j += 1;
        }
        if j > digits_start {
            i = j;
        }
    }
    let (num, rest) = s.split_at(i);
    if num.bytes().filter(|&b| b == b'.').count() > 1 || num.starts_with(['e', 'E']) {
        return None;
    }
    let mantissa: f64 = num.parse().ok()?;
    let rest = rest.trim_start();
    let mut chars = rest.chars();
    match chars.next() {
        None => Some(mantissa),
        Some(c) => {
            if is_unit(rest) {
                return Some(mantissa);
            }
            let exp = prefix_exponent(c)?;
            if is_unit(chars.as_str()) {
                Some(scale(mantissa, exp))
            } else {
                None
            }
        }
    }
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
            ("2F2", 2.2),
            ("1.5G", 1.5e9),
            (" 12 ", 12.0),
            ("5K6", 5600.0),
            ("1e3k", 1e6),
        ];
        for &(text, want) in cases {
            let got = parse_value("value", text).unwrap_or_else(|e| panic!("{text}: {e}"));
            assert!((got - want).abs() <= 1e-15 * want.abs(), "{text}: {got} != {want}");
        }
        // The two spellings give the same f64 exactly.
        assert_eq!(parse_value("v", "4k7"), parse_value("v", "4.7k"));
        assert_eq!(parse_value("v", "4n7"), parse_value("v", "4.7n"));
    }

    #[test]
    fn rejects_malformed_text_with_the_parameter() {
        for bad in ["", "k", "R", "4k7k", "1..2", "1e", "e3", "4 k 7", "abc", "1x", "4k7Ω2", "--1", "1F5F", "inf", "NaN"] {
            let e = parse_value("value", bad).unwrap_err();
            assert_eq!(e.param(), "value", "{bad}");
        }
        assert_eq!(parse_value("value", "1e999").unwrap_err().code(), "not_finite");
        assert_eq!(parse_value("value", &"1".repeat(50)).unwrap_err().code(), "too_large");
    }
}
