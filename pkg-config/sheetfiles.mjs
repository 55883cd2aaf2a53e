// Node entry point of `loopwright/sheetfiles`: the spreadsheet-file module (.ods and
// .xlsx export and import of a worksheet document, a CSV table as a workbook),
// loaded from this package's own files and initialised at import like node.mjs.
// It is a module of its own so that the zip and XML code is loaded only by those
// who need it.

import { readFileSync } from 'node:fs';
import { initSync } from './web/sheetfiles/loopwright.js';

initSync({
  module: readFileSync(new URL('./web/sheetfiles/loopwright_bg.wasm', import.meta.url)),
});

export * from './web/sheetfiles/loopwright.js';

/** Already initialised in Node; resolves at once. */
export default async function init() {}
