// Pure helpers for writing engineering numbers. No DOM here. (Reading them is the
// core's job: api.parseValue, SI prefixes and IEC 60062 codes.)

const PREFIXES = [
  [1e12, 'T'],
  [1e9, 'G'],
  [1e6, 'M'],
  [1e3, 'k'],
  [1, ''],
  [1e-3, 'm'],
  [1e-6, 'µ'],
  [1e-9, 'n'],
  [1e-12, 'p'],
];

/** Format with an SI prefix and `digits` significant digits: 1.234k, 99.90, 12.0µ. */
export function formatEngineering(value, digits = 4) {
  if (!Number.isFinite(value)) return '—';
  if (value === 0) return '0';
  const mag = Math.abs(value);
  if (mag >= 1e15 || mag < 1e-13) return value.toExponential(digits - 1);
  const [scale, prefix] =
    PREFIXES.find(([s]) => mag >= s * 0.9999999) ?? PREFIXES[PREFIXES.length - 1];
  return `${(value / scale).toPrecision(digits)}${prefix}`;
}

/** Plain number with `digits` significant digits, exponent form for extremes. */
export function formatPlain(value, digits = 6) {
  if (!Number.isFinite(value)) return '—';
  const mag = Math.abs(value);
  if (Number.isInteger(value) && mag < 1e15) return String(value);
  if (value !== 0 && (mag >= 1e9 || mag < 1e-4)) return value.toExponential(digits - 1);
  return trimZeros(value.toPrecision(digits));
}

function trimZeros(s) {
  return s.includes('.') && !s.includes('e') ? s.replace(/\.?0+$/, '') : s;
}
