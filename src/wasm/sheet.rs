//! JS bindings for the worksheet engine: a `Worksheet` class,
//! the function catalog and the list of error values.

use super::{js_error, throw, to_js};
use crate::sheet::functions::catalog_json;
use crate::sheet::{
    range_to_tsv, to_csv, CellRef, ErrorKind, Range, Sheet, Value, MAX_PASTE_BYTES,
};
use alloc::string::{String, ToString};
use alloc::vec::Vec;
use serde::Serialize;
use wasm_bindgen::prelude::*;
use wasm_bindgen::JsCast;

#[wasm_bindgen(typescript_custom_section)]
const SHEET_TYPES: &str = r##"
/** What a worksheet cell shows. */
export interface CellValue {
  /** Address such as "B3". */
  address: string;
  kind: "empty" | "number" | "text" | "boolean" | "error";
  /** The value as the cell shows it: number with unit, TRUE/FALSE, error code. */
  display: string;
  number: number | null;
  /** Unit symbol the number was written with: "Ω", "V", "A", "S", "Hz", "F", "H" or "dB". */
  unit: string | null;
  text: string | null;
  boolean: boolean | null;
  /** Error code such as "#DIV/0!", "#CYCLE!", "#BLOCKED!", "#SYNTAX!". */
  error: string | null;
  /** One-line explanation of the error value. */
  message: string | null;
  /** The cell's input, or null for an empty cell. */
  input: string | null;
  /** The range this cell spills into, such as "C1:D1", when it spills. */
  spill: string | null;
  /** The cell whose results spill into this one, when one does. */
  spilledFrom: string | null;
}
/** An error value a cell can show. */
export interface ErrorValueInfo { code: string; explanation: string; }
/** One parameter of a worksheet function (from `functionCatalog()`). */
export interface CatalogParam {
  name: string; summary: string; unit: string; optional: boolean; default: number | null; range: string;
}
/** One worksheet function; `JSON.parse(functionCatalog()).functions` is an array of these. */
export interface CatalogFunction {
  name: string;
  area: string;
  summary: string;
  params: CatalogParam[];
  /** Whether the last parameter repeats. */
  repeats: boolean;
  /** What it gives, in words (unit; for several values what each fanned-out cell holds). */
  result: string;
  resultUnit: string;
  /** For results that fan out into neighbouring cells: what each holds, left to right. */
  spill: string[];
  /** Search words: synonyms, trade words and units the help finds it by. */
  words: string;
  examples: { formula: string; expected: number[] | boolean | string; source: string }[];
}
export interface FunctionCatalog { format: "loopwright-functions"; version: 1; functions: CatalogFunction[]; }
"##;

/// Most cells `values()` returns at once.
const MAX_VIEW_CELLS: u64 = 100_000;

fn cell(address: &str) -> Result<CellRef, JsValue> {
    throw(address.parse())
}

fn range(text: &str) -> Result<Range, JsValue> {
    throw(Range::parse(text).ok_or(crate::Error::OutOfDomain {
        param: "range",
        requirement: "must be a range such as A1:C4 or a single cell address",
    }))
}

/// The pasted text as a Rust string, refused by its JS length before it is copied:
/// a UTF-16 length above the byte limit is certainly above it in UTF-8 (each code
/// unit takes at least one byte), and nothing is allocated for it.
fn pasted_text(text: &JsValue) -> Result<String, JsValue> {
    let too_large = crate::Error::TooLarge {
        param: "text",
        limit: MAX_PASTE_BYTES as u64,
    };
    let Some(js) = text.dyn_ref::<js_sys::JsString>() else {
        return Err(js_error(crate::Error::OutOfDomain {
            param: "text",
            requirement: "must be a string of tab-separated values",
        }));
    };
    if js.length() as usize > MAX_PASTE_BYTES {
        return Err(js_error(too_large));
    }
    Ok(String::from(js))
}

fn addresses(cells: &[CellRef]) -> js_sys::Array {
    cells.iter().map(|c| JsValue::from(c.to_string())).collect()
}

/// What a cell shows, as a plain JS object.
#[derive(Serialize)]
#[serde(rename_all = "camelCase")]
struct CellView {
    address: String,
    /// `empty`, `number`, `text`, `boolean` or `error`.
    kind: &'static str,
    /// The value as the cell shows it (number with unit, TRUE/FALSE, error code).
    display: String,
    number: Option<f64>,
    unit: Option<&'static str>,
    text: Option<String>,
    boolean: Option<bool>,
    error: Option<&'static str>,
    /// The one-line explanation of an error value.
    message: Option<String>,
    input: Option<String>,
    /// The range this cell spills into, when it spills.
    spill: Option<String>,
    /// The cell whose results spill into this one, when one does.
    spilled_from: Option<String>,
}

fn view(sheet: &Sheet, c: CellRef) -> CellView {
    let v = sheet.shown(c);
    let mut out = CellView {
        address: c.to_string(),
        kind: "empty",
        display: v.display(),
        number: None,
        unit: None,
        text: None,
        boolean: None,
        error: None,
        message: None,
        input: sheet.input(c).map(String::from),
        spill: sheet.spill_range(c).map(|r| r.to_string()),
        spilled_from: sheet.spill_anchor(c).map(|a| a.to_string()),
    };
    match v {
        Value::Empty | Value::Array(_) => {}
        Value::Number(x, u) => {
            out.kind = "number";
            out.number = Some(x);
            out.unit = u.map(|u| u.symbol());
        }
        Value::Text(t) => {
            out.kind = "text";
            out.text = Some(t);
        }
        Value::Bool(b) => {
            out.kind = "boolean";
            out.boolean = Some(b);
        }
        Value::Error(e) => {
            out.kind = "error";
            out.error = Some(e.kind.code());
            out.message = Some(String::from(e.message()));
        }
    }
    out
}

fn document_error(e: crate::sheet::DocumentError) -> JsValue {
    let err = js_sys::Error::new(&e.to_string());
    err.set_name("LoopwrightError");
    let obj: &js_sys::Object = err.as_ref();
    let _ = js_sys::Reflect::set(obj, &"code".into(), &"bad_document".into());
    let _ = js_sys::Reflect::set(obj, &"param".into(), &"document".into());
    let _ = js_sys::Reflect::set(obj, &"reason".into(), &e.message.as_str().into());
    err.into()
}

/// A worksheet: cells with inputs, formulas and named cells.
#[wasm_bindgen]
#[derive(Default)]
pub struct Worksheet {
    sheet: Sheet,
}

#[wasm_bindgen]
impl Worksheet {
    /// An empty worksheet.
    #[wasm_bindgen(constructor)]
    pub fn new() -> Worksheet {
        Worksheet::default()
    }

    /// Set a cell's input (`"4k7"`, `"=FEEDBACK.GAIN(A1; A2)"`, `""` to clear); returns
    /// the addresses whose shown value changed.
    #[wasm_bindgen(js_name = setCell, unchecked_return_type = "string[]")]
    pub fn set_cell(&mut self, address: &str, input: &str) -> Result<js_sys::Array, JsValue> {
        let c = cell(address)?;
        Ok(addresses(throw(self.sheet.set_cell(c, input))?))
    }

    /// What a cell shows: `{address, kind, display, number, unit, text, boolean,
    /// error, message, input, spill, spilledFrom}`.
    #[wasm_bindgen(unchecked_return_type = "CellValue")]
    pub fn value(&self, address: &str) -> Result<JsValue, JsValue> {
        to_js(&view(&self.sheet, cell(address)?))
    }

    /// What every cell of a range shows, as rows of the objects of `value`.
    #[wasm_bindgen(unchecked_return_type = "CellValue[][]")]
    pub fn values(&self, cells: &str) -> Result<JsValue, JsValue> {
        let r = range(cells)?;
        if r.area() > MAX_VIEW_CELLS {
            return Err(js_error(crate::Error::TooLarge {
                param: "range",
                limit: MAX_VIEW_CELLS,
            }));
        }
        let rows: Vec<Vec<CellView>> = (r.start.row..=r.end.row)
            .map(|row| {
                (r.start.col..=r.end.col)
                    .map(|col| view(&self.sheet, CellRef { row, col }))
                    .collect()
            })
            .collect();
        to_js(&rows)
    }

    /// Re-evaluate every cell; returns the changed addresses (normally none).
    #[wasm_bindgen(unchecked_return_type = "string[]")]
    pub fn recalculate(&mut self) -> js_sys::Array {
        addresses(self.sheet.recalculate_all())
    }

    /// A cell's input, or `undefined`.
    pub fn input(&self, address: &str) -> Result<Option<String>, JsValue> {
        Ok(self.sheet.input(cell(address)?).map(String::from))
    }

    /// The addresses whose shown value changed in the last edit.
    #[wasm_bindgen(js_name = changedCells, unchecked_return_type = "string[]")]
    pub fn changed_cells(&self) -> js_sys::Array {
        addresses(self.sheet.changed())
    }

    /// Name a cell; returns the changed addresses.
    #[wasm_bindgen(js_name = setName, unchecked_return_type = "string[]")]
    pub fn set_name(&mut self, name: &str, address: &str) -> Result<js_sys::Array, JsValue> {
        let c = cell(address)?;
        Ok(addresses(throw(self.sheet.set_name(name, c))?))
    }

    /// Remove a name; returns the changed addresses.
    #[wasm_bindgen(js_name = removeName, unchecked_return_type = "string[]")]
    pub fn remove_name(&mut self, name: &str) -> js_sys::Array {
        addresses(self.sheet.remove_name(name))
    }

    /// The names as an object `{name: address}`.
    #[wasm_bindgen(unchecked_return_type = "Record<string, string>")]
    pub fn names(&self) -> Result<JsValue, JsValue> {
        // Keys in byte order of the name, as a plain object; built directly rather than
        // through a BTreeMap and serde, which compiled a sort and a serializer of their own.
        let mut names: Vec<(&str, CellRef)> = self.sheet.names().collect();
        crate::sort::sort_by(&mut names, |a, b| a.0.cmp(b.0));
        let obj = js_sys::Object::new();
        for (name, cell) in names {
            // Reflect::set only fails on frozen or proxy objects; this one is fresh.
            let _ = js_sys::Reflect::set(&obj, &name.into(), &cell.to_string().into());
        }
        Ok(obj.into())
    }

    /// The sheet as a document (JSON text, format `loopwright-sheet`, version 1).
    #[wasm_bindgen(js_name = saveDocument)]
    pub fn save_document(&self) -> String {
        self.sheet.save_document()
    }

    /// Replace the sheet by a document; throws a `DocumentError` (code
    /// `bad_document`, `reason` the sentence) and leaves
    /// the sheet as it was when the document is refused. Returns the changed
    /// addresses.
    #[wasm_bindgen(js_name = loadDocument, unchecked_return_type = "string[]")]
    // The error's shape is `DocumentError` in the TypeScript types (src/wasm/mod.rs).
    pub fn load_document(&mut self, text: &str) -> Result<js_sys::Array, JsValue> {
        self.sheet.load_document(text).map_err(document_error)?;
        Ok(addresses(self.sheet.changed()))
    }

    /// Shown values from A1 to the last used cell, as CSV.
    #[wasm_bindgen(js_name = toCsv)]
    pub fn to_csv(&self) -> String {
        to_csv(&self.sheet)
    }

    /// Shown values of a range, as TSV for the clipboard.
    #[wasm_bindgen(js_name = rangeToTsv)]
    pub fn range_to_tsv(&self, cells: &str) -> Result<String, JsValue> {
        throw(range_to_tsv(&self.sheet, range(cells)?))
    }

    /// Paste TSV with its first field at `address`; returns the changed addresses.
    /// Throws `too_large` on `text` above 16 MiB (checked on the JS string's length
    /// before it is copied into the module) and on `range` above 100 000 fields; a
    /// refused paste leaves the sheet as it was.
    #[wasm_bindgen(js_name = pasteTsv, unchecked_return_type = "string[]")]
    pub fn paste_tsv(
        &mut self,
        address: &str,
        #[wasm_bindgen(unchecked_param_type = "string")] text: JsValue,
    ) -> Result<js_sys::Array, JsValue> {
        let c = cell(address)?;
        let text = pasted_text(&text)?;
        Ok(addresses(throw(self.sheet.paste_tsv(c, &text))?))
    }
}

/// The function catalog as JSON text: `JSON.parse` gives a `FunctionCatalog`.
#[wasm_bindgen(js_name = functionCatalog)]
pub fn function_catalog() -> String {
    catalog_json()
}

#[derive(Serialize)]
struct ErrorInfo {
    code: &'static str,
    explanation: &'static str,
}

/// The error values a cell can show: `[{code, explanation}]`.
#[wasm_bindgen(js_name = errorValues, unchecked_return_type = "ErrorValueInfo[]")]
pub fn error_values() -> Result<JsValue, JsValue> {
    let list: Vec<ErrorInfo> = ErrorKind::ALL
        .iter()
        .map(|k| ErrorInfo {
            code: k.code(),
            explanation: k.explanation(),
        })
        .collect();
    to_js(&list)
}
