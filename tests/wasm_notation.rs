//! The shared table of typed values (tests/fixtures/notation_cases.json) through
//! the JS boundary in a real browser: `readValue` and `readList` (behind the
//! entry module's `parseValue(text, options)` and `parseList(text, options)`),
//! each refusal a LoopwrightError with `code`, `param` and `column`; and the one
//! display, `formatValue`, `formatFull`, `formatSi`.
//!
//! Expected values: as in tests/notation_table.rs (SI Brochure, BIPM, 9th ed.,
//! 2019, table 7 and §5.4.3/§5.4.7; IEC 60062:2016 clause 4, from memory), read
//! by the browser's own correctly rounded decimal conversion (`Number(text)`).
#![cfg(target_arch = "wasm32")]

use js_sys::Float64Array;
use loopwright::wasm::notation as api;
use wasm_bindgen::{JsCast, JsValue};
use wasm_bindgen_test::*;

wasm_bindgen_test_configure!(run_in_browser);

#[path = "support/js.rs"]
mod js;
use js::{assert_thrown, checked, field, text};

#[path = "support/notation_table.rs"]
mod table;
use table::{cases, Expected};

/// The browser's decimal conversion of the table's text (an oracle independent of
/// the Rust reader).
fn browser_number(written: &str) -> f64 {
    js_sys::Number::from(JsValue::from_str(written)).value_of()
}

fn error_of(e: &JsValue) -> Expected {
    let column = field(e, "column").as_f64().map(|c| c as u32);
    Expected::Error(text(e, "code"), column)
}

#[wasm_bindgen_test]
fn every_case_of_the_shared_table() {
    let all = cases();
    assert!(all.len() >= 80);
    for c in all {
        let flags =
            u32::from(c.percent) * api::ALLOW_PERCENT + u32::from(c.decibels) * api::ALLOW_DECIBELS;
        let unit = c.unit.clone().unwrap_or_default();
        let got = if c.list {
            match api::read_list(&c.text, flags, &unit) {
                Ok(a) => Expected::List(a.to_vec()),
                Err(e) => error_of(&e),
            }
        } else {
            match checked(api::read_value(&c.text, flags, &unit)) {
                // The unit symbol is the native test's business; here the value.
                Ok(v) => Expected::Value(v, None),
                Err(e) => error_of(&e),
            }
        };
        let want = match &c.expected {
            Expected::Value(_, _) => Expected::Value(browser_number(&c.written), None),
            Expected::List(_) => {
                let items = c.written.trim_matches(['[', ']']);
                Expected::List(if items.is_empty() {
                    Vec::new()
                } else {
                    items.split(", ").map(browser_number).collect()
                })
            }
            e => e.clone(),
        };
        assert_eq!(got, want, "{:?}", c.text);
    }
}

#[wasm_bindgen_test]
fn refusals_are_loopwright_errors_naming_text() {
    let e = checked(api::read_value("4k7k", 0, "")).unwrap_err();
    let e = assert_thrown(Err::<(), _>(e), "syntax", "text");
    assert_eq!(field(&e, "column").as_f64(), Some(4.0));
    assert_thrown(api::read_list("1, , 2", 0, ""), "syntax", "text");
    assert_thrown(
        checked(api::read_value("1", 0, "furlong")),
        "unknown_name",
        "unit",
    );
    assert_thrown(
        checked(api::read_value("1", 8, "")),
        "out_of_domain",
        "flags",
    );
    let list: JsValue = api::read_list("1, 2", 0, "").unwrap().into();
    assert!(list.is_instance_of::<Float64Array>());
}

#[wasm_bindgen_test]
fn one_display() {
    // SI Brochure, 9th ed., §5.4.3: a space between number and unit, the prefix
    // on the unit; no prefix on % (§5.4.7).
    assert_eq!(api::format_value(4700.0, "Ω", 4).unwrap(), "4.7 kΩ");
    assert_eq!(api::format_value(50_760.0, "Hz", 4).unwrap(), "50.76 kHz");
    assert_eq!(api::format_value(1e-6, "%", 3).unwrap(), "0.000001 %");
    assert_eq!(
        api::format_full(0.1 + 0.2, "").unwrap(),
        "0.30000000000000004"
    );
    // Issue 16 item 4: a subnormal returns (it hung before).
    assert_eq!(
        loopwright::wasm::network::format_si(5e-324, 3).unwrap(),
        "4.94e-324"
    );
    assert_thrown(api::format_value(f64::NAN, "", 3), "not_finite", "value");
}
