// What the benchmarks measure, and the peer a user would reach for instead, doing
// the same work on the same inputs. Plain-JS peers are written here as a competent
// engineer would write them inline; Python peers live in bench/peers.py under the
// same key. Each case: {key, area, what, make(lw) → fn, plainJs?: () → fn,
// python?: true, target}.

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
];
