//! The worksheet formula engine.
//!
//! Cells hold numbers (with engineering notation and units), text, truth values
//! or formulas after the OpenFormula standard; formulas call the common
//! spreadsheet functions and every catalog function; a dependency graph
//! recalculates exactly what an edit reaches; results with several values spill
//! into neighbouring cells; every problem is an error value in the cell with a
//! one-line explanation, never a panic.
//!
//! ```
//! use loopwright::sheet::{Sheet, Value};
//!
//! let mut s = Sheet::new();
//! s.set("A1", "100k").unwrap();           // open-loop gain
//! s.set("A2", "=FEEDBACK.BETA(A1; 100)").unwrap(); // β for a gain of 100
//! s.set("A3", "=FEEDBACK.GAIN(A1; A2)").unwrap();
//! assert!(matches!(s.value("A3").unwrap(), Value::Number(x, None) if (x - 100.0).abs() < 1e-9));
//! // Edit one number and everything follows; the edit reports what changed.
//! let changed = s.set("A1", "200k").unwrap();
//! assert!(changed.contains(&"A2".parse().unwrap()));
//! // Bad input is an error value, not a panic.
//! s.set("A4", "=A1/0").unwrap();
//! assert_eq!(s.value("A4").unwrap().display(), "#DIV/0!");
//! ```
//!
//! Files: `lexer`, `parser`, `eval` (a formula's value), `errors`, `value`,
//! [`literal`] (numbers as typed), [`functions`] (the catalog), `graph` (who reads
//! what), `sheet` (the state and what cells show), `input` (reading an input),
//! `edit`, `recalc` and `order` (recalculation within a work budget), `spill`,
//! `document` (the JSON file, through [`crate::json`], and CSV/TSV), `address`. Only the catalog
//! and the literal reader are modules of the public API; everything a user
//! needs from the others is re-exported here.

mod address;
mod document;
mod edit;
mod errors;
mod eval;
#[cfg(feature = "sheetfiles")]
pub mod files;
pub mod functions;
mod graph;
mod input;
mod lexer;
pub mod literal;
mod order;
mod parser;
mod recalc;
#[allow(clippy::module_inception)]
mod sheet;
mod spill;
mod value;

pub use address::{CellRef, Range, MAX_COLS, MAX_ROWS};
pub use document::{
    from_document, parse_tsv, range_to_tsv, to_csv, to_document, Contents, DocumentError, FORMAT,
    MAX_DOCUMENT_BYTES, MAX_PASTE_BYTES, MAX_PASTE_CELLS, VERSION,
};
pub use errors::{CellError, ErrorKind};
pub use eval::{MAX_RANGE_CELLS, MAX_TEXT_BYTES, MAX_TOTAL_TEXT_BYTES};
pub use input::{cell_ref, valid_name};
pub use lexer::MAX_FORMULA_BYTES;
pub use sheet::{
    Sheet, MAX_CELLS, MAX_INPUT_BYTES, MAX_NAMES, MAX_NAME_CHARS, MAX_RECALC_WORK, MAX_SPILL_PASSES,
};
pub(crate) use value::write_number;
pub use value::{format_number, Array, Unit, Value};
