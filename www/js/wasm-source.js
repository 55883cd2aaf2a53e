// Where the page's wasm comes from. The served page returns undefined, so the
// wasm-bindgen glue fetches pkg/loopwright_bg.wasm beside it; the single-file build
// (scripts/build-single.mjs) replaces this module with one that returns the
// inlined bytes, so the file works from file:// with no request at all.
export function wasmSource() {
  return undefined;
}
