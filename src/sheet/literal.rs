//! Engineering literals: SI prefixes, IEC 60062 letter codes and unit words.
//!
//! - A decimal number (`4.7`, `.5`, `1e-3`) may be followed by one SI prefix:
//!   `p` 10⁻¹², `n` 10⁻⁹, `u` or `µ` 10⁻⁶, `m` 10⁻³, `k` 10³, `M` 10⁶, `G` 10⁹,
//!   `T` 10¹² (SI Brochure, 9th ed., 2019, Table 7; `u` for `µ` and `K` for `k` are
//!   common practice). `m` is milli and `M` is mega: case matters.
//! - IEC 60062 letter codes write the multiplier letter in place of the decimal
//!   point: `4k7` = 4.7 k, `2R2` = 2.2, `1M5` = 1.5 M, `6n8` = 6.8 n, `470R` = 470;
//!   `R` is the decimal marker with multiplier 1, `F` the same for farads.
//!   A whole cell may start with the letter (`R47` = 0.47, `p68` = 0.68 p); inside a
//!   formula `R47` is the cell R47, so write `0R47` there.
//! - A unit word may follow, directly or after spaces: `Ω` (or `ohm`), `V`, `A`,
//!   `S`, `Hz`, `F`, `H`, `dB`. `dB` takes no prefix. A function parameter that
//!   declares one of these units refuses an argument written with another.
//!
//! The value is formed by decimal string conversion (digits and a combined
//! exponent), so `4k7` is exactly the f64 nearest 4700, not 4.7 × 1000.

// Every slice below is taken at an offset this scan produced by stepping over
// ASCII bytes or whole characters of `s`, so it lies on a character boundary
// within the text and cannot panic (the proptest and the fuzz target agree).

use super::value::Unit;
use alloc::string::String;
use core::fmt::Write;

/// A number and the unit it was written with.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Quantity {
    /// The value in base units (prefix applied).
    pub value: f64,
    /// The unit word, if one was written (or implied by the letter code `F`).
    pub unit: Option<Unit>,
}

/// The longest accepted run of digits before or after the decimal point.
pub const MAX_DIGITS: usize = 400;

/// (letter, power of ten) of each multiplier letter.
const MULTIPLIERS: [(&str, i32); 12] = [
    ("p", -12),
    ("n", -9),
    ("u", -6),
    ("\u{b5}", -6),
    ("\u{3bc}", -6),
    ("m", -3),
    ("k", 3),
    ("K", 3),
    ("M", 6),
    ("G", 9),
    ("T", 12),
    ("R", 0),
];

/// Unit words in the order they are tried (longest first where one is a prefix
/// of another).
const UNIT_WORDS: [(&str, Unit); 10] = [
    ("ohm", Unit::Ohm),
    ("\u{3a9}", Unit::Ohm),
    ("\u{2126}", Unit::Ohm),
    ("Hz", Unit::Hertz),
    ("dB", Unit::Decibel),
    ("V", Unit::Volt),
    ("A", Unit::Ampere),
    ("S", Unit::Siemens),
    ("F", Unit::Farad),
    ("H", Unit::Henry),
];

fn is_word_char(c: char) -> bool {
    c.is_alphanumeric() || c == '_' || c == '.'
}

fn digits(s: &str) -> usize {
    s.bytes().take_while(u8::is_ascii_digit).count()
}

fn multiplier_at(s: &str) -> Option<(&'static str, i32)> {
    MULTIPLIERS.iter().copied().find(|(l, _)| s.starts_with(l))
}

fn unit_at(s: &str) -> Option<(usize, Unit)> {
    UNIT_WORDS
        .iter()
        .find(|(w, _)| s.starts_with(w) && !s[w.len()..].chars().next().is_some_and(is_word_char))
        .map(|&(w, u)| (w.len(), u))
}

/// Read a numeric literal at the start of `s`, which must begin with a digit or
/// `.`. Returns the quantity and the number of bytes it takes.
///
/// # Errors
/// A static message when the literal is malformed: an unknown suffix, a prefix
/// on `dB`, too many digits, or a value outside the f64 range.
pub fn scan(s: &str) -> Result<(Quantity, usize), &'static str> {
    let int_len = digits(s);
    if int_len > MAX_DIGITS {
        return Err("too many digits in a number");
    }
    let int = &s[..int_len];
    let mut i = int_len;
    let mut frac = "";
    let mut had_point = false;
    if s[i..].starts_with('.') {
        had_point = true;
        let n = digits(&s[i + 1..]);
        if n > MAX_DIGITS {
            return Err("too many digits in a number");
        }
        frac = &s[i + 1..i + 1 + n];
        i += 1 + n;
    }
    if int.is_empty() && frac.is_empty() {
        return Err("a number needs at least one digit");
    }
    let mut exp: i32 = 0;
    let mut had_exp = false;
    if let Some(rest) = s[i..].strip_prefix(['e', 'E']) {
        let sign_len = usize::from(rest.starts_with(['+', '-']));
        let n = digits(&rest[sign_len..]);
        if n > 0 {
            if n > 5 {
                return Err("the exponent of a number is too large");
            }
            let mut e: i32 = 0;
            for b in rest[sign_len..sign_len + n].bytes() {
                e = e * 10 + i32::from(b - b'0');
            }
            exp = if rest.starts_with('-') { -e } else { e };
            had_exp = true;
            i += 1 + sign_len + n;
        }
    }
    let mut unit = None;
    let mut prefixed = false;
    // IEC 60062 letter code: the letter stands where the decimal point would.
    let code_letter = multiplier_at(&s[i..])
        .or_else(|| s[i..].starts_with('F').then_some(("F", 0)))
        .filter(|(l, _)| s[i + l.len()..].starts_with(|c: char| c.is_ascii_digit()));
    if let (Some((letter, power)), false, false) = (code_letter, had_point, had_exp) {
        i += letter.len();
        let n = digits(&s[i..]);
        if n > MAX_DIGITS {
            return Err("too many digits in a number");
        }
        frac = &s[i..i + n];
        i += n;
        exp += power;
        prefixed = true;
        if letter == "F" {
            unit = Some(Unit::Farad);
        }
    } else if let Some((letter, power)) = multiplier_at(&s[i..]) {
        // A prefix letter is a prefix unless it is a whole unit word by itself
        // (none of the prefix letters is) or starts a longer unknown word.
        i += letter.len();
        exp += power;
        prefixed = true;
    }
    // Unit word, attached or after blanks.
    let blanks = s[i..].bytes().take_while(|&b| b == b' ').count();
    if unit.is_none() && !prefixed && blanks > 0 {
        // "10 kHz": a prefix directly followed by a unit word, after blanks.
        let rest = &s[i + blanks..];
        if let Some((letter, power)) = multiplier_at(rest).filter(|(l, _)| *l != "R") {
            if let Some((len, u)) = unit_at(&rest[letter.len()..]) {
                if u == Unit::Decibel {
                    return Err("dB takes no SI prefix");
                }
                exp += power;
                unit = Some(u);
                i += blanks + letter.len() + len;
            }
        }
    }
    if unit.is_none() {
        if let Some((len, u)) = unit_at(&s[i + blanks..]) {
            if u == Unit::Decibel && prefixed {
                return Err("dB takes no SI prefix");
            }
            unit = Some(u);
            i += blanks + len;
        }
    }
    if s[i..].chars().next().is_some_and(is_word_char) {
        return Err("unknown unit or suffix after a number (units: Ω ohm V A S Hz F H dB; prefixes: p n u µ m k M G T)");
    }
    let mut text = String::with_capacity(int.len() + frac.len() + 10);
    text.push_str(if int.is_empty() { "0" } else { int });
    text.push('.');
    text.push_str(frac);
    text.push('0');
    // Writing to a String cannot fail.
    let _ = write!(text, "e{exp}");
    match text.parse::<f64>() {
        Ok(v) if v.is_finite() => Ok((Quantity { value: v, unit }, i)),
        _ => Err("the number is outside the floating-point range"),
    }
}

/// Letters that may open a whole-cell letter code (`R47`, `p68`, `n15`, `u22`).
const LEADING_LETTERS: [&str; 6] = ["R", "p", "n", "u", "\u{b5}", "\u{3bc}"];

/// A whole cell input read as a number: optional sign, a literal as for
/// [`scan`] (or a letter code opening with `R`, `p`, `n`, `u`, `µ`), an optional
/// `%`, blanks around. `None` when the text is not entirely such a number.
///
/// ```
/// use loopwright::sheet::literal::parse_cell_number;
/// use loopwright::sheet::Unit;
/// let q = parse_cell_number("4k7Ω").unwrap();
/// assert_eq!((q.value, q.unit), (4700.0, Some(Unit::Ohm)));
/// assert_eq!(parse_cell_number("R47").unwrap().value, 0.47);
/// assert!(parse_cell_number("1Meg").is_none()); // never a guess
/// ```
pub fn parse_cell_number(input: &str) -> Option<Quantity> {
    let s = input.trim();
    let (negative, s) = match s.strip_prefix('-') {
        Some(rest) => (true, rest),
        None => (false, s.strip_prefix('+').unwrap_or(s)),
    };
    let (s, percent) = match s.strip_suffix('%') {
        Some(rest) => (rest.trim_end(), true),
        None => (s, false),
    };
    let mut q = if s.starts_with(|c: char| c.is_ascii_digit() || c == '.') {
        let (q, used) = scan(s).ok()?;
        (used == s.len()).then_some(q)?
    } else {
        let letter = LEADING_LETTERS.iter().find(|l| s.starts_with(**l))?;
        let rest = &s[letter.len()..];
        if !rest.starts_with(|c: char| c.is_ascii_digit()) {
            return None;
        }
        let mut with_zero = String::from("0");
        with_zero.push_str(s);
        let (q, used) = scan(&with_zero).ok()?;
        (used == with_zero.len()).then_some(q)?
    };
    if negative {
        q.value = -q.value;
    }
    if percent {
        q.value /= 100.0;
    }
    Some(q)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn v(s: &str) -> f64 {
        let (q, used) = scan(s).unwrap();
        assert_eq!(used, s.len(), "{s}");
        q.value
    }

    #[test]
    fn plain_and_prefixed() {
        assert_eq!(v("4.7"), 4.7);
        assert_eq!(v(".5"), 0.5);
        assert_eq!(v("1e-3"), 1e-3);
        assert_eq!(v("4.7k"), 4700.0);
        assert_eq!(v("2.2u"), 2.2e-6);
        assert_eq!(v("1E3k"), 1e6);
    }

    #[test]
    fn letter_codes_are_exact() {
        // 4.7 × 1000 in f64 is 4700.000000000001; the code must give exactly 4700.
        assert_eq!(v("4k7"), 4700.0);
        assert_eq!(v("2R2"), 2.2);
        assert_eq!(v("1M5"), 1.5e6);
    }

    #[test]
    fn units_attached_or_spaced() {
        assert_eq!(
            scan("10kΩ").unwrap().0,
            Quantity {
                value: 1e4,
                unit: Some(Unit::Ohm)
            }
        );
        assert_eq!(
            scan("10 kHz").unwrap(),
            (
                Quantity {
                    value: 1e4,
                    unit: Some(Unit::Hertz)
                },
                6
            )
        );
        assert_eq!(scan("10 k").map(|r| r.1), Ok(2));
        assert_eq!(scan("10k Hz").unwrap().0.unit, Some(Unit::Hertz));
        assert_eq!(scan("3dB").unwrap().0.unit, Some(Unit::Decibel));
        assert_eq!(
            scan("3 A1"),
            Ok((
                Quantity {
                    value: 3.0,
                    unit: None
                },
                1
            ))
        );
        assert_eq!(
            scan("6F8").unwrap().0,
            Quantity {
                value: 6.8,
                unit: Some(Unit::Farad)
            }
        );
    }

    #[test]
    fn malformed() {
        for bad in [
            "1Meg", "1kdB", "2A1", "1x", "1e", "1.2.3", "1e999999", "1e400",
        ] {
            assert!(scan(bad).is_err(), "{bad}");
        }
        assert!(scan(".").is_err());
    }

    #[test]
    fn whole_cell_numbers() {
        assert_eq!(parse_cell_number(" R47 ").unwrap().value, 0.47);
        assert_eq!(parse_cell_number("-4k7").unwrap().value, -4700.0);
        assert_eq!(parse_cell_number("50%").unwrap().value, 0.5);
        assert_eq!(parse_cell_number("p68").unwrap().value, 0.68e-12);
        for text in ["", "R", "abc", "k7", "4k7x", "T1", "--1", "1 2"] {
            assert_eq!(parse_cell_number(text), None, "{text}");
        }
    }
}
