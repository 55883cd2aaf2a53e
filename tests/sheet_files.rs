//! The worksheet as .ods and .xlsx files and back (feature `sheetfiles`): round
//! trips of the fixture worksheets, edits made in another program, and malformed
//! files refused with a typed error naming the problem.

use loopwright::sheet::files::{
    export_ods, export_xlsx, import_delimited, import_ods, import_xlsx, ExportOptions,
    FileErrorKind, Imported, MAX_FILE_CELLS,
};
use loopwright::sheet::Sheet;
use std::io::{Cursor, Write};

#[path = "support/sheet_fixtures.rs"]
mod sheet_fixtures;
use sheet_fixtures::fixtures;

fn options() -> ExportOptions {
    ExportOptions {
        date: "2026-12-03T12:00:00Z".into(),
        ..ExportOptions::default()
    }
}

type Import = fn(&[u8]) -> Result<Imported, loopwright::sheet::files::FileError>;
type Export = fn(&Sheet, &ExportOptions) -> Result<Vec<u8>, loopwright::sheet::files::FileError>;
const FORMATS: [(&str, Export, Import); 2] = [
    ("ods", export_ods, import_ods),
    ("xlsx", export_xlsx, import_xlsx),
];

#[test]
fn every_fixture_comes_back_byte_for_byte() {
    // The canonical save (src/sheet/document.rs) is the oracle: a round trip must
    // give the same document, byte for byte.
    let sheets = fixtures();
    assert!(sheets.len() >= 10, "at least 10 worksheets");
    for (name, sheet) in &sheets {
        for (format, export, import) in FORMATS {
            let bytes = export(sheet, &options()).unwrap();
            let back = import(&bytes).unwrap();
            assert_eq!(back.problems, Vec::<String>::new(), "{name}.{format}");
            assert_eq!(
                back.document().unwrap(),
                sheet.save_document(),
                "{name}.{format}"
            );
        }
    }
}

/// A zip archive of the given parts (all deflated but `mimetype`).
fn archive(parts: &[(&str, &[u8])]) -> Vec<u8> {
    let mut zip = zip::ZipWriter::new(Cursor::new(Vec::new()));
    for (name, bytes) in parts {
        let method = if *name == "mimetype" {
            zip::CompressionMethod::Stored
        } else {
            zip::CompressionMethod::Deflated
        };
        zip.start_file(
            *name,
            zip::write::SimpleFileOptions::default().compression_method(method),
        )
        .unwrap();
        zip.write_all(bytes).unwrap();
    }
    zip.finish().unwrap().into_inner()
}

/// An .ods of one table with the given rows of content.xml.
fn ods_with(rows: &str) -> Vec<u8> {
    let content = format!(
        r#"<?xml version="1.0" encoding="UTF-8"?><office:document-content xmlns:office="urn:oasis:names:tc:opendocument:xmlns:office:1.0" xmlns:table="urn:oasis:names:tc:opendocument:xmlns:table:1.0" xmlns:text="urn:oasis:names:tc:opendocument:xmlns:text:1.0"><office:body><office:spreadsheet><table:table table:name="Sheet1">{rows}</table:table></office:spreadsheet></office:body></office:document-content>"#
    );
    archive(&[
        (
            "mimetype",
            b"application/vnd.oasis.opendocument.spreadsheet",
        ),
        ("content.xml", content.as_bytes()),
    ])
}

#[test]
fn a_file_from_another_program_is_read_as_it_stands() {
    // Hand-written ODF (ISO/IEC 26300 table:table-cell attributes, from memory):
    // a number, a live formula, text that would read as a number, a repeated cell.
    let bytes = ods_with(concat!(
        r#"<table:table-row><table:table-cell office:value-type="float" office:value="4700"/>"#,
        r#"<table:table-cell table:formula="of:=[.A1]*2" office:value-type="float" office:value="9400"/>"#,
        r#"<table:table-cell office:value-type="string"><text:p>4k7</text:p></table:table-cell></table:table-row>"#,
        r#"<table:table-row table:number-rows-repeated="2"><table:table-cell table:number-columns-repeated="2" office:value-type="boolean" office:boolean-value="true"/></table:table-row>"#,
    ));
    let got = import_ods(&bytes).unwrap();
    let cells: Vec<(String, String)> = got
        .contents
        .cells
        .iter()
        .map(|(c, i)| (c.to_string(), i.clone()))
        .collect();
    let want = [
        ("A1", "4700"),
        ("B1", "=A1*2"),
        ("C1", "'4k7"),
        ("A2", "TRUE"),
        ("B2", "TRUE"),
        ("A3", "TRUE"),
        ("B3", "TRUE"),
    ];
    assert_eq!(cells, want.map(|(a, b)| (a.to_string(), b.to_string())));
}

#[test]
fn a_cell_changed_elsewhere_wins_over_the_preserved_input() {
    // The preserved input is used only while the cell holds what was exported.
    let mut s = Sheet::new();
    s.set("A1", "4k7").unwrap();
    s.set("A2", "=FEEDBACK.GAIN(1e5; 0.01)").unwrap();
    let ods = String::from_utf8_lossy(&export_ods(&s, &options()).unwrap()).len();
    assert!(ods > 0);
    let bytes = export_xlsx(&s, &options()).unwrap();
    let mut zip = zip::ZipArchive::new(Cursor::new(&bytes[..])).unwrap();
    let mut parts: Vec<(String, Vec<u8>)> = Vec::new();
    for i in 0..zip.len() {
        let mut f = zip.by_index(i).unwrap();
        let mut b = Vec::new();
        std::io::Read::read_to_end(&mut f, &mut b).unwrap();
        // The user typed 5k6 over A1 in another program: its value is now 5600.
        if f.name() == "xl/worksheets/sheet2.xml" {
            b = String::from_utf8(b)
                .unwrap()
                .replace("<v>4700</v>", "<v>5600</v>")
                .into_bytes();
        }
        parts.push((f.name().to_string(), b));
    }
    let refs: Vec<(&str, &[u8])> = parts
        .iter()
        .map(|(n, b)| (n.as_str(), b.as_slice()))
        .collect();
    let got = import_xlsx(&archive(&refs)).unwrap();
    assert_eq!(got.contents.cells[0].1, "5600");
    assert_eq!(got.contents.cells[1].1, "=FEEDBACK.GAIN(1e5; 0.01)");
}

#[test]
fn malformed_files_are_refused_with_the_reason() {
    let mut s = Sheet::new();
    s.set("A1", "1").unwrap();
    for (format, export, import) in FORMATS {
        let bytes = export(&s, &options()).unwrap();
        // Truncated: the central directory at the end is gone.
        let e = import(&bytes[..bytes.len() / 2]).unwrap_err();
        assert_eq!(e.kind, FileErrorKind::Archive, "{format}: {e}");
        assert_eq!(
            import(b"not a zip at all").unwrap_err().kind,
            FileErrorKind::Archive,
            "{format}"
        );
        // An archive without the parts the format needs.
        let e = import(&archive(&[("readme.txt", b"hello")])).unwrap_err();
        assert_eq!(e.kind, FileErrorKind::MissingPart, "{format}: {e}");
        assert!(e.message.contains("is missing"), "{format}: {e}");
    }
    // Not well-formed XML.
    let e = import_ods(&ods_with("<table:table-row><table:table-cell>")).unwrap_err();
    assert_eq!(e.kind, FileErrorKind::Malformed, "{e}");
    // A number that is no number.
    let e = import_ods(&ods_with(r#"<table:table-row><table:table-cell office:value-type="float" office:value="1e999"/></table:table-row>"#)).unwrap_err();
    assert!(e.message.contains("not a finite number"), "{e}");
}

#[test]
fn an_unreadable_formula_is_reported_by_sheet_and_cell_and_its_value_kept() {
    let bytes = ods_with(
        r#"<table:table-row><table:table-cell/><table:table-cell table:formula="of:=1+*2" office:value-type="float" office:value="3"/><table:table-cell table:formula="of:=[$Other.A1]" office:value-type="float" office:value="7"/></table:table-row>"#,
    );
    let got = import_ods(&bytes).unwrap();
    assert_eq!(
        got.contents
            .cells
            .iter()
            .map(|(_, i)| i.as_str())
            .collect::<Vec<_>>(),
        ["3", "7"]
    );
    assert_eq!(got.problems.len(), 2, "{:?}", got.problems);
    assert!(
        got.problems[0]
            .starts_with("sheet \"Sheet1\", cell B1: the formula \"1+*2\" does not read"),
        "{:?}",
        got.problems
    );
    assert!(
        got.problems[1].contains("cell C1") && got.problems[1].contains("another sheet"),
        "{:?}",
        got.problems
    );
}

#[test]
fn huge_sheets_and_zip_bombs_stop_at_the_limits() {
    // A million repeated rows of four cells with a value: over MAX_FILE_CELLS.
    let rows = r#"<table:table-row table:number-rows-repeated="1000000"><table:table-cell table:number-columns-repeated="4" office:value-type="float" office:value="1"/></table:table-row>"#;
    let e = import_ods(&ods_with(rows)).unwrap_err();
    assert_eq!(e.kind, FileErrorKind::TooLarge, "{e}");
    assert!(e.message.contains(&MAX_FILE_CELLS.to_string()), "{e}");
    // Repeated empty rows cost nothing (a program writes them to the last row).
    let empty = r#"<table:table-row table:number-rows-repeated="1048575"><table:table-cell/></table:table-row>"#;
    assert!(import_ods(&ods_with(empty))
        .unwrap()
        .contents
        .cells
        .is_empty());
    // 100 MB of spaces deflate to about 100 KB: refused while unpacking.
    let bomb = vec![b' '; 100 * 1024 * 1024];
    let e = import_ods(&archive(&[("content.xml", &bomb)])).unwrap_err();
    assert_eq!(e.kind, FileErrorKind::TooLarge, "{e}");
}

#[test]
fn csv_and_tsv_values_come_in_as_values() {
    // RFC 4180 quoting; a field beginning with = is text, never a formula.
    let got = import_delimited("4k7,\"=1+1\",TRUE\r\n-3,\"a,b\",#N/A\r\n", b',').unwrap();
    let inputs: Vec<&str> = got.contents.cells.iter().map(|(_, i)| i.as_str()).collect();
    assert_eq!(inputs, ["4k7", "'=1+1", "TRUE", "-3", "a,b", "#N/A"]);
    let tsv = import_delimited("1\t2\n3\t\n", b'\t').unwrap();
    assert_eq!(tsv.contents.cells.len(), 3);
}
