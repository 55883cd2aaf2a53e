// Benchmark cases of the stage area, in the form of bench/cases.mjs (spread into
// CASES there). The targets: loop gain at 1 000 frequencies plus the margins
// of a stage in under 3 ms; each design helper under 50 ms.
//
// The stages: the transimpedance front end of benches/core.rs (a 20 MHz amplifier
// with a further pole at 80 MHz, input capacitances and Ro = 40 Ω; Rf = 100 kΩ ‖
// 1.5 pF, a 20 pF photodiode, 20 Ω into 2 kΩ ‖ 1 nF), and the same amplifier as a
// non-inverting gain of 2 for the β helper.

/** The amplifier of these stages (also the six-node stage of bench/tolerance_cases.mjs). */
export const BENCH_AMPLIFIER = {
  a0: 1e6,
  gbwHz: 2e7,
  polesHz: [8e7],
  rd: 1e12,
  cd: 4e-12,
  rcm: 1e12,
  ccm: 3e-12,
  ro: 40,
};
const stage = (kind, parts) =>
  JSON.stringify({
    format: 'loopwright-stage',
    version: 1,
    kind,
    amplifier: BENCH_AMPLIFIER,
    parts,
  });
const TIA = stage('transimpedance', {
  rf: 1e5,
  cf: 1.5e-12,
  cs: 20e-12,
  rs: 1e9,
  rl: 2e3,
  cl: 1e-9,
  riso: 20,
});
const DIVIDER = stage('non-inverting', { rf: 1e5, rg: 1e5, rs: 1e9, rl: 2e3, cl: 1e-9, riso: 20 });

export const STAGE_CASES = [
  {
    key: 'stage_loop_gain_margins',
    area: 'stage',
    what: 'loop gain of a transimpedance stage at 1 000 frequencies + its margins (circuitLoopGain, circuitMargins)',
    make: (lw) => {
      const freqs = new Float64Array(1000).map((_, i) => 10 ** ((9 * i) / 999));
      return () => [
        lw.circuitLoopGain({ circuit: TIA, frequenciesHz: freqs }),
        lw.circuitMargins({ circuit: TIA }),
      ];
    },
    target: '< 3 ms',
  },
  {
    key: 'stage_design_rg',
    area: 'stage',
    what: 'design helper: largest β for 60° phase margin (stageDesign, part "rg")',
    make: (lw) => () => lw.stageDesign({ stage: DIVIDER, part: 'rg', targetPhaseMarginDeg: 60 }),
    heavy: true,
    target: '< 50 ms',
  },
];
