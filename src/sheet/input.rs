//! Reading what a user types: a cell input into its content, a cell address,
//! and whether a text may name a cell.
//!
//! A cell input is either a formula (text starting with `=`) or a constant:
//! empty text clears the cell; `'` starts literal text; `TRUE`/`FALSE`, an error
//! code, or a number in engineering notation ([`super::literal`]) is taken as
//! such; anything else is text.

use super::address::CellRef;
use super::errors::{CellError, ErrorKind};
use super::lexer::ParseError;
use super::literal::{read_cell, CellReading};
use super::parser::parse;
use super::sheet::{Content, MAX_NAME_CHARS};
use super::value::Value;
use crate::error::{Error, Result};
use alloc::string::String;

/// Read one cell input into its content.
pub(super) fn read_input(input: &str) -> Content {
    if let Some(formula) = input.strip_prefix('=') {
        // Columns count from the `=` the user typed.
        return Content::Formula(parse(formula).map_err(|e| ParseError {
            pos: e.pos + 1,
            ..e
        }));
    }
    if let Some(text) = input.strip_prefix('\'') {
        return Content::Constant(Value::Text(String::from(text)));
    }
    let t = input.trim();
    if t.eq_ignore_ascii_case("TRUE") {
        return Content::Constant(Value::Bool(true));
    }
    if t.eq_ignore_ascii_case("FALSE") {
        return Content::Constant(Value::Bool(false));
    }
    if let Some(k) = ErrorKind::from_code(t) {
        return Content::Constant(Value::Error(CellError::new(k, "")));
    }
    match read_cell(input) {
        CellReading::Number(q) => Content::Constant(Value::Number(q.value, q.unit)),
        CellReading::Error(detail) => Content::Constant(Value::error(ErrorKind::Syntax, detail)),
        CellReading::Text => Content::Constant(Value::Text(String::from(input))),
    }
}

/// Whether `name` may name a cell: a letter or `_` first, then letters, digits,
/// `_` or `.`; at most [`MAX_NAME_CHARS`]; not a cell address, `TRUE`, `FALSE`
/// or a function name.
pub fn valid_name(name: &str) -> bool {
    let mut chars = name.chars();
    let first_ok = chars
        .next()
        .is_some_and(|c| c.is_ascii_alphabetic() || c == '_');
    first_ok
        && name.len() <= MAX_NAME_CHARS
        && chars.all(|c| c.is_ascii_alphanumeric() || c == '_' || c == '.')
        && CellRef::parse(name).is_none()
        && !name.eq_ignore_ascii_case("TRUE")
        && !name.eq_ignore_ascii_case("FALSE")
        && super::functions::lookup(name).is_none()
}

fn bad_cell() -> Error {
    Error::OutOfDomain {
        param: "cell",
        requirement: "must be a cell address from A1 to XFD1048576, such as B3",
    }
}

/// Parse a cell address for the API.
///
/// # Errors
/// [`Error::OutOfDomain`] on `cell` for anything but an address.
pub fn cell_ref(address: &str) -> Result<CellRef> {
    CellRef::parse(address.trim()).ok_or_else(bad_cell)
}
