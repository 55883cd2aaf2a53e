// Types of lite.js: the functions of the calculator areas, declared by the generated
// glue (loopwright_glue.d.ts, with its doc comments; scripts/build-wasm.sh writes its
// parameter names in camelCase), and every type the glue declares. The glue's internal
// functions (takeError, topologyIndex, summarizeFeedbackPacked, feedbackLabels,
// scratchView, sweepHeld, heldSweepView) are not exported by lite.js, so not here
// either.
export type * from './loopwright_glue.js';
export { default, initSync } from './loopwright_glue.js';
export {
  closedLoopGain,
  loopGain,
  feedbackAmount,
  feedbackAmountDb,
  gainSensitivity,
  betaForGain,
  minOpenLoopGain,
  idealBeta,
  loopPhasors,
  impedancesWithFeedback,
  maxClosedLoopGain,
  gainSpread,
  topologyInfo,
  summarizeFeedback,
  loopGainSweep,
  closedLoopSweep,
  loopAt,
  closedLoopPoles,
  closedLoopTransfer,
  closedLoopBandwidth,
  stepResponse,
  analyzeLoop,
  stepWaveform,
  dominantPoleForMargin,
  maxBetaForMargin,
  twoPoleResponse,
  singlePoleHighCutoff,
  singlePoleLowCutoff,
  gainBandwidth,
  seriesValues,
  standardValue,
  standardNeighbours,
  seriesTolerance,
  readValue,
  formatValue,
  formatFull,
  formatPlain,
  formatSi,
  letterCode,
  bestPairs,
  chooseParts,
  singleResistor,
  worstCase,
  monteCarlo,
  thermalNoiseDensity,
  thermalNoiseCurrentDensity,
  stageNoiseContributions,
  integratedNoise,
  noiseDensitySweep,
  closedLoopSeries,
  seriesFromDistortion,
  distortionAtFrequency,
  harmonicDistortion,
  feedbackDistortion,
  closedLoopSpectrum,
  seriesCheck,
  seriesValiditySweep,
  fullPowerBandwidth,
  maxUndistortedAmplitude,
  requiredSlewRate,
  version,
} from './loopwright_glue.js';

/** What a context allows when reading a typed value (docs/notation.md). */
export interface ReadOptions {
  /** A trailing % (÷ 100) is allowed. Default false. */
  percent?: boolean;
  /** dB is allowed (a level). Default false. */
  decibels?: boolean;
  /** The declared unit (Ω, V, A, W, S, Hz, F, H, s, dB): another written unit is refused. Default none. */
  unit?: string | null;
}
/** The caller's arrays a sweep is written into: three Float64Arrays of one length that do not overlap. */
export interface SweepTarget {
  freqHz: Float64Array;
  magnitudeDb: Float64Array;
  phaseDeg: Float64Array;
}
/**
 * `loopGainSweep` written into the caller's arrays instead of three new ones (for
 * repeated sweeps: nothing is allocated per call); `points` may be left out and is
 * then their length, and must equal it when given. Returns `into`. On an error the
 * arrays are left as they were.
 */
export function loopGainSweepInto(
  options: import('./loopwright_glue.js').SweepOptions,
  into: SweepTarget,
): SweepTarget;
/** `closedLoopSweep` written into the caller's arrays, as `loopGainSweepInto`. */
export function closedLoopSweepInto(
  options: import('./loopwright_glue.js').SweepOptions,
  into: SweepTarget,
): SweepTarget;
/** Read one typed value: `4k7`, `4.7 kΩ`, `100nF`, `R47`; throws a LoopwrightError (code "syntax", with `column`). */
export function parseValue(text: string, options?: ReadOptions): number;
/** Read a list of values separated by `,` or `;`. */
export function parseList(text: string, options?: ReadOptions): Float64Array;
/** The closed-loop output y solving y = A(x − β·y) at input x (A a power series a1, a2, a3). */
export function closedLoopOutput(options: {
  a1: number;
  a2: number;
  a3: number;
  beta: number;
  /** Input amplitude. */
  x: number;
}): number;
/**
 * Stability margins (see StabilityMargins); with `{ closedLoopPoles: true }` the result
 * also carries the closed-loop poles that sign the margins, computed once for both.
 */
export function stabilityMargins(
  amplifier: import('./loopwright_glue.js').AmplifierModelInput,
  beta: import('./loopwright_glue.js').FeedbackInput,
  options?: import('./loopwright_glue.js').MarginOptions,
): import('./loopwright_glue.js').StabilityMargins;
