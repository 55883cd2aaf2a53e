// Worksheet benchmark (figures only, nothing asserts a time): a 10 000-cell sheet
// of chains, ranges, fan-out and catalog functions, built through the JS API.
//   node bench/sheet.mjs [path to the wasm-bindgen nodejs module] [--quick]
// Targets from the issue: full recalculation under 20 ms; an edit reaching 100
// dependents under 1 ms (both in wasm).

import { performance } from 'node:perf_hooks';
import { pathToFileURL } from 'node:url';
import { resolve } from 'node:path';
import { buildSheet } from './sheet_build.mjs';

const args = process.argv.slice(2);
const quick = args.includes('--quick');
const modPath = args.find((a) => !a.startsWith('--')) ?? 'pkg/node.mjs';
const lw = await import(pathToFileURL(resolve(modPath)).href);
const Worksheet = lw.Worksheet;

function median(xs) {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

const ws = buildSheet(lw);
const doc = ws.saveDocument();
const full = [];
for (let i = 0; i < (quick ? 2 : 9); i++) {
  const t = new Worksheet();
  const t0 = performance.now();
  t.loadDocument(doc); // parse every input, build the graph, evaluate every cell
  full.push(performance.now() - t0);
  t.free?.();
}
const recalc = [];
for (let i = 0; i < (quick ? 2 : 15); i++) {
  const t0 = performance.now();
  ws.recalculate(); // evaluate every formula again, inputs already parsed
  recalc.push(performance.now() - t0);
}
const edit = [];
let reached = 0;
for (let i = 0; i < (quick ? 20 : 400); i++) {
  const t0 = performance.now();
  const changed = ws.setCell('F1', String(2 + (i % 7)));
  edit.push(performance.now() - t0);
  reached = changed.length;
}
const cells = doc.split('\n').length - 8;
console.log(
  `full recalculation of ${cells} cells: median ${median(recalc).toFixed(2)} ms (target < 20 ms)`,
);
console.log(
  `load document of ${cells} cells (parse every input, build the graph, evaluate): median ${median(full).toFixed(2)} ms`,
);
console.log(
  `edit reaching ${reached - 1} dependents: median ${(median(edit) * 1000).toFixed(0)} µs (target < 1000 µs)`,
);
