//! The one reader of typed values; the syntax is in the module doc of
//! [`crate::notation`].
//!
//! Every slice below is taken at an offset this scan produced by stepping over
//! ASCII bytes or whole characters, so it lies on a character boundary and
//! cannot panic (the property tests and the worksheet's fuzz target agree).

use super::unit::{Unit, SPELLINGS};
use crate::error::{Error, Result};
use alloc::vec::Vec;

/// What a context allows besides a plain number with prefix, letter code and unit.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct ReadOptions {
    /// Whether `dB` may follow the number (a level, as the worksheet's dB parameters
    /// take). Where a linear value is expected, `3 dB` is an error, not 3.
    pub decibels: bool,
    /// Whether a trailing `%` (÷ 100) may end the text.
    pub percent: bool,
    /// The unit the value is declared in: a value written in another unit is an
    /// error; a plain number is taken to be in it.
    pub unit: Option<Unit>,
}

impl ReadOptions {
    /// A component value (circuit documents, `parseValue`): no dB, no `%`, any unit.
    pub const VALUE: ReadOptions = ReadOptions {
        decibels: false,
        percent: false,
        unit: None,
    };
    /// A worksheet cell: dB and `%` allowed.
    pub const CELL: ReadOptions = ReadOptions {
        decibels: true,
        percent: true,
        unit: None,
    };
    /// Inside a worksheet formula: dB allowed; `%` is the formula's postfix operator.
    pub const FORMULA: ReadOptions = ReadOptions {
        decibels: true,
        percent: false,
        unit: None,
    };
}

/// A value as read: the number in base units and what it was written with.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Reading {
    /// The value in base units, prefix and `%` applied (4k7 → 4700, 50 % → 0.5).
    pub value: f64,
    /// The unit word written (or implied by the letter code `F`), if any.
    pub unit: Option<Unit>,
    /// Whether the text ended with `%`.
    pub percent: bool,
}

/// The longest accepted run of digits before or after the decimal point.
pub const MAX_DIGITS: usize = 400;
/// The most items [`read_list`] reads.
pub const MAX_LIST_ITEMS: usize = 10_000;

const R_DIGIT: &str =
    "expected a number such as 4700, 4.7k, 4k7, R47, 1e-9 or 100 nF (write 'text for text in a cell)";
const R_EXPONENT: &str = "an exponent needs digits after the e, as in 1e-9";
const R_SUFFIX: &str =
    "not a prefix or unit; prefixes: f p n u µ m k K M G T; units: Ω ohm ohms V A W S Hz F H s dB";
const R_MEG: &str = "Meg is not read: write M for mega (1M is 10⁶; m is milli)";
const R_TWO_MULTIPLIERS: &str =
    "the letter code already holds the multiplier: only a unit may follow (4k7 Ω)";
const R_CODE_POINT: &str =
    "a letter code has no decimal point or exponent: write 4k7 or 4.7k, not both";
const R_DB_PREFIX: &str = "dB takes no prefix";
const R_DB_HERE: &str = "dB is not accepted here: give the ratio itself, not its level";
const R_PERCENT_HERE: &str = "% is not accepted here";
const R_PERCENT_UNIT: &str = "% takes no prefix, letter code or unit";
const R_R_UNIT: &str = "R marks ohms: only Ω, ohm or ohms may follow";
const R_F_UNIT: &str = "the letter code F marks farads: nothing may follow";
const R_SPACES: &str = "one space at most between the number and its prefix or unit";
const R_SPACED_UNIT: &str = "the prefix is written on the unit, without a space: 4.7 kΩ";
const R_SECOND_POINT: &str = "a number has one decimal point at most";
const R_TRAILING: &str = "unexpected text after the value";
const R_COMMA: &str =
    "a comma is neither a decimal point nor a digit separator here: write 4.7 or 4700";
const R_TOO_MANY_DIGITS: &str = "too many digits (at most 400 before or after the point)";
const R_UNDERFLOW: &str = "the value is nonzero but below the smallest double (about 5e-324)";
const R_LIST_EMPTY: &str = "an empty list item: write a value between the separators";
const R_LIST_SEP: &str = "separate list items with , or ;";

/// Multiplier letters and their powers of ten (SI Brochure, 9th ed., table 7;
/// `u` for µ and `K` for k are common practice, no source). Both the micro sign
/// U+00B5 and the Greek mu U+03BC are read.
const PREFIXES: [(char, i32); 12] = [
    ('f', -15),
    ('p', -12),
    ('n', -9),
    ('u', -6),
    ('\u{b5}', -6),
    ('\u{3bc}', -6),
    ('m', -3),
    ('k', 3),
    ('K', 3),
    ('M', 6),
    ('G', 9),
    ('T', 12),
];

/// Letters that may open a whole text as a letter code (`R47`, `p68`, `µ22`).
const LEADING_CODE_LETTERS: [char; 6] = ['R', 'p', 'n', 'u', '\u{b5}', '\u{3bc}'];

#[derive(Clone, Copy, PartialEq, Eq)]
enum Mode {
    /// The whole text is one value (blanks around it already removed).
    Whole,
    /// A value at the start of a formula's remaining text; it ends where the
    /// literal ends.
    Embedded,
}

fn prefix_power(c: char) -> Option<i32> {
    PREFIXES.iter().find(|(l, _)| *l == c).map(|&(_, p)| p)
}

fn is_word_char(c: char) -> bool {
    c.is_alphanumeric() || c == '_' || c == '.'
}

fn is_space(c: char, mode: Mode) -> bool {
    // The SI Brochure sets a (thin) space between number and unit; a no-break or
    // narrow no-break space pasted from a document is the same space.
    c == ' ' || (mode == Mode::Whole && matches!(c, '\u{a0}' | '\u{202f}' | '\u{2009}'))
}

/// The unit word at the start of `s`, ending at a word boundary.
fn unit_at(s: &str) -> Option<(usize, Unit)> {
    SPELLINGS
        .iter()
        .find(|(w, _)| s.starts_with(w) && !s[w.len()..].starts_with(is_word_char))
        .map(|&(w, u)| (w.len(), u))
}

struct Cursor<'a> {
    s: &'a str,
    i: usize,
    col0: u32,
}

impl<'a> Cursor<'a> {
    fn rest(&self) -> &'a str {
        &self.s[self.i..]
    }
    fn peek(&self) -> Option<char> {
        self.rest().chars().next()
    }
    fn peek2(&self) -> Option<char> {
        let mut it = self.rest().chars();
        it.next();
        it.next()
    }
    fn bump(&mut self) {
        if let Some(c) = self.peek() {
            self.i += c.len_utf8();
        }
    }
    fn digits(&mut self) -> Result<&'a str> {
        let start = self.i;
        let n = self.rest().bytes().take_while(u8::is_ascii_digit).count();
        if n > MAX_DIGITS {
            return Err(self.error_at(start, R_TOO_MANY_DIGITS));
        }
        self.i += n;
        Ok(&self.s[start..self.i])
    }
    fn column(&self, at: usize) -> u32 {
        let n = self.s[..at].chars().count();
        self.col0
            .saturating_add(u32::try_from(n).unwrap_or(u32::MAX))
    }
    fn error_at(&self, at: usize, reason: &'static str) -> Error {
        Error::Syntax {
            param: "text",
            column: self.column(at),
            reason,
        }
    }
}

/// Digits and power of ten of the number being read, and what followed it.
struct Parts<'a> {
    negative: bool,
    int: &'a str,
    frac: &'a str,
    exp: i64,
    unit: Option<Unit>,
    unit_at: usize,
    suffixed: bool,
    percent: bool,
}

/// Read a whole text as one value; blanks around it are ignored.
///
/// # Errors
/// [`Error::Syntax`] on `text` with the 1-based column where the text stops
/// reading as a value (see [`crate::notation`] for the syntax and the rules);
/// [`Error::Overflow`] on `text` when the value exceeds the double range.
///
/// # Example
/// ```
/// use loopwright::notation::{read, ReadOptions, Unit};
/// let r = read("4.7 kΩ", &ReadOptions::VALUE).unwrap();
/// assert_eq!((r.value, r.unit), (4700.0, Some(Unit::Ohm)));
/// assert_eq!(read("4k7k", &ReadOptions::VALUE).unwrap_err().column(), Some(4));
/// ```
pub fn read(text: &str, options: &ReadOptions) -> Result<Reading> {
    let trimmed = text.trim_start();
    let col0 = 1 + count_chars(&text[..text.len() - trimmed.len()]);
    read_at(trimmed.trim_end(), col0, options)
}

fn count_chars(s: &str) -> u32 {
    u32::try_from(s.chars().count()).unwrap_or(u32::MAX)
}

fn read_at(s: &str, col0: u32, options: &ReadOptions) -> Result<Reading> {
    let mut c = Cursor { s, i: 0, col0 };
    let parts = number(&mut c, options, Mode::Whole)?;
    if c.i < s.len() {
        let rest = c.rest().trim_start();
        let at = s.len() - rest.len();
        let reason = if rest.starts_with(',') {
            R_COMMA
        } else if unit_at(rest).is_some() && parts.suffixed {
            R_SPACED_UNIT
        } else {
            R_TRAILING
        };
        return Err(c.error_at(at, reason));
    }
    finish(&c, &parts, options)
}

/// Read the value at the start of a formula's remaining text `s`, which begins
/// with a digit or `.`; returns it and the bytes it takes. The literal ends where
/// an operator, a parenthesis, a separator or a blank not followed by a unit
/// begins; `%` is left to the formula.
///
/// # Errors
/// As [`read`], with the column counted from the start of `s`.
///
/// # Example
/// ```
/// use loopwright::notation::{scan, ReadOptions, Unit};
/// let (r, used) = scan("10 kHz*2", &ReadOptions::FORMULA).unwrap();
/// assert_eq!((r.value, r.unit, used), (1e4, Some(Unit::Hertz), 6));
/// assert_eq!(scan("1Meg", &ReadOptions::FORMULA).unwrap_err().column(), Some(2));
/// ```
pub fn scan(s: &str, options: &ReadOptions) -> Result<(Reading, usize)> {
    let mut c = Cursor { s, i: 0, col0: 1 };
    let options = ReadOptions {
        percent: false,
        ..*options
    };
    let parts = number(&mut c, &options, Mode::Embedded)?;
    if c.peek().is_some_and(is_word_char) {
        return Err(c.error_at(c.i, R_SUFFIX));
    }
    Ok((finish(&c, &parts, &options)?, c.i))
}

/// Read a list of values separated by `,` or `;` (blanks around each allowed);
/// blank text is an empty list. Each item is read as by [`read`].
///
/// # Errors
/// As [`read`], with the column counted in the whole text; an empty item is an
/// [`Error::Syntax`] at its place; more than [`MAX_LIST_ITEMS`] items is
/// [`Error::TooLarge`].
///
/// # Example
/// ```
/// use loopwright::notation::{read_list, ReadOptions};
/// let v = read_list("12 Hz, 4 MHz", &ReadOptions::VALUE).unwrap();
/// assert_eq!(v.iter().map(|r| r.value).collect::<Vec<_>>(), [12.0, 4e6]);
/// assert_eq!(read_list("1, , 2", &ReadOptions::VALUE).unwrap_err().column(), Some(4));
/// ```
pub fn read_list(text: &str, options: &ReadOptions) -> Result<Vec<Reading>> {
    let mut out = Vec::new();
    if text.trim().is_empty() {
        return Ok(out);
    }
    let mut col = 1u32;
    for item in text.split([',', ';']) {
        if out.len() == MAX_LIST_ITEMS {
            return Err(Error::TooLarge {
                param: "text",
                limit: MAX_LIST_ITEMS as u64,
            });
        }
        let trimmed = item.trim_start();
        let item_col = col + count_chars(&item[..item.len() - trimmed.len()]);
        if trimmed.trim_end().is_empty() {
            return Err(Error::Syntax {
                param: "text",
                column: item_col,
                reason: R_LIST_EMPTY,
            });
        }
        match read_at(trimmed.trim_end(), item_col, options) {
            Ok(r) => out.push(r),
            Err(Error::Syntax { column, reason, .. })
                if reason == R_TRAILING && starts_number(text, column) =>
            {
                return Err(Error::Syntax {
                    param: "text",
                    column,
                    reason: R_LIST_SEP,
                })
            }
            Err(e) => return Err(e),
        }
        col = item_col + count_chars(trimmed) + 1;
    }
    Ok(out)
}

/// Whether the character at 1-based `column` of `text` could begin a number.
fn starts_number(text: &str, column: u32) -> bool {
    text.chars()
        .nth(column.saturating_sub(1) as usize)
        .is_some_and(|c| c.is_ascii_digit() || matches!(c, '.' | '-' | '+' | '\u{2212}'))
}

/// Sign, digits, letter code or exponent, then the prefix, unit and `%`.
fn number<'a>(c: &mut Cursor<'a>, options: &ReadOptions, mode: Mode) -> Result<Parts<'a>> {
    let negative = mode == Mode::Whole && sign(c);
    let mut parts = Parts {
        negative,
        int: "",
        frac: "",
        exp: 0,
        unit: None,
        unit_at: 0,
        suffixed: false,
        percent: false,
    };
    // A whole text may open with the letter of a code below one: R47, p68, µ22.
    if let (Mode::Whole, Some(l), Some(d)) = (mode, c.peek(), c.peek2()) {
        if LEADING_CODE_LETTERS.contains(&l) && d.is_ascii_digit() {
            parts.unit_at = c.i;
            c.bump();
            parts.frac = c.digits()?;
            return code(c, l, parts, options, mode);
        }
    }
    parts.int = c.digits()?;
    let point = c.peek() == Some('.');
    if point {
        c.bump();
        parts.frac = c.digits()?;
    }
    if parts.int.is_empty() && parts.frac.is_empty() {
        return Err(c.error_at(c.i, R_DIGIT));
    }
    if let (false, Some(l), Some(d)) = (point, c.peek(), c.peek2()) {
        let is_code_letter = l == 'R' || l == 'F' || prefix_power(l).is_some();
        if is_code_letter && d.is_ascii_digit() {
            // IEC 60062: the letter stands where the decimal point would be.
            parts.unit_at = c.i;
            c.bump();
            parts.frac = c.digits()?;
            return code(c, l, parts, options, mode);
        }
    }
    if matches!(c.peek(), Some('e' | 'E')) {
        parts.exp = exponent(c)?;
    }
    suffix(c, &mut parts, options, mode)?;
    Ok(parts)
}

fn sign(c: &mut Cursor<'_>) -> bool {
    match c.peek() {
        Some('-' | '\u{2212}') => {
            c.bump();
            true
        }
        Some('+') => {
            c.bump();
            false
        }
        _ => false,
    }
}

/// `e`, an optional sign and at least one digit; the power saturates far beyond
/// the double range so that `1e99999` is an overflow, not a wrapped exponent.
fn exponent(c: &mut Cursor<'_>) -> Result<i64> {
    let at = c.i;
    c.bump();
    let negative = match c.peek() {
        Some('-') => {
            c.bump();
            true
        }
        Some('+') => {
            c.bump();
            false
        }
        _ => false,
    };
    let digits = c.digits()?;
    if digits.is_empty() {
        return Err(c.error_at(at, R_EXPONENT));
    }
    let magnitude = digits
        .bytes()
        .fold(0i64, |e, b| (e * 10 + i64::from(b - b'0')).min(1_000_000));
    Ok(if negative { -magnitude } else { magnitude })
}

/// After an IEC 60062 code letter and its digits: only a unit may follow.
fn code<'a>(
    c: &mut Cursor<'a>,
    letter: char,
    mut parts: Parts<'a>,
    options: &ReadOptions,
    mode: Mode,
) -> Result<Parts<'a>> {
    parts.exp = i64::from(prefix_power(letter).unwrap_or(0));
    parts.suffixed = true;
    if matches!(c.peek(), Some('.'))
        || (matches!(c.peek(), Some('e' | 'E'))
            && c.peek2()
                .is_some_and(|d| d.is_ascii_digit() || d == '-' || d == '+'))
    {
        return Err(c.error_at(c.i, R_CODE_POINT));
    }
    if letter == 'F' {
        // parts.unit_at holds the letter's place.
        parts.unit = Some(Unit::Farad);
        if c.peek().is_some_and(|ch| is_word_char(ch) || ch == '%') {
            return Err(c.error_at(c.i, R_F_UNIT));
        }
        return Ok(parts);
    }
    unit_after_code(c, letter, &mut parts, options, mode)?;
    Ok(parts)
}

/// A unit word after a letter code or a trailing `R`, attached or after one space.
fn unit_after_code(
    c: &mut Cursor<'_>,
    letter: char,
    parts: &mut Parts<'_>,
    options: &ReadOptions,
    mode: Mode,
) -> Result<()> {
    let before_space = c.i;
    let spaced = c.peek().is_some_and(|ch| is_space(ch, mode));
    if spaced {
        c.bump();
    }
    let rest = c.rest();
    if let Some((len, unit)) = unit_at(rest) {
        if letter == 'R' && unit != Unit::Ohm {
            return Err(c.error_at(c.i, R_R_UNIT));
        }
        if unit == Unit::Decibel {
            return Err(c.error_at(c.i, R_DB_PREFIX));
        }
        parts.unit = Some(unit);
        parts.unit_at = c.i;
        c.i += len;
        return check_declared(c, parts, options);
    }
    if spaced && mode == Mode::Embedded {
        c.i = before_space;
        return Ok(());
    }
    match c.peek() {
        Some('%') => Err(c.error_at(c.i, R_PERCENT_UNIT)),
        Some(ch) if prefix_power(ch).is_some() || ch == 'R' => {
            Err(c.error_at(c.i, R_TWO_MULTIPLIERS))
        }
        Some(ch) if is_word_char(ch) => Err(c.error_at(c.i, R_SUFFIX)),
        _ => {
            c.i = before_space;
            Ok(())
        }
    }
}

/// The prefix, unit word or `%` after a plain number.
fn suffix(
    c: &mut Cursor<'_>,
    parts: &mut Parts<'_>,
    options: &ReadOptions,
    mode: Mode,
) -> Result<()> {
    let before_space = c.i;
    let spaced = c.peek().is_some_and(|ch| is_space(ch, mode));
    if spaced {
        c.bump();
        if c.peek().is_some_and(|ch| ch.is_whitespace()) {
            if mode == Mode::Embedded {
                c.i = before_space;
                return Ok(());
            }
            return Err(c.error_at(c.i, R_SPACES));
        }
    }
    let rest = c.rest();
    // The ohm marker R after the digits: 10R, 470R (IEC 60062).
    if !spaced && rest.starts_with('R') && !rest[1..].starts_with(|ch: char| ch.is_ascii_digit()) {
        c.bump();
        parts.suffixed = true;
        return unit_after_code(c, 'R', parts, options, mode);
    }
    if let Some((len, unit)) = unit_at(rest) {
        if unit == Unit::Decibel && !options.decibels {
            return Err(c.error_at(c.i, R_DB_HERE));
        }
        parts.unit = Some(unit);
        parts.unit_at = c.i;
        parts.suffixed = true;
        c.i += len;
        check_declared(c, parts, options)?;
        return percent(c, parts, options, mode);
    }
    if let Some(letter) = c.peek().filter(|&l| prefix_power(l).is_some()) {
        let after = &rest[letter.len_utf8()..];
        if let Some((len, unit)) = unit_at(after) {
            if unit == Unit::Decibel {
                return Err(c.error_at(c.i + letter.len_utf8(), R_DB_PREFIX));
            }
            parts.exp += i64::from(prefix_power(letter).unwrap_or(0));
            parts.unit = Some(unit);
            parts.unit_at = c.i + letter.len_utf8();
            parts.suffixed = true;
            c.i += letter.len_utf8() + len;
            check_declared(c, parts, options)?;
            return percent(c, parts, options, mode);
        }
        if !after.starts_with(is_word_char) {
            parts.exp += i64::from(prefix_power(letter).unwrap_or(0));
            parts.suffixed = true;
            c.bump();
            return percent(c, parts, options, mode);
        }
        if spaced && mode == Mode::Embedded {
            c.i = before_space;
            return Ok(());
        }
        let reason = if letter == 'M' && after.starts_with("eg") {
            R_MEG
        } else if after.starts_with(|ch: char| ch.is_ascii_digit()) {
            R_CODE_POINT
        } else {
            R_SUFFIX
        };
        return Err(c.error_at(c.i, reason));
    }
    if spaced && mode == Mode::Embedded {
        c.i = before_space;
        return Ok(());
    }
    if let Some(ch) = c.peek().filter(|&ch| is_word_char(ch)) {
        let reason = if ch.is_ascii_digit() {
            R_TRAILING
        } else if ch == '.' {
            R_SECOND_POINT
        } else {
            R_SUFFIX
        };
        return Err(c.error_at(c.i, reason));
    }
    if !spaced || c.peek() == Some('%') {
        return percent(c, parts, options, mode);
    }
    c.i = before_space;
    Ok(())
}

/// A `%` after the number, attached or after one space (SI Brochure, 9th ed.,
/// §5.4.7: a space separates the number and `%`), in a whole text only.
fn percent(
    c: &mut Cursor<'_>,
    parts: &mut Parts<'_>,
    options: &ReadOptions,
    mode: Mode,
) -> Result<()> {
    if mode == Mode::Embedded {
        return Ok(());
    }
    let before = c.i;
    if c.peek().is_some_and(|ch| is_space(ch, mode)) {
        c.bump();
    }
    if c.peek() != Some('%') {
        c.i = before;
        return Ok(());
    }
    if parts.suffixed {
        return Err(c.error_at(c.i, R_PERCENT_UNIT));
    }
    if !options.percent {
        return Err(c.error_at(c.i, R_PERCENT_HERE));
    }
    parts.percent = true;
    c.bump();
    Ok(())
}

fn check_declared(c: &Cursor<'_>, parts: &Parts<'_>, options: &ReadOptions) -> Result<()> {
    match (options.unit, parts.unit) {
        (Some(declared), Some(given)) if declared != given => {
            Err(c.error_at(parts.unit_at, declared.requirement()))
        }
        _ => Ok(()),
    }
}

/// The value from its decimal digits and power of ten, through one decimal-to-binary
/// conversion, so `4k7` is exactly the double nearest 4700 (not 4.7 × 1000).
fn finish(c: &Cursor<'_>, parts: &Parts<'_>, options: &ReadOptions) -> Result<Reading> {
    check_declared(c, parts, options)?;
    let mut digits = Vec::with_capacity(parts.int.len() + parts.frac.len());
    digits.extend_from_slice(parts.int.as_bytes());
    digits.extend_from_slice(parts.frac.as_bytes());
    let exp = parts
        .exp
        .saturating_sub(parts.frac.len() as i64)
        .saturating_sub(if parts.percent { 2 } else { 0 });
    let value = super::decimal::to_f64(parts.negative, &digits, exp)
        .ok_or_else(|| c.error_at(0, R_DIGIT))?;
    if !value.is_finite() {
        return Err(Error::Overflow { param: "text" });
    }
    let nonzero = parts
        .int
        .bytes()
        .chain(parts.frac.bytes())
        .any(|b| b != b'0');
    if value == 0.0 && nonzero {
        return Err(c.error_at(0, R_UNDERFLOW));
    }
    Ok(Reading {
        value,
        unit: parts.unit,
        percent: parts.percent,
    })
}
