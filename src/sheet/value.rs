//! Cell values: a number (with an optional unit), text, a truth value, an error
//! value, nothing, or an array of these that spills into neighbouring cells.

use super::errors::{CellError, ErrorKind};
use alloc::string::String;
use alloc::vec::Vec;
use core::fmt;

/// The unit words a literal may carry (`10kΩ`, `2.2 uF`, `3 dB`): the crate's one
/// list, [`crate::notation::Unit`].
pub use crate::notation::Unit;

/// A rectangular block of scalar values, row by row.
#[derive(Debug, Clone, PartialEq)]
pub struct Array {
    rows: u32,
    cols: u32,
    items: Vec<Value>,
}

impl Array {
    /// An array of `rows × cols` items; `None` when the count does not match or a
    /// dimension is zero. Nested arrays are flattened to their first item.
    pub fn new(rows: u32, cols: u32, items: Vec<Value>) -> Option<Array> {
        if rows == 0 || cols == 0 || u64::from(rows) * u64::from(cols) != items.len() as u64 {
            return None;
        }
        let items = items.into_iter().map(Value::into_scalar).collect();
        Some(Array { rows, cols, items })
    }

    /// One row of values.
    pub fn row(items: Vec<Value>) -> Option<Array> {
        let n = u32::try_from(items.len()).ok()?;
        Array::new(1, n, items)
    }

    /// Rows.
    pub const fn rows(&self) -> u32 {
        self.rows
    }

    /// Columns.
    pub const fn cols(&self) -> u32 {
        self.cols
    }

    /// The item at zero-based `row`, `col`, or [`Value::Empty`] outside.
    pub fn get(&self, row: u32, col: u32) -> Value {
        if row >= self.rows || col >= self.cols {
            return Value::Empty;
        }
        let i = row as usize * self.cols as usize + col as usize;
        self.items.get(i).cloned().unwrap_or(Value::Empty)
    }

    /// The items row by row.
    pub fn items(&self) -> &[Value] {
        &self.items
    }
}

/// What a cell holds after evaluation.
#[derive(Debug, Clone, PartialEq)]
pub enum Value {
    /// An empty cell: 0 in arithmetic, "" in text.
    Empty,
    /// A finite number and the unit it was written with, if any.
    Number(f64, Option<Unit>),
    /// Text.
    Text(String),
    /// TRUE or FALSE.
    Bool(bool),
    /// An error value.
    Error(CellError),
    /// Several values; a cell holding one spills it into its neighbours.
    Array(Array),
}

impl Value {
    /// A plain number; NaN and ±∞ become `#NUM!` so that no cell ever holds them.
    pub fn num(x: f64) -> Value {
        if x.is_finite() {
            Value::Number(x, None)
        } else {
            Value::error(
                ErrorKind::Num,
                "the result overflows the floating-point range",
            )
        }
    }

    /// An error value of `kind` with a detail sentence.
    pub fn error(kind: ErrorKind, detail: impl Into<String>) -> Value {
        Value::Error(CellError::new(kind, detail))
    }

    /// The top-left item of an array, the value itself otherwise.
    pub fn into_scalar(self) -> Value {
        match self {
            Value::Array(a) => a.get(0, 0),
            v => v,
        }
    }

    /// Whether this is an error value.
    pub const fn is_error(&self) -> bool {
        matches!(self, Value::Error(_))
    }

    /// The value as a cell shows it: numbers in shortest round-trip form with the
    /// unit symbol after a space, `TRUE`/`FALSE`, error codes, arrays by their
    /// top-left item.
    pub fn display(&self) -> String {
        let mut s = String::new();
        match self {
            Value::Empty => {}
            Value::Number(x, unit) => {
                write_number(&mut s, *x);
                if let Some(u) = unit {
                    s.push(' ');
                    s.push_str(u.symbol());
                }
            }
            Value::Text(t) => s.push_str(t),
            Value::Bool(b) => s.push_str(if *b { "TRUE" } else { "FALSE" }),
            Value::Error(e) => s.push_str(e.kind.code()),
            Value::Array(a) => return a.get(0, 0).display(),
        }
        s
    }
}

/// Write a finite number in the shortest form that reads back to the same f64:
/// plain digits between 10⁻⁶ and 10¹⁵, exponent form outside (the full-precision
/// form of [`crate::notation::write_full`]).
pub fn write_number(out: &mut String, x: f64) {
    crate::notation::write_full(out, x);
}

/// [`write_number`] into a new string.
pub fn format_number(x: f64) -> String {
    let mut s = String::new();
    write_number(&mut s, x);
    s
}

impl fmt::Display for Value {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.display())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_display_in_shortest_round_trip_form() {
        for x in [
            0.1,
            4700.0,
            -2.5e-9,
            1e300,
            123456789012345.0,
            1e15,
            0.000001,
        ] {
            let s = format_number(x);
            assert_eq!(s.parse::<f64>().unwrap(), x, "{s}");
        }
        assert_eq!(format_number(-0.0), "0");
        assert_eq!(format_number(1e15), "1e15");
        assert_eq!(Value::Number(4700.0, Some(Unit::Ohm)).display(), "4700 Ω");
    }

    #[test]
    fn non_finite_becomes_an_error() {
        assert!(Value::num(f64::INFINITY).is_error());
        assert!(Value::num(f64::NAN).is_error());
        assert_eq!(Value::num(2.0), Value::Number(2.0, None));
    }

    #[test]
    fn arrays_check_their_shape() {
        assert!(Array::new(2, 2, alloc::vec![Value::Empty; 3]).is_none());
        assert!(Array::new(0, 0, alloc::vec![]).is_none());
        let a = Array::new(1, 2, alloc::vec![Value::num(1.0), Value::num(2.0)]).unwrap();
        assert_eq!(a.get(0, 1), Value::num(2.0));
        assert_eq!(a.get(1, 0), Value::Empty);
        assert_eq!(Value::Array(a).display(), "1");
        for u in Unit::ALL {
            assert_eq!(Unit::from_word(u.symbol()), Some(u));
        }
        assert_eq!(Unit::from_word("ohm"), Some(Unit::Ohm));
        assert_eq!(Unit::from_word("Ohm"), None);
    }
}
