// Calculator cards of network synthesis and tolerance.

import { histogramChart } from '../plot/histogram.js';
import { formatEngineering, formatPlain } from '../format.js';

const SERIES = ['E3', 'E6', 'E12', 'E24', 'E48', 'E96', 'E192'].map((s) => [s, s]);
const STAGES = [
  ['non-inverting', 'non-inverting (1 + R2/R1)'],
  ['inverting', 'inverting (−R2/R1)'],
];

const leg = (l) =>
  l.second === null || l.second === undefined
    ? formatEngineering(l.value)
    : `${formatEngineering(l.first)} ${l.joint === 'parallel' ? '∥' : '+'} ${formatEngineering(l.second)}`;

export const pairCard = {
  id: 'card-pairs',
  title: 'Resistor pair',
  blurb:
    'Standard-value resistors (IEC 60063) for a gain or divider ratio, ranked by error, within a total-resistance range.',
  formula:
    'non-inverting: G = 1 + R2/R1    inverting: |G| = R2/R1    divider: k = R1/(R1 + R2)\nerror = achieved/target − 1',
  inputs: [
    {
      name: 'network',
      label: 'Network',
      value: 'non-inverting',
      choices: [
        ['non-inverting', 'non-inverting gain'],
        ['inverting', 'inverting gain'],
        ['divider', 'divider ratio'],
      ],
    },
    { name: 'target', label: 'Target', value: '7.77' },
    { name: 'series', label: 'Series', value: 'E96', choices: SERIES },
    { name: 'total_min', label: 'R1 + R2 at least', value: '2k', unit: 'Ω' },
    { name: 'total_max', label: 'R1 + R2 at most', value: '200k', unit: 'Ω' },
    {
      name: 'combine',
      label: 'Two-part R2',
      value: 'none',
      choices: [
        ['none', 'single resistor'],
        ['series', 'series pair'],
        ['parallel', 'parallel pair'],
        ['either', 'series or parallel pair'],
      ],
    },
    { name: 'max_error', label: 'Largest error (empty: none)', value: '', list: true, unit: '' },
  ],
  compute({ network, target, series, total_min, total_max, combine, max_error }, api) {
    if (max_error.length > 1) throw new Error('give one largest error, or none');
    const r = api.bestPairs({
      network,
      target,
      series,
      totalMin: total_min,
      totalMax: total_max,
      maxError: max_error[0],
      combine,
      count: 5,
    });
    const rows = [{ name: 'ideal', label: 'Ideal R2/R1', value: r.idealRatio, format: 'plain' }];
    if (max_error.length === 1) {
      rows.push({
        name: 'meets',
        label: 'Best meets the largest error',
        text: r.meetsMaxError ? 'yes' : 'no: the first row is the best miss',
      });
    }
    r.candidates.forEach((c, i) => {
      rows.push({
        name: `pair${i + 1}`,
        label: `#${i + 1}  R1 / R2`,
        text: `${formatEngineering(c.r1)} / ${leg(c.r2)}   → ${formatPlain(c.achieved)} (${(c.error * 100).toFixed(4)} %)`,
      });
    });
    return rows;
  },
};

const stageInputs = [
  { name: 'stage', label: 'Stage', value: 'non-inverting', choices: STAGES },
  { name: 'r1', label: 'R1', value: '1k', unit: 'Ω' },
  { name: 'r2', label: 'R2', value: '39k', unit: 'Ω' },
  { name: 'tol', field: ['tolR1', 'tolR2'], label: 'Resistor tolerance', value: '1%', unit: '' },
  { name: 'a_min', label: 'A min', value: '60k' },
  { name: 'a_typ', label: 'A typ', value: '250k' },
  { name: 'a_max', label: 'A max', value: '1M' },
  { name: 'pole', field: 'poleHz', label: 'Dominant pole at A typ', value: '10', unit: 'Hz' },
  {
    name: 'hold',
    label: 'A spread holds',
    value: 'gbw',
    choices: [
      ['gbw', 'gain-bandwidth (pole moves)'],
      ['pole', 'the pole'],
    ],
  },
  { name: 'ri', label: 'Amplifier Ri', value: '1M', unit: 'Ω' },
  { name: 'ro', label: 'Amplifier Ro', value: '75', unit: 'Ω' },
];

/** The card input that an error's `param` (the option's name) points at. */
/** The stage options of worstCase and monteCarlo from the card's values. */
const stageOptions = (v) => ({
  stage: v.stage,
  r1: v.r1,
  r2: v.r2,
  tolR1: v.tol,
  tolR2: v.tol,
  aMin: v.a_min,
  aTyp: v.a_typ,
  aMax: v.a_max,
  ri: v.ri,
  ro: v.ro,
  poleHz: v.pole,
  hold: v.hold,
});

export const worstCaseCard = {
  id: 'card-worst',
  title: 'Worst case',
  blurb:
    'Extremes of the closed-loop gain, impedances and bandwidth over every corner of resistor tolerance and open-loop gain. A real op-amp keeps its gain-bandwidth product as A spreads, so by default the dominant pole moves to GBW/A.',
  formula:
    'corners: R1 ± tol, R2 ± tol, A ∈ {A min, A max}\nAf = A/(1 + A·β), β = R1/(R1 + R2)    GBW = A typ · pole    f−3dB = (GBW/A)·(1 + A·β)',
  inputs: stageInputs,
  compute(v, api) {
    const w = api.worstCase(stageOptions(v));
    const corner = (c) => `R1 ${c.r1}, R2 ${c.r2}, A ${c.openLoopGain}`;
    return [
      { name: 'nominal', label: 'Nominal gain', value: w.gain.nominal, format: 'plain' },
      { name: 'min', label: 'Lowest gain', value: w.gain.min, format: 'plain' },
      { name: 'mincorner', label: '  at', text: corner(w.gain.minCorner) },
      { name: 'max', label: 'Highest gain', value: w.gain.max, format: 'plain' },
      { name: 'maxcorner', label: '  at', text: corner(w.gain.maxCorner) },
      {
        name: 'range',
        label: 'Low / high',
        text: `${w.gain.lowPercent.toFixed(3)} % / +${w.gain.highPercent.toFixed(3)} %`,
      },
      {
        name: 'bw',
        label: 'Bandwidth range',
        text: `${formatEngineering(w.bandwidthHz.min)} … ${formatEngineering(w.bandwidthHz.max)}`,
        unit: 'Hz',
      },
      { name: 'gbw', label: 'GBW (A typ · pole)', value: v.a_typ * v.pole, unit: 'Hz' },
      {
        name: 'zin',
        label: 'Input impedance range',
        text: `${formatEngineering(w.inputImpedance.min)} … ${formatEngineering(w.inputImpedance.max)}`,
        unit: 'Ω',
      },
      {
        name: 'zout',
        label: 'Output impedance range',
        text: `${formatEngineering(w.outputImpedance.min)} … ${formatEngineering(w.outputImpedance.max)}`,
        unit: 'Ω',
      },
    ];
  },
};

export const monteCarloCard = {
  id: 'card-montecarlo',
  title: 'Monte Carlo',
  blurb:
    'Seeded random builds of the stage: resistors uniform within tolerance, open-loop gain drawn between min and max around typical (default: log-normal with its median at A typ, min and max 3 σ out on their sides). The same seed gives the same numbers everywhere.',
  formula: 'Af = A/(1 + A·R1/(R1 + R2)) per trial; yield = share of trials inside the limits',
  inputs: [
    ...stageInputs,
    {
      name: 'gain_distribution',
      label: 'A distribution',
      value: 'log-normal',
      choices: [
        ['log-normal', 'log-normal, median at A typ'],
        ['log-triangular', 'log-triangular, mode at A typ'],
        ['log-uniform', 'log-uniform (A typ unused)'],
        ['uniform', 'uniform (A typ unused)'],
      ],
    },
    { name: 'trials', label: 'Trials', value: '100k' },
    { name: 'seed', label: 'Seed', value: '1' },
    { name: 'lower', label: 'Spec low', value: '39.8' },
    { name: 'upper', label: 'Spec high', value: '40.2' },
  ],
  compute(v, api) {
    const r = api.monteCarlo({
      ...stageOptions(v),
      resistorDistribution: 'uniform',
      gainDistribution: v.gain_distribution,
      metric: 'gain',
      trials: v.trials,
      seed: v.seed,
      lower: v.lower,
      upper: v.upper,
      bins: 40,
    });
    const s = r.stats;
    const p = Object.fromEntries(s.percentiles.map((x) => [x.percent, x.value]));
    const svg = histogramChart({
      title: `Closed-loop gain, ${s.count} trials`,
      label: 'closed-loop gain',
      edges: s.histogram.edges,
      counts: s.histogram.counts,
      limits: [
        { x: v.lower, label: 'low limit' },
        { x: v.upper, label: 'high limit' },
      ],
    });
    return {
      rows: [
        { name: 'nominal', label: 'Nominal (A typ)', value: r.nominal, format: 'plain' },
        { name: 'mean', label: 'Mean', value: s.mean, format: 'plain' },
        { name: 'sd', label: 'Standard deviation', value: s.sd, format: 'plain' },
        {
          name: 'p01',
          label: '0.1 % / 99.9 %',
          text: `${formatPlain(p[0.1])} / ${formatPlain(p[99.9])}`,
        },
        {
          name: 'yield',
          label: 'Yield',
          value: (s.yieldFraction ?? Number.NaN) * 100,
          unit: '%',
          format: 'plain',
        },
      ],
      figures: [{ svg, name: 'monte-carlo-gain' }],
    };
  },
};

export const NETWORK_CARDS = [pairCard, worstCaseCard, monteCarloCard];
