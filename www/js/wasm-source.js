// Where the page's wasm comes from, for each of its two modules: `name` is 'lite'
// (the calculator areas, loaded first) or 'full' (the circuit solver and the
// worksheet, loaded when a view needs it; www/js/main.js). The served page returns
// undefined, so each wasm-bindgen glue fetches the loopwright_bg.wasm beside it
// (pkg/lite/ or pkg/); the single-file build (scripts/build-single.mjs) replaces this
// module with one that returns the inlined bytes of the module named, so the file
// works from file:// with no request at all.
export function wasmSource(_name) {
  return undefined;
}
