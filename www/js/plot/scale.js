// Pure scale and tick helpers for the plots. No DOM here; tick labels come from
// the core's one display (format.js).

import { formatEngineering, formatPlain } from '../format.js';

/** A linear or base-10 log mapping from [d0, d1] onto [r0, r1]. */
export function makeScale([d0, d1], [r0, r1], log = false) {
  const f = log ? Math.log10 : (v) => v;
  const a = f(d0);
  const span = f(d1) - a || 1;
  const map = (v) => r0 + ((f(v) - a) / span) * (r1 - r0);
  map.domain = [d0, d1];
  map.log = log;
  return map;
}

/** Smallest and largest finite values of the arrays (for log, positive values only). */
export function extent(arrays, log = false) {
  let lo = Infinity;
  let hi = -Infinity;
  for (const arr of arrays) {
    for (const v of arr) {
      if (!Number.isFinite(v) || (log && v <= 0)) continue;
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
  }
  if (lo === Infinity) return log ? [1, 10] : [0, 1];
  if (lo === hi) return log ? [lo / 10, hi * 10] : [lo - 1, hi + 1];
  return [lo, hi];
}

/** "Nice" linear ticks (steps of 1, 2 or 5 × 10ⁿ) covering [lo, hi]; about `count` of them. */
export function linearTicks(lo, hi, count = 6) {
  const raw = (hi - lo) / Math.max(1, count);
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * mag).find((s) => s >= raw) ?? 10 * mag;
  const first = Math.ceil(lo / step - 1e-9) * step;
  const ticks = [];
  for (let v = first; v <= hi + step * 1e-9; v += step)
    ticks.push(Math.abs(v) < step * 1e-9 ? 0 : v);
  return { ticks, step };
}

/** Widen [lo, hi] to whole tick steps. */
export function niceDomain(lo, hi, count = 6) {
  const { step } = linearTicks(lo, hi, count);
  return [Math.floor(lo / step) * step, Math.ceil(hi / step) * step];
}

/** Decade ticks 10ⁿ covering [lo, hi] (positive), with the domain widened to whole decades. */
export function decadeTicks(lo, hi) {
  const a = Math.floor(Math.log10(lo));
  const b = Math.ceil(Math.log10(hi));
  const ticks = [];
  for (let e = a; e <= b; e++) ticks.push(10 ** e);
  return { ticks, domain: [10 ** a, 10 ** b] };
}

/**
 * Whether an axis shows its numbers without an SI prefix: percentages, levels in
 * dB and angles (`HD3 (%)`, `dB`, `degrees`), or when the axis says so (`plain`).
 */
export function plainAxis(axis = {}) {
  if (axis.plain !== undefined) return Boolean(axis.plain);
  return /\((%|dB|°|ppm)\)$|^(dB|degrees|%)$/.test(axis.label ?? '');
}

const SUPERSCRIPT = {
  '-': '⁻',
  0: '⁰',
  1: '¹',
  2: '²',
  3: '³',
  4: '⁴',
  5: '⁵',
  6: '⁶',
  7: '⁷',
  8: '⁸',
  9: '⁹',
};

/** A power of ten as 10ⁿ ("10⁻⁷"), or null when `v` is not one. */
function powerOfTen(v) {
  if (!(v > 0)) return null;
  const e = Math.round(Math.log10(v));
  if (Math.abs(v / 10 ** e - 1) > 1e-9) return null;
  return `10${[...String(e)].map((c) => SUPERSCRIPT[c]).join('')}`;
}

/**
 * Short tick label through the core's display, three significant digits: 10 k,
 * 2.5 µ, 0.01. A plain axis (%, dB, degrees) gets no SI prefix; there a power of
 * ten below 0.001 or from 1 000 000 up is written 10ⁿ, so that a log axis of
 * percentages keeps short labels.
 */
export function tickLabel(v, plain = false) {
  if (!plain) return formatEngineering(v, 3);
  const power = Math.abs(v) < 1e-3 || Math.abs(v) >= 1e6 ? powerOfTen(v) : null;
  return power ?? formatPlain(v, 3);
}
