// Every answer for one stage, from the core: the circuit the stage writes, its
// loop gain with the margins (at each point of the A0 spread), the Nyquist reading,
// the closed-loop gain and the frequency up to which it stays within its tolerance,
// the port impedances, the step response, the noise with each source's part and
// its band integral, worst case, Monte Carlo and sensitivities (tolerance.js), and the spec's
// checks with pass or fail. No maths here: each figure is the core's.

import { stageDocument, readField } from './fields.js';
import { stageTolerance, figureUnits, FIGURE_WORDS } from './tolerance.js';

/**
 * The sample frequencies of the plots (`perDecade` log-spaced points from `fromHz`
 * to `toHz`): where the core is asked for values, not a result.
 */
export function plotFrequencies(fromHz, toHz, perDecade) {
  const decades = Math.log10(toHz / fromHz);
  const n = Math.max(2, Math.ceil(decades * perDecade) + 1);
  return Float64Array.from({ length: n }, (_, k) => fromHz * 10 ** ((decades * k) / (n - 1)));
}

const PLOT_FROM_HZ = 1;
const PLOT_TO_HZ = 1e9;

/** The numbers of the fields the page hands on as numbers, read by the core. */
function numbers(api, v) {
  const n = {};
  const optional = [
    'a0Min',
    'a0Max',
    'gbwHz',
    'dominantPoleHz',
    'rd',
    'ro',
    'rf',
    'rg',
    'cl',
    'maxNoiseRms',
    'hd2Open',
    'hd3Open',
    'hdAmplitude',
    'distortionLevel',
    'distortionHz',
    'maxThd',
    'pairTotalMin',
    'pairTotalMax',
    'resistorTempco',
    'capacitorTolerance',
    'capacitorTempco',
    'sourceLoadTolerance',
    'gbwMin',
    'gbwMax',
    'roMin',
    'roMax',
    'tempLowC',
    'tempHighC',
    'mcTrials',
  ];
  for (const k of [
    'a0',
    'gain',
    'tolerance',
    'minPhaseMarginDeg',
    'noiseFromHz',
    'noiseToHz',
    'partTolerance',
  ])
    n[k] = readField(api, v, k);
  for (const k of optional) if (String(v[k] ?? '').trim() !== '') n[k] = readField(api, v, k);
  return n;
}

/** Runs `f`; its error becomes `{error}` so that one failed analysis leaves the others. */
function part(f) {
  try {
    return f();
  } catch (error) {
    return { error };
  }
}

/** The margins' marker positions on the plotted phase branch (see cards/freq.js). */
function phaseAt(api, doc, sweep, fHz) {
  const one = api.circuitLoopGain({ circuit: doc, frequenciesHz: [fHz] }).phaseDeg[0];
  let best = 0;
  for (let i = 1; i < sweep.freqHz.length; i++)
    if (Math.abs(Math.log(sweep.freqHz[i] / fHz)) < Math.abs(Math.log(sweep.freqHz[best] / fHz)))
      best = i;
  return one + 360 * Math.round((sweep.phaseDeg[best] - one) / 360);
}

/**
 * Every analysis of the stage whose field texts are `v`. Throws (a LoopwrightError
 * with `field` or a `param` that fieldOfParam maps) when the stage itself cannot
 * be read; an analysis that fails alone is `{error}` in the result. With
 * `deferTolerance`, `tolerance` is null until withTolerance(api, r) adds it.
 */
export function analyseStage(api, v, { deferTolerance = false } = {}) {
  const doc = stageDocument(api, v);
  const circuit = api.stageCircuit(doc);
  const n = numbers(api, v);
  const freqs = plotFrequencies(PLOT_FROM_HZ, PLOT_TO_HZ, 40);
  const loop = api.circuitLoopGain({ circuit: doc, frequenciesHz: freqs });
  const margins = api.circuitMargins({ circuit: doc });
  const spread = {};
  for (const point of ['min', 'typ', 'max'])
    spread[point] = part(() => api.circuitMargins({ circuit: doc, spreadPoint: point }));
  const phaseAtCrossover =
    margins.crossoverHz !== null ? phaseAt(api, doc, loop, margins.crossoverHz) : null;
  const nyquist = part(() => api.circuitNyquist({ circuit: doc }));
  const gain = api.circuitGain({ circuit: doc, frequenciesHz: freqs });
  const within = part(() =>
    api.circuitGainWithin({
      circuit: doc,
      targetGain: n.gain,
      tolerance: n.tolerance,
    }),
  );
  const zin = part(() =>
    api.circuitImpedance({ circuit: doc, port: 'input', frequenciesHz: freqs }),
  );
  const zout = part(() =>
    api.circuitImpedance({ circuit: doc, port: 'output', frequenciesHz: freqs }),
  );
  const step = part(() => api.circuitStep({ circuit: doc, settleBand: 0.01, points: 400 }));
  const output = circuit.outputCurrent ? { element: circuit.outputCurrent } : circuit.output;
  const noiseSetup = { circuit: circuit.circuit, output, inputSource: circuit.source };
  const noise = part(() =>
    api.circuitNoise({
      ...noiseSetup,
      frequenciesHz: plotFrequencies(Math.min(0.1, n.noiseFromHz), Math.max(1e7, n.noiseToHz), 20),
    }),
  );
  const noiseBand = part(() =>
    api.circuitNoiseIntegral({ ...noiseSetup, bandHz: [n.noiseFromHz, n.noiseToHz] }),
  );
  const distortion =
    n.hd2Open !== undefined && n.hd3Open !== undefined && n.hdAmplitude !== undefined
      ? part(() =>
          api.stageDistortion({
            stage: doc,
            hd2: n.hd2Open,
            hd3: n.hd3Open,
            amplitude: n.hdAmplitude,
            level: n.distortionLevel,
            frequencyHz: n.distortionHz ?? 0,
          }),
        )
      : { note: 'Give the amplifier’s open-loop HD2, HD3 and the output peak they hold at.' };
  const r = {
    doc,
    circuit,
    numbers: n,
    loop,
    margins,
    spread,
    phaseAtCrossover,
    nyquist,
    gain,
    within,
    zin,
    zout,
    step,
    noise,
    noiseBand,
    distortion,
    tolerance: null,
    checks: null,
  };
  return deferTolerance ? withChecks(r) : withTolerance(api, r);
}

/** The spec's checks of `r` as it stands (the tolerance rows once `r.tolerance` is in). */
export function withChecks(r) {
  r.checks = checks(r.numbers, r);
  return r;
}

/**
 * `r` (analyseStage) with its worst case, Monte Carlo and sensitivities, and the
 * checks that come from them: the slowest analysis, which the view runs after the
 * others are shown.
 */
export function withTolerance(api, r) {
  r.tolerance = part(() => stageTolerance(api, r.doc, r.numbers));
  return withChecks(r);
}

/** The spec's checks: `{name, what, value, unit, limit, pass}` (pass null: shown, not judged). */
function checks(n, r) {
  const out = [];
  const lower = n.gain * (1 - n.tolerance);
  const upper = n.gain * (1 + n.tolerance);
  if (!r.within.error) {
    const g = r.within.gainAtStart;
    out.push({
      name: 'gain',
      what: 'Closed-loop gain at the low end',
      value: g,
      unit: '',
      limit: { lower, upper },
      pass: g >= lower && g <= upper,
    });
  }
  const pms = ['min', 'typ', 'max']
    .map((p) => r.spread[p])
    .filter((m) => !m.error && m.phaseMarginDeg !== null)
    .map((m) => m.phaseMarginDeg);
  if (pms.length > 0) {
    const worst = Math.min(...pms);
    out.push({
      name: 'phase-margin',
      what: 'Phase margin, worst over the A0 spread',
      value: worst,
      unit: '°',
      limit: { lower: n.minPhaseMarginDeg },
      pass: worst >= n.minPhaseMarginDeg,
    });
  }
  if (!r.nyquist.error)
    out.push({
      name: 'stable',
      what: 'Closed loop (Nyquist, Z = N + P)',
      text: r.nyquist.encirclements.verdict,
      pass: r.nyquist.encirclements.verdict === 'stable',
    });
  if (!r.noiseBand.error)
    out.push({
      name: 'noise',
      what: 'Output noise over the band',
      value: r.noiseBand.totalRms,
      unit: 'V',
      limit: n.maxNoiseRms !== undefined ? { upper: n.maxNoiseRms } : null,
      pass: n.maxNoiseRms !== undefined ? r.noiseBand.totalRms <= n.maxNoiseRms : null,
    });
  if (r.distortion.closed) {
    const worst = Math.max(Math.abs(r.distortion.closed.hd2), Math.abs(r.distortion.closed.hd3));
    out.push({
      name: 'distortion',
      what: 'Larger of HD2 and HD3 at the level and frequency',
      value: worst * 100,
      unit: '%',
      limit: n.maxThd !== undefined ? { upper: n.maxThd * 100 } : null,
      pass: n.maxThd !== undefined ? worst <= n.maxThd : null,
    });
  }
  if (r.tolerance && !r.tolerance.error) {
    const t = r.tolerance;
    for (const f of t.worstCase.figures) {
      const fig = f.limit.figure.figure;
      const limit = {};
      if (f.limit.lower !== null) limit.lower = f.limit.lower;
      if (f.limit.upper !== null) limit.upper = f.limit.upper;
      out.push({
        name: `worst-${fig}`,
        what: `${FIGURE_WORDS[fig] ?? fig}, worst case of parts, A0 and temperature`,
        range: [f.min.value, f.max.value],
        unit: figureUnits(r.doc.kind)[fig],
        limit,
        pass: f.meets,
      });
    }
    out.push({
      name: 'yield',
      what: `Monte Carlo yield against the spec (${t.monteCarlo.trials} trials)`,
      value: t.monteCarlo.yieldFraction * 100,
      unit: '%',
      limit: null,
      pass: null,
    });
  }
  return out;
}
