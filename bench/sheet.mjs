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

// Large ranges (figures only). Three documents, loaded from their JSON text:
//   fan-out: 1 000 cells of =SUM(J1:J100000) (a 26 KB document), edits in column J;
//   shared: 5 000 numbers in A, 20 000 cells of =SUM(A1:A5000), edits in A;
//   windows: the same with 20 000 different windows =SUM(An:An+4999), which exceeds
//   the recalculation work budget: cells past it show an error value, the time is bounded.
function sheetDocument(cells) {
  return JSON.stringify({ format: 'loopwright-sheet', version: 1, cells, names: {} });
}

function fanOutDocument() {
  const cells = {};
  for (let n = 1; n <= 1000; n++) cells[`A${n}`] = '=SUM(J1:J100000)';
  return sheetDocument(cells);
}

function sumDocument(window) {
  const cells = {};
  for (let n = 1; n <= 5000; n++) cells[`A${n}`] = String(n);
  for (let n = 1; n <= 20000; n++) cells[`B${n}`] = window(n);
  return sheetDocument(cells);
}

function timeLarge(label, doc, editCell, lastCell, runs) {
  const ws = new Worksheet();
  let t0 = performance.now();
  ws.loadDocument(doc);
  const load = performance.now() - t0;
  const edits = [];
  let reached = 0;
  for (let i = 0; i < runs; i++) {
    t0 = performance.now();
    reached = ws.setCell(editCell, String(3 + (i % 5))).length;
    edits.push(performance.now() - t0);
  }
  console.log(
    `${label} (${(doc.length / 1024).toFixed(0)} KB): load ${(load / 1000).toFixed(3)} s, ` +
      `edit of ${editCell} reaching ${reached} cells: median ${(median(edits) / 1000).toFixed(3)} s; ` +
      `${lastCell} shows ${ws.value(lastCell).display}`,
  );
  ws.free?.();
}

const runs = quick ? 2 : 5;
timeLarge('1 000 cells of =SUM(J1:J100000)', fanOutDocument(), 'J5', 'A1000', runs);
timeLarge(
  '20 000 cells of =SUM(A1:A5000)',
  sumDocument(() => '=SUM(A1:A5000)'),
  'A7',
  'B20000',
  runs,
);
timeLarge(
  '20 000 cells of =SUM(An:An+4999), different windows',
  sumDocument((n) => `=SUM(A${n}:A${n + 4999})`),
  'A4000',
  'B20000',
  runs,
);
