//! Component values as people write them: SI prefixes and IEC 60062 letter codes.
//!
//! Accepted by [`parse_value`] (blanks around the whole text ignored):
//! - a decimal number with optional sign and exponent: `4700`, `-2.5`, `1e-9`, `.47`;
//! - followed, optionally after one space, by an SI prefix
//!   `f p n u µ μ m k K M G T` (K is accepted for kilo as in trade use) or by `R`
//!   (×1, the ohm marker of IEC 60062): `4.7k`, `4.7 k`, `10R`;
//! - the IEC 60062 letter-for-decimal-point code, where the prefix letter (or `R`)
//!   stands where the decimal point would be: `4k7` = 4.7 k, `2R2` = 2.2,
//!   `R47` = 0.47, `1M5` = 1.5 M, `4n7` = 4.7 n, `2p2` = 2.2 p;
//! - then an optional unit word: `Ω ohm ohms F H Hz V A W S s` (`4.7 kΩ`, `100nF`).
//!
//! Source: IEC 60062:2016 *Marking codes for resistors and capacitors*, clause 4
//! (letter code, from memory); SI Brochure, 9th edition, table 7 (prefixes).
//!
//! The parser is a pure function of the text, shared by every area that reads a
//! value a person typed: the network functions, the circuit document, the page.

use crate::error::{Error, Result};
use alloc::format;
use alloc::string::String;

/// The unit words accepted after a value.
pub const UNIT_WORDS: [&str; 11] = ["Ω", "ohm", "ohms", "F", "H", "Hz", "V", "A", "W", "S", "s"];

const SYNTAX: &str = "must be a number with an optional SI prefix or IEC 60062 letter code and unit, such as 4700, 4.7k, 4k7, 2R2, R47 or 100 nF";

fn syntax_error() -> Error {
    Error::OutOfDomain {
        param: "text",
        requirement: SYNTAX,
    }
}

/// Power of ten of a prefix letter (`R` counts as 10⁰).
fn prefix_exponent(c: char) -> Option<i32> {
    Some(match c {
        'f' => -15,
        'p' => -12,
        'n' => -9,
        'u' | 'µ' | 'μ' => -6,
        'm' => -3,
        'R' => 0,
        'k' | 'K' => 3,
        'M' => 6,
        'G' => 9,
        'T' => 12,
        _ => return None,
    })
}

fn digits_end(s: &str) -> usize {
    s.find(|c: char| !c.is_ascii_digit()).unwrap_or(s.len())
}

/// A parsed value and the unit word written after it (empty when none).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ParsedValue<'a> {
    /// The value in base units (4k7 → 4700).
    pub value: f64,
    /// The unit word as written (`"Ω"`, `"nF"` gives `"F"`), or `""`.
    pub unit: &'a str,
}

/// Parse a value with an optional prefix, letter code and unit word; see the
/// module doc for the syntax.
///
/// # Errors
/// [`Error::OutOfDomain`] on `text` for anything else (empty text, two decimal
/// points, an unknown unit word…); [`Error::Overflow`] on `text` when the value
/// exceeds the double range.
///
/// # Example
/// ```
/// use loopwright::notation::parse_value_with_unit;
/// let p = parse_value_with_unit("4.7 kΩ").unwrap();
/// assert_eq!((p.value, p.unit), (4700.0, "Ω"));
/// assert_eq!(parse_value_with_unit("4k7k").unwrap_err().param(), "text");
/// ```
pub fn parse_value_with_unit(text: &str) -> Result<ParsedValue<'_>> {
    let s = text.trim();
    let (negative, s) = match s.strip_prefix('-') {
        Some(r) => (true, r),
        None => (false, s.strip_prefix('+').unwrap_or(s)),
    };
    let int_end = digits_end(s);
    let (int_part, rest) = s.split_at(int_end);
    let mut number = String::with_capacity(s.len() + 8);
    if negative {
        number.push('-');
    }
    let mut exponent = 0i32;
    let tail;
    // Letter code: a prefix letter (or R) between digits.
    let code = rest.chars().next().and_then(|c| {
        let after = &rest[c.len_utf8()..];
        let frac_end = digits_end(after);
        (frac_end > 0).then(|| (prefix_exponent(c), &after[..frac_end], &after[frac_end..]))
    });
    if let Some((Some(e), frac, after)) = code {
        number.push_str(if int_part.is_empty() { "0" } else { int_part });
        number.push('.');
        number.push_str(frac);
        exponent = e;
        tail = after.trim_start();
    } else {
        let mut rest = rest;
        number.push_str(int_part);
        let mut frac_len = 0;
        if let Some(r) = rest.strip_prefix('.') {
            frac_len = digits_end(r);
            number.push('.');
            number.push_str(&r[..frac_len]);
            rest = &r[frac_len..];
        }
        if int_part.is_empty() && frac_len == 0 {
            return Err(syntax_error());
        }
        // Exponent, only when digits follow the e.
        if let Some(r) = rest.strip_prefix(['e', 'E']) {
            let signed = r.strip_prefix(['+', '-']).unwrap_or(r);
            let n = digits_end(signed);
            if n > 0 {
                let take = r.len() - signed.len() + n;
                number.push('e');
                number.push_str(&r[..take]);
                rest = &r[take..];
            }
        }
        let after_space = rest.strip_prefix(' ').unwrap_or(rest);
        if rest.starts_with(char::is_whitespace) && after_space.starts_with(char::is_whitespace) {
            return Err(syntax_error());
        }
        let rest = after_space;
        if rest.is_empty() || UNIT_WORDS.contains(&rest) {
            tail = rest;
        } else {
            let c = rest.chars().next().ok_or_else(syntax_error)?;
            exponent = prefix_exponent(c).ok_or_else(syntax_error)?;
            tail = &rest[c.len_utf8()..];
        }
    }
    if !(tail.is_empty() || UNIT_WORDS.contains(&tail)) {
        return Err(syntax_error());
    }
    let mantissa: f64 = number.parse().map_err(|_| syntax_error())?;
    // Apply the prefix through the decimal text so 4k7 is exactly the double nearest 4700.
    let value: f64 = if exponent == 0 {
        mantissa
    } else {
        format!("{number}e{exponent}").parse().or_else(|_| {
            // The number already had an exponent (1e3k): scale the parsed value.
            let p = libm::pow(10.0, f64::from(exponent));
            Ok::<f64, Error>(mantissa * p)
        })?
    };
    if !value.is_finite() {
        return Err(Error::Overflow { param: "text" });
    }
    Ok(ParsedValue { value, unit: tail })
}

/// Parse a value and ignore its unit word; see [`parse_value_with_unit`].
///
/// # Errors
/// As [`parse_value_with_unit`].
///
/// # Example
/// ```
/// use loopwright::notation::parse_value;
/// assert_eq!(parse_value("4k7").unwrap(), 4700.0);
/// assert_eq!(parse_value("R47").unwrap(), 0.47);
/// assert_eq!(parse_value("100nF").unwrap(), 1e-7);
/// assert_eq!(parse_value("4,7k").unwrap_err().code(), "out_of_domain");
/// ```
pub fn parse_value(text: &str) -> Result<f64> {
    Ok(parse_value_with_unit(text)?.value)
}

fn check_digits(digits: u32) -> Result<usize> {
    if (1..=15).contains(&digits) {
        Ok(digits as usize)
    } else {
        Err(Error::OutOfDomain {
            param: "digits",
            requirement: "must be from 1 to 15 significant digits",
        })
    }
}

/// Split |x| > 0 into (mantissa rounded to `digits` significant digits, exponent
/// as a multiple of 3) with the mantissa in [1, 1000) after rounding, and the
/// mantissa's text with trailing zeros kept to show the significance.
fn engineering(x: f64, digits: usize) -> (String, i32) {
    let mut e3 = 3 * crate::float::floor(libm::log10(x) / 3.0) as i32;
    loop {
        // 10^e3 underflows to 0 below 1e-308 (subnormal x): scale in two steps there,
        // or m would be infinite and the search would never end.
        let m = if e3 < -300 {
            (x * 1e300) / libm::pow(10.0, f64::from(e3 + 300))
        } else {
            x / libm::pow(10.0, f64::from(e3))
        };
        let int_digits = if m >= 100.0 {
            3
        } else if m >= 10.0 {
            2
        } else {
            1
        };
        let decimals = digits.saturating_sub(int_digits);
        let text = format!("{m:.decimals$}");
        let rounded: f64 = text.parse().unwrap_or(m);
        if rounded >= 1000.0 {
            e3 += 3;
        } else if rounded < 1.0 {
            e3 -= 3;
        } else {
            // Rounding may have added an integer digit (99.99… → 100.0): one decimal fewer.
            let rounded_int_digits = if rounded >= 100.0 {
                3
            } else if rounded >= 10.0 {
                2
            } else {
                1
            };
            if rounded_int_digits != int_digits {
                let decimals = digits.saturating_sub(rounded_int_digits);
                return (format!("{m:.decimals$}"), e3);
            }
            return (text, e3);
        }
    }
}

/// Print a value with an SI prefix and `digits` significant digits: 4700 →
/// `"4.7 k"`, 1e-7 → `"100 n"`, 0 → `"0"`. Append the unit yourself. Values
/// beyond the prefixes f … T print in exponent form (`"2.5e18"`).
///
/// # Errors
/// `value` not finite; `digits` outside 1 … 15.
///
/// # Example
/// ```
/// use loopwright::notation::format_si;
/// assert_eq!(format_si(4700.0, 2).unwrap(), "4.7 k");
/// assert_eq!(format_si(-0.000_001_5, 3).unwrap(), "-1.50 µ");
/// assert_eq!(format_si(f64::NAN, 3).unwrap_err().param(), "value");
/// ```
pub fn format_si(value: f64, digits: u32) -> Result<String> {
    let x = crate::check::finite("value", value)?;
    let digits = check_digits(digits)?;
    if x == 0.0 {
        return Ok(String::from("0"));
    }
    let sign = if x < 0.0 { "-" } else { "" };
    let (m, e3) = engineering(libm::fabs(x), digits);
    let prefix = match e3 {
        -15 => " f",
        -12 => " p",
        -9 => " n",
        -6 => " µ",
        -3 => " m",
        0 => "",
        3 => " k",
        6 => " M",
        9 => " G",
        12 => " T",
        _ => return Ok(format!("{sign}{m}e{e3}")),
    };
    Ok(format!("{sign}{m}{prefix}"))
}

/// Print a resistance in the IEC 60062 letter code with `digits` significant
/// digits: 4700 → `"4k7"`, 2.2 → `"2R2"`, 0.47 → `"R47"`, 1.5e6 → `"1M5"`,
/// 1000 → `"1k0"` (two digits), 470 → `"470R"`. Multipliers R, k, M, G, T
/// (k in lower case, as the trade writes it).
///
/// # Errors
/// `value` not finite, below 0.001 Ω or 10¹⁵ Ω and above; `digits` outside 1 … 15.
///
/// # Example
/// ```
/// use loopwright::notation::letter_code;
/// assert_eq!(letter_code(4700.0, 2).unwrap(), "4k7");
/// assert_eq!(letter_code(0.47, 2).unwrap(), "R47");
/// assert_eq!(letter_code(0.0, 2).unwrap_err().param(), "value");
/// ```
pub fn letter_code(value: f64, digits: u32) -> Result<String> {
    let x = crate::check::positive("value", value)?;
    let digits = check_digits(digits)?;
    if !(1e-3..1e15).contains(&x) {
        return Err(Error::OutOfDomain {
            param: "value",
            requirement: "must lie from 0.001 Ω up to (not including) 10¹⁵ Ω",
        });
    }
    let (m, e3) = engineering(x, digits);
    if e3 < 0 {
        // Below 1 Ω: R then the digits of the value, 0.47 → R47.
        let decimals =
            (digits as i32 - 1 - crate::float::floor(libm::log10(x)) as i32).max(1) as usize;
        let text = format!("{x:.decimals$}");
        let frac = text.strip_prefix("0.").unwrap_or(&text);
        if text.starts_with("1.") {
            // Rounded up to 1 Ω.
            return Ok(format!("1R{}", "0".repeat(digits.saturating_sub(1))));
        }
        return Ok(format!("R{frac}"));
    }
    let letter = match e3 {
        0 => 'R',
        3 => 'k',
        6 => 'M',
        9 => 'G',
        12 => 'T',
        _ => {
            return Err(Error::OutOfDomain {
                param: "value",
                requirement: "must lie from 0.001 Ω up to (not including) 10¹⁵ Ω",
            })
        }
    };
    Ok(match m.split_once('.') {
        Some((int, frac)) => format!("{int}{letter}{frac}"),
        None => format!("{m}{letter}"),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn letter_codes_parse_to_their_values() {
        // IEC 60062 examples (from memory): 4K7 = 4.7 kΩ, R47 = 0.47 Ω, 2R2 = 2.2 Ω.
        let cases = [
            ("4k7", 4700.0),
            ("4K7", 4700.0),
            ("2R2", 2.2),
            ("R47", 0.47),
            ("1M5", 1.5e6),
            ("10R", 10.0),
            ("0R", 0.0),
            ("4n7", 4.7e-9),
            ("2p2", 2.2e-12),
            ("6µ8", 6.8e-6),
            ("6u8F", 6.8e-6),
            ("1G2", 1.2e9),
            ("R005", 0.005),
        ];
        for (text, want) in cases {
            assert_eq!(parse_value(text), Ok(want), "{text}");
        }
    }

    #[test]
    fn decimal_numbers_with_prefix_and_unit() {
        let cases = [
            ("4700", 4700.0, ""),
            (" 4.7 kΩ ", 4700.0, "Ω"),
            ("-2.5m", -2.5e-3, ""),
            ("+.5", 0.5, ""),
            ("1e-9", 1e-9, ""),
            ("1E3 ohm", 1000.0, "ohm"),
            ("100nF", 1e-7, "F"),
            ("10 Hz", 10.0, "Hz"),
            ("3 mA", 3e-3, "A"),
            ("2.2 µF", 2.2e-6, "F"),
            ("1.5e3k", 1.5e6, ""),
        ];
        for (text, want, unit) in cases {
            let p = parse_value_with_unit(text).unwrap();
            assert_eq!((p.value, p.unit), (want, unit), "{text}");
        }
    }

    #[test]
    fn malformed_text_is_rejected_naming_text() {
        for bad in [
            "",
            "k",
            "4k7k",
            "4.7.1",
            "4,7",
            "1 x",
            "1  k",
            "e3",
            "4k7 furlongs",
            "--1",
            "1e",
            "R",
            "4 k 7",
        ] {
            let e = parse_value(bad).unwrap_err();
            assert_eq!(e.param(), "text", "{bad:?}");
        }
        assert_eq!(parse_value("1e400").unwrap_err().code(), "overflow");
        // Subnormal magnitudes end (they hung: 10^e3 underflowed to 0).
        assert_eq!(format_si(5e-324, 3).unwrap(), "4.94e-324");
        // Engineering form: the exponent a multiple of 3, 1e-310 = 100·10⁻³¹².
        assert_eq!(format_si(-1e-310, 2).unwrap(), "-100e-312");
    }

    #[test]
    fn si_printing() {
        assert_eq!(format_si(4700.0, 2).unwrap(), "4.7 k");
        assert_eq!(format_si(999.96, 4).unwrap(), "1.000 k");
        assert_eq!(format_si(1e-7, 3).unwrap(), "100 n");
        assert_eq!(format_si(12.0, 3).unwrap(), "12.0");
        assert_eq!(format_si(2.5e18, 2).unwrap(), "2.5e18");
        assert_eq!(format_si(1.0, 0).unwrap_err().param(), "digits");
    }

    #[test]
    fn letter_code_printing_round_trips() {
        let cases = [
            (4700.0, 2, "4k7"),
            (2.2, 2, "2R2"),
            (0.47, 2, "R47"),
            (0.047, 2, "R047"),
            (1.5e6, 2, "1M5"),
            (1000.0, 2, "1k0"),
            (470.0, 2, "470R"),
            (10.0, 2, "10R"),
            (100e3, 3, "100k"),
            (12.1e3, 3, "12k1"),
            (1.0, 3, "1R00"),
            (0.9999, 2, "1R0"),
            (2.2e12, 2, "2T2"),
        ];
        for (v, d, want) in cases {
            let code = letter_code(v, d).unwrap();
            assert_eq!(code, want, "{v}");
            let back = parse_value(&code).unwrap();
            assert!((back - v).abs() <= 0.01 * v, "{code}");
        }
        assert_eq!(letter_code(1e-4, 2).unwrap_err().code(), "out_of_domain");
    }
}
