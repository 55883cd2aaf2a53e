// Times the network area's wasm build under Node: Monte Carlo of the closed-loop
// gain (1 000 000 trials, two 1 % resistors uniform, A uniform over 50 k … 200 k,
// all statistics, percentiles and a 50-bin histogram) and the E192 best-pair
// search over three decades (1 kΩ … 1 MΩ total). Prints the median of repeated runs.
import { createRequire } from "node:module";
import { performance } from "node:perf_hooks";
import path from "node:path";

const require = createRequire(import.meta.url);
const lw = require(path.resolve(process.argv[2] ?? "target/bench-network/loopwright.js"));

function median(xs) {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

function timeIt(fn, runs) {
  fn(); // warm-up
  const t = [];
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    fn();
    t.push(performance.now() - t0);
  }
  return median(t);
}

const mc = (trials) =>
  lw.monteCarlo("inverting", 10e3, 47e3, 0.01, 0.01, 5e4, 1e5, 2e5, 1e6, 75, 5,
    "uniform", 3, "uniform", 3, "gain", trials, 42, -4.72, -4.68, 50);
const r = mc(1_000_000);
const mcMs = timeIt(() => mc(1_000_000), 7);
console.log(`wasm  Monte Carlo 1e6 trials: ${mcMs.toFixed(1)} ms  (mean ${r.stats.mean.toFixed(6)}, sd ${r.stats.sd.toExponential(4)}, yield ${r.stats.yieldFraction.toFixed(4)})`);

const pairs = () => lw.bestPairs("non-inverting", 7.77, "E192", 1e3, 1e6, undefined, undefined, "none", 10);
const best = pairs().candidates[0];
const batch = 200;
const pairMs = timeIt(() => { for (let i = 0; i < batch; i++) pairs(); }, 5) / batch;
console.log(`wasm  best pairs E192, 3 decades: ${pairMs.toFixed(3)} ms  (best ${best.r1} / ${best.r2.value}, error ${best.error.toExponential(3)})`);
