//! A [`Workbook`] as an OpenDocument spreadsheet (ISO/IEC 26300, ODF 1.3):
//! `mimetype` (stored first), `META-INF/manifest.xml`, `meta.xml`, `styles.xml` and
//! `content.xml`. A number with a unit gets a number style that writes the number
//! in general form and the unit after a space as literal text; error values, which
//! ODF cannot store as values, are written as text.

use super::container::ArchiveWriter;
use super::model::{xml_escape, FileCell, FileError, FileValue, Table, Workbook};
use crate::sheet::write_number;
use alloc::collections::BTreeMap;
use alloc::format;
use alloc::string::String;
use alloc::vec::Vec;

pub(crate) const MIMETYPE: &str = "application/vnd.oasis.opendocument.spreadsheet";

const NAMESPACES: &str = concat!(
    r#"xmlns:office="urn:oasis:names:tc:opendocument:xmlns:office:1.0" "#,
    r#"xmlns:style="urn:oasis:names:tc:opendocument:xmlns:style:1.0" "#,
    r#"xmlns:text="urn:oasis:names:tc:opendocument:xmlns:text:1.0" "#,
    r#"xmlns:table="urn:oasis:names:tc:opendocument:xmlns:table:1.0" "#,
    r#"xmlns:number="urn:oasis:names:tc:opendocument:xmlns:datastyle:1.0" "#,
    r#"xmlns:fo="urn:oasis:names:tc:opendocument:xmlns:xsl-fo-compatible:1.0" "#,
    r#"xmlns:meta="urn:oasis:names:tc:opendocument:xmlns:meta:0.2" "#,
    r#"xmlns:dc="http://purl.org/dc/elements/1.1/" "#,
    r#"xmlns:of="urn:oasis:names:tc:opendocument:xmlns:of:1.2" office:version="1.3""#
);

fn manifest() -> String {
    String::from(concat!(
        r#"<?xml version="1.0" encoding="UTF-8"?>"#,
        "\n",
        r#"<manifest:manifest xmlns:manifest="urn:oasis:names:tc:opendocument:xmlns:manifest:1.0" manifest:version="1.3">"#,
        r#"<manifest:file-entry manifest:full-path="/" manifest:version="1.3" manifest:media-type="application/vnd.oasis.opendocument.spreadsheet"/>"#,
        r#"<manifest:file-entry manifest:full-path="content.xml" manifest:media-type="text/xml"/>"#,
        r#"<manifest:file-entry manifest:full-path="styles.xml" manifest:media-type="text/xml"/>"#,
        r#"<manifest:file-entry manifest:full-path="meta.xml" manifest:media-type="text/xml"/>"#,
        "</manifest:manifest>\n"
    ))
}

fn meta(date: &str) -> String {
    let mut out = format!(
        "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n<office:document-meta {NAMESPACES}><office:meta><meta:generator>loopwright/{}</meta:generator>",
        env!("CARGO_PKG_VERSION")
    );
    if !date.is_empty() {
        out.push_str("<dc:date>");
        xml_escape(&mut out, date);
        out.push_str("</dc:date>");
    }
    out.push_str("</office:meta></office:document-meta>\n");
    out
}

fn styles() -> String {
    format!("<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n<office:document-styles {NAMESPACES}><office:styles/></office:document-styles>\n")
}

/// Number styles per unit: `N1` … and the cell styles `ce1` … that use them.
fn unit_styles(wb: &Workbook) -> BTreeMap<String, usize> {
    let mut units = BTreeMap::new();
    for cell in wb.tables.iter().flat_map(|t| &t.cells) {
        if let Some(u) = &cell.unit {
            let next = units.len() + 1;
            units.entry(u.clone()).or_insert(next);
        }
    }
    units
}

fn automatic_styles(out: &mut String, units: &BTreeMap<String, usize>) {
    out.push_str("<office:automatic-styles>");
    out.push_str(r#"<style:style style:name="ta1" style:family="table"><style:table-properties table:display="true"/></style:style>"#);
    out.push_str(r#"<style:style style:name="ta2" style:family="table"><style:table-properties table:display="false"/></style:style>"#);
    // Truth values need a boolean style to show as TRUE/FALSE rather than 1/0.
    out.push_str(
        r#"<number:boolean-style style:name="NB"><number:boolean/></number:boolean-style>"#,
    );
    out.push_str(r#"<style:style style:name="ceB" style:family="table-cell" style:parent-style-name="Default" style:data-style-name="NB"/>"#);
    for (unit, n) in units {
        out.push_str(&format!(
            r#"<number:number-style style:name="N{n}"><number:number number:min-integer-digits="1"/><number:text> "#
        ));
        xml_escape(out, unit);
        out.push_str("</number:text></number:number-style>");
        out.push_str(&format!(
            r#"<style:style style:name="ce{n}" style:family="table-cell" style:parent-style-name="Default" style:data-style-name="N{n}"/>"#
        ));
    }
    out.push_str("</office:automatic-styles>");
}

/// Text as paragraphs, one per line. ODF collapses white space in a paragraph
/// (ISO/IEC 26300, §6.1.2, from memory), so a run of spaces at either end or of more
/// than one is written as `<text:s text:c="n"/>`. A tab stays a character (`&#9;`):
/// LibreOffice keeps it so, while a `<text:tab/>` was missing from its CSV of the cell.
fn paragraph(out: &mut String, t: &str) {
    for line in t.split('\n') {
        out.push_str("<text:p>");
        let mut rest = line;
        let mut at_start = true;
        while !rest.is_empty() {
            let spaces = rest.len() - rest.trim_start_matches(' ').len();
            if spaces > 0 {
                let at_end = spaces == rest.len();
                let literal = usize::from(!at_start && !at_end);
                if literal == 1 {
                    out.push(' ');
                }
                if spaces > literal {
                    out.push_str(&format!(r#"<text:s text:c="{}"/>"#, spaces - literal));
                }
                rest = &rest[spaces..];
            } else {
                let end = rest.find(' ').unwrap_or(rest.len());
                xml_escape(out, &rest[..end]);
                rest = &rest[end..];
            }
            at_start = false;
        }
        out.push_str("</text:p>");
    }
}

fn cell(out: &mut String, c: &FileCell, units: &BTreeMap<String, usize>) {
    out.push_str("<table:table-cell");
    if let Some(n) = c.unit.as_ref().and_then(|u| units.get(u)) {
        out.push_str(&format!(r#" table:style-name="ce{n}""#));
    } else if matches!(c.value, FileValue::Bool(_)) {
        out.push_str(r#" table:style-name="ceB""#);
    }
    if let Some(f) = &c.formula {
        out.push_str(r#" table:formula="of:="#);
        xml_escape(out, f);
        out.push('"');
    }
    let uncached = c.formula.is_some() && c.value == FileValue::Text(String::new());
    match &c.value {
        _ if uncached => {}
        FileValue::Number(x) => {
            out.push_str(r#" office:value-type="float" office:value=""#);
            write_number(out, *x);
            out.push_str("\"><text:p>");
            write_number(out, *x);
            if let Some(u) = &c.unit {
                out.push(' ');
                xml_escape(out, u);
            }
            out.push_str("</text:p></table:table-cell>");
            return;
        }
        FileValue::Bool(b) => {
            let (v, shown) = if *b {
                ("true", "TRUE")
            } else {
                ("false", "FALSE")
            };
            out.push_str(&format!(
                r#" office:value-type="boolean" office:boolean-value="{v}"><text:p>{shown}</text:p></table:table-cell>"#
            ));
            return;
        }
        FileValue::Text(t) | FileValue::Error(t) => {
            out.push_str(r#" office:value-type="string">"#);
            paragraph(out, t);
            out.push_str("</table:table-cell>");
            return;
        }
    }
    out.push_str("/>");
}

fn repeated(out: &mut String, element: &str, attribute: &str, count: u32) {
    if count == 1 {
        out.push_str(&format!("<table:{element}/>"));
    } else if count > 1 {
        out.push_str(&format!(
            r#"<table:{element} table:{attribute}="{count}"/>"#
        ));
    }
}

fn table(out: &mut String, t: &Table, units: &BTreeMap<String, usize>) {
    out.push_str("<table:table table:name=\"");
    xml_escape(out, &t.name);
    out.push_str(if t.hidden {
        "\" table:style-name=\"ta2\">"
    } else {
        "\" table:style-name=\"ta1\">"
    });
    out.push_str("<table:table-column/>");
    let mut next_row = 0u32;
    let mut i = 0;
    while i < t.cells.len() {
        let row = t.cells[i].at.row;
        if row > next_row {
            out.push_str(&format!(
                r#"<table:table-row table:number-rows-repeated="{}"><table:table-cell/></table:table-row>"#,
                row - next_row
            ));
        }
        out.push_str("<table:table-row>");
        let mut next_col = 0u32;
        while i < t.cells.len() && t.cells[i].at.row == row {
            let c = &t.cells[i];
            repeated(
                out,
                "table-cell",
                "number-columns-repeated",
                c.at.col - next_col,
            );
            cell(out, c, units);
            next_col = c.at.col + 1;
            i += 1;
        }
        out.push_str("</table:table-row>");
        next_row = row + 1;
    }
    out.push_str("</table:table>");
}

fn named_ranges(out: &mut String, wb: &Workbook) {
    if wb.names.is_empty() {
        return;
    }
    out.push_str("<table:named-expressions>");
    for (name, table, c) in &wb.names {
        let col: String = format!("{c}")
            .chars()
            .take_while(char::is_ascii_alphabetic)
            .collect();
        let address = format!("${table}.${col}${}", c.row + 1);
        out.push_str("<table:named-range table:name=\"");
        xml_escape(out, name);
        out.push_str("\" table:base-cell-address=\"");
        xml_escape(out, &address);
        out.push_str("\" table:cell-range-address=\"");
        xml_escape(out, &address);
        out.push_str("\"/>");
    }
    out.push_str("</table:named-expressions>");
}

/// `content.xml` of `wb`.
pub(crate) fn content(wb: &Workbook) -> String {
    let units = unit_styles(wb);
    let mut out = format!(
        "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n<office:document-content {NAMESPACES}>"
    );
    automatic_styles(&mut out, &units);
    out.push_str("<office:body><office:spreadsheet>");
    // Text comparisons ignore case, as in the worksheet (ODF's default is to match case).
    out.push_str(r#"<table:calculation-settings table:case-sensitive="false" table:use-regular-expressions="false" table:use-wildcards="false"/>"#);
    for t in &wb.tables {
        table(&mut out, t, &units);
    }
    named_ranges(&mut out, wb);
    out.push_str("</office:spreadsheet></office:body></office:document-content>\n");
    out
}

/// The `.ods` bytes of `wb`.
pub(crate) fn write(wb: &Workbook, date: &str) -> Result<Vec<u8>, FileError> {
    let mut zip = ArchiveWriter::new();
    zip.part("mimetype", MIMETYPE.as_bytes(), true);
    zip.part("META-INF/manifest.xml", manifest().as_bytes(), false);
    zip.part("meta.xml", meta(date).as_bytes(), false);
    zip.part("styles.xml", styles().as_bytes(), false);
    zip.part("content.xml", content(wb).as_bytes(), false);
    zip.finish()
}
