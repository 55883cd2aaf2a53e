// Benchmark cases of whole-stage tolerance (src/tolerance; docs/tolerance.md), in
// the form of bench/cases.mjs (spread into CASES there). The targets:
// 10 000 Monte Carlo trials of a stage's phase margin in under 2 s in wasm, and
// 100 000 trials of its gain at one frequency in under 1 s, beside numpy doing
// the same draws and figures (bench/peers.py, the same stages).
//
// Gain: the gain-48 stage (Rf 47k, Rg 1k, uniform ±1 %; A0 5e4/2e5/1e6; GBW
// 10 MHz), |H| in dB at 1 kHz. Phase margin: Rf = Rg = 1k uniform ±1 %, A0 as
// above, GBW 7/10/13 MHz, a second pole at 8 MHz (the "margin2" stage of
// tests/reference/tolerance_stage.py, the stage the reference checks).
// The third case is the largest stage document: the stage of benches/core.rs
// (all six nodes, amplifier input capacitances, Ro, Riso into Rl ‖ Cl) with six
// parts and the GBW spread. The fourth is the 11-node case, a circuit
// document (bench/tolerance_circuit_11.json): 11 nodes besides ground (s, in,
// fb, n1 … n8): Vs and Rs into the non-inverting input, U1 (A0 5e4/2e5/1e6, GBW
// 7/10/13 MHz, a second pole at 50 MHz, Ro 50 Ω) with Rf ‖ Cf and Rg, and its
// output driving Riso into a six-section RC ladder (10 Ω, 1 nF) inside the loop
// through Ro; all 17 passive parts uniform ±1 %.

import { readFileSync } from 'node:fs';
import { BENCH_AMPLIFIER } from './stage_cases.mjs';

const circuit11 = readFileSync(new URL('./tolerance_circuit_11.json', import.meta.url), 'utf8');
const amplifier = (extra) => ({ a0: { min: 5e4, typ: 2e5, max: 1e6 }, gbwHz: 1e7, ...extra });
const uniform = (part) => ({ part, tolerance: { distribution: 'uniform', percent: 1 } });

// The stage of benches/core.rs (20 MHz amplifier, a pole at 80 MHz, input
// capacitances, Ro = 40 Ω) as a non-inverting gain of 2 into 2 kΩ ‖ 1 nF via 20 Ω:
// all six nodes a stage document has (bench/pair.mjs times it too).
export const SIX_NODE_STAGE = {
  format: 'loopwright-stage',
  version: 1,
  kind: 'non-inverting',
  amplifier: BENCH_AMPLIFIER,
  parts: { rf: 1e5, rg: 1e5, rs: 1e9, rl: 2e3, cl: 1e-9, riso: 20 },
};

export const TOLERANCE_CASES = [
  {
    key: 'tolerance_gain_1e5',
    area: 'tolerance',
    what: 'stage Monte Carlo, 100 000 trials of the gain at 1 kHz (stageTolerance), stats and yield',
    heavy: true,
    make: (lw) => () =>
      lw.stageTolerance({
        stage: {
          format: 'loopwright-stage',
          version: 1,
          kind: 'non-inverting',
          amplifier: amplifier({}),
          parts: { rf: 47e3, rg: 1e3 },
        },
        parts: [uniform('rf'), uniform('rg')],
        spec: [{ figure: 'gainDb', freqHz: 1e3, lower: 33.58, upper: 33.67 }],
        analyses: ['monteCarlo'],
        trials: 100_000,
        keepFailures: 0,
      }),
    python: true,
    pythonLabel: 'numpy, vectorised closed form',
    target: '< 1 s',
  },
  {
    key: 'tolerance_pm_1e4',
    area: 'tolerance',
    what: 'stage Monte Carlo, 10 000 trials of the phase margin (stageTolerance)',
    heavy: true,
    make: (lw) => () =>
      lw.stageTolerance({
        stage: {
          format: 'loopwright-stage',
          version: 1,
          kind: 'non-inverting',
          amplifier: amplifier({ polesHz: [8e6] }),
          parts: { rf: 1e3, rg: 1e3 },
        },
        parts: [uniform('rf'), uniform('rg')],
        amplifierSpread: { gbwHz: { min: 7e6, typ: 1e7, max: 1.3e7 } },
        spec: [{ figure: 'phaseMarginDeg', lower: 61 }],
        analyses: ['monteCarlo'],
        trials: 10_000,
        keepFailures: 0,
      }),
    python: true,
    pythonLabel: 'numpy + scipy brentq per trial (closed-form loop gain)',
    target: '< 2 s',
  },
  {
    key: 'tolerance_pm_6node_1e4',
    area: 'tolerance',
    what: 'stage Monte Carlo, 10 000 trials of the phase margin of a six-node stage, six parts ±1 % and the GBW (stageTolerance)',
    heavy: true,
    make: (lw) => () =>
      lw.stageTolerance({
        stage: SIX_NODE_STAGE,
        parts: ['rf', 'rg', 'rs', 'rl', 'cl', 'riso'].map(uniform),
        amplifierSpread: { gbwHz: { min: 1.4e7, typ: 2e7, max: 2.6e7 } },
        spec: [{ figure: 'phaseMarginDeg', lower: 30 }],
        analyses: ['monteCarlo'],
        trials: 10_000,
        keepFailures: 0,
      }),
    target: '< 2 s',
  },
  {
    key: 'tolerance_pm_11node_1e4',
    area: 'tolerance',
    what: 'circuit Monte Carlo, 10 000 trials of the phase margin of an 11-node circuit, 17 parts ±1 %, A0 and GBW (stageTolerance)',
    heavy: true,
    make: (lw) => () =>
      lw.stageTolerance({
        circuit: circuit11,
        input: 'Vs',
        output: 'n8',
        amplifierSpread: { gbwHz: { min: 7e6, typ: 1e7, max: 1.3e7 } },
        spec: [{ figure: 'phaseMarginDeg', lower: 65.5 }],
        analyses: ['monteCarlo'],
        trials: 10_000,
        keepFailures: 0,
      }),
    python: true,
    pythonLabel: 'numpy, batched nodal solves + vectorised bisection',
    target: '< 2 s',
  },
];
