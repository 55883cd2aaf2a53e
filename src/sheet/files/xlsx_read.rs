//! An Office Open XML workbook read into a [`Workbook`]: the sheets of
//! `xl/workbook.xml` in order (hidden ones marked), their parts through the
//! workbook's relationships, shared strings, the number formats that end in a
//! quoted unit (`General" Hz"`), formulas with their cached values, and defined
//! names that name one cell. Shared formulas (a formula written once for a block
//! of cells) keep their cached values and are reported.

use super::container::ArchiveReader;
use super::model::{
    FileCell, FileError, FileErrorKind, FileValue, Table, Workbook, MAX_FILE_CELLS,
};
use super::xml::{attr, attributes, malformed, name, reference};
use crate::sheet::CellRef;
use alloc::collections::BTreeMap;
use alloc::format;
use alloc::string::String;
use alloc::vec::Vec;
use quick_xml::events::{BytesStart, Event};
use quick_xml::Reader;

/// What a walk over one XML part does at each element and text.
trait Visitor {
    fn start(
        &mut self,
        name: &str,
        attrs: &[(String, String)],
        empty: bool,
    ) -> Result<(), FileError>;
    fn text(&mut self, _text: &str) {}
    fn end(&mut self, _name: &str) -> Result<(), FileError> {
        Ok(())
    }
}

/// The element's name without its namespace prefix.
fn local(e: &BytesStart<'_>) -> String {
    let n = name(e);
    match n.split_once(':') {
        Some((_, l)) => String::from(l),
        None => n,
    }
}

fn walk(text: &str, part: &str, v: &mut impl Visitor) -> Result<(), FileError> {
    let mut reader = Reader::from_str(text);
    let mut depth = 0usize;
    loop {
        match reader.read_event().map_err(|e| malformed(part, e))? {
            Event::Start(e) => {
                depth += 1;
                v.start(&local(&e), &attributes(&e, part)?, false)?;
            }
            Event::Empty(e) => {
                v.start(&local(&e), &attributes(&e, part)?, true)?;
                v.end(&local(&e))?;
            }
            Event::End(e) => {
                depth = depth.saturating_sub(1);
                v.end(e.local_name().as_ref())?;
            }
            Event::Text(t) => v.text(&t.xml10_content()),
            Event::CData(t) => v.text(&t.xml10_content()),
            Event::GeneralRef(r) => v.text(&reference(&r, part)?),
            Event::Eof => break,
            _ => {}
        }
    }
    if depth != 0 {
        return Err(malformed(part, "it ends before its elements are closed"));
    }
    Ok(())
}

#[derive(Default)]
struct SharedStrings {
    out: Vec<String>,
    current: String,
    in_t: bool,
    in_phonetic: bool,
}

impl Visitor for SharedStrings {
    fn start(&mut self, n: &str, _: &[(String, String)], empty: bool) -> Result<(), FileError> {
        match n {
            "si" => self.current.clear(),
            "t" if !empty => self.in_t = true,
            "rPh" if !empty => self.in_phonetic = true,
            _ => {}
        }
        Ok(())
    }
    fn text(&mut self, s: &str) {
        if self.in_t && !self.in_phonetic {
            self.current.push_str(s);
        }
    }
    fn end(&mut self, n: &str) -> Result<(), FileError> {
        match n {
            "t" => self.in_t = false,
            "rPh" => self.in_phonetic = false,
            "si" => {
                if self.out.len() >= MAX_FILE_CELLS {
                    return Err(FileError::new(
                        FileErrorKind::TooLarge,
                        format!("xl/sharedStrings.xml has more than {MAX_FILE_CELLS} strings"),
                    ));
                }
                self.out.push(core::mem::take(&mut self.current));
            }
            _ => {}
        }
        Ok(())
    }
}

/// Number formats (id → code) and the cell formats' number-format ids.
#[derive(Default)]
struct Styles {
    formats: BTreeMap<String, String>,
    xfs: Vec<String>,
    in_cell_xfs: bool,
}

impl Visitor for Styles {
    fn start(&mut self, n: &str, a: &[(String, String)], _: bool) -> Result<(), FileError> {
        match n {
            "numFmt" => {
                if let (Some(id), Some(code)) = (attr(a, "numFmtId"), attr(a, "formatCode")) {
                    self.formats.insert(id.into(), code.into());
                }
            }
            "cellXfs" => self.in_cell_xfs = true,
            "xf" if self.in_cell_xfs => self.xfs.push(attr(a, "numFmtId").unwrap_or("0").into()),
            _ => {}
        }
        Ok(())
    }
    fn end(&mut self, n: &str) -> Result<(), FileError> {
        if n == "cellXfs" {
            self.in_cell_xfs = false;
        }
        Ok(())
    }
}

impl Styles {
    /// The unit a cell format writes after the number: the quoted literal at the
    /// end of its number format (`General" Hz"` → `Hz`).
    fn unit(&self, style: Option<&str>) -> Option<String> {
        let xf: usize = style?.parse().ok()?;
        let code = self.formats.get(self.xfs.get(xf)?)?;
        let body = code.strip_suffix('"')?;
        let open = body.rfind('"')?;
        let unit = body[open + 1..].trim();
        (!unit.is_empty()).then(|| String::from(unit))
    }
}

/// The workbook part: sheets (name, relationship id, hidden) and defined names.
#[derive(Default)]
struct WorkbookPart {
    sheets: Vec<(String, String, bool)>,
    names: Vec<(String, String)>,
    name: Option<String>,
    text: String,
}

impl Visitor for WorkbookPart {
    fn start(&mut self, n: &str, a: &[(String, String)], _: bool) -> Result<(), FileError> {
        match n {
            "sheet" => self.sheets.push((
                attr(a, "name").unwrap_or("").into(),
                attr(a, "r:id").unwrap_or("").into(),
                matches!(attr(a, "state"), Some("hidden" | "veryHidden")),
            )),
            // A name local to one sheet (`localSheetId`) is not the worksheet's.
            "definedName" if attr(a, "localSheetId").is_none() => {
                self.name = attr(a, "name").map(String::from);
                self.text.clear();
            }
            _ => {}
        }
        Ok(())
    }
    fn text(&mut self, s: &str) {
        if self.name.is_some() {
            self.text.push_str(s);
        }
    }
    fn end(&mut self, n: &str) -> Result<(), FileError> {
        if n == "definedName" {
            if let Some(name) = self.name.take() {
                self.names.push((name, core::mem::take(&mut self.text)));
            }
        }
        Ok(())
    }
}

/// Relationship id → target.
#[derive(Default)]
struct Relationships(BTreeMap<String, String>);

impl Visitor for Relationships {
    fn start(&mut self, n: &str, a: &[(String, String)], _: bool) -> Result<(), FileError> {
        if n == "Relationship" {
            if let (Some(id), Some(t)) = (attr(a, "Id"), attr(a, "Target")) {
                self.0.insert(id.into(), t.into());
            }
        }
        Ok(())
    }
}

/// One worksheet part.
struct SheetPart<'a> {
    table: Table,
    strings: &'a [String],
    styles: &'a Styles,
    count: &'a mut usize,
    notes: &'a mut Vec<String>,
    cell: Option<(CellRef, Vec<(String, String)>)>,
    next: CellRef,
    row: u32,
    formula: Option<String>,
    shared: bool,
    value: Option<String>,
    inline: Option<String>,
    field: Field,
}

#[derive(PartialEq, Eq, Clone, Copy)]
enum Field {
    None,
    Formula,
    Value,
    Inline,
}

impl SheetPart<'_> {
    fn place(&self, a: &[(String, String)]) -> Result<CellRef, FileError> {
        match attr(a, "r") {
            Some(r) => CellRef::parse(r).ok_or_else(|| {
                FileError::new(
                    FileErrorKind::Malformed,
                    format!(
                        "sheet \"{}\": \"{r}\" is not a cell address",
                        self.table.name
                    ),
                )
            }),
            None => Ok(self.next),
        }
    }

    fn finish_cell(&mut self) -> Result<(), FileError> {
        let Some((at, a)) = self.cell.take() else {
            return Ok(());
        };
        self.next = CellRef {
            row: at.row,
            col: at.col + 1,
        };
        let here = format!("{} of sheet \"{}\"", at, self.table.name);
        let raw = self.value.take();
        let inline = self.inline.take();
        let value = match (attr(&a, "t"), raw) {
            (Some("inlineStr"), _) => inline.map(FileValue::Text),
            (Some("s"), Some(i)) => {
                let s = i
                    .trim()
                    .parse::<usize>()
                    .ok()
                    .and_then(|i| self.strings.get(i));
                Some(FileValue::Text(s.cloned().ok_or_else(|| {
                    FileError::new(
                        FileErrorKind::Malformed,
                        format!("cell {here}: shared string {i} does not exist"),
                    )
                })?))
            }
            (Some("b"), Some(v)) => Some(FileValue::Bool(v.trim() == "1")),
            (Some("e"), Some(v)) => Some(FileValue::Error(v)),
            (Some("str"), Some(v)) => Some(FileValue::Text(v)),
            (_, Some(v)) => match v.trim().parse::<f64>() {
                Ok(x) if x.is_finite() => Some(FileValue::Number(x)),
                _ => {
                    return Err(FileError::new(
                        FileErrorKind::Malformed,
                        format!("cell {here}: \"{v}\" is not a finite number"),
                    ))
                }
            },
            (_, None) => None,
        };
        let formula = self.formula.take().filter(|f| !f.trim().is_empty());
        if self.shared && formula.is_none() && value.is_some() {
            self.notes.push(format!(
                "cell {here}: a shared formula is not read; its value is kept"
            ));
        }
        self.shared = false;
        let value = match (value, &formula) {
            (Some(v), _) => v,
            (None, Some(_)) => FileValue::Text(String::new()),
            (None, None) => return Ok(()),
        };
        *self.count += 1;
        if *self.count > MAX_FILE_CELLS {
            return Err(FileError::new(
                FileErrorKind::TooLarge,
                format!("the file has more than {MAX_FILE_CELLS} cells"),
            ));
        }
        let unit = self.styles.unit(attr(&a, "s"));
        self.table.cells.push(FileCell {
            at,
            value,
            formula,
            unit,
        });
        Ok(())
    }
}

impl Visitor for SheetPart<'_> {
    fn start(&mut self, n: &str, a: &[(String, String)], empty: bool) -> Result<(), FileError> {
        match n {
            "row" => {
                if let Some(r) = attr(a, "r").and_then(|r| r.parse::<u32>().ok()) {
                    self.row = r.saturating_sub(1);
                }
                self.next = CellRef {
                    row: self.row,
                    col: 0,
                };
            }
            "c" => {
                let at = self.place(a)?;
                self.cell = Some((at, a.to_vec()));
            }
            "f" => {
                self.shared = attr(a, "t") == Some("shared");
                self.formula = Some(String::new());
                self.field = if empty { Field::None } else { Field::Formula };
            }
            "v" if !empty => self.value = Some(String::new()),
            "is" => self.inline = Some(String::new()),
            "rPh" => self.field = Field::None,
            "t" if self.inline.is_some() && !empty => self.field = Field::Inline,
            _ => {}
        }
        if n == "v" && !empty {
            self.field = Field::Value;
        }
        Ok(())
    }
    fn text(&mut self, s: &str) {
        let target = match self.field {
            Field::Formula => self.formula.as_mut(),
            Field::Value => self.value.as_mut(),
            Field::Inline => self.inline.as_mut(),
            Field::None => None,
        };
        if let Some(t) = target {
            t.push_str(s);
        }
    }
    fn end(&mut self, n: &str) -> Result<(), FileError> {
        match n {
            "f" | "v" | "t" | "rPh" => self.field = Field::None,
            "c" => self.finish_cell()?,
            "row" => self.row = self.row.saturating_add(1),
            _ => {}
        }
        Ok(())
    }
}

/// The part a relationship target points to, from `xl/`.
fn part_path(target: &str) -> String {
    match target.strip_prefix('/') {
        Some(abs) => String::from(abs),
        None => format!("xl/{target}"),
    }
}

/// `Design!$A$1` or `'My sheet'!$A$1` → (sheet, cell).
fn defined_cell(text: &str) -> Option<(String, CellRef)> {
    let (sheet, cell) = text.trim().rsplit_once('!')?;
    let sheet = sheet
        .strip_prefix('\'')
        .and_then(|s| s.strip_suffix('\''))
        .map_or_else(|| String::from(sheet), |s| s.replace("''", "'"));
    Some((sheet, CellRef::parse(&cell.replace('$', ""))?))
}

/// Read an `.xlsx` file.
///
/// # Errors
/// [`FileError`] for a damaged archive, a missing workbook or sheet part,
/// malformed XML, or a size over a limit.
pub(crate) fn read(bytes: &[u8]) -> Result<Workbook, FileError> {
    let mut zip = ArchiveReader::open(bytes)?;
    let mut book = WorkbookPart::default();
    walk(&zip.text("xl/workbook.xml")?, "xl/workbook.xml", &mut book)?;
    let mut rels = Relationships::default();
    walk(
        &zip.text("xl/_rels/workbook.xml.rels")?,
        "xl/_rels/workbook.xml.rels",
        &mut rels,
    )?;
    let mut strings = SharedStrings::default();
    if zip.has("xl/sharedStrings.xml") {
        walk(
            &zip.text("xl/sharedStrings.xml")?,
            "xl/sharedStrings.xml",
            &mut strings,
        )?;
    }
    let mut styles = Styles::default();
    if zip.has("xl/styles.xml") {
        walk(&zip.text("xl/styles.xml")?, "xl/styles.xml", &mut styles)?;
    }
    let mut wb = Workbook::default();
    let mut count = 0usize;
    for (sheet, id, hidden) in &book.sheets {
        let target = rels.0.get(id).ok_or_else(|| {
            FileError::new(
                FileErrorKind::MissingPart,
                format!("the sheet \"{sheet}\" has no part (relationship {id})"),
            )
        })?;
        let path = part_path(target);
        let text = zip.text(&path)?;
        let mut part = SheetPart {
            table: Table {
                name: sheet.clone(),
                hidden: *hidden,
                cells: Vec::new(),
            },
            strings: &strings.out,
            styles: &styles,
            count: &mut count,
            notes: &mut wb.notes,
            cell: None,
            next: CellRef { row: 0, col: 0 },
            row: 0,
            formula: None,
            shared: false,
            value: None,
            inline: None,
            field: Field::None,
        };
        walk(&text, &path, &mut part)?;
        let table = part.table;
        wb.tables.push(table);
    }
    if wb.tables.is_empty() {
        return Err(FileError::new(
            FileErrorKind::Malformed,
            "xl/workbook.xml lists no sheet",
        ));
    }
    for (n, text) in &book.names {
        match defined_cell(text) {
            Some((sheet, c)) => wb.names.push((n.clone(), sheet, c)),
            None => wb.notes.push(format!(
                "the defined name \"{n}\" ({text}) is not one cell; not kept"
            )),
        }
    }
    Ok(wb)
}
