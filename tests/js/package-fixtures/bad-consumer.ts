// Must FAIL the type check: result fields that do not exist, and a string where
// a number belongs. If tsc accepts this, the definitions are too loose (e.g. `any`).
import { summarizeFeedback } from 'loopwright';

const s = summarizeFeedback('series-shunt', 1e5, 0.01);
const wrong: string = s.closedLoopGain;
const missing: number = s.bandwidth;
import { monteCarlo } from 'loopwright';
const mc = monteCarlo({ stage: 'inverting', r1: 1e4, r2: 4.7e4, tolR1: 0.01, tolR2: 0.01, aMin: 5e4, aTyp: 1e5, aMax: 2e5, ri: 1e6, ro: 75, poleHz: 5, trials: 1000, seed: 7 });
const notThere: number = mc.stats.median;
import { closedLoopBandwidth, circuitTwoPort } from 'loopwright';
const bw = closedLoopBandwidth({ gain: 1e5, polesHz: [10] }, 0.01);
const cutoff: number = bw.cutoffHz;
const tp = circuitTwoPort({ topology: 'series-shunt', ri: 1e5, ro: 100, gain: 1e4, rf: 9e3, rg: 1e3, rs: 1e3, rl: 1e4 });
const loopGainRe: number = tp.loopGainRe;
import { loopGainSweep, takeError } from 'loopwright';
const sweep = loopGainSweep({ amplifier: { gain: 1e5 }, beta: 0.01, startHz: 1, stopHz: 10, polez: 3 });
const taken = takeError();
import { loopGainSweepInto } from 'loopwright';
const intoPlain = loopGainSweepInto(
  { amplifier: { gain: 1e5 }, beta: 0.01, startHz: 1, stopHz: 10 },
  { freqHz: new Float64Array(2), magnitudeDb: [0, 0], phaseDeg: new Float64Array(2) },
);
export { wrong, missing, notThere, cutoff, loopGainRe, sweep, taken, intoPlain };
