// Frequency-response benchmark (issue: 10 000-point loop-gain sweep of a 6-pole,
// 2-zero model in under 1 ms; margins and closed-loop poles in under 0.2 ms, in
// wasm under Node), printed beside python-control doing the same work in the same
// run. Figures only; nothing asserts a time.
//
//   node bench/freq.mjs --module <path to the wasm-bindgen Node bindings> [--quick]
//
// The bindings come from the release cdylib, e.g.
//   cargo rustc --lib --crate-type cdylib --target wasm32-unknown-unknown --features wasm --release
//   wasm-bindgen --target nodejs --out-dir target/bench-node target/wasm32-unknown-unknown/release/loopwright.wasm
//   node bench/freq.mjs --module target/bench-node/loopwright.js
// (an ES module such as pkg/node.mjs works too).

import { execFileSync } from 'node:child_process';
import { createRequire } from 'node:module';
import { performance } from 'node:perf_hooks';
import { join, dirname, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const args = process.argv.slice(2);
const quick = args.includes('--quick');
const modPath = args[args.indexOf('--module') + 1];
if (!args.includes('--module') || !modPath) {
  console.error('usage: node bench/freq.mjs --module <wasm-bindgen Node bindings> [--quick]');
  process.exit(2);
}
const full = resolve(modPath);
const lw = full.endsWith('.mjs') ? await import(pathToFileURL(full).href) : createRequire(import.meta.url)(full);

// The loop of bench/freq_peers.py.
const A = { gain: 1e5, polesHz: [10, 1e5, 1e6, 3e6, 1e7, 3e7], zerosHz: [2e6, 5e7] };
const BETA = 0.1;

function median(fn) {
  const samples = quick ? 3 : 15;
  let batch = 1;
  for (;;) {
    const t0 = performance.now();
    for (let i = 0; i < batch; i++) fn();
    const dt = performance.now() - t0;
    if (dt >= (quick ? 2 : 20) || batch > 1 << 20) break;
    batch *= 2;
  }
  const times = [];
  for (let s = 0; s < samples; s++) {
    const t0 = performance.now();
    for (let i = 0; i < batch; i++) fn();
    times.push((performance.now() - t0) / batch);
  }
  times.sort((a, b) => a - b);
  return times[Math.floor(samples / 2)];
}

const cases = [
  ['freq_sweep_10k', '10 000-point loop-gain sweep (dB, continuous phase)', () => lw.loopGainSweep(A, BETA, 1, 1e9, 10_000), '< 1 ms'],
  ['freq_margins_poles', 'margins (every crossing refined) + closed-loop poles', () => { lw.stabilityMargins(A, BETA); lw.closedLoopPoles(A, BETA); }, '< 0.2 ms'],
];

let peers = {};
try {
  const py = join(process.env.HOME ?? '', '.cache', 'loopwright', 'venv', 'bin', 'python');
  peers = JSON.parse(execFileSync(py, [join(root, 'bench', 'freq_peers.py'), ...(quick ? ['--quick'] : [])], { encoding: 'utf8' }));
} catch (err) {
  console.log(`python-control peers not run: ${err.message.split('\n')[0]}`);
}

console.log('| case | loopwright (wasm, Node) | python-control | ratio | target |');
console.log('|---|---|---|---|---|');
for (const [key, what, fn, target] of cases) {
  const ours = median(fn);
  const theirs = peers[key] !== undefined ? peers[key] / 1e6 : NaN;
  const ratio = Number.isFinite(theirs) ? (ours / theirs).toFixed(3) : '—';
  console.log(`| ${what} | ${ours.toFixed(3)} ms | ${Number.isFinite(theirs) ? theirs.toFixed(3) + ' ms' : '—'} | ${ratio} | ${target} |`);
}
