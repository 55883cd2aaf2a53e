// The checks of the entry module (loopwright.js): every JS input is validated and
// copied into plain data here, in JS, before the wasm is entered, and every result is
// checked on the way out.
//
// Why in JS: a caller's getter, Proxy trap, toString or valueOf that runs inside a
// wasm call and throws unwinds through the module's frames and leaves its stack
// pointer or a borrow flag behind (the module broke after about 600 such calls).
// Here it runs outside the module; its exception becomes a LoopwrightError. A value
// of the wrong kind is refused with its name (a string where a number is expected is
// an error, never converted), and a size is refused before anything is allocated
// for it.

/** Longest string passed into the module (UTF-16 units): the sheet document limit. */
export const MAX_TEXT = 16 * 1024 * 1024;
/** Most numbers in one list argument or in all the lists of one options object. */
export const MAX_LIST = 1_000_000;
/** Most fields of one options object, and deepest nesting. */
const MAX_FIELDS = 64;
const MAX_DEPTH = 8;
/** Largest whole-number argument (points, digits, samples: u32 in the module). */
const MAX_U32 = 4_294_967_295;

/** A LoopwrightError like the ones the module throws: `code`, `param`, a sentence. */
export function refusal(code, param, reason, cause) {
  const err = new Error(`${param}: ${reason}`, cause === undefined ? undefined : { cause });
  err.name = 'LoopwrightError';
  err.code = code;
  err.param = param;
  return err;
}

function kindOf(x) {
  if (x === null) return 'null';
  if (Array.isArray(x)) return 'a list';
  return typeof x === 'object' ? 'an object' : `a ${typeof x}`;
}

function wrongType(param, expected, x) {
  return refusal('wrong_type', param, `must be ${expected}, not ${kindOf(x)}`);
}

/** A caller's getter or trap threw while its value was read: a LoopwrightError. */
function unreadable(param, e) {
  if (e?.name === 'LoopwrightError') return e;
  return refusal('wrong_type', param, 'could not be read: reading it threw', e);
}

/** A number (NaN and ±Infinity pass: the module names them `not_finite`). */
export function number(x, param) {
  if (typeof x !== 'number') throw wrongType(param, 'a number', x);
  return x;
}

/** A number, or null/undefined for "not given". */
export function optionalNumber(x, param) {
  if (x === null || x === undefined) return x;
  if (typeof x !== 'number') throw wrongType(param, 'a number, null or undefined', x);
  return x;
}

/** A whole number 0 … 2³² − 1 (the module's counts); the module checks its own limit. */
export function count(x, param) {
  if (typeof x !== 'number') throw wrongType(param, 'a whole number', x);
  if (!Number.isInteger(x) || x < 0) {
    throw refusal('out_of_domain', param, 'must be a whole number, 0 or more');
  }
  if (x > MAX_U32) throw refusal('too_large', param, `too large; the limit is ${MAX_U32}`);
  return x;
}

/** A string, at most MAX_TEXT units long (refused before it is copied into the module). */
export function string(x, param) {
  if (typeof x !== 'string') throw wrongType(param, 'a string', x);
  if (x.length > MAX_TEXT) throw refusal('too_large', param, `too large; the limit is ${MAX_TEXT}`);
  return x;
}

/** A list of numbers (array, typed array) copied into a fresh Float64Array. */
export function numbers(x, param) {
  if (typeof x !== 'object' || x === null) throw wrongType(param, 'a list of numbers', x);
  let i = -1;
  try {
    if (!Array.isArray(x) && !(ArrayBuffer.isView(x) && !(x instanceof DataView))) {
      throw wrongType(param, 'a list of numbers', x);
    }
    const n = x.length;
    if (typeof n !== 'number' || !Number.isInteger(n) || n < 0) {
      throw wrongType(param, 'a list of numbers', x);
    }
    if (n > MAX_LIST) throw refusal('too_large', param, `too large; the limit is ${MAX_LIST}`);
    const out = new Float64Array(n);
    for (i = 0; i < n; i++) {
      const v = x[i];
      if (typeof v !== 'number') throw wrongType(`${param}[${i}]`, 'a number', v);
      out[i] = v;
    }
    return out;
  } catch (e) {
    throw unreadable(i < 0 ? param : `${param}[${i}]`, e);
  }
}

/**
 * An options object (or a model object) copied into plain data: fresh objects
 * without prototype, plain arrays, numbers, strings, booleans, null; a field set to
 * undefined is left out. Names, types and unknown fields are the module's to check
 * (src/wasm/options.rs), with the same paths.
 */
export function plain(x, param) {
  const budget = { numbers: 0 };
  return copy(x, param, 0, budget);
}

function copy(x, path, depth, budget) {
  switch (typeof x) {
    case 'number':
    case 'boolean':
    case 'undefined':
      return x;
    case 'string':
      return string(x, path);
    case 'object':
      break;
    default:
      throw wrongType(path, 'a number, string, list or object', x);
  }
  if (x === null) return null;
  if (depth >= MAX_DEPTH)
    throw refusal('too_large', path, `nested too deep; the limit is ${MAX_DEPTH}`);
  // The index or field being read, for the path of a getter or trap that throws; the
  // path text itself is built only then, and for a child that is not a number.
  let last = null;
  try {
    if (Array.isArray(x) || (ArrayBuffer.isView(x) && !(x instanceof DataView))) {
      const n = x.length;
      if (typeof n !== 'number' || !Number.isInteger(n) || n < 0)
        throw wrongType(path, 'a list', x);
      budget.numbers += n;
      if (budget.numbers > MAX_LIST) {
        throw refusal('too_large', path, `too large; the limit is ${MAX_LIST} values`);
      }
      const out = new Array(n);
      for (let i = 0; i < n; i++) {
        last = i;
        const v = x[i];
        out[i] = typeof v === 'number' ? v : copy(v, `${path}[${i}]`, depth + 1, budget);
      }
      return out;
    }
    const keys = Object.keys(x);
    if (keys.length > MAX_FIELDS) {
      throw refusal('too_large', path || 'options', `too many fields; the limit is ${MAX_FIELDS}`);
    }
    const out = Object.create(null);
    for (const key of keys) {
      last = key;
      const v = x[key];
      if (typeof v === 'number') {
        out[key] = v;
        continue;
      }
      const c = copy(v, path ? `${path}.${key}` : key, depth + 1, budget);
      if (c !== undefined) out[key] = c;
    }
    return out;
  } catch (e) {
    const at =
      last === null
        ? path
        : typeof last === 'number'
          ? `${path}[${last}]`
          : path
            ? `${path}.${last}`
            : last;
    throw unreadable(at || 'options', e);
  }
}

/** An options object: a non-null, non-array object, copied by `plain`. */
export function options(x, param) {
  if (typeof x !== 'object' || x === null || Array.isArray(x)) {
    throw wrongType(param || 'options', 'an options object', x);
  }
  return plain(x, param);
}

/**
 * An options object of text and number fields, read once: its values at fixed places
 * (an array, `fields[i]`'s value at i, undefined for a field left out) when it is
 * regular (every field known and of its kind, `kinds[i]` 'string' or 'number', every
 * index of `required` given), else `{ general }` with its copy as `options` makes it,
 * for the export's general path, whose reader reports what is wrong. Each
 * value is read once, in the object's own order, and a copy made from the values
 * already read when the first irregular one is met: errors, their order and paths
 * are those of `options`.
 */
export function packed(x, fields, kinds, required) {
  if (typeof x !== 'object' || x === null || Array.isArray(x) || ArrayBuffer.isView(x)) {
    return { general: options(x, '') };
  }
  const budget = { numbers: 0 };
  let last = null;
  try {
    const keys = Object.keys(x);
    if (keys.length > MAX_FIELDS) {
      throw refusal('too_large', 'options', `too many fields; the limit is ${MAX_FIELDS}`);
    }
    const slots = new Array(fields.length);
    let out = null;
    for (let k = 0; k < keys.length; k++) {
      const key = keys[k];
      last = key;
      const v = x[key];
      if (out === null) {
        if (v === undefined) continue;
        const i = fields.indexOf(key);
        if (i >= 0 && typeof v === kinds[i] && (typeof v === 'number' || v.length <= MAX_TEXT)) {
          slots[i] = v;
          continue;
        }
        out = readSoFar(keys, k, fields, slots);
      }
      if (typeof v === 'number') {
        out[key] = v;
        continue;
      }
      const c = copy(v, key, 1, budget);
      if (c !== undefined) out[key] = c;
    }
    if (out !== null) return { general: out };
    for (const i of required) {
      if (slots[i] === undefined) return { general: readSoFar(keys, keys.length, fields, slots) };
    }
    return slots;
  } catch (e) {
    throw unreadable(last || 'options', e);
  }
}

/** The copy of the first `n` keys of a regular object, from its values at fixed places. */
function readSoFar(keys, n, fields, slots) {
  const out = Object.create(null);
  for (let k = 0; k < n; k++) {
    const v = slots[fields.indexOf(keys[k])];
    if (v !== undefined) out[keys[k]] = v;
  }
  return out;
}

/** β of the frequency functions: a number, or a transfer-model object. */
export function numberOrModel(x, param) {
  if (typeof x === 'number') return x;
  return options(x, param);
}

/**
 * Throw if a returned value holds NaN or ±Infinity anywhere (a number, a field, an
 * array element): the module's own checks should make this unreachable; this is the
 * last guard, so that no such number ever reaches a caller.
 */
export function finite(value, name) {
  const bad = findNonFinite(value, 0);
  if (bad !== null) {
    const path = bad.startsWith('.') ? bad.slice(1) : bad;
    throw refusal('overflow', path || name, 'the result overflows the floating-point range');
  }
  return value;
}

/**
 * null when every number in `v` is finite, else the path of the first that is not,
 * relative to `v` (`.gain`, `[2].re`, `''` for `v` itself); built on the way back,
 * so a finite result costs no strings.
 */
function findNonFinite(v, depth) {
  if (typeof v === 'number') return v - v === 0 ? null : '';
  if (typeof v !== 'object' || v === null || depth > 16) return null;
  if (ArrayBuffer.isView(v)) {
    for (let i = 0; i < v.length; i++) {
      if (v[i] - v[i] !== 0) return `[${i}]`;
    }
    return null;
  }
  if (Array.isArray(v)) {
    for (let i = 0; i < v.length; i++) {
      const bad = findNonFinite(v[i], depth + 1);
      if (bad !== null) return `[${i}]${bad}`;
    }
    return null;
  }
  for (const key of Object.keys(v)) {
    const bad = findNonFinite(v[key], depth + 1);
    if (bad !== null) return `.${key}${bad}`;
  }
  return null;
}

// The typed-array intrinsics, taken once at load: a caller's array is tested and
// filled through these, so no getter or method of its own (a subclass's `set`, a
// shadowing `length`) runs, and a Proxy is refused (it has no typed-array slots).
const TypedArrayProto = Object.getPrototypeOf(Float64Array.prototype);
const getterOf = (name) => Object.getOwnPropertyDescriptor(TypedArrayProto, name).get;
const typedArrayTag = getterOf(Symbol.toStringTag);
const typedArrayLength = getterOf('length');
const typedArrayBuffer = getterOf('buffer');
const typedArrayByteOffset = getterOf('byteOffset');
const typedArraySet = TypedArrayProto.set;

/** The fields of a sweep, in the order a sweep's result object has them. */
export const SWEEP_FIELDS = ['freqHz', 'magnitudeDb', 'phaseDeg'];

/**
 * The caller's arrays to fill with a sweep, `{freqHz, magnitudeDb, phaseDeg}`: three
 * Float64Arrays of one length that do not overlap. Returns `{ arrays, length }`, the
 * arrays in SWEEP_FIELDS order, each field read once. A field left out, an unknown
 * field, an array of another kind, lengths that differ or arrays that share memory
 * are refused naming the field (`into.phaseDeg`).
 */
export function sweepTargets(x, param) {
  const expected = 'an object of three Float64Arrays (freqHz, magnitudeDb, phaseDeg)';
  if (typeof x !== 'object' || x === null || Array.isArray(x) || ArrayBuffer.isView(x)) {
    throw wrongType(param, expected, x);
  }
  let at = param;
  let arrays;
  try {
    const keys = Object.keys(x);
    for (const key of keys) {
      if (!SWEEP_FIELDS.includes(key)) {
        throw refusal(
          'unknown_field',
          `${param}.${key}`,
          `unknown field; expected one of ${SWEEP_FIELDS.join(', ')}`,
        );
      }
    }
    arrays = SWEEP_FIELDS.map((key) => {
      at = `${param}.${key}`;
      return x[key];
    });
  } catch (e) {
    throw unreadable(at, e);
  }
  let length = 0;
  for (let k = 0; k < 3; k++) {
    const a = arrays[k];
    const name = `${param}.${SWEEP_FIELDS[k]}`;
    if (a === undefined) throw refusal('missing', name, 'is required but missing');
    if (typedArrayTag.call(a) !== 'Float64Array') throw wrongType(name, 'a Float64Array', a);
    const n = typedArrayLength.call(a);
    if (k === 0) length = n;
    else if (n !== length) {
      throw refusal(
        'out_of_domain',
        name,
        `must be as long as ${param}.${SWEEP_FIELDS[0]} (${length}), not ${n}`,
      );
    }
  }
  for (let k = 1; k < 3; k++) {
    for (let j = 0; j < k; j++) {
      if (overlap(arrays[j], arrays[k], length)) {
        throw refusal(
          'out_of_domain',
          `${param}.${SWEEP_FIELDS[k]}`,
          `must not share memory with ${param}.${SWEEP_FIELDS[j]}`,
        );
      }
    }
  }
  return { arrays, length };
}

/** Whether two Float64Arrays of `length` numbers share any bytes. */
function overlap(a, b, length) {
  if (length === 0 || typedArrayBuffer.call(a) !== typedArrayBuffer.call(b)) return false;
  const p = typedArrayByteOffset.call(a);
  const q = typedArrayByteOffset.call(b);
  return p < q + 8 * length && q < p + 8 * length;
}

/** Copy `source` (a typed array of the same length) into the caller's `target`. */
export function fillFrom(target, source) {
  typedArraySet.call(target, source);
}
