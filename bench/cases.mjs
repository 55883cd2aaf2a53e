// What the benchmarks measure, and the peer a user would reach for instead, doing
// the same work on the same inputs. Plain-JS peers are written here as a competent
// engineer would write them inline; Python peers live in bench/peers.py under the
// same key. Each case: {key, area, what, make(lw) → fn, plainJs?: () → fn,
// python?: true, target}.

import { buildSheet } from './sheet_build.mjs';

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
        topology: 'series-shunt', gainUnit: 'V/V', betaUnit: 'V/V', closedLoopGain: af, loopGain: t,
        feedbackAmount: d, feedbackAmountDb: 20 * Math.log10(Math.abs(d)), sensitivity: 1 / d,
        idealGain: 1 / beta, gainError: af * beta - 1, sense: Math.abs(d) > 1 ? 'negative' : 'positive',
      };
    },
    target: 'within 2x of inline plain JS',
  },
  {
    key: 'monte_carlo_1e6',
    area: 'network',
    what: 'Monte Carlo, 1 000 000 trials of Af (2 resistors 1 % + A spread), stats, percentiles, yield, histogram',
    make: (lw) => () => lw.monteCarlo('inverting', 10e3, 47e3, 0.01, 0.01, 5e4, 1e5, 2e5, 1e6, 75, 5,
      'uniform', 3, 'uniform', 3, 'gain', 1_000_000, 42, -4.72, -4.68, 50),
    python: true,
    pythonLabel: 'numpy, vectorised',
    heavy: true,
    target: 'at least as fast as numpy; < 50 ms',
  },
  {
    key: 'best_pairs_e192',
    area: 'network',
    what: 'best E192 resistor pair for gain 7.77 over three decades (1 kΩ … 1 MΩ)',
    make: (lw) => () => lw.bestPairs('non-inverting', 7.77, 'E192', 1e3, 1e6, undefined, undefined, 'none', 10),
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
];
