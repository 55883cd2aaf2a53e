// The Stage view's tolerance run off the page thread: a module worker with its own
// instance of the full core, started from the compiled module the page hands it
// (so the single offline file needs no request: scripts/build-single.mjs bundles
// this file into a Blob worker). It calls the core's `stageTolerance` once per
// analysis (worst case, sensitivity, Monte Carlo: independent, so the answers are
// those of one call with all three) and says after each which are done. The page
// cancels a run by ending the worker (tolerance-run.js); nothing is computed here.
//
// Messages in: `{wasm}` (a WebAssembly.Module) first, then `{id, options}`.
// Messages out: `{ready: true}` or `{failed: message}` after the start;
// `{id, done: [analysis…]}` after each analysis; `{id, result}` or `{id, error:
// {name, message, code, param, subject}}` at the end.

import init, { stageTolerance } from '../../pkg/loopwright.js';

/** The analyses in the order they run (the slowest, the Monte Carlo, last). */
const ORDER = ['worstCase', 'sensitivity', 'monteCarlo'];

let started = null;

self.onmessage = async ({ data }) => {
  if (data.wasm) {
    started = init({ module_or_path: data.wasm }).then(
      () => self.postMessage({ ready: true }),
      (err) => self.postMessage({ failed: String(err?.message ?? err) }),
    );
    return;
  }
  await started;
  const { id, options } = data;
  const asked = options.analyses ?? ORDER;
  const result = { parts: null, temperaturesC: null };
  for (const a of ORDER) result[a] = null;
  const done = [];
  try {
    for (const analysis of ORDER.filter((a) => asked.includes(a))) {
      const r = stageTolerance({ ...options, analyses: [analysis] });
      result.parts = r.parts;
      result.temperaturesC = r.temperaturesC;
      result[analysis] = r[analysis];
      done.push(analysis);
      self.postMessage({ id, done: done.slice() });
    }
    self.postMessage({ id, result });
  } catch (err) {
    const { name, message, code, param, subject } = err ?? {};
    self.postMessage({
      id,
      error: { name, message: String(message ?? err), code, param, subject },
    });
  }
};
