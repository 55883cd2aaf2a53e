//! The one display of numbers: significant digits, SI prefix, the unit after a
//! space; and the IEC 60062 letter code of a resistance.
//!
//! Rules (SI Brochure, BIPM, 9th ed., 2019, §5.4.3 and §5.4.7, and table 7):
//! a space separates the number from its unit (`4.7 kΩ`, `50.76 kHz`, `12 %`);
//! the prefix is written on the unit without a space; the degree sign of a plane
//! angle follows the number without a space (`45°`). Percentages, ppm, dB and
//! degrees take no prefix. Values beyond the prefixes f … T are written in
//! exponent form (`2.5e18 Ω`). Rounding to significant digits is that of the
//! exact binary value, ties to even (as Python's `format(x, '.2e')`).

use crate::error::{Error, Result};
use alloc::format;
use alloc::string::String;
use core::fmt::Write;

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

/// The longest unit text [`format_value`] takes, in bytes.
pub const MAX_UNIT_LEN: usize = 32;

/// The significant digits of |x| > 0 rounded to `digits` of them, and the decimal
/// exponent of the first: 4.70e3 → ("470", 3). Exact for every finite double,
/// subnormals included (the standard library's exact decimal conversion).
fn decimal_digits(x: f64, digits: usize) -> (String, i32) {
    let text = format!("{:.*e}", digits.saturating_sub(1), libm::fabs(x));
    let (mantissa, exp) = text.split_once('e').unwrap_or((&text, "0"));
    let ds = mantissa.chars().filter(char::is_ascii_digit).collect();
    (ds, exp.parse().unwrap_or(0))
}

/// Split |x| > 0 into (mantissa text rounded to `digits` significant digits, in
/// [1, 1000), trailing zeros kept to show the significance; exponent as a
/// multiple of 3). 999.95e3 at 3 digits → ("1.00", 6).
fn engineering(x: f64, digits: usize) -> (String, i32) {
    let (ds, e) = decimal_digits(x, digits);
    let e3 = e.div_euclid(3) * 3;
    let int_len = (e - e3 + 1) as usize;
    (place_point(&ds, int_len), e3)
}

/// The digits `ds` with the decimal point after `int_len` of them (zeros padded
/// when there are fewer digits).
fn place_point(ds: &str, int_len: usize) -> String {
    let mut s = String::with_capacity(ds.len() + int_len + 2);
    if ds.len() <= int_len {
        s.push_str(ds);
        for _ in ds.len()..int_len {
            s.push('0');
        }
    } else {
        s.push_str(&ds[..int_len]);
        s.push('.');
        s.push_str(&ds[int_len..]);
    }
    s
}

/// Positional decimal text of |x| > 0 with `digits` significant digits (zeros
/// kept), or `None` when its exponent is outside −6 … 14.
fn positional(x: f64, digits: usize) -> Option<String> {
    let (ds, e) = decimal_digits(x, digits);
    if e >= 0 {
        return (e < 15).then(|| place_point(&ds, e as usize + 1));
    }
    if e < -6 {
        return None;
    }
    let mut s = String::from("0.");
    for _ in 0..(-e - 1) {
        s.push('0');
    }
    s.push_str(&ds);
    Some(s)
}

fn trim_zeros(mut s: String) -> String {
    if s.contains('.') {
        while s.ends_with('0') {
            s.pop();
        }
        if s.ends_with('.') {
            s.pop();
        }
    }
    s
}

const fn prefix_symbol(e3: i32) -> Option<&'static str> {
    Some(match e3 {
        -15 => "f",
        -12 => "p",
        -9 => "n",
        -6 => "µ",
        -3 => "m",
        0 => "",
        3 => "k",
        6 => "M",
        9 => "G",
        12 => "T",
        _ => return None,
    })
}

/// Print a value with an SI prefix and `digits` significant digits: 4700 →
/// `"4.7 k"`, 1e-7 → `"100 n"`, 0 → `"0"`. Append the unit yourself. Values
/// beyond the prefixes f … T print in exponent form (`"2.5e18"`). Trailing zeros
/// are kept to show the significance; [`format_value`] is the display form.
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
    let (m, e3) = engineering(x, digits);
    Ok(match prefix_symbol(e3) {
        Some("") => format!("{sign}{m}"),
        Some(p) => format!("{sign}{m} {p}"),
        None => format!("{sign}{m}e{e3}"),
    })
}

/// Whether a unit is shown without an SI prefix: `%`, `‰`, `ppm`, degrees and
/// levels in dB (`dB`, `dBV`, …).
pub fn unit_takes_no_prefix(unit: &str) -> bool {
    matches!(unit, "%" | "‰" | "ppm" | "°" | "deg" | "degrees") || unit.starts_with("dB")
}

fn check_unit(unit: &str) -> Result<&str> {
    if unit.len() > MAX_UNIT_LEN || unit.chars().any(char::is_control) {
        return Err(Error::OutOfDomain {
            param: "unit",
            requirement: "must be a unit symbol of at most 32 bytes without control characters",
        });
    }
    Ok(unit.trim())
}

/// Append the unit: after a space, except the degree sign; `""` and `"1"` add nothing.
fn push_unit(out: &mut String, prefix: &str, unit: &str) {
    let unit = if unit == "1" { "" } else { unit };
    if prefix.is_empty() && unit.is_empty() {
        return;
    }
    if unit != "°" {
        out.push(' ');
    }
    out.push_str(prefix);
    out.push_str(unit);
}

/// The display of a value: `digits` significant digits with trailing zeros
/// dropped, an SI prefix on the unit, the unit after a space (`4.7 kΩ`,
/// `50.76 kHz`, `2.2 µs`, `80 k` without a unit); no prefix on `%`, `ppm`, dB or
/// degrees (`0.0001 %`, `-3.01 dB`, `45°`); exponent form beyond the prefixes
/// f … T (`2.5e18 Ω`) and, for the unprefixed units, beyond 10⁻⁶ … 10¹⁵.
///
/// # Errors
/// `value` not finite; `digits` outside 1 … 15; `unit` longer than
/// [`MAX_UNIT_LEN`] bytes or holding control characters.
///
/// # Example
/// ```
/// use loopwright::notation::format_value;
/// assert_eq!(format_value(4700.0, "Ω", 4).unwrap(), "4.7 kΩ");
/// assert_eq!(format_value(50_760.0, "Hz", 4).unwrap(), "50.76 kHz");
/// assert_eq!(format_value(1e-6, "%", 3).unwrap(), "0.000001 %");
/// assert_eq!(format_value(f64::INFINITY, "V", 3).unwrap_err().param(), "value");
/// ```
pub fn format_value(value: f64, unit: &str, digits: u32) -> Result<String> {
    let x = crate::check::finite("value", value)?;
    let digits = check_digits(digits)?;
    let unit = check_unit(unit)?;
    let mut out = String::with_capacity(16 + unit.len());
    if x == 0.0 {
        out.push('0');
        push_unit(&mut out, "", unit);
        return Ok(out);
    }
    if x < 0.0 {
        out.push('-');
    }
    if unit_takes_no_prefix(unit) {
        return format_plain(value, unit, digits as u32);
    }
    let (m, e3) = engineering(x, digits);
    match prefix_symbol(e3) {
        Some(p) => {
            out.push_str(&trim_zeros(m));
            push_unit(&mut out, p, unit);
        }
        None => {
            push_exponent_form(&mut out, x, digits);
            push_unit(&mut out, "", unit);
        }
    }
    Ok(out)
}

/// The display without an SI prefix, for a value already in the unit shown (a
/// ratio, or a unit that carries its own prefix, such as `nV/√Hz`): `digits`
/// significant digits, trailing zeros dropped, positional from 10⁻⁶ up to 10¹⁵ and
/// exponent form outside, the unit after a space.
///
/// # Errors
/// As [`format_value`].
///
/// # Example
/// ```
/// use loopwright::notation::format_plain;
/// assert_eq!(format_plain(99.900_099_9, "", 4).unwrap(), "99.9");
/// assert_eq!(format_plain(4.12, "nV/√Hz", 3).unwrap(), "4.12 nV/√Hz");
/// assert_eq!(format_plain(2e-9, "", 2).unwrap(), "2e-9");
/// ```
pub fn format_plain(value: f64, unit: &str, digits: u32) -> Result<String> {
    let x = crate::check::finite("value", value)?;
    let digits = check_digits(digits)?;
    let unit = check_unit(unit)?;
    let mut out = String::with_capacity(16 + unit.len());
    push_unprefixed(&mut out, x, digits);
    push_unit(&mut out, "", unit);
    Ok(out)
}

fn push_unprefixed(out: &mut String, x: f64, digits: usize) {
    if x == 0.0 {
        out.push('0');
        return;
    }
    if x < 0.0 {
        out.push('-');
    }
    match positional(x, digits) {
        Some(p) => out.push_str(&trim_zeros(p)),
        None => push_exponent_form(out, x, digits),
    }
}

/// `d.ddde±n` with trailing zeros of the mantissa dropped.
fn push_exponent_form(out: &mut String, x: f64, digits: usize) {
    let (ds, e) = decimal_digits(x, digits);
    out.push_str(&trim_zeros(place_point(&ds, 1)));
    // Writing to a String cannot fail.
    let _ = write!(out, "e{e}");
}

/// Write a finite number in the shortest form that reads back to the same double
/// (full precision, for CSV, clipboard and saved documents): plain digits from
/// 10⁻⁶ up to 10¹⁵, exponent form outside, `0` for ±0.
pub fn write_full(out: &mut String, x: f64) {
    let a = libm::fabs(x);
    // Writing to a String cannot fail.
    let _ = if a == 0.0 {
        out.write_str("0")
    } else if (1e-6..1e15).contains(&a) {
        write!(out, "{x}")
    } else {
        write!(out, "{x:e}")
    };
}

/// The full-precision form of [`write_full`] with the unit after a space (no
/// prefix: the digits are the double's own).
///
/// # Errors
/// `value` not finite; `unit` as for [`format_value`].
///
/// # Example
/// ```
/// use loopwright::notation::format_full;
/// assert_eq!(format_full(4700.000000000001, "Ω").unwrap(), "4700.000000000001 Ω");
/// assert_eq!(format_full(2.5e-9, "").unwrap(), "2.5e-9");
/// assert_eq!(format_full(f64::NAN, "").unwrap_err().param(), "value");
/// ```
pub fn format_full(value: f64, unit: &str) -> Result<String> {
    let x = crate::check::finite("value", value)?;
    let unit = check_unit(unit)?;
    let mut out = String::with_capacity(24 + unit.len());
    write_full(&mut out, x);
    push_unit(&mut out, "", unit);
    Ok(out)
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
    fn si_printing() {
        assert_eq!(format_si(4700.0, 2).unwrap(), "4.7 k");
        assert_eq!(format_si(999.96, 4).unwrap(), "1.000 k");
        assert_eq!(format_si(1e-7, 3).unwrap(), "100 n");
        assert_eq!(format_si(12.0, 3).unwrap(), "12.0");
        assert_eq!(format_si(2.5e18, 2).unwrap(), "2.5e18");
        assert_eq!(format_si(1.0, 0).unwrap_err().param(), "digits");
    }

    #[test]
    fn display_form() {
        // SI Brochure, 9th ed., §5.4.3: a space between number and unit, the
        // prefix attached to the unit; §5.4.7: "12 %" with a space; degrees without.
        assert_eq!(format_value(4700.0, "Ω", 4).unwrap(), "4.7 kΩ");
        assert_eq!(format_value(80_000.0, "", 6).unwrap(), "80 k");
        assert_eq!(format_value(4e6, "Hz", 5).unwrap(), "4 MHz");
        assert_eq!(format_value(12.0, "%", 3).unwrap(), "12 %");
        assert_eq!(format_value(45.25, "°", 3).unwrap(), "45.2°");
        assert_eq!(format_value(-3.0103, "dB", 3).unwrap(), "-3.01 dB");
        assert_eq!(format_value(0.0, "V", 3).unwrap(), "0 V");
        assert_eq!(format_value(-0.0, "", 3).unwrap(), "0");
        assert_eq!(format_value(1e-8, "%", 3).unwrap(), "1e-8 %");
        assert_eq!(format_value(2.5e18, "Ω", 3).unwrap(), "2.5e18 Ω");
        assert_eq!(
            format_value(1.0, "x".repeat(33).as_str(), 3)
                .unwrap_err()
                .param(),
            "unit"
        );
    }

    #[test]
    fn full_precision() {
        assert_eq!(format_full(0.1 + 0.2, "").unwrap(), "0.30000000000000004");
        assert_eq!(format_full(1e15, "V").unwrap(), "1e15 V");
        assert_eq!(format_full(-0.0, "").unwrap(), "0");
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
            let back = super::super::parse_value(&code).unwrap();
            assert!((back - v).abs() <= 0.01 * v, "{code}");
        }
        assert_eq!(letter_code(1e-4, 2).unwrap_err().code(), "out_of_domain");
    }
}
