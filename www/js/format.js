// Writing numbers for people: a thin caller of the core's one display
// (src/notation/format.rs, docs/notation.md). No DOM here. main.js hands the
// loaded core over once with useCore(api); reading typed values is the core's too
// (api.parseValue, api.parseList).

let core = null;

/** Use the loaded core module's formatValue, formatPlain and formatFull. */
export function useCore(api) {
  core = api;
}

function ready() {
  if (!core) throw new Error('format.js: useCore(api) has not been called');
  return core;
}

/**
 * Display with an SI prefix on the unit and `digits` significant digits, the unit
 * after a space: 4.7 kΩ, 50.76 kHz, 80 k; no prefix on %, ppm, dB or degrees.
 */
export function formatEngineering(value, digits = 4, unit = '') {
  if (!Number.isFinite(value)) return '—';
  return ready().formatValue(value, unit, digits);
}

/** Display without a prefix, for values already in the unit shown: 99.9, 4.12 nV/√Hz. */
export function formatPlain(value, digits = 6, unit = '') {
  if (!Number.isFinite(value)) return '—';
  return ready().formatPlain(value, unit, digits);
}

/** Full precision, for CSV and the clipboard: the shortest text that reads back the same. */
export function formatFull(value, unit = '') {
  if (!Number.isFinite(value)) return '';
  return ready().formatFull(value, unit);
}
