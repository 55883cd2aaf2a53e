// Type check of the published definitions: this file must compile with tsc --noEmit.
import init, { summarizeFeedback, gainSpread, impedancesWithFeedback, topologyInfo } from 'loopwright';
import { bestPairs, integratedNoise, feedbackDistortion } from 'loopwright';
import type { FeedbackSummary, GainSpread, LoopwrightError, Topology, PairResult, IntegratedNoise, FeedbackDistortion } from 'loopwright';

export async function run(): Promise<number> {
  await init();
  const s: FeedbackSummary = summarizeFeedback('series-shunt', 1e5, 0.01);
  const t: Topology = s.topology;
  const ideal: number | null = s.idealGain;
  const spread: GainSpread = gainSpread(0.01, 5e4, 1e5, 2e5);
  const zin: number = impedancesWithFeedback(t, 1e6, 0, 75, 0, 1e5, 0, 0.01, 0).input.magnitude;
  const unit: string = topologyInfo('current-shunt').gainUnit;
  try {
    summarizeFeedback('nonsense', 1, 1);
  } catch (e) {
    const err = e as LoopwrightError;
    if (err.code === 'unknown_name') return err.param.length;
  }
  const pairs: PairResult = bestPairs('non-inverting', 11, 'E24', 1e3, 1e6, undefined, undefined, 'none', 3);
  const r2: number = pairs.candidates[0].r2.value;
  const noise: IntegratedNoise = integratedNoise('inverting', 1e4, 1e3, 0, 300, 4e-9, 10, 1e-12, 100, 1e7, new Float64Array(0), 10, Infinity);
  const hd: FeedbackDistortion = feedbackDistortion(1e4, 1e6, -2e10, 0.01, 1, 'output');
  const ratio: number | null = hd.hd2Ratio;
  return s.closedLoopGain + (ideal ?? 0) + spread.spreadPpm + zin + unit.length + r2 + noise.outputRms + (ratio ?? 0);
}
