//! A small JSON writer and reader for the sheet document and the catalog.
//!
//! Written here rather than taken from a crate so the core stays `no_std` without
//! a serializer dependency, and so the document's byte layout is fixed by this
//! code alone (which is what makes save → load → save byte-identical). The reader
//! follows RFC 8259 strictly (no comments, no trailing commas, no leading zeros,
//! no lone surrogates) and limits nesting to [`MAX_NESTING`].

use super::value::write_number;
use alloc::string::String;
use alloc::vec::Vec;
use core::fmt::Write;

/// Deepest nesting of arrays and objects the reader accepts.
pub const MAX_NESTING: usize = 32;

/// A JSON writer; compact, or pretty with two-space indentation.
pub struct JsonWriter {
    out: String,
    pretty: bool,
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

    /// A number; NaN and ±∞ (which JSON cannot hold) are written as `null`.
    pub fn number(&mut self, x: f64) {
        self.before_value();
        if x.is_finite() {
            write_number(&mut self.out, x);
        } else {
            self.out.push_str("null");
        }
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

/// Write `s` as a JSON string literal: `"` `\` and control characters escaped,
/// everything else as UTF-8.
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

/// A parsed JSON value. Object members keep their order and duplicates, so the
/// caller can refuse duplicates.
#[derive(Debug, Clone, PartialEq)]
pub enum Json {
    /// `null`
    Null,
    /// `true` / `false`
    Bool(bool),
    /// A number.
    Number(f64),
    /// A string.
    String(String),
    /// An array.
    Array(Vec<Json>),
    /// An object, members in order.
    Object(Vec<(String, Json)>),
}

/// Where and why JSON text is malformed.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct JsonError {
    /// 1-based line.
    pub line: usize,
    /// 1-based character column.
    pub col: usize,
    /// What is wrong.
    pub message: &'static str,
}

impl core::fmt::Display for JsonError {
    fn fmt(&self, f: &mut core::fmt::Formatter<'_>) -> core::fmt::Result {
        write!(
            f,
            "line {}, column {}: {}",
            self.line, self.col, self.message
        )
    }
}

struct Reader<'a> {
    src: &'a str,
    i: usize,
}

impl Reader<'_> {
    fn fail<T>(&self, message: &'static str) -> Result<T, JsonError> {
        let before = self.src.get(..self.i).unwrap_or(self.src);
        let line = before.matches('\n').count() + 1;
        let col = before.rsplit('\n').next().map_or(0, |l| l.chars().count()) + 1;
        Err(JsonError { line, col, message })
    }

    fn rest(&self) -> &str {
        self.src.get(self.i..).unwrap_or("")
    }

    fn skip_ws(&mut self) {
        let n = self
            .rest()
            .bytes()
            .take_while(|b| matches!(b, b' ' | b'\t' | b'\n' | b'\r'))
            .count();
        self.i += n;
    }

    fn eat(&mut self, s: &str) -> bool {
        if self.rest().starts_with(s) {
            self.i += s.len();
            true
        } else {
            false
        }
    }

    fn value(&mut self, depth: usize) -> Result<Json, JsonError> {
        self.skip_ws();
        match self.rest().bytes().next() {
            None => self.fail("the text ends where a value was expected"),
            Some(b'{') => {
                if depth >= MAX_NESTING {
                    return self.fail("nested deeper than 32 levels");
                }
                self.i += 1;
                let mut members = Vec::new();
                self.skip_ws();
                if self.eat("}") {
                    return Ok(Json::Object(members));
                }
                loop {
                    self.skip_ws();
                    if !self.rest().starts_with('"') {
                        return self.fail("expected a member name in double quotes");
                    }
                    let k = self.string()?;
                    self.skip_ws();
                    if !self.eat(":") {
                        return self.fail("expected : after the member name");
                    }
                    let v = self.value(depth + 1)?;
                    members.push((k, v));
                    self.skip_ws();
                    if self.eat(",") {
                        continue;
                    }
                    if self.eat("}") {
                        return Ok(Json::Object(members));
                    }
                    return self.fail("expected , or } in an object");
                }
            }
            Some(b'[') => {
                if depth >= MAX_NESTING {
                    return self.fail("nested deeper than 32 levels");
                }
                self.i += 1;
                let mut items = Vec::new();
                self.skip_ws();
                if self.eat("]") {
                    return Ok(Json::Array(items));
                }
                loop {
                    items.push(self.value(depth + 1)?);
                    self.skip_ws();
                    if self.eat(",") {
                        continue;
                    }
                    if self.eat("]") {
                        return Ok(Json::Array(items));
                    }
                    return self.fail("expected , or ] in an array");
                }
            }
            Some(b'"') => Ok(Json::String(self.string()?)),
            Some(b't') if self.eat("true") => Ok(Json::Bool(true)),
            Some(b'f') if self.eat("false") => Ok(Json::Bool(false)),
            Some(b'n') if self.eat("null") => Ok(Json::Null),
            Some(b'-' | b'0'..=b'9') => self.number(),
            Some(_) => self.fail("not a JSON value"),
        }
    }

    fn number(&mut self) -> Result<Json, JsonError> {
        let s = self.rest();
        let b = s.as_bytes();
        let mut j = usize::from(b.first() == Some(&b'-'));
        let int = b
            .get(j..)
            .unwrap_or(&[])
            .iter()
            .take_while(|c| c.is_ascii_digit())
            .count();
        if int == 0 || (int > 1 && b.get(j) == Some(&b'0')) {
            return self.fail("malformed number");
        }
        j += int;
        if b.get(j) == Some(&b'.') {
            let n = b
                .get(j + 1..)
                .unwrap_or(&[])
                .iter()
                .take_while(|c| c.is_ascii_digit())
                .count();
            if n == 0 {
                return self.fail("malformed number");
            }
            j += 1 + n;
        }
        if matches!(b.get(j), Some(b'e' | b'E')) {
            j += 1;
            if matches!(b.get(j), Some(b'+' | b'-')) {
                j += 1;
            }
            let n = b
                .get(j..)
                .unwrap_or(&[])
                .iter()
                .take_while(|c| c.is_ascii_digit())
                .count();
            if n == 0 {
                return self.fail("malformed number");
            }
            j += n;
        }
        match s
            .get(..j)
            .and_then(|t| t.parse::<f64>().ok())
            .filter(|x| x.is_finite())
        {
            Some(x) => {
                self.i += j;
                Ok(Json::Number(x))
            }
            None => self.fail("number outside the floating-point range"),
        }
    }

    fn hex4(&mut self) -> Result<u32, JsonError> {
        let h = self
            .rest()
            .get(..4)
            .filter(|h| h.bytes().all(|c| c.is_ascii_hexdigit()));
        match h.and_then(|h| u32::from_str_radix(h, 16).ok()) {
            Some(v) => {
                self.i += 4;
                Ok(v)
            }
            None => self.fail("\\u needs four hex digits"),
        }
    }

    fn string(&mut self) -> Result<String, JsonError> {
        self.i += 1;
        let mut out = String::new();
        loop {
            let Some(c) = self.rest().chars().next() else {
                return self.fail("a string is not closed");
            };
            match c {
                '"' => {
                    self.i += 1;
                    return Ok(out);
                }
                '\\' => {
                    self.i += 1;
                    let Some(e) = self.rest().chars().next() else {
                        return self.fail("a string is not closed");
                    };
                    self.i += 1;
                    match e {
                        '"' => out.push('"'),
                        '\\' => out.push('\\'),
                        '/' => out.push('/'),
                        'b' => out.push('\u{8}'),
                        'f' => out.push('\u{c}'),
                        'n' => out.push('\n'),
                        'r' => out.push('\r'),
                        't' => out.push('\t'),
                        'u' => {
                            let hi = self.hex4()?;
                            let code = if (0xD800..0xDC00).contains(&hi) {
                                if !self.eat("\\u") {
                                    return self.fail("a lone surrogate in \\u escapes");
                                }
                                let lo = self.hex4()?;
                                if !(0xDC00..0xE000).contains(&lo) {
                                    return self.fail("a lone surrogate in \\u escapes");
                                }
                                0x10000 + ((hi - 0xD800) << 10) + (lo - 0xDC00)
                            } else {
                                hi
                            };
                            match char::from_u32(code) {
                                Some(ch) => out.push(ch),
                                None => return self.fail("a lone surrogate in \\u escapes"),
                            }
                        }
                        _ => return self.fail("unknown escape in a string"),
                    }
                }
                c if (c as u32) < 0x20 => return self.fail("a control character inside a string"),
                c => {
                    out.push(c);
                    self.i += c.len_utf8();
                }
            }
        }
    }
}

/// Parse JSON text (one value, blanks around it allowed).
///
/// # Errors
/// [`JsonError`] with line and column of the first problem.
pub fn parse(src: &str) -> Result<Json, JsonError> {
    let mut r = Reader { src, i: 0 };
    let v = r.value(0)?;
    r.skip_ws();
    if r.i < src.len() {
        return r.fail("text after the end of the JSON value");
    }
    Ok(v)
}

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
                Json::Number(1.5),
                Json::Number(-2e-9),
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
}
