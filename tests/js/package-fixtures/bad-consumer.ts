// Must FAIL the type check: a result field that does not exist, and a string where
// a number belongs. If tsc accepts this, the definitions are too loose (e.g. `any`).
import { summarizeFeedback } from 'loopwright';

const s = summarizeFeedback('series-shunt', 1e5, 0.01);
const wrong: string = s.closedLoopGain;
const missing: number = s.bandwidth;
export { wrong, missing };
