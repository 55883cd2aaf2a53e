// Where the page's wasm comes from. The served page returns undefined, so the
// wasm-bindgen glue fetches pkg/loopwright_bg.wasm (and, on the first spreadsheet
// file, pkg/sheetfiles/loopwright_bg.wasm) beside it; the single-file build
// (scripts/build-single.mjs) replaces this module with one that returns the
// inlined bytes, so the file works from file:// with no request at all.
export function wasmSource() {
  return undefined;
}

/** The spreadsheet-file module's wasm: undefined here (fetched), its bytes in the single file. */
export async function sheetfilesSource() {
  return undefined;
}
