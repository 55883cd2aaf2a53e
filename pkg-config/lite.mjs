// Node entry point of `loopwright/lite`: the lite module (feedback, frequency and
// stability, network, distortion, noise; no circuit solver, no worksheet), loaded
// from this package's own files and initialised at import like node.mjs.

import { readFileSync } from 'node:fs';
import { initSync } from './web/lite/loopwright.js';

initSync({ module: readFileSync(new URL('./web/lite/loopwright_bg.wasm', import.meta.url)) });

export * from './web/lite/loopwright.js';

/** Already initialised in Node; resolves at once. */
export default async function init() {}
