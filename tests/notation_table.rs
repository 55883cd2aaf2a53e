//! The shared table of typed values (tests/fixtures/notation_cases.json) through
//! the core reader, the worksheet, and the documentation's example list.
//!
//! Expected values are the decimals as the standards define them: SI Brochure
//! (BIPM, 9th ed., 2019), table 7 for the prefixes and §5.4.3/§5.4.7 for the
//! space before a unit and before %; IEC 60062:2016, clause 4, for the letter
//! codes (from memory). A value is compared exactly: the reader must give the
//! double nearest the written decimal, as the platform's correctly rounded
//! decimal conversion of the table's text does.
#![cfg(not(target_arch = "wasm32"))]

#[path = "support/notation_table.rs"]
mod table;

use loopwright::notation::{read, read_list, ReadOptions, Unit};
use loopwright::sheet::{ErrorKind, Sheet, Value};
use table::{cases, Case, Expected};

fn options(c: &Case) -> ReadOptions {
    ReadOptions {
        percent: c.percent,
        decibels: c.decibels,
        unit: c
            .unit
            .as_deref()
            .map(|u| Unit::from_word(u).expect("a known unit")),
    }
}

fn outcome(c: &Case) -> Expected {
    let o = options(c);
    let result = if c.list {
        read_list(&c.text, &o).map(|v| Expected::List(v.iter().map(|r| r.value).collect()))
    } else {
        read(&c.text, &o).map(|r| Expected::Value(r.value, r.unit.map(|u| u.symbol().to_string())))
    };
    result.unwrap_or_else(|e| Expected::Error(e.code().to_string(), e.column()))
}

#[test]
fn the_table_has_at_least_80_cases_and_each_reads_as_stated() {
    let all = cases();
    assert!(all.len() >= 80, "{} cases", all.len());
    let mut failures = Vec::new();
    for c in &all {
        let got = outcome(c);
        if got != c.expected {
            failures.push(format!("{:?}: got {got:?}, want {:?}", c.text, c.expected));
        }
    }
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

#[test]
fn a_worksheet_cell_reads_the_same() {
    // A cell allows dB and %; every case with those options or none (a value the
    // cell must read the same way) goes through Sheet::set.
    for c in cases() {
        let cell_options = c.percent && c.decibels && c.unit.is_none();
        let plain = !c.percent && !c.decibels && c.unit.is_none();
        if c.list || !(cell_options || plain) || c.text.trim().is_empty() {
            continue;
        }
        let mut s = Sheet::new();
        s.set("A1", &c.text).unwrap();
        let shown = s.value("A1").unwrap();
        match (&c.expected, &shown) {
            (Expected::Value(v, unit), Value::Number(x, u)) => {
                assert_eq!(x, v, "{:?}", c.text);
                assert_eq!(u.map(|u| u.symbol()), unit.as_deref(), "{:?}", c.text);
            }
            (Expected::Error(..), Value::Error(e)) if cell_options => {
                assert_eq!(e.kind, ErrorKind::Syntax, "{:?}", c.text);
            }
            (Expected::Error(..), Value::Text(_)) if cell_options => {
                let t = c.text.trim_start();
                assert!(
                    !t.starts_with(|ch: char| ch.is_ascii_digit()),
                    "{:?} is text",
                    c.text
                );
            }
            // dB and % are allowed in a cell but not for a plain value.
            (Expected::Error(..), _) if plain => {}
            (want, got) => panic!("{:?}: cell {got:?}, want {want:?}", c.text),
        }
    }
}

fn shown_text(text: &str) -> String {
    if text.is_empty() {
        return "(empty)".to_string();
    }
    let visible: String = text
        .chars()
        .map(|ch| match ch {
            '\u{a0}' => '⍽',
            ch => ch,
        })
        .collect();
    format!("`{}`", visible.replace('|', "\\|"))
}

fn shown_options(c: &Case) -> String {
    let mut parts = Vec::new();
    if c.list {
        parts.push("list".to_string());
    }
    if c.percent {
        parts.push("%".to_string());
    }
    if c.decibels {
        parts.push("dB".to_string());
    }
    if let Some(u) = &c.unit {
        parts.push(format!("in {u}"));
    }
    parts.join(", ")
}

fn shown_expected(c: &Case) -> String {
    match &c.expected {
        Expected::Value(_, Some(u)) => format!("{} {u}", c.written),
        Expected::Value(_, None) | Expected::List(_) => c.written.clone(),
        Expected::Error(code, Some(col)) => format!("error `{code}`, column {col}"),
        Expected::Error(code, None) => format!("error `{code}`"),
    }
}

/// The documentation's example list, rendered from the table.
fn rendered() -> String {
    let mut out = String::from("| input | allowed | reads as | note |\n|---|---|---|---|\n");
    for c in cases() {
        out.push_str(&format!(
            "| {} | {} | {} | {} |\n",
            shown_text(&c.text),
            shown_options(&c),
            shown_expected(&c),
            c.note
        ));
    }
    out
}

#[test]
fn the_documentation_lists_the_table() {
    const BEGIN: &str = "<!-- notation-cases:begin (generated from tests/fixtures/notation_cases.json by tests/notation_table.rs) -->\n";
    const END: &str = "<!-- notation-cases:end -->";
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/docs/notation.md");
    let doc = std::fs::read_to_string(path).expect("docs/notation.md");
    let start = doc.find(BEGIN).expect("the begin marker") + BEGIN.len();
    let end = doc.find(END).expect("the end marker");
    let want = rendered();
    if std::env::var_os("LOOPWRIGHT_WRITE_DOCS").is_some() {
        let updated = format!("{}{want}{}", &doc[..start], &doc[end..]);
        std::fs::write(path, updated).expect("write docs/notation.md");
        return;
    }
    assert_eq!(
        &doc[start..end],
        want,
        "docs/notation.md is out of date: run LOOPWRIGHT_WRITE_DOCS=1 cargo test --test notation_table"
    );
}

mod properties {
    use loopwright::notation::{read, read_list, scan, ReadOptions};
    use proptest::prelude::*;

    /// Texts built from the characters the reader treats specially, so that
    /// most draws come close to a value.
    fn near_values() -> impl Strategy<Value = String> {
        proptest::collection::vec(
            prop::sample::select(vec![
                "0", "1", "4", "7", "9", ".", "e", "E", "-", "+", "−", " ", " ", "k", "K", "M",
                "m", "µ", "u", "n", "p", "f", "G", "T", "R", "F", "Ω", "Ω", "ohm", "s", "S", "Hz",
                "H", "V", "A", "W", "dB", "%", ",", ";", "x", "eg", "\u{a0}",
            ]),
            0..12,
        )
        .prop_map(|parts| parts.concat())
    }

    proptest! {
        #![proptest_config(ProptestConfig { cases: 4000, rng_seed: proptest::test_runner::RngSeed::Fixed(60062), ..ProptestConfig::default() })]

        #[test]
        fn never_panics_and_errors_point_inside_the_text(text in near_values()) {
            let chars = text.chars().count() as u32;
            for options in [ReadOptions::VALUE, ReadOptions::CELL] {
                match read(&text, &options) {
                    Ok(r) => prop_assert!(r.value.is_finite()),
                    Err(e) => {
                        if let Some(col) = e.column() {
                            prop_assert!((1..=chars + 1).contains(&col), "{text:?} → {col}");
                        }
                    }
                }
                let _ = read_list(&text, &options);
            }
            if text.starts_with(|c: char| c.is_ascii_digit()) {
                if let Ok((r, used)) = scan(&text, &ReadOptions::FORMULA) {
                    prop_assert!(r.value.is_finite() && used <= text.len() && text.is_char_boundary(used));
                }
            }
        }

        #[test]
        fn a_whole_text_that_reads_reads_the_same_inside_a_formula(text in near_values()) {
            // A value that reads as a whole text without % reads the same as a
            // formula literal, which then takes all of it.
            if text.starts_with(|c: char| c.is_ascii_digit()) && !text.contains(['%', ' ', '\u{a0}']) {
                if let Ok(r) = read(&text, &ReadOptions::FORMULA) {
                    let (s, used) = scan(&text, &ReadOptions::FORMULA).unwrap();
                    prop_assert_eq!((s.value, s.unit, used), (r.value, r.unit, text.len()));
                }
            }
        }
    }
}
