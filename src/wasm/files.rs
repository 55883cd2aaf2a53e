//! The spreadsheet-file module's boundary (feature `wasm-sheetfiles`): its own wasm
//! module (`www/pkg/sheetfiles/`, built by scripts/build-wasm.sh), which the page
//! loads only when the user exports or imports a spreadsheet file, so that the zip
//! and XML code stays out of the modules loaded at start. It takes and gives sheet
//! documents (the worksheet's JSON), so the page loads an import through its one
//! load path (which keeps the replaced sheet and offers an undo).
//!
//! Errors are thrown as JS `Error`s named `LoopwrightError` with `code` and `param`:
//! `bad_document` (param `document`) for a refused sheet document, `unknown_name`
//! (param `format`), and for a refused file its [`FileErrorKind::code`] (param
//! `file`): `bad_archive`, `missing_part`, `malformed`, `too_large`.

use crate::sheet::files::{
    export_ods, export_xlsx, import_delimited, import_ods, import_xlsx, table_file, ExportOptions,
    FileError, Imported,
};
use crate::sheet::Sheet;
use alloc::format;
use alloc::string::String;
use alloc::vec::Vec;
use js_sys::{Array, Object, Reflect};
use wasm_bindgen::prelude::*;

#[wasm_bindgen(typescript_custom_section)]
const TYPES: &str = r#"
/** An imported spreadsheet file: the sheet document to load, and what was not kept. */
export interface ImportedSheet {
  /** The worksheet document (JSON text), for `Worksheet.loadDocument`. */
  document: string;
  /** One sentence per thing not kept as it was, naming the sheet and cell. */
  problems: string[];
}
"#;

fn error(code: &str, param: &str, message: &str) -> JsValue {
    let e = js_sys::Error::new(message);
    e.set_name("LoopwrightError");
    let _ = Reflect::set(&e, &"code".into(), &code.into());
    let _ = Reflect::set(&e, &"param".into(), &param.into());
    e.into()
}

fn file_error(e: &FileError) -> JsValue {
    error(e.kind.code(), "file", &format!("{e}"))
}

/// The sheet document as an `.ods` or `.xlsx` file; `date` is written on the
/// cover sheet (ISO 8601 text, as the caller's clock gives it).
///
/// # Errors
/// `bad_document` for a document the worksheet refuses; `unknown_name` for a
/// format other than `"ods"` or `"xlsx"`.
#[wasm_bindgen(js_name = exportSheetFile)]
pub fn export_sheet_file(document: &str, format: &str, date: &str) -> Result<Vec<u8>, JsValue> {
    let mut sheet = Sheet::new();
    sheet
        .load_document(document)
        .map_err(|e| error("bad_document", "document", &format!("{e}")))?;
    let options = ExportOptions {
        date: String::from(date),
        ..ExportOptions::default()
    };
    let bytes = match format {
        "ods" => export_ods(&sheet, &options),
        "xlsx" => export_xlsx(&sheet, &options),
        _ => {
            return Err(error(
                "unknown_name",
                "format",
                "format must be \"ods\" or \"xlsx\"",
            ))
        }
    };
    bytes.map_err(|e| file_error(&e))
}

/// A CSV text (the batch tool's output) as a `.ods` or `.xlsx` workbook: a cover
/// sheet naming `title` and dated `date`, the records on the sheet `Results`
/// (plain numbers as numbers, text that a spreadsheet would run as a formula
/// with an apostrophe in front).
///
/// # Errors
/// `unknown_name` (param `format`) for a format other than `"ods"` or `"xlsx"`;
/// `malformed` (a record that breaks RFC 4180, naming its line) or `too_large`
/// (over a sheet's rows or columns), param `file`.
#[wasm_bindgen(js_name = tableFile)]
pub fn table_file_js(
    csv_text: &str,
    format: &str,
    title: &str,
    date: &str,
) -> Result<Vec<u8>, JsValue> {
    let xlsx = match format {
        "ods" => false,
        "xlsx" => true,
        _ => {
            return Err(error(
                "unknown_name",
                "format",
                "format must be \"ods\" or \"xlsx\"",
            ))
        }
    };
    let options = ExportOptions {
        date: String::from(date),
        ..ExportOptions::default()
    };
    table_file(csv_text, title, xlsx, &options).map_err(|e| file_error(&e))
}

fn imported(i: &Imported) -> Result<JsValue, JsValue> {
    let document = i.document().map_err(|e| file_error(&e))?;
    let out = Object::new();
    let problems: Array = i.problems.iter().map(|p| JsValue::from_str(p)).collect();
    Reflect::set(&out, &"document".into(), &document.into())?;
    Reflect::set(&out, &"problems".into(), &problems)?;
    Ok(out.into())
}

/// Read an `.ods`, `.xlsx`, `.csv` or `.tsv` file (`format` without the dot) into a
/// sheet document; nothing is loaded anywhere.
///
/// # Errors
/// The file's refusal (`bad_archive`, `missing_part`, `malformed`, `too_large`,
/// param `file`), `unknown_name` for another format, `malformed` for CSV/TSV that
/// is not UTF-8.
#[wasm_bindgen(js_name = importSheetFile, unchecked_return_type = "ImportedSheet")]
pub fn import_sheet_file(bytes: &[u8], format: &str) -> Result<JsValue, JsValue> {
    let text = || {
        core::str::from_utf8(bytes.strip_prefix("\u{feff}".as_bytes()).unwrap_or(bytes))
            .map_err(|_| error("malformed", "file", "the file is not UTF-8 text"))
    };
    let result = match format {
        "ods" => import_ods(bytes),
        "xlsx" => import_xlsx(bytes),
        "csv" => import_delimited(text()?, b','),
        "tsv" => import_delimited(text()?, b'\t'),
        _ => {
            return Err(error(
                "unknown_name",
                "format",
                "format must be \"ods\", \"xlsx\", \"csv\" or \"tsv\"",
            ))
        }
    };
    imported(&result.map_err(|e| file_error(&e))?)
}
