// Timing helpers for the benchmarks: median of repeated samples, each sample a
// loop long enough to dwarf the timer's resolution. Prints figures, never asserts.

import { performance } from 'node:perf_hooks';

/** Calls per batch so that one batch of `fn` takes at least `minSampleMs`. */
function calibrate(fn, minSampleMs) {
  let batch = 1;
  for (;;) {
    const t0 = performance.now();
    for (let i = 0; i < batch; i++) fn(i);
    const dt = performance.now() - t0;
    if (dt >= minSampleMs || batch >= 1 << 24) return batch;
    batch *= dt > 0 ? Math.min(16, Math.max(2, Math.ceil(minSampleMs / dt))) : 16;
  }
}

/**
 * Median time per call of each of `fns` in nanoseconds, their samples taken in turn
 * (A, B, A, B, …) so that the machine's slow and fast spells fall on all of them
 * alike: the ratios between them are what the table reports.
 * `quick` keeps the run short (the test suite uses it so the benches cannot rot).
 */
export function timeInterleaved(
  fns,
  { quick = false, minSampleMs = quick ? 2 : 20, samples = quick ? 3 : 15 } = {},
) {
  const batches = fns.map((fn) => calibrate(fn, minSampleMs));
  const times = fns.map(() => []);
  for (let s = 0; s < samples; s++) {
    fns.forEach((fn, k) => {
      const batch = batches[k];
      const t0 = performance.now();
      for (let i = 0; i < batch; i++) fn(i);
      times[k].push(((performance.now() - t0) * 1e6) / batch);
    });
  }
  return times.map((t) => {
    t.sort((a, b) => a - b);
    return t[Math.floor(t.length / 2)];
  });
}

/** 1234 ns → "1.23 µs". */
export function formatNs(ns) {
  if (!Number.isFinite(ns)) return '—';
  if (ns < 1e3) return `${ns.toPrecision(3)} ns`;
  if (ns < 1e6) return `${(ns / 1e3).toPrecision(3)} µs`;
  if (ns < 1e9) return `${(ns / 1e6).toPrecision(3)} ms`;
  return `${(ns / 1e9).toPrecision(3)} s`;
}
