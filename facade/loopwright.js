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

export function parseValue(text) {
  return checked(glue.parseValue(text));
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
