//! A table of CSV records (the batch tool's output) as a workbook: an `About`
//! sheet saying what produced it, and a `Results` sheet with one row per record.
//!
//! Each field that is a plain decimal number ([`crate::csv::is_plain_number`]:
//! `100`, `-3`, `1e-7`) is written as a number; every other field as text, with an
//! apostrophe put in front of text that a spreadsheet program would run as a
//! formula ([`crate::csv::starts_like_formula`]: `=`, `+`, `-`, `@`, tab, CR
//! first) unless the CSV already has one there, so text from the input can never
//! become a live formula, and numbers like `-3` stay numbers.

use super::build::ExportOptions;
use super::model::{FileCell, FileError, FileErrorKind, FileValue, Table, Workbook};
use crate::csv::{self, BlankLines};
use crate::sheet::CellRef;
use alloc::format;
use alloc::string::String;
use alloc::vec::Vec;

/// The sheet of the records.
pub const RESULTS_TABLE: &str = "Results";
/// Most rows a sheet of either format holds (ECMA-376 and LibreOffice: 2²⁰).
pub const MAX_TABLE_ROWS: usize = 1 << 20;
/// Most columns a sheet of `.xlsx` holds (ECMA-376: XFD, 2¹⁴).
pub const MAX_TABLE_COLUMNS: usize = 1 << 14;

fn text(row: u32, col: u32, t: &str) -> FileCell {
    FileCell {
        at: CellRef { row, col },
        value: FileValue::Text(String::from(t)),
        formula: None,
        unit: None,
    }
}

/// One field as a cell: a plain number as a number, other text neutralised.
fn field(row: u32, col: u32, t: &str) -> FileCell {
    if csv::is_plain_number(t) {
        if let Ok(x) = t.parse::<f64>() {
            if x.is_finite() {
                return FileCell {
                    at: CellRef { row, col },
                    value: FileValue::Number(x),
                    formula: None,
                    unit: None,
                };
            }
        }
    }
    if csv::starts_like_formula(t) {
        return text(row, col, &format!("'{t}"));
    }
    text(row, col, t)
}

fn cover(title: &str, rows: usize, options: &ExportOptions) -> Table {
    let version = env!("CARGO_PKG_VERSION");
    let lines: [(&str, String); 5] = [
        ("Produced by", format!("loopwright {version}: {title}")),
        ("Date", options.date.clone()),
        ("The results", format!("on the sheet {RESULTS_TABLE}: {rows} rows, the first one the column names")),
        ("Text", String::from("text that a spreadsheet would run as a formula (first character = + - @) has an apostrophe in front; numbers are numbers")),
        ("Caution", String::from("Results are small-signal, linear (or weakly nonlinear) models: check every design on the bench.")),
    ];
    let mut cells = alloc::vec![text(0, 0, title)];
    for (i, (label, value)) in lines.iter().enumerate() {
        cells.push(text(2 + i as u32, 0, label));
        cells.push(text(2 + i as u32, 1, value));
    }
    Table {
        name: String::from(super::COVER_TABLE),
        hidden: false,
        cells,
    }
}

/// The workbook of a CSV text (RFC 4180, `,`; blank lines skipped).
///
/// # Errors
/// A malformed record (`malformed`, naming its line); more rows than
/// [`MAX_TABLE_ROWS`] or fields than [`MAX_TABLE_COLUMNS`] (`too_large`).
pub(crate) fn workbook(
    csv_text: &str,
    title: &str,
    options: &ExportOptions,
) -> Result<Workbook, FileError> {
    let records = csv::read_all(csv_text, b',', BlankLines::Skip);
    if records.len() > MAX_TABLE_ROWS {
        return Err(FileError::new(
            FileErrorKind::TooLarge,
            format!(
                "the table has {} rows; a sheet holds at most {MAX_TABLE_ROWS}",
                records.len()
            ),
        ));
    }
    let mut cells = Vec::new();
    for (r, record) in records.iter().enumerate() {
        if let Some(p) = record.problem {
            return Err(FileError::new(
                FileErrorKind::Malformed,
                format!("line {}: {p}", record.line),
            ));
        }
        if record.fields.len() > MAX_TABLE_COLUMNS {
            return Err(FileError::new(
                FileErrorKind::TooLarge,
                format!(
                    "line {}: {} fields; a sheet holds at most {MAX_TABLE_COLUMNS} columns",
                    record.line,
                    record.fields.len()
                ),
            ));
        }
        for (c, f) in record.fields.iter().enumerate() {
            if !f.is_empty() {
                cells.push(field(r as u32, c as u32, f));
            }
        }
    }
    Ok(Workbook {
        tables: alloc::vec![
            cover(title, records.len(), options),
            Table {
                name: String::from(RESULTS_TABLE),
                hidden: false,
                cells,
            },
        ],
        names: Vec::new(),
        notes: Vec::new(),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_stay_numbers_and_formula_text_is_neutralised() {
        let wb = workbook(
            "line,a,note\r\n2,-3,=1+1\r\n3,4k7,'=SUM(A1)\r\n4,1e-7,@x\r\n",
            "t",
            &ExportOptions::default(),
        )
        .unwrap();
        let cells = &wb.tables[1].cells;
        let at = |row: u32, col: u32| {
            cells
                .iter()
                .find(|c| c.at == CellRef { row, col })
                .map(|c| c.value.clone())
        };
        assert_eq!(at(1, 1), Some(FileValue::Number(-3.0)));
        assert_eq!(at(1, 2), Some(FileValue::Text("'=1+1".into())));
        assert_eq!(at(2, 1), Some(FileValue::Text("4k7".into())));
        assert_eq!(at(2, 2), Some(FileValue::Text("'=SUM(A1)".into())));
        assert_eq!(at(3, 1), Some(FileValue::Number(1e-7)));
        assert_eq!(at(3, 2), Some(FileValue::Text("'@x".into())));
        let e = workbook("a\n\"open\n", "t", &ExportOptions::default()).unwrap_err();
        assert_eq!(
            (e.kind, e.message.starts_with("line 2:")),
            (FileErrorKind::Malformed, true)
        );
    }
}
