// Calculator card of the loading-aware analysis: the same stage
// solved exactly (nodal analysis), by the two-port method, and ideally (1/β).

import { formatEngineering } from '../format.js';

const mag = (z) => Math.hypot(z.re, z.im);
const pct = (x) => {
  const v = x * 100;
  return `${v !== 0 && Math.abs(v) < 1e-3 ? v.toExponential(1) : v.toPrecision(3)} %`;
};

export const loadedCard = {
  id: 'card-loaded',
  title: 'Loaded stage: exact, two-port, ideal',
  blurb:
    'A real amplifier (finite Ri, Ro and gain) with its feedback network, source and load. Series-shunt: Rf output→inverting input, Rg to ground. Shunt-shunt: Rf output→input (Rg = 0). Series-series: sense Rg. Shunt-series: sense Rg, Rf to the input. The gain is signed as it acts in the circuit: positive for series mixing, negative for shunt mixing (e.g. −100M V/A, −1k A/A).',
  formula:
    'two-port: A loaded by the feedback network, β from its h/y/z/g parameters, Af = A/(1 + A·β)\nexact: modified nodal analysis of the whole circuit    ideal: 1/β',
  inputs: [
    {
      name: 'topology',
      label: 'Topology',
      value: 'series-shunt',
      choices: [
        ['series-shunt', 'series-shunt'],
        ['shunt-shunt', 'shunt-shunt'],
        ['series-series', 'series-series'],
        ['shunt-series', 'shunt-series'],
      ],
    },
    {
      name: 'gain',
      label: 'Amplifier gain (signed)',
      value: '100k',
      unit: ({ topology }, api) => api.topologyInfo(topology).gainUnit,
    },
    { name: 'ri', label: 'Amplifier Ri', value: '100k', unit: 'Ω' },
    { name: 'ro', label: 'Amplifier Ro', value: '1k', unit: 'Ω' },
    { name: 'rf', label: 'Rf', value: '9k', unit: 'Ω' },
    { name: 'rg', label: 'Rg', value: '1k', unit: 'Ω' },
    { name: 'rs', label: 'Source Rs', value: '10k', unit: 'Ω' },
    { name: 'rl', label: 'Load RL', value: '2k', unit: 'Ω' },
  ],
  compute(v, api) {
    const stage = {
      topology: v.topology,
      ri: v.ri,
      ro: v.ro,
      gain: v.gain,
      rf: v.rf,
      rg: v.rg,
      rs: v.rs,
      rl: v.rl,
    };
    const r = api.circuitTwoPort(stage);
    const views = api.circuitStageViews(stage);
    const row = (name, label, c, unit) => ({
      name,
      label,
      text: `exact ${formatEngineering(c.exact.re, 4, unit)}   two-port ${formatEngineering(c.twoPort.re, 4, unit)}   (${pct(c.relativeError)})`,
    });
    return [
      { name: 'a', label: 'Loaded A', value: r.a.re, unit: r.gainUnit },
      { name: 'beta', label: 'β (feedback network)', value: r.beta.re, format: 'plain' },
      { name: 't', label: 'Loop gain T', value: r.loopGain.re, format: 'plain' },
      row('af', 'Af', r.af, ''),
      {
        name: 'ideal',
        label: 'Ideal 1/β',
        text: `${formatEngineering(r.idealAf.re)} (off the exact Af by ${pct(r.idealAfError)})`,
      },
      row('rin', 'Rin seen by the source', r.rin, 'Ω'),
      row('rout', 'Rout seen by the load', r.rout, 'Ω'),
      {
        name: 'blackman',
        label: 'Blackman Rin',
        text: `${formatEngineering(mag(views.input.blackman), 4, 'Ω')} (vs exact: ${views.input.relativeError.toExponential(1)})`,
      },
      {
        name: 'asymptotic',
        label: 'Asymptotic-gain Af',
        text: `G∞·T/(1+T) + G0/(1+T) = ${formatEngineering(views.gain.af.re)} (vs exact: ${views.gain.relativeError.toExponential(1)})`,
      },
    ];
  },
};

export const CIRCUIT_CARDS = [loadedCard];
