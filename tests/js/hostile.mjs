// The hostile-call campaign of the JS API: every export and every Worksheet method
// called with wrong types (null, undefined, BigInt, Symbol, strings for numbers,
// numbers for strings), throwing getters, Proxies whose traps throw, huge lengths and
// extreme numbers (5e-324, 1e308, ±Infinity, NaN), seeded and reproducible; and the
// newer option forms: stageTolerance on circuit documents (no amplifier, two
// amplifiers, ports naming missing nodes, zero-value elements, 0 % and 100 %
// tolerances, temperatures reversed or at the limits, 2 trials and the most) and the
// worksheet's TOLERANCE functions with hostile spreads texts (extreme, NaN, negative,
// huge, empty, unicode, very long), read back cell by cell.
//
// What it counts (and the test asserts): traps (a WebAssembly RuntimeError), NaN or
// ±Infinity in a returned number or array, refusals that are not a LoopwrightError
// with a `code` and a `param`, and whether the module still gives the right answers
// afterwards; then the module's memory over a run of failing calls.
//
//   node tests/js/hostile.mjs [--calls N] [--seed S] [--leak-calls N] [--pkg DIR] [--skip f,g] [--no-huge]
//
// prints the figures; tests/js/hostile.test.mjs runs it in `make test` (20 000+ calls,
// 100 000 failing calls for the memory check). The long run:
//   LOOPWRIGHT_HOSTILE_LONG=1 node --test tests/js/hostile.test.mjs
// (or `node tests/js/hostile.mjs --calls 1000000 --leak-calls 1000000`).

import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';

const TRACE = process.env.LOOPWRIGHT_HOSTILE_TRACE === '1';

/** Codes a LoopwrightError may carry (the TypeScript ErrorCode list). */
export const CODES = new Set([
  'not_finite',
  'out_of_domain',
  'unreachable',
  'oscillation',
  'unknown_name',
  'too_large',
  'overflow',
  'no_convergence',
  'singular',
  'syntax',
  'wrong_type',
  'missing',
  'unknown_field',
  'bad_document',
]);

/** xorshift32: a small seeded generator, the same sequence on every machine. */
function generator(seed) {
  let x = seed >>> 0 || 0x9e3779b9;
  return () => {
    x ^= x << 13;
    x >>>= 0;
    x ^= x >>> 17;
    x ^= x << 5;
    x >>>= 0;
    return x / 4294967296;
  };
}

const thrower = () => {
  throw new Error('hostile getter');
};

/** Values nobody should pass: every one must be refused or answered finitely. */
function hostileValues(huge = true) {
  const trapAll = new Proxy(
    {},
    {
      get: thrower,
      has: thrower,
      ownKeys: thrower,
      getOwnPropertyDescriptor: thrower,
      getPrototypeOf: thrower,
    },
  );
  const arrayProxy = new Proxy([1, 2, 3], { get: thrower });
  const lengthProxy = new Proxy([], {
    get: (t, k) => (k === 'length' ? 2 ** 32 - 1 : t[k]),
  });
  return [
    undefined,
    null,
    true,
    false,
    0,
    -0,
    -1,
    1,
    0.5,
    5e-324,
    -5e-324,
    1e-308,
    1e-300,
    1e308,
    -1e308,
    Number.MAX_VALUE,
    Infinity,
    -Infinity,
    Number.NaN,
    2 ** 53,
    2 ** 32,
    -(2 ** 31),
    1n,
    Symbol('hostile'),
    '',
    '1e4',
    '0.0999',
    'series-shunt',
    'E24',
    '\u0000',
    'x'.repeat(1000),
    {},
    [],
    [Number.NaN],
    [1, '2'],
    new Float64Array([1e308, -1e308, 5e-324]),
    { length: 2 ** 31 },
    {
      get gain() {
        throw new Error('hostile getter');
      },
    },
    { valueOf: thrower, toString: thrower },
    trapAll,
    arrayProxy,
    ...(huge ? [lengthProxy] : []),
    ...(huge ? [new Array(2 ** 31 - 1)] : []),
    () => 1,
    new Date(0),
    new Map([[1, 2]]),
    Object.create(null),
  ];
}

const model = () => ({ gain: 1e5, polesHz: [10, 1e6], zerosHz: [] });
/** Three arrays of `n` numbers for the …Into sweeps to fill. */
export const sweepTarget = (n) => ({
  freqHz: new Float64Array(n),
  magnitudeDb: new Float64Array(n),
  phaseDeg: new Float64Array(n),
});
const template = () => ({
  topology: 'series-shunt',
  ri: 1e5,
  ro: 100,
  gain: 1e4,
  rf: 9e3,
  rg: 1e3,
  rs: 1e3,
  rl: 1e4,
});
const DIVIDER = JSON.stringify({
  format: 'loopwright-circuit',
  version: 1,
  elements: [
    { name: 'Vs', kind: 'voltage-source', nodes: ['in', '0'], value: 10 },
    { name: 'R1', kind: 'resistor', nodes: ['in', 'out'], value: '1k' },
    { name: 'R2', kind: 'resistor', nodes: ['out', '0'], value: '3k' },
  ],
});
/** A stage document (docs/stage.md): non-inverting gain 11 with a capacitive load. */
const STAGE = () => ({
  format: 'loopwright-stage',
  version: 1,
  kind: 'non-inverting',
  amplifier: { a0: { min: 5e4, typ: 2e5 }, gbwHz: '10M', polesHz: ['40M'], cd: '3p', ro: 50 },
  parts: { rf: '10k', rg: '1k', rs: 50, rl: '2k', cl: '1n', riso: 20 },
});
const FOLLOWER = JSON.stringify({
  format: 'loopwright-circuit',
  version: 1,
  elements: [
    { name: 'Vs', kind: 'voltage-source', nodes: ['in', '0'], value: 1 },
    { name: 'Rs', kind: 'resistor', nodes: ['in', 'p'], value: 1e3 },
    { name: 'Ri', kind: 'resistor', nodes: ['p', 'o'], value: 1e5 },
    { name: 'E', kind: 'vcvs', nodes: ['x', '0'], control: ['p', 'o'], value: 1e4 },
    { name: 'Ro', kind: 'resistor', nodes: ['x', 'o'], value: 100 },
    { name: 'R2', kind: 'resistor', nodes: ['o', '0'], value: 1e4 },
  ],
});

/**
 * Every export with arguments that work (each call is checked to succeed before the
 * campaign mutates it). A function of no arguments is called as it is.
 */
export function goodCalls() {
  const stage = {
    stage: 'non-inverting',
    r1: 1e4,
    r2: 4.7e4,
    tolR1: 0.01,
    tolR2: 0.01,
    aMin: 5e4,
    aTyp: 1e5,
    aMax: 2e5,
    ri: 1e6,
    ro: 75,
    poleHz: 5,
  };
  const noise = {
    kind: 'inverting',
    rFeedback: 1e4,
    rGain: 1e3,
    rPlus: 0,
    temperatureK: 300,
    voltageDensity: 4e-9,
    voltageCornerHz: 10,
    currentDensity: 1e-12,
    currentCornerHz: 100,
  };
  const series = { a1: 1e4, a2: 1e6, a3: -2e10 };
  return {
    closedLoopGain: [1e5, 0.00999],
    loopGain: [1e5, 0.01],
    feedbackAmount: [1e5, 0.01],
    feedbackAmountDb: [1e5, 0.01],
    gainSensitivity: [1e5, 0.01],
    betaForGain: [1e4, 10],
    minOpenLoopGain: [0.01, 0.001],
    summarizeFeedback: ['series-shunt', 1e5, 0.01],
    loopPhasors: [1e5, 0, 0.01, 0],
    impedancesWithFeedback: [
      { topology: 'shunt-shunt', ziRe: 1e5, zoRe: 1e3, aRe: 1e4, betaRe: 0.1 },
    ],
    maxClosedLoopGain: [1e5, 100],
    gainSpread: [0.01, 5e4, 1e5, 2e5],
    topologyInfo: ['current-shunt'],
    loopGainSweep: [{ amplifier: model(), beta: 0.01, startHz: 1, stopHz: 1e8, points: 20 }],
    closedLoopSweep: [{ amplifier: model(), beta: 0.01, startHz: 1, stopHz: 1e8, points: 20 }],
    loopGainSweepInto: [
      { amplifier: model(), beta: 0.01, startHz: 1, stopHz: 1e8 },
      sweepTarget(20),
    ],
    closedLoopSweepInto: [
      { amplifier: model(), beta: 0.01, startHz: 1, stopHz: 1e8, points: 20 },
      sweepTarget(20),
    ],
    loopAt: [model(), 0.01, 1e3],
    stabilityMargins: [model(), 0.01],
    closedLoopPoles: [model(), 0.01],
    closedLoopTransfer: [model(), 0.01],
    closedLoopBandwidth: [model(), 0.01],
    stepResponse: [model(), 0.01, 0.01, 50],
    analyzeLoop: [model(), 0.01, 0.01, 50],
    stepWaveform: [model(), 0.01, 1e-5, 50],
    dominantPoleForMargin: [{ gain: 1e5, polesHz: [1e6] }, 0.01, 60],
    maxBetaForMargin: [model(), 60, 1],
    twoPoleResponse: [1e3, 1e6, 10],
    singlePoleHighCutoff: [10, 1e5, 0.01],
    singlePoleLowCutoff: [10, 100, 0.1],
    gainBandwidth: [1e5, 10],
    seriesValues: ['E12', 100, 1000],
    standardValue: ['E24', 4700, 'nearest'],
    standardNeighbours: ['E24', 4800],
    seriesTolerance: ['E96'],
    parseValue: ['4k7'],
    parseList: ['10, 1M, 4k7', { unit: 'Hz' }],
    readValue: ['4.7 kΩ', 0, 'Ω'],
    formatValue: [4700, 'Ω', 3],
    formatFull: [4700, 'Ω'],
    formatPlain: [4700, 'V/V', 3],
    formatSi: [4700, 3],
    letterCode: [4700, 2],
    bestPairs: [
      {
        network: 'non-inverting',
        target: 11,
        series: 'E24',
        totalMin: 1e3,
        totalMax: 1e6,
        count: 3,
      },
    ],
    chooseParts: [
      {
        network: 'non-inverting',
        target: 48,
        tolerance: 0.005,
        series: ['E96', 'E192'],
        grades: [0.01, 0.001],
        combine: 'series',
        trials: 1000,
      },
    ],
    singleResistor: [4.7e3, 'E24', undefined, 'none'],
    worstCase: [stage],
    monteCarlo: [{ ...stage, trials: 200, seed: 7, bins: 10 }],
    thermalNoiseDensity: [1e3, 300],
    thermalNoiseCurrentDensity: [1e3, 300],
    stageNoiseContributions: [{ ...noise, frequencyHz: 1e3 }],
    integratedNoise: [{ ...noise, gbwHz: 1e7, extraPolesHz: [], fLow: 10, fHigh: 1e5 }],
    noiseDensitySweep: [{ ...noise, gbwHz: 1e7, fStart: 10, fStop: 1e5, points: 20 }],
    closedLoopSeries: [1e4, 1e6, -2e10, 0.01],
    seriesFromDistortion: [{ a1: 1e4, hd2: 0.01, hd3: 0.001, amplitude: 1, amplitudeAt: 'output' }],
    harmonicDistortion: [{ ...series, amplitude: 1e-4, amplitudeAt: 'input' }],
    feedbackDistortion: [{ ...series, beta: 0.01, amplitude: 1, amplitudeAt: 'output' }],
    distortionAtFrequency: [{ ...series, beta: 0.01, amplitude: 1, poleHz: 100, frequencyHz: 1e3 }],
    idealBeta: [100],
    closedLoopOutput: [{ ...series, beta: 0.01, x: 1e-3 }],
    closedLoopSpectrum: [{ ...series, beta: 0.01, amplitude: 1e-3, samples: 64 }],
    seriesCheck: [{ ...series, beta: 0.01, amplitude: 1e-3, samples: 64 }],
    seriesValiditySweep: [
      {
        ...series,
        beta: 0.01,
        amplitudeMin: 1e-4,
        amplitudeMax: 1e-2,
        points: 5,
        tolerance: 0.1,
        samples: 64,
      },
    ],
    fullPowerBandwidth: [1e6, 10],
    maxUndistortedAmplitude: [1e6, 1e4],
    requiredSlewRate: [10, 1e4],
    version: [],
    circuitNormalize: [DIVIDER],
    circuitTemplate: [template()],
    circuitSolve: [DIVIDER, 0],
    circuitPortImpedance: [DIVIDER, 'out', '0', 0],
    circuitSweep: [
      { circuit: DIVIDER, source: 'Vs', plus: 'out', minus: '0', frequencies: [0, 1e3] },
    ],
    circuitTwoPort: [template()],
    circuitStageViews: [template()],
    circuitBlackman: [{ circuit: FOLLOWER, controlled: 'E', plus: 'p', minus: '0' }],
    circuitAsymptoticGain: [
      { circuit: FOLLOWER, controlled: 'E', source: 'Vs', plus: 'o', minus: '0' },
    ],
    circuitAsymptoticGainCurrent: [
      { circuit: FOLLOWER, controlled: 'E', source: 'Vs', element: 'R2' },
    ],
    stageCircuit: [STAGE()],
    amplifierOpenLoop: [{ amplifier: STAGE().amplifier, frequenciesHz: [1, 1e6] }],
    circuitLoopGain: [{ circuit: STAGE(), frequenciesHz: [1e3, 1e6] }],
    circuitGain: [{ circuit: STAGE(), frequenciesHz: [1e3, 1e6] }],
    circuitImpedance: [{ circuit: STAGE(), port: 'input', frequenciesHz: [1e3] }],
    circuitPoles: [{ circuit: STAGE(), spreadPoint: 'min' }],
    circuitMargins: [{ circuit: STAGE(), pointsPerDecade: 10 }],
    circuitNyquist: [{ circuit: STAGE(), pointsPerDecade: 10 }],
    stageDesign: [{ stage: STAGE(), part: 'riso', targetPhaseMarginDeg: 45 }],
    circuitStep: [{ circuit: STAGE(), points: 50 }],
    circuitGainWithin: [{ circuit: STAGE(), targetGain: 10, tolerance: 0.01 }],
    stageDistortion: [
      { stage: STAGE(), hd2: 0.01, hd3: 0.001, amplitude: 1, level: 1, frequencyHz: 1e3 },
    ],
    stageTolerance: [
      {
        stage: STAGE(),
        parts: [{ part: 'rf', tolerance: { distribution: 'uniform', percent: 1 } }],
        spec: [{ figure: 'gainDb', freqHz: 1e3, lower: 20, upper: 21 }],
        trials: 50,
      },
    ],
    circuitNoise: [
      {
        circuit: FOLLOWER,
        output: 'o',
        frequenciesHz: [10, 1e3],
        temperatureK: 300,
        inputSource: 'Vs',
      },
    ],
    circuitNoiseIntegral: [
      {
        circuit: DIVIDER,
        output: { element: 'R2' },
        bandHz: [0, 1e4],
        signalRms: 1e-3,
      },
    ],
    functionCatalog: [],
    errorValues: [],
  };
}

/** A circuit document with one amplifier inside an RC loop (element spreads of its own). */
const RCLOOP = () => ({
  format: 'loopwright-circuit',
  version: 2,
  elements: [
    { name: 'Vs', kind: 'voltage-source', nodes: ['in', '0'], value: 1 },
    {
      name: 'U1',
      kind: 'amplifier',
      nodes: ['out', '0'],
      control: ['in', 'fb'],
      model: { a0: { min: 5e4, typ: 2e5, max: 1e6 }, gbwHz: 1e7, ro: 0 },
    },
    {
      name: 'R3',
      kind: 'resistor',
      nodes: ['out', 'x'],
      value: '1k',
      tolerance: { distribution: 'uniform', percent: 5 },
    },
    {
      name: 'C3',
      kind: 'capacitor',
      nodes: ['x', '0'],
      value: '100p',
      tolerance: { distribution: 'normal', percent: 10, sigmas: 3 },
      tempco: 30,
    },
    {
      name: 'Rf',
      kind: 'resistor',
      nodes: ['x', 'fb'],
      value: '9k',
      tolerance: { distribution: 'uniform', percent: 1 },
    },
    {
      name: 'Rg',
      kind: 'resistor',
      nodes: ['fb', '0'],
      value: '1k',
      tolerance: { distribution: 'uniform', percent: 1 },
    },
  ],
});
/** RCLOOP with its elements changed by `edit` (index → element or null to drop). */
const rcloopWith = (edit) => {
  const c = RCLOOP();
  const n = Math.max(c.elements.length, ...Object.keys(edit).map((k) => Number(k) + 1));
  c.elements = Array.from({ length: n }, (_, i) => (i in edit ? edit[i] : c.elements[i])).filter(
    (e) => e !== null && e !== undefined,
  );
  return c;
};
const U2 = {
  name: 'U2',
  kind: 'amplifier',
  nodes: ['y', '0'],
  control: ['out', 'y'],
  model: { a0: { min: 5e4, typ: 2e5, max: 1e6 }, gbwHz: 1e7, ro: 10 },
};
const resistor = (name, nodes, value, percent) => ({
  name,
  kind: 'resistor',
  nodes,
  value,
  tolerance: { distribution: 'uniform', percent },
});
const circuitTolerance = (extra) => ({
  circuit: RCLOOP(),
  input: 'Vs',
  output: 'out',
  amplifierSpread: { gbwHz: { min: 7e6, typ: 1e7, max: 1.3e7 } },
  spec: [
    { figure: 'gainDb', freqHz: 1e4 },
    { figure: 'phaseMarginDeg', lower: 45 },
  ],
  trials: 20,
  seed: 3,
  ...extra,
});
/** A spreads text that TOLERANCE.* read (the gain-48 stage of docs/tolerance.md). */
const GAIN48 = '"kind=non-inverting, a0=200k, a0Min=50k, a0Max=1M, gbwHz=10M, rf=47k, rg=1k"';
const toleranceFormula = (spreads, rest = '"gainDb"; 1 kHz') =>
  `=TOLERANCE.WORSTCASE(${GAIN48}; "${spreads}"; ${rest})`;

/**
 * More working calls of exports already in goodCalls, for option forms added later:
 * stageTolerance with a circuit document (and its edge cases that still compute),
 * and the worksheet's TOLERANCE functions read back (`Worksheet.tolerance`: setCell of
 * the formula, then the values of its spill). Each is mutated like the others.
 */
export function variantCalls() {
  return [
    ['stageTolerance', [circuitTolerance({})]],
    ['stageTolerance', [circuitTolerance({ outputMinus: 'x', controlled: 'U1' })]],
    // Two amplifiers, `controlled` naming one (without it only gain figures compute).
    [
      'stageTolerance',
      [
        circuitTolerance({
          circuit: rcloopWith({ 6: U2, 7: resistor('RL', ['y', '0'], '2k', 1) }),
          output: 'y',
          controlled: 'U1',
        }),
      ],
    ],
    [
      'stageTolerance',
      [
        circuitTolerance({
          circuit: rcloopWith({ 6: U2 }),
          output: 'y',
          amplifierSpread: undefined,
          spec: [{ figure: 'gainDb', freqHz: 1e3 }],
        }),
      ],
    ],
    // No amplifier: an RC divider's gain.
    [
      'stageTolerance',
      [
        circuitTolerance({
          circuit: rcloopWith({ 1: resistor('R1', ['in', 'out'], '1k', 1), 4: null, 5: null }),
          amplifierSpread: undefined,
          spec: [{ figure: 'gainDb', freqHz: 1e3 }],
        }),
      ],
    ],
    // 0 % and 99.99 % tolerances, 2 trials, the temperature limits.
    [
      'stageTolerance',
      [
        circuitTolerance({
          circuit: rcloopWith({
            2: resistor('R3', ['out', 'x'], '1k', 0),
            4: resistor('Rf', ['x', 'fb'], '9k', 99.99),
          }),
          trials: 2,
          temperatureC: [-273.15, 1000],
        }),
      ],
    ],
    [
      'Worksheet.tolerance',
      [toleranceFormula('rf=1% 25ppm/K, rg=1% -25ppm/K', '"gainDb"; 1 kHz; "0…70"')],
    ],
    ['Worksheet.tolerance', [toleranceFormula('rf=0%, rg=99.99%')]],
    [
      'Worksheet.tolerance',
      [
        `=TOLERANCE.MONTECARLO(${GAIN48}; "rf=1% normal 3σ, gbw=7M/10M/13M"; "phaseMarginDeg"; 0; 2; 1)`,
      ],
    ],
    [
      'Worksheet.tolerance',
      [`=TOLERANCE.SENSITIVITY(${GAIN48}; "rf=46k…48k, rg=990/1k/1010"; "settlingTimeS 0.1%"; 0)`],
    ],
    [
      'Worksheet.tolerance',
      [`=TOLERANCE.YIELD(${GAIN48}; "rf=1%"; "outputNoiseRms 10…20k"; 0; 0; 1; 7; 7; -273.15)`],
    ],
    ['Worksheet.tolerance', [`=TOLERANCE.TIGHTEN(${GAIN48}; "rf=5%, rg=0.1%"; "gainDb"; 1 kHz)`]],
  ];
}

/**
 * Circuit documents and ports for stageTolerance at and past the limits, called once
 * each: the most trials, and documents that must be refused typed.
 */
export function hostileCircuitTolerance() {
  return [
    circuitTolerance({
      analyses: ['monteCarlo'],
      spec: [{ figure: 'gainDb', freqHz: 1e3 }],
      trials: 100_000,
    }),
    circuitTolerance({ output: 'nowhere' }),
    circuitTolerance({ outputMinus: 'nowhere' }),
    circuitTolerance({ input: 'R3' }),
    circuitTolerance({ input: '' }),
    circuitTolerance({ controlled: 'Rf' }),
    circuitTolerance({ controlled: 'ｕ１' }),
    circuitTolerance({ output: 'x'.repeat(100_000) }),
    // Two amplifiers and no `controlled`: the margin has no loop to read.
    circuitTolerance({
      circuit: rcloopWith({ 6: U2, 7: resistor('RL', ['y', '0'], '2k', 1) }),
      amplifierSpread: undefined,
    }),
    // No amplifier, a margin asked.
    circuitTolerance({
      circuit: rcloopWith({ 1: resistor('R1', ['in', 'out'], '1k', 1), 4: null, 5: null }),
      amplifierSpread: undefined,
    }),
    circuitTolerance({ circuit: rcloopWith({ 2: resistor('R3', ['out', 'x'], '1k', 100) }) }),
    circuitTolerance({ circuit: rcloopWith({ 2: resistor('R3', ['out', 'x'], '1k', -1) }) }),
    circuitTolerance({
      circuit: rcloopWith({ 2: resistor('R3', ['out', 'x'], '1k', Number.NaN) }),
    }),
    circuitTolerance({ circuit: rcloopWith({ 2: resistor('R3', ['out', 'x'], '1k', Infinity) }) }),
    // Zero-value elements (refused: a resistor or capacitor of 0 is not a part).
    circuitTolerance({ circuit: rcloopWith({ 3: { ...RCLOOP().elements[3], value: 0 } }) }),
    circuitTolerance({ circuit: rcloopWith({ 2: resistor('R3', ['out', 'x'], 0, 1) }) }),
    circuitTolerance({ circuit: rcloopWith({ 2: resistor('R3', ['out', 'x'], '0', 0) }) }),
    circuitTolerance({ circuit: rcloopWith({ 3: { ...RCLOOP().elements[3], tempco: 1e308 } }) }),
    circuitTolerance({ temperatureC: [70, 0] }),
    circuitTolerance({ temperatureC: [-273.16, 25] }),
    circuitTolerance({ temperatureC: [25, 1000.5] }),
    circuitTolerance({ temperatureC: [Number.NaN, 25] }),
    circuitTolerance({ temperatureC: [] }),
    circuitTolerance({ trials: 1 }),
    circuitTolerance({ trials: 100_001 }),
    circuitTolerance({ trials: 2 ** 53 }),
    circuitTolerance({ amplifierSpread: { gbwHz: { min: 1.3e7, typ: 1e7, max: 7e6 } } }),
    circuitTolerance({ amplifierSpread: { gbwHz: { min: 7e6, typ: 2e7, max: 1.3e7 } } }),
    circuitTolerance({ amplifierSpread: { ro: { min: -1, typ: 0, max: 1 } } }),
    circuitTolerance({ amplifierSpread: { gbwHz: { min: 0, typ: 1e7, max: Infinity } } }),
    circuitTolerance({ stage: STAGE() }),
    circuitTolerance({ circuit: { format: 'loopwright-circuit', version: 2, elements: [] } }),
  ];
}

/** Spreads texts that TOLERANCE.* must refuse or read (never NaN or a trap). */
export function hostileSpreads() {
  return [
    '',
    ' ',
    'rf=',
    'rf=NaN%',
    'rf=inf%',
    'rf=Infinity',
    'rf=1e308%',
    'rf=1e-320%',
    'rf=-1%',
    'rf=100%',
    'rf=0%',
    'rf=1% 0σ',
    'rf=1% 1e9σ',
    'rf=1e308ppm/K',
    'rf=±25ppm/K',
    'rf=47.5k…46.5k',
    'rf=0…1e308',
    'rf=0/0/0',
    'rf=1e-320/1e-310/1e-300',
    'ｒｆ=１%',
    'rf=𝟙%',
    'rf=\u202e1%',
    'rf=1%\u0000',
    `rf=${'9'.repeat(100_000)}%`,
    `rf=${'1% '.repeat(20_000)}`,
    'rf=1%, rf=2%',
    'rx=1%',
    'a0=1M…50k',
    'gbw=0/10M/1e308',
    'ro=-1…70',
    '…'.repeat(5000),
  ];
}

/** Worksheet methods with arguments that work. */
const SHEET_CALLS = {
  setCell: ['A1', '=FB.GAIN(100k; 0.01)'],
  value: ['A1'],
  values: ['A1:B2'],
  recalculate: [],
  input: ['A1'],
  changedCells: [],
  setName: ['gain', 'A1'],
  removeName: ['gain'],
  names: [],
  saveDocument: [],
  loadDocument: ['{"format":"loopwright-sheet","version":1,"cells":{"A1":"4k7"}}'],
  toCsv: [],
  rangeToTsv: ['A1:B2'],
  pasteTsv: ['B1', '1\t2\n3\t4'],
};

/** A copy of a good argument with one hostile change (a field, an element, the whole). */
function mutate(arg, rand, values) {
  const pick = () => values[Math.floor(rand() * values.length)];
  const r = rand();
  if (arg !== null && typeof arg === 'object' && !ArrayBuffer.isView(arg) && r < 0.6) {
    if (Array.isArray(arg)) {
      const copy = [...arg];
      copy[Math.floor(rand() * (copy.length + 1))] = pick();
      return copy;
    }
    const copy = { ...arg };
    const keys = Object.keys(copy);
    const key = keys[Math.floor(rand() * keys.length)];
    const how = rand();
    if (how < 0.55) copy[key] = pick();
    else if (how < 0.7) delete copy[key];
    else if (how < 0.8) copy[`${key}X`] = 1;
    else if (how < 0.9) {
      Object.defineProperty(copy, key, { enumerable: true, get: thrower });
    } else {
      return new Proxy(copy, { ownKeys: thrower, get: thrower });
    }
    return copy;
  }
  return pick();
}

/** The path of the first NaN or ±Infinity in a returned value, or null. */
export function nonFinite(v, path = 'result', depth = 0) {
  if (typeof v === 'number') return Number.isFinite(v) ? null : path;
  if (typeof v !== 'object' || v === null || depth > 20) return null;
  if (ArrayBuffer.isView(v)) {
    for (let i = 0; i < v.length; i++) if (!Number.isFinite(v[i])) return `${path}[${i}]`;
    return null;
  }
  for (const key of Object.keys(v)) {
    const bad = nonFinite(v[key], `${path}.${key}`, depth + 1);
    if (bad !== null) return bad;
  }
  return null;
}

/** Load the built package's Node entry (pkg/ by default) and its memory. */
export async function load(pkgDir) {
  const lw = await import(pathToFileURL(join(pkgDir, 'node.mjs')).href);
  // initSync returns the module's exports once initialised (node.mjs did it).
  const wasm = lw.initSync({ module: readFileSync(join(pkgDir, 'web', 'loopwright_bg.wasm')) });
  return { lw, memoryBytes: () => wasm.memory.buffer.byteLength };
}

function classify(call, figures, examples, name = '') {
  try {
    const result = call();
    const bad = nonFinite(result);
    if (bad !== null) {
      figures.nonFinite++;
      if (examples.length < 20) examples.push(`non-finite ${bad} from ${name}`);
    }
    figures.answered++;
  } catch (e) {
    if (e instanceof WebAssembly.RuntimeError) {
      figures.traps++;
      if (examples.length < 20) examples.push(`trap in ${name}: ${e.message}`);
    } else if (
      e?.name === 'LoopwrightError' &&
      CODES.has(e.code) &&
      typeof e.param === 'string' &&
      e.param.length > 0
    ) {
      figures.refused++;
    } else {
      figures.untyped++;
      if (examples.length < 20) examples.push(`untyped: ${e?.name} ${e?.message}`.slice(0, 160));
    }
  }
}

/** Known-good calls with their right answers: is the module still healthy? */
export function healthy(lw) {
  const close = (x, want, tol) => Math.abs(x - want) <= tol;
  try {
    // Sedra & Smith, Microelectronic Circuits, 7th ed., Example 10.1 (from memory):
    // A = 10⁴, Af = 10 → β = 0.0999; and A = 10⁵, β = 0.00999 → Af = 100 (by hand).
    if (!close(lw.closedLoopGain(1e5, 0.00999), 100, 1e-9)) return false;
    if (!close(lw.betaForGain(1e4, 10), 0.0999, 1e-15)) return false;
    if (lw.summarizeFeedback('current', 20, 0.5).closedLoopGain !== 20 / 11) return false;
    // A 1k/3k divider of 10 V: 7.5 V at the middle (Ohm's law).
    const s = lw.circuitSolve(DIVIDER, 0);
    if (!close(s.nodeVoltages.find((n) => n.name === 'out').re, 7.5, 1e-12)) return false;
    const ws = new lw.Worksheet();
    ws.setCell('A1', '2');
    ws.setCell('A2', '=A1*3');
    const six = ws.value('A2').number;
    ws.free();
    if (six !== 6) return false;
    if (JSON.parse(lw.functionCatalog()).functions.length < 10) return false;
    // Phase margin of A = 10⁵/((1 + s/10)(1 + s/10⁶)) at β = 0.01 lies between 0 and 90°.
    const pm = lw.stabilityMargins(model(), 0.01).phaseMarginDeg;
    return pm > 0 && pm < 90;
  } catch {
    return false;
  }
}

/**
 * The campaign: `calls` hostile calls spread over every export and Worksheet method.
 * Returns the figures; `missing` lists exports whose good call failed (a table out of
 * date), which the test treats as a failure.
 */
export function campaign(lw, { calls, seed, skip = [], huge = true }) {
  const rand = generator(seed);
  const values = hostileValues(huge);
  // `once`: the fixed hostile calls made before the seeded ones (not in `calls`).
  const figures = {
    calls: 0,
    once: 0,
    answered: 0,
    refused: 0,
    traps: 0,
    nonFinite: 0,
    untyped: 0,
  };
  const examples = [];
  const missing = [];
  const targets = [];
  for (const [name, args] of Object.entries(goodCalls())) {
    if (skip.includes(name)) continue;
    const f = lw[name];
    try {
      f(...args);
      targets.push([name, (a) => f(...a), args]);
    } catch (e) {
      missing.push(`${name}: ${e?.message}`);
    }
  }
  const sheet = new lw.Worksheet();
  // The TOLERANCE formula's values, spilled (setCell, then every cell it fills).
  const toleranceCell = (formula) => {
    sheet.setCell('K1', formula);
    return sheet.values('K1:T12');
  };
  for (const [name, args] of variantCalls()) {
    if (skip.includes(name.replace('Worksheet.tolerance', 'Worksheet.setCell'))) continue;
    const f = name === 'Worksheet.tolerance' ? toleranceCell : lw[name];
    try {
      const r = f(...args);
      if (nonFinite(r) !== null) throw new Error(`non-finite ${nonFinite(r)}`);
      targets.push([`${name} (variant)`, (a) => f(...a), args]);
    } catch (e) {
      missing.push(`${name} variant ${JSON.stringify(args).slice(0, 120)}: ${e?.message}`);
    }
  }
  // Hostile circuit documents and spreads texts, each called once up front too.
  for (const o of hostileCircuitTolerance()) {
    figures.once++;
    classify(() => lw.stageTolerance(o), figures, examples, 'stageTolerance (hostile circuit)');
  }
  for (const t of hostileSpreads()) {
    for (const formula of [
      toleranceFormula(t),
      toleranceFormula(`rg=1%, ${t}`, '"phaseMarginDeg"; 0; "0…70"'),
      `=TOLERANCE.MONTECARLO(${GAIN48}; "${t}"; "gainDb"; 1 kHz; 2; 1)`,
    ]) {
      figures.once++;
      classify(() => toleranceCell(formula), figures, examples, `TOLERANCE "${t.slice(0, 40)}"`);
    }
  }
  for (const [name, args] of Object.entries(SHEET_CALLS)) {
    try {
      sheet[name](...args);
      targets.push([`Worksheet.${name}`, (a) => sheet[name](...a), args]);
    } catch (e) {
      missing.push(`Worksheet.${name}: ${e?.message}`);
    }
  }
  for (let i = 0; i < calls; i++) {
    const [, call, good] = targets[i % targets.length];
    let args;
    const r = rand();
    if (good.length === 0 || r < 0.05) {
      // Extra or missing arguments.
      args = r < 0.025 ? [...good, values[Math.floor(rand() * values.length)]] : [];
    } else {
      args = [...good];
      const changes = 1 + Math.floor(rand() * 2);
      for (let c = 0; c < changes; c++) {
        const at = Math.floor(rand() * args.length);
        args[at] = mutate(good[at], rand, values);
      }
    }
    figures.calls++;
    // LOOPWRIGHT_HOSTILE_TRACE=1: each call's number and target on stderr (to find a hang).
    if (TRACE) process.stderr.write(`${i} ${targets[i % targets.length][0]}\n`);
    classify(() => call(args), figures, examples, targets[i % targets.length][0]);
  }
  sheet.free();
  return { figures, examples, missing, healthy: healthy(lw) };
}

/** Memory of the module over `calls` failing calls (after a warm-up), in bytes. */
export function leak(lw, memoryBytes, calls) {
  const failing = [
    () => lw.loopAt({ gain: 1e5, polesHz: '10' }, 0.01, 1),
    () => lw.loopAt({ gain: 1e5, polesHz: 10 }, 0.01, 1),
    () => lw.loopAt({ gain: 1e5, polez: [1] }, 0.01, 1),
    () =>
      lw.loopAt(
        {
          get gain() {
            throw new Error('hostile getter');
          },
        },
        0.01,
        1,
      ),
    () => lw.closedLoopGain(-100, 0.01),
    () => lw.closedLoopGain('1e4', 0.01),
    () => lw.parseValue(4700),
    () => lw.integratedNoise('inverting', 1, 1, 0, 300, 1, 1, 1, 1, 1, '12345678', 1, 2),
    () => lw.summarizeFeedback('series-shunt', 1e5, 5e-324),
    () => lw.twoPoleResponse(1e-300, 1e-300, 1e-300),
  ];
  const run = (n) => {
    let errors = 0;
    for (let i = 0; i < n; i++) {
      try {
        failing[i % failing.length]();
      } catch {
        errors++;
      }
    }
    return errors;
  };
  run(Math.min(calls, 20_000));
  const before = memoryBytes();
  const errors = run(calls);
  const after = memoryBytes();
  return { calls, errors, before, after, bytesPerMillion: ((after - before) * 1e6) / calls };
}

async function main() {
  const arg = (name, fallback) => {
    const i = process.argv.indexOf(name);
    return i < 0 ? fallback : process.argv[i + 1];
  };
  const root = join(import.meta.dirname, '..', '..');
  const { lw, memoryBytes } = await load(arg('--pkg', join(root, 'pkg')));
  const calls = Number(arg('--calls', 20_000));
  const seed = Number(arg('--seed', 1));
  const t0 = performance.now();
  // --skip a,b leaves exports out (to measure an old build whose formatSi hangs).
  const skip = arg('--skip', '').split(',').filter(Boolean);
  // --no-huge leaves out the sparse array of length 2³¹ − 1 and the Proxy claiming a
  // length of 2³² − 1 (an old build turned them into strings of gigabytes where a number
  // was expected, which takes minutes).
  const r = campaign(lw, { calls, seed, skip, huge: !process.argv.includes('--no-huge') });
  const l = leak(lw, memoryBytes, Number(arg('--leak-calls', 100_000)));
  console.log(
    JSON.stringify(
      {
        ...r.figures,
        healthy: r.healthy,
        missing: r.missing,
        examples: r.examples,
        leak: l,
        healthyAfterLeakRun: healthy(lw),
        seconds: (performance.now() - t0) / 1000,
      },
      null,
      1,
    ),
  );
}

if (import.meta.url === pathToFileURL(process.argv[1]).href) await main();
