// Type check of the published definitions: this file must compile with tsc --noEmit.
import init, { summarizeFeedback, gainSpread, impedancesWithFeedback, topologyInfo } from 'loopwright';
import type { FeedbackSummary, GainSpread, LoopwrightError, Topology } from 'loopwright';

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
  return s.closedLoopGain + (ideal ?? 0) + spread.spreadPpm + zin + unit.length;
}
