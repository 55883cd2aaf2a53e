// The entry module of loopwright's JS API for the calculator areas (feedback,
// frequency and stability, network, distortion, noise): the "lite" module's whole
// API, and the part of the full module's API that loopwright.js re-exports.
//
// Every function here checks and copies its arguments in JS (guard.js) before the
// wasm is entered, and checks its result on the way out: a wrong type, a caller's
// throwing getter or Proxy trap, or an oversized input is a LoopwrightError with
// `code` and `param`, thrown outside the module, and no NaN or ±Infinity is ever
// returned. The glue's internal exports (takeError, topologyIndex,
// summarizeFeedbackPacked, feedbackLabels, scratchView, sweepHeld, heldSweepView;
// circuitTwoPortPacked in loopwright.js) are used here and not exported.
//
// Scalar exports return a bare number: the answer, or NaN with the LoopwrightError
// kept aside in the module (src/wasm/mod.rs, `scalar`); `checked` throws that error.
// This avoids the array the glue would build per call for a Result (4.5x slower, see
// bench/). Their wrappers stay small: two typeof tests and one subtraction.
// scripts/build-wasm.sh copies this file beside the glue (as loopwright.js in the lite
// module); tests/js/package.test.mjs checks that every number-returning export of the
// glue is wrapped, and tests/js/hostile.test.mjs calls every export with hostile input.

import * as glue from './loopwright_glue.js';
import {
  count,
  finite,
  number,
  numberOrModel,
  optionalNumber,
  options,
  refusal,
  string,
  sweepTargets,
  fillFrom,
} from './guard.js';

export { default, initSync } from './loopwright_glue.js';

function checked(x) {
  // x − x is 0 for every finite number, NaN for NaN and ±Infinity: one test for both.
  if (x - x === 0) return x;
  throw (
    glue.takeError() ??
    refusal('overflow', 'result', 'the result overflows the floating-point range')
  );
}

/** The refusal of the first argument of a scalar call that is not a number. */
function notNumbers(names, args) {
  for (let i = 0; i < names.length; i++) number(args[i], names[i]);
  return refusal('wrong_type', names[0], 'must be a number');
}

/** A scalar export of two numbers, with its parameter names. */
function scalar2(f, p, q) {
  return (a, b) => {
    if (typeof a !== 'number' || typeof b !== 'number') throw notNumbers([p, q], [a, b]);
    return checked(f(a, b));
  };
}

/** A scalar export of three numbers. */
function scalar3(f, p, q, r) {
  return (a, b, c) => {
    if (typeof a !== 'number' || typeof b !== 'number' || typeof c !== 'number') {
      throw notNumbers([p, q, r], [a, b, c]);
    }
    return checked(f(a, b, c));
  };
}

/**
 * Any other export: each argument checked by its kind (guard.js) in order, then the
 * call, then the result checked for non-finite numbers.
 */
function checkedCall(f, params) {
  return (...args) => {
    const copied = new Array(params.length);
    for (let i = 0; i < params.length; i++) copied[i] = params[i][1](args[i], params[i][0]);
    return finite(f(...copied), 'result');
  };
}

/**
 * checkedCall for an export whose Rust side refuses every non-finite number of its
 * result itself (an `overflow` LoopwrightError naming the result, src/wasm): the
 * result is not walked again here. The walk reads every element of a sweep's
 * Float64Arrays (about 35 µs for the three arrays of a 10 000-point sweep, a seventh
 * of the call; bench/).
 */
function callCheckedInModule(f, params) {
  return (...args) => {
    const copied = new Array(params.length);
    for (let i = 0; i < params.length; i++) copied[i] = params[i][1](args[i], params[i][0]);
    return f(...copied);
  };
}

const N = number;
const S = string;
const C = count;
const O = options;
const B = numberOrModel;
const ON = optionalNumber;

// Feedback relations.
export const closedLoopGain = scalar2(glue.closedLoopGain, 'a', 'beta');
export const loopGain = scalar2(glue.loopGain, 'a', 'beta');
export const feedbackAmount = scalar2(glue.feedbackAmount, 'a', 'beta');
export const feedbackAmountDb = scalar2(glue.feedbackAmountDb, 'a', 'beta');
export const gainSensitivity = scalar2(glue.gainSensitivity, 'a', 'beta');
export const betaForGain = scalar2(glue.betaForGain, 'a', 'targetGain');
export const minOpenLoopGain = scalar2(glue.minOpenLoopGain, 'beta', 'gainError');
export function idealBeta(targetGain) {
  if (typeof targetGain !== 'number') throw notNumbers(['targetGain'], [targetGain]);
  return checked(glue.idealBeta(targetGain));
}
export const loopPhasors = checkedCall(glue.loopPhasors, [
  ['aRe', N],
  ['aIm', N],
  ['betaRe', N],
  ['betaIm', N],
]);
export const impedancesWithFeedback = checkedCall(glue.impedancesWithFeedback, [['', O]]);
export const maxClosedLoopGain = checkedCall(glue.maxClosedLoopGain, [
  ['a', N],
  ['feedbackAmount', N],
]);
export const gainSpread = checkedCall(glue.gainSpread, [
  ['beta', N],
  ['aMin', N],
  ['aTyp', N],
  ['aMax', N],
]);
export const topologyInfo = checkedCall(glue.topologyInfo, [['topologyName', S]]);

// Frequency response and stability.
const MODEL_AND_BETA = [
  ['amplifier', O],
  ['beta', B],
];
export const loopGainSweep = callCheckedInModule(glue.loopGainSweep, [['', O]]);
export const closedLoopSweep = callCheckedInModule(glue.closedLoopSweep, [['', O]]);

/**
 * The `…Into` forms: the same sweep written into the caller's three Float64Arrays
 * (`points` their length when left out), which are returned in `into`; nothing is
 * allocated per call. The module keeps the sweep in its memory (`sweepHeld`) and each
 * array is copied out through a view of it (`heldSweepView`), made after the module
 * has returned, so its memory cannot grow in between. On any error the arrays are
 * left as they were: the module refuses before anything is copied.
 */
function sweepInto(closedLoop) {
  return (opts, into) => {
    const o = options(opts, '');
    const targets = sweepTargets(into, 'into');
    glue.sweepHeld(o, closedLoop, targets.length);
    for (let k = 0; k < 3; k++) fillFrom(targets.arrays[k], glue.heldSweepView(k));
    return into;
  };
}
export const loopGainSweepInto = sweepInto(false);
export const closedLoopSweepInto = sweepInto(true);
export const loopAt = checkedCall(glue.loopAt, [...MODEL_AND_BETA, ['fHz', N]]);
export const stabilityMargins = checkedCall(glue.stabilityMargins, [
  ...MODEL_AND_BETA,
  // Optional: `{ closedLoopPoles: true }` adds the poles that sign the margins.
  ['', (x, param) => (x === undefined ? undefined : O(x, param))],
]);
export const closedLoopPoles = checkedCall(glue.closedLoopPoles, MODEL_AND_BETA);
export const closedLoopTransfer = checkedCall(glue.closedLoopTransfer, MODEL_AND_BETA);
export const closedLoopBandwidth = checkedCall(glue.closedLoopBandwidth, MODEL_AND_BETA);
export const stepResponse = checkedCall(glue.stepResponse, [
  ...MODEL_AND_BETA,
  ['settleBand', N],
  ['points', C],
]);
export const analyzeLoop = checkedCall(glue.analyzeLoop, [
  ...MODEL_AND_BETA,
  ['settleBand', N],
  ['points', C],
]);
export const stepWaveform = checkedCall(glue.stepWaveform, [
  ...MODEL_AND_BETA,
  ['durationS', N],
  ['points', C],
]);
export const dominantPoleForMargin = checkedCall(glue.dominantPoleForMargin, [
  ['amplifier', O],
  ['beta', N],
  ['targetPmDeg', N],
]);
export const maxBetaForMargin = checkedCall(glue.maxBetaForMargin, [
  ['amplifier', O],
  ['targetPmDeg', N],
  ['betaLimit', N],
]);
export const twoPoleResponse = checkedCall(glue.twoPoleResponse, [
  ['f1', N],
  ['f2', N],
  ['t0', N],
]);
export const singlePoleHighCutoff = scalar3(glue.singlePoleHighCutoff, 'fH', 'a0', 'beta');
export const singlePoleLowCutoff = scalar3(glue.singlePoleLowCutoff, 'fL', 'am', 'beta');
export const gainBandwidth = scalar2(glue.gainBandwidth, 'a0', 'fH');

// Network synthesis and tolerance.
export const seriesValues = checkedCall(glue.seriesValues, [
  ['series', S],
  ['low', N],
  ['high', N],
]);
export function standardValue(series, value, rounding) {
  string(series, 'series');
  number(value, 'value');
  string(rounding, 'rounding');
  return checked(glue.standardValue(series, value, rounding));
}
export const standardNeighbours = checkedCall(glue.standardNeighbours, [
  ['series', S],
  ['value', N],
]);
export function seriesTolerance(series) {
  return checked(glue.seriesTolerance(string(series, 'series')));
}
// The reader's options (src/notation): which extras a context allows besides a
// number with SI prefix, IEC 60062 code and unit word. Passed to the wasm as flags
// (1 percent, 2 dB) and a declared unit, so no JS object is read inside the module.
const READ_OPTIONS = ['percent', 'decibels', 'unit'];

function readArguments(options) {
  if (options === undefined || options === null) return [0, ''];
  if (typeof options !== 'object') {
    throw refusal('wrong_type', 'options', 'must be an object {percent, decibels, unit}');
  }
  let keys;
  let o;
  try {
    keys = Object.keys(options);
    o = { percent: options.percent, decibels: options.decibels, unit: options.unit };
  } catch (e) {
    throw refusal('wrong_type', 'options', 'could not be read: reading it threw', e);
  }
  for (const key of keys) {
    if (!READ_OPTIONS.includes(key)) {
      throw refusal('unknown_field', key, 'unknown field; expected percent, decibels or unit');
    }
  }
  const { percent = false, decibels = false, unit = '' } = o;
  for (const [name, flag] of [
    ['percent', percent],
    ['decibels', decibels],
  ]) {
    if (typeof flag !== 'boolean') throw refusal('wrong_type', name, 'must be true or false');
  }
  if (unit !== null && typeof unit !== 'string') {
    throw refusal('wrong_type', 'unit', 'must be a unit symbol such as Ω, Hz or F');
  }
  return [(percent ? 1 : 0) | (decibels ? 2 : 0), string(unit ?? '', 'unit')];
}

/**
 * Read one typed value (`4k7`, `4.7 kΩ`, `100nF`, `R47`). Options (all optional):
 * `percent` (default false) allows a trailing %, `decibels` (default false) allows
 * dB, `unit` (default none) is the declared unit a written unit must match.
 * Throws a LoopwrightError with `code` "syntax" and `column` for text that does
 * not read exactly.
 */
export function parseValue(text, options) {
  string(text, 'text');
  if (options === undefined) return checked(glue.parseValue(text));
  const [flags, unit] = readArguments(options);
  return checked(glue.readValue(text, flags, unit));
}

export function readValue(text, flags, unit) {
  return checked(glue.readValue(string(text, 'text'), count(flags, 'flags'), string(unit, 'unit')));
}

/** Read a list of values separated by `,` or `;` into a Float64Array; options as parseValue. */
export function parseList(text, options) {
  string(text, 'text');
  const [flags, unit] = readArguments(options);
  return finite(glue.readList(text, flags, unit), 'result');
}
export const formatValue = checkedCall(glue.formatValue, [
  ['value', N],
  ['unit', S],
  ['digits', C],
]);
export const formatFull = checkedCall(glue.formatFull, [
  ['value', N],
  ['unit', S],
]);
export const formatPlain = checkedCall(glue.formatPlain, [
  ['value', N],
  ['unit', S],
  ['digits', C],
]);
export const formatSi = checkedCall(glue.formatSi, [
  ['value', N],
  ['digits', C],
]);
export const letterCode = checkedCall(glue.letterCode, [
  ['value', N],
  ['digits', C],
]);
export const bestPairs = checkedCall(glue.bestPairs, [['', O]]);
export const chooseParts = checkedCall(glue.chooseParts, [['', O]]);
export const singleResistor = checkedCall(glue.singleResistor, [
  ['target', N],
  ['series', S],
  ['maxError', ON],
  ['combine', S],
]);
export const worstCase = checkedCall(glue.worstCase, [['', O]]);
export const monteCarlo = checkedCall(glue.monteCarlo, [['', O]]);

// Noise.
export const thermalNoiseDensity = scalar2(
  glue.thermalNoiseDensity,
  'resistanceOhm',
  'temperatureK',
);
export const thermalNoiseCurrentDensity = scalar2(
  glue.thermalNoiseCurrentDensity,
  'resistanceOhm',
  'temperatureK',
);
export const stageNoiseContributions = checkedCall(glue.stageNoiseContributions, [['', O]]);
export const integratedNoise = checkedCall(glue.integratedNoise, [['', O]]);
export const noiseDensitySweep = checkedCall(glue.noiseDensitySweep, [['', O]]);

// Distortion and slew rate.
const SERIES = [
  ['a1', N],
  ['a2', N],
  ['a3', N],
];
export const closedLoopSeries = checkedCall(glue.closedLoopSeries, [...SERIES, ['beta', N]]);
export const seriesFromDistortion = checkedCall(glue.seriesFromDistortion, [['', O]]);
export const distortionAtFrequency = checkedCall(glue.distortionAtFrequency, [['', O]]);
export const harmonicDistortion = checkedCall(glue.harmonicDistortion, [['', O]]);
export const feedbackDistortion = checkedCall(glue.feedbackDistortion, [['', O]]);
const OUTPUT_FIELDS = ['a1', 'a2', 'a3', 'beta', 'x'];
/**
 * The closed-loop output y solving y = A(x − β·y) at input x, for the amplifier
 * y = a1·u + a2·u² + a3·u³: `closedLoopOutput({a1, a2, a3, beta, x})`, every field
 * required.
 */
export function closedLoopOutput(o) {
  const c = options(o, '');
  for (const key of Object.keys(c)) {
    if (!OUTPUT_FIELDS.includes(key)) {
      throw refusal(
        'unknown_field',
        key,
        `unknown field; expected one of ${OUTPUT_FIELDS.join(', ')}`,
      );
    }
  }
  const v = OUTPUT_FIELDS.map((key) => {
    if (c[key] === undefined) throw refusal('missing', key, 'is required but missing');
    return number(c[key], key);
  });
  return checked(glue.closedLoopOutputAt(v[0], v[1], v[2], v[3], v[4]));
}
export const closedLoopSpectrum = checkedCall(glue.closedLoopSpectrum, [['', O]]);
export const seriesCheck = checkedCall(glue.seriesCheck, [['', O]]);
export const seriesValiditySweep = checkedCall(glue.seriesValiditySweep, [['', O]]);
export const fullPowerBandwidth = scalar2(glue.fullPowerBandwidth, 'slewRate', 'vPeak');
export const maxUndistortedAmplitude = scalar2(
  glue.maxUndistortedAmplitude,
  'slewRate',
  'frequencyHz',
);
export const requiredSlewRate = scalar2(glue.requiredSlewRate, 'vPeak', 'frequencyHz');

/** The crate version, as in Cargo.toml. */
export function version() {
  return glue.version();
}

// summarizeFeedback: the glue's version builds its object through serde-wasm-bindgen,
// one boundary crossing per field (1.3 µs a call). Here the wasm writes the numbers to
// its scratch area, read in place through one Float64Array view, and the object is
// built in JS, with the topology name resolved once per distinct spelling and the label
// strings fetched once from the wasm (serialised from the same Rust types). The
// package test checks that both versions give deep-equal objects.
let labels;
let scratch = null;
const topologyIndexByName = new Map();

/** The scratch view, asked for again after the wasm memory grew (the old one is empty). */
function scratchNumbers() {
  if (scratch === null || scratch.length === 0) scratch = glue.scratchView();
  return scratch;
}

/** A number of the summary, or the refusal naming its field when it is not finite. */
function summaryNumber(x, field) {
  if (x - x === 0) return x;
  throw refusal('overflow', field, 'the result overflows the floating-point range');
}

/** idealGain and gainError: NaN stands for null (β = 0); ±Infinity is refused. */
function summaryOptional(x, field) {
  if (x - x === 0) return x;
  if (Number.isNaN(x)) return null;
  throw refusal('overflow', field, 'the result overflows the floating-point range');
}

export function summarizeFeedback(topologyName, a, beta) {
  if (typeof topologyName !== 'string' || typeof a !== 'number' || typeof beta !== 'number') {
    string(topologyName, 'topologyName');
    throw notNumbers(['a', 'beta'], [a, beta]);
  }
  let index = topologyIndexByName.get(topologyName);
  if (index === undefined) {
    index = checked(glue.topologyIndex(topologyName));
    if (topologyIndexByName.size >= 64) topologyIndexByName.clear();
    topologyIndexByName.set(topologyName, index);
  }
  checked(glue.summarizeFeedbackPacked(index, a, beta));
  const v = scratchNumbers();
  labels ??= glue.feedbackLabels();
  const t = labels.topologies[index];
  return {
    topology: t.topology,
    gainUnit: t.gainUnit,
    betaUnit: t.betaUnit,
    closedLoopGain: summaryNumber(v[0], 'closedLoopGain'),
    loopGain: summaryNumber(v[1], 'loopGain'),
    feedbackAmount: summaryNumber(v[2], 'feedbackAmount'),
    feedbackAmountDb: summaryNumber(v[3], 'feedbackAmountDb'),
    sensitivity: summaryNumber(v[4], 'sensitivity'),
    idealGain: summaryOptional(v[5], 'idealGain'),
    gainError: summaryOptional(v[6], 'gainError'),
    sense: labels.senses[v[7]],
  };
}
