//! The sheet document (our own versioned JSON), CSV export of values, and TSV
//! import and export of ranges.
//!
//! Document, version 1 (members in this order, two-space indentation, a final
//! newline; cells in row-then-column order, names by upper-case name):
//!
//! ```json
//! {
//!   "format": "loopwright-sheet",
//!   "version": 1,
//!   "cells": {
//!     "A1": "100k",
//!     "B1": "=FEEDBACK.GAIN(gain; 0.01)"
//!   },
//!   "names": {
//!     "gain": "A1"
//!   }
//! }
//! ```
//!
//! Only inputs are stored, never computed values: loading recalculates. The
//! reader refuses, with a message naming the place, anything it could not keep
//! whole: malformed JSON, another `format`, a `version` other than 1 (a newer one
//! is named as such), unknown or duplicate members, bad addresses or names, empty
//! or over-long inputs, more than [`super::sheet::MAX_CELLS`] cells. A refused
//! document leaves the sheet as it was. Writing is canonical, so save → load →
//! save gives the same bytes.
//!
//! CSV (RFC 4180: comma separated, CRLF line ends, fields with `,` `"` or line
//! breaks quoted with `"` doubled) and TSV (tab separated, LF line ends, the same
//! quoting for fields with tabs, quotes or line breaks) carry shown values:
//! numbers in shortest round-trip form without unit, TRUE/FALSE, error codes. Both
//! are read and written by [`crate::csv`], which also neutralises formula injection:
//! text beginning with `=`, `+`, `-`, `@`, a tab or a carriage return gets an
//! apostrophe in front (`'=A1`), unless it is a plain decimal number.

use super::address::{CellRef, Range};
use super::sheet::{valid_name, Sheet, MAX_CELLS, MAX_INPUT_BYTES, MAX_NAMES};
use super::value::Value;
use crate::csv;
use crate::error::{Error, Result};
use crate::json::{self, Json, JsonWriter};
use alloc::collections::BTreeSet;
use alloc::format;
use alloc::string::String;
use alloc::vec::Vec;
use core::fmt;

/// The `format` member of a sheet document.
pub const FORMAT: &str = "loopwright-sheet";
/// The document version this code writes and reads.
pub const VERSION: u32 = 1;
/// Largest document accepted, in bytes.
pub const MAX_DOCUMENT_BYTES: usize = 16 * 1024 * 1024;
/// Most cells one TSV paste may set.
pub const MAX_PASTE_CELLS: usize = 100_000;
/// Longest TSV text one paste may bring, in UTF-8 bytes (the document limit).
pub const MAX_PASTE_BYTES: usize = MAX_DOCUMENT_BYTES;
/// Bytes read between two checks of the pasted field count.
const PASTE_CHUNK: usize = 4096;

/// Why a document was refused.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct DocumentError {
    /// One sentence naming the place and the problem.
    pub message: String,
}

impl fmt::Display for DocumentError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "sheet document refused: {}", self.message)
    }
}

#[cfg(feature = "std")]
impl std::error::Error for DocumentError {}

fn refuse<T>(message: String) -> core::result::Result<T, DocumentError> {
    Err(DocumentError { message })
}

/// The sheet's inputs and names as a version-1 document.
pub fn to_document(sheet: &Sheet) -> String {
    let mut w = JsonWriter::pretty();
    w.begin_object();
    w.key("format");
    w.string(FORMAT);
    w.key("version");
    w.number(f64::from(VERSION));
    w.key("cells");
    w.begin_object();
    for (c, input) in sheet.inputs() {
        w.key(&format!("{c}"));
        w.string(input);
    }
    w.end_object();
    w.key("names");
    w.begin_object();
    for (name, c) in sheet.names() {
        w.key(name);
        w.string(&format!("{c}"));
    }
    w.end_object();
    w.end_object();
    w.finish()
}

/// The contents of a document: inputs by cell and names.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct Contents {
    /// Cell inputs, in document order.
    pub cells: Vec<(CellRef, String)>,
    /// Names and their cells, in document order.
    pub names: Vec<(String, CellRef)>,
}

fn members<'a>(
    v: &'a Json,
    what: &str,
) -> core::result::Result<&'a [(String, Json)], DocumentError> {
    match v {
        Json::Object(m) => Ok(m),
        _ => refuse(format!("{what} must be a JSON object")),
    }
}

/// The `cells` member: inputs by address.
fn read_cells(
    v: &Json,
    out: &mut Vec<(CellRef, String)>,
) -> core::result::Result<(), DocumentError> {
    let m = members(v, "\"cells\"")?;
    if m.len() > MAX_CELLS {
        return refuse(format!("it has more than {MAX_CELLS} cells"));
    }
    let mut cells_seen = BTreeSet::new();
    for (addr, input) in m {
        let Some(c) = CellRef::parse(addr) else {
            return refuse(format!(
                "\"{addr}\" in \"cells\" is not a cell address such as B3"
            ));
        };
        if !cells_seen.insert(c) {
            return refuse(format!("the cell {c} appears twice"));
        }
        let Json::String(input) = input else {
            return refuse(format!("the input of {c} must be a string"));
        };
        if input.trim().is_empty() {
            return refuse(format!("the input of {c} is empty; leave empty cells out"));
        }
        if input.len() > MAX_INPUT_BYTES {
            return refuse(format!(
                "the input of {c} is longer than {MAX_INPUT_BYTES} bytes"
            ));
        }
        out.push((c, input.clone()));
    }
    Ok(())
}

/// The `names` member: cells by name.
fn read_names(
    v: &Json,
    out: &mut Vec<(String, CellRef)>,
) -> core::result::Result<(), DocumentError> {
    let m = members(v, "\"names\"")?;
    if m.len() > MAX_NAMES {
        return refuse(format!("it has more than {MAX_NAMES} names"));
    }
    let mut names_seen = BTreeSet::new();
    for (name, addr) in m {
        if !valid_name(name) {
            return refuse(format!("\"{name}\" is not a valid cell name"));
        }
        if !names_seen.insert(name.to_ascii_uppercase()) {
            return refuse(format!(
                "the name \"{name}\" appears twice (names ignore case)"
            ));
        }
        let c = match addr {
            Json::String(a) => CellRef::parse(a),
            _ => None,
        };
        let Some(c) = c else {
            return refuse(format!(
                "the name \"{name}\" must refer to a cell address such as \"B3\""
            ));
        };
        out.push((name.clone(), c));
    }
    Ok(())
}

/// Read a document without touching any sheet.
///
/// # Errors
/// [`DocumentError`] naming the first problem.
///
/// # Example
/// ```
/// use loopwright::sheet::from_document;
/// let ok = r#"{"format": "loopwright-sheet", "version": 1, "cells": {"A1": "4k7"}, "names": {}}"#;
/// assert_eq!(from_document(ok).unwrap().cells.len(), 1);
/// let newer = r#"{"format": "loopwright-sheet", "version": 2, "cells": {}}"#;
/// assert!(from_document(newer).unwrap_err().message.contains("newer loopwright"));
/// ```
pub fn from_document(text: &str) -> core::result::Result<Contents, DocumentError> {
    if text.len() > MAX_DOCUMENT_BYTES {
        return refuse(format!("it is larger than {MAX_DOCUMENT_BYTES} bytes"));
    }
    let root = json::parse(text).map_err(|e| DocumentError {
        message: format!("not valid JSON at {e}"),
    })?;
    let top = members(&root, "the document")?;
    let mut seen = BTreeSet::new();
    let (mut format_ok, mut version_ok) = (false, false);
    let mut out = Contents::default();
    let mut have_cells = false;
    for (key, value) in top {
        if !seen.insert(key.as_str()) {
            return refuse(format!("the member \"{key}\" appears twice"));
        }
        match (key.as_str(), value) {
            ("format", Json::String(f)) if f == FORMAT => format_ok = true,
            ("format", _) => return refuse(format!("\"format\" must be \"{FORMAT}\"; this is not a loopwright sheet")),
            ("version", Json::Number(n)) if n.value == f64::from(VERSION) => version_ok = true,
            ("version", Json::Number(n)) if n.value > f64::from(VERSION) && crate::float::trunc(n.value) == n.value => {
                return refuse(format!(
                    "it was written by a newer loopwright (document version {}); this one reads version {VERSION}",
                    super::value::format_number(n.value)
                ))
            }
            ("version", _) => return refuse(format!("\"version\" must be the whole number {VERSION}")),
            ("cells", v) => {
                have_cells = true;
                read_cells(v, &mut out.cells)?;
            }
            ("names", v) => read_names(v, &mut out.names)?,
            (other, _) => return refuse(format!("unknown member \"{other}\"; version {VERSION} has format, version, cells and names")),
        }
    }
    if !format_ok {
        return refuse(String::from("the member \"format\" is missing"));
    }
    if !version_ok {
        return refuse(String::from("the member \"version\" is missing"));
    }
    if !have_cells {
        return refuse(String::from("the member \"cells\" is missing"));
    }
    Ok(out)
}

impl Sheet {
    /// Replace everything by a document's contents; on refusal the sheet is
    /// unchanged.
    ///
    /// # Errors
    /// [`DocumentError`] naming the first problem.
    pub fn load_document(&mut self, text: &str) -> core::result::Result<(), DocumentError> {
        let contents = from_document(text)?;
        self.replace_all(&contents.cells, &contents.names)
            .map_err(|e| DocumentError {
                message: format!("{e}"),
            })
    }

    /// The sheet as a version-1 document.
    pub fn save_document(&self) -> String {
        to_document(self)
    }
}

/// One shown value as a CSV/TSV field: numbers as numbers (full precision, no unit),
/// everything else as text through [`csv::write_text`] (quoted when needed, and an
/// apostrophe in front of text a spreadsheet program would run as a formula).
fn field(out: &mut String, v: &Value, sep: char) {
    match v {
        Value::Number(x, _) => csv::write_number(out, *x),
        v => csv::write_text(out, &v.display(), sep),
    }
}

fn write_range(sheet: &Sheet, r: Range, sep: char, eol: &str) -> String {
    let mut out = String::new();
    for row in r.start.row..=r.end.row {
        for col in r.start.col..=r.end.col {
            if col > r.start.col {
                out.push(sep);
            }
            field(&mut out, &sheet.shown(CellRef { row, col }), sep);
        }
        out.push_str(eol);
    }
    out
}

/// The shown values from A1 to the last used cell as CSV (RFC 4180); empty
/// text for an empty sheet.
pub fn to_csv(sheet: &Sheet) -> String {
    sheet
        .used_range()
        .map_or_else(String::new, |r| write_range(sheet, r, ',', "\r\n"))
}

/// The shown values of a range as TSV.
///
/// # Errors
/// [`Error::TooLarge`] on `range` above [`MAX_PASTE_CELLS`] cells.
pub fn range_to_tsv(sheet: &Sheet, r: Range) -> Result<String> {
    if r.area() > MAX_PASTE_CELLS as u64 {
        return Err(Error::TooLarge {
            param: "range",
            limit: MAX_PASTE_CELLS as u64,
        });
    }
    Ok(write_range(sheet, r, '\t', "\n"))
}

/// Split TSV text into rows of fields with the project's one reader
/// ([`csv::Reader`], tab-separated, RFC 4180 quoting): quoted fields may hold tabs,
/// quotes written twice and line breaks; an empty line is a row of one empty field;
/// a final line break does not start a new row. A field that breaks the quoting
/// rules (`12" woofer`) is taken as written, as a pasted cell should be.
///
/// # Errors
/// [`Error::TooLarge`] on `text` above [`MAX_PASTE_BYTES`] bytes or with a row
/// longer than [`csv::MAX_RECORD_BYTES`] bytes or [`csv::MAX_FIELDS`] fields, and on `range`
/// as soon as more than [`MAX_PASTE_CELLS`] fields have been read (the text is read
/// in small chunks, so no more than that is ever allocated).
pub fn parse_tsv(text: &str) -> Result<Vec<Vec<String>>> {
    if text.len() > MAX_PASTE_BYTES {
        return Err(Error::TooLarge {
            param: "text",
            limit: MAX_PASTE_BYTES as u64,
        });
    }
    let too_many = Error::TooLarge {
        param: "range",
        limit: MAX_PASTE_CELLS as u64,
    };
    let mut reader = csv::Reader::new(b'\t', csv::BlankLines::Keep);
    let mut records = Vec::new();
    let mut cells = 0usize;
    let mut count = |records: &[csv::Record], from: usize| -> Result<()> {
        for r in &records[from..] {
            if r.problem == Some(csv::Problem::TooLong) {
                return Err(Error::TooLarge {
                    param: "text",
                    limit: csv::MAX_RECORD_BYTES as u64,
                });
            }
            cells += r.fields.len();
        }
        if cells > MAX_PASTE_CELLS {
            return Err(too_many);
        }
        Ok(())
    };
    // One chunk adds at most PASTE_CHUNK fields before the count is checked.
    for chunk in text.as_bytes().chunks(PASTE_CHUNK) {
        let from = records.len();
        reader.feed(chunk, &mut records);
        count(&records, from)?;
    }
    let from = records.len();
    reader.finish(&mut records);
    count(&records, from)?;
    Ok(records.into_iter().map(|r| r.fields).collect())
}

impl Sheet {
    /// Paste TSV text with its first field at `top_left`: each field becomes
    /// that cell's input (an empty field clears the cell); one recalculation.
    ///
    /// # Errors
    /// As [`parse_tsv`] (too large a text or too many fields, refused before the
    /// sheet is touched);
    /// [`Error::OutOfDomain`] on `cell` when the block would pass the sheet's
    /// edge; as [`Sheet::set_many`] otherwise. Nothing is set on error.
    pub fn paste_tsv(&mut self, top_left: CellRef, text: &str) -> Result<&[CellRef]> {
        let rows = parse_tsv(text)?;
        let count: usize = rows.iter().map(Vec::len).sum();
        let mut edits = Vec::with_capacity(count);
        for (i, row) in rows.iter().enumerate() {
            for (j, f) in row.iter().enumerate() {
                let c = u32::try_from(i)
                    .ok()
                    .zip(u32::try_from(j).ok())
                    .and_then(|(i, j)| top_left.offset(i, j))
                    .ok_or(Error::OutOfDomain {
                        param: "cell",
                        requirement: "the pasted block must fit inside the sheet",
                    })?;
                edits.push((c, f.as_str()));
            }
        }
        self.set_many(&edits)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn tsv_fields_and_quotes() {
        let rows = parse_tsv("a\tb\n\"x\ty\"\t\"q\"\"q\"\r\n\t\n").unwrap();
        assert_eq!(
            rows,
            [
                alloc::vec!["a", "b"],
                alloc::vec!["x\ty", "q\"q"],
                alloc::vec!["", ""]
            ]
        );
        assert!(parse_tsv("").unwrap().is_empty());
        assert_eq!(parse_tsv("1").unwrap(), [alloc::vec!["1"]]);
        // An inch mark in a pasted cell is kept as written; an empty line is an
        // empty cell.
        assert_eq!(
            parse_tsv("12\" woofer\t2\n\nx").unwrap(),
            [
                alloc::vec!["12\" woofer", "2"],
                alloc::vec![""],
                alloc::vec!["x"]
            ]
        );
    }

    #[test]
    fn tsv_sizes_are_refused_before_reading() {
        let refused = |text: &str| match parse_tsv(text) {
            Ok(rows) => panic!("accepted {} rows", rows.len()),
            Err(e) => (e.code(), e.param()),
        };
        assert_eq!(
            refused(&"\t".repeat(MAX_PASTE_BYTES + 1)),
            ("too_large", "text")
        );
        // One row longer than the reader keeps whole.
        assert_eq!(
            refused(&"\t".repeat(csv::MAX_FIELDS)),
            ("too_large", "text")
        );
        // 10 001 rows of 10 fields.
        let row = "1\t".repeat(9) + "1\n";
        assert_eq!(
            refused(&row.repeat(MAX_PASTE_CELLS / 10 + 1)),
            ("too_large", "range")
        );
        assert_eq!(
            parse_tsv(&row.repeat(MAX_PASTE_CELLS / 10)).unwrap().len(),
            MAX_PASTE_CELLS / 10
        );
    }

    #[test]
    fn refusals_name_the_problem() {
        let cases = [
            ("[]", "must be a JSON object"),
            ("{\"format\":\"x\",\"version\":1,\"cells\":{}}", "not a loopwright sheet"),
            ("{\"format\":\"loopwright-sheet\",\"version\":2,\"cells\":{}}", "newer loopwright"),
            ("{\"format\":\"loopwright-sheet\",\"version\":1.5,\"cells\":{}}", "whole number"),
            ("{\"format\":\"loopwright-sheet\",\"version\":1}", "\"cells\" is missing"),
            ("{\"format\":\"loopwright-sheet\",\"version\":1,\"cells\":{\"A0\":\"1\"}}", "not a cell address"),
            ("{\"format\":\"loopwright-sheet\",\"version\":1,\"cells\":{\"A1\":1}}", "must be a string"),
            ("{\"format\":\"loopwright-sheet\",\"version\":1,\"cells\":{\"A1\":\"1\",\"a1\":\"2\"}}", "appears twice"),
            ("{\"format\":\"loopwright-sheet\",\"version\":1,\"cells\":{},\"extra\":1}", "unknown member"),
            ("{\"format\":\"loopwright-sheet\",\"version\":1,\"cells\":{},\"names\":{\"B2\":\"A1\"}}", "not a valid cell name"),
            ("{\"format\":\"loopwright-sheet\",\"version\":1,\"cells\":{},\"names\":{\"g\":\"x\"}}", "must refer to a cell"),
            ("{\"format\":\"loopwright-sheet\",\"version\":1,\"cells\":{}", "not valid JSON at line 1"),
            // The path of the value being read when the text broke.
            ("{\"format\":\"loopwright-sheet\",\"version\":1,\"cells\":{\"B2\":\"=1\n\"}}", "line 1, column 59 (in cells.B2): a control character inside a string"),
        ];
        for (text, needle) in cases {
            let e = from_document(text).unwrap_err();
            assert!(e.message.contains(needle), "{text}: {}", e.message);
        }
    }
}
