// Type check of the published definitions: this file must compile with tsc --noEmit.
import init, { summarizeFeedback, gainSpread, impedancesWithFeedback, topologyInfo } from 'loopwright';
import { bestPairs, integratedNoise, feedbackDistortion, Worksheet } from 'loopwright';
import type { FeedbackSummary, GainSpread, LoopwrightError, Topology, PairResult, IntegratedNoise, FeedbackDistortion } from 'loopwright';
import { stabilityMargins, closedLoopPoles, stepResponse, analyzeLoop, loopGainSweep, loopAt, dominantPoleForMargin } from 'loopwright';
import { loopGainSweepInto, closedLoopSweepInto, type SweepTarget } from 'loopwright';
import type {
  AmplifierModelInput, FeedbackInput, StabilityMargins, MarginValidity, ClosedLoopPoles, StabilityVerdict, StepResponse,
  LoopAnalysis, FrequencySweep, LoopPoint, CompensationResult,
} from 'loopwright';
import { circuitTemplate, circuitSolve, circuitTwoPort, circuitSweep, circuitBlackman, circuitStageViews } from 'loopwright';
import { stageCircuit, amplifierOpenLoop, circuitLoopGain, circuitGain, circuitImpedance, circuitPoles } from 'loopwright';
import type { StageDocument, StageCircuitResult, CircuitDocumentV2, ResponseSweep, ImpedanceSweep, CircuitPoles } from 'loopwright';
import { circuitNoise, circuitNoiseIntegral } from 'loopwright';
import type { CircuitNoiseDensities, CircuitNoiseBand } from 'loopwright';
import initLite, { closedLoopGain as liteGain, stabilityMargins as liteMargins } from 'loopwright/lite';
import type { StabilityMargins as LiteMargins } from 'loopwright/lite';
import type {
  CircuitDocument, CircuitSolution, TwoPortAnalysis, TwoPortKind, ComplexSweep, BlackmanImpedance, StageViews, Complex, CircuitError,
} from 'loopwright';

export async function run(): Promise<number> {
  await init();
  await initLite();
  const lm: LiteMargins = liteMargins({ gain: 1e5, polesHz: [10, 1e6] }, 0.01);
  const lg: number = liteGain(1e5, 0.01) + (lm.phaseMarginDeg ?? 0);
  const s: FeedbackSummary = summarizeFeedback('series-shunt', 1e5, 0.01);
  const t: Topology = s.topology;
  const ideal: number | null = s.idealGain;
  const spread: GainSpread = gainSpread(0.01, 5e4, 1e5, 2e5);
  const zin: number = impedancesWithFeedback({ topology: t, ziRe: 1e6, zoRe: 75, aRe: 1e5, betaRe: 0.01 }).input.magnitude;
  const unit: string = topologyInfo('current-shunt').gainUnit;
  try {
    summarizeFeedback('nonsense', 1, 1);
  } catch (e) {
    const err = e as LoopwrightError;
    if (err.code === 'unknown_name') return err.param.length;
  }
  const pairs: PairResult = bestPairs({ network: 'non-inverting', target: 11, series: 'E24', totalMin: 1e3, totalMax: 1e6, count: 3 });
  const r2: number = pairs.candidates[0].r2.value;
  const noise: IntegratedNoise = integratedNoise({ kind: 'inverting', rFeedback: 1e4, rGain: 1e3, voltageDensity: 4e-9, voltageCornerHz: 10, currentDensity: 1e-12, currentCornerHz: 100, gbwHz: 1e7, fLow: 10 });
  const hd: FeedbackDistortion = feedbackDistortion({ a1: 1e4, a2: 1e6, a3: -2e10, beta: 0.01, amplitude: 1, amplitudeAt: 'output' });
  const ratio: number | null = hd.hd2Ratio;
  const sheet = new Worksheet();
  const touched: string[] = sheet.setCell('A1', '=FEEDBACK.GAIN(100k; 0.01)');
  const saved: string = sheet.saveDocument();
  sheet.free();
  return lg + touched.length + saved.length + s.closedLoopGain + (ideal ?? 0) + spread.spreadPpm + zin + unit.length + r2 + noise.outputRms + (ratio ?? 0);
}

export function frequency(): number {
  const a: AmplifierModelInput = { gain: 1e5, polesHz: [1e6], complexPoles: [{ freqHz: 1e7, q: 0.7 }], delayS: 1e-9, padeOrder: 4 };
  const beta: FeedbackInput = { gain: 0.01, zerosHz: new Float64Array([1e8]) };
  const m: StabilityMargins = stabilityMargins(a, beta);
  const pm: number | null = m.phaseMarginDeg;
  const validity: MarginValidity = m.validity;
  const p: ClosedLoopPoles = closedLoopPoles(a, 0.01);
  const verdict: StabilityVerdict = p.verdict;
  const q: number | null = p.poles[0].q;
  const st: StepResponse = stepResponse(a, beta, 0.01, 100);
  const out: Float64Array = st.output;
  const an: LoopAnalysis = analyzeLoop(a, 0.01, 0.01, 100);
  const wave: number[] = an.step?.waveform.output ?? [];
  const note: string | null = an.stepNote;
  const sweep: FrequencySweep = loopGainSweep({ amplifier: a, beta, startHz: 1, stopHz: 1e9, points: 200 });
  const at: LoopPoint = loopAt(a, 0.01, 1e6);
  const comp: CompensationResult = dominantPoleForMargin({ gain: 1e5, polesHz: [1e6, 1e7] }, 1, 60);
  const target: SweepTarget = { freqHz: new Float64Array(50), magnitudeDb: new Float64Array(50), phaseDeg: new Float64Array(50) };
  const filled: SweepTarget = loopGainSweepInto({ amplifier: a, beta, startHz: 1, stopHz: 1e9 }, target);
  closedLoopSweepInto({ amplifier: a, beta, startHz: 1, stopHz: 1e9, points: 50 }, filled);
  return (pm ?? 0) + validity.length + verdict.length + (q ?? 0) + out[0] + wave.length + (note?.length ?? 0)
    + sweep.phaseDeg[0] + at.closedLoopGain.phaseDeg + comp.value + (comp.crossoverHz ?? 0);
}

export function circuits(): number {
  const doc: CircuitDocument = {
    format: 'loopwright-circuit',
    version: 1,
    elements: [
      { name: 'Vs', kind: 'voltage-source', nodes: ['top', '0'], value: 10 },
      { name: 'R1', kind: 'resistor', nodes: ['top', 'mid'], value: '1k' },
      { name: 'E', kind: 'vcvs', nodes: ['x', '0'], control: ['mid', '0'], value: 2 },
      { name: 'Y', kind: 'admittance', nodes: ['x', '0'], value: 1e-3, valueIm: '1m' },
    ],
  };
  const sol: CircuitSolution = circuitSolve(JSON.stringify(doc), 0);
  const v: number = sol.nodeVoltages[0].re;
  const template: CircuitDocument = JSON.parse(circuitTemplate({ topology: 'voltage-series', ri: 1e5, ro: 100, gain: 1e4, rf: 9e3, rg: 1e3, rs: 1e3, rl: 1e4 }));
  const tp: TwoPortAnalysis = circuitTwoPort({ topology: 'series-shunt', ri: 1e5, ro: 100, gain: 1e4, rf: 9e3, rg: 1e3, rs: 1e3, rl: 1e4 });
  const kind: TwoPortKind = tp.parameters.kind;
  const beta: Complex = tp.beta;
  const h: ComplexSweep = circuitSweep({ circuit: JSON.stringify(doc), source: 'Vs', plus: 'x', minus: '0', frequencies: new Float64Array([1, 10]) });
  const z: BlackmanImpedance = circuitBlackman({ circuit: JSON.stringify(doc), controlled: 'E', plus: 'mid', minus: '0' });
  const views: StageViews = circuitStageViews({ topology: 'series-shunt', ri: 1e5, ro: 100, gain: 1e4, rf: 9e3, rg: 1e3, rs: 1e3, rl: 1e4 });
  try {
    circuitSolve('{}', 0);
  } catch (e) {
    const err = e as CircuitError;
    if (err.code === 'out_of_domain') return err.subject.length;
  }
  return v + template.elements.length + kind.length + beta.re + h.im[0] + z.tShort.re + views.input.relativeError + tp.af.relativeError;
}

export function stages(): number {
  const doc: StageDocument = {
    format: 'loopwright-stage',
    version: 1,
    kind: 'transimpedance',
    amplifier: { a0: { typ: 1e6, min: 2e5 }, gbwHz: '20M', cd: '4p', ro: 40 },
    spreadPoint: 'typ',
    parts: { rf: '100k', cf: '1p5', cs: '20p' },
  };
  const written: StageCircuitResult = stageCircuit(doc);
  const circuit: CircuitDocumentV2 = JSON.parse(written.circuit);
  const t: ResponseSweep = circuitLoopGain({ circuit: doc, frequenciesHz: [1e3, 1e6], spreadPoint: 'min' });
  const g: ResponseSweep = circuitGain({ circuit: written.circuit, input: 'Is', output: 'out', frequenciesHz: new Float64Array([1]) });
  const z: ImpedanceSweep = circuitImpedance({ circuit: doc, port: 'input', frequenciesHz: [1e3] });
  const p: CircuitPoles = circuitPoles({ circuit: doc });
  const a: ResponseSweep = amplifierOpenLoop({ amplifier: doc.amplifier, frequenciesHz: [1] });
  return t.phaseDeg[0] + g.re[0] + z.magnitudeOhm[0] + p.poles.length + a.magnitudeDb[0] + circuit.elements.length;
}

export function noiseOfACircuit(json: string): number {
  const d: CircuitNoiseDensities = circuitNoise({ circuit: json, output: { element: 'R1' }, frequenciesHz: [1e3], currentNoise: [{ element: 'I1', shot: true }] });
  const b: CircuitNoiseBand = circuitNoiseIntegral({ circuit: json, output: 'a', bandHz: [10, 1e4], signalRms: 1 });
  return d.total[0] + (d.sources.R1?.[0] ?? 0) + (d.noiseGainPeak?.value ?? 0) + b.totalRms + (b.snrDb ?? 0) + b.sources[0].share;
}
