//! The JSON writer: compact or pretty, members in the order the caller writes
//! them, numbers that read back to the same `f64`.

use super::value::{Json, Number};
use alloc::string::String;
use alloc::vec::Vec;
use core::fmt::Write;

/// A finite `x` as [`NumberText::WithFraction`] spells it. Rust's `{:e}` gives
/// the shortest digits that read back to `x` and their decimal exponent.
fn write_with_fraction(out: &mut String, x: f64) {
    let mut sci = String::new();
    // Writing to a String cannot fail.
    let _ = write!(sci, "{x:e}");
    let exponent = sci
        .rsplit_once('e')
        .and_then(|(_, e)| e.parse::<i32>().ok())
        .unwrap_or(0);
    if (-5..16).contains(&exponent) {
        let start = out.len();
        let _ = write!(out, "{x}");
        if !out.get(start..).is_some_and(|t| t.contains('.')) {
            out.push_str(".0");
        }
    } else {
        let (mantissa, _) = sci.rsplit_once('e').unwrap_or((&sci, ""));
        let sign = if exponent > 0 { "+" } else { "" };
        let _ = write!(out, "{mantissa}e{sign}{exponent}");
    }
}

/// How a writer spells numbers; both read back to the same `f64`.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum NumberText {
    /// Shortest digits, plain from 10⁻⁶ to 10¹⁵ and exponent form outside
    /// (`4700`, `0.1`, `1e-7`, `-0`): [`crate::notation::write_full`]. The
    /// sheet document and the catalog.
    Shortest,
    /// Shortest digits, plain from 10⁻⁵ up to 10¹⁶ with a fraction always
    /// written, exponent form outside with its sign (`4700.0`, `0.00001`,
    /// `1e-6`, `1.5e+16`, `-0.0`): the text the circuit and stage documents
    /// have always had, kept so that their saved bytes do not change.
    WithFraction,
}

/// A JSON writer; compact, or pretty with two-space indentation.
pub struct JsonWriter {
    out: String,
    pretty: bool,
    numbers: NumberText,
    /// Per open container: whether nothing has been written in it yet.
    first: Vec<bool>,
    after_key: bool,
}

impl Default for JsonWriter {
    fn default() -> Self {
        JsonWriter::new()
    }
}

impl JsonWriter {
    /// A compact writer.
    pub fn new() -> JsonWriter {
        JsonWriter {
            out: String::new(),
            pretty: false,
            numbers: NumberText::Shortest,
            first: Vec::new(),
            after_key: false,
        }
    }

    /// A writer that puts each member on its own line.
    pub fn pretty() -> JsonWriter {
        JsonWriter {
            pretty: true,
            ..JsonWriter::new()
        }
    }

    /// The same writer spelling numbers as `numbers` says.
    pub fn with_numbers(self, numbers: NumberText) -> JsonWriter {
        JsonWriter { numbers, ..self }
    }

    fn before_value(&mut self) {
        if self.after_key {
            self.after_key = false;
            return;
        }
        if let Some(first) = self.first.last_mut() {
            if !*first {
                self.out.push(',');
            }
            *first = false;
            if self.pretty {
                self.out.push('\n');
                for _ in 0..self.first.len() {
                    self.out.push_str("  ");
                }
            }
        }
    }

    fn close(&mut self, c: char) {
        let was_empty = self.first.pop().unwrap_or(true);
        if self.pretty && !was_empty {
            self.out.push('\n');
            for _ in 0..self.first.len() {
                self.out.push_str("  ");
            }
        }
        self.out.push(c);
    }

    /// `{`
    pub fn begin_object(&mut self) {
        self.before_value();
        self.out.push('{');
        self.first.push(true);
    }

    /// `}`
    pub fn end_object(&mut self) {
        self.close('}');
    }

    /// `[`
    pub fn begin_array(&mut self) {
        self.before_value();
        self.out.push('[');
        self.first.push(true);
    }

    /// `]`
    pub fn end_array(&mut self) {
        self.close(']');
    }

    /// An object key; the next call writes its value.
    pub fn key(&mut self, k: &str) {
        self.before_value();
        write_string(&mut self.out, k);
        self.out.push_str(if self.pretty { ": " } else { ":" });
        self.after_key = true;
    }

    /// A string value.
    pub fn string(&mut self, s: &str) {
        self.before_value();
        write_string(&mut self.out, s);
    }

    /// A number in the shortest text that reads back to the same `f64`, spelled
    /// as [`NumberText`] says; NaN and ±∞ (which JSON cannot hold) are written
    /// as `null`.
    pub fn number(&mut self, x: f64) {
        self.before_value();
        if !x.is_finite() {
            self.out.push_str("null");
        } else if self.numbers == NumberText::WithFraction {
            write_with_fraction(&mut self.out, x);
        } else if x == 0.0 && x.is_sign_negative() {
            // -0 reads back as negative zero; write_full shows both zeros as 0.
            self.out.push_str("-0");
        } else {
            crate::notation::write_full(&mut self.out, x);
        }
    }

    /// A value tree, members in the tree's order.
    pub fn value(&mut self, v: &Json) {
        match v {
            Json::Null => self.null(),
            Json::Bool(b) => self.boolean(*b),
            Json::Number(Number { whole: Some(n), .. }) => self.whole(*n),
            Json::Number(n) => self.number(n.value),
            Json::String(s) => self.string(s),
            Json::Array(items) => {
                self.begin_array();
                items.iter().for_each(|x| self.value(x));
                self.end_array();
            }
            Json::Object(members) => {
                self.begin_object();
                for (k, x) in members {
                    self.key(k);
                    self.value(x);
                }
                self.end_object();
            }
        }
    }

    /// A whole number, in digits (`2`).
    pub fn whole(&mut self, n: u64) {
        self.before_value();
        // Writing to a String cannot fail.
        let _ = write!(self.out, "{n}");
    }

    /// `true` or `false`.
    pub fn boolean(&mut self, b: bool) {
        self.before_value();
        self.out.push_str(if b { "true" } else { "false" });
    }

    /// `null`.
    pub fn null(&mut self) {
        self.before_value();
        self.out.push_str("null");
    }

    /// The text written, with a final newline in pretty mode.
    pub fn finish(mut self) -> String {
        if self.pretty {
            self.out.push('\n');
        }
        self.out
    }
}

/// Write `s` as a JSON string literal (RFC 8259 section 7): `"`, `\\` and the
/// control characters U+0000–U+001F escaped (`\n`, `\r`, `\t` by name, the others
/// as `\u00xx`), everything else as UTF-8.
pub fn write_string(out: &mut String, s: &str) {
    out.push('"');
    for c in s.chars() {
        match c {
            '"' => out.push_str("\\\""),
            '\\' => out.push_str("\\\\"),
            '\n' => out.push_str("\\n"),
            '\r' => out.push_str("\\r"),
            '\t' => out.push_str("\\t"),
            c if (c as u32) < 0x20 => {
                // Writing to a String cannot fail.
                let _ = write!(out, "\\u{:04x}", c as u32);
            }
            c => out.push(c),
        }
    }
    out.push('"');
}
