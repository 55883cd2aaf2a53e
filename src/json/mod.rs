//! The one JSON reader and writer of the crate: the sheet, circuit and stage
//! documents and the worksheet catalog all go through it.
//!
//! Written here rather than taken from a crate so the core stays `no_std` without
//! a serializer dependency, and so each document's byte layout is fixed by this
//! code alone (which is what makes a sheet's save → load → save byte-identical).
//! Measured against `serde_json` for the same job in `docs/wasm-size.md`.
//!
//! - [`parse`] reads RFC 8259 JSON text strictly (no comments, no trailing
//!   commas, no leading zeros, no lone surrogates, nesting at most
//!   [`MAX_NESTING`]) into a [`Json`] tree; object members keep their order and
//!   duplicates, so a document reader can refuse duplicates by name. A number
//!   keeps whether its text was a whole number ([`Number::whole`]), so a
//!   `version` of `1.0` or `1e0` can be told from `1`. A failure is a
//!   [`JsonError`] with the 1-based line and character column of the first
//!   character that is wrong (one past the end when the text stops early) and
//!   the JSON path of the value being read (`elements[3].value`).
//! - [`JsonWriter`] writes compact or pretty (two-space) JSON in the order the
//!   caller gives, so each document states its member order once; numbers in the
//!   shortest text that reads back to the same `f64`
//!   ([`crate::notation::write_full`]: plain digits from 10⁻⁶ to 10¹⁵, exponent
//!   form outside); strings with `"`, `\` and the control characters escaped
//!   (RFC 8259 section 7), everything else as UTF-8.
//!
//! `tests/reference/json_oracle.py` checks both against Python's `json` module.

mod read;
mod value;
mod write;

pub use read::{parse, JsonError, MAX_NESTING};
pub use value::{Json, Members, Number};
pub use write::{write_string, JsonWriter, NumberText};

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn write_then_read() {
        let mut w = JsonWriter::pretty();
        w.begin_object();
        w.key("a\"b");
        w.string("x\ny\u{1}é");
        w.key("n");
        w.begin_array();
        w.number(1.5);
        w.number(-2e-9);
        w.boolean(true);
        w.null();
        w.end_array();
        w.key("empty");
        w.begin_object();
        w.end_object();
        w.end_object();
        let text = w.finish();
        assert!(text.contains("\n  \"n\": [\n    1.5,"));
        let v = parse(&text).unwrap();
        let Json::Object(m) = v else { panic!() };
        assert_eq!(m[0], ("a\"b".into(), Json::String("x\ny\u{1}é".into())));
        assert_eq!(
            m[1].1,
            Json::Array(alloc::vec![
                Json::Number(Number {
                    value: 1.5,
                    whole: None
                }),
                Json::Number(Number {
                    value: -2e-9,
                    whole: None
                }),
                Json::Bool(true),
                Json::Null
            ])
        );
        assert_eq!(m[2].1, Json::Object(alloc::vec![]));
    }

    #[test]
    fn strictness() {
        for bad in [
            "",
            "{",
            "[1,]",
            "{\"a\":1,}",
            "01",
            "1.",
            "-",
            "\"\\x\"",
            "\"\\ud800\"",
            "nul",
            "[1] 2",
            "{a:1}",
            "1e999",
            "\"a\u{1}\"",
        ] {
            assert!(parse(bad).is_err(), "{bad:?}");
        }
        assert_eq!(
            parse("\"\\ud83d\\ude00\"").unwrap(),
            Json::String("😀".into())
        );
        let deep = alloc::format!("{}{}", "[".repeat(40), "]".repeat(40));
        assert_eq!(
            parse(&deep).unwrap_err().message,
            "nested deeper than 32 levels"
        );
        let e = parse("{\n  \"a\": x}").unwrap_err();
        assert_eq!((e.line, e.col), (2, 8));
    }

    #[test]
    fn whole_numbers_are_told_from_other_texts_of_the_same_value() {
        let whole = |t: &str| parse(t).unwrap().as_u64();
        assert_eq!(whole("1"), Some(1));
        assert_eq!(whole("18446744073709551615"), Some(u64::MAX));
        for t in ["1.0", "1e0", "-1", "0.5", "18446744073709551616"] {
            assert_eq!(whole(t), None, "{t}");
        }
        // The value itself is the nearest f64 either way.
        assert_eq!(parse("1e0").unwrap().as_f64(), Some(1.0));
        assert_eq!(
            parse("-0").unwrap().as_f64().map(f64::is_sign_negative),
            Some(true)
        );
    }

    #[test]
    fn errors_give_the_path_of_the_value_being_read() {
        let e = parse("{\"elements\": [{\"name\": \"R1\"}, {\"value\": tru}]}").unwrap_err();
        assert_eq!(
            (e.path.as_str(), e.line, e.col),
            ("elements[1].value", 1, 41)
        );
        let e = parse("[[1, 2], {\"a b\": [tru]}]").unwrap_err();
        assert_eq!(e.path, "[1][\"a b\"][0]");
        assert_eq!(parse("{\"a\": 1,}").unwrap_err().path, "");
    }

    #[test]
    fn duplicate_members_are_kept_and_found() {
        let v = parse("{\"a\": 1, \"b\": 2, \"a\": 3}").unwrap();
        let m = v.as_object().unwrap();
        assert_eq!(m.repeated(), Some("a"));
        assert_eq!(m.field("a").and_then(Json::as_f64), Some(1.0));
        assert!(m.has("b") && !m.has("c"));
    }
}
