// Node entry point: loads the wasm from this package's own files (no fetch, no
// network) and initialises it synchronously at import, so every function is ready
// to call. `init()` is kept as a no-op so code written for browsers runs unchanged.

import { readFileSync } from 'node:fs';
import { initSync } from './web/loopwright.js';

initSync({ module: readFileSync(new URL('./web/loopwright_bg.wasm', import.meta.url)) });

export * from './web/loopwright.js';

/** Already initialised in Node; resolves at once. */
export default async function init() {}
