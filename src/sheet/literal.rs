//! How the worksheet reads typed values: through the crate's one reader,
//! [`crate::notation`] (SI prefixes, IEC 60062 letter codes, unit words, dB, `%`).
//!
//! - Inside a formula, [`scan`] reads the literal at the lexer's position
//!   ([`ReadOptions::FORMULA`]: dB allowed, `%` left to the postfix operator).
//! - A whole cell input ([`read_cell`], [`ReadOptions::CELL`]) is a number when it
//!   reads exactly as one. Where the line to text lies: an input that begins like a
//!   number (a digit, or `.` or a sign followed by a digit or `.`) must read
//!   exactly, or the cell is a `#SYNTAX!` error naming the column (`4k7k`, `1Meg`,
//!   `2N3904`; write `'2N3904` for text). An input that begins otherwise is a
//!   number only when it reads exactly as a letter code opening with its letter
//!   (`R47`, `p68`), and text in every other case (`gain`, `R2D2`, `-- note`).

use crate::error::Error;
use crate::notation::{self, ReadOptions};
use alloc::format;
use alloc::string::String;

pub use crate::notation::Reading;

/// A number and the unit it was written with (the worksheet's name for a
/// [`Reading`]).
pub type Quantity = Reading;

/// The reason of a reader error, for a formula's syntax message.
fn message(e: &Error) -> &'static str {
    match *e {
        Error::Syntax { reason, .. } => reason,
        Error::Overflow { .. } => "the number is outside the floating-point range",
        _ => "not a number",
    }
}

/// Read a numeric literal at the start of a formula's remaining text `s`, which
/// begins with a digit or `.`. Returns the quantity and the bytes it takes.
///
/// # Errors
/// `(column, message)`: the 1-based column within `s` where the literal stops
/// reading, and why (an unknown suffix, a prefix on `dB`, too many digits, a value
/// outside the double range).
pub fn scan(s: &str) -> Result<(Quantity, usize), (u32, &'static str)> {
    notation::scan(s, &ReadOptions::FORMULA).map_err(|e| (e.column().unwrap_or(1), message(&e)))
}

/// What a whole cell input is, as far as numbers go.
#[derive(Debug, Clone, PartialEq)]
pub enum CellReading {
    /// It reads exactly as a number.
    Number(Quantity),
    /// It begins like a number but does not read as one: the explanation, with
    /// the column counted in the input as typed.
    Error(String),
    /// It is text.
    Text,
}

fn begins_like_a_number(t: &str) -> bool {
    let body = t.strip_prefix(['-', '+', '\u{2212}']).unwrap_or(t);
    let body = body.strip_prefix('.').unwrap_or(body);
    body.starts_with(|c: char| c.is_ascii_digit())
}

/// Read a whole cell input (see the module doc for where numbers end and text
/// begins).
///
/// ```
/// use loopwright::sheet::literal::{read_cell, CellReading};
/// use loopwright::sheet::Unit;
/// let CellReading::Number(q) = read_cell("4k7Ω") else { panic!() };
/// assert_eq!((q.value, q.unit), (4700.0, Some(Unit::Ohm)));
/// assert!(matches!(read_cell("1Meg"), CellReading::Error(_))); // never a guess
/// assert_eq!(read_cell("gain"), CellReading::Text);
/// ```
pub fn read_cell(input: &str) -> CellReading {
    match notation::read(input, &ReadOptions::CELL) {
        Ok(q) => CellReading::Number(q),
        Err(e) if begins_like_a_number(input.trim_start()) => CellReading::Error(match e {
            Error::Syntax { column, reason, .. } => {
                format!("column {column}: {reason}; start with ' to keep it as text")
            }
            e => format!("{}", e),
        }),
        Err(_) => CellReading::Text,
    }
}

/// A whole cell input read as a number, `None` when it is not exactly one.
///
/// ```
/// use loopwright::sheet::literal::parse_cell_number;
/// assert_eq!(parse_cell_number("R47").unwrap().value, 0.47);
/// assert!(parse_cell_number("1Meg").is_none());
/// ```
pub fn parse_cell_number(input: &str) -> Option<Quantity> {
    notation::read(input, &ReadOptions::CELL).ok()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn where_numbers_end_and_text_begins() {
        assert!(matches!(read_cell(" R47 "), CellReading::Number(q) if q.value == 0.47));
        assert!(matches!(read_cell("-4k7"), CellReading::Number(q) if q.value == -4700.0));
        assert!(matches!(read_cell("50%"), CellReading::Number(q) if q.value == 0.5));
        for text in [
            "", "R", "abc", "k7", "T1", "--1", "R2D2", "- note", "gain 2",
        ] {
            assert_eq!(read_cell(text), CellReading::Text, "{text}");
        }
        for bad in ["4k7x", "1 2", "1Meg", "2N3904", ".5.5", "-1x", "+.5q"] {
            assert!(matches!(read_cell(bad), CellReading::Error(_)), "{bad}");
        }
        let CellReading::Error(detail) = read_cell("  4k7k") else {
            panic!()
        };
        assert!(detail.starts_with("column 6:"), "{detail}");
    }

    #[test]
    fn formula_literals_report_their_column() {
        assert_eq!(scan("1Meg").unwrap_err().0, 2);
        assert_eq!(scan("3 A1").unwrap().1, 1);
    }
}
