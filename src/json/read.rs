//! The JSON reader: RFC 8259 text to a [`Json`] tree, strictly.

use super::value::{Json, Number};
use alloc::string::String;
use alloc::vec::Vec;
use core::fmt::Write;

/// Deepest nesting of arrays and objects the reader accepts.
pub const MAX_NESTING: usize = 32;

/// Where and why JSON text is malformed.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct JsonError {
    /// 1-based line.
    pub line: usize,
    /// 1-based character column.
    pub col: usize,
    /// The JSON path of the value being read (`elements[3].value`; empty at
    /// the top level).
    pub path: String,
    /// What is wrong.
    pub message: &'static str,
}

impl JsonError {
    /// The error of a value read as the member `key` of an object.
    fn in_member(self, key: &str) -> JsonError {
        let plain = key
            .chars()
            .next()
            .is_some_and(|c| c.is_ascii_alphabetic() || c == '_')
            && key.chars().all(|c| c.is_ascii_alphanumeric() || c == '_');
        let mut head = String::new();
        if plain {
            head.push_str(key);
        } else {
            head.push('[');
            super::write::write_string(&mut head, key);
            head.push(']');
        }
        self.prefix(head)
    }

    /// The error of a value read as item `i` of an array.
    fn in_item(self, i: usize) -> JsonError {
        let mut head = String::new();
        // Writing to a String cannot fail.
        let _ = write!(head, "[{i}]");
        self.prefix(head)
    }

    fn prefix(mut self, mut head: String) -> JsonError {
        if !self.path.is_empty() && !self.path.starts_with('[') {
            head.push('.');
        }
        head.push_str(&self.path);
        self.path = head;
        self
    }
}

impl core::fmt::Display for JsonError {
    fn fmt(&self, f: &mut core::fmt::Formatter<'_>) -> core::fmt::Result {
        write!(f, "line {}, column {}", self.line, self.col)?;
        if !self.path.is_empty() {
            write!(f, " (in {})", self.path)?;
        }
        write!(f, ": {}", self.message)
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
        Err(JsonError {
            line,
            col,
            path: String::new(),
            message,
        })
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
                    let v = self.value(depth + 1).map_err(|e| e.in_member(&k))?;
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
                    let i = items.len();
                    items.push(self.value(depth + 1).map_err(|e| e.in_item(i))?);
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
        let text = s.get(..j).unwrap_or("");
        match text.parse::<f64>().ok().filter(|x| x.is_finite()) {
            Some(value) => {
                let whole = if text.bytes().all(|c| c.is_ascii_digit()) {
                    text.parse::<u64>().ok()
                } else {
                    None
                };
                self.i += j;
                Ok(Json::Number(Number { value, whole }))
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
