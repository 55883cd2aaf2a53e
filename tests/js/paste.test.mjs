// The worksheet's CSV/TSV paths through the built package in Node: a pasted text too
// large to take is refused before it is copied into the module, and the sheet stays
// readable and unchanged; exports neutralise formula-like text and keep numbers.
// Needs `scripts/build-package.sh` (make test runs it first).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { ROOT } from './browser.mjs';

const lw = await import(pathToFileURL(join(ROOT, 'pkg', 'node.mjs')).href);

function sheet() {
  const ws = new lw.Worksheet();
  ws.setCell('A1', '4k7');
  ws.setCell('A2', '=A1*2');
  ws.setCell('B1', '\'=HYPERLINK("http://x";"y")');
  return ws;
}

const refused = (code, param) => (e) =>
  e.name === 'LoopwrightError' && e.code === code && e.param === param;

test('a paste of 3·10⁸ tabs is refused by size and leaves the sheet readable and as it was', () => {
  const ws = sheet();
  const before = ws.saveDocument();
  for (let i = 0; i < 2; i++)
    assert.throws(() => ws.pasteTsv('A3', '\t'.repeat(3e8)), refused('too_large', 'text'));
  // 4k7 · 2 = 9400 (the IEC 60062 letter code: 4k7 = 4.7 k).
  assert.equal(ws.value('A2').number, 9400);
  assert.equal(ws.saveDocument(), before);
  assert.deepEqual(ws.setCell('A1', '1k'), ['A1', 'A2']);
});

test('too many fields, a row too long, or a non-string are refused; the sheet is unchanged', () => {
  const ws = sheet();
  const before = ws.saveDocument();
  const row = `${'1\t'.repeat(9)}1\n`;
  assert.throws(() => ws.pasteTsv('A3', row.repeat(10_001)), refused('too_large', 'range'));
  assert.throws(() => ws.pasteTsv('A3', '\t'.repeat(70_000)), refused('too_large', 'text'));
  assert.throws(() => ws.pasteTsv('A3', 5), refused('wrong_type', 'text'));
  assert.equal(ws.saveDocument(), before);
  assert.equal(ws.value('A2').number, 9400);
  // Within the limits the same rows go in: 1 000 rows of 10 fields.
  assert.equal(ws.pasteTsv('C1', row.repeat(1_000)).length, 10_000);
  assert.equal(ws.value('L1000').number, 1);
});

test('CSV and TSV exports neutralise formula-like text and keep numbers as numbers', () => {
  const ws = sheet();
  ws.setCell('C1', '-2.5');
  ws.setCell('D1', "'-2+3");
  assert.equal(ws.toCsv(), '4700,"\'=HYPERLINK(""http://x"";""y"")",-2.5,\'-2+3\r\n9400,,,\r\n');
  const tsv = ws.rangeToTsv('A1:D1');
  assert.equal(tsv, '4700\t"\'=HYPERLINK(""http://x"";""y"")"\t-2.5\t\'-2+3\n');
  ws.pasteTsv('A5', tsv);
  assert.equal(ws.value('B5').text, '=HYPERLINK("http://x";"y")');
  assert.equal(ws.value('D5').text, '-2+3');
  assert.equal(ws.value('C5').number, -2.5);
});
