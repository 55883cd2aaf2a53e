//! The batch evaluation of design rows behind `loopwright-batch`: a CSV file in,
//! streamed in chunks of any size, and a CSV file or JSON lines out, one output
//! row per input record.
//!
//! The input is read by [`crate::csv`] (RFC 4180, strict), its values by
//! [`crate::notation::parse_value`], and every number is computed by the core's
//! areas ([`steps`]: feedback, pole-list loops, stage loops, noise, distortion,
//! network, stage design); the CSV output is written by [`crate::csv`], so text
//! that a spreadsheet program would run as a formula gets an apostrophe in front
//! (numbers, `-3` among them, stay numbers). A workbook is made from the CSV
//! output by the spreadsheet-file module (`crate::sheet::files`).
//!
//! CSV output: `line`, the input columns as written, the result columns of the
//! chosen steps, `error`. JSON lines ([`Format::JsonLines`], RFC 8259 objects one
//! a line): `{"line": 3, "input": {column: text, …}, result: number or text or
//! null, …, "error": null or text}`; `input` is `null` when the record's fields
//! do not match the header. `line` is the physical line (from 1, the header being line 1)
//! where the record starts, so blank lines and quoted line breaks never shift it.
//! A record that breaks RFC 4180, has another number of fields than the header, or
//! holds a value the core refuses, gets its reason in `error` (`code param:
//! reason`); the run goes on. Every record after the header is counted once:
//! `rows_in = rows_written + rows_reported` ([`Counts`]).
//!
//! Refused for the whole file ([`FileError`]): no header, a malformed header, a
//! column named twice, a chosen step whose columns are missing.

pub mod steps;

use crate::csv::{self, BlankLines, Record};
use crate::json::JsonWriter;
use alloc::format;
use alloc::string::String;
use alloc::vec::Vec;
use core::fmt;
pub use steps::{Cell, Column, Step, Values, STEP_NAMES};

/// What a run writes.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Format {
    /// CSV (RFC 4180, CRLF line ends) with a header row.
    #[default]
    Csv,
    /// One JSON object a line (LF line ends), no header.
    JsonLines,
}

impl Format {
    /// The format a name means: `csv` or `jsonl`.
    ///
    /// # Errors
    /// [`crate::Error::UnknownName`] on `format`.
    pub fn from_name(name: &str) -> crate::Result<Format> {
        match name.trim() {
            "csv" => Ok(Format::Csv),
            "jsonl" => Ok(Format::JsonLines),
            _ => Err(crate::Error::UnknownName {
                param: "format",
                expected: "csv, jsonl",
            }),
        }
    }
}

/// Rows read, written with results, and reported with an error.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct Counts {
    /// Records after the header.
    pub rows_in: u64,
    /// Rows whose `error` is empty.
    pub rows_written: u64,
    /// Rows whose `error` names a problem.
    pub rows_reported: u64,
}

/// Why a whole file is refused.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct FileError {
    /// `header` or `compute`.
    pub param: &'static str,
    /// One sentence naming the line and the problem.
    pub message: String,
}

impl fmt::Display for FileError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.message)
    }
}

#[cfg(feature = "std")]
impl std::error::Error for FileError {}

fn header_error<T>(message: String) -> Result<T, FileError> {
    Err(FileError {
        param: "header",
        message,
    })
}

/// The header as read: the columns by position and the steps to compute.
#[derive(Debug, Clone)]
struct Header {
    names: Vec<String>,
    columns: Vec<Option<Column>>,
    steps: Vec<Step>,
    result_width: usize,
}

/// A batch run over one file; see the module doc.
///
/// # Example
/// ```
/// use loopwright::batch::BatchRun;
/// let mut run = BatchRun::new(None).unwrap();
/// let mut out = run.feed(b"a,beta\n1e5,10m\n0x2710,0.01\n").unwrap();
/// out += &run.finish().unwrap();
/// let lines: Vec<&str> = out.lines().collect();
/// assert!(lines[0].starts_with("line,a,beta,closed_loop_gain"));
/// assert!(lines[1].starts_with("2,1e5,10m,99.9000999000999,"));
/// assert!(lines[2].starts_with("3,0x2710,0.01,,,,,,") && lines[2].contains("syntax a: "));
/// assert_eq!((run.counts().rows_written, run.counts().rows_reported), (1, 1));
/// ```
#[derive(Debug, Clone)]
pub struct BatchRun {
    reader: csv::Reader,
    records: Vec<Record>,
    compute: Option<Vec<Step>>,
    format: Format,
    header: Option<Header>,
    counts: Counts,
}

impl BatchRun {
    /// A run computing `compute` (step names, see [`Step`]), or every step the
    /// header's columns allow when `None`.
    ///
    /// # Errors
    /// [`crate::Error::UnknownName`] on `compute` for an unknown step.
    pub fn new(compute: Option<&[&str]>) -> crate::Result<BatchRun> {
        BatchRun::with_format(compute, Format::Csv)
    }

    /// As [`BatchRun::new`], writing `format`.
    ///
    /// # Errors
    /// As [`BatchRun::new`].
    pub fn with_format(compute: Option<&[&str]>, format: Format) -> crate::Result<BatchRun> {
        let compute = match compute {
            Some(names) => Some(
                names
                    .iter()
                    .map(|n| Step::from_name(n))
                    .collect::<crate::Result<Vec<_>>>()?,
            ),
            None => None,
        };
        Ok(BatchRun {
            reader: csv::Reader::new(b',', BlankLines::Skip),
            records: Vec::new(),
            compute,
            format,
            header: None,
            counts: Counts::default(),
        })
    }

    /// The counts so far.
    pub fn counts(&self) -> Counts {
        self.counts
    }

    /// Read a chunk; returns the output rows of the records it completed.
    ///
    /// # Errors
    /// [`FileError`] when the header is refused.
    pub fn feed(&mut self, chunk: &[u8]) -> Result<String, FileError> {
        self.reader.feed(chunk, &mut self.records);
        self.drain()
    }

    /// End of input: returns the output of the last record.
    ///
    /// # Errors
    /// [`FileError`] when the header is refused or there is none.
    pub fn finish(&mut self) -> Result<String, FileError> {
        self.reader.finish(&mut self.records);
        let out = self.drain()?;
        if self.header.is_none() {
            return header_error(String::from(
                "the file has no header line (it is empty or holds only blank lines)",
            ));
        }
        Ok(out)
    }

    fn drain(&mut self) -> Result<String, FileError> {
        let mut out = String::new();
        let records = core::mem::take(&mut self.records);
        for record in &records {
            match &self.header {
                None => self.header = Some(self.read_header(record, &mut out)?),
                Some(header) => {
                    let ok = write_row(header, record, self.format, &mut out);
                    self.counts.rows_in += 1;
                    if ok {
                        self.counts.rows_written += 1;
                    } else {
                        self.counts.rows_reported += 1;
                    }
                }
            }
        }
        self.records = records;
        self.records.clear();
        Ok(out)
    }

    fn read_header(&self, record: &Record, out: &mut String) -> Result<Header, FileError> {
        let line = record.line;
        if let Some(p) = record.problem {
            return header_error(format!("line {line}: the header is malformed: {p}"));
        }
        let names: Vec<&str> = record
            .fields
            .iter()
            .enumerate()
            // A byte-order mark before the first name (as some spreadsheet programs
            // write UTF-8) is not part of it.
            .map(|(i, f)| {
                if i == 0 {
                    f.trim_start_matches('\u{feff}')
                } else {
                    f
                }
            })
            .collect();
        let columns: Vec<Option<Column>> = names.iter().map(|n| Column::from_header(n)).collect();
        for (i, name) in names.iter().enumerate() {
            let key = name.trim();
            let twin = names[..i]
                .iter()
                .position(|n| n.trim().eq_ignore_ascii_case(key));
            if let (false, Some(j)) = (key.is_empty(), twin) {
                return header_error(format!(
                    "line {line}: the column \"{key}\" appears twice (fields {} and {}); each column may appear once",
                    j + 1,
                    i + 1
                ));
            }
        }
        let has = |c: &Column| columns.contains(&Some(*c));
        let steps = match &self.compute {
            Some(chosen) => chosen.clone(),
            None => Step::ALL
                .into_iter()
                .filter(|s| s.has_inputs(&columns))
                .collect(),
        };
        for step in &steps {
            let missing: Vec<&str> = step
                .needs()
                .iter()
                .filter(|c| !has(c))
                .map(|c| c.name())
                .collect();
            if !missing.is_empty() {
                return Err(FileError {
                    param: "compute",
                    message: format!(
                        "the step {} needs the column(s) {}",
                        step.name(),
                        missing.join(", ")
                    ),
                });
            }
            let circuit = *step == Step::Tolerance && has(&Column::Circuit);
            if step.needs_stage()
                && !has(&Column::Stage)
                && !has(&Column::StageField("kind"))
                && !circuit
            {
                return Err(FileError {
                    param: "compute",
                    message: format!(
                        "the step {} needs a stage column (a stage document) or a kind column with the amplifier figures and parts{}",
                        step.name(),
                        if *step == Step::Tolerance { ", or a circuit column (a circuit document)" } else { "" }
                    ),
                });
            }
        }
        if self.format == Format::Csv {
            out.push_str("line");
            for name in &names {
                out.push(',');
                csv::write_text(out, name, ',');
            }
            for column in steps.iter().flat_map(|s| s.columns()) {
                out.push(',');
                out.push_str(column);
            }
            out.push_str(",error\r\n");
        }
        let result_width = steps.iter().map(|s| s.columns().len()).sum();
        Ok(Header {
            names: names.iter().map(|n| String::from(*n)).collect(),
            columns,
            steps,
            result_width,
        })
    }
}

/// Read one record's values and run the steps; the results so far and the first
/// error.
fn evaluate(header: &Header, record: &Record, results: &mut [Option<Cell>]) -> Option<String> {
    if let Some(p) = record.problem {
        return Some(format!("malformed_record line {}: {p}", record.line));
    }
    if record.fields.len() != header.columns.len() {
        return Some(format!(
            "field_count line {}: the row has {} fields, the header has {}",
            record.line,
            record.fields.len(),
            header.columns.len()
        ));
    }
    let mut values = Values::default();
    let reported = |e: crate::Error| format!("{} {e}", e.code());
    for (column, text) in header.columns.iter().zip(&record.fields) {
        if let Some(column) = column {
            if let Err(e) = values.read(*column, text) {
                return Some(reported(e));
            }
        }
    }
    let mut at = 0;
    for step in &header.steps {
        let width = step.columns().len();
        if let Err(e) = step.run(&values, &mut results[at..at + width]) {
            return Some(reported(e));
        }
        at += width;
    }
    None
}

/// Write one output row; whether it has no error.
fn write_row(header: &Header, record: &Record, format: Format, out: &mut String) -> bool {
    let mut results = alloc::vec![None; header.result_width];
    let error = evaluate(header, record, &mut results);
    let echo = record.fields.len() == header.columns.len();
    match format {
        Format::Csv => {
            out.push_str(&format!("{}", record.line));
            for i in 0..header.columns.len() {
                out.push(',');
                if echo {
                    csv::write_text(out, &record.fields[i], ',');
                }
            }
            for r in &results {
                out.push(',');
                match r {
                    Some(Cell::Number(x)) => csv::write_number(out, *x),
                    Some(Cell::Text(t)) => csv::write_text(out, t, ','),
                    None => {}
                }
            }
            out.push(',');
            if let Some(e) = &error {
                csv::write_text(out, e, ',');
            }
            out.push_str("\r\n");
        }
        Format::JsonLines => {
            let mut w = JsonWriter::new();
            w.begin_object();
            w.key("line");
            w.whole(record.line);
            w.key("input");
            if echo {
                w.begin_object();
                for (name, field) in header.names.iter().zip(&record.fields) {
                    w.key(name);
                    w.string(field);
                }
                w.end_object();
            } else {
                w.null();
            }
            let names = header.steps.iter().flat_map(|s| s.columns());
            for (name, r) in names.zip(&results) {
                w.key(name);
                match r {
                    Some(Cell::Number(x)) => w.number(*x),
                    Some(Cell::Text(t)) => w.string(t),
                    None => w.null(),
                }
            }
            w.key("error");
            match &error {
                Some(e) => w.string(e),
                None => w.null(),
            }
            w.end_object();
            out.push_str(&w.finish());
            out.push('\n');
        }
    }
    error.is_none()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn run(text: &str, compute: Option<&[&str]>) -> (Result<String, FileError>, Counts) {
        let mut r = BatchRun::new(compute).unwrap();
        let out = r.feed(text.as_bytes()).and_then(|mut o| {
            o += &r.finish()?;
            Ok(o)
        });
        (out, r.counts())
    }

    #[test]
    fn header_refusals_name_the_column() {
        let (e, _) = run("a,beta,A\n1,2,3\n", None);
        let e = e.unwrap_err();
        assert_eq!(e.param, "header");
        assert!(
            e.message
                .contains("the column \"A\" appears twice (fields 1 and 3)"),
            "{e}"
        );
        let (e, _) = run("a,beta\n", Some(&["spread"]));
        assert!(e
            .unwrap_err()
            .message
            .contains("needs the column(s) a_min, a_max"));
        let (e, _) = run("\n\n", None);
        assert!(e.unwrap_err().message.contains("no header"));
        assert_eq!(
            BatchRun::new(Some(&["fft"])).unwrap_err().param(),
            "compute"
        );
        let (e, _) = run("a,beta\n", Some(&["noise"]));
        let e = e.unwrap_err();
        assert_eq!(e.param, "compute");
        assert!(
            e.message
                .contains("the step noise needs the column(s) noise_at_hz, f_low_hz, f_high_hz"),
            "{e}"
        );
        let (e, _) = run("noise_at_hz,f_low_hz,f_high_hz\n", Some(&["noise"]));
        assert!(e
            .unwrap_err()
            .message
            .contains("the step noise needs a stage column"));
        assert_eq!(Format::from_name("xml").unwrap_err().param(), "format");
    }

    #[test]
    fn each_record_is_counted_once_and_reported_by_its_line() {
        let text = "\u{feff}topology,a,beta\n\nseries-shunt,1e5,0.01\nseries-shunt,1e5,0.01,12\" woofer\nshunt-shunt,1e5,\"0.01\"\n\"x\ny\",1,1\nseries-shunt,1e5,0.01";
        let (out, counts) = run(text, Some(&["stage"]));
        let out = out.unwrap();
        let lines: Vec<&str> = out.split("\r\n").collect();
        assert!(
            lines[0].starts_with("line,topology,a,beta,"),
            "{}",
            lines[0]
        );
        assert!(lines[1].starts_with("3,series-shunt,"));
        assert!(lines[2].starts_with("4,,,,"), "{}", lines[2]);
        assert!(lines[2].contains("malformed_record line 4: field 4 has a quote"));
        assert!(lines[3].starts_with("5,shunt-shunt,1e5,0.01,"));
        assert!(
            lines[4].starts_with("6,\"x\ny\",1,1,,,,,,\"unknown_name topology:"),
            "{}",
            lines[4]
        );
        assert!(lines[5].starts_with("8,series-shunt"));
        assert_eq!(
            counts,
            Counts {
                rows_in: 5,
                rows_written: 3,
                rows_reported: 2
            }
        );
    }

    #[test]
    fn json_lines_hold_the_same_row() {
        let mut r = BatchRun::with_format(Some(&["stage"]), Format::JsonLines).unwrap();
        let mut out = r.feed(b"a,beta,note\n1e5,0.01,=x\n1,\n").unwrap();
        out += &r.finish().unwrap();
        let lines: Vec<&str> = out.lines().collect();
        assert_eq!(lines.len(), 2, "no header line: {out}");
        let row = crate::json::parse(lines[0]).unwrap();
        let get = |k: &str| {
            row.as_object()
                .unwrap()
                .iter()
                .find(|(n, _)| n == k)
                .unwrap()
                .1
                .clone()
        };
        assert_eq!(get("line").as_f64(), Some(2.0));
        // JSON holds text as text: nothing to neutralise, the input kept as written.
        let input = get("input");
        assert_eq!(input.as_object().unwrap()[2].1.as_str(), Some("=x"));
        // Af = A/(1 + Aβ) = 10⁵/1001 (Sedra & Smith, 7th ed., section 10.1, from memory).
        assert!((get("closed_loop_gain").as_f64().unwrap() - 1e5 / 1001.0).abs() < 1e-12);
        assert_eq!(get("error"), crate::json::Json::Null);
        let bad = crate::json::parse(lines[1]).unwrap();
        let members = bad.as_object().unwrap();
        assert_eq!(
            members[1].1,
            crate::json::Json::Null,
            "input of a short row"
        );
        assert!(members
            .last()
            .unwrap()
            .1
            .as_str()
            .unwrap()
            .starts_with("field_count line 3"));
    }

    #[test]
    fn output_neutralises_formula_text_and_keeps_numbers() {
        let (out, _) = run("a,beta,note\n-100,0.01,=1+1\n", Some(&["stage"]));
        let out = out.unwrap();
        let row = out.lines().nth(1).unwrap();
        assert!(row.starts_with("2,-100,0.01,'=1+1,"), "{row}");
        assert!(row.contains("oscillation beta"), "{row}");
    }
}
