// Timing helpers for the benchmarks: median of repeated samples, each sample a
// loop long enough to dwarf the timer's resolution. Prints figures, never asserts.

import { performance } from 'node:perf_hooks';

/**
 * Median time per call of `fn` in nanoseconds.
 * `quick` keeps the run short (the test suite uses it so the benches cannot rot).
 */
export function timeIt(fn, { quick = false, minSampleMs = quick ? 2 : 20, samples = quick ? 3 : 15 } = {}) {
  // Calibrate: grow the batch until one batch takes at least minSampleMs.
  let batch = 1;
  for (;;) {
    const t0 = performance.now();
    for (let i = 0; i < batch; i++) fn(i);
    const dt = performance.now() - t0;
    if (dt >= minSampleMs || batch >= 1 << 24) break;
    batch *= dt > 0 ? Math.min(16, Math.max(2, Math.ceil(minSampleMs / dt))) : 16;
  }
  const times = [];
  for (let s = 0; s < samples; s++) {
    const t0 = performance.now();
    for (let i = 0; i < batch; i++) fn(i);
    times.push(((performance.now() - t0) * 1e6) / batch);
  }
  times.sort((a, b) => a - b);
  return times[Math.floor(times.length / 2)];
}

/** 1234 ns → "1.23 µs". */
export function formatNs(ns) {
  if (!Number.isFinite(ns)) return '—';
  if (ns < 1e3) return `${ns.toPrecision(3)} ns`;
  if (ns < 1e6) return `${(ns / 1e3).toPrecision(3)} µs`;
  if (ns < 1e9) return `${(ns / 1e6).toPrecision(3)} ms`;
  return `${(ns / 1e9).toPrecision(3)} s`;
}
