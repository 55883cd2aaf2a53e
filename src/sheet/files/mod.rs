//! The worksheet as spreadsheet files and back (feature `sheetfiles`):
//! OpenDocument spreadsheets (ISO/IEC 26300, `.ods`), Office Open XML workbooks
//! (ECMA-376, `.xlsx`), and CSV/TSV (RFC 4180) values in.
//!
//! An exported file has three sheets: `About` (what produced it, the version, the
//! date and the cautions), `Design` (every shown value, with its unit as the
//! number format's literal text; formulas of the open formula standard live in the
//! format's own syntax; loopwright's formulas and spilled results as computed
//! values; named cells as named ranges), and the hidden `loopwright-inputs` (each
//! cell's input as typed, and what was written for it), which importing reads back
//! so that the round trip gives the same document. docs/worksheet.md, "Spreadsheet
//! files", lists what each format keeps and what it cannot.
//!
//! ```
//! use loopwright::sheet::files::{export_xlsx, import_xlsx, ExportOptions};
//! use loopwright::sheet::Sheet;
//!
//! let mut s = Sheet::new();
//! s.set("A1", "100k").unwrap();
//! s.set("A2", "=FEEDBACK.GAIN(A1; 0.01)").unwrap();
//! s.set("A3", "=A2*2").unwrap();
//! let bytes = export_xlsx(&s, &ExportOptions::default()).unwrap();
//! let back = import_xlsx(&bytes).unwrap();
//! assert_eq!(back.document().unwrap(), s.save_document());
//! // Not a workbook: a typed error, nothing changed.
//! assert_eq!(import_xlsx(b"PK\x03\x04 broken").unwrap_err().kind.code(), "bad_archive");
//! ```

mod build;
mod container;
mod formula_in;
mod formula_out;
mod model;
mod ods_read;
mod ods_write;
mod restore;
mod table;
mod xlsx_read;
mod xlsx_write;
mod xml;

pub use build::{ExportOptions, COVER_TABLE, DATA_TABLE, INPUTS_TABLE};
pub use model::{
    FileError, FileErrorKind, MAX_FILE_BYTES, MAX_FILE_CELLS, MAX_PARTS, MAX_PART_BYTES,
};
pub use restore::Imported;
pub use table::{MAX_TABLE_COLUMNS, MAX_TABLE_ROWS, RESULTS_TABLE};

use super::Sheet;
use crate::csv;
use alloc::format;
use alloc::vec::Vec;
use formula_out::Dialect;
use model::{FileCell, FileValue};

/// The sheet as an `.ods` file.
///
/// # Errors
/// [`FileError`] only if the archive cannot be written (no case is known).
pub fn export_ods(sheet: &Sheet, options: &ExportOptions) -> Result<Vec<u8>, FileError> {
    ods_write::write(
        &build::workbook(sheet, Dialect::Odf, options),
        &options.date,
    )
}

/// The sheet as an `.xlsx` file.
///
/// # Errors
/// [`FileError`] only if the archive cannot be written (no case is known).
pub fn export_xlsx(sheet: &Sheet, options: &ExportOptions) -> Result<Vec<u8>, FileError> {
    xlsx_write::write(
        &build::workbook(sheet, Dialect::Ooxml, options),
        &options.date,
    )
}

/// A CSV text (the batch tool's output) as an `.ods` (`xlsx` false) or `.xlsx`
/// workbook: a cover sheet naming `title`, and the records on the sheet
/// [`RESULTS_TABLE`], plain numbers as numbers and text that would run as a
/// formula with an apostrophe in front (`table` module).
///
/// # Errors
/// A malformed CSV record (`malformed`, naming its line); more rows than
/// [`MAX_TABLE_ROWS`] or columns than [`MAX_TABLE_COLUMNS`] (`too_large`).
///
/// ```
/// use loopwright::sheet::files::{table_file, ExportOptions};
/// let bytes = table_file("line,note\n2,=1+1\n", "loopwright-batch results", true, &ExportOptions::default()).unwrap();
/// assert!(bytes.starts_with(b"PK"));
/// assert!(table_file("a\n\"open", "t", false, &ExportOptions::default()).is_err());
/// ```
pub fn table_file(
    csv_text: &str,
    title: &str,
    xlsx: bool,
    options: &ExportOptions,
) -> Result<Vec<u8>, FileError> {
    let wb = table::workbook(csv_text, title, options)?;
    if xlsx {
        xlsx_write::write(&wb, &options.date)
    } else {
        ods_write::write(&wb, &options.date)
    }
}

/// Read an `.ods` file into worksheet inputs; no sheet is touched.
///
/// # Errors
/// [`FileError`]: a damaged or truncated archive, a missing `content.xml`,
/// malformed XML, more than [`MAX_FILE_CELLS`] cells, a part over [`MAX_PART_BYTES`].
pub fn import_ods(bytes: &[u8]) -> Result<Imported, FileError> {
    restore::restore(&ods_read::read(bytes)?, Dialect::Odf)
}

/// Read an `.xlsx` file into worksheet inputs; no sheet is touched.
///
/// # Errors
/// As [`import_ods`], for the workbook, relationship and sheet parts.
pub fn import_xlsx(bytes: &[u8]) -> Result<Imported, FileError> {
    restore::restore(&xlsx_read::read(bytes)?, Dialect::Ooxml)
}

/// Read CSV (`separator` b',') or TSV (b'\t') values into worksheet inputs from A1:
/// numbers, truth values and error codes as such, everything else as text (a field
/// beginning with `=` is text, never a formula).
///
/// # Errors
/// [`FileErrorKind::TooLarge`] over [`MAX_FILE_BYTES`] or [`crate::sheet::MAX_CELLS`] fields.
pub fn import_delimited(text: &str, separator: u8) -> Result<Imported, FileError> {
    if text.len() > MAX_FILE_BYTES {
        return Err(FileError::new(
            FileErrorKind::TooLarge,
            format!("the file is larger than {MAX_FILE_BYTES} bytes"),
        ));
    }
    let mut out = Imported::default();
    for (row, record) in csv::read_all(text, separator, csv::BlankLines::Keep)
        .iter()
        .enumerate()
    {
        for (col, field) in record.fields.iter().enumerate() {
            let Some(at) = super::CellRef::new(row as u32, col as u32) else {
                return Err(FileError::new(
                    FileErrorKind::TooLarge,
                    format!(
                        "line {} reaches beyond the sheet's rows or columns",
                        record.line
                    ),
                ));
            };
            let cell = FileCell {
                at,
                value: FileValue::Text(field.clone()),
                formula: None,
                unit: None,
            };
            let reads = super::literal::read_cell(field);
            let input = match reads {
                super::literal::CellReading::Number(_) => Some(field.clone()),
                _ if field.trim().eq_ignore_ascii_case("TRUE")
                    || field.trim().eq_ignore_ascii_case("FALSE") =>
                {
                    Some(field.trim().into())
                }
                _ if super::ErrorKind::from_code(field.trim()).is_some() => {
                    Some(field.trim().into())
                }
                _ => restore::value_input(&cell),
            };
            if let Some(input) = input {
                out.contents.cells.push((at, input));
            }
            if out.contents.cells.len() > super::MAX_CELLS {
                return Err(FileError::new(
                    FileErrorKind::TooLarge,
                    format!("the file has more than {} cells", super::MAX_CELLS),
                ));
            }
        }
    }
    Ok(out)
}
