//! The worksheet engine through its JS boundary, in a real browser: a sheet
//! created, edited and recalculated, values and error values as plain objects,
//! changed cells, spills, names, the document, CSV/TSV, the catalog.
#![cfg(target_arch = "wasm32")]

use js_sys::{Array, JSON};
use loopwright::wasm::sheet::{error_values, function_catalog, Worksheet};
use wasm_bindgen::{JsCast, JsValue};
use wasm_bindgen_test::*;

wasm_bindgen_test_configure!(run_in_browser);

#[path = "support/js.rs"]
mod js;
use js::{assert_thrown, field, num, text};

fn strings(a: &Array) -> Vec<String> {
    a.iter().map(|v| v.as_string().unwrap()).collect()
}

#[wasm_bindgen_test]
fn a_design_follows_one_edit() {
    let mut ws = Worksheet::new();
    ws.set_cell("A1", "100k").unwrap();
    ws.set_cell("A2", "=FEEDBACK.BETA(A1; 100)").unwrap();
    ws.set_cell("A3", "=FEEDBACK.GAIN(A1; A2)").unwrap();
    ws.set_cell("A4", "=FEEDBACK.AMOUNTDB(A1; A2)").unwrap();
    let a3 = ws.value("A3").unwrap();
    assert_eq!(text(&a3, "kind"), "number");
    // β = 1/100 − 1/100000 gives Af = 100 back (inverse design identity).
    assert!((num(&a3, "number") - 100.0).abs() < 1e-9);
    assert_eq!(text(&a3, "input"), "=FEEDBACK.GAIN(A1; A2)");
    let a4 = ws.value("A4").unwrap();
    assert_eq!(text(&a4, "unit"), "dB");
    // 20·log10(1000) = 60 dB: D = A/Af = 1000.
    assert!((num(&a4, "number") - 60.0).abs() < 1e-9);

    let changed = strings(&ws.set_cell("A1", "1M").unwrap());
    assert!(changed.contains(&"A1".to_string()) && changed.contains(&"A2".to_string()));
    assert!(changed.contains(&"A4".to_string()));
    assert_eq!(strings(&ws.changed_cells()), changed);
    // 20·log10(10000) = 80 dB with A = 1 M.
    assert!((num(&ws.value("A4").unwrap(), "number") - 80.0).abs() < 1e-9);
}

#[wasm_bindgen_test]
fn error_values_carry_their_explanation() {
    let mut ws = Worksheet::new();
    ws.set_cell("B1", "=1/0").unwrap();
    ws.set_cell("B2", "=\"volts\"*2").unwrap();
    ws.set_cell("B3", "=1+(2").unwrap();
    ws.set_cell("B4", "=B5").unwrap();
    ws.set_cell("B5", "=B4").unwrap();
    let cases = [
        ("B1", "#DIV/0!"),
        ("B2", "#VALUE!"),
        ("B3", "#SYNTAX!"),
        ("B4", "#CYCLE!"),
        ("B5", "#CYCLE!"),
    ];
    for (a, code) in cases {
        let v = ws.value(a).unwrap();
        assert_eq!(text(&v, "kind"), "error", "{a}");
        assert_eq!(text(&v, "error"), code, "{a}");
        assert_eq!(text(&v, "display"), code, "{a}");
        assert!(!text(&v, "message").is_empty(), "{a}");
    }
    assert!(text(&ws.value("B3").unwrap(), "message").contains("column 6"));
    let list: Array = error_values().unwrap().dyn_into().unwrap();
    assert_eq!(list.length(), 9);
    assert_eq!(text(&list.get(0), "code"), "#DIV/0!");
    assert_thrown(ws.set_cell("A0", "1"), "out_of_domain", "cell");
    assert_thrown(ws.value("not a cell"), "out_of_domain", "cell");
}

#[wasm_bindgen_test]
fn spills_names_and_ranges() {
    let mut ws = Worksheet::new();
    ws.set_cell("A1", "100k").unwrap();
    ws.set_name("gain", "A1").unwrap();
    ws.set_cell("C1", "=FEEDBACK.CEILING(gain; 100)").unwrap();
    assert_eq!(text(&ws.value("C1").unwrap(), "spill"), "C1:D1");
    // A/D = 1000 and (D − 1)/A = 0.00099 with A = 100 000, D = 100.
    assert_eq!(num(&ws.value("D1").unwrap(), "number"), 0.00099);
    assert_eq!(text(&ws.value("D1").unwrap(), "spilledFrom"), "C1");
    assert!(field(&ws.value("C1").unwrap(), "spilledFrom").is_null());
    ws.set_cell("D1", "in the way").unwrap();
    assert_eq!(text(&ws.value("C1").unwrap(), "error"), "#BLOCKED!");
    let rows: Array = ws.values("C1:D1").unwrap().dyn_into().unwrap();
    let row: Array = rows.get(0).dyn_into().unwrap();
    assert_eq!(text(&row.get(1), "text"), "in the way");
    assert_eq!(text(&ws.names().unwrap(), "gain"), "A1");
    ws.remove_name("gain");
    ws.set_cell("D1", "").unwrap();
    assert_eq!(text(&ws.value("C1").unwrap(), "error"), "#NAME?");
    assert_thrown(ws.set_name("B2", "A1"), "out_of_domain", "name");
}

#[wasm_bindgen_test]
fn names_object_lists_names_in_byte_order() {
    let mut ws = Worksheet::new();
    for (name, cell) in [
        ("gain", "A1"),
        ("Rload", "B2"),
        ("beta", "A3"),
        ("Zout", "C4"),
    ] {
        ws.set_name(name, cell).unwrap();
    }
    // Keys in byte order of the name as written (upper case before lower case), the
    // order the object had when it was a serialized BTreeMap.
    let json = JSON::stringify(&ws.names().unwrap()).unwrap();
    assert_eq!(
        String::from(json),
        r#"{"Rload":"B2","Zout":"C4","beta":"A3","gain":"A1"}"#
    );
    assert_eq!(
        String::from(JSON::stringify(&Worksheet::new().names().unwrap()).unwrap()),
        "{}"
    );
}

#[wasm_bindgen_test]
fn document_round_trip_and_refusal() {
    let mut ws = Worksheet::new();
    ws.set_cell("A1", "4k7Ω").unwrap();
    ws.set_cell("A2", "=A1*2").unwrap();
    ws.set_cell("B1", "text with \"quotes\"").unwrap();
    ws.set_name("r_top", "A1").unwrap();
    let doc = ws.save_document();
    let parsed = JSON::parse(&doc).unwrap();
    assert_eq!(text(&parsed, "format"), "loopwright-sheet");
    assert_eq!(num(&parsed, "version"), 1.0);

    let mut other = Worksheet::new();
    let changed = strings(&other.load_document(&doc).unwrap());
    assert_eq!(changed, ["A1", "B1", "A2"]);
    assert_eq!(other.save_document(), doc);
    assert_eq!(num(&other.value("A2").unwrap(), "number"), 9400.0);

    let newer = doc.replace("\"version\": 1", "\"version\": 7");
    let e = other.load_document(&newer).unwrap_err();
    assert_eq!(text(&e, "code"), "bad_document");
    assert!(text(&e, "message").contains("version 7"));
    assert_eq!(other.save_document(), doc);

    // RFC 4180 §2: a field holding quotes is quoted, its quotes doubled.
    assert_eq!(
        other.to_csv(),
        "4700,\"text with \"\"quotes\"\"\"\r\n9400,\r\n"
    );
    let tsv = other.range_to_tsv("A1:A2").unwrap();
    assert_eq!(tsv, "4700\n9400\n");
    let pasted = strings(&other.paste_tsv("C1", JsValue::from_str(&tsv)).unwrap());
    assert_eq!(pasted, ["C1", "C2"]);
    // A paste above 16 MiB is refused on its JS length, and the sheet stays as it was.
    let before = other.save_document();
    let huge = JsValue::from_str(&"\t".repeat(16 * 1024 * 1024 + 1));
    let e = other.paste_tsv("A3", huge).unwrap_err();
    assert_eq!(
        (text(&e, "code"), text(&e, "param")),
        ("too_large".into(), "text".into())
    );
    assert_eq!(other.save_document(), before);
    assert_eq!(num(&other.value("A2").unwrap(), "number"), 9400.0);
}

#[wasm_bindgen_test]
fn the_catalog_is_json_with_examples() {
    let catalog = JSON::parse(&function_catalog()).unwrap();
    assert_eq!(text(&catalog, "format"), "loopwright-functions");
    let list: Array = field(&catalog, "functions").dyn_into().unwrap();
    assert!(list.length() >= 30);
    let mut ws = Worksheet::new();
    // Evaluate every single-number example through the JS API too.
    for f in list.iter() {
        let example = Array::from(&field(&f, "examples")).get(0);
        let expected = field(&example, "expected");
        let Ok(arr) = expected.dyn_into::<Array>() else {
            continue;
        };
        if arr.length() != 1 {
            continue;
        }
        let want = arr.get(0).as_f64().unwrap();
        ws.set_cell("A1", &text(&example, "formula")).unwrap();
        let got = num(&ws.value("A1").unwrap(), "number");
        // Stated to 16 significant digits in the catalog; a value the core finds by
        // a search or by sampling carries its own tolerance there.
        let tol = Array::from(&field(&example, "tolerance"))
            .get(0)
            .as_f64()
            .unwrap_or(0.0)
            .max(1e-13);
        assert!(
            (got - want).abs() <= tol * want.abs(),
            "{}: {got} vs {want}",
            text(&f, "name")
        );
    }
}

#[wasm_bindgen_test]
fn area_functions_spill_and_explain_errors() {
    let mut ws = Worksheet::new();
    ws.set_cell("A1", "1 kHz").unwrap();
    ws.set_cell("A2", "100 kHz").unwrap();
    ws.set_cell("C1", "=FREQ.POLES(1000; 0.1; A1:A2)").unwrap();
    // Two closed-loop poles, four columns each.
    assert_eq!(text(&ws.value("C1").unwrap(), "spill"), "C1:F2");
    // σ/2π = −(f1 + f2)/2 for both poles of the pair (closed form).
    // The roots come from an iteration: agreement to 1e-12.
    let sigma = num(&ws.value("C2").unwrap(), "number");
    assert!((sigma + 50_500.0).abs() <= 1e-12 * 50_500.0, "{sigma}");
    assert_eq!(text(&ws.value("F2").unwrap(), "spilledFrom"), "C1");
    ws.set_cell("B5", "-4k7").unwrap();
    ws.set_cell("C5", "=NOISE.THERMAL(B5; 300)").unwrap();
    let v = ws.value("C5").unwrap();
    assert_eq!(text(&v, "error"), "#NUM!");
    assert!(
        text(&v, "message").starts_with("NOISE.THERMAL: r: "),
        "{}",
        text(&v, "message")
    );
}
