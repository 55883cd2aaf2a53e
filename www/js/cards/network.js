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
    ? formatEngineering(l.value, 4, 'Ω')
    : `${formatEngineering(l.first, 4, 'Ω')} ${l.joint === 'parallel' ? '∥' : '+'} ${formatEngineering(l.second, 4, 'Ω')}`;

/** Most R1 values searched one by one (each a bestPairs call with R1 fixed). */
const MAX_R1_VALUES = 400;

/** Candidates shown in the table. */
const PAIRS_SHOWN = 6;

/** Monte Carlo trials per candidate for its yield (seed 1, reproducible). */
const PAIR_TRIALS = 20_000;

/** Parts in a candidate: 2 with a single R2, 3 with a two-part R2. */
const partsOf = (c) => (c.r2.second === null || c.r2.second === undefined ? 2 : 3);

/**
 * The best pairs with R1 and R2 each within their own limits: every standard R1 in
 * its range (seriesValues), the core's bestPairs with that R1 fixed and R2's range
 * as the total's, merged and ranked by |error|, then fewer parts.
 */
function pairsWithinLimits(v, api) {
  const r1s = Array.from(api.seriesValues(v.series, v.r1_min, v.r1_max));
  if (r1s.length === 0)
    throw Object.assign(new Error('no standard value lies in the R1 range'), { param: 'r1_min' });
  if (r1s.length > MAX_R1_VALUES)
    throw Object.assign(
      new Error(
        `the R1 range holds ${r1s.length} standard values; narrow it to ${MAX_R1_VALUES} or fewer`,
      ),
      { param: 'r1_max' },
    );
  const found = [];
  let ideal = null;
  for (const r1 of r1s) {
    const r = api.bestPairs({
      network: v.network,
      target: v.target,
      series: v.series,
      totalMin: r1 + v.r2_min,
      totalMax: r1 + v.r2_max,
      fixedR1: r1,
      combine: v.combine,
      // As many per R1 as are shown: the merged top is then exactly the best.
      count: PAIRS_SHOWN,
    });
    ideal = r.idealRatio;
    found.push(...r.candidates);
  }
  found.sort((a, b) => Math.abs(a.error) - Math.abs(b.error) || partsOf(a) - partsOf(b));
  return { ideal, candidates: found.slice(0, PAIRS_SHOWN) };
}

/** Worst case and yield of one candidate in the stage, against the spec. */
function judged(c, v, api) {
  if (v.network === 'divider') return { range: '—', verdict: '—', yieldText: '—', pass: null };
  const stage = {
    stage: v.network,
    r1: c.r1,
    r2: c.r2.value,
    tolR1: v.tol,
    tolR2: v.tol,
    ...amplifierOptions(v),
  };
  const w = api.worstCase(stage).gain;
  const mc = api.monteCarlo({
    ...stage,
    trials: PAIR_TRIALS,
    seed: 1,
    lower: v.spec_low,
    upper: v.spec_high,
    bins: 10,
  });
  const pass = w.min >= v.spec_low && w.max <= v.spec_high;
  return {
    range: `${formatPlain(w.min, 5)} … ${formatPlain(w.max, 5)}`,
    verdict: pass ? 'meets' : 'misses',
    yieldText: formatPlain((mc.stats.yieldFraction ?? Number.NaN) * 100, 4, '%'),
    pass,
  };
}

/** Rows of the series-and-grade table shown (the ranking puts the useful ones first). */
const CHOICES_SHOWN = 12;

const CHOICE_COLUMNS = [
  { key: 'rank', label: '#' },
  { key: 'series', label: 'series' },
  { key: 'grade', label: 'grade', numeric: true },
  { key: 'legs', label: 'parts' },
  { key: 'values', label: 'R1 / R2', numeric: true },
  { key: 'error', label: 'nominal error', numeric: true },
  { key: 'range', label: 'worst case (tolerance)', numeric: true },
  { key: 'yield', label: 'yield', numeric: true },
  { key: 'cost', label: 'cost rank', numeric: true },
];

const legsOf = (c) => (c.parts === 2 ? '2: single R2' : `3: R2 ${c.r2.joint}`);

/** A choice's yield as shown: exact, or Monte Carlo with its standard error. */
const yieldShown = (c) =>
  c.method === 'exact'
    ? formatPlain(c.yield * 100, 4, '%')
    : `${formatPlain(c.yield * 100, 3, '%')} ± ${formatPlain(c.yieldStdError * 100, 2, '%')}`;

/** The series, grade and R2 build ranked against the spec window (the core's chooseParts). */
function choicesTable(v, api) {
  const r = api.chooseParts({
    network: v.network,
    target: v.target,
    lower: v.spec_low,
    upper: v.spec_high,
    grades: v.grades,
    combine: v.combine,
    minYield: v.min_yield,
    ...(v.network === 'divider' ? {} : { openLoopGain: v.a_typ }),
  });
  const best = r.recommended;
  const head = best
    ? `cheapest reaching ${formatPlain(r.minYield * 100, 4, '%')}: ${best.series} ${formatPlain(best.grade * 100, 3, '%')}, ${formatEngineering(best.r1, 4, 'Ω')} / ${leg(best.r2)}`
    : r.choices.length > 0
      ? `none reaches ${formatPlain(r.minYield * 100, 4, '%')}; best: ${r.choices[0].series} ${formatPlain(r.choices[0].grade * 100, 3, '%')} at ${yieldShown(r.choices[0])}`
      : 'no pair fits 1 kΩ … 1 MΩ';
  return {
    verdict: head,
    sensitivity: r.sensitivityR2,
    table: {
      name: 'part-choices',
      caption: `Series and grade for the spec ${formatPlain(v.spec_low, 6)} … ${formatPlain(v.spec_high, 6)}: ${head}`,
      columns: CHOICE_COLUMNS,
      rows: r.choices.slice(0, CHOICES_SHOWN).map((c, i) => ({
        rank: String(i + 1),
        series: c.series,
        grade: formatPlain(c.grade * 100, 3, '%'),
        legs: legsOf(c),
        values: `${formatEngineering(c.r1, 4, 'Ω')} / ${leg(c.r2)}`,
        error: formatPlain(c.nominalError * 100, 3, '%'),
        range: `${formatPlain(c.worstLow, 5)} … ${formatPlain(c.worstHigh, 5)}`,
        yield: yieldShown(c),
        cost: String(c.costRank),
        pass: c.meets,
      })),
      note: `First ${Math.min(CHOICES_SHOWN, r.choices.length)} of ${r.choices.length}: those reaching the least yield first, cheapest first (looser grade, then fewer parts, then coarser series), then the rest by yield. Every part uniform within its grade; A fixed at A typ; R1 + R2 from 1 kΩ to 1 MΩ; a series only at its customary tolerance or tighter. Yield exact for two parts, seeded Monte Carlo (20k builds, ± one standard error) with a two-part R2.`,
    },
  };
}

const PAIR_COLUMNS = [
  { key: 'rank', label: '#' },
  { key: 'r1', label: 'R1', numeric: true },
  { key: 'r2', label: 'R2', numeric: true },
  { key: 'achieved', label: 'gain or ratio', numeric: true },
  { key: 'error', label: 'nominal error', numeric: true },
  { key: 'range', label: 'worst case (tolerance, A)', numeric: true },
  { key: 'verdict', label: 'worst case vs spec' },
  { key: 'yield', label: 'yield', numeric: true },
];

export const pairCard = {
  id: 'card-pairs',
  title: 'Resistor pair',
  blurb:
    'Standard-value resistors (IEC 60063) for a gain or divider ratio, each resistor within its own range, and each candidate judged as built: nominal error, the worst case over resistor tolerance and the amplifier’s gain range, and the Monte Carlo yield within the spec. Below, every series and tolerance grade compared against the same spec, cheapest first among those that reach the least yield.',
  formula:
    'non-inverting: G = 1 + R2/R1    inverting: |G| = R2/R1    divider: k = R1/(R1 + R2)\nnominal error = achieved/target − 1    worst case and yield: the stage with the amplifier below',
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
    { name: 'r1_min', field: 'totalMin', label: 'R1 at least', value: '1k', unit: 'Ω' },
    { name: 'r1_max', label: 'R1 at most', value: '10k', unit: 'Ω' },
    { name: 'r2_min', label: 'R2 at least', value: '1k', unit: 'Ω' },
    { name: 'r2_max', field: 'totalMax', label: 'R2 at most', value: '100k', unit: 'Ω' },
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
    { name: 'tol', field: ['tolR1', 'tolR2'], label: 'Resistor tolerance', value: '1%', unit: '' },
    { name: 'spec_low', field: 'lower', label: 'Spec: gain at least', value: '7.7' },
    { name: 'spec_high', field: 'upper', label: 'Spec: gain at most', value: '7.84' },
    {
      name: 'grades',
      label: 'Grades to compare',
      value: '5%, 2%, 1%, 0.5%, 0.25%, 0.1%',
      list: true,
      unit: '',
    },
    { name: 'min_yield', label: 'Least yield', value: '99%', unit: '' },
    { name: 'a_min', label: 'A min', value: '60k' },
    { name: 'a_typ', label: 'A typ', value: '250k' },
    { name: 'a_max', label: 'A max', value: '1M' },
    {
      name: 'amp_by',
      label: 'Amplifier bandwidth given by',
      value: 'gbw',
      choices: [
        ['pole', 'dominant pole at A typ'],
        ['gbw', 'gain-bandwidth product'],
      ],
    },
    { name: 'pole', field: 'poleHz', label: 'Dominant pole at A typ', value: '10', unit: 'Hz' },
    { name: 'gbw', field: 'gbwHz', label: 'or gain-bandwidth product', value: '2.5M', unit: 'Hz' },
    { name: 'ri', label: 'Amplifier Ri', value: '1M', unit: 'Ω' },
    { name: 'ro', label: 'Amplifier Ro', value: '75', unit: 'Ω' },
  ],
  compute(v, api) {
    const { ideal, candidates } = pairsWithinLimits({ ...v, hold: 'gbw' }, api);
    const choices = choicesTable(v, api);
    const rows = [
      { name: 'ideal', label: 'Ideal R2/R1', value: ideal ?? Number.NaN, format: 'plain' },
      { name: 'count', label: 'Candidates within the limits', text: String(candidates.length) },
      { name: 'choice', label: 'Series and grade', text: choices.verdict },
      {
        name: 'sensitivity',
        label: 'Sensitivity to R2 (to R1: the negative)',
        value: choices.sensitivity,
        format: 'plain',
      },
    ];
    const tableRows = candidates.map((c, i) => {
      const j = judged(c, { ...v, hold: 'gbw' }, api);
      return {
        rank: String(i + 1),
        r1: formatEngineering(c.r1, 4, 'Ω'),
        r2: leg(c.r2),
        achieved: formatPlain(c.achieved, 6),
        error: formatPlain(c.error * 100, 3, '%'),
        range: j.range,
        verdict: j.verdict,
        yield: j.yieldText,
        pass: j.pass,
      };
    });
    return {
      rows,
      tables: [
        {
          name: 'pair-candidates',
          caption: `Candidates, smallest nominal error first (spec ${formatPlain(v.spec_low, 6)} … ${formatPlain(v.spec_high, 6)})`,
          columns: PAIR_COLUMNS,
          rows: tableRows,
          note: `Worst case: every corner of R1, R2 ± tolerance and A min … max. Yield: ${PAIR_TRIALS / 1000}k seeded Monte Carlo builds (resistors uniform, A log-normal), share within the spec. A two-part R2 is taken at the tolerance of one part. A divider has no stage: its columns stay empty.`,
        },
        choices.table,
      ],
    };
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
  {
    name: 'amp_by',
    label: 'Amplifier bandwidth given by',
    value: 'pole',
    choices: [
      ['pole', 'dominant pole at A typ'],
      ['gbw', 'gain-bandwidth product'],
    ],
  },
  { name: 'pole', field: 'poleHz', label: 'Dominant pole at A typ', value: '10', unit: 'Hz' },
  { name: 'gbw', field: 'gbwHz', label: 'or gain-bandwidth product', value: '2.5M', unit: 'Hz' },
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

/** The amplifier fields of worstCase and monteCarlo: the pole or the GBW, as chosen. */
const amplifierOptions = (v) => ({
  aMin: v.a_min,
  aTyp: v.a_typ,
  aMax: v.a_max,
  ri: v.ri,
  ro: v.ro,
  ...(v.amp_by === 'gbw' ? { gbwHz: v.gbw } : { poleHz: v.pole }),
  hold: v.hold,
});

/** The stage options of worstCase and monteCarlo from the card's values. */
const stageOptions = (v) => ({
  stage: v.stage,
  r1: v.r1,
  r2: v.r2,
  tolR1: v.tol,
  tolR2: v.tol,
  ...amplifierOptions(v),
});

/** The spec limits, typed by the engineer (no arithmetic on them here). */
const specInputs = [
  { name: 'spec_low', label: 'Spec: gain at least', value: '39.8' },
  { name: 'spec_high', label: 'Spec: gain at most', value: '40.2' },
];

/** Whether [low, high] lies within the spec, in words. */
function againstSpec(low, high, v) {
  const under = low < v.spec_low;
  const over = high > v.spec_high;
  if (!under && !over) return 'meets the spec at every corner';
  return `misses the spec:${under ? ` lowest ${formatPlain(low, 5)} < ${formatPlain(v.spec_low, 5)}` : ''}${over ? ` highest ${formatPlain(high, 5)} > ${formatPlain(v.spec_high, 5)}` : ''}`;
}

export const worstCaseCard = {
  id: 'card-worst',
  title: 'Worst case',
  blurb:
    'Extremes of the closed-loop gain, impedances and bandwidth over every corner of resistor tolerance and open-loop gain, judged against the spec limits you give. A real op-amp keeps its gain-bandwidth product as A spreads, so by default the dominant pole moves to GBW/A; give the amplifier by its pole or by its GBW.',
  formula:
    'corners: R1 ± tol, R2 ± tol, A ∈ {A min, A max}\nAf = A/(1 + A·β), β = R1/(R1 + R2)    GBW = A typ · pole    f−3dB = (GBW/A)·(1 + A·β)',
  inputs: [...stageInputs, ...specInputs],
  compute(v, api) {
    const w = api.worstCase(stageOptions(v));
    const corner = (c) => `R1 ${c.r1}, R2 ${c.r2}, A ${c.openLoopGain}`;
    return [
      { name: 'spec', label: 'Against the spec', text: againstSpec(w.gain.min, w.gain.max, v) },
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
      {
        name: 'gbw',
        label: v.amp_by === 'gbw' ? 'GBW (as given)' : 'GBW (A typ · pole)',
        value: v.amp_by === 'gbw' ? v.gbw : api.gainBandwidth(v.a_typ, v.pole),
        unit: 'Hz',
      },
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
    'Seeded random builds of the stage, judged against the spec limits: resistors uniform within tolerance or normal (tolerance = 3 σ), open-loop gain drawn between min and max around typical (default: log-normal with its median at A typ, min and max 3 σ out on their sides). The same seed gives the same numbers everywhere.',
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
    {
      name: 'resistor_distribution',
      label: 'Resistor distribution',
      value: 'uniform',
      choices: [
        ['uniform', 'uniform within tolerance'],
        ['normal', 'normal, tolerance = 3 σ'],
      ],
    },
    { name: 'trials', label: 'Trials', value: '100k' },
    { name: 'seed', label: 'Seed', value: '1' },
    ...specInputs,
  ],
  compute(v, api) {
    const r = api.monteCarlo({
      ...stageOptions(v),
      resistorDistribution: v.resistor_distribution,
      gainDistribution: v.gain_distribution,
      metric: 'gain',
      trials: v.trials,
      seed: v.seed,
      lower: v.spec_low,
      upper: v.spec_high,
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
        { x: v.spec_low, label: 'spec low' },
        { x: v.spec_high, label: 'spec high' },
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
          name: 'spec',
          label: 'Spec limits',
          text: `${formatPlain(v.spec_low, 6)} … ${formatPlain(v.spec_high, 6)}`,
        },
        {
          name: 'yield',
          label: 'Yield (within the spec)',
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
