//! Delimited text, the one reader and writer of CSV and TSV in loopwright: the
//! worksheet's CSV export and TSV copy and paste, and the batch tool.
//!
//! Reading follows RFC 4180 (*Common Format and MIME Type for Comma-Separated Values
//! Files*, section 2), strictly, and streams: [`Reader::feed`] takes the input in
//! chunks of any size (a chunk may end inside a field, a line break or a UTF-8
//! sequence) and hands out each complete [`Record`] with the physical line it starts
//! on. Line breaks are CRLF (rule 1), LF or a lone CR; a field that begins with `"`
//! is quoted and may hold separators, quotes written twice and line breaks (rules 5–7).
//! A record that breaks a rule is still handed out, its fields read as written, with
//! the [`Problem`] named, so one malformed line never swallows the lines after it:
//! - a `"` inside a field that did not begin with one (`12" woofer`): kept as data;
//! - text after the closing quote of a quoted field (`"a"b`): kept as data;
//! - a quoted field that never closes (at the end of the input, or within
//!   [`MAX_RECORD_BYTES`]): the record is its first line alone, and the lines after
//!   it are read again as records of their own, so an unclosed quote costs one line;
//! - bytes that are not UTF-8 (replaced by U+FFFD);
//! - a record longer than [`MAX_RECORD_BYTES`] bytes or [`MAX_FIELDS`] fields: the
//!   rest is dropped, so memory stays bounded whatever the input.
//!
//! Blank lines are skipped ([`BlankLines::Skip`], for files: they never shift a
//! reported line number, since lines are counted in the input) or read as a record
//! of one empty field ([`BlankLines::Keep`], for a pasted block, where an empty line
//! is an empty cell). Fields are not trimmed: blanks are part of a field (rule 4).
//!
//! Writing ([`write_text`], [`write_number`]) quotes a field that holds the
//! separator, a quote or a line break, with quotes doubled (rules 6 and 7), and
//! neutralises formula injection: a text field whose first character is `=`, `+`,
//! `-`, `@`, a tab or a carriage return is written with an apostrophe in front
//! (`'=HYPERLINK(…)`), so spreadsheet programs read it as text instead of running it
//! as a formula, unless the whole field is a plain decimal number (`-100`,
//! `+1.5e3`), which they read as that number. Numbers are written as numbers, in
//! the shortest form that reads back to the same double.

use alloc::string::String;
use alloc::vec::Vec;
use core::fmt;

/// Longest record read whole, in bytes (separators and quotes included); the rest
/// of a longer one is dropped and the record reported as [`Problem::TooLong`].
pub const MAX_RECORD_BYTES: usize = 1 << 20;
/// Most fields read in one record; further ones are dropped ([`Problem::TooLong`]).
pub const MAX_FIELDS: usize = 65_536;

/// What to do with an empty line between records.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum BlankLines {
    /// Skip it (a file: no record, and the line numbers still count it).
    Skip,
    /// Read it as a record of one empty field (a pasted block: an empty cell).
    Keep,
}

/// Why a record does not follow RFC 4180; `column` counts fields from 1.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Problem {
    /// A `"` inside a field that did not begin with one (section 2, rule 5).
    StrayQuote { column: usize },
    /// Text after the closing quote of a quoted field (section 2, rules 5 and 7).
    TextAfterQuote { column: usize },
    /// A quoted field that never closes (section 2, rule 6): reported on the
    /// record's first line, the lines after it read again.
    UnclosedQuote { column: usize },
    /// Bytes that are not UTF-8 in this field.
    NotUtf8 { column: usize },
    /// More than [`MAX_RECORD_BYTES`] bytes or [`MAX_FIELDS`] fields.
    TooLong,
}

impl fmt::Display for Problem {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match *self {
            Problem::StrayQuote { column } => write!(
                f,
                "field {column} has a quote inside unquoted text; quote the whole field and write the quote twice"
            ),
            Problem::TextAfterQuote { column } => write!(
                f,
                "field {column} has text after its closing quote; a quote inside a quoted field is written twice"
            ),
            Problem::UnclosedQuote { column } => write!(
                f,
                "field {column} opens a quote that is not closed; the record is read as this line alone"
            ),
            Problem::NotUtf8 { column } => write!(f, "field {column} is not UTF-8 text"),
            Problem::TooLong => write!(
                f,
                "the record is longer than {MAX_RECORD_BYTES} bytes or {MAX_FIELDS} fields (an unclosed quote?); the rest was dropped"
            ),
        }
    }
}

/// One record: its fields as written, and the physical line it starts on.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Record {
    /// Line number (from 1) of the record's first byte in the whole input.
    pub line: u64,
    /// The fields, unquoted; a malformed record's fields are read as written.
    pub fields: Vec<String>,
    /// The first rule the record breaks, if any.
    pub problem: Option<Problem>,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum State {
    /// Before a record (blank lines are seen here).
    RecordStart,
    /// After a separator.
    FieldStart,
    /// Inside a field that did not begin with a quote.
    Unquoted,
    /// Inside a quoted field.
    Quoted,
    /// After a quote inside a quoted field: a second quote, the end of the field
    /// or text that breaks the rules follows.
    QuoteInQuoted,
}

/// A streaming RFC 4180 reader; see the module doc.
///
/// # Example
/// ```
/// use loopwright::csv::{BlankLines, Problem, Reader};
/// let mut r = Reader::new(b',', BlankLines::Skip);
/// let mut out = Vec::new();
/// r.feed(b"a,\"b \"\"c\"\"\"\n\n12\" woofer,x\r\n", &mut out);
/// r.finish(&mut out);
/// assert_eq!(out[0].fields, ["a", "b \"c\""]);
/// assert_eq!((out[1].line, out[1].problem), (3, Some(Problem::StrayQuote { column: 1 })));
/// ```
#[derive(Debug, Clone)]
pub struct Reader {
    separator: u8,
    blank_lines: BlankLines,
    state: State,
    /// Line of the next byte.
    line: u64,
    /// The previous byte was a CR (an LF right after it ends the same line).
    after_cr: bool,
    record_line: u64,
    record_bytes: usize,
    field: Vec<u8>,
    fields: Vec<String>,
    problem: Option<Problem>,
    /// The current record's bytes as written (at most MAX_RECORD_BYTES + 1), kept
    /// to read its lines again when a quote in it turns out never to close.
    raw: Vec<u8>,
    /// The byte being read was consumed by a re-read ([`Reader::recover`]).
    reread: bool,
}

impl Reader {
    /// A reader of fields separated by `separator` (`b','` for CSV, `b'\t'` for TSV).
    pub fn new(separator: u8, blank_lines: BlankLines) -> Reader {
        Reader {
            separator,
            blank_lines,
            state: State::RecordStart,
            line: 1,
            after_cr: false,
            record_line: 1,
            record_bytes: 0,
            field: Vec::new(),
            fields: Vec::new(),
            problem: None,
            raw: Vec::new(),
            reread: false,
        }
    }

    /// The physical line the next byte is on (from 1).
    pub fn line(&self) -> u64 {
        self.line
    }

    /// Read a chunk, appending each record it completes to `out`.
    pub fn feed(&mut self, input: &[u8], out: &mut Vec<Record>) {
        for &b in input {
            let is_break = b == b'\n' || b == b'\r';
            // An LF right after a CR is the second half of a CRLF: no new line, and at
            // a record start no blank line either.
            let lf_of_crlf = b == b'\n' && self.after_cr;
            if self.state != State::RecordStart || !is_break {
                if self.state == State::RecordStart {
                    self.raw.clear();
                }
                if self.raw.len() <= MAX_RECORD_BYTES {
                    self.raw.push(b);
                }
            }
            self.step(b, is_break, lf_of_crlf, out);
            if core::mem::take(&mut self.reread) {
                continue;
            }
            if b == b'\r' || (b == b'\n' && !lf_of_crlf) {
                self.line += 1;
            }
            self.after_cr = b == b'\r';
        }
    }

    fn step(&mut self, b: u8, is_break: bool, lf_of_crlf: bool, out: &mut Vec<Record>) {
        match self.state {
            State::RecordStart => {
                if lf_of_crlf {
                    return;
                }
                self.record_line = self.line;
                self.record_bytes = 0;
                if is_break {
                    if self.blank_lines == BlankLines::Keep {
                        self.end_field();
                        self.end_record(out);
                    }
                    return;
                }
                self.field_start(b, out);
            }
            State::FieldStart => self.field_start(b, out),
            State::Unquoted => self.unquoted(b, is_break, out),
            State::Quoted => {
                if b == b'"' {
                    self.state = State::QuoteInQuoted;
                    self.count_byte();
                } else {
                    self.push(b, out);
                }
            }
            State::QuoteInQuoted => {
                if b == b'"' {
                    self.state = State::Quoted;
                    self.push(b, out);
                } else if b == self.separator || is_break {
                    self.unquoted(b, is_break, out);
                } else {
                    self.note(Problem::TextAfterQuote {
                        column: self.column(),
                    });
                    self.state = State::Unquoted;
                    self.push(b, out);
                }
            }
        }
    }

    fn field_start(&mut self, b: u8, out: &mut Vec<Record>) {
        if b == b'"' {
            self.state = State::Quoted;
            self.count_byte();
        } else {
            self.state = State::Unquoted;
            self.unquoted(b, b == b'\n' || b == b'\r', out);
        }
    }

    fn unquoted(&mut self, b: u8, is_break: bool, out: &mut Vec<Record>) {
        if b == self.separator {
            self.end_field();
            self.count_byte();
            self.state = State::FieldStart;
        } else if is_break {
            self.end_field();
            self.end_record(out);
        } else {
            if b == b'"' {
                self.note(Problem::StrayQuote {
                    column: self.column(),
                });
            }
            self.push(b, out);
        }
    }

    /// Finish the input: the last record may lack a line break (rule 2).
    pub fn finish(&mut self, out: &mut Vec<Record>) {
        match self.state {
            State::RecordStart => {}
            State::Quoted => {
                if self.recover(out) {
                    self.finish(out);
                    return;
                }
                self.note(Problem::UnclosedQuote {
                    column: self.column(),
                });
                self.end_field();
                self.end_record(out);
            }
            State::FieldStart | State::Unquoted | State::QuoteInQuoted => {
                self.end_field();
                self.end_record(out);
            }
        }
    }

    fn column(&self) -> usize {
        self.fields.len() + 1
    }

    fn note(&mut self, p: Problem) {
        if self.problem.is_none() {
            self.problem = Some(p);
        }
    }

    /// Count a byte of the record that is not field data (a quote or separator).
    fn count_byte(&mut self) {
        self.record_bytes += 1;
    }

    fn push(&mut self, b: u8, out: &mut Vec<Record>) {
        self.record_bytes += 1;
        if self.record_bytes <= MAX_RECORD_BYTES {
            self.field.push(b);
        } else if self.state == State::Quoted && self.recover(out) {
            // A quote open for more than MAX_RECORD_BYTES: its lines were read again.
            self.reread = true;
        } else {
            self.note(Problem::TooLong);
        }
    }

    /// A quote that never closes (at the end of the input, or within
    /// [`MAX_RECORD_BYTES`]) would make one record of every line after it. Instead,
    /// the record is its first line alone, reported as [`Problem::UnclosedQuote`],
    /// and the lines after it are read again as records of their own. Returns
    /// false when the record has no line break (nothing to read again).
    fn recover(&mut self, out: &mut Vec<Record>) -> bool {
        if self.raw.len() != self.record_bytes {
            // Cut at the limit earlier: the lines cannot all be read again.
            return false;
        }
        let raw = core::mem::take(&mut self.raw);
        let Some(brk) = raw.iter().position(|&b| b == b'\n' || b == b'\r') else {
            self.raw = raw;
            return false;
        };
        // The first line alone: its quote is open at its end.
        let mut first = Reader::new(self.separator, self.blank_lines);
        let mut records = Vec::new();
        first.feed(&raw[..brk], &mut records);
        first.finish(&mut records);
        for mut r in records {
            r.line = self.record_line;
            out.push(r);
        }
        self.fields.clear();
        self.field.clear();
        self.problem = None;
        self.state = State::RecordStart;
        self.line = self.record_line + 1;
        self.after_cr = false;
        let crlf = raw[brk] == b'\r' && raw.get(brk + 1) == Some(&b'\n');
        self.feed(&raw[brk + 1 + usize::from(crlf)..], out);
        true
    }

    fn end_field(&mut self) {
        if self.fields.len() >= MAX_FIELDS {
            self.note(Problem::TooLong);
            self.field.clear();
            return;
        }
        let bytes = core::mem::take(&mut self.field);
        let text = match String::from_utf8(bytes) {
            Ok(s) => s,
            Err(e) => {
                self.note(Problem::NotUtf8 {
                    column: self.column(),
                });
                String::from_utf8_lossy(e.as_bytes()).into_owned()
            }
        };
        self.fields.push(text);
    }

    fn end_record(&mut self, out: &mut Vec<Record>) {
        out.push(Record {
            line: self.record_line,
            fields: core::mem::take(&mut self.fields),
            problem: self.problem.take(),
        });
        self.state = State::RecordStart;
    }
}

/// Read a whole text at once (see [`Reader`]).
pub fn read_all(text: &str, separator: u8, blank_lines: BlankLines) -> Vec<Record> {
    let mut r = Reader::new(separator, blank_lines);
    let mut out = Vec::new();
    r.feed(text.as_bytes(), &mut out);
    r.finish(&mut out);
    out
}

/// Whether the whole text is a plain decimal number: an optional sign, digits with
/// an optional decimal point (at least one digit), an optional exponent.
pub fn is_plain_number(text: &str) -> bool {
    let b = text.as_bytes();
    let mut i = usize::from(matches!(b.first(), Some(b'+' | b'-')));
    let digits = |i: &mut usize| {
        let start = *i;
        while b.get(*i).is_some_and(u8::is_ascii_digit) {
            *i += 1;
        }
        *i - start
    };
    let mut mantissa = digits(&mut i);
    if b.get(i) == Some(&b'.') {
        i += 1;
        mantissa += digits(&mut i);
    }
    if mantissa == 0 {
        return false;
    }
    if matches!(b.get(i), Some(b'e' | b'E')) {
        i += 1;
        if matches!(b.get(i), Some(b'+' | b'-')) {
            i += 1;
        }
        if digits(&mut i) == 0 {
            return false;
        }
    }
    i == b.len()
}

/// Whether a text field would be read as a formula by a spreadsheet program: its
/// first character is `=`, `+`, `-`, `@`, a tab or a carriage return, and it is not
/// a plain decimal number.
pub fn starts_like_formula(text: &str) -> bool {
    text.starts_with(['=', '+', '-', '@', '\t', '\r']) && !is_plain_number(text)
}

/// Append a text field: an apostrophe in front when it [`starts_like_formula`],
/// then quoted (quotes doubled) when it holds `separator`, a quote or a line break.
///
/// # Example
/// ```
/// use loopwright::csv::write_text;
/// let mut out = String::new();
/// write_text(&mut out, "=HYPERLINK(\"x\")", ',');
/// out.push(',');
/// write_text(&mut out, "-100", ',');
/// assert_eq!(out, "\"'=HYPERLINK(\"\"x\"\")\",-100");
/// ```
pub fn write_text(out: &mut String, text: &str, separator: char) {
    let guard = starts_like_formula(text);
    if text.contains([separator, '"', '\n', '\r']) {
        out.push('"');
        if guard {
            out.push('\'');
        }
        for c in text.chars() {
            if c == '"' {
                out.push('"');
            }
            out.push(c);
        }
        out.push('"');
    } else {
        if guard {
            out.push('\'');
        }
        out.push_str(text);
    }
}

/// Append a number in the shortest form that reads back to the same double
/// (`100`, `-2.5`, `1e-7`); never quoted, never neutralised. Callers pass finite
/// numbers only (the core's results are checked).
pub fn write_number(out: &mut String, x: f64) {
    crate::sheet::value::write_number(out, x);
}

#[cfg(test)]
mod tests {
    use super::*;
    use alloc::vec;

    fn read(text: &str) -> Vec<Record> {
        read_all(text, b',', BlankLines::Skip)
    }

    fn fields(text: &str) -> Vec<Vec<String>> {
        read(text).into_iter().map(|r| r.fields).collect()
    }

    #[test]
    fn chunk_boundaries_do_not_change_the_records() {
        // Common practice, no source: a streaming reader must give the same records
        // whatever the chunk size, including chunks that split a CRLF, a doubled
        // quote or a UTF-8 sequence.
        let text = "a,\"b\"\"c\",µ\r\n\"x\r\ny\",2\r\n\r\nlast,\"q\"\n\"open\r\nz";
        let whole = read(text);
        for size in 1..text.len() {
            let mut r = Reader::new(b',', BlankLines::Skip);
            let mut out = Vec::new();
            for chunk in text.as_bytes().chunks(size) {
                r.feed(chunk, &mut out);
            }
            r.finish(&mut out);
            assert_eq!(out, whole, "chunk size {size}");
        }
        assert_eq!(
            whole.iter().map(|r| r.line).collect::<Vec<_>>(),
            [1, 2, 5, 6, 7]
        );
        assert_eq!(whole[3].problem, Some(Problem::UnclosedQuote { column: 1 }));
    }

    #[test]
    fn rfc_4180_rules() {
        // RFC 4180 section 2, rule 1: records end with CRLF.
        assert_eq!(fields("a,b\r\nc,d\r\n"), [vec!["a", "b"], vec!["c", "d"]]);
        // RFC 4180 section 2, rule 2: the last record may lack a line break.
        assert_eq!(fields("a,b\r\nc,d"), [vec!["a", "b"], vec!["c", "d"]]);
        // RFC 4180 section 2, rule 3: a header line has the same format.
        assert_eq!(fields("x,y\na,b\n")[0], ["x", "y"]);
        // RFC 4180 section 2, rule 4: spaces are part of a field; no trailing comma
        // after the last field, so "a," has a second, empty field.
        assert_eq!(fields(" a , b\na,\n"), [vec![" a ", " b"], vec!["a", ""]]);
        // RFC 4180 section 2, rule 5: a field may be quoted.
        assert_eq!(fields("\"a\",b\n"), [vec!["a", "b"]]);
        // RFC 4180 section 2, rule 6: quoted fields may hold line breaks, commas and
        // quotes; the record starts on line 1 and the next one on line 3.
        let r = read("\"a\r\nb,c\",d\ne\n");
        assert_eq!(r[0].fields, ["a\r\nb,c", "d"]);
        assert_eq!((r[0].line, r[1].line), (1, 3));
        // RFC 4180 section 2, rule 7: a quote inside a quoted field is written twice.
        assert_eq!(fields("\"say \"\"hi\"\"\"\n"), [vec!["say \"hi\""]]);
        assert!(read("\"say \"\"hi\"\"\"\n")[0].problem.is_none());
    }

    #[test]
    fn malformed_records_are_named_and_swallow_nothing() {
        // RFC 4180 section 2, rule 5 (a field that does not begin with a quote holds
        // none): the stray quote is reported on its own line, the next line is read.
        let r = read("t,a\nseries-shunt,12\" woofer\nnext,1\n");
        assert_eq!(r.len(), 3);
        assert_eq!(r[1].problem, Some(Problem::StrayQuote { column: 2 }));
        assert_eq!(r[1].fields, ["series-shunt", "12\" woofer"]);
        assert_eq!(
            (r[2].line, r[2].fields.clone()),
            (3, vec!["next".into(), "1".into()])
        );
        // RFC 4180 section 2, rule 7: text after a closing quote.
        let r = read("\"a\"b,c\n");
        assert_eq!(r[0].problem, Some(Problem::TextAfterQuote { column: 1 }));
        assert_eq!(r[0].fields, ["ab", "c"]);
        // RFC 4180 section 2, rule 6: a quoted field must be closed.
        // A quote never closed makes a record of its first line alone; the lines
        // after it are read again (common practice, no source: nothing swallowed).
        let r = read("x\n\"open,y\nz,w\n");
        assert_eq!(r[1].problem, Some(Problem::UnclosedQuote { column: 1 }));
        assert_eq!((r[1].line, r[1].fields.clone()), (2, vec!["open,y".into()]));
        assert_eq!(
            (r[2].line, r[2].fields.clone()),
            (3, vec!["z".into(), "w".into()])
        );
        assert_eq!(r.len(), 3);
        // The same within MAX_RECORD_BYTES when the input goes on.
        let mut text = String::from("h\n\"open\r\n");
        text.push_str(&"row,1\n".repeat(MAX_RECORD_BYTES / 6 + 10));
        let r = read(&text);
        assert_eq!(r.len(), 2 + MAX_RECORD_BYTES / 6 + 10);
        assert_eq!(
            (r[1].line, r[1].problem),
            (2, Some(Problem::UnclosedQuote { column: 1 }))
        );
        assert!(r[2..]
            .iter()
            .all(|x| x.problem.is_none() && x.fields == ["row", "1"]));
        assert_eq!(r.last().map(|x| x.line), Some(r.len() as u64));
        // Not UTF-8.
        let mut out = Vec::new();
        let mut rd = Reader::new(b',', BlankLines::Skip);
        rd.feed(b"ok,\xff\n", &mut out);
        assert_eq!(out[0].problem, Some(Problem::NotUtf8 { column: 2 }));
    }

    #[test]
    fn blank_lines_keep_the_line_count() {
        // Common practice, no source: blank lines are skipped in files and counted
        // in line numbers; LF, CRLF and a lone CR each end one line.
        let r = read("h\n\n\r\n1\r\r2\n");
        assert_eq!(r.iter().map(|r| r.line).collect::<Vec<_>>(), [1, 4, 6]);
        let kept = read_all("a\n\nb\n", b'\t', BlankLines::Keep);
        assert_eq!(
            kept.iter().map(|r| r.fields.clone()).collect::<Vec<_>>(),
            [vec!["a"], vec![""], vec!["b"]]
        );
    }

    #[test]
    fn a_long_record_is_cut_and_reported() {
        let mut text = String::from("\"");
        text.push_str(&"x".repeat(MAX_RECORD_BYTES + 10));
        text.push_str("\",2\nnext\n");
        let r = read(&text);
        assert_eq!(r[0].problem, Some(Problem::TooLong));
        assert!(r[0].fields[0].len() < MAX_RECORD_BYTES);
        assert_eq!(r[1].fields, ["next"]);
    }

    #[test]
    fn writer_quotes_and_neutralises() {
        let w = |t: &str, sep| {
            let mut s = String::new();
            write_text(&mut s, t, sep);
            s
        };
        // RFC 4180 section 2, rules 6 and 7: quote fields holding the separator, a
        // quote or a line break, and double the quotes.
        assert_eq!(w("a,b", ','), "\"a,b\"");
        assert_eq!(w("a,b", '\t'), "a,b");
        assert_eq!(w("q\"q", '\t'), "\"q\"\"q\"");
        assert_eq!(w("l1\nl2", ','), "\"l1\nl2\"");
        // Formula injection (common practice, no source): =, +, -, @, tab, CR.
        for t in ["=1+1", "+A1", "-A1", "@SUM(A1)", "\tx", "\rx", "-4.7k", "+"] {
            assert!(w(t, ',').trim_start_matches('"').starts_with('\''), "{t}");
        }
        // Numbers stay numbers; plain text is untouched.
        for t in ["-100", "+1.5e3", "-.5", "-2E-3", "4k7", "a=b", "", "'x"] {
            assert_eq!(w(t, ','), t, "{t}");
        }
        assert_eq!(w("\t=x", '\t'), "\"'\t=x\"");
    }

    #[test]
    fn round_trip_through_writer_and_reader() {
        // Common practice, no source: what the writer writes, the reader reads back
        // (an apostrophe added only in front of formula-like text).
        let rows = [
            vec!["plain", "with,comma", "with \"quote\"", "two\r\nlines"],
            vec!["", " spaced ", "µΩ", "-3"],
        ];
        for sep in [',', '\t'] {
            let mut text = String::new();
            for row in &rows {
                for (i, f) in row.iter().enumerate() {
                    if i > 0 {
                        text.push(sep);
                    }
                    write_text(&mut text, f, sep);
                }
                text.push_str("\r\n");
            }
            let back = read_all(&text, sep as u8, BlankLines::Keep);
            assert_eq!(back.len(), 2);
            for (r, row) in back.iter().zip(&rows) {
                assert_eq!(r.fields, *row);
                assert!(r.problem.is_none());
            }
        }
    }

    #[test]
    fn plain_numbers() {
        for t in ["0", "-1", "+2.", ".5", "1e9", "1E+09", "-0.0e-0"] {
            assert!(is_plain_number(t), "{t}");
        }
        for t in ["", "-", ".", "e3", "1e", "0x10", "1k", "1 ", "--1", "1.2.3"] {
            assert!(!is_plain_number(t), "{t}");
        }
    }
}
