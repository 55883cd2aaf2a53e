//! JS binding of the batch evaluation of design rows (`loopwright-batch`): a
//! `BatchRun` that takes the CSV file in chunks and gives the output CSV back.

use super::throw;
use crate::batch::{self, FileError};
use alloc::string::String;
use alloc::vec::Vec;
use wasm_bindgen::prelude::*;

/// A refused file as a `LoopwrightError` (code `out_of_domain`, `param` "header"
/// or "compute") whose message names the line and the column.
fn file_error(e: FileError) -> JsValue {
    let err = js_sys::Error::new(&e.message);
    err.set_name("LoopwrightError");
    let obj: &js_sys::Object = err.as_ref();
    // Reflect::set only fails on frozen or proxy objects; a fresh Error is neither.
    let _ = js_sys::Reflect::set(obj, &"code".into(), &"out_of_domain".into());
    let _ = js_sys::Reflect::set(obj, &"param".into(), &e.param.into());
    err.into()
}

/// A batch run over one CSV file of design rows (the columns and steps of
/// `docs/batch.md`): feed the file's bytes in chunks of any size, write what each
/// call returns, then what `finish()` returns. CSV output has `line` (the
/// physical line of the record), the input columns, the results and `error`;
/// text that a spreadsheet would run as a formula gets an apostrophe in front.
/// JSON lines output has one object a line: `line`, `input`, the results,
/// `error`. `rowsIn = rowsWritten + rowsReported`.
#[wasm_bindgen]
pub struct BatchRun {
    run: batch::BatchRun,
}

#[wasm_bindgen]
impl BatchRun {
    /// `compute`: the steps as a comma-separated list of `stage`, `impedance`,
    /// `inverse`, `spread`, `freq`, `loop`, `noise`, `distortion`, `eseries`,
    /// `pair`, `design`; omitted: every step the header's columns allow.
    /// `format`: `csv` (omitted) or `jsonl`.
    #[wasm_bindgen(constructor)]
    pub fn new(compute: Option<String>, format: Option<String>) -> Result<BatchRun, JsValue> {
        let names: Option<Vec<&str>> = compute.as_deref().map(|c| c.split(',').collect());
        let format = match format.as_deref() {
            None => batch::Format::Csv,
            Some(f) => throw(batch::Format::from_name(f))?,
        };
        Ok(BatchRun {
            run: throw(batch::BatchRun::with_format(names.as_deref(), format))?,
        })
    }

    /// Read a chunk of the file; returns the output rows it completed (the header
    /// row first). Throws when the header is refused (a column named twice, a
    /// malformed header, a chosen step without its columns).
    pub fn feed(&mut self, chunk: &[u8]) -> Result<String, JsValue> {
        self.run.feed(chunk).map_err(file_error)
    }

    /// End of the file; returns the last output row, if any. Throws when there
    /// was no header.
    pub fn finish(&mut self) -> Result<String, JsValue> {
        self.run.finish().map_err(file_error)
    }

    /// Records read after the header.
    #[wasm_bindgen(getter, js_name = rowsIn)]
    pub fn rows_in(&self) -> f64 {
        self.run.counts().rows_in as f64
    }

    /// Rows written with results (empty `error`).
    #[wasm_bindgen(getter, js_name = rowsWritten)]
    pub fn rows_written(&self) -> f64 {
        self.run.counts().rows_written as f64
    }

    /// Rows reported with an error.
    #[wasm_bindgen(getter, js_name = rowsReported)]
    pub fn rows_reported(&self) -> f64 {
        self.run.counts().rows_reported as f64
    }
}
