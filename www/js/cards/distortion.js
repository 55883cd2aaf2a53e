// Calculator cards of distortion, noise and slew rate.

import { formatEngineering, formatPlain } from '../format.js';
import { lineChart } from '../plot/chart.js';
import { tickLabel } from '../plot/scale.js';

const STAGE_KINDS = [
  ['non-inverting', 'non-inverting'],
  ['inverting', 'inverting'],
];

export const distortionCard = {
  id: 'card-distortion',
  title: 'Distortion under feedback',
  blurb:
    'A weakly nonlinear amplifier y = a1·x + a2·x² + a3·x³ after a dominant pole, inside a loop with feedback β, compared with the open loop at the same output amplitude. The loop corrects each harmonic with its loop gain at that harmonic: above the pole far less than at DC.',
  formula:
    'T(f) = a1·β/(1 + j·f/fp)    HD2 ≈ |a2|·V/(2·|a1|·|1 + T(2f)|)\nHD3 ≈ V²·|a3/4 − a2²·β·L(2f)/(2·(1 + T(2f)))|/(|a1|·|1 + T(3f)|)    V = Y/|a1|, L = T/(a1·β)',
  inputs: [
    { name: 'a1', label: 'a1 (small-signal gain)', value: '10k' },
    { name: 'a2', label: 'a2', value: '1M', unit: '1/V' },
    { name: 'a3', label: 'a3', value: '-20G', unit: '1/V²' },
    { name: 'beta', label: 'Feedback factor β', value: '0.01' },
    { name: 'amplitude', label: 'Output peak', value: '1', unit: 'V' },
    {
      name: 'pole',
      field: 'poleHz',
      label: 'Dominant pole of the amplifier',
      value: '100',
      unit: 'Hz',
    },
    { name: 'frequency', field: 'frequencyHz', label: 'Signal frequency', value: '1k', unit: 'Hz' },
  ],
  compute({ a1, a2, a3, beta, amplitude, pole, frequency }, api) {
    const r = api.distortionAtFrequency({
      a1,
      a2,
      a3,
      beta,
      amplitude,
      amplitudeAt: 'output',
      poleHz: pole,
      frequencyHz: frequency,
    });
    const top = r.closed.inputAmplitude * 10;
    const sweep = api.seriesValiditySweep({
      a1,
      a2,
      a3,
      beta,
      amplitudeMin: top / 1000,
      amplitudeMax: top,
      points: 60,
      tolerance: 0.1,
      samples: 256,
    });
    const gain = (g) => `${formatPlain(g.magnitude)} ∠ ${g.phaseDeg.toFixed(1)}°`;
    const pcts = (x, y) => `${(x * 100).toPrecision(4)} % / ${(y * 100).toPrecision(4)} %`;
    const rows = [
      { name: 't0', label: 'Loop gain at DC', value: r.dcLoopGain, format: 'plain' },
      { name: 't1', label: 'Loop gain used at f', text: gain(r.loopGains[0]) },
      {
        name: 't23',
        label: 'at 2f / 3f',
        text: `${gain(r.loopGains[1])} / ${gain(r.loopGains[2])}`,
      },
      { name: 'hd2open', label: 'HD2 open / closed', text: pcts(r.open.hd2, r.closed.hd2) },
      { name: 'hd3open', label: 'HD3 open / closed', text: pcts(r.open.hd3, r.closed.hd3) },
      {
        name: 'dc',
        label: 'Closed HD2 / HD3 with the DC loop gain',
        text: pcts(r.closedAtDc.hd2, r.closedAtDc.hd3),
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
        label: 'Static loop folds at input peak',
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
      title: 'Closed-loop HD3 at DC: series formula vs exact solution',
      x: { label: 'input peak (V)', log: true },
      y: { label: 'HD3 (%)', log: true },
      series: [
        { label: 'series', x: sweep.amplitudes, y: pct(sweep.seriesHd3), kind: 'a' },
        {
          label: 'exact',
          x: sweep.amplitudes,
          y: pct(sweep.numericHd3),
          kind: 'c',
          // The core's rounding floor of the numeric path, in % like the axis.
          floor: 100 * sweep.numericFloor,
        },
      ],
      note: `exact: values under ${tickLabel(100 * sweep.numericFloor, true)} % are rounding noise, not drawn`,
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
  { name: 'en', field: 'voltageDensity', label: 'Op-amp en', value: '4n', unit: 'V/√Hz' },
  { name: 'en_corner', field: 'voltageCornerHz', label: 'en 1/f corner', value: '10', unit: 'Hz' },
  { name: 'in', field: 'currentDensity', label: 'Op-amp in', value: '1p', unit: 'A/√Hz' },
  { name: 'in_corner', field: 'currentCornerHz', label: 'in 1/f corner', value: '100', unit: 'Hz' },
  { name: 'gbw', field: 'gbwHz', label: 'Gain-bandwidth', value: '10M', unit: 'Hz' },
  { name: 'temperature', field: 'temperatureK', label: 'Temperature', value: '300', unit: 'K' },
  { name: 'f_low', label: 'Band from', value: '10', unit: 'Hz' },
  { name: 'f_high', label: 'Band to (empty: no upper edge)', value: '', list: true, unit: 'Hz' },
];

export const noiseCard = {
  id: 'card-noise',
  title: 'Noise of a feedback stage',
  blurb:
    'Output and input-referred noise of an op-amp stage: amplifier en and in with 1/f corners, 4kTR of every resistor, over the closed-loop response.',
  formula:
    'noise gain NG = 1 + Rf/Rg    e_R = √(4kTR)    H(f) = 1/(1 + j·f·NG/GBW)\nv_out,rms = √∫ e_out²(f)·|H(f)|² df from f_low to f_high    NBW = ∫ |H(f)|² df over the same band (single pole, 0 … ∞: π/2 · f−3dB)',
  inputs: noiseInputs,
  compute(v, api) {
    if (v.f_high.length > 1) throw new Error('give one upper band edge, or none');
    const stage = {
      kind: v.kind,
      rFeedback: v.r_feedback,
      rGain: v.r_gain,
      rPlus: v.r_plus,
      temperatureK: v.temperature,
      voltageDensity: v.en,
      voltageCornerHz: v.en_corner,
      currentDensity: v.in,
      currentCornerHz: v.in_corner,
    };
    const at1k = api.stageNoiseContributions({ ...stage, frequencyHz: 1e3 });
    const total = api.integratedNoise({
      ...stage,
      gbwHz: v.gbw,
      fLow: v.f_low,
      fHigh: v.f_high[0],
    });
    const top = total.fHigh ?? total.bandwidthHz * 30;
    const sweep = api.noiseDensitySweep({
      ...stage,
      gbwHz: v.gbw,
      fStart: Math.min(1, v.f_low > 0 ? v.f_low : 1),
      fStop: Math.max(10, top, total.bandwidthHz * 3),
      points: 200,
    });
    const band =
      total.fHigh === null
        ? `${formatEngineering(total.fLow)}Hz up`
        : `${formatEngineering(total.fLow)}Hz … ${formatEngineering(total.fHigh)}Hz`;
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
      markers: [
        { x: total.bandwidthHz, label: '−3 dB' },
        ...(total.fHigh === null ? [] : [{ x: total.fHigh, label: 'band top', align: 'left' }]),
      ],
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
        {
          name: 'nbw',
          label: 'Noise bandwidth of the band',
          value: total.noiseBandwidthHz,
          unit: 'Hz',
        },
        {
          name: 'rms',
          label: `Output noise, ${band}`,
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
