//! A [`Workbook`] as an Office Open XML workbook (ECMA-376, SpreadsheetML): the
//! package parts `[Content_Types].xml`, `_rels/.rels`, `docProps/core.xml`,
//! `xl/workbook.xml` (sheets, the hidden one with `state="hidden"`, defined names),
//! its relationships, `xl/styles.xml` (one number format per unit:
//! `General" Hz"`, the general number with the unit as literal text) and one
//! `xl/worksheets/sheetN.xml` per table. Text is written inline (`t="inlineStr"`),
//! so there is no shared-string part; error values are error cells (`t="e"`).

use super::container::ArchiveWriter;
use super::model::{xml_escape, FileCell, FileError, FileValue, Table, Workbook};
use crate::sheet::write_number;
use alloc::collections::BTreeMap;
use alloc::format;
use alloc::string::String;
use alloc::vec::Vec;

const MAIN: &str = "http://schemas.openxmlformats.org/spreadsheetml/2006/main";
const REL: &str = "http://schemas.openxmlformats.org/officeDocument/2006/relationships";
const PKG_REL: &str = "http://schemas.openxmlformats.org/package/2006/relationships";
/// The first number-format id free for a workbook's own formats (ECMA-376 part 1,
/// §18.8.30: ids below 164 are built in).
const FIRST_CUSTOM_FORMAT: usize = 164;

fn content_types(sheets: usize) -> String {
    let mut out = String::from(concat!(
        "<?xml version=\"1.0\" encoding=\"UTF-8\" standalone=\"yes\"?>\n",
        r#"<Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types">"#,
        r#"<Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/>"#,
        r#"<Default Extension="xml" ContentType="application/xml"/>"#,
        r#"<Override PartName="/xl/workbook.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.sheet.main+xml"/>"#,
        r#"<Override PartName="/xl/styles.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.styles+xml"/>"#,
        r#"<Override PartName="/docProps/core.xml" ContentType="application/vnd.openxmlformats-package.core-properties+xml"/>"#,
    ));
    for i in 1..=sheets {
        out.push_str(&format!(
            r#"<Override PartName="/xl/worksheets/sheet{i}.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.worksheet+xml"/>"#
        ));
    }
    out.push_str("</Types>\n");
    out
}

fn package_rels() -> String {
    format!(
        "<?xml version=\"1.0\" encoding=\"UTF-8\" standalone=\"yes\"?>\n<Relationships xmlns=\"{PKG_REL}\"><Relationship Id=\"rId1\" Type=\"{REL}/officeDocument\" Target=\"xl/workbook.xml\"/><Relationship Id=\"rId2\" Type=\"http://schemas.openxmlformats.org/package/2006/relationships/metadata/core-properties\" Target=\"docProps/core.xml\"/></Relationships>\n"
    )
}

fn core_properties(date: &str) -> String {
    let mut out = String::from("<?xml version=\"1.0\" encoding=\"UTF-8\" standalone=\"yes\"?>\n<cp:coreProperties xmlns:cp=\"http://schemas.openxmlformats.org/package/2006/metadata/core-properties\" xmlns:dc=\"http://purl.org/dc/elements/1.1/\" xmlns:dcterms=\"http://purl.org/dc/terms/\" xmlns:xsi=\"http://www.w3.org/2001/XMLSchema-instance\"><dc:creator>loopwright</dc:creator>");
    if !date.is_empty() {
        out.push_str("<dcterms:created xsi:type=\"dcterms:W3CDTF\">");
        xml_escape(&mut out, date);
        out.push_str("</dcterms:created>");
    }
    out.push_str("</cp:coreProperties>\n");
    out
}

fn workbook_rels(sheets: usize) -> String {
    let mut out = format!("<?xml version=\"1.0\" encoding=\"UTF-8\" standalone=\"yes\"?>\n<Relationships xmlns=\"{PKG_REL}\">");
    for i in 1..=sheets {
        out.push_str(&format!(
            r#"<Relationship Id="rId{i}" Type="{REL}/worksheet" Target="worksheets/sheet{i}.xml"/>"#
        ));
    }
    out.push_str(&format!(
        r#"<Relationship Id="rId{}" Type="{REL}/styles" Target="styles.xml"/>"#,
        sheets + 1
    ));
    out.push_str("</Relationships>\n");
    out
}

/// `$A$1` for a cell.
fn absolute(c: crate::sheet::CellRef) -> String {
    let col: String = format!("{c}")
        .chars()
        .take_while(char::is_ascii_alphabetic)
        .collect();
    format!("${col}${}", c.row + 1)
}

/// A sheet name quoted for a formula when it needs it (`'My sheet'`).
fn sheet_in_formula(name: &str) -> String {
    if name.chars().all(|c| c.is_ascii_alphanumeric() || c == '_') {
        String::from(name)
    } else {
        format!("'{}'", name.replace('\'', "''"))
    }
}

fn workbook_part(wb: &Workbook) -> String {
    let mut out = format!("<?xml version=\"1.0\" encoding=\"UTF-8\" standalone=\"yes\"?>\n<workbook xmlns=\"{MAIN}\" xmlns:r=\"{REL}\"><sheets>");
    for (i, t) in wb.tables.iter().enumerate() {
        out.push_str("<sheet name=\"");
        xml_escape(&mut out, &t.name);
        out.push_str(&format!("\" sheetId=\"{}\"", i + 1));
        if t.hidden {
            out.push_str(" state=\"hidden\"");
        }
        out.push_str(&format!(" r:id=\"rId{}\"/>", i + 1));
    }
    out.push_str("</sheets>");
    if !wb.names.is_empty() {
        out.push_str("<definedNames>");
        for (name, table, c) in &wb.names {
            out.push_str("<definedName name=\"");
            xml_escape(&mut out, name);
            out.push_str("\">");
            xml_escape(
                &mut out,
                &format!("{}!{}", sheet_in_formula(table), absolute(*c)),
            );
            out.push_str("</definedName>");
        }
        out.push_str("</definedNames>");
    }
    // Ask the reading program to compute every formula when it opens the file.
    out.push_str("<calcPr fullCalcOnLoad=\"1\"/></workbook>\n");
    out
}

/// The units in use, each with its cell-format index (1, 2, …; 0 is the default).
fn unit_formats(wb: &Workbook) -> BTreeMap<String, usize> {
    let mut units = BTreeMap::new();
    for cell in wb.tables.iter().flat_map(|t| &t.cells) {
        if let Some(u) = &cell.unit {
            let next = units.len() + 1;
            units.entry(u.clone()).or_insert(next);
        }
    }
    units
}

fn styles(units: &BTreeMap<String, usize>) -> String {
    let mut out = format!("<?xml version=\"1.0\" encoding=\"UTF-8\" standalone=\"yes\"?>\n<styleSheet xmlns=\"{MAIN}\">");
    if !units.is_empty() {
        out.push_str(&format!("<numFmts count=\"{}\">", units.len()));
        for (unit, n) in units {
            out.push_str(&format!(
                "<numFmt numFmtId=\"{}\" formatCode=\"",
                FIRST_CUSTOM_FORMAT + n - 1
            ));
            xml_escape(&mut out, &format!("General\" {}\"", unit.replace('"', "")));
            out.push_str("\"/>");
        }
        out.push_str("</numFmts>");
    }
    out.push_str(r#"<fonts count="1"><font><sz val="11"/><name val="Calibri"/></font></fonts>"#);
    out.push_str(r#"<fills count="2"><fill><patternFill patternType="none"/></fill><fill><patternFill patternType="gray125"/></fill></fills>"#);
    out.push_str(r#"<borders count="1"><border><left/><right/><top/><bottom/><diagonal/></border></borders>"#);
    out.push_str(r#"<cellStyleXfs count="1"><xf numFmtId="0" fontId="0" fillId="0" borderId="0"/></cellStyleXfs>"#);
    out.push_str(&format!("<cellXfs count=\"{}\"><xf numFmtId=\"0\" fontId=\"0\" fillId=\"0\" borderId=\"0\" xfId=\"0\"/>", units.len() + 1));
    for n in units.values() {
        out.push_str(&format!(
            r#"<xf numFmtId="{}" fontId="0" fillId="0" borderId="0" xfId="0" applyNumberFormat="1"/>"#,
            FIRST_CUSTOM_FORMAT + n - 1
        ));
    }
    out.push_str("</cellXfs></styleSheet>\n");
    out
}

fn inline_text(out: &mut String, t: &str) {
    out.push_str("<is><t xml:space=\"preserve\">");
    xml_escape(out, t);
    out.push_str("</t></is>");
}

fn cell(out: &mut String, c: &FileCell, units: &BTreeMap<String, usize>) {
    out.push_str(&format!("<c r=\"{}\"", c.at));
    if let Some(n) = c.unit.as_ref().and_then(|u| units.get(u)) {
        out.push_str(&format!(" s=\"{n}\""));
    }
    let uncached = c.formula.is_some() && c.value == FileValue::Text(String::new());
    let kind = match (&c.value, &c.formula) {
        _ if uncached => "",
        (FileValue::Number(_), _) => "",
        (FileValue::Bool(_), _) => " t=\"b\"",
        (FileValue::Error(_), _) => " t=\"e\"",
        (FileValue::Text(_), Some(_)) => " t=\"str\"",
        (FileValue::Text(_), None) => " t=\"inlineStr\"",
    };
    out.push_str(kind);
    out.push('>');
    if let Some(f) = &c.formula {
        out.push_str("<f>");
        xml_escape(out, f);
        out.push_str("</f>");
    }
    match &c.value {
        _ if uncached => {}
        FileValue::Text(t) if c.formula.is_none() => inline_text(out, t),
        v => {
            out.push_str("<v>");
            match v {
                FileValue::Number(x) => write_number(out, *x),
                FileValue::Bool(b) => out.push(if *b { '1' } else { '0' }),
                FileValue::Error(t) | FileValue::Text(t) => xml_escape(out, t),
            }
            out.push_str("</v>");
        }
    }
    out.push_str("</c>");
}

fn worksheet(t: &Table, units: &BTreeMap<String, usize>) -> String {
    let mut out = format!("<?xml version=\"1.0\" encoding=\"UTF-8\" standalone=\"yes\"?>\n<worksheet xmlns=\"{MAIN}\" xmlns:r=\"{REL}\"><sheetData>");
    let mut i = 0;
    while i < t.cells.len() {
        let row = t.cells[i].at.row;
        out.push_str(&format!("<row r=\"{}\">", row + 1));
        while i < t.cells.len() && t.cells[i].at.row == row {
            cell(&mut out, &t.cells[i], units);
            i += 1;
        }
        out.push_str("</row>");
    }
    out.push_str("</sheetData></worksheet>\n");
    out
}

/// The `.xlsx` bytes of `wb`.
pub(crate) fn write(wb: &Workbook, date: &str) -> Result<Vec<u8>, FileError> {
    let units = unit_formats(wb);
    let n = wb.tables.len();
    let mut zip = ArchiveWriter::new();
    zip.part("[Content_Types].xml", content_types(n).as_bytes(), false);
    zip.part("_rels/.rels", package_rels().as_bytes(), false);
    zip.part("docProps/core.xml", core_properties(date).as_bytes(), false);
    zip.part("xl/workbook.xml", workbook_part(wb).as_bytes(), false);
    zip.part(
        "xl/_rels/workbook.xml.rels",
        workbook_rels(n).as_bytes(),
        false,
    );
    zip.part("xl/styles.xml", styles(&units).as_bytes(), false);
    for (i, t) in wb.tables.iter().enumerate() {
        zip.part(
            &format!("xl/worksheets/sheet{}.xml", i + 1),
            worksheet(t, &units).as_bytes(),
            false,
        );
    }
    zip.finish()
}
