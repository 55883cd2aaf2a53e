//! A read [`Workbook`] back into worksheet inputs.
//!
//! Which table: the one called [`DATA_TABLE`] when there is one, else the first
//! visible table; every other table but the cover and the inputs table is reported
//! as not imported (the worksheet has one sheet).
//!
//! Each cell: when the hidden [`INPUTS_TABLE`] has a row for it and the cell still
//! holds what the export wrote there (the same live formula, or no formula and the
//! same value), the input as typed comes back (a loopwright formula, `4k7`, a name
//! in a formula); a spilled result written as a value is left out, as its formula
//! brings it back. Otherwise the cell was changed in another program and is read
//! as it is now: a formula translated to the worksheet's syntax
//! ([`super::formula_in`]), a number with the unit of its number format, text
//! (with a `'` in front where the worksheet would read it as something else), a
//! truth value or an error value. A formula that cannot be translated is reported
//! by sheet and cell, and its value is kept.

use super::build::{COVER_TABLE, DATA_TABLE, INPUTS_TABLE};
use super::formula_in::checked;
use super::formula_out::Dialect;
use super::model::{FileCell, FileError, FileErrorKind, FileValue, Table, Workbook};
use crate::sheet::literal::{read_cell, CellReading};
use crate::sheet::{
    valid_name, write_number, CellRef, Contents, ErrorKind, Sheet, MAX_CELLS, MAX_INPUT_BYTES,
};
use alloc::collections::BTreeMap;
use alloc::format;
use alloc::string::String;
use alloc::vec::Vec;

/// What an import gives: the inputs and names, and what could not be kept.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct Imported {
    /// The worksheet's inputs and names.
    pub contents: Contents,
    /// One sentence per thing not kept as it was, naming the sheet and cell.
    pub problems: Vec<String>,
}

impl Imported {
    /// The imported contents as a sheet document (the canonical save).
    ///
    /// # Errors
    /// [`FileError`] when the worksheet refuses the contents (a limit).
    pub fn document(&self) -> Result<String, FileError> {
        let mut sheet = Sheet::new();
        sheet
            .replace_all(&self.contents.cells, &self.contents.names)
            .map_err(|e| FileError::new(FileErrorKind::TooLarge, format!("{e}")))?;
        Ok(sheet.save_document())
    }
}

/// What the export wrote for one cell: input as typed, formula, value.
struct Written {
    input: String,
    formula: String,
    value: FileValue,
}

fn preserved(t: &Table) -> BTreeMap<CellRef, Written> {
    let mut rows: BTreeMap<u32, [Option<&FileCell>; 4]> = BTreeMap::new();
    for c in t.cells.iter().filter(|c| c.at.row > 0 && c.at.col < 4) {
        rows.entry(c.at.row).or_default()[c.at.col as usize] = Some(c);
    }
    let as_text = |c: Option<&FileCell>| match c.map(|c| &c.value) {
        Some(FileValue::Text(t)) => t.clone(),
        _ => String::new(),
    };
    rows.values()
        .filter_map(|r| {
            let at = CellRef::parse(&as_text(r[0]))?;
            let value = r[3].map_or(FileValue::Text(String::new()), |c| c.value.clone());
            Some((
                at,
                Written {
                    input: as_text(r[1]),
                    formula: as_text(r[2]),
                    value,
                },
            ))
        })
        .collect()
}

fn same_value(a: &FileValue, b: &FileValue) -> bool {
    match (a, b) {
        (FileValue::Number(x), FileValue::Number(y)) => x == y,
        (FileValue::Bool(x), FileValue::Bool(y)) => x == y,
        // A program that keeps truth values as 1 and 0 with a truth-value format
        // (LibreOffice saving an .ods from an .xlsx) still holds what was written.
        (FileValue::Bool(b), FileValue::Number(x)) | (FileValue::Number(x), FileValue::Bool(b)) => {
            *x == if *b { 1.0 } else { 0.0 }
        }
        (FileValue::Text(x) | FileValue::Error(x), FileValue::Text(y) | FileValue::Error(y)) => {
            x == y
        }
        _ => false,
    }
}

/// The input that gives a value as the worksheet reads inputs; `None` for empty text.
pub(crate) fn value_input(c: &FileCell) -> Option<String> {
    match &c.value {
        FileValue::Number(x) => {
            let mut s = String::new();
            write_number(&mut s, *x);
            if let Some(u) = &c.unit {
                let with_unit = format!("{s} {u}");
                if matches!(read_cell(&with_unit), CellReading::Number(_)) {
                    return Some(with_unit);
                }
            }
            Some(s)
        }
        FileValue::Bool(b) => Some(String::from(if *b { "TRUE" } else { "FALSE" })),
        FileValue::Error(code) if ErrorKind::from_code(code).is_some() => Some(code.clone()),
        FileValue::Text(t) | FileValue::Error(t) => {
            if t.is_empty() {
                return None;
            }
            let reads_as_text = !t.starts_with(['=', '\''])
                && !t.trim().eq_ignore_ascii_case("TRUE")
                && !t.trim().eq_ignore_ascii_case("FALSE")
                && ErrorKind::from_code(t.trim()).is_none()
                && matches!(read_cell(t), CellReading::Text);
            Some(if reads_as_text {
                t.clone()
            } else {
                format!("'{t}")
            })
        }
    }
}

/// The input for a cell read as it is now.
fn fresh(c: &FileCell, d: Dialect, table: &str, problems: &mut Vec<String>) -> Option<String> {
    if let Some(f) = &c.formula {
        match checked(f, d, table) {
            Ok(input) => return Some(input),
            Err(why) => problems.push(format!(
                "sheet \"{table}\", cell {}: {why}; its value is kept",
                c.at
            )),
        }
    }
    value_input(c)
}

/// Whether a formula is only a truth value (`TRUE()`, `FALSE()`): LibreOffice writes
/// an .xlsx file's truth-value cells that way when it saves them as .ods.
fn truth_constant(f: &str) -> bool {
    let f = f.trim().trim_start_matches('=');
    f.eq_ignore_ascii_case("TRUE()") || f.eq_ignore_ascii_case("FALSE()")
}

fn data_table(wb: &Workbook) -> Result<&Table, FileError> {
    wb.tables
        .iter()
        .find(|t| t.name == DATA_TABLE)
        .or_else(|| wb.tables.iter().find(|t| !t.hidden))
        .ok_or_else(|| FileError::new(FileErrorKind::Malformed, "the file has no visible sheet"))
}

/// The worksheet inputs of a read workbook.
///
/// # Errors
/// [`FileError`] when the file has no sheet to read or more cells than a worksheet holds.
pub(crate) fn restore(wb: &Workbook, d: Dialect) -> Result<Imported, FileError> {
    let data = data_table(wb)?;
    let mut out = Imported {
        problems: wb.notes.clone(),
        ..Imported::default()
    };
    for t in &wb.tables {
        if t.name != data.name
            && t.name != COVER_TABLE
            && t.name != INPUTS_TABLE
            && !t.cells.is_empty()
        {
            out.problems.push(format!(
                "sheet \"{}\" is not imported: the worksheet has one sheet ({} was read)",
                t.name, data.name
            ));
        }
    }
    let written = wb
        .tables
        .iter()
        .find(|t| t.name == INPUTS_TABLE && data.name == DATA_TABLE)
        .map(preserved)
        .unwrap_or_default();
    for c in &data.cells {
        let plain;
        let c = if c.formula.as_deref().is_some_and(truth_constant) {
            plain = FileCell {
                formula: None,
                ..c.clone()
            };
            &plain
        } else {
            c
        };
        let kept = written.get(&c.at).filter(|w| match &c.formula {
            Some(f) => w.formula == *f,
            None => w.formula.is_empty() && same_value(&w.value, &c.value),
        });
        let input = match kept {
            Some(w) if w.input.is_empty() => None,
            Some(w) => Some(w.input.clone()),
            None => fresh(c, d, &data.name, &mut out.problems),
        };
        let Some(input) = input.filter(|i| !i.trim().is_empty()) else {
            continue;
        };
        if input.len() > MAX_INPUT_BYTES {
            out.problems.push(format!(
                "sheet \"{}\", cell {}: longer than {MAX_INPUT_BYTES} bytes; not imported",
                data.name, c.at
            ));
            continue;
        }
        out.contents.cells.push((c.at, input));
    }
    if out.contents.cells.len() > MAX_CELLS {
        return Err(FileError::new(
            FileErrorKind::TooLarge,
            format!(
                "the sheet \"{}\" has more than {MAX_CELLS} cells",
                data.name
            ),
        ));
    }
    for (name, table, c) in &wb.names {
        if *table == data.name && valid_name(name) {
            out.contents.names.push((name.clone(), *c));
        } else {
            out.problems.push(format!("the name \"{name}\" (sheet \"{table}\", {c}) is not kept: it is not a cell name of the sheet read"));
        }
    }
    Ok(out)
}
