//! The batch evaluation of design rows behind `loopwright-batch`: a CSV file in,
//! streamed in chunks of any size, and a CSV file out, one output row per input
//! record.
//!
//! The input is read by [`crate::csv`] (RFC 4180, strict), its values by
//! [`crate::notation::parse_value`], and every number is computed by the feedback
//! area ([`steps`]); the output is written by [`crate::csv`], so text that a
//! spreadsheet program would run as a formula gets an apostrophe in front.
//!
//! Output: `line`, the input columns as written, the result columns of the chosen
//! steps, `error`. `line` is the physical line (from 1, the header being line 1)
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
use alloc::format;
use alloc::string::String;
use alloc::vec::Vec;
use core::fmt;
pub use steps::{Column, Step, Values, STEP_NAMES};

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
                    let ok = write_row(header, record, &mut out);
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
            if *step == Step::Loop && !step.has_inputs(&columns) {
                return Err(FileError {
                    param: "compute",
                    message: String::from(
                        "the step loop needs a stage column (a stage document) or a kind column with the amplifier figures and parts",
                    ),
                });
            }
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
        }
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
        let result_width = steps.iter().map(|s| s.columns().len()).sum();
        Ok(Header {
            columns,
            steps,
            result_width,
        })
    }
}

/// Read one record's values and run the steps; the results so far and the first
/// error.
fn evaluate(header: &Header, record: &Record, results: &mut [Option<f64>]) -> Option<String> {
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
fn write_row(header: &Header, record: &Record, out: &mut String) -> bool {
    let mut results = alloc::vec![None; header.result_width];
    let error = evaluate(header, record, &mut results);
    out.push_str(&format!("{}", record.line));
    let echo = record.fields.len() == header.columns.len();
    for i in 0..header.columns.len() {
        out.push(',');
        if echo {
            csv::write_text(out, &record.fields[i], ',');
        }
    }
    for r in &results {
        out.push(',');
        if let Some(x) = r {
            csv::write_number(out, *x);
        }
    }
    out.push(',');
    if let Some(e) = &error {
        csv::write_text(out, e, ',');
    }
    out.push_str("\r\n");
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
            BatchRun::new(Some(&["noise"])).unwrap_err().param(),
            "compute"
        );
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
    fn output_neutralises_formula_text_and_keeps_numbers() {
        let (out, _) = run("a,beta,note\n-100,0.01,=1+1\n", Some(&["stage"]));
        let out = out.unwrap();
        let row = out.lines().nth(1).unwrap();
        assert!(row.starts_with("2,-100,0.01,'=1+1,"), "{row}");
        assert!(row.contains("oscillation beta"), "{row}");
    }
}
