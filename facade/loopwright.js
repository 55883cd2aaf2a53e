// The entry module of loopwright's JS API: everything of the wasm-bindgen glue
// (loopwright_glue.js, generated), with the scalar functions checked here.
//
// A scalar export of the wasm returns a bare number: the answer, or NaN with the
// LoopwrightError kept aside in the module (src/wasm/mod.rs, `scalar`). NaN is never
// an answer of the core, so each wrapper below throws the kept error on NaN and
// returns the number otherwise: the same contract as every other function, without
// the array the glue would build per call for a Result (4.5x slower, see bench/).
// scripts/build-wasm.sh copies this file beside the glue; tests/js/package.test.mjs
// checks that every number-returning export of the glue is wrapped here.

import * as glue from './loopwright_glue.js';

export * from './loopwright_glue.js';
export { default } from './loopwright_glue.js';

function checked(x) {
  // biome-ignore lint/suspicious/noSelfCompare: the fastest NaN test on the scalar hot path
  if (x === x) return x;
  throw glue.takeError() ?? new Error('loopwright: a scalar call failed without an error');
}

export function betaForGain(a, targetGain) {
  return checked(glue.betaForGain(a, targetGain));
}

export function closedLoopGain(a, beta) {
  return checked(glue.closedLoopGain(a, beta));
}

export function closedLoopOutput(a1, a2, a3, beta, x) {
  return checked(glue.closedLoopOutput(a1, a2, a3, beta, x));
}

export function feedbackAmount(a, beta) {
  return checked(glue.feedbackAmount(a, beta));
}

export function feedbackAmountDb(a, beta) {
  return checked(glue.feedbackAmountDb(a, beta));
}

export function fullPowerBandwidth(slewRate, vPeak) {
  return checked(glue.fullPowerBandwidth(slewRate, vPeak));
}

export function gainBandwidth(a0, fH) {
  return checked(glue.gainBandwidth(a0, fH));
}

export function gainSensitivity(a, beta) {
  return checked(glue.gainSensitivity(a, beta));
}

export function idealBeta(targetGain) {
  return checked(glue.idealBeta(targetGain));
}

export function loopGain(a, beta) {
  return checked(glue.loopGain(a, beta));
}

export function maxUndistortedAmplitude(slewRate, frequencyHz) {
  return checked(glue.maxUndistortedAmplitude(slewRate, frequencyHz));
}

export function minOpenLoopGain(beta, gainError) {
  return checked(glue.minOpenLoopGain(beta, gainError));
}

// The reader's options (src/notation): which extras a context allows besides a
// number with SI prefix, IEC 60062 code and unit word. Passed to the wasm as flags
// (1 percent, 2 dB) and a declared unit, so no JS object is read inside the module.
const READ_OPTIONS = ['percent', 'decibels', 'unit'];

function optionError(code, param, reason) {
  const e = new Error(`${param}: ${reason}`);
  e.name = 'LoopwrightError';
  e.code = code;
  e.param = param;
  return e;
}

function readArguments(options) {
  if (options === undefined || options === null) return [0, ''];
  if (typeof options !== 'object') {
    throw optionError('out_of_domain', 'options', 'must be an object {percent, decibels, unit}');
  }
  for (const key of Object.keys(options)) {
    if (!READ_OPTIONS.includes(key)) {
      throw optionError('unknown_name', key, 'unknown option; expected percent, decibels or unit');
    }
  }
  const { percent = false, decibels = false, unit = '' } = options;
  for (const [name, flag] of [
    ['percent', percent],
    ['decibels', decibels],
  ]) {
    if (typeof flag !== 'boolean')
      throw optionError('out_of_domain', name, 'must be true or false');
  }
  if (unit !== null && typeof unit !== 'string') {
    throw optionError('out_of_domain', 'unit', 'must be a unit symbol such as Ω, Hz or F');
  }
  return [(percent ? 1 : 0) | (decibels ? 2 : 0), unit ?? ''];
}

/**
 * Read one typed value (`4k7`, `4.7 kΩ`, `100nF`, `R47`). Options (all optional):
 * `percent` (default false) allows a trailing %, `decibels` (default false) allows
 * dB, `unit` (default none) is the declared unit a written unit must match.
 * Throws a LoopwrightError with `code` "syntax" and `column` for text that does
 * not read exactly.
 */
export function parseValue(text, options) {
  if (options === undefined) return checked(glue.parseValue(text));
  const [flags, unit] = readArguments(options);
  return checked(glue.readValue(text, flags, unit));
}

export function readValue(text, flags, unit) {
  return checked(glue.readValue(text, flags, unit));
}

/** Read a list of values separated by `,` or `;` into a Float64Array; options as parseValue. */
export function parseList(text, options) {
  const [flags, unit] = readArguments(options);
  return glue.readList(text, flags, unit);
}

export function requiredSlewRate(vPeak, frequencyHz) {
  return checked(glue.requiredSlewRate(vPeak, frequencyHz));
}

export function seriesTolerance(series) {
  return checked(glue.seriesTolerance(series));
}

export function singlePoleHighCutoff(fH, a0, beta) {
  return checked(glue.singlePoleHighCutoff(fH, a0, beta));
}

export function singlePoleLowCutoff(fL, am, beta) {
  return checked(glue.singlePoleLowCutoff(fL, am, beta));
}

export function standardValue(series, value, rounding) {
  return checked(glue.standardValue(series, value, rounding));
}

export function thermalNoiseCurrentDensity(resistanceOhm, temperatureK) {
  return checked(glue.thermalNoiseCurrentDensity(resistanceOhm, temperatureK));
}

export function thermalNoiseDensity(resistanceOhm, temperatureK) {
  return checked(glue.thermalNoiseDensity(resistanceOhm, temperatureK));
}

export function topologyIndex(topologyName) {
  return checked(glue.topologyIndex(topologyName));
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

export function summarizeFeedbackPacked(topologyIndex, a, beta) {
  return checked(glue.summarizeFeedbackPacked(topologyIndex, a, beta));
}

export function summarizeFeedback(topologyName, a, beta) {
  let index = topologyIndexByName.get(topologyName);
  if (index === undefined) {
    index = topologyIndex(topologyName);
    if (typeof topologyName === 'string') {
      if (topologyIndexByName.size >= 64) topologyIndexByName.clear();
      topologyIndexByName.set(topologyName, index);
    }
  }
  summarizeFeedbackPacked(index, a, beta);
  const v = scratchNumbers();
  labels ??= glue.feedbackLabels();
  const t = labels.topologies[index];
  return {
    topology: t.topology,
    gainUnit: t.gainUnit,
    betaUnit: t.betaUnit,
    closedLoopGain: v[0],
    loopGain: v[1],
    feedbackAmount: v[2],
    feedbackAmountDb: v[3],
    sensitivity: v[4],
    idealGain: Number.isNaN(v[5]) ? null : v[5],
    gainError: Number.isNaN(v[6]) ? null : v[6],
    sense: labels.senses[v[7]],
  };
}
