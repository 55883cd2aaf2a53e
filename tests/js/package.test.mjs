// The npm package as a user gets it: the packed tarball installed into a fresh
// temporary project with `npm install ./loopwright-<version>.tgz`, then used from
// Node, type-checked with tsc, bundled with esbuild and run in headless Chromium,
// and its batch tool run on a generated 100 000-row CSV.
// Needs `scripts/build-package.sh` to have run (make test does).

import { test, before, after } from 'node:test';
import assert from 'node:assert/strict';
import { execFileSync, spawnSync } from 'node:child_process';
import {
  mkdtempSync,
  readdirSync,
  readFileSync,
  copyFileSync,
  writeFileSync,
  rmSync,
  createReadStream,
  mkdirSync,
} from 'node:fs';
import { pathToFileURL } from 'node:url';
import { createInterface } from 'node:readline';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { ROOT, launch } from './browser.mjs';
import { startServer } from '../../scripts/serve.mjs';

const FIXTURES = join(ROOT, 'tests', 'js', 'package-fixtures');
const BIN = join(ROOT, 'tests', 'js', 'node_modules', '.bin');
let project;

before(() => {
  const tarball = readdirSync(join(ROOT, 'pkg')).find((f) => /^loopwright-.*\.tgz$/.test(f));
  assert.ok(tarball, 'pkg/loopwright-*.tgz is missing: run scripts/build-package.sh');
  project = mkdtempSync(join(tmpdir(), 'loopwright-consumer-'));
  writeFileSync(
    join(project, 'package.json'),
    JSON.stringify({ name: 'consumer', private: true, type: 'module' }),
  );
  copyFileSync(join(ROOT, 'pkg', tarball), join(project, tarball));
  execFileSync('npm', ['install', `./${tarball}`, '--no-audit', '--no-fund', '--loglevel=error'], {
    cwd: project,
    stdio: 'pipe',
  });
  for (const f of readdirSync(FIXTURES)) copyFileSync(join(FIXTURES, f), join(project, f));
});

after(() => {
  if (project) rmSync(project, { recursive: true, force: true });
});

test('Node: the installed package gives the reference values and typed errors', () => {
  const out = execFileSync(process.execPath, ['consumer.mjs'], { cwd: project, encoding: 'utf8' });
  assert.match(out, /all checks passed/);
});

test('every number-returning export is checked: bad input throws a LoopwrightError, never NaN', async () => {
  // The glue's scalar exports return NaN on failure (src/wasm/mod.rs `scalar`); the
  // entry module (facade/loopwright.js) must wrap each one. Found from the glue's own
  // declarations, so a new scalar function cannot slip through unwrapped. Both the
  // full module and the lite one.
  const installed = join(project, 'node_modules', 'loopwright');
  for (const [entryFile, web] of [
    ['node.mjs', 'web'],
    ['lite.mjs', join('web', 'lite')],
  ]) {
    const entry = await import(pathToFileURL(join(installed, entryFile)).href);
    const glue = await import(pathToFileURL(join(installed, web, 'loopwright_glue.js')).href);
    const dts = readFileSync(join(installed, web, 'loopwright_glue.d.ts'), 'utf8');
    const scalars = [...dts.matchAll(/^export function (\w+)\(([^)]*)\): number;$/gm)];
    assert.ok(scalars.length >= 20, `${entryFile}: found ${scalars.length} scalar exports`);
    for (const [, name, params] of scalars) {
      if (entry[name] === undefined) {
        // An internal export, used by the entry module and not exported by it.
        assert.ok(
          [
            'takeError',
            'topologyIndex',
            'summarizeFeedbackPacked',
            'closedLoopOutputAt',
            'sweepHeld',
          ].includes(name),
          name,
        );
        continue;
      }
      assert.notEqual(
        entry[name],
        glue[name],
        `${entryFile}: ${name} is not wrapped by facade/loopwright.js`,
      );
      const args = params.split(',').map((p) => (p.includes(': number') ? Number.NaN : '?'));
      assert.throws(
        () => entry[name](...args),
        (e) => e.name === 'LoopwrightError' && typeof e.param === 'string',
        name,
      );
      assert.equal(glue.takeError(), undefined, `${entryFile}: ${name} left an error behind`);
    }
  }
  const entry = await import(pathToFileURL(join(installed, 'node.mjs')).href);
  // A = 10⁵, β = 0.00999: Af = 10⁵/1000 = 100 (by hand).
  assert.ok(Math.abs(entry.closedLoopGain(1e5, 0.00999) - 100) < 1e-9);
});

test("summarizeFeedback built in JS equals the glue's serde-built object, errors included", async () => {
  const entry = await import(
    pathToFileURL(join(project, 'node_modules', 'loopwright', 'node.mjs')).href
  );
  const glue = await import(
    pathToFileURL(join(project, 'node_modules', 'loopwright', 'web', 'loopwright_glue.js')).href
  );
  const names = [
    'series-shunt',
    'shunt-series',
    'series-series',
    'shunt-shunt',
    'Voltage-Series',
    'CURRENT-SHUNT',
    'current-series',
    'voltage-shunt',
    'voltage',
    'current',
    'transconductance',
    'transresistance',
  ];
  // Negative, latching (T = −2, D = −1), positive feedback and β = 0 (neutral, null
  // ideal gain and error).
  const stages = [
    [1e5, 0.00999],
    [2, -1],
    [10, -0.05],
    [-1e5, -1e-3],
    [10, 0],
    [3.3e-2, 4.7e3],
  ];
  let compared = 0;
  for (const name of names) {
    for (const [a, beta] of stages) {
      assert.deepStrictEqual(
        entry.summarizeFeedback(name, a, beta),
        glue.summarizeFeedback(name, a, beta),
        `${name} ${a} ${beta}`,
      );
      compared++;
    }
  }
  assert.equal(compared, 72);
  // The numbers are read in place from the wasm memory: after it grows (a long sweep
  // here), the entry module must take a fresh view and still agree.
  const memoryBytes = () => glue.scratchView().buffer.byteLength;
  const before = memoryBytes();
  entry.loopGainSweep({
    amplifier: { gain: 1e5, polesHz: [10, 1e6] },
    beta: 0.01,
    startHz: 1,
    stopHz: 1e9,
    points: 100_000,
  });
  assert.ok(memoryBytes() > before, 'the sweep grew the wasm memory');
  for (const name of names) {
    assert.deepStrictEqual(
      entry.summarizeFeedback(name, 1e5, 0.00999),
      glue.summarizeFeedback(name, 1e5, 0.00999),
      `${name} after growth`,
    );
  }
  const senses = new Set(
    stages.map(([a, beta]) => entry.summarizeFeedback('voltage', a, beta).sense),
  );
  assert.deepStrictEqual([...senses].sort(), ['latching', 'negative', 'neutral', 'positive']);
  for (const [name, a, beta] of [
    ['series-parallel', 1, 1],
    ['shunt-shunt', -10, 0.1],
    ['voltage', Number.NaN, 0.1],
    ['current', 1, Infinity],
  ]) {
    const thrown = (f) => {
      try {
        f();
      } catch (e) {
        return e;
      }
      assert.fail(`${name} ${a} ${beta} did not throw`);
    };
    const mine = thrown(() => entry.summarizeFeedback(name, a, beta));
    const theirs = thrown(() => glue.summarizeFeedback(name, a, beta));
    assert.equal(mine.name, 'LoopwrightError');
    assert.deepStrictEqual(
      [mine.code, mine.param, mine.message],
      [theirs.code, theirs.param, theirs.message],
    );
  }
});

test('loopwright/lite: the calculator areas without the circuit solver and the worksheet', async () => {
  const out = execFileSync(
    process.execPath,
    [
      '--input-type=module',
      '-e',
      `
    import * as lite from 'loopwright/lite';
    import * as full from 'loopwright';
    const a = { gain: 1e5, polesHz: [10, 1e6, 1e7] };
    console.log(JSON.stringify({
      gain: lite.closedLoopGain(1e5, 0.00999),
      pm: lite.stabilityMargins(a, 0.01).phaseMarginDeg,
      pmFull: full.stabilityMargins(a, 0.01).phaseMarginDeg,
      summary: lite.summarizeFeedback('current', 20, 0.5),
      summaryFull: full.summarizeFeedback('current', 20, 0.5),
      mc: typeof lite.monteCarlo,
      worksheet: typeof lite.Worksheet, circuit: typeof lite.circuitSolve, fullWorksheet: typeof full.Worksheet,
    }));`,
    ],
    { cwd: project, encoding: 'utf8' },
  );
  const r = JSON.parse(out);
  // A = 10⁵, β = 0.00999: Af = 10⁵/1000 = 100 (by hand).
  assert.ok(Math.abs(r.gain - 100) < 1e-9);
  assert.equal(r.pm, r.pmFull);
  assert.ok(r.pm > 0 && r.pm < 90, `phase margin ${r.pm}`);
  assert.deepStrictEqual(r.summary, r.summaryFull);
  assert.equal(r.mc, 'function');
  assert.deepStrictEqual(
    [r.worksheet, r.circuit, r.fullWorksheet],
    ['undefined', 'undefined', 'function'],
  );
  const wasm = (dir) =>
    readFileSync(join(project, 'node_modules', 'loopwright', ...dir, 'loopwright_bg.wasm')).length;
  assert.ok(
    wasm(['web', 'lite']) < wasm(['web']) / 2,
    'the lite wasm is less than half the full one',
  );
});

test('loopwright/sheetfiles: a worksheet to .xlsx and .ods and back from Node, and a table as a workbook', () => {
  const out = execFileSync(
    process.execPath,
    [
      '--input-type=module',
      '-e',
      `
    import { Worksheet } from 'loopwright';
    import { exportSheetFile, importSheetFile, tableFile } from 'loopwright/sheetfiles';
    const sheet = new Worksheet();
    sheet.setCell('A1', '100k');
    sheet.setCell('A2', '=FEEDBACK.GAIN(A1; 0.01)');
    sheet.setCell('A3', '=A2*2');
    const doc = sheet.saveDocument();
    const result = {};
    for (const format of ['xlsx', 'ods']) {
      const bytes = exportSheetFile(doc, format, '2026-12-03T00:00:00Z');
      const back = importSheetFile(bytes, format);
      const again = new Worksheet();
      again.loadDocument(back.document);
      result[format] = { same: again.saveDocument() === doc, problems: back.problems };
    }
    result.table = Array.from(tableFile('line,a\\n2,-3\\n', 'xlsx').subarray(0, 2));
    try { tableFile('a', 'pdf'); } catch (e) { result.bad = [e.name, e.code, e.param]; }
    console.log(JSON.stringify(result));`,
    ],
    { cwd: project, encoding: 'utf8' },
  );
  const r = JSON.parse(out);
  for (const format of ['xlsx', 'ods']) {
    // The round trip gives the same document (docs/worksheet.md, "Spreadsheet files").
    assert.equal(r[format].same, true, format);
    assert.deepEqual(r[format].problems, [], format);
  }
  // 'PK': the local file header signature of a zip archive (APPNOTE.TXT, 4.3.7).
  assert.deepEqual(r.table, [0x50, 0x4b]);
  assert.deepEqual(r.bad, ['LoopwrightError', 'unknown_name', 'format']);
  const files = join(project, 'node_modules', 'loopwright', 'web', 'sheetfiles');
  assert.ok(readFileSync(join(files, 'loopwright_bg.wasm')).length > 0);
});

test('TypeScript: the definitions type-check a consumer, and reject a wrong one', () => {
  // wasm-bindgen's classes declare [Symbol.dispose], typed in ESNext.Disposable (TS ≥ 5.2).
  const args = [
    '--noEmit',
    '--strict',
    '--module',
    'NodeNext',
    '--moduleResolution',
    'NodeNext',
    '--target',
    'ES2022',
    '--lib',
    'ES2022,DOM,ESNext.Disposable',
  ];
  const good = spawnSync(join(BIN, 'tsc'), [...args, 'consumer.ts'], {
    cwd: project,
    encoding: 'utf8',
  });
  assert.equal(good.status, 0, `tsc on consumer.ts: ${good.stdout}${good.stderr}`);
  const bad = spawnSync(join(BIN, 'tsc'), [...args, 'bad-consumer.ts'], {
    cwd: project,
    encoding: 'utf8',
  });
  assert.notEqual(bad.status, 0, 'tsc accepted bad-consumer.ts: the types are too loose');
  assert.match(bad.stdout, /closedLoopGain|not assignable/);
  assert.match(bad.stdout, /bandwidth/);
  assert.match(bad.stdout, /median/);
  assert.match(bad.stdout, /cutoffHz/);
  assert.match(bad.stdout, /loopGainRe/);
  assert.match(bad.stdout, /polez/, 'an unknown options field is a type error');
  assert.match(
    bad.stdout,
    /'number\[\]'[^\n]*'Float64Array/,
    'a plain array is not a Float64Array to fill',
  );
  assert.match(bad.stdout, /takeError/, 'internal exports are not in the public types');
});

test('API 0.2: the public entry has no internal export, no function of more than four parameters, no snake_case name', async () => {
  const installed = join(project, 'node_modules', 'loopwright');
  const entry = await import(pathToFileURL(join(installed, 'node.mjs')).href);
  for (const internal of [
    'takeError',
    'topologyIndex',
    'summarizeFeedbackPacked',
    'feedbackLabels',
    'scratchView',
    'closedLoopOutputAt',
    'circuitTwoPortPacked',
    'sweepHeld',
    'heldSweepView',
  ]) {
    assert.equal(entry[internal], undefined, `${internal} is not exported`);
  }
  const dts = readFileSync(join(installed, 'web', 'loopwright_glue.d.ts'), 'utf8');
  // Exported functions of the entry, and the methods of the Worksheet class.
  const signatures = [
    ...[...dts.matchAll(/^export function (\w+)\(([^)]*)\)/gm)].filter(
      ([, name]) => entry[name] !== undefined,
    ),
    ...dts.matchAll(/^ {2}(\w+)\(([^)]*)\)/gm),
  ];
  let checked = 0;
  for (const [, name, params] of signatures) {
    const names = params
      .split(',')
      .filter((p) => p.trim())
      .map((p) => p.split(/\??:/)[0].trim());
    for (const p of names) assert.doesNotMatch(p, /_/, `${name}(${p}): camelCase`);
    assert.ok(names.length <= 4, `${name} takes ${names.length} inputs`);
    checked++;
  }
  assert.ok(checked >= 60, `checked ${checked} signatures`);
});

test('esbuild bundle of an ES-module consumer runs in headless Chromium', async () => {
  const dist = join(project, 'dist');
  mkdirSync(dist, { recursive: true });
  execFileSync(
    join(BIN, 'esbuild'),
    [
      'bundle-entry.mjs',
      '--bundle',
      '--format=esm',
      '--platform=browser',
      `--outfile=${join(dist, 'app.js')}`,
    ],
    { cwd: project, stdio: 'pipe' },
  );
  copyFileSync(
    join(project, 'node_modules', 'loopwright', 'web', 'loopwright_bg.wasm'),
    join(dist, 'loopwright_bg.wasm'),
  );
  writeFileSync(
    join(dist, 'index.html'),
    '<!doctype html><meta charset="utf-8"><title>loading</title><script type="module" src="app.js"></script>',
  );
  const { server, url } = await startServer(dist, 0);
  const browser = await launch();
  try {
    const page = await browser.newPage();
    const errors = [];
    page.on('pageerror', (e) => errors.push(e.message));
    await page.goto(url);
    await page.waitForFunction(() => document.title !== 'loading', null, { timeout: 15000 });
    // A = 10⁵, β = 0.00999: Af = 10⁵/1000 = 100; series-series gain unit A/V.
    assert.equal(await page.title(), 'ok 100.000000 A/V');
    assert.deepEqual(errors, []);
  } finally {
    await browser.close();
    server.close();
  }
});

test('batch tool: 100 000 rows streamed, bad rows reported by line number, nothing dropped', async () => {
  const rows = 100_000;
  const lines = ['topology,a,beta,zi,zo,target_gain'];
  const bad = new Map();
  for (let i = 1; i <= rows; i++) {
    if (i % 25_000 === 0) {
      lines.push(`series-shunt,abc,0.01,1e6,75,10`);
      bad.set(i, 'a');
      continue;
    }
    if (i % 25_000 === 1) {
      lines.push(`parallel,1e5,0.01,1e6,75,10`);
      bad.set(i, 'topology');
      continue;
    }
    if (i === 777) {
      lines.push(`shunt-shunt,-100,0.01,1e3,1e3,`);
      bad.set(i, 'beta');
      continue;
    }
    const a = 1e4 * (1 + (i % 97));
    lines.push(
      `${['series-shunt', 'shunt-series', 'series-series', 'shunt-shunt'][i % 4]},${a},0.01,1e6,75,50`,
    );
  }
  writeFileSync(join(project, 'designs.csv'), `${lines.join('\n')}\n`);
  const run = spawnSync(
    'npx',
    ['--no-install', 'loopwright-batch', 'designs.csv', '-o', 'out.csv', '--progress'],
    { cwd: project, encoding: 'utf8' },
  );
  assert.equal(run.status, 0, run.stderr);
  assert.match(
    run.stderr,
    new RegExp(
      `${rows} rows in, ${rows - bad.size} written with results, ${bad.size} reported with an error\n$`,
    ),
  );

  const header = [];
  let count = 0;
  const errorsSeen = new Map();
  for await (const line of createInterface({ input: createReadStream(join(project, 'out.csv')) })) {
    if (header.length === 0) {
      header.push(...line.split(','));
      continue;
    }
    count++;
    const f = line.split(',');
    // The first column is the input line: the header is line 1, row i is line i + 1.
    const row = Number(f[0]) - 1;
    assert.equal(row, count, 'rows are numbered by their line, in order');
    const error = f[header.indexOf('error')];
    if (error) errorsSeen.set(row, error);
    else if (row === 2) {
      // Row 2: series-series, A = 3·10⁴, β = 0.01 → D = 301, Af = 3·10⁴/301.
      const af = Number(f[header.indexOf('closed_loop_gain')]);
      assert.ok(Math.abs(af - 3e4 / 301) < 1e-9, `row 2 Af ${af}`);
    }
  }
  assert.equal(count, rows, 'every input row has an output row');
  assert.deepEqual(
    [...errorsSeen.keys()].sort((x, y) => x - y),
    [...bad.keys()].sort((x, y) => x - y),
  );
  for (const [row, param] of bad)
    assert.match(
      errorsSeen.get(row),
      new RegExp(`\\b${param}\\b`),
      `row ${row}: ${errorsSeen.get(row)}`,
    );

  const strict = spawnSync(
    'npx',
    ['--no-install', 'loopwright-batch', 'designs.csv', '-o', 'out2.csv', '--strict'],
    { cwd: project, encoding: 'utf8' },
  );
  assert.equal(strict.status, 1, `--strict exits 1 when a row failed; stderr: ${strict.stderr}`);
  const missing = spawnSync(
    'npx',
    ['--no-install', 'loopwright-batch', 'designs.csv', '--compute', 'spread'],
    { cwd: project, encoding: 'utf8' },
  );
  assert.equal(missing.status, 2);
  assert.match(missing.stderr, /needs the column\(s\) a_min, a_max/);
});
