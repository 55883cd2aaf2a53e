// Compares builds of the lite module (feature `wasm-lite`) on the bench cases it can
// run: each directory is a wasm-bindgen output with the lite facade beside the glue
// (what scripts/build-wasm.sh writes to <out>/lite). The builds are sampled in turn
// (A, B, A, B, …), so the ratio is not skewed by the shared machine's load.
// Figures only; nothing here asserts a time.
// Usage: node bench/lite.mjs <baseline dir> <candidate dir> [runs]
//   e.g. node bench/lite.mjs /tmp/lite-before www/pkg/lite 3

import { readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { gzipSync } from 'node:zlib';
import { CASES } from './cases.mjs';
import { formatNs, timeInterleaved } from './harness.mjs';

const [baseDir, candDir, runsArg] = process.argv.slice(2);
if (!baseDir || !candDir) {
  console.error('usage: node bench/lite.mjs <baseline dir> <candidate dir> [runs]');
  process.exit(2);
}
const runs = Number(runsArg ?? 3);

async function load(dir) {
  const abs = resolve(dir);
  const bytes = readFileSync(join(abs, 'loopwright_bg.wasm'));
  const glue = await import(pathToFileURL(join(abs, 'loopwright_glue.js')).href);
  glue.initSync({ module: bytes });
  const lw = await import(pathToFileURL(join(abs, 'loopwright.js')).href);
  return { lw, raw: bytes.length, gz: gzipSync(bytes, { level: 9 }).length };
}

const a = await load(baseDir);
const b = await load(candDir);
console.log(`baseline ${baseDir}: ${a.raw} bytes, ${a.gz} gzipped (zlib -9)`);
console.log(`candidate ${candDir}: ${b.raw} bytes, ${b.gz} gzipped (zlib -9)`);
console.log();
console.log('| case | baseline | candidate | candidate ÷ baseline (each run) |');
console.log('|---|---|---|---|');
for (const c of CASES) {
  let fa;
  let fb;
  try {
    fa = c.make(a.lw);
    fb = c.make(b.lw);
    fa(0);
    fb(0);
  } catch {
    continue; // not in the lite module (circuit, worksheet)
  }
  const options = c.heavy ? { minSampleMs: 1, samples: 7 } : {};
  const ratios = [];
  let best = [Infinity, Infinity];
  for (let r = 0; r < runs; r++) {
    const [ta, tb] = timeInterleaved([fa, fb], options);
    ratios.push(tb / ta);
    best = [Math.min(best[0], ta), Math.min(best[1], tb)];
  }
  console.log(
    `| ${c.what} | ${formatNs(best[0])} | ${formatNs(best[1])} | ${ratios.map((x) => x.toFixed(2)).join(', ')} |`,
  );
}
