// What the benchmarks measure, and the peer a user would reach for instead, doing
// the same work on the same inputs. Plain-JS peers are written here as a competent
// engineer would write them inline; Python peers live in bench/peers.py under the
// same key (or `pythonKey`). Each case: {key, area, what, make(lw) → fn,
// plainJs?: () → fn, python?: true, pythonKey?, pythonLabel?, target}.

import { CIRCUIT_CASES } from './circuit_cases.mjs';
import { NOISE_CASES } from './noise_cases.mjs';
import { TOLERANCE_CASES } from './tolerance_cases.mjs';
import { STAGE_CASES } from './stage_cases.mjs';
import { buildSheet } from './sheet_build.mjs';

// The loop of the freq cases (bench/peers.py builds the same one).
const FREQ_A = { gain: 1e5, polesHz: [10, 1e5, 1e6, 3e6, 1e7, 3e7], zerosHz: [2e6, 5e7] };
const FREQ_BETA = 0.1;

/**
 * The sweep as a competent engineer writes it inline: complex products, dB, unwrapped
 * phase; into the three arrays of `into` when given (kept by the caller), else new ones.
 */
function plainJsSweep(points, into) {
  const f = into?.f ?? new Float64Array(points);
  const db = into?.db ?? new Float64Array(points);
  const ph = into?.ph ?? new Float64Array(points);
  const a = Math.log10(1);
  const b = Math.log10(1e9);
  let prev = 0;
  let turns = 0;
  for (let i = 0; i < points; i++) {
    const fi = 10 ** (a + ((b - a) * i) / (points - 1));
    f[i] = fi;
    let re = FREQ_A.gain * FREQ_BETA;
    let im = 0;
    for (const p of FREQ_A.polesHz) {
      // multiply by 1/(1 + j f/p)
      const x = fi / p;
      const d = 1 + x * x;
      const nr = (re + im * x) / d;
      const ni = (im - re * x) / d;
      re = nr;
      im = ni;
    }
    for (const z of FREQ_A.zerosHz) {
      const x = fi / z;
      const nr = re - im * x;
      const ni = im + re * x;
      re = nr;
      im = ni;
    }
    db[i] = 10 * Math.log10(re * re + im * im);
    const p = (Math.atan2(im, re) * 180) / Math.PI;
    if (i > 0) {
      while (p + turns - prev > 180) turns -= 360;
      while (p + turns - prev < -180) turns += 360;
    }
    ph[i] = p + turns;
    prev = ph[i];
  }
  return { f, db, ph };
}

export const CASES = [
  {
    key: 'closed_loop_gain',
    area: 'feedback',
    what: 'closed-loop gain, one scalar call',
    make: (lw) => (i) => lw.closedLoopGain(1e5 + i, 0.00999),
    plainJs: () => (i) => {
      const a = 1e5 + i;
      const beta = 0.00999;
      if (!Number.isFinite(a) || !Number.isFinite(beta) || a === 0) throw new Error('bad');
      const d = 1 + a * beta;
      if (d === 0) throw new Error('oscillation');
      return a / d;
    },
    target: 'within 2x of inline plain JS',
  },
  {
    key: 'feedback_summary',
    area: 'feedback',
    what: 'all feedback relations of a stage as one object',
    make: (lw) => (i) => lw.summarizeFeedback('series-shunt', 1e5 + i, 0.00999),
    plainJs: () => (i) => {
      const a = 1e5 + i;
      const beta = 0.00999;
      const t = a * beta;
      const d = 1 + t;
      const af = a / d;
      return {
        topology: 'series-shunt',
        gainUnit: 'V/V',
        betaUnit: 'V/V',
        closedLoopGain: af,
        loopGain: t,
        feedbackAmount: d,
        feedbackAmountDb: 20 * Math.log10(Math.abs(d)),
        sensitivity: 1 / d,
        idealGain: 1 / beta,
        gainError: af * beta - 1,
        sense: Math.abs(d) > 1 ? 'negative' : 'positive',
      };
    },
    target: 'within 2x of inline plain JS',
  },
  {
    key: 'freq_sweep_10k',
    area: 'freq',
    what: '10 000-point loop-gain sweep of a 6-pole, 2-zero loop (dB, continuous phase)',
    make: (lw) => () =>
      lw.loopGainSweep({
        amplifier: FREQ_A,
        beta: FREQ_BETA,
        startHz: 1,
        stopHz: 1e9,
        points: 10_000,
      }),
    plainJs: () => () => plainJsSweep(10_000),
    python: true,
    pythonLabel: 'python-control',
    target: '< 1 ms; ≥ 5x faster than python-control; no slower than plain JS',
  },
  {
    key: 'freq_sweep_10k_into',
    area: 'freq',
    what: 'the same sweep written into three Float64Arrays the caller keeps (loopGainSweepInto)',
    make: (lw) => {
      const n = 10_000;
      const into = {
        freqHz: new Float64Array(n),
        magnitudeDb: new Float64Array(n),
        phaseDeg: new Float64Array(n),
      };
      const options = { amplifier: FREQ_A, beta: FREQ_BETA, startHz: 1, stopHz: 1e9, points: n };
      return () => lw.loopGainSweepInto(options, into);
    },
    plainJs: () => {
      const n = 10_000;
      const into = { f: new Float64Array(n), db: new Float64Array(n), ph: new Float64Array(n) };
      return () => plainJsSweep(n, into);
    },
    python: true,
    // python-control has no form that writes into arrays the caller keeps: its
    // peer is the allocating sweep of freq_sweep_10k.
    pythonKey: 'freq_sweep_10k',
    pythonLabel: 'python-control',
    target: '≥ 2x faster than python-control (issue 17); no slower than plain JS',
  },
  {
    key: 'freq_margins_poles',
    area: 'freq',
    what: 'phase and gain margins (every crossing refined) + closed-loop poles',
    // One call since 0.2: the margins are signed by the closed-loop poles, which the
    // option returns with them (0.1 made two calls; bench/compare.mjs runs each form).
    make: (lw) => () => lw.stabilityMargins(FREQ_A, FREQ_BETA, { closedLoopPoles: true }),
    python: true,
    pythonLabel: 'python-control',
    target: '< 0.2 ms',
  },
  {
    key: 'monte_carlo_1e6',
    area: 'network',
    what: 'Monte Carlo, 1 000 000 trials of Af (2 resistors 1 % + A spread), stats, percentiles, yield, histogram',
    make: (lw) => () =>
      lw.monteCarlo({
        stage: 'inverting',
        r1: 10e3,
        r2: 47e3,
        tolR1: 0.01,
        tolR2: 0.01,
        aMin: 5e4,
        aTyp: 1e5,
        aMax: 2e5,
        ri: 1e6,
        ro: 75,
        poleHz: 5,
        resistorDistribution: 'uniform',
        // The numpy peer draws A uniformly; the same distribution keeps the work equal.
        gainDistribution: 'uniform',
        metric: 'gain',
        trials: 1_000_000,
        seed: 42,
        lower: -4.72,
        upper: -4.68,
        bins: 50,
      }),
    python: true,
    pythonLabel: 'numpy, vectorised',
    heavy: true,
    target: 'at least as fast as numpy; < 50 ms',
  },
  {
    key: 'best_pairs_e192',
    area: 'network',
    what: 'best E192 resistor pair for gain 7.77 over three decades (1 kΩ … 1 MΩ)',
    make: (lw) => () =>
      lw.bestPairs({
        network: 'non-inverting',
        target: 7.77,
        series: 'E192',
        totalMin: 1e3,
        totalMax: 1e6,
        count: 10,
      }),
    target: '< 2 ms',
  },
  {
    key: 'sheet_recalculate',
    area: 'worksheet',
    what: 'full recalculation of a 10 000-cell sheet (chain, ranges, fan-out, catalog functions)',
    make: (lw) => {
      const ws = buildSheet(lw);
      return () => ws.recalculate();
    },
    target: '< 20 ms',
  },
  {
    key: 'sheet_edit_100',
    area: 'worksheet',
    what: 'one edit reaching 100 dependents in that sheet',
    make: (lw) => {
      const ws = buildSheet(lw);
      return (i) => ws.setCell('F1', String(2 + (i % 7)));
    },
    target: '< 1 ms',
  },
  ...CIRCUIT_CASES,
  ...NOISE_CASES,
  ...TOLERANCE_CASES,
  ...STAGE_CASES,
];
