// Where the page's wasm comes from, for each of its two core modules: `name` is
// 'lite' (the calculator areas, loaded first) or 'full' (the circuit solver, the
// worksheet and the Stage view, loaded when a view needs it; www/js/main.js). The
// served page returns undefined, so each wasm-bindgen glue fetches the
// loopwright_bg.wasm beside it (pkg/lite/ or pkg/; on the first spreadsheet file,
// pkg/sheetfiles/); the single-file build (scripts/build-single.mjs) replaces this
// module with one that returns the inlined bytes, so the file works from file://
// with no request at all.
export function wasmSource(_name) {
  return undefined;
}

/** The spreadsheet-file module's wasm: undefined here (fetched), its bytes in the single file. */
export async function sheetfilesSource() {
  return undefined;
}

/**
 * The Stage view's tolerance worker as script text (a Blob worker): undefined here,
 * where www/js/stage/tolerance-worker.js is started as a module from its URL; the
 * single file returns the worker bundled, as it has no file beside it to start.
 */
export function toleranceWorkerSource() {
  return undefined;
}
