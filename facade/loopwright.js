// The entry module of loopwright's JS API (full module): the calculator areas of
// lite.js, plus the circuit solver and the worksheet. Like lite.js, every function
// checks and copies its arguments in JS before the wasm is entered (guard.js), and
// checks its result on the way out; internal glue exports are not exported.
// scripts/build-wasm.sh puts this file, lite.js and guard.js beside the generated
// glue (renamed loopwright_glue.js).

import * as glue from './loopwright_glue.js';
import { finite, MAX_TEXT, number, options, packed, refusal, string } from './guard.js';

export * from './lite.js';
export { default, initSync } from './loopwright_glue.js';

function call(f, params) {
  return (...args) => {
    const copied = new Array(params.length);
    for (let i = 0; i < params.length; i++) copied[i] = params[i][1](args[i], params[i][0]);
    return finite(f(...copied), 'result');
  };
}

// The circuit solver: documents as JSON text (docs/circuit-format.md).
export const circuitNormalize = call(glue.circuitNormalize, [['json', string]]);
export const circuitTemplate = call(glue.circuitTemplate, [['', options]]);
export const circuitSolve = call(glue.circuitSolve, [
  ['json', string],
  ['frequencyHz', number],
]);
export const circuitPortImpedance = call(glue.circuitPortImpedance, [
  ['json', string],
  ['plus', string],
  ['minus', string],
  ['frequencyHz', number],
]);
export const circuitSweep = call(glue.circuitSweep, [['', options]]);
// circuitTwoPort: a regular options object (every field known and of its kind)
// crosses as twelve values at fixed places (glue.circuitTwoPortPacked, whose result
// comes back as its numbers in one Float64Array, checked finite in the module, and
// twoPortFromPacked builds the object); any other object takes the module's options reader,
// which reports what is wrong. Reading the object in the module cost the call about
// a fifth of its time (bench/COMPARE.md). The order is that of TemplateAtOptions
// (src/wasm/circuit.rs); the package test compares both paths.
const TEMPLATE_AT = [
  'topology',
  'ri',
  'ro',
  'gain',
  'ci',
  'co',
  'rf',
  'rg',
  'cf',
  'rs',
  'rl',
  'frequencyHz',
];
const TEMPLATE_AT_KINDS = ['string', ...TEMPLATE_AT.slice(1).map(() => 'number')];
// topology, ri, ro, gain, rf, rg, rs, rl: the fields without a default.
const TEMPLATE_AT_REQUIRED = [0, 1, 2, 3, 6, 7, 9, 10];
export function circuitTwoPort(opts) {
  const o = packed(opts, TEMPLATE_AT, TEMPLATE_AT_KINDS, TEMPLATE_AT_REQUIRED);
  if (o.general !== undefined) return finite(glue.circuitTwoPort(o.general), 'result');
  return twoPortFromPacked(
    glue.circuitTwoPortPacked(
      o[0],
      o[1],
      o[2],
      o[3],
      o[4],
      o[5],
      o[6],
      o[7],
      o[8],
      o[9],
      o[10],
      o[11],
    ),
  );
}

/**
 * The circuitTwoPort object around the packed result's numbers, taken in their
 * order (the order the module serializes the result in; src/wasm/circuit.rs,
 * `circuit_two_port_packed`), already checked finite there. The package test
 * compares it with the general export's object for every topology.
 */
function twoPortFromPacked(p) {
  const v = p.values;
  let i = 0;
  const cx = () => ({ re: v[i++], im: v[i++] });
  const both = () => ({ twoPort: cx(), exact: cx(), relativeError: v[i++] });
  // Property values are evaluated in the order written, so `i` walks `v` in order.
  return {
    topology: p.topology,
    frequencyHz: v[i++],
    gainUnit: p.gainUnit,
    parameters: { kind: p.kind, p11: cx(), p12: cx(), p21: cx(), p22: cx() },
    a: cx(),
    beta: cx(),
    loopGain: cx(),
    feedbackAmount: cx(),
    ri: cx(),
    ro: cx(),
    af: both(),
    rif: both(),
    rof: both(),
    rin: both(),
    rout: both(),
    idealAf: cx(),
    idealAfError: v[i++],
  };
}
export const circuitStageViews = call(glue.circuitStageViews, [['', options]]);
export const circuitBlackman = call(glue.circuitBlackman, [['', options]]);
export const circuitAsymptoticGain = call(glue.circuitAsymptoticGain, [['', options]]);
export const circuitAsymptoticGainCurrent = call(glue.circuitAsymptoticGainCurrent, [
  ['', options],
]);

// The stage area (docs/stage.md): a stage document (object or JSON text) wherever a
// circuit is taken.
const documentArg = (x, param) => (typeof x === 'string' ? string(x, param) : options(x, param));
export const stageCircuit = call(glue.stageCircuit, [['stage', documentArg]]);
export const amplifierOpenLoop = call(glue.amplifierOpenLoop, [['', options]]);
export const circuitLoopGain = call(glue.circuitLoopGain, [['', options]]);
export const circuitGain = call(glue.circuitGain, [['', options]]);
export const circuitImpedance = call(glue.circuitImpedance, [['', options]]);
export const circuitPoles = call(glue.circuitPoles, [['', options]]);
export const circuitMargins = call(glue.circuitMargins, [['', options]]);
export const circuitNyquist = call(glue.circuitNyquist, [['', options]]);
export const stageDesign = call(glue.stageDesign, [['', options]]);
export const circuitStep = call(glue.circuitStep, [['', options]]);
export const circuitGainWithin = call(glue.circuitGainWithin, [['', options]]);
export const stageDistortion = call(glue.stageDistortion, [['', options]]);
// Whole-stage tolerance (src/tolerance; docs/tolerance.md).
export const stageTolerance = call(glue.stageTolerance, [['', options]]);
// The noise of a whole circuit (src/noise/circuit; docs/noise.md).
export const circuitNoise = call(glue.circuitNoise, [['', options]]);
export const circuitNoiseIntegral = call(glue.circuitNoiseIntegral, [['', options]]);

/**
 * The batch tool's reader and writer (src/batch): CSV chunks in, result CSV or
 * JSON lines out. `compute` is a string or undefined; `format` is `'csv'`
 * (default) or `'jsonl'`; each chunk a Uint8Array of at most 16 MiB.
 */
export class BatchRun extends glue.BatchRun {
  constructor(compute, format) {
    if (compute !== undefined && compute !== null) string(compute, 'compute');
    if (format !== undefined && format !== null) string(format, 'format');
    super(compute ?? undefined, format ?? undefined);
  }
  feed(chunk) {
    if (!(chunk instanceof Uint8Array)) {
      throw refusal('wrong_type', 'chunk', 'must be a Uint8Array');
    }
    if (chunk.length > MAX_TEXT) {
      throw refusal('too_large', 'chunk', `too large; the limit is ${MAX_TEXT}`);
    }
    return super.feed(chunk);
  }
}

/** The function catalog as JSON text: `JSON.parse` gives a `FunctionCatalog`. */
export function functionCatalog() {
  return glue.functionCatalog();
}

/** The error values a cell can show: `[{code, explanation}]`. */
export function errorValues() {
  return glue.errorValues();
}

/**
 * A worksheet: cells with inputs, formulas and named cells. Each method checks its
 * arguments here (addresses, inputs, ranges and documents must be strings of at most
 * 16 MiB), so a wrong type or an oversized paste is refused before the module sees it.
 */
export class Worksheet extends glue.Worksheet {
  setCell(address, input) {
    live(this);
    return super.setCell(string(address, 'address'), string(input, 'input'));
  }
  value(address) {
    live(this);
    return finite(super.value(string(address, 'address')), 'result');
  }
  values(cells) {
    live(this);
    return finite(super.values(string(cells, 'range')), 'result');
  }
  input(address) {
    live(this);
    return super.input(string(address, 'address'));
  }
  setName(name, address) {
    live(this);
    return super.setName(string(name, 'name'), string(address, 'address'));
  }
  removeName(name) {
    live(this);
    return super.removeName(string(name, 'name'));
  }
  loadDocument(text) {
    live(this);
    return super.loadDocument(string(text, 'document'));
  }
  rangeToTsv(cells) {
    live(this);
    return super.rangeToTsv(string(cells, 'range'));
  }
  pasteTsv(address, text) {
    live(this);
    return super.pasteTsv(string(address, 'address'), string(text, 'text'));
  }
  recalculate() {
    live(this);
    return super.recalculate();
  }
  changedCells() {
    live(this);
    return super.changedCells();
  }
  names() {
    live(this);
    return super.names();
  }
  saveDocument() {
    live(this);
    return super.saveDocument();
  }
  toCsv() {
    live(this);
    return super.toCsv();
  }
}

/**
 * Refuse a call on a worksheet that was freed (or on an object that is not one): the
 * glue would throw from inside the module.
 */
function live(sheet) {
  let pointer;
  try {
    pointer = sheet?.__wbg_ptr;
  } catch {
    pointer = 0;
  }
  if (typeof pointer !== 'number' || pointer === 0) {
    throw refusal('out_of_domain', 'worksheet', 'has been freed, or is not a Worksheet');
  }
}
