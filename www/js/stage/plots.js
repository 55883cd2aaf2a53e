// The stage view's plots, drawn by the page's chart code (plot/chart.js) with its
// markers (plot/markers.js): margins as shaded bands with brackets, the final
// value as a tab, the −1 point as a ring.

import { lineChart } from '../plot/chart.js';
import { nyquistChart } from '../plot/nyquist.js';
import { formatEngineering, formatPlain } from '../format.js';

const FREQ = { label: 'frequency (Hz)', log: true };

function loopPlots(r) {
  const m = r.margins;
  const magMarkers = [{ y: 0, label: '0 dB' }];
  if (m.crossoverHz !== null)
    magMarkers.push({
      x: m.crossoverHz,
      label: `crossover ${formatEngineering(m.crossoverHz, 4, 'Hz')}`,
      align: 'left',
    });
  if (m.phaseCrossoverHz !== null && m.gainMarginDb !== null)
    magMarkers.push({
      kind: 'margin',
      x: m.phaseCrossoverHz,
      y0: 0,
      y1: -m.gainMarginDb,
      label: `GM ${formatPlain(m.gainMarginDb, 3, 'dB')}`,
    });
  const phaseMarkers = [];
  if (r.phaseAtCrossover !== null && m.phaseMarginDeg !== null) {
    const at = r.phaseAtCrossover;
    const ref = 360 * Math.round((at - 180) / 360) + 180;
    phaseMarkers.push({ y: ref, label: `${formatPlain(ref, 4, '°')}` });
    phaseMarkers.push({
      kind: 'margin',
      x: m.crossoverHz,
      y0: ref,
      y1: at,
      label: `PM ${formatPlain(m.phaseMarginDeg, 3, '°')}`,
    });
  }
  return [
    {
      name: 'loop-gain-magnitude',
      svg: lineChart({
        title: 'Loop gain |T|',
        x: FREQ,
        y: { label: 'dB' },
        series: [{ label: '|T|', x: r.loop.freqHz, y: r.loop.magnitudeDb, kind: 'a' }],
        markers: magMarkers,
      }),
    },
    {
      name: 'loop-gain-phase',
      svg: lineChart({
        title: 'Loop gain phase ∠T',
        x: FREQ,
        y: { label: 'degrees' },
        series: [{ label: '∠T', x: r.loop.freqHz, y: r.loop.phaseDeg, kind: 'b' }],
        markers: phaseMarkers,
      }),
    },
  ];
}

function gainPlot(r) {
  const markers = [];
  if (!r.within.error && r.within.status === 'leaves')
    markers.push({
      x: r.within.limitHz,
      label: `within tolerance to ${formatEngineering(r.within.limitHz, 4, 'Hz')}`,
      align: 'left',
    });
  return {
    name: 'closed-loop-gain',
    svg: lineChart({
      title: `Closed-loop gain |Af| (${r.circuit.gainUnit})`,
      x: FREQ,
      y: { label: 'dB' },
      series: [{ label: '|Af|', x: r.gain.freqHz, y: r.gain.magnitudeDb, kind: 'a' }],
      markers,
    }),
  };
}

function impedancePlot(r) {
  const series = [];
  if (!r.zin.error)
    series.push({ label: '|Zin|', x: r.zin.freqHz, y: r.zin.magnitudeOhm, kind: 'a' });
  if (!r.zout.error)
    series.push({ label: '|Zout|', x: r.zout.freqHz, y: r.zout.magnitudeOhm, kind: 'b' });
  if (series.length === 0) return null;
  return {
    name: 'impedances',
    svg: lineChart({
      title: 'Input and output impedance',
      x: FREQ,
      y: { label: 'Ω', log: true },
      series,
    }),
  };
}

function stepPlot(r) {
  if (r.step.error) return null;
  return {
    name: 'step-response',
    svg: lineChart({
      title: 'Step response (unit step at the source)',
      x: { label: 'time (s)' },
      y: { label: `output (${r.circuit.gainUnit.split('/')[0]})` },
      series: [{ label: 'output', x: r.step.timeS, y: r.step.output, kind: 'a' }],
      markers: [
        {
          kind: 'level',
          y: r.step.finalValue,
          label: `final ${formatPlain(r.step.finalValue, 4)}`,
        },
      ],
    }),
  };
}

/** The largest contributors of the noise (at most four) and the total. */
function noisePlot(r) {
  if (r.noise.error) return null;
  const d = r.noise;
  const names = Object.keys(d.sources);
  const mid = Math.floor(d.frequenciesHz.length / 2);
  const ranked = names.sort((a, b) => d.sources[b][mid] - d.sources[a][mid]).slice(0, 3);
  const kinds = ['b', 'c', 'd'];
  const series = [
    { label: 'total', x: d.frequenciesHz, y: d.total, kind: 'a' },
    ...ranked.map((name, i) => ({
      label: name,
      x: d.frequenciesHz,
      y: d.sources[name],
      kind: kinds[i],
    })),
  ];
  const markers = [];
  if (!r.noiseBand.error)
    markers.push(
      { x: r.noiseBand.bandHz[0], label: 'band', align: 'right' },
      { x: r.noiseBand.bandHz[1], label: 'band', align: 'left' },
    );
  return {
    name: 'noise-density',
    svg: lineChart({
      title: 'Output noise density and its largest sources',
      x: FREQ,
      y: { label: 'V/√Hz', log: true },
      series,
      markers,
    }),
  };
}

function nyquistPlot(r) {
  if (r.nyquist.error) return null;
  const e = r.nyquist.encirclements;
  // The curve through the page's compressed Nyquist plot (plot/nyquist.js): the far
  // part and the neighbourhood of −1 both readable; N, P, Z and the least |1 + T|
  // are the core's (circuitNyquist).
  return {
    name: 'nyquist',
    svg: nyquistChart({
      title: `Nyquist: N = ${e.clockwise}, P = ${e.openLoopRhpPoles}, Z = ${e.closedLoopRhpPoles} (${e.verdict})`,
      curve: r.nyquist.curve,
      note: `Least |1 + T| = ${formatPlain(r.nyquist.leastDistance.distance, 3)} at ${formatEngineering(r.nyquist.leastDistance.freqHz, 3, 'Hz')}.`,
    }),
  };
}

/** Every plot of the analyses `r`, as `{name, svg}`. */
export function stagePlots(r) {
  return [
    ...loopPlots(r),
    gainPlot(r),
    impedancePlot(r),
    stepPlot(r),
    noisePlot(r),
    nyquistPlot(r),
  ].filter(Boolean);
}
