//! The workbook as both file formats see it: named tables of cells, each cell a
//! value with an optional formula (in the format's own syntax) and number format,
//! and named cells. `build` fills it from a worksheet, `ods` and `xlsx` write and
//! read it, `restore` turns a read one back into worksheet inputs.

use crate::sheet::CellRef;
use alloc::string::String;
use alloc::vec::Vec;
use core::fmt;

/// Most cells one imported file may hold, over all its tables (the worksheet's own
/// limit on inputs, [`crate::sheet::MAX_CELLS`], and as many again for the
/// preserved inputs).
pub const MAX_FILE_CELLS: usize = 2 * crate::sheet::MAX_CELLS;
/// Largest file accepted, in bytes (the document limit).
pub const MAX_FILE_BYTES: usize = crate::sheet::MAX_DOCUMENT_BYTES;
/// Largest unpacked part of an archive, in bytes: a zip bomb stops here.
pub const MAX_PART_BYTES: u64 = 64 * 1024 * 1024;
/// Most parts in an archive.
pub const MAX_PARTS: usize = 1_000;

/// A cell's value as stored in a file.
#[derive(Debug, Clone, PartialEq)]
pub enum FileValue {
    /// A number.
    Number(f64),
    /// Text.
    Text(String),
    /// A truth value.
    Bool(bool),
    /// An error code such as `#DIV/0!` (the formats that have error cells only).
    Error(String),
}

/// One cell of a table.
#[derive(Debug, Clone, PartialEq)]
pub struct FileCell {
    /// Where it is.
    pub at: CellRef,
    /// Its value (the computed one for a formula).
    pub value: FileValue,
    /// Its formula in the format's own syntax, without the `of:=` or `=` prefix.
    pub formula: Option<String>,
    /// The unit written after the number by its number format, if any.
    pub unit: Option<String>,
}

/// One table (sheet) of a workbook.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Table {
    /// Its name.
    pub name: String,
    /// Whether it is hidden.
    pub hidden: bool,
    /// Its cells in row-then-column order.
    pub cells: Vec<FileCell>,
}

/// A workbook: tables in order and named cells (name, table, cell).
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Workbook {
    /// The tables, first to last.
    pub tables: Vec<Table>,
    /// Named cells: name, table name, cell.
    pub names: Vec<(String, String, CellRef)>,
    /// What a reader met and could not keep (sheet, cell, what), for the report.
    pub notes: Vec<String>,
}

/// What kind of problem refused a file.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FileErrorKind {
    /// Not a zip archive, or a damaged one (truncated, bad checksum).
    Archive,
    /// A part the format requires is missing.
    MissingPart,
    /// A part is not well-formed XML or not what the format says.
    Malformed,
    /// Over a size limit (file, part, cells).
    TooLarge,
}

impl FileErrorKind {
    /// A short machine-readable code.
    pub const fn code(self) -> &'static str {
        match self {
            FileErrorKind::Archive => "bad_archive",
            FileErrorKind::MissingPart => "missing_part",
            FileErrorKind::Malformed => "malformed",
            FileErrorKind::TooLarge => "too_large",
        }
    }
}

/// Why a spreadsheet file was refused. Nothing is changed by a refused import.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct FileError {
    /// What kind of problem.
    pub kind: FileErrorKind,
    /// One sentence naming the part, sheet or cell and the problem.
    pub message: String,
}

impl FileError {
    pub(crate) fn new(kind: FileErrorKind, message: impl Into<String>) -> FileError {
        FileError {
            kind,
            message: message.into(),
        }
    }
}

impl fmt::Display for FileError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "spreadsheet file refused: {}", self.message)
    }
}

impl std::error::Error for FileError {}

/// Escape text for XML character data and attribute values.
pub(crate) fn xml_escape(out: &mut String, text: &str) {
    for ch in text.chars() {
        match ch {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&apos;"),
            // Kept through attribute-value normalisation, which turns them into spaces.
            '\n' => out.push_str("&#10;"),
            '\r' => out.push_str("&#13;"),
            '\t' => out.push_str("&#9;"),
            // Characters XML 1.0 cannot hold at all: dropped rather than written invalid.
            c if (c as u32) < 0x20 && !matches!(c, '\t' | '\n' | '\r') => {}
            c => out.push(c),
        }
    }
}
