// The batch tool (pkg/bin/loopwright-batch.mjs of the built package) on files that
// break CSV in the ways people's files do: a stray quote, embedded quotes, a quoted
// line break, blank lines, a duplicated column, values that are not numbers, text
// that a spreadsheet would run as a formula; on 200 000 rows, with the proof that
// rows in = rows written + rows reported. Needs `scripts/build-package.sh` (make test
// runs it first).

import { test, before, after } from 'node:test';
import assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync, rmSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { ROOT } from './browser.mjs';

const TOOL = join(ROOT, 'pkg', 'bin', 'loopwright-batch.mjs');
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
  const output = join(dir, `${name}.out.csv`);
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
      bad.set(i, 'out_of_domain a');
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
  run = batch('step.csv', 'a,beta\n1e5,0.01\n', '--compute', 'noise');
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
  assert.match(rows[1].at(-1), /^out_of_domain a: /, '0x2710 is not a number');
  assert.equal(rows[2].at(-1), '', '4k7 is read by the IEC 60062 letter code');
  assert.match(rows[3].at(-1), /^out_of_domain a: /, 'no digit grouping guessed');
});
