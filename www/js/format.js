// Pure helpers for reading and writing engineering numbers. No DOM here.

const SI_PREFIX = { p: 1e-12, n: 1e-9, u: 1e-6, 'µ': 1e-6, m: 1e-3, k: 1e3, K: 1e3, M: 1e6, G: 1e9, T: 1e12 };

// Unit words the inputs accept after a number; they are checked by the caller.
const UNIT_WORDS = ['Ω', 'ohm', 'ohms', 'V/V', 'A/A', 'A/V', 'V/A', 'V', 'A', 'S', 'Hz', 'F', 'H', 'dB'];

const PLAIN = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
// IEC 60062 letter-for-decimal codes: 4k7, 2R2, R47, 1M5, 10k (letter replaces the point).
const LETTER_CODE = /^([+-]?)(\d*)([pnuµmkKMGTR])(\d*)$/;

/**
 * Parse a number typed by a person: plain or exponent form, an SI prefix
 * (1.5k, 10n, 2.2µ), an IEC 60062 letter code (4k7, 2R2, R47) and an optional
 * unit word (10 kΩ, 3 MHz). Returns {value} or {error} with a sentence.
 */
export function parseEngineering(text) {
  let s = String(text).trim();
  if (s === '') return { error: 'empty: type a number' };
  for (const unit of UNIT_WORDS.slice().sort((a, b) => b.length - a.length)) {
    if (s.length > unit.length && s.endsWith(unit)) {
      s = s.slice(0, -unit.length).trim();
      break;
    }
  }
  if (PLAIN.test(s)) return finite(Number(s));
  const last = s.slice(-1);
  const mantissa = s.slice(0, -1).trim();
  if (last in SI_PREFIX && PLAIN.test(mantissa)) return finite(Number(mantissa) * SI_PREFIX[last]);
  const m = LETTER_CODE.exec(s);
  if (m && (m[2] !== '' || m[4] !== '')) {
    const scale = m[3] === 'R' ? 1 : SI_PREFIX[m[3]];
    const digits = Number(`${m[2] || '0'}.${m[4] || '0'}`);
    return finite((m[1] === '-' ? -1 : 1) * digits * scale);
  }
  return { error: `"${String(text).trim()}" is not a number (try 4.7k, 4k7, 2.2e-9, 10 MΩ)` };
}

function finite(value) {
  return Number.isFinite(value) ? { value } : { error: 'the number is too large' };
}

const PREFIXES = [
  [1e12, 'T'], [1e9, 'G'], [1e6, 'M'], [1e3, 'k'], [1, ''], [1e-3, 'm'], [1e-6, 'µ'], [1e-9, 'n'], [1e-12, 'p'],
];

/** Format with an SI prefix and `digits` significant digits: 1.234k, 99.90, 12.0µ. */
export function formatEngineering(value, digits = 4) {
  if (!Number.isFinite(value)) return '—';
  if (value === 0) return '0';
  const mag = Math.abs(value);
  if (mag >= 1e15 || mag < 1e-13) return value.toExponential(digits - 1);
  const [scale, prefix] = PREFIXES.find(([s]) => mag >= s * 0.9999999) ?? PREFIXES[PREFIXES.length - 1];
  return `${(value / scale).toPrecision(digits)}${prefix}`;
}

/** Plain number with `digits` significant digits, exponent form for extremes. */
export function formatPlain(value, digits = 6) {
  if (!Number.isFinite(value)) return '—';
  const mag = Math.abs(value);
  if (value !== 0 && (mag >= 1e9 || mag < 1e-4)) return value.toExponential(digits - 1);
  return trimZeros(value.toPrecision(digits));
}

function trimZeros(s) {
  return s.includes('.') && !s.includes('e') ? s.replace(/\.?0+$/, '') : s;
}
