// The entry module of the spreadsheet-file module (www/pkg/sheetfiles/, package
// subpath loopwright/sheetfiles): the worksheet as .ods and .xlsx files and back,
// kept out of the modules loaded at start (docs/worksheet.md, "Spreadsheet files").
// Arguments are checked and copied here before the wasm is entered (guard.js).

import * as glue from './loopwright_glue.js';
import { MAX_TEXT, refusal, string } from './guard.js';

export { default, initSync } from './loopwright_glue.js';

/** Largest file accepted, in bytes (the worksheet document limit). */
export const MAX_FILE_BYTES = MAX_TEXT;

/**
 * The sheet document (JSON text, `Worksheet.saveDocument()`) as a `.ods` or `.xlsx`
 * file: a Uint8Array. `date` is written on the cover sheet (default: now, ISO 8601).
 */
export function exportSheetFile(document, format, date = new Date().toISOString()) {
  return glue.exportSheetFile(
    string(document, 'document'),
    string(format, 'format'),
    string(date, 'date'),
  );
}

/**
 * Read a `.ods`, `.xlsx`, `.csv` or `.tsv` file (`bytes`: Uint8Array or ArrayBuffer;
 * `format` without the dot) into `{document, problems}`; nothing is loaded.
 */
export function importSheetFile(bytes, format) {
  let copy;
  if (bytes instanceof ArrayBuffer) copy = new Uint8Array(bytes.slice(0));
  else if (bytes instanceof Uint8Array) copy = bytes.slice();
  else throw refusal('wrong_type', 'bytes', 'must be a Uint8Array or an ArrayBuffer');
  if (copy.length > MAX_FILE_BYTES)
    throw refusal('too_large', 'bytes', `too large; the limit is ${MAX_FILE_BYTES} bytes`);
  return glue.importSheetFile(copy, string(format, 'format'));
}

/**
 * A CSV text (as `loopwright-batch` writes it) as a `.ods` or `.xlsx` workbook: a
 * Uint8Array. The records go on the sheet `Results`, plain numbers as numbers,
 * text that a spreadsheet would run as a formula with an apostrophe in front; the
 * first sheet names `title` and `date` (default: now, ISO 8601).
 */
export function tableFile(
  csvText,
  format,
  title = 'loopwright table',
  date = new Date().toISOString(),
) {
  return glue.tableFile(
    string(csvText, 'csvText'),
    string(format, 'format'),
    string(title, 'title'),
    string(date, 'date'),
  );
}
