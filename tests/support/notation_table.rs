// The shared table of typed values (tests/fixtures/notation_cases.json), read for
// the native test (tests/notation_table.rs) and the browser test
// (tests/wasm_notation.rs). Included with `#[path = "support/notation_table.rs"]`.
#![allow(dead_code)]

use serde_json::Value;

/// The table's JSON text.
pub const TABLE: &str = include_str!("../fixtures/notation_cases.json");

/// What an input must read as.
#[derive(Debug, Clone, PartialEq)]
pub enum Expected {
    /// One value (the decimal text as written in the table, read by the platform's
    /// correctly rounded decimal-to-double conversion) and its unit symbol.
    Value(f64, Option<String>),
    /// A list of values.
    List(Vec<f64>),
    /// An error code and, for `syntax`, the 1-based column.
    Error(String, Option<u32>),
}

/// One row of the table.
#[derive(Debug, Clone)]
pub struct Case {
    pub text: String,
    pub percent: bool,
    pub decibels: bool,
    pub unit: Option<String>,
    pub list: bool,
    pub expected: Expected,
    pub note: String,
    /// The expected value(s) as the table writes them.
    pub written: String,
}

fn decimal(v: &Value) -> f64 {
    v.as_str()
        .and_then(|s| s.parse().ok())
        .unwrap_or_else(|| panic!("{v} is not a decimal string"))
}

/// Every case of the table, in order.
pub fn cases() -> Vec<Case> {
    let doc: Value = serde_json::from_str(TABLE).expect("the table is JSON");
    let rows = doc["cases"].as_array().expect("cases is a list");
    rows.iter()
        .map(|row| {
            let options = &row["options"];
            let flag = |name: &str| options[name].as_bool().unwrap_or(false);
            let expected = if let Some(code) = row["error"].as_str() {
                let column = row["column"].as_u64().map(|c| c as u32);
                Expected::Error(code.to_string(), column)
            } else if let Some(values) = row["values"].as_array() {
                Expected::List(values.iter().map(decimal).collect())
            } else {
                let unit = row["unit"].as_str().map(str::to_string);
                Expected::Value(decimal(&row["value"]), unit)
            };
            Case {
                text: row["text"].as_str().expect("text").to_string(),
                percent: flag("percent"),
                decibels: flag("decibels"),
                unit: options["unit"].as_str().map(str::to_string),
                list: flag("list"),
                expected,
                note: row["note"].as_str().unwrap_or("").to_string(),
                written: match (row["value"].as_str(), row["values"].as_array()) {
                    (Some(v), _) => v.to_string(),
                    (None, Some(vs)) => {
                        let items: Vec<&str> = vs.iter().filter_map(Value::as_str).collect();
                        format!("[{}]", items.join(", "))
                    }
                    _ => String::new(),
                },
            }
        })
        .collect()
}
