// Two builds of the full wasm module, timed on the same cases in one interleaved run
// (alternating calls, so both see the same machine load): the before/after figures
// of a change to the core, without building the two packages `make bench-compare`
// needs. Figures only; nothing here asserts a time.
//
// Build each checkout's module for Node (from its own directory):
//   cargo rustc --lib --crate-type cdylib --release --target wasm32-unknown-unknown \
//     --features wasm && wasm-bindgen --target nodejs --out-dir <dir> --out-name lw \
//     target/wasm32-unknown-unknown/release/loopwright.wasm
// then: node bench/pair.mjs <before dir> <after dir> [case …]
// Prints, per case: the median and the fastest call of each, and the median of
// the per-round ratios after ÷ before.

import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { join, resolve } from 'node:path';
import { SIX_NODE_STAGE, TOLERANCE_CASES } from './tolerance_cases.mjs';

const require = createRequire(import.meta.url);
const [beforeDir, afterDir, ...only] = process.argv.slice(2);
if (!beforeDir || !afterDir) {
  console.error('usage: node bench/pair.mjs <before dir> <after dir> [case …]');
  process.exit(2);
}
const mods = {
  before: require(join(resolve(beforeDir), 'lw.js')),
  after: require(join(resolve(afterDir), 'lw.js')),
};

// The circuit of bench/circuit_cases.mjs: a VCVS op-amp driving a six-section RC
// ladder, fed back from its end (11 nodes, 13 unknowns).
const ladder = (() => {
  const els = [
    { name: 'Vs', kind: 'voltage-source', nodes: ['s', '0'], value: 1 },
    { name: 'Rs', kind: 'resistor', nodes: ['s', 'in'], value: '1k' },
    { name: 'Ri', kind: 'resistor', nodes: ['in', 'fb'], value: '1M' },
    { name: 'A', kind: 'vcvs', nodes: ['a', '0'], control: ['in', 'fb'], value: 1e5 },
    { name: 'Ro', kind: 'resistor', nodes: ['a', 'n1'], value: 75 },
  ];
  for (let k = 1; k <= 6; k++) {
    els.push({ name: `R${k}`, kind: 'resistor', nodes: [`n${k}`, `n${k + 1}`], value: '1k' });
    els.push({ name: `C${k}`, kind: 'capacitor', nodes: [`n${k + 1}`, '0'], value: '1n' });
  }
  els.push({ name: 'Rf', kind: 'resistor', nodes: ['n7', 'fb'], value: '9k' });
  els.push({ name: 'Rg', kind: 'resistor', nodes: ['fb', '0'], value: '1k' });
  return JSON.stringify({ format: 'loopwright-circuit', version: 1, elements: els });
})();
const noiseJson = readFileSync(new URL('./noise_circuit_11.json', import.meta.url), 'utf8');
const freqs = new Float64Array(1000).map((_, i) => 10 ** (1 + (6 * i) / 999));
const divider = JSON.stringify(SIX_NODE_STAGE);
const CASES = {
  circuit_sweep_1000: (m) => () =>
    m.circuitSweep({ circuit: ladder, source: 'Vs', plus: 'n7', minus: '0', frequencies: freqs }),
  noise_circuit_1000: (m) => () =>
    m.circuitNoise({ circuit: noiseJson, output: 'x', frequenciesHz: freqs, inputSource: 'Vs' }),
  stage_design_rg: (m) => () =>
    m.stageDesign({ stage: divider, part: 'rg', targetPhaseMarginDeg: 60 }),
  freq_sweep_10k: (m) => () =>
    m.loopGainSweep({
      amplifier: { gain: 1e5, polesHz: [10, 1e5, 1e6, 3e6, 1e7, 3e7], zerosHz: [2e6, 5e7] },
      beta: 0.1,
      startHz: 1,
      stopHz: 1e9,
      points: 10_000,
    }),
  // The whole-stage tolerance cases (seconds a call: three rounds at the least).
  ...Object.fromEntries(TOLERANCE_CASES.map((c) => [c.key, c.make])),
};
const HEAVY = new Set(TOLERANCE_CASES.map((c) => c.key));

const median = (a) => [...a].sort((x, y) => x - y)[a.length >> 1];
const ms = (x) => `${x.toFixed(3)} ms`;
for (const [key, make] of Object.entries(CASES)) {
  if (only.length > 0 && !only.includes(key)) continue;
  const fns = { before: make(mods.before), after: make(mods.after) };
  fns.before();
  fns.after();
  const t = { before: [], after: [] };
  const t0 = performance.now();
  let rounds = 0;
  const least = HEAVY.has(key) ? 3 : 15;
  while (rounds < least || (performance.now() - t0 < 4000 && rounds < 200)) {
    for (const k of rounds % 2 ? ['after', 'before'] : ['before', 'after']) {
      const s = performance.now();
      fns[k]();
      t[k].push(performance.now() - s);
    }
    rounds++;
  }
  const ratio = median(t.after.map((a, i) => a / t.before[i]));
  console.log(
    `${key}: before ${ms(median(t.before))} (fastest ${ms(Math.min(...t.before))}), ` +
      `after ${ms(median(t.after))} (fastest ${ms(Math.min(...t.after))}), ` +
      `after ÷ before ${ratio.toFixed(2)} over ${rounds} rounds`,
  );
}
