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
//! Files: [`lexer`], [`parser`], [`eval`], [`errors`], [`value`], [`literal`],
//! [`functions`] (the catalog), [`graph`], [`sheet`], [`document`] (the JSON
//! file and CSV/TSV), [`json`], [`address`].

pub mod address;
pub mod document;
pub mod errors;
pub mod eval;
pub mod functions;
pub mod graph;
pub mod json;
pub mod lexer;
pub mod literal;
pub mod parser;
#[allow(clippy::module_inception)]
pub mod sheet;
pub mod value;

pub use address::{CellRef, Range};
pub use document::{from_document, to_document, DocumentError};
pub use errors::{CellError, ErrorKind};
pub use sheet::Sheet;
pub use value::{Unit, Value};
