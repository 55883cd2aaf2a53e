//! The sheet document: save → load → save byte-identical for a sheet using every
//! feature; refusals leave the sheet untouched; CSV and TSV.

use loopwright::sheet::document::{from_document, range_to_tsv, to_csv};
use loopwright::sheet::{CellRef, ErrorKind, Range, Sheet, Value};

fn c(s: &str) -> CellRef {
    CellRef::parse(s).unwrap()
}

/// A sheet with numbers, engineering literals with units, text with quotes,
/// tabs, newlines and non-ASCII, truth values, error literals, formulas of every
/// operator, ranges, absolute references, names, a spill, a blocked spill, a
/// circular reference, a syntax error and a far-away cell.
fn every_feature() -> Sheet {
    let mut s = Sheet::new();
    let inputs = [
        ("A1", "100k"),
        ("A2", "0.01"),
        ("A3", "4k7Ω"),
        ("A4", "2R2"),
        ("A5", "R47"),
        ("A6", "10 kHz"),
        ("A7", "-3 dB"),
        ("A8", "50%"),
        ("B1", "=FEEDBACK.GAIN(gain; beta)"),
        ("B2", "=FEEDBACK.CEILING(A1; 100)"),
        ("B3", "=FEEDBACK.SPREAD(beta; 50k; 100k; 200k)"),
        ("C3", "blocks the spill of B3"),
        ("B4", "=SUM($A$1:A2; A3) & \" Ω\""),
        ("B5", "=IF(A2>0.005; \"enough\"; \"low\")"),
        ("B6", "=-2^2 + 10%% - (1/0)"),
        ("B7", "=B8+1"),
        ("B8", "=B7+1"),
        ("B9", "=1+(2"),
        ("B10", "=A1:A3*2"),
        ("D1", "say \"hi\"\tand\nmore — µΩ ✓"),
        ("D2", "TRUE"),
        ("D3", "#N/A"),
        ("D4", "'=not a formula"),
        ("D5", "=AND(D2; NOT(FALSE); OR(A1>1; 0))"),
        ("D6", "=ROUND(PI()*1e6; -3) / DB.VOLTAGERATIO(A7)"),
        ("XFD1048576", "=D6"),
    ];
    for (a, input) in inputs {
        s.set(a, input).unwrap();
    }
    s.set_name("gain", c("A1")).unwrap();
    s.set_name("beta", c("A2")).unwrap();
    s.set_name("_spare.value", c("Z9")).unwrap();
    s
}

#[test]
fn save_load_save_is_byte_identical() {
    let s = every_feature();
    let first = s.save_document();
    let mut t = Sheet::new();
    t.set("Q1", "something to replace").unwrap();
    t.load_document(&first).unwrap();
    let second = t.save_document();
    assert_eq!(first, second);
    // Loading recomputes every value to the same result.
    let used = s.used_range().unwrap();
    assert_eq!(t.used_range(), Some(used));
    for (cell, _) in s.inputs() {
        assert_eq!(s.shown(cell), t.shown(cell), "{cell}");
    }
    assert_eq!(t.input(c("Q1")), None);
    // And nothing is lost: every input and name is there.
    assert_eq!(
        s.inputs().collect::<Vec<_>>(),
        t.inputs().collect::<Vec<_>>()
    );
    assert_eq!(s.names().collect::<Vec<_>>(), t.names().collect::<Vec<_>>());
}

#[test]
fn the_features_evaluate_as_intended() {
    let s = every_feature();
    let kind = |a: &str| match s.shown(c(a)) {
        Value::Error(e) => Some(e.kind),
        _ => None,
    };
    // 100000/(1 + 100000·0.01), by hand.
    assert_eq!(s.shown(c("B1")), Value::Number(1e5 / 1001.0, None));
    assert_eq!(s.shown(c("C2")), Value::Number(0.00099, None));
    assert_eq!(kind("B3"), Some(ErrorKind::Blocked));
    assert_eq!(kind("B6"), Some(ErrorKind::DivZero));
    assert_eq!(kind("B7"), Some(ErrorKind::Cycle));
    assert_eq!(kind("B8"), Some(ErrorKind::Cycle));
    assert_eq!(kind("B9"), Some(ErrorKind::Syntax));
    assert_eq!(kind("D3"), Some(ErrorKind::NotAvailable));
    assert_eq!(s.shown(c("D4")), Value::Text("=not a formula".into()));
    assert_eq!(s.shown(c("B5")), Value::Text("enough".into()));
    assert_eq!(s.shown(c("D5")), Value::Bool(true));
    // A1:A3*2 spills down three rows; A3 keeps its unit through * 2.
    assert_eq!(s.spill_range(c("B10")), Range::parse("B10:B12"));
    assert_eq!(
        s.shown(c("B12")),
        Value::Number(9400.0, Some(loopwright::sheet::Unit::Ohm))
    );
}

#[test]
fn the_document_layout_is_stable() {
    let mut s = Sheet::new();
    s.set("B2", "=A1*2").unwrap();
    s.set("A1", "4k7").unwrap();
    s.set_name("r_load", c("A1")).unwrap();
    let expected = "{\n  \"format\": \"loopwright-sheet\",\n  \"version\": 1,\n  \"cells\": {\n    \"A1\": \"4k7\",\n    \"B2\": \"=A1*2\"\n  },\n  \"names\": {\n    \"r_load\": \"A1\"\n  }\n}\n";
    assert_eq!(s.save_document(), expected);
    let empty = Sheet::new().save_document();
    assert_eq!(empty, "{\n  \"format\": \"loopwright-sheet\",\n  \"version\": 1,\n  \"cells\": {},\n  \"names\": {}\n}\n");
}

#[test]
fn refused_documents_leave_the_sheet_as_it_was() {
    let mut s = every_feature();
    let before = s.save_document();
    let newer = before.replace("\"version\": 1", "\"version\": 2");
    let e = s.load_document(&newer).unwrap_err();
    assert!(
        e.message.contains("newer loopwright (document version 2)"),
        "{e}"
    );
    for bad in [
        String::from("not json"),
        before.replace("\"cells\"", "\"cels\""),
        before.replace("\"A1\": \"100k\"", "\"A1\": \"\""),
        before.replace("loopwright-sheet", "some-other-format"),
        before.replace("\"gain\": \"A1\"", "\"gain\": \"A1\", \"GAIN\": \"A2\""),
        before[..before.len() / 2].to_string(),
    ] {
        let e = s.load_document(&bad).unwrap_err();
        assert!(!e.message.is_empty());
        assert_eq!(s.save_document(), before, "after refusing: {}", e.message);
    }
    assert!(from_document(&before).is_ok());
}

#[test]
fn csv_of_values() {
    let mut s = Sheet::new();
    s.set("A1", "4k7Ω").unwrap();
    s.set("B1", "a,b").unwrap();
    s.set("A2", "say \"x\"").unwrap();
    s.set("C2", "=1/0").unwrap();
    s.set("B3", "=1>0").unwrap();
    // RFC 4180 §2: CRLF line ends, fields with , or " quoted, " doubled.
    assert_eq!(
        to_csv(&s),
        "4700,\"a,b\",\r\n\"say \"\"x\"\"\",,#DIV/0!\r\n,TRUE,\r\n"
    );
    assert_eq!(to_csv(&Sheet::new()), "");
}

#[test]
fn tsv_round_trip_between_ranges() {
    let mut s = Sheet::new();
    s.set("A1", "1.5").unwrap();
    s.set("B1", "two\twords").unwrap();
    s.set("A2", "=A1*2").unwrap();
    s.set("B2", "line\nbreak").unwrap();
    let tsv = range_to_tsv(&s, Range::parse("A1:B2").unwrap()).unwrap();
    assert_eq!(tsv, "1.5\t\"two\twords\"\n3\t\"line\nbreak\"\n");
    let changed = s.paste_tsv(c("D5"), &tsv).unwrap().to_vec();
    assert_eq!(changed.len(), 4);
    assert_eq!(s.shown(c("D5")), Value::Number(1.5, None));
    assert_eq!(s.shown(c("E5")), Value::Text("two\twords".into()));
    assert_eq!(s.shown(c("D6")), Value::Number(3.0, None));
    assert_eq!(s.shown(c("E6")), Value::Text("line\nbreak".into()));
    // A paste that would pass the sheet's edge sets nothing.
    let before = s.save_document();
    assert!(s.paste_tsv(c("XFD1"), "1\t2").is_err());
    assert_eq!(s.save_document(), before);
}

#[test]
fn exports_neutralise_formula_injection_and_keep_numbers() {
    // Formula injection (common practice, no source): text beginning with =, +, -,
    // @, tab or CR is written with an apostrophe in front; numbers, negative ones
    // too, stay numbers. RFC 4180 section 2, rule 7: quotes inside are doubled.
    let mut s = Sheet::new();
    s.set("A1", "'=HYPERLINK(\"http://x\";\"y\")").unwrap();
    s.set("B1", "-2.5").unwrap();
    s.set("C1", "'-2+3").unwrap();
    s.set("D1", "'@SUM(A1)").unwrap();
    s.set("E1", "=-1/4").unwrap();
    assert_eq!(
        to_csv(&s),
        "\"'=HYPERLINK(\"\"http://x\"\";\"\"y\"\")\",-2.5,'-2+3,'@SUM(A1),-0.25\r\n"
    );
    let tsv = range_to_tsv(&s, Range::parse("A1:E1").unwrap()).unwrap();
    assert_eq!(
        tsv,
        "\"'=HYPERLINK(\"\"http://x\"\";\"\"y\"\")\"\t-2.5\t'-2+3\t'@SUM(A1)\t-0.25\n"
    );
    // Pasted back into a sheet, the apostrophe makes the same text cells again.
    s.paste_tsv(c("A3"), &tsv).unwrap();
    for col in ["A", "C", "D"] {
        assert_eq!(
            s.shown(c(&format!("{col}3"))),
            s.shown(c(&format!("{col}1")))
        );
    }
    assert_eq!(s.shown(c("B3")), Value::Number(-2.5, None));
}

#[test]
fn a_refused_paste_leaves_the_sheet_as_it_was() {
    use loopwright::sheet::document::{MAX_PASTE_BYTES, MAX_PASTE_CELLS};
    let mut s = Sheet::new();
    s.set("A1", "4k7").unwrap();
    s.set("A2", "=A1*2").unwrap();
    let before = s.save_document();
    for (text, param) in [
        ("\t".repeat(MAX_PASTE_BYTES + 1), "text"),
        // One row of 100 001 fields: longer than a row may be (csv::MAX_FIELDS).
        ("\t".repeat(MAX_PASTE_CELLS), "text"),
        ("1\n".repeat(MAX_PASTE_CELLS + 1), "range"),
    ] {
        let e = s.paste_tsv(c("A3"), &text).unwrap_err();
        assert_eq!((e.code(), e.param()), ("too_large", param));
        assert_eq!(s.save_document(), before);
        assert_eq!(s.shown(c("A2")), Value::Number(9400.0, None));
    }
}
