// Runs the Stage view's tolerance analyses (stageTolerance) in a Web Worker, so that
// a long Monte Carlo leaves the page free: one run at a time, with the analyses done
// so far reported as they finish, and cancelled by ending the worker (a call into
// the core cannot be interrupted; the next run starts a new worker from the module
// already compiled). The worker is ./tolerance-worker.js as a module from the
// served page, or a classic Blob worker of its bundled text in the single offline file
// (wasm-source.js), started from the same wasm bytes the page loaded. Where no
// worker can be started, the run is made on the page thread instead.

import { wasmSource, toleranceWorkerSource } from '../wasm-source.js';

/** The full core as a compiled module, compiled once (off the page thread). */
let compiled = null;
function fullModule() {
  compiled ??= (async () => {
    const bytes = wasmSource('full');
    if (bytes) return WebAssembly.compile(bytes);
    const url = new URL('../../pkg/loopwright_bg.wasm', import.meta.url);
    return WebAssembly.compile(await (await fetch(url)).arrayBuffer());
  })();
  return compiled;
}

let blobUrl = null;
/**
 * A new worker: the module beside this file, or the single file's bundled text as
 * a classic Blob worker (a module worker from a Blob cannot start in a page opened
 * from file://, whose origin is opaque).
 */
function newWorker() {
  const source = toleranceWorkerSource();
  if (!source)
    return new Worker(new URL('./tolerance-worker.js', import.meta.url), { type: 'module' });
  blobUrl ??= URL.createObjectURL(new Blob([source], { type: 'text/javascript' }));
  return new Worker(blobUrl);
}

/** A LoopwrightError again from the fields the worker sent. */
function errorOf(e) {
  const err = new Error(e.message);
  err.name = e.name ?? 'Error';
  for (const k of ['code', 'param', 'subject']) if (e[k] !== undefined) err[k] = e[k];
  return err;
}

/**
 * The runner: `run(options, {onDone})` resolves to stageTolerance's answer for
 * `options` (exactly the core's: the worker's structured copy), calling
 * `onDone([analysis…])` as each analysis finishes; it rejects with the core's error,
 * or with an error named 'Cancelled' when `cancel()` or a newer run ends it.
 * `api` is used on the page thread when no worker can be had.
 */
export function createToleranceRunner(api) {
  let worker = null;
  let ready = null;
  let current = null;
  let nextId = 1;
  let noWorker = typeof Worker !== 'function';

  function start() {
    worker = newWorker();
    const w = worker;
    ready = fullModule().then(
      (wasm) =>
        new Promise((resolve, reject) => {
          w.onmessage = ({ data }) => {
            if (data.ready) resolve();
            else if (data.failed) reject(new Error(data.failed));
          };
          w.onerror = (e) => {
            e.preventDefault?.();
            reject(new Error(e.message || 'the worker could not be started'));
          };
          w.postMessage({ wasm });
        }),
    );
    return ready;
  }

  function end(reason) {
    if (!current) return;
    const { reject } = current;
    current = null;
    worker?.terminate();
    worker = null;
    ready = null;
    reject(Object.assign(new Error(reason), { name: 'Cancelled' }));
  }

  async function onPageThread(options, onDone) {
    // Let the page show the running state before the core takes the thread.
    await new Promise((r) => setTimeout(r, 0));
    const r = api.stageTolerance(options);
    onDone(['worstCase', 'sensitivity', 'monteCarlo'].filter((a) => r[a] !== null));
    return r;
  }

  return {
    /** Where runs are made: 'worker', or 'page' once no worker could be started. */
    get thread() {
      return noWorker ? 'page' : 'worker';
    },
    get running() {
      return current !== null;
    },
    /** End the run under way, if any (its promise rejects as Cancelled). */
    cancel() {
      end('cancelled');
    },
    run(options, { onDone = () => {} } = {}) {
      end('a newer run took its place');
      const id = nextId++;
      return new Promise((resolve, reject) => {
        current = { id, reject };
        const settle = (f, x) => {
          if (current?.id !== id) return;
          current = null;
          f(x);
        };
        const fallBack = () => {
          if (current?.id !== id) return;
          noWorker = true;
          worker?.terminate();
          worker = null;
          ready = null;
          onPageThread(options, onDone).then(
            (r) => settle(resolve, r),
            (e) => settle(reject, e),
          );
        };
        if (noWorker) return fallBack();
        let started;
        try {
          started = ready ?? start();
        } catch {
          return fallBack();
        }
        const w = worker;
        started.then(() => {
          if (current?.id !== id) return;
          w.onmessage = ({ data }) => {
            if (data.id !== id) return;
            if (data.done && current?.id === id) onDone(data.done);
            else if (data.result) settle(resolve, data.result);
            else if (data.error) settle(reject, errorOf(data.error));
          };
          w.onerror = (e) => {
            e.preventDefault?.();
            settle(reject, new Error(e.message || 'the tolerance run stopped'));
          };
          w.postMessage({ id, options });
        }, fallBack);
      });
    },
  };
}
