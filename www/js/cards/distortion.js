// Calculator cards of distortion, noise and slew rate.

import { lineChart } from '../plot/chart.js';

const STAGE_KINDS = [
  ['non-inverting', 'non-inverting'],
  ['inverting', 'inverting'],
];

export const distortionCard = {
  id: 'card-distortion',
  title: 'Distortion under feedback',
  blurb:
    'A weakly nonlinear amplifier y = a1·x + a2·x² + a3·x³ inside a loop with feedback β, compared with the open loop at the same output amplitude.',
  formula:
    'D = 1 + a1·β    b1 = a1/D    b2 = a2/D³    b3 = (a3·D − 2·a2²·β)/D⁵\nHD2 ≈ |b2|·X/(2·|b1|)    HD3 ≈ |b3|·X²/(4·|b1|)  (X: input peak)',
  inputs: [
    { name: 'a1', label: 'a1 (small-signal gain)', value: '10k' },
    { name: 'a2', label: 'a2', value: '1M', unit: '1/V' },
    { name: 'a3', label: 'a3', value: '-20G', unit: '1/V²' },
    { name: 'beta', label: 'Feedback factor β', value: '0.01' },
    { name: 'amplitude', label: 'Output peak', value: '1', unit: 'V' },
  ],
  compute({ a1, a2, a3, beta, amplitude }, api) {
    const r = api.feedbackDistortion(a1, a2, a3, beta, amplitude, 'output');
    const top = r.closed.inputAmplitude * 10;
    const sweep = api.seriesValiditySweep(a1, a2, a3, beta, top / 1000, top, 60, 0.1, 256);
    const rows = [
      { name: 'd', label: 'Amount of feedback D', value: r.feedbackAmount, format: 'plain' },
      {
        name: 'hd2open',
        label: 'HD2 open / closed',
        text: `${(r.open.hd2 * 100).toPrecision(4)} % / ${(r.closed.hd2 * 100).toPrecision(4)} %`,
      },
      {
        name: 'hd3open',
        label: 'HD3 open / closed',
        text: `${(r.open.hd3 * 100).toPrecision(4)} % / ${(r.closed.hd3 * 100).toPrecision(4)} %`,
      },
      {
        name: 'hd2ratio',
        label: 'HD2 closed ÷ open',
        value: r.hd2Ratio ?? Number.NaN,
        format: 'plain',
        text: r.hd2Ratio === null ? '—' : undefined,
      },
      {
        name: 'fold',
        label: 'Loop folds at input peak',
        value: sweep.foldAmplitude ?? Number.NaN,
        unit: 'V',
        text: sweep.foldAmplitude === null ? 'beyond the sweep' : undefined,
      },
      {
        name: 'hd3ratio',
        label: 'HD3 closed ÷ open',
        value: r.hd3Ratio ?? Number.NaN,
        format: 'plain',
        text: r.hd3Ratio === null ? '—' : undefined,
      },
    ];
    const pct = (arr) => Array.from(arr, (v) => 100 * Math.abs(v));
    const svg = lineChart({
      title: 'Closed-loop HD3: series formula vs exact solution',
      x: { label: 'input peak (V)', log: true },
      y: { label: 'HD3 (%)', log: true },
      series: [
        { label: 'series', x: sweep.amplitudes, y: pct(sweep.seriesHd3), kind: 'a' },
        { label: 'exact', x: sweep.amplitudes, y: pct(sweep.numericHd3), kind: 'c' },
      ],
      markers: [
        sweep.foldAmplitude === null ? null : { x: sweep.foldAmplitude, label: 'fold' },
        sweep.hd3LimitAmplitude === null
          ? null
          : { x: sweep.hd3LimitAmplitude, label: 'series off by 10 %', align: 'left' },
      ].filter(Boolean),
    });
    return { rows, figures: [{ svg, name: 'hd3-series-vs-exact' }] };
  },
};

const noiseInputs = [
  { name: 'kind', label: 'Stage', value: 'non-inverting', choices: STAGE_KINDS },
  { name: 'r_feedback', label: 'Rf', value: '9k09', unit: 'Ω' },
  { name: 'r_gain', label: 'Rg', value: '1k', unit: 'Ω' },
  { name: 'r_plus', label: 'R at + input', value: '100', unit: 'Ω' },
  { name: 'en', label: 'Op-amp en', value: '4n', unit: 'V/√Hz' },
  { name: 'en_corner', label: 'en 1/f corner', value: '10', unit: 'Hz' },
  { name: 'in', label: 'Op-amp in', value: '1p', unit: 'A/√Hz' },
  { name: 'in_corner', label: 'in 1/f corner', value: '100', unit: 'Hz' },
  { name: 'gbw', label: 'Gain-bandwidth', value: '10M', unit: 'Hz' },
  { name: 'temperature', label: 'Temperature', value: '300', unit: 'K' },
];

export const noiseCard = {
  id: 'card-noise',
  title: 'Noise of a feedback stage',
  blurb:
    'Output and input-referred noise of an op-amp stage: amplifier en and in with 1/f corners, 4kTR of every resistor, over the closed-loop response.',
  formula:
    'noise gain NG = 1 + Rf/Rg    e_R = √(4kTR)    H(f) = 1/(1 + j·f·NG/GBW)\nv_out,rms = √∫ e_out²(f)·|H(f)|² df    single pole: NBW = π/2 · f−3dB',
  inputs: noiseInputs,
  compute(v, api) {
    const args = [
      v.kind,
      v.r_feedback,
      v.r_gain,
      v.r_plus,
      v.temperature,
      v.en,
      v.en_corner,
      v.in,
      v.in_corner,
    ];
    const at1k = api.stageNoiseContributions(...args, 1e3);
    const total = api.integratedNoise(
      ...args,
      v.gbw,
      new Float64Array(0),
      10,
      Number.POSITIVE_INFINITY,
    );
    const sweep = api.noiseDensitySweep(
      ...args,
      v.gbw,
      new Float64Array(0),
      1,
      Math.max(10, total.bandwidthHz * 30),
      200,
    );
    const nv = (x) => Array.from(x, (d) => d * 1e9);
    const svg = lineChart({
      title: 'Noise density',
      x: { label: 'frequency (Hz)', log: true },
      y: { label: 'nV/√Hz' },
      series: [
        { label: 'output', x: sweep.frequencies, y: nv(sweep.outputDensity), kind: 'a' },
        {
          label: 'input-referred',
          x: sweep.frequencies,
          y: nv(sweep.inputReferredDensity),
          kind: 'b',
        },
      ],
      markers: [{ x: total.bandwidthHz, label: '−3 dB' }],
    });
    return {
      rows: [
        { name: 'ng', label: 'Noise gain', value: at1k.noiseGain, format: 'plain' },
        {
          name: 'eout',
          label: 'Output density at 1 kHz',
          value: at1k.total * 1e9,
          unit: 'nV/√Hz',
          format: 'plain',
        },
        {
          name: 'ein',
          label: 'Input-referred at 1 kHz',
          value: at1k.inputReferred * 1e9,
          unit: 'nV/√Hz',
          format: 'plain',
        },
        { name: 'bw', label: 'Closed-loop −3 dB', value: total.bandwidthHz, unit: 'Hz' },
        { name: 'nbw', label: 'Noise bandwidth', value: total.noiseBandwidthHz, unit: 'Hz' },
        {
          name: 'rms',
          label: 'Output noise, 10 Hz up',
          value: total.outputRms * 1e6,
          unit: 'µV rms',
          format: 'plain',
        },
        {
          name: 'rmsin',
          label: 'Input-referred',
          value: total.inputReferredRms * 1e6,
          unit: 'µV rms',
          format: 'plain',
        },
      ],
      figures: [{ svg, name: 'noise-density' }],
    };
  },
};

export const slewCard = {
  id: 'card-slew',
  title: 'Slew rate and full-power bandwidth',
  blurb:
    'The highest frequency a slew-limited output reaches at full swing, and the largest undistorted swing at a frequency.',
  formula: 'f_FP = SR/(2π·V_peak)    V_peak,max = SR/(2π·f)',
  inputs: [
    { name: 'slew', label: 'Slew rate', value: '20M', unit: 'V/s' },
    { name: 'v_peak', label: 'Output peak', value: '10', unit: 'V' },
    { name: 'frequency', label: 'Signal frequency', value: '100k', unit: 'Hz' },
  ],
  compute({ slew, v_peak, frequency }, api) {
    return [
      {
        name: 'fpbw',
        label: 'Full-power bandwidth',
        value: api.fullPowerBandwidth(slew, v_peak),
        unit: 'Hz',
      },
      {
        name: 'vmax',
        label: 'Largest peak at that frequency',
        value: api.maxUndistortedAmplitude(slew, frequency),
        unit: 'V',
      },
    ];
  },
};

export const DISTORTION_CARDS = [distortionCard, noiseCard, slewCard];
