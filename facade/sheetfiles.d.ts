// Types of the spreadsheet-file module (facade/sheetfiles.js).
export { default, initSync } from './loopwright_glue.js';
export type { ImportedSheet } from './loopwright_glue.js';
/** Largest file accepted, in bytes. */
export const MAX_FILE_BYTES: number;
/** The sheet document as a `.ods` or `.xlsx` file; `date` (ISO 8601) goes on the cover sheet. */
export function exportSheetFile(
  document: string,
  format: 'ods' | 'xlsx',
  date?: string,
): Uint8Array;
/** A `.ods`, `.xlsx`, `.csv` or `.tsv` file as a sheet document and the problems met. */
export function importSheetFile(
  bytes: Uint8Array | ArrayBuffer,
  format: 'ods' | 'xlsx' | 'csv' | 'tsv',
): import('./loopwright_glue.js').ImportedSheet;
/** A CSV text (the batch tool's output) as a `.ods` or `.xlsx` workbook (sheet `Results`). */
export function tableFile(
  csvText: string,
  format: 'ods' | 'xlsx',
  title?: string,
  date?: string,
): Uint8Array;
