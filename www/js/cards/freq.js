// Calculator cards of frequency response and stability.

import { lineChart } from '../plot/chart.js';
import { formatEngineering, formatPlain } from '../format.js';

const loopInputs = [
  { name: 'gain', label: 'DC open-loop gain A0', value: '100k' },
  { name: 'poles', field: 'polesHz', label: 'Poles', value: '10, 1M, 20M', unit: 'Hz', list: true },
  {
    name: 'zeros',
    field: 'zerosHz',
    label: 'Zeros (left half plane)',
    value: '',
    unit: 'Hz',
    list: true,
  },
  { name: 'beta', label: 'Feedback factor β', value: '1' },
];

const model = (v) => ({ gain: v.gain, polesHz: v.poles, zerosHz: v.zeros });

/** The swept phase (continuous, deg) at the sample nearest `fHz` in log frequency. */
function phaseNear(sweep, fHz) {
  let best = 0;
  for (let i = 1; i < sweep.freqHz.length; i++) {
    if (Math.abs(Math.log(sweep.freqHz[i] / fHz)) < Math.abs(Math.log(sweep.freqHz[best] / fHz)))
      best = i;
  }
  return sweep.phaseDeg[best];
}
const seconds = (t) => (t === null || t === undefined ? '—' : `${formatEngineering(t, 4, 's')}`);

export const loopCard = {
  id: 'card-loop',
  title: 'Loop stability',
  blurb:
    'The open-loop amplifier you have (DC gain, poles, zeros) inside a feedback loop: margins, closed-loop poles, bandwidth, peaking and step response.',
  formula:
    'T(jω) = A(jω)·β    PM = 180° − |∠T| at each |T| = 1    GM = |20·log10|T|| at each ∠T = −180°\nworst of each, negative when the closed-loop poles say unstable    poles: roots of 1 + A(s)·β = 0    Af = A/(1 + T)',
  inputs: [...loopInputs, { name: 'band', label: 'Settling band', value: '1%' }],
  compute(v, api) {
    const a = model(v);
    const r = api.analyzeLoop(a, v.beta, v.band, 400);
    const m = r.margins;
    const lo = Math.max(1e-3, Math.min(...v.poles, ...v.zeros, 1) / 100);
    const hi = Math.max(...v.poles, ...v.zeros, 1) * 100;
    const sweep = api.loopGainSweep({
      amplifier: a,
      beta: v.beta,
      startHz: lo,
      stopHz: hi,
      points: 600,
    });
    const closed = api.closedLoopSweep({
      amplifier: a,
      beta: v.beta,
      startHz: lo,
      stopHz: hi,
      points: 600,
    });
    const markers = [];
    if (m.crossoverHz !== null)
      markers.push({
        x: m.crossoverHz,
        label: `crossover ${formatEngineering(m.crossoverHz, 4, 'Hz')}`,
        align: 'left',
      });
    const phaseMarkers = [{ y: -180, label: '−180°' }];
    if (m.crossoverHz !== null && m.phaseMarginDeg !== null) {
      // The band runs from the phase at the crossover (exact, on the plotted
      // branch) to the nearest odd multiple of 180° (lag or lead, whichever is
      // closer): its height is the margin, read at the crossover.
      const exact = api.loopAt(a, v.beta, m.crossoverHz).loopGain.phaseDeg;
      const near = phaseNear(sweep, m.crossoverHz);
      const at = exact + 360 * Math.round((near - exact) / 360);
      phaseMarkers.push({
        kind: 'margin',
        x: m.crossoverHz,
        y0: 360 * Math.round((at - 180) / 360) + 180,
        y1: at,
        label: `PM ${m.phaseMarginDeg.toFixed(1)}°`,
      });
    }
    if (m.phaseCrossoverHz !== null && m.gainMarginDb !== null) {
      markers.push({
        kind: 'margin',
        x: m.phaseCrossoverHz,
        y0: 0,
        y1: -m.gainMarginDb,
        label: `GM ${m.gainMarginDb.toFixed(1)} dB`,
      });
    }
    const mag = lineChart({
      title: 'Loop gain |T|',
      x: { label: 'frequency (Hz)', log: true },
      y: { label: 'dB' },
      series: [{ label: '|T|', x: sweep.freqHz, y: sweep.magnitudeDb, kind: 'a' }],
      markers: [{ y: 0, label: '0 dB' }, ...markers],
    });
    const phase = lineChart({
      title: 'Loop gain phase ∠T',
      x: { label: 'frequency (Hz)', log: true },
      y: { label: 'degrees' },
      series: [{ label: '∠T', x: sweep.freqHz, y: sweep.phaseDeg, kind: 'b' }],
      markers: phaseMarkers,
    });
    const cl = lineChart({
      title: 'Closed-loop gain |Af|',
      x: { label: 'frequency (Hz)', log: true },
      y: { label: 'dB' },
      series: [{ label: '|Af|', x: closed.freqHz, y: closed.magnitudeDb, kind: 'a' }],
      markers:
        r.bandwidth && r.bandwidth.highHz !== null
          ? [{ x: r.bandwidth.highHz, label: '−3 dB' }]
          : [],
    });
    const figures = [
      { svg: mag, name: 'loop-gain-magnitude' },
      { svg: phase, name: 'loop-gain-phase' },
      { svg: cl, name: 'closed-loop-response' },
    ];
    if (r.step) {
      figures.push({
        svg: lineChart({
          title: 'Step response',
          x: { label: 'time (s)' },
          y: { label: 'output' },
          series: [
            { label: 'output', x: r.step.waveform.timeS, y: r.step.waveform.output, kind: 'a' },
          ],
          markers: [
            {
              kind: 'level',
              y: r.step.finalValue,
              label: `final ${formatPlain(r.step.finalValue, 4)}`,
            },
          ],
        }),
        name: 'step-response',
      });
    }
    // One entry per real pole or conjugate pair.
    const poles = r.poles.poles
      .filter((p) => p.im >= 0)
      .map((p) =>
        Math.abs(p.im) < 1e-12 * Math.abs(p.re)
          ? `${formatEngineering(p.re / (2 * Math.PI))}`
          : `${formatEngineering(p.re / (2 * Math.PI))} ± j${formatEngineering(Math.abs(p.im) / (2 * Math.PI))}`,
      )
      .join(', ');
    const verdict = {
      stable: 'stable',
      marginal: 'MARGINAL (poles on the jω axis)',
      unstable: 'UNSTABLE (poles in the right half plane)',
    }[r.poles.verdict];
    return {
      rows: [
        { name: 'verdict', label: 'Closed loop', text: verdict },
        {
          name: 'pm',
          label: 'Phase margin',
          text:
            m.phaseMarginDeg === null
              ? 'unbounded (no crossover)'
              : `${m.phaseMarginDeg.toFixed(2)}°`,
        },
        {
          name: 'fc',
          label: 'Crossover',
          value: m.crossoverHz ?? Number.NaN,
          unit: 'Hz',
          text: m.crossoverHz === null ? '—' : undefined,
        },
        {
          name: 'gm',
          label: 'Gain margin',
          text:
            m.gainMarginDb === null
              ? 'unbounded (no −180° crossing)'
              : `${m.gainMarginDb.toFixed(2)} dB at ${formatEngineering(m.phaseCrossoverHz, 4, 'Hz')}`,
        },
        { name: 'poles', label: 'Closed-loop poles (Hz)', text: poles },
        {
          name: 'bw',
          label: 'Closed-loop −3 dB',
          text: r.bandwidth ? `${formatEngineering(r.bandwidth.highHz, 4, 'Hz')}` : r.bandwidthNote,
        },
        {
          name: 'peak',
          label: 'Peaking',
          text: r.bandwidth ? `${formatPlain(r.bandwidth.peakingDb, 4)} dB` : '—',
        },
        {
          name: 'overshoot',
          label: 'Step overshoot',
          text: r.step ? `${formatPlain(r.step.overshootPercent, 4)} %` : r.stepNote,
        },
        {
          name: 'rise',
          label: 'Rise time 10–90 %',
          text: r.step ? seconds(r.step.riseTimeS) : '—',
        },
        {
          name: 'settle',
          label: 'Settling to the band',
          text: r.step ? seconds(r.step.settlingTimeS) : '—',
        },
      ],
      figures,
    };
  },
};

export const compensationCard = {
  id: 'card-compensation',
  title: 'Compensation',
  blurb:
    'How far to pull the dominant pole down for a target phase margin at this β, or how much feedback the loop takes as it is, without that pole.',
  formula:
    'highest f_d with PM(f_d, β) ≥ target    largest β ≤ 1 with PM(β) ≥ target (poles as entered)\nboth scanned, then refined: the margin need not fall steadily',
  inputs: [
    { name: 'gain', label: 'DC open-loop gain A0', value: '100k' },
    {
      name: 'poles',
      field: 'polesHz',
      label: 'Other poles',
      value: '2M, 20M',
      unit: 'Hz',
      list: true,
    },
    { name: 'beta', label: 'Feedback factor β', value: '1' },
    { name: 'pm', field: 'targetPmDeg', label: 'Target phase margin', value: '60', unit: '°' },
  ],
  compute(v, api) {
    const a = { gain: v.gain, polesHz: v.poles };
    const dom = api.dominantPoleForMargin(a, v.beta, v.pm);
    // How much feedback the amplifier takes as it is: the poles as entered, not
    // the dominant pole just placed above (which was sized for the β typed).
    const beta = api.maxBetaForMargin(a, v.pm, 1);
    // A margin that dips and recovers with β holds the target only on an
    // interval: say so when it does not reach down to the least β searched
    // (1e-12 of the cap).
    const interval = beta.holdsFrom > 1e-11;
    return [
      { name: 'fd', label: 'Dominant pole for the target', value: dom.value, unit: 'Hz' },
      { name: 'fc', label: 'Crossover then', value: dom.crossoverHz, unit: 'Hz' },
      {
        name: 'gbw',
        label: 'Gain–bandwidth then',
        value: api.gainBandwidth(v.gain, dom.value),
        unit: 'Hz',
      },
      {
        name: 'betamax',
        label: 'Largest β without the dominant pole',
        value: beta.value,
        format: 'plain',
      },
      {
        name: 'betarange',
        label: 'Target held for β in',
        text: interval
          ? `${formatPlain(beta.holdsFrom, 4)} … ${formatPlain(beta.value, 4)} only`
          : `0 … ${formatPlain(beta.value, 4)}`,
      },
      {
        name: 'afmin',
        label: 'Smallest closed-loop gain',
        value: beta.closedLoopGain,
        format: 'plain',
      },
    ];
  },
};

export const closedFormCard = {
  id: 'card-closedform',
  title: 'Bandwidth in closed form',
  blurb:
    'Single-pole bandwidth extension and the two-pole loop: Q, damping, peaking and overshoot from the loop gain.',
  formula:
    'fHf = fH·(1 + A0·β)    GBW = A0·fH\ntwo poles: Q = √((1 + T0)·f1·f2)/(f1 + f2), ζ = 1/(2Q), T0 = A0·β    maximally flat at Q = 1/√2',
  inputs: [
    { name: 'a0', label: 'DC gain A0', value: '100k' },
    { name: 'fh', label: 'Dominant pole fH', value: '10', unit: 'Hz' },
    { name: 'beta', label: 'Feedback factor β', value: '0.01' },
    { name: 'f2', label: 'Second pole', value: '5M', unit: 'Hz' },
  ],
  compute(v, api) {
    const t0 = api.loopGain(v.a0, v.beta);
    const two = api.twoPoleResponse(v.fh, v.f2, t0);
    return [
      {
        name: 'fhf',
        label: 'Closed-loop fH (one pole)',
        value: api.singlePoleHighCutoff(v.fh, v.a0, v.beta),
        unit: 'Hz',
      },
      { name: 'gbw', label: 'Gain–bandwidth', value: api.gainBandwidth(v.a0, v.fh), unit: 'Hz' },
      { name: 'q', label: 'Two-pole Q', value: two.q, format: 'plain' },
      { name: 'zeta', label: 'Damping ratio ζ', value: two.zeta, format: 'plain' },
      { name: 'peaking', label: 'Peaking', value: two.peakingDb, unit: 'dB', format: 'plain' },
      {
        name: 'overshoot',
        label: 'Step overshoot',
        value: two.overshootPercent,
        unit: '%',
        format: 'plain',
      },
      {
        name: 'flat',
        label: 'Loop gain for maximal flatness',
        value: two.maximallyFlatLoopGain,
        format: 'plain',
      },
    ];
  },
};

export const FREQ_CARDS = [loopCard, compensationCard, closedFormCard];
