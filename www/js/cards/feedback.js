// Calculator cards of the feedback relations.

import { TOPOLOGY_CHOICES } from '../constants.js';

// The shared classification of the loop's sense (src/feedback/gain.rs, FeedbackSense).
const SENSE_TEXT = {
  negative: 'negative feedback (D > 1)',
  neutral: 'no net feedback (D = 1)',
  positive: 'POSITIVE feedback (0 < D < 1): gain raised, stability at risk',
  oscillation: 'oscillation condition (D = 0)',
  latching:
    'LATCHING or unstable (D < 0: loop gain below −1): not negative feedback; Af, Zif and Zof are formula values with no working stage behind them',
};

const gainUnit = ({ topology }, api) => api.topologyInfo(topology).gainUnit;
const betaUnit = ({ topology }, api) => api.topologyInfo(topology).betaUnit;

export const stageCard = {
  id: 'card-stage',
  title: 'Feedback stage',
  blurb: 'Closed-loop gain, loop gain, amount of feedback and port impedances from A and β.',
  formula:
    'T = A·β    D = 1 + A·β    Af = A / D    S = 1/D\nZif = Zi·D (series mixing) or Zi/D (shunt)    Zof = Zo/D (voltage sampling) or Zo·D (current)',
  inputs: [
    { name: 'topology', label: 'Topology', value: 'series-shunt', choices: TOPOLOGY_CHOICES },
    { name: 'a', label: 'Open-loop gain A', value: '100k', unit: gainUnit },
    { name: 'beta', label: 'Feedback factor β', value: '0.00999', unit: betaUnit },
    { name: 'zi', label: 'Input impedance Zi', value: '1M', unit: 'Ω' },
    { name: 'zo', label: 'Output impedance Zo', value: '75', unit: 'Ω' },
  ],
  compute({ topology, a, beta, zi, zo }, api) {
    const s = api.summarizeFeedback(topology, a, beta);
    const z = api.impedancesWithFeedback({ topology, ziRe: zi, zoRe: zo, aRe: a, betaRe: beta });
    return [
      { name: 'af', label: 'Closed-loop gain Af', value: s.closedLoopGain, unit: s.gainUnit },
      {
        name: 'ideal',
        label: 'Ideal gain 1/β',
        value: s.idealGain ?? NaN,
        unit: s.gainUnit,
        text: s.idealGain === null ? 'none (β = 0)' : undefined,
      },
      {
        name: 'error',
        label: 'Gain error vs 1/β',
        value: (s.gainError ?? NaN) * 100,
        unit: '%',
        format: 'plain',
        text: s.gainError === null ? '—' : undefined,
      },
      { name: 't', label: 'Loop gain T', value: s.loopGain, format: 'plain' },
      { name: 'd', label: 'Amount of feedback D', value: s.feedbackAmount, format: 'plain' },
      { name: 'ddb', label: 'D in dB', value: s.feedbackAmountDb, unit: 'dB', format: 'plain' },
      { name: 's', label: 'Sensitivity 1/D', value: s.sensitivity, format: 'plain' },
      { name: 'zif', label: 'Input impedance Zif', value: z.input.re, unit: 'Ω' },
      { name: 'zof', label: 'Output impedance Zof', value: z.output.re, unit: 'Ω' },
      { name: 'sense', label: 'Feedback', text: SENSE_TEXT[s.sense] ?? s.sense },
    ];
  },
};

export const inverseCard = {
  id: 'card-inverse',
  title: 'Inverse design',
  blurb:
    'Which β for a target gain, how much open-loop gain for a gain error, and the largest gain a required amount of feedback allows.',
  formula: 'β = 1/Af − 1/A    A_min = (1 − ε)/(ε·β)    Af_max = A / D_req,  β = (D_req − 1)/A',
  inputs: [
    { name: 'a', label: 'Open-loop gain A', value: '100k' },
    { name: 'target_gain', label: 'Target gain Af', value: '100' },
    { name: 'gain_error', label: 'Allowed gain error ε', value: '0.1m', unit: '(fraction)' },
    { name: 'feedback_amount', label: 'Required feedback D', value: '1000', unit: '(ratio)' },
  ],
  compute({ a, target_gain, gain_error, feedback_amount }, api) {
    const beta = api.betaForGain(a, target_gain);
    const aMin = api.minOpenLoopGain(api.idealBeta(target_gain), gain_error);
    const ceiling = api.maxClosedLoopGain(a, feedback_amount);
    return [
      { name: 'beta', label: 'β for the target', value: beta, format: 'plain' },
      { name: 'd', label: 'D at that β', value: api.feedbackAmount(a, beta), format: 'plain' },
      { name: 'amin', label: 'Least A for ε (β = 1/Af)', value: aMin },
      { name: 'afmax', label: 'Largest Af with D_req', value: ceiling.closedLoopGain },
      { name: 'betamin', label: 'β for it', value: ceiling.beta, format: 'plain' },
    ];
  },
};

export const spreadCard = {
  id: 'card-spread',
  title: 'Gain spread',
  blurb: 'How far the closed-loop gain moves when the open-loop gain varies from part to part.',
  formula: 'Af(A) = A/(1 + A·β) at A_min, A_typ, A_max    spread = (Af_high − Af_low)/Af(A_typ)',
  inputs: [
    { name: 'beta', label: 'Feedback factor β', value: '0.01' },
    { name: 'a_min', label: 'A min', value: '50k' },
    { name: 'a_typ', label: 'A typ', value: '200k' },
    { name: 'a_max', label: 'A max', value: '1M' },
  ],
  compute({ beta, a_min, a_typ, a_max }, api) {
    const s = api.gainSpread(beta, a_min, a_typ, a_max);
    return [
      { name: 'atmin', label: 'Af at A min', value: s.atMin, format: 'plain' },
      { name: 'attyp', label: 'Af at A typ', value: s.atTyp, format: 'plain' },
      { name: 'atmax', label: 'Af at A max', value: s.atMax, format: 'plain' },
      { name: 'spread', label: 'Spread', value: s.spreadPercent, unit: '%', format: 'plain' },
      { name: 'ppm', label: 'Spread', value: s.spreadPpm, unit: 'ppm', format: 'plain' },
      {
        name: 'range',
        label: 'Low / high',
        text: `${s.lowPercent.toFixed(4)} % / +${s.highPercent.toFixed(4)} %`,
      },
      {
        name: 'flag',
        label: 'Feedback',
        text: s.positiveFeedback
          ? 'POSITIVE feedback somewhere in the range'
          : 'negative over the whole range',
      },
    ];
  },
};

export const FEEDBACK_CARDS = [stageCard, inverseCard, spreadCard];
