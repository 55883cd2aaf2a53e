// The batch tool (pkg/bin/loopwright-batch.mjs of the built package) on files that
// break CSV in the ways people's files do: a stray quote, embedded quotes, a quoted
// line break, blank lines, a duplicated column, values that are not numbers, text
// that a spreadsheet would run as a formula; on 200 000 rows, with the proof that
// rows in = rows written + rows reported, in CSV and in JSON lines; every area's step
// checked against the package's own JS API; workbook output opened by LibreOffice
// when it is installed. Needs `scripts/build-package.sh` (make test runs it first).

import { test, before, after } from 'node:test';
import assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync, rmSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { ROOT } from './browser.mjs';

const TOOL = join(ROOT, 'pkg', 'bin', 'loopwright-batch.mjs');
const api = () => import(join(ROOT, 'pkg', 'node.mjs'));
let dir;

before(() => {
  assert.ok(
    existsSync(TOOL),
    'pkg/bin/loopwright-batch.mjs is missing: run scripts/build-package.sh',
  );
  dir = mkdtempSync(join(tmpdir(), 'loopwright-batch-'));
});

after(() => {
  if (dir) rmSync(dir, { recursive: true, force: true });
});

function batch(name, text, ...args) {
  const input = join(dir, name);
  writeFileSync(input, text);
  const i = args.indexOf('--format');
  const ext = i >= 0 ? args[i + 1] : 'csv';
  const output = join(dir, `${name}.out.${ext}`);
  const run = spawnSync(process.execPath, [TOOL, input, '-o', output, ...args], {
    encoding: 'utf8',
  });
  return { ...run, output: existsSync(output) ? readFileSync(output, 'utf8') : '' };
}

/**
 * Records of an RFC 4180 text, written here from the RFC (section 2, rules 1–7) as
 * an oracle independent of the core's reader: quoted fields with doubled quotes
 * and line breaks, CRLF or LF line ends.
 */
function readCsv(text) {
  const records = [];
  let fields = [];
  let field = '';
  let i = 0;
  while (i < text.length) {
    const c = text[i];
    if (c === '"' && field === '') {
      // A quoted field: up to the quote that is not doubled.
      let j = i + 1;
      for (;;) {
        const q = text.indexOf('"', j);
        if (text[q + 1] === '"') {
          field += text.slice(j, q + 1);
          j = q + 2;
        } else {
          field += text.slice(j, q);
          i = q + 1;
          break;
        }
      }
      continue;
    }
    if (c === ',') {
      fields.push(field);
      field = '';
    } else if (c === '\r' || c === '\n') {
      if (c === '\r' && text[i + 1] === '\n') i++;
      fields.push(field);
      records.push(fields);
      fields = [];
      field = '';
    } else field += c;
    i++;
  }
  if (field !== '' || fields.length) records.push([...fields, field]);
  return records;
}

test('the oracle reader follows RFC 4180', () => {
  // RFC 4180 section 2, rules 1, 6 and 7.
  assert.deepEqual(readCsv('a,"b ""c""",\r\n"x\ny",2\n'), [
    ['a', 'b "c"', ''],
    ['x\ny', '2'],
  ]);
});

test('200 000 rows with bad rows sprinkled: every record is written or reported, by its line', () => {
  const ROWS = 200_000;
  const lines = ['topology,a,beta,zi,zo,target_gain,gain_error,note'];
  let line = 1; // physical line of the last record written
  const expectLine = new Map(); // data row → its physical line
  const bad = new Map(); // data row → expected start of the error
  const special = new Map([
    [100_001, ['series-shunt,1e5,0.01,1e6,75,10,0.001,12" woofer', 'malformed_record']],
    [5_000, ['series-shunt,1e5,0.01,1e6,75,10,0.001,"say ""hi"""', null]],
    [7, ['series-shunt,1e5,0.01,1e6,75,10,0.001,"=HYPERLINK(""http://x"";""y"")"', null]],
    [8, ['series-shunt,1e5,0.01,1e6,75,10,0.001,-2+3', null]],
    [9, ['shunt-shunt,-1e5,-0.001,1e3,1e3,-10,0.001,@SUM(A1)', null]],
    [30_000, ['parallel,1e5,0.01,1e6,75,10,0.001,x', 'unknown_name topology']],
    [120_000, ['series-shunt,1e5,0.01,1e6,75,10,0.001,x,extra', 'field_count']],
    [150_000, ['series-shunt,1e5,0.01,1e6,75,10,0.001,"two\nlines"', null]],
    [160_000, ['series-shunt,1e5,0.01,1e6,75,10,1.5,x', 'out_of_domain gain_error']],
    // A quote that never closes: the rest of the file (over 1 MiB) must not vanish.
    [170_000, ['series-shunt,1e5,0.01,1e6,75,10,0.001,"12 woofer', 'malformed_record']],
  ]);
  for (let i = 1; i <= ROWS; i++) {
    if (i === 50_000) {
      lines.push('', '');
      line += 2;
    }
    let text;
    if (special.has(i)) {
      const [t, error] = special.get(i);
      text = t;
      if (error) bad.set(i, error);
    } else if (i % 20_011 === 0) {
      text = `series-shunt,0x2710,0.01,1e6,75,10,0.001,hex`;
      bad.set(i, 'syntax a');
    } else {
      const a = `${1 + (i % 97)}0k`; // 10k … 970k, read with the SI prefix
      text = `${['series-shunt', 'shunt-series', 'series-series', 'shunt-shunt'][i % 4]},${a},10m,1M,75,10,0.001,ok`;
    }
    lines.push(text);
    line += 1;
    expectLine.set(i, line);
    line += (text.match(/\n/g) ?? []).length;
  }
  const started = performance.now();
  const run = batch('big.csv', `${lines.join('\n')}\n`);
  const seconds = (performance.now() - started) / 1000;
  assert.equal(run.status, 0, run.stderr);
  const written = ROWS - bad.size;
  assert.match(
    run.stderr,
    new RegExp(
      `${ROWS} rows in, ${written} written with results, ${bad.size} reported with an error\n$`,
    ),
  );

  const [header, ...rows] = readCsv(run.output);
  const col = (name) => header.indexOf(name);
  assert.deepEqual(header.slice(0, 9), [
    'line',
    'topology',
    'a',
    'beta',
    'zi',
    'zo',
    'target_gain',
    'gain_error',
    'note',
  ]);
  assert.equal(rows.length, ROWS, 'rows in = rows out: one output row per input record');
  let reported = 0;
  for (let i = 1; i <= ROWS; i++) {
    const r = rows[i - 1];
    assert.equal(Number(r[0]), expectLine.get(i), `row ${i}: its physical line`);
    const error = r[col('error')];
    if (bad.has(i)) {
      reported++;
      assert.ok(error.startsWith(bad.get(i)), `row ${i}: ${error}`);
    } else assert.equal(error, '', `row ${i}: ${error}`);
  }
  assert.equal(reported, bad.size, 'rows in = rows written + rows reported');
  assert.match(rows[100_000][col('error')], /line 100004: field 8 has a quote/);
  assert.equal(rows[100_001][col('note')], 'ok', 'the row after the stray quote is read');
  assert.match(
    rows[169_999][col('error')],
    /line 170004: field 8 opens a quote that is not closed/,
  );
  assert.equal(rows[170_000][col('note')], 'ok', 'the row after the open quote is read');

  // Embedded quotes kept; a quoted line break kept; formula-like text neutralised,
  // numbers (negative ones too) kept as numbers.
  assert.equal(rows[4_999][col('note')], 'say "hi"');
  assert.equal(rows[149_999][col('note')], 'two\nlines');
  assert.equal(rows[6][col('note')], `'=HYPERLINK("http://x";"y")`);
  assert.equal(rows[7][col('note')], `'-2+3`);
  assert.equal(rows[8][col('note')], `'@SUM(A1)`);
  assert.equal(rows[8][col('a')], '-1e5');
  // Row 9, shunt-shunt: A = −10⁵ V/A, β = −10⁻³ A/V → D = 1 + Aβ = 101, Af = A/D
  // (the feedback equation; Sedra & Smith, Microelectronic Circuits, 7th ed.,
  // section 10.1, from memory). The sign comes out as a plain number.
  assert.equal(Number(rows[8][col('feedback_amount')]), 101);
  assert.ok(Math.abs(Number(rows[8][col('closed_loop_gain')]) + 1e5 / 101) < 1e-9);
  // Row 2: series-series, a = 30k (3·10⁴), β = 10m: D = 301. β for a target gain of 10
  // with A = 3·10⁴: β = (A − 10)/(10·A) (same source, Af = A/(1 + Aβ) solved for β);
  // the least A for 0.1 % error at an ideal gain of 10: (1 − ε)/(ε/10) = 9990.
  assert.equal(Number(rows[1][col('feedback_amount')]), 301);
  assert.ok(Math.abs(Number(rows[1][col('beta_for_target')]) - (3e4 - 10) / (10 * 3e4)) < 1e-15);
  assert.ok(Math.abs(Number(rows[1][col('min_open_loop_gain')]) - 9990) < 1e-9);
  console.log(
    `# 200 000 rows: ${ROWS} in, ${written} written, ${bad.size} reported, ${seconds.toFixed(2)} s`,
  );

  const strict = batch('big.csv', `${lines.join('\n')}\n`, '--strict');
  assert.equal(strict.status, 1, '--strict exits 1 when a row was reported');

  // The same file as JSON lines: one object a line that JSON.parse reads, each
  // with the CSV row's line, input and error.
  const jsonl = batch('big.csv', `${lines.join('\n')}\n`, '--format', 'jsonl');
  assert.equal(jsonl.status, 0, jsonl.stderr);
  const objects = jsonl.output.split('\n');
  assert.equal(objects.pop(), '', 'the last line ends with a line feed');
  assert.equal(objects.length, ROWS, 'one object per input record');
  let jsonReported = 0;
  for (let i = 1; i <= ROWS; i++) {
    const o = JSON.parse(objects[i - 1]);
    assert.equal(o.line, expectLine.get(i), `row ${i}: its line`);
    if (bad.has(i)) {
      jsonReported++;
      assert.ok(o.error.startsWith(bad.get(i)), `row ${i}: ${o.error}`);
    } else {
      assert.equal(o.error, null, `row ${i}`);
      assert.equal(typeof o.closed_loop_gain, 'number');
    }
  }
  assert.equal(jsonReported, bad.size);
  // JSON keeps text as text: the input is as written, nothing to neutralise.
  assert.equal(JSON.parse(objects[6]).input.note, '=HYPERLINK("http://x";"y")');
  assert.equal(JSON.parse(objects[149_999]).input.note, 'two\nlines');
  assert.equal(JSON.parse(objects[119_999]).input, null, 'a row of the wrong width');
});

test('a duplicated column is refused by name, whatever its case', () => {
  const run = batch('dup.csv', 'topology,a,beta,A\nseries-shunt,1e5,0.01,2\n');
  assert.equal(run.status, 2);
  assert.match(run.stderr, /the column "A" appears twice \(fields 2 and 4\)/);
});

test('a malformed header, an empty file and missing columns are refused', () => {
  let run = batch('hdr.csv', 'a,"beta\n1,2\n');
  assert.equal(run.status, 2);
  assert.match(run.stderr, /line 1: the header is malformed/);
  run = batch('empty.csv', '\n\n');
  assert.equal(run.status, 2);
  assert.match(run.stderr, /no header line/);
  run = batch('cols.csv', 'a,beta\n1e5,0.01\n', '--compute', 'spread');
  assert.equal(run.status, 2);
  assert.match(run.stderr, /the step spread needs the column\(s\) a_min, a_max/);
  run = batch('step.csv', 'a,beta\n1e5,0.01\n', '--compute', 'fft');
  assert.equal(run.status, 2);
  assert.match(run.stderr, /compute: unknown name/);
});

test('blank lines and CRLF do not shift line numbers; values are read only as the core reads them', () => {
  const text = 'a,beta\r\n\r\n1e5,0.01\r\n\r\n\r\n0x2710,0.01\r\n4k7,10m\r\n1 000,0.01\r\n';
  const run = batch('blank.csv', text);
  assert.equal(run.status, 0, run.stderr);
  const [, ...rows] = readCsv(run.output);
  assert.deepEqual(
    rows.map((r) => r[0]),
    ['3', '6', '7', '8'],
  );
  assert.match(rows[1].at(-1), /^syntax a: /, '0x2710 is not a number');
  assert.equal(rows[2].at(-1), '', '4k7 is read by the IEC 60062 letter code');
  assert.match(rows[3].at(-1), /^syntax a: /, 'no digit grouping guessed');
});

/** The JSON-lines objects of a run, which must have succeeded. */
function objectsOf(run) {
  assert.equal(run.status, 0, run.stderr);
  return run.output
    .split('\n')
    .filter((l) => l !== '')
    .map((l) => JSON.parse(l));
}

/** |x/y − 1| ≤ tol. */
function near(x, y, tol, what) {
  assert.ok(Math.abs(x / y - 1) <= tol, `${what}: ${x} against ${y}`);
}

test('freq, distortion, eseries and pair rows give what the JS API gives', async () => {
  const lw = await api();
  // Pole lists: two poles (10 Hz, 1 MHz) and three; a negative pole is refused by
  // its column. Reference: stabilityMargins and closedLoopBandwidth of the JS API.
  const freq = objectsOf(
    batch(
      'freq.csv',
      'a,beta,a_poles_hz\n1e5,0.01,10 1M\n2e5,0.1,10 1M 3M\n1e5,0.01,10 -5\n',
      '--format',
      'jsonl',
    ),
  );
  for (const [k, [gain, beta, poles]] of [
    [1e5, 0.01, [10, 1e6]],
    [2e5, 0.1, [10, 1e6, 3e6]],
  ].entries()) {
    const m = lw.stabilityMargins({ gain, polesHz: poles }, beta);
    const row = freq[k];
    assert.equal(row.error, null);
    assert.equal(row.freq_phase_margin_deg, m.phaseMarginDeg);
    assert.equal(row.freq_crossover_hz, m.crossoverHz);
    assert.equal(row.freq_gain_margin_db, m.gainMarginDb);
    assert.equal(row.freq_stable, m.closedLoop === 'stable' ? 1 : 0);
    if (row.freq_stable === 1) {
      const b = lw.closedLoopBandwidth({ gain, polesHz: poles }, beta);
      assert.equal(row.freq_bandwidth_hz, b.highHz);
      assert.equal(row.freq_peaking_db, b.peakingDb);
    } else assert.equal(row.freq_bandwidth_hz, null);
  }
  assert.match(freq[2].error, /^out_of_domain a_poles_hz/);

  // Distortion: the open-loop series from the measured HD2, HD3 at the output
  // amplitude Y (a2 = 2·HD2·a1/X, a3 = 4·HD3·a1/X², X = Y/a1: the leading-order
  // harmonics of y = a1x + a2x² + a3x³, Sedra & Smith, 7th ed., from memory), then
  // feedbackDistortion of the JS API.
  const dist = objectsOf(
    batch(
      'dist.csv',
      'a,beta,hd2,hd3,amplitude\n1000,0.099,0.01,-0.002,1\n500,0.02,0.003,0.001,2.5\n1000,0.099,0.01,-0.002,0\n',
      '--format',
      'jsonl',
    ),
  );
  for (const [k, [a1, beta, hd2, hd3, y]] of [
    [1000, 0.099, 0.01, -0.002, 1],
    [500, 0.02, 0.003, 0.001, 2.5],
  ].entries()) {
    const x = y / a1;
    const f = lw.feedbackDistortion({
      a1,
      a2: (2 * hd2 * a1) / x,
      a3: (4 * hd3 * a1) / (x * x),
      beta,
      amplitude: y,
    });
    near(dist[k].hd2_closed, f.closed.hd2, 1e-12, `row ${k} hd2`);
    near(dist[k].hd3_closed, f.closed.hd3, 1e-12, `row ${k} hd3`);
    near(dist[k].hd2_ratio, f.hd2Ratio, 1e-12, `row ${k} hd2 ratio`);
    near(dist[k].hd3_ratio, f.hd3Ratio, 1e-12, `row ${k} hd3 ratio`);
  }
  assert.match(dist[2].error, /^out_of_domain amplitude/);

  // Network: standardValue and bestPairs of the JS API; a series that does not
  // exist is refused by its column.
  const net = objectsOf(
    batch(
      'net.csv',
      'series,resistor,network,pair_target,total_min,total_max\n' +
        'E24,4k6,non-inverting,11,10k,1M\n' +
        'E96,3.3k,divider,0.3,1k,100k\n' +
        'E25,1k,inverting,-5,1k,100k\n',
      '--format',
      'jsonl',
    ),
  );
  for (const [k, [series, r, network, target, lo, hi]] of [
    ['E24', 4600, 'non-inverting', 11, 1e4, 1e6],
    ['E96', 3300, 'divider', 0.3, 1e3, 1e5],
  ].entries()) {
    const row = net[k];
    assert.equal(row.error, null);
    const s = lw.standardValue(series, r, 'nearest');
    assert.equal(row.standard_value, s);
    assert.equal(row.standard_error, s / r - 1);
    const best = lw.bestPairs({
      network,
      target,
      series,
      totalMin: lo,
      totalMax: hi,
      count: 1,
    }).candidates[0];
    assert.deepEqual(
      [row.r1, row.r2, row.pair_achieved, row.pair_error],
      [best.r1, best.r2.value, best.achieved, best.error],
    );
  }
  // IEC 60063: 4.6 kΩ is between 4.3 k and 4.7 k of E24, nearer 4.7 k.
  assert.equal(net[0].standard_value, 4700);
  assert.match(net[2].error, /^unknown_name series/);
});

/** The stage document of docs/stage.md, with no spread, as one CSV field. */
const STAGE = {
  format: 'loopwright-stage',
  version: 1,
  kind: 'non-inverting',
  amplifier: {
    a0: 2e5,
    gbwHz: '10M',
    polesHz: ['40M'],
    rd: '2M',
    ro: 60,
    voltageNoise: { density: '8n', cornerHz: 20 },
    currentNoise: { density: '0.5p', cornerHz: 100 },
  },
  parts: { rf: '9k09', rg: '1k', rs: '50', rl: '2k', cl: '1n' },
};
const field = (text) => `"${text.replaceAll('"', '""')}"`;

test('noise, design and loop rows of a stage give what the JS API gives', async () => {
  const lw = await api();
  const doc = JSON.stringify(STAGE);
  const header = 'stage,noise_at_hz,f_low_hz,f_high_hz,signal_rms,temperature_k,target_pm_deg';
  const text =
    `${header}\n` +
    `${field(doc)},1k,10,100k,1,,60\n` +
    `${field(doc)},10,1,20k,,310,45\n` +
    // The band's edges the wrong way round; a target margin of 200°.
    `${field(doc)},1k,100k,10,1,,60\n` +
    `${field(doc)},1k,10,100k,1,,200\n` +
    // No stage in this row.
    `,1k,10,100k,1,,60\n`;
  const rows = objectsOf(batch('stage.csv', text, '--format', 'jsonl'));
  const sc = lw.stageCircuit(STAGE);
  for (const [k, [f, lo, hi, signal, t, pm]] of [
    [1e3, 10, 1e5, 1, 300, 60],
    [10, 1, 2e4, null, 310, 45],
  ].entries()) {
    const row = rows[k];
    assert.equal(row.error, null, row.error);
    const common = {
      circuit: sc.circuit,
      output: sc.output,
      inputSource: sc.source,
      amplifier: sc.amplifier,
      temperatureK: t,
    };
    // Reference: circuitNoise and circuitNoiseIntegral of the JS API on the
    // circuit that stageCircuit writes.
    const d = lw.circuitNoise({ ...common, frequenciesHz: [f] });
    assert.equal(row.noise_density, d.total[0]);
    assert.equal(row.noise_input_density, d.inputReferred[0]);
    const b = lw.circuitNoiseIntegral({ ...common, bandHz: [lo, hi] });
    // The batch's signal_rms is at the output: the JS API takes it so without an
    // input source.
    const { inputSource: _, ...atOutput } = common;
    const snr =
      signal === null
        ? null
        : lw.circuitNoiseIntegral({ ...atOutput, bandHz: [lo, hi], signalRms: signal }).snrDb;
    assert.equal(row.noise_rms, b.totalRms);
    assert.equal(row.noise_input_rms, b.inputReferredRms);
    assert.equal(row.snr_db, snr);
    const largest = b.sources.reduce((x, y) => (y.rms > x.rms ? y : x));
    assert.equal(row.largest_source, largest.name);
    assert.equal(row.largest_share, largest.share);
    // SNR = 20·log10(signal/noise) (the definition; common practice, no source).
    if (signal !== null) near(row.snr_db, 20 * Math.log10(signal / b.totalRms), 1e-12, 'snr');
    // Reference: stageDesign of the JS API, part cf and part riso (cl of the stage).
    const cf = lw.stageDesign({ stage: STAGE, part: 'cf', targetPhaseMarginDeg: pm });
    assert.equal(row.design_cf, cf.value);
    assert.equal(row.design_cf_pm_deg, cf.phaseMarginDeg);
    assert.equal(row.design_cf_at_range_end, cf.atRangeEnd ? 1 : 0);
    const riso = lw.stageDesign({ stage: STAGE, part: 'riso', targetPhaseMarginDeg: pm });
    assert.equal(row.design_riso, riso.value);
    assert.equal(row.design_riso_at_range_end, riso.atRangeEnd ? 1 : 0);
    assert.ok(row.design_riso_pm_deg >= pm - 0.01, `riso margin ${row.design_riso_pm_deg}`);
    // The loop step runs too (a stage column): its margin is the stage's own.
    assert.equal(typeof row.phase_margin_deg, 'number');
  }
  assert.match(rows[2].error, /^out_of_domain f_low_hz/);
  assert.match(rows[3].error, /target_pm_deg/);
  assert.match(rows[4].error, /^out_of_domain stage/);

  // The same stage described in columns (the amplifier's noise as en, in and their
  // corners) gives the same figures as its document.
  const columns =
    'kind,a0,gbw_hz,poles_hz,rd,ro,en,voltage_noise_corner_hz,in,current_noise_corner_hz,rf,rg,rs,rl,cl,noise_at_hz,f_low_hz,f_high_hz,signal_rms,target_pm_deg\n' +
    'non-inverting,2e5,10M,40M,2M,60,8n,20,0.5p,100,9k09,1k,50,2k,1n,1k,10,100k,1,60\n';
  const [same] = objectsOf(batch('columns.csv', columns, '--format', 'jsonl'));
  for (const key of ['noise_density', 'noise_rms', 'snr_db', 'largest_source', 'design_cf']) {
    assert.equal(same[key], rows[0][key], key);
  }

  // A stage with no output resistance meets 60° with any Cf and any Riso: the answer
  // is the lower end of the searched ranges (1 aF, 1 mΩ; src/stage/design.rs), flagged.
  const [free] = objectsOf(
    batch(
      'free.csv',
      'kind,a0,gbw_hz,rf,rg,rl,cl,target_pm_deg\nnon-inverting,1e5,5M,1k,1k,10k,10n,60\n',
      '--format',
      'jsonl',
    ),
  );
  const freeStage = {
    format: 'loopwright-stage',
    version: 1,
    kind: 'non-inverting',
    amplifier: { a0: 1e5, gbwHz: '5M' },
    parts: { rf: '1k', rg: '1k', rl: '10k', cl: '10n' },
  };
  for (const part of ['cf', 'riso']) {
    const d = lw.stageDesign({ stage: freeStage, part, targetPhaseMarginDeg: 60 });
    assert.equal(free[`design_${part}`], d.value, part);
    assert.equal(d.atRangeEnd, true, part);
    assert.equal(free[`design_${part}_at_range_end`], 1, part);
  }

  // The same rows as CSV: the contributor's name is text, the numbers are numbers.
  const csv = batch('stage.csv', text);
  assert.equal(csv.status, 0, csv.stderr);
  const [head, first] = readCsv(csv.output);
  assert.equal(first[head.indexOf('largest_source')], rows[0].largest_source);
  assert.equal(Number(first[head.indexOf('noise_rms')]), rows[0].noise_rms);
});

test('a workbook of the results: numbers stay numbers, formula-like text is neutralised, LibreOffice reads it', async () => {
  const text =
    'topology,a,beta,note\n' +
    'series-shunt,1e5,0.01,=1+1\n' +
    'series-shunt,-3,0.01,-2+3\n' +
    'series-shunt,0x10,0.01,@SUM(A1)\n' +
    'series-shunt,4k7,10m,+x\n';
  for (const format of ['xlsx', 'ods']) {
    const run = batch(`book-${format}.csv`, text, '--format', format);
    assert.equal(run.status, 0, run.stderr);
    assert.match(run.stderr, /4 rows in, 3 written with results, 1 reported with an error/);
    const path = join(dir, `book-${format}.csv.out.${format}`);
    const bytes = readFileSync(path);
    assert.equal(bytes.subarray(0, 2).toString('latin1'), 'PK', 'a zip archive');
    if (existsSync('/usr/bin/soffice') || process.env.LOOPWRIGHT_REQUIRE_SOFFICE) {
      const out = join(dir, `soffice-${format}`);
      const conv = spawnSync(
        'soffice',
        [
          `-env:UserInstallation=file://${join(dir, `lo-profile-${format}`)}`,
          '--headless',
          '--convert-to',
          'csv:Text - txt - csv (StarCalc):44,34,76,1,,1033,false,true,false,false,false,2',
          '--outdir',
          out,
          path,
        ],
        { encoding: 'utf8', timeout: 120_000 },
      );
      assert.equal(conv.status, 0, conv.stderr);
      const name = `book-${format}.csv.out-Results.csv`;
      const results = readCsv(readFileSync(join(out, name), 'utf8'));
      const col = (n) => results[0].indexOf(n);
      // LibreOffice shows the neutralised texts as texts, the numbers as numbers
      // (the CSV export writes a number without quotes and as computed).
      assert.equal(results[1][col('note')], "'=1+1");
      assert.equal(results[2][col('note')], "'-2+3");
      assert.equal(results[3][col('note')], "'@SUM(A1)");
      assert.equal(results[4][col('note')], "'+x");
      assert.equal(Number(results[2][col('a')]), -3);
      // Af = A/(1 + Aβ) = 10⁵/1001 (Sedra & Smith, 7th ed., section 10.1, from memory),
      // to the 15 significant digits LibreOffice's CSV export writes (tests/sheet_files_engine.rs).
      near(Number(results[1][col('closed_loop_gain')]), 1e5 / 1001, 1e-12, 'Af');
      assert.match(results[3][col('error')], /^syntax a/);
    }
  }
  // A workbook needs a file to go to.
  const noFile = spawnSync(
    process.execPath,
    [TOOL, join(dir, 'book-xlsx.csv'), '--format', 'ods'],
    {
      encoding: 'utf8',
    },
  );
  assert.equal(noFile.status, 2);
  assert.match(noFile.stderr, /--format ods needs -o FILE/);
});

test('the usage text names every step and the columns of every area', () => {
  const help = spawnSync(process.execPath, [TOOL, '--help'], { encoding: 'utf8' });
  assert.equal(help.status, 0);
  for (const word of [
    'freq',
    'loop',
    'noise',
    'distortion',
    'eseries',
    'pair',
    'design',
    'a_poles_hz',
    'noise_at_hz',
    'target_pm_deg',
    'pair_target',
    'jsonl',
    'xlsx',
  ]) {
    assert.match(help.stdout, new RegExp(`\\b${word}\\b`), word);
  }
});

test('BatchRun and tableFile refuse a bad format or a wrong type by the caller’s name', async () => {
  const { BatchRun } = await api();
  const { tableFile } = await import(join(ROOT, 'pkg', 'sheetfiles.mjs'));
  const refused = (f, code, param) =>
    assert.throws(f, (e) => e.name === 'LoopwrightError' && e.code === code && e.param === param);
  refused(() => new BatchRun(undefined, 'xml'), 'unknown_name', 'format');
  refused(() => new BatchRun(undefined, 5), 'wrong_type', 'format');
  refused(() => new BatchRun('stage,fft'), 'unknown_name', 'compute');
  refused(() => tableFile('a\n1\n', 'csv'), 'unknown_name', 'format');
  refused(() => tableFile(42, 'xlsx'), 'wrong_type', 'csvText');
  // A record that breaks RFC 4180 is refused naming its line; nothing is written.
  refused(() => tableFile('a\n"open\n', 'ods'), 'malformed', 'file');
  // JSON lines from the API, fed in two chunks that split a record.
  const run = new BatchRun('stage', 'jsonl');
  const enc = new TextEncoder();
  let out = run.feed(enc.encode('a,beta\n1e5,0.0'));
  out += run.feed(enc.encode('1\n')) + run.finish();
  const row = JSON.parse(out.trim());
  // Af = A/(1 + Aβ) = 10⁵/1001 (Sedra & Smith, 7th ed., section 10.1, from memory).
  assert.ok(Math.abs(row.closed_loop_gain - 1e5 / 1001) < 1e-9);
  assert.deepEqual([run.rowsIn, run.rowsWritten, run.rowsReported], [1, 1, 0]);
});

test('tolerance rows give what stageTolerance gives for the same stage, spreads, spec and seed', async () => {
  const lw = await api();
  // The phase-margin stage of bench/tolerance_cases.mjs: Rf = Rg = 1k, A0
  // 5e4/2e5/1e6, GBW 10 MHz, a second pole at 8 MHz.
  const stage = {
    format: 'loopwright-stage',
    version: 1,
    kind: 'non-inverting',
    amplifier: { a0: { min: 5e4, typ: 2e5, max: 1e6 }, gbwHz: 1e7, polesHz: [8e6] },
    parts: { rf: 1e3, rg: 1e3 },
  };
  const header =
    'stage,rf_tol,rg_tol,gain_at_hz,gain_min_db,gain_max_db,pm_min_deg,tol_trials,tol_seed';
  const doc = field(JSON.stringify(stage));
  const text =
    `${header}\n` +
    `${doc},1,2,1M,5.9,6.1,61,400,7\n` +
    `${doc},1,,,,,55,300,\n` +
    // A tolerance of 100 % or more, and a lower gain limit above the upper one.
    `${doc},100,1,1M,5.9,6.1,61,400,7\n` +
    `${doc},1,1,1M,6.1,5.9,,400,7\n`;
  const rows = objectsOf(batch('tol.csv', text, '--format', 'jsonl', '--compute', 'tolerance'));
  assert.equal(rows.length, 4);
  // Reference: stageTolerance of the JS API (worst case and Monte Carlo of the
  // core, src/tolerance) with the row's spreads, spec, seed and trials.
  const cases = [
    {
      parts: [
        { part: 'rf', tolerance: { distribution: 'uniform', percent: 1 } },
        { part: 'rg', tolerance: { distribution: 'uniform', percent: 2 } },
      ],
      spec: [
        { figure: 'gainDb', freqHz: 1e6, lower: 5.9, upper: 6.1 },
        { figure: 'phaseMarginDeg', lower: 61 },
      ],
      trials: 400,
      seed: 7,
    },
    {
      parts: [{ part: 'rf', tolerance: { distribution: 'uniform', percent: 1 } }],
      spec: [{ figure: 'phaseMarginDeg', lower: 55 }],
      trials: 300,
      seed: 1,
    },
  ];
  for (const [k, c] of cases.entries()) {
    const row = rows[k];
    assert.equal(row.error, null, row.error);
    const r = lw.stageTolerance({
      stage,
      parts: c.parts,
      spec: c.spec,
      analyses: ['worstCase', 'monteCarlo'],
      trials: c.trials,
      seed: c.seed,
      keepFailures: 0,
    });
    const gain = c.spec.findIndex((l) => l.figure === 'gainDb');
    const pm = c.spec.findIndex((l) => l.figure === 'phaseMarginDeg');
    const wc = (i, end) => (i < 0 ? null : r.worstCase.figures[i][end].value);
    const share = (i) => (i < 0 ? null : r.monteCarlo.limits[i].yieldFraction);
    assert.equal(row.tol_gain_min_db, wc(gain, 'min'));
    assert.equal(row.tol_gain_max_db, wc(gain, 'max'));
    assert.equal(row.tol_pm_min_deg, wc(pm, 'min'));
    assert.equal(row.tol_pm_max_deg, wc(pm, 'max'));
    assert.equal(row.tol_yield, r.monteCarlo.yieldFraction);
    assert.equal(row.tol_gain_yield, share(gain));
    assert.equal(row.tol_pm_yield, share(pm));
  }
  assert.match(rows[2].error, /rf_tol/);
  assert.match(rows[3].error, /gain_max_db/);
});

test('circuit tolerance rows give what stageTolerance gives for the same circuit, ports and spreads', async () => {
  const lw = await api();
  // Two cascaded non-inverting stages (gain 10, then 5), the "twoamp" of
  // tests/reference/tolerance_stage.py, with the GBW spreads of both amplifiers.
  const amp = (name, out, plus, minus, a0, gbwHz) => ({
    name,
    kind: 'amplifier',
    nodes: [out, '0'],
    control: [plus, minus],
    model: { a0, gbwHz, ro: 0 },
  });
  const r = (name, a, b, value) => ({
    name,
    kind: 'resistor',
    nodes: [a, b],
    value,
    tolerance: { distribution: 'uniform', percent: 1 },
  });
  const circuit = {
    format: 'loopwright-circuit',
    version: 2,
    elements: [
      { name: 'Vs', kind: 'voltage-source', nodes: ['in', '0'], value: 1 },
      amp('U1', 'o1', 'in', 'f1', { min: 5e4, typ: 2e5, max: 1e6 }, 1e7),
      r('Rf1', 'o1', 'f1', '9k'),
      r('Rg1', 'f1', '0', '1k'),
      amp('U2', 'out', 'o1', 'f2', { typ: 1e5 }, 5e6),
      r('Rf2', 'out', 'f2', '4k'),
      r('Rg2', 'f2', '0', '1k'),
    ],
  };
  const amplifierSpread = {
    U1: { gbwHz: { min: 7e6, typ: 1e7, max: 1.3e7 } },
    U2: { gbwHz: { min: 3.5e6, typ: 5e6, max: 6.5e6 } },
  };
  const header =
    'circuit,input,output,output_element,controlled,amplifier_spread,gain_at_hz,gain_min_db,pm_min_deg,tol_trials,tol_seed';
  const doc = field(JSON.stringify(circuit));
  const spreads = field(JSON.stringify(amplifierSpread));
  const text =
    `${header}\n` +
    `${doc},Vs,out,,U2,${spreads},200k,33.55,80,300,5\n` +
    // Both an output node and an output element: refused naming the column.
    `${doc},Vs,out,Rf2,U2,${spreads},200k,33.55,80,300,5\n`;
  const rows = objectsOf(batch('tolc.csv', text, '--format', 'jsonl', '--compute', 'tolerance'));
  assert.equal(rows.length, 2);
  assert.equal(rows[0].error, null, rows[0].error);
  // Reference: stageTolerance of the JS API (the core's worst case and Monte
  // Carlo, src/tolerance) with the row's circuit, ports, spreads, spec and seed.
  const res = lw.stageTolerance({
    circuit,
    input: 'Vs',
    output: 'out',
    controlled: 'U2',
    amplifierSpread,
    spec: [
      { figure: 'gainDb', freqHz: 2e5, lower: 33.55 },
      { figure: 'phaseMarginDeg', lower: 80 },
    ],
    analyses: ['worstCase', 'monteCarlo'],
    trials: 300,
    seed: 5,
    keepFailures: 0,
  });
  const [gain, pm] = res.worstCase.figures;
  assert.equal(rows[0].tol_gain_min_db, gain.min.value);
  assert.equal(rows[0].tol_gain_max_db, gain.max.value);
  assert.equal(rows[0].tol_pm_min_deg, pm.min.value);
  assert.equal(rows[0].tol_pm_max_deg, pm.max.value);
  assert.equal(rows[0].tol_yield, res.monteCarlo.yieldFraction);
  assert.equal(rows[0].tol_gain_yield, res.monteCarlo.limits[0].yieldFraction);
  assert.equal(rows[0].tol_pm_yield, res.monteCarlo.limits[1].yieldFraction);
  assert.match(rows[1].error, /output_element/);
});
