//! The error codes the JS side can see, listed once in the TypeScript `ErrorCode`
//! type (src/wasm/mod.rs, `ERROR_TYPES`): every code the Rust side emits
//! (`Error::CODES`, plus `bad_document` of the worksheet binding) and every code the
//! entry module throws (facade/*.js, `refusal('…'`) must be in it, and it lists
//! nothing else.

use std::collections::BTreeSet;
use std::fs;

/// The quoted names between `export type ErrorCode =` and the next `;`.
fn typescript_codes() -> BTreeSet<String> {
    let source = fs::read_to_string("src/wasm/mod.rs").unwrap();
    let start = source
        .find("export type ErrorCode =")
        .expect("ErrorCode type");
    let end = start + source[start..].find(';').unwrap();
    source[start..end]
        .split('"')
        .skip(1)
        .step_by(2)
        .map(String::from)
        .collect()
}

/// The codes a source file sets on errors it makes: `refusal('code'` in the entry
/// module, `&"code".into(), &"…".into()` for a literal in a binding.
fn literal_codes(path: &str, marker: &str, quote: char) -> BTreeSet<String> {
    let source = fs::read_to_string(path).unwrap();
    source
        .match_indices(marker)
        .filter_map(|(i, _)| {
            let rest = &source[i + marker.len()..];
            let rest = rest.strip_prefix(quote)?;
            Some(String::from(&rest[..rest.find(quote)?]))
        })
        .collect()
}

#[test]
fn the_typescript_error_code_list_is_exactly_what_can_be_thrown() {
    let listed = typescript_codes();
    let mut emitted: BTreeSet<String> = loopwright::Error::CODES
        .iter()
        .map(|c| String::from(*c))
        .collect();
    emitted.extend(literal_codes(
        "src/wasm/sheet.rs",
        r#"&"code".into(), &"#,
        '"',
    ));
    assert!(
        emitted.contains("bad_document"),
        "the sheet binding's code is found"
    );
    for file in ["facade/guard.js", "facade/lite.js", "facade/loopwright.js"] {
        let codes = literal_codes(file, "refusal(", '\'');
        for code in &codes {
            assert!(
                listed.contains(code),
                "{file} throws {code}, not in ErrorCode"
            );
        }
        emitted.extend(codes);
    }
    assert_eq!(
        listed, emitted,
        "ErrorCode lists every code thrown, and only those"
    );
}
