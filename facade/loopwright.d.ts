// Types of the entry module (loopwright.js): the calculator areas of lite.js, the
// circuit solver and the worksheet, declared by the generated glue
// (loopwright_glue.d.ts, with its doc comments), and every type the glue declares.
// The glue's internal functions are not exported.
export type * from './loopwright_glue.js';
export * from './lite.js';
// Declared by lite.d.ts with their options (the glue declares them without).
export { parseValue, parseList, stabilityMargins } from './lite.js';
export { default, initSync } from './loopwright_glue.js';
export {
  circuitNormalize,
  circuitTemplate,
  circuitSolve,
  circuitPortImpedance,
  circuitSweep,
  circuitTwoPort,
  circuitStageViews,
  circuitBlackman,
  circuitAsymptoticGain,
  circuitAsymptoticGainCurrent,
  stageCircuit,
  amplifierOpenLoop,
  circuitLoopGain,
  circuitGain,
  circuitImpedance,
  circuitPoles,
  circuitMargins,
  circuitNyquist,
  stageDesign,
  circuitStep,
  circuitGainWithin,
  stageDistortion,
  stageTolerance,
  circuitNoise,
  circuitNoiseIntegral,
  functionCatalog,
  errorValues,
  Worksheet,
} from './loopwright_glue.js';
