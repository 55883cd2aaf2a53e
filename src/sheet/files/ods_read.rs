//! An OpenDocument spreadsheet read into a [`Workbook`]: `content.xml` (tables,
//! rows and cells with their repeat counts, values, formulas, the number styles
//! that carry a unit, hidden tables, named ranges). Repeated empty rows and cells
//! cost nothing; repeated cells with a value count against [`MAX_FILE_CELLS`].

use super::container::ArchiveReader;
use super::model::{
    FileCell, FileError, FileErrorKind, FileValue, Table, Workbook, MAX_FILE_CELLS,
};
use super::ods_write::MIMETYPE;
use super::xml::{attr, attributes, malformed, name, reference};
use crate::sheet::{CellRef, MAX_COLS, MAX_ROWS};
use alloc::collections::BTreeMap;
use alloc::format;
use alloc::string::String;
use alloc::vec::Vec;
use quick_xml::events::{BytesStart, Event};
use quick_xml::Reader;

const PART: &str = "content.xml";

/// Styles seen so far: number styles' trailing literal text, cell styles' number
/// style, hidden table styles.
#[derive(Default)]
struct Styles {
    number_suffix: BTreeMap<String, String>,
    cell_number_style: BTreeMap<String, String>,
    hidden_tables: Vec<String>,
}

/// A cell being read: its attributes, and its text so far.
struct OpenCell {
    attrs: Vec<(String, String)>,
    text: String,
    paragraphs: usize,
}

#[derive(Default)]
struct State {
    wb: Workbook,
    styles: Styles,
    current_number_style: Option<String>,
    current_style: Option<(String, String)>,
    in_number_text: bool,
    row: u64,
    col: u64,
    row_repeat: u64,
    row_cells: Vec<(u64, FileCell)>,
    cell: Option<OpenCell>,
    count: usize,
    /// Inside a cell's comment (`office:annotation`), whose text is not the cell's.
    in_annotation: bool,
}

fn repeat(attrs: &[(String, String)], key: &str) -> Result<u64, FileError> {
    match attr(attrs, key) {
        None => Ok(1),
        Some(v) => v.parse::<u64>().ok().filter(|n| *n >= 1).ok_or_else(|| {
            FileError::new(
                FileErrorKind::Malformed,
                format!("{PART}: {key}=\"{v}\" is not a count"),
            )
        }),
    }
}

impl State {
    fn table_name(&self) -> String {
        self.wb
            .tables
            .last()
            .map_or_else(String::new, |t| t.name.clone())
    }

    fn start(&mut self, e: &BytesStart<'_>, empty: bool) -> Result<(), FileError> {
        let n = name(e);
        let attrs = attributes(e, PART)?;
        match n.as_str() {
            "number:number-style" | "number:percentage-style" | "number:currency-style" => {
                self.current_number_style = attr(&attrs, "style:name").map(String::from);
            }
            "number:text" if self.current_number_style.is_some() && !empty => {
                self.in_number_text = true;
                if let Some(s) = &self.current_number_style {
                    self.styles.number_suffix.insert(s.clone(), String::new());
                }
            }
            "style:style" => {
                if let Some(s) = attr(&attrs, "style:name") {
                    self.current_style =
                        Some((s.into(), attr(&attrs, "style:family").unwrap_or("").into()));
                    if let Some(d) = attr(&attrs, "style:data-style-name") {
                        self.styles.cell_number_style.insert(s.into(), d.into());
                    }
                }
            }
            "style:table-properties" if attr(&attrs, "table:display") == Some("false") => {
                if let Some((s, _)) = &self.current_style {
                    self.styles.hidden_tables.push(s.clone());
                }
            }
            "table:table" => {
                let hidden = attr(&attrs, "table:style-name")
                    .is_some_and(|s| self.styles.hidden_tables.iter().any(|h| h == s));
                self.wb.tables.push(Table {
                    name: attr(&attrs, "table:name").unwrap_or("").into(),
                    hidden,
                    cells: Vec::new(),
                });
                self.row = 0;
            }
            "table:table-row" => {
                self.col = 0;
                self.row_repeat = repeat(&attrs, "table:number-rows-repeated")?;
                self.row_cells.clear();
                if empty {
                    self.end_row()?;
                }
            }
            "table:table-cell" | "table:covered-table-cell" => {
                let cell = OpenCell {
                    attrs,
                    text: String::new(),
                    paragraphs: 0,
                };
                if empty {
                    self.end_cell(cell)?;
                } else {
                    self.cell = Some(cell);
                }
            }
            "office:annotation" if !empty => self.in_annotation = true,
            "text:p" if !empty && !self.in_annotation => {
                if let Some(c) = &mut self.cell {
                    if c.paragraphs > 0 {
                        c.text.push('\n');
                    }
                    c.paragraphs += 1;
                }
            }
            "text:s" => {
                let count = repeat(&attrs, "text:c")?.min(1024) as usize;
                self.push_text(&" ".repeat(count));
            }
            "text:tab" => self.push_text("\t"),
            "text:line-break" => self.push_text("\n"),
            "table:named-range" => self.named_range(&attrs),
            _ => {}
        }
        Ok(())
    }

    fn push_text(&mut self, t: &str) {
        if self.in_annotation {
            return;
        }
        if self.in_number_text {
            if let Some(s) = self
                .current_number_style
                .as_ref()
                .and_then(|s| self.styles.number_suffix.get_mut(s))
            {
                s.push_str(t);
            }
        } else if let Some(c) = &mut self.cell {
            c.text.push_str(t);
        }
    }

    fn named_range(&mut self, attrs: &[(String, String)]) {
        let (Some(n), Some(address)) = (
            attr(attrs, "table:name"),
            attr(attrs, "table:cell-range-address"),
        ) else {
            return;
        };
        let Some((table, cell)) = address.rsplit_once('.') else {
            return;
        };
        let table = table.trim_start_matches('$').trim_matches('\'');
        if let Some(c) = CellRef::parse(&cell.replace('$', "")) {
            self.wb.names.push((n.into(), table.into(), c));
        }
    }

    fn end(&mut self, n: &[u8]) -> Result<(), FileError> {
        match n {
            b"number:number-style" | b"number:percentage-style" | b"number:currency-style" => {
                self.current_number_style = None;
            }
            b"number:text" => self.in_number_text = false,
            b"office:annotation" => self.in_annotation = false,
            b"style:style" => self.current_style = None,
            b"table:table-cell" | b"table:covered-table-cell" => {
                if let Some(c) = self.cell.take() {
                    self.end_cell(c)?;
                }
            }
            b"table:table-row" => self.end_row()?,
            _ => {}
        }
        Ok(())
    }

    fn unit_of(&self, attrs: &[(String, String)]) -> Option<String> {
        let style = attr(attrs, "table:style-name")?;
        let number = self.styles.cell_number_style.get(style)?;
        let suffix = self.styles.number_suffix.get(number)?.trim();
        (!suffix.is_empty()).then(|| String::from(suffix))
    }

    fn end_cell(&mut self, c: OpenCell) -> Result<(), FileError> {
        let columns = repeat(&c.attrs, "table:number-columns-repeated")?;
        let at = || format!("{} of sheet \"{}\"", self.col + 1, self.table_name());
        let formula = attr(&c.attrs, "table:formula").map(|f| {
            let f = f.strip_prefix("of:").unwrap_or(f);
            String::from(f.strip_prefix('=').unwrap_or(f))
        });
        let value = match attr(&c.attrs, "office:value-type") {
            Some("float" | "percentage" | "currency") => {
                let v = attr(&c.attrs, "office:value").unwrap_or("");
                match v.parse::<f64>() {
                    Ok(x) if x.is_finite() => Some(FileValue::Number(x)),
                    _ => {
                        return Err(FileError::new(
                            FileErrorKind::Malformed,
                            format!(
                                "{PART}: the number \"{v}\" in column {} is not a finite number",
                                at()
                            ),
                        ))
                    }
                }
            }
            Some("boolean") => Some(FileValue::Bool(
                attr(&c.attrs, "office:boolean-value") == Some("true"),
            )),
            Some(_) => Some(FileValue::Text(
                attr(&c.attrs, "office:string-value").map_or(c.text.clone(), String::from),
            )),
            None if formula.is_some() => Some(FileValue::Text(String::new())),
            None => None,
        };
        if let Some(value) = value {
            let unit = self.unit_of(&c.attrs);
            for k in 0..columns {
                self.row_cells.push((
                    self.col + k,
                    FileCell {
                        at: CellRef { row: 0, col: 0 },
                        value: value.clone(),
                        formula: formula.clone(),
                        unit: unit.clone(),
                    },
                ));
                self.count_cells(1)?;
            }
        }
        self.col += columns;
        Ok(())
    }

    fn count_cells(&mut self, n: usize) -> Result<(), FileError> {
        self.count += n;
        if self.count > MAX_FILE_CELLS {
            return Err(FileError::new(
                FileErrorKind::TooLarge,
                format!("the file has more than {MAX_FILE_CELLS} cells"),
            ));
        }
        Ok(())
    }

    fn end_row(&mut self) -> Result<(), FileError> {
        let cells = core::mem::take(&mut self.row_cells);
        if !cells.is_empty() {
            for r in 0..self.row_repeat {
                if r > 0 {
                    self.count_cells(cells.len())?;
                }
                for (col, cell) in &cells {
                    let row = self.row + r;
                    let place = CellRef::new(
                        u32::try_from(row).unwrap_or(u32::MAX),
                        u32::try_from(*col).unwrap_or(u32::MAX),
                    )
                    .filter(|_| row < u64::from(MAX_ROWS) && *col < u64::from(MAX_COLS));
                    let Some(at) = place else {
                        return Err(FileError::new(FileErrorKind::TooLarge, format!("a cell of sheet \"{}\" lies beyond row {MAX_ROWS} or column {MAX_COLS}", self.table_name())));
                    };
                    if let Some(t) = self.wb.tables.last_mut() {
                        t.cells.push(FileCell { at, ..cell.clone() });
                    }
                }
            }
        }
        self.row += self.row_repeat;
        Ok(())
    }
}

/// Read an `.ods` file.
///
/// # Errors
/// [`FileError`] for a damaged archive, a missing `content.xml`, a `mimetype`
/// that is not a spreadsheet's, malformed XML, or a size over a limit.
pub(crate) fn read(bytes: &[u8]) -> Result<Workbook, FileError> {
    let mut zip = ArchiveReader::open(bytes)?;
    if zip.has("mimetype") {
        let m = zip.text("mimetype")?;
        if m.trim() != MIMETYPE {
            return Err(FileError::new(
                FileErrorKind::Malformed,
                format!(
                    "the mimetype is \"{}\", not an OpenDocument spreadsheet's",
                    m.trim()
                ),
            ));
        }
    }
    let text = zip.text(PART)?;
    let mut reader = Reader::from_str(&text);
    let mut st = State::default();
    let mut depth = 0usize;
    loop {
        match reader.read_event().map_err(|e| malformed(PART, e))? {
            Event::Start(e) => {
                depth += 1;
                st.start(&e, false)?;
            }
            Event::Empty(e) => st.start(&e, true)?,
            Event::End(e) => {
                depth = depth.saturating_sub(1);
                st.end(e.name().as_ref().as_bytes())?;
            }
            Event::Text(t) => st.push_text(&t.xml10_content()),
            Event::CData(t) => st.push_text(&t.xml10_content()),
            Event::GeneralRef(r) => {
                let s = reference(&r, PART)?;
                st.push_text(&s);
            }
            Event::Eof => break,
            _ => {}
        }
    }
    if depth != 0 {
        return Err(malformed(PART, "it ends before its elements are closed"));
    }
    if st.wb.tables.is_empty() {
        return Err(FileError::new(
            FileErrorKind::Malformed,
            "content.xml has no table",
        ));
    }
    Ok(st.wb)
}
