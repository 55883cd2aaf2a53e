// Spreadsheet files on the worksheet page, driven as a person would: the demo
// exported as .ods and .xlsx, each imported back (the sheet comes back the same,
// byte for byte in its saved document), and a broken file refused with the sheet
// left as it was. Expected values are the sheet's own (the round trip is the oracle).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { servedPageTests, ARTIFACTS, ROOT } from './browser.mjs';

const env = servedPageTests();

async function openSheet(context, url = env.url) {
  const page = await context.newPage();
  const problems = [];
  const requested = [];
  page.on('request', (r) => {
    const u = new URL(r.url());
    // data: URLs (the single file's icon) are not requests for files.
    if (u.protocol !== 'data:') requested.push(u.pathname);
  });
  page.on('console', (msg) => {
    if (msg.type() === 'error') problems.push(msg.text());
  });
  page.on('pageerror', (err) => problems.push(err.message));
  await page.goto(url);
  await page.waitForSelector('html[data-ready="true"]');
  await page.click('#tab-sheet');
  return { page, problems, requested };
}

const shown = async (page, a) => (await page.locator(`#cell-${a}`).textContent()).trim();

async function saved(page) {
  const [download] = await Promise.all([page.waitForEvent('download'), page.click('#sheet-save')]);
  return readFileSync(await download.path(), 'utf8');
}

async function note(page, pattern) {
  await page.waitForFunction(
    (source) => new RegExp(source).test(document.querySelector('.sheet-note').textContent),
    pattern.source,
  );
  return page.locator('.sheet-note').textContent();
}

test('the demo exported as .ods and .xlsx comes back the same; a broken file changes nothing', async () => {
  const context = await env.browser.newContext({ acceptDownloads: true });
  const { page, problems, requested } = await openSheet(context);
  await page.click('#sheet-demo');
  // The file-format module is not loaded with the page, only on the first export.
  assert.deepEqual(
    requested.filter((p) => p.includes('/sheetfiles/')),
    [],
  );
  await page.waitForFunction(() => document.querySelector('#cell-B8').textContent.trim() !== '');
  const demo = await saved(page);
  const b8 = await shown(page, 'B8');
  for (const format of ['ods', 'xlsx']) {
    const [download] = await Promise.all([
      page.waitForEvent('download'),
      page.click(`#sheet-export-${format}`),
    ]);
    assert.equal(download.suggestedFilename(), `worksheet.${format}`);
    assert.ok(requested.some((p) => p.endsWith('/pkg/sheetfiles/loopwright_bg.wasm')));
    const path = join(ARTIFACTS, `demo.${format}`);
    await download.saveAs(path);
    // Both formats are zip archives (PK, ISO/IEC 21320-1).
    assert.equal(readFileSync(path).subarray(0, 2).toString('latin1'), 'PK');
    // Clear a cell (another for each format, so that each replaced sheet is new),
    // then import: the import replaces the sheet, with an undo.
    await page.click(format === 'ods' ? '#cell-A1' : '#cell-A3');
    await page.keyboard.press('Delete');
    await page.setInputFiles('#sheet-import-file', path);
    await note(page, new RegExp(`Imported "demo\\.${format}"`));
    assert.equal(await page.locator('#sheet-undo').count(), 1);
    assert.equal(await shown(page, 'B8'), b8);
    assert.equal(await saved(page), demo, `${format}: the same document after the round trip`);
  }
  // Nothing typed is lost: the undo puts back the sheet the last import replaced
  // (the demo without A3).
  await page.click('#sheet-undo');
  await note(page, /is back/);
  assert.equal(await shown(page, 'A3'), '');
  assert.equal(await shown(page, 'B8'), b8);
  const before = await saved(page);
  // A truncated workbook is refused; the sheet keeps what it had.
  const whole = readFileSync(join(ARTIFACTS, 'demo.xlsx'));
  const broken = join(ARTIFACTS, 'broken.xlsx');
  writeFileSync(broken, whole.subarray(0, whole.length >> 1));
  await page.setInputFiles('#sheet-import-file', broken);
  const said = await note(page, /was not imported/);
  assert.match(said, /zip archive/);
  assert.match(said, /The sheet is as it was/);
  assert.equal(await saved(page), before);
  assert.deepEqual(problems, []);
  await context.close();
});

test('the single-file page exports and imports a workbook from file:// with no request', async () => {
  // dist/loopwright.html (make single) carries the spreadsheet-file module inlined.
  const file = pathToFileURL(join(ROOT, 'dist', 'loopwright.html')).href;
  const context = await env.browser.newContext({ acceptDownloads: true });
  const { page, problems, requested } = await openSheet(context, file);
  await page.click('#sheet-demo');
  await page.waitForFunction(() => document.querySelector('#cell-B8').textContent.trim() !== '');
  const demo = await saved(page);
  const b8 = await shown(page, 'B8');
  const [download] = await Promise.all([
    page.waitForEvent('download'),
    page.click('#sheet-export-xlsx'),
  ]);
  const path = join(ARTIFACTS, 'single-demo.xlsx');
  await download.saveAs(path);
  // A zip archive (PK, ISO/IEC 21320-1).
  assert.equal(readFileSync(path).subarray(0, 2).toString('latin1'), 'PK');
  await page.click('#cell-A3');
  await page.keyboard.press('Delete');
  await page.setInputFiles('#sheet-import-file', path);
  await note(page, /Imported "single-demo\.xlsx"/);
  assert.equal(await shown(page, 'B8'), b8);
  assert.equal(await saved(page), demo, 'the same document after the round trip');
  await page.screenshot({ path: join(ARTIFACTS, 'single-sheetfiles.png') });
  // Nothing fetched: the page is one file, the module's wasm inlined in it.
  assert.deepEqual(
    requested.filter((p) => !p.endsWith('/dist/loopwright.html')),
    [],
  );
  assert.deepEqual(problems, []);
  await context.close();
});

// Benchmark, not a timed assert: export and import of a 10 000-cell worksheet in the
// browser (target under 300 ms each), printed for the report.
test('benchmark: 10 000 cells exported and imported in the browser', async () => {
  const context = await env.browser.newContext();
  const { page, problems } = await openSheet(context);
  const figures = await page.evaluate(async () => {
    const files = await import('/pkg/sheetfiles/loopwright.js');
    await files.default();
    const cells = {};
    for (let r = 1; r <= 2500; r++) {
      cells[`A${r}`] = `${r}k7`;
      cells[`B${r}`] = `=A${r}*2+SQRT(A${r})`;
      cells[`C${r}`] = `=FEEDBACK.GAIN(A${r}; 0.01)`;
      cells[`D${r}`] = `row ${r}`;
    }
    const document = `${JSON.stringify({ format: 'loopwright-sheet', version: 1, cells, names: {} }, null, 2)}\n`;
    const out = {};
    for (const format of ['ods', 'xlsx']) {
      const best = { export: Infinity, import: Infinity };
      let bytes;
      for (let run = 0; run < 3; run++) {
        let t = performance.now();
        bytes = files.exportSheetFile(document, format, '2026-12-03T12:00:00Z');
        best.export = Math.min(best.export, performance.now() - t);
        t = performance.now();
        const back = files.importSheetFile(bytes, format);
        best.import = Math.min(best.import, performance.now() - t);
        if (back.problems.length > 0) throw new Error(back.problems[0]);
      }
      out[format] = { ...best, bytes: bytes.length };
    }
    return out;
  });
  for (const [format, f] of Object.entries(figures)) {
    console.log(
      `sheetfiles benchmark ${format}: 10 000 cells, export ${f.export.toFixed(1)} ms, import ${f.import.toFixed(1)} ms, file ${f.bytes} bytes (best of 3, Chromium)`,
    );
    assert.ok(f.bytes > 0);
  }
  assert.deepEqual(problems, []);
  await context.close();
});
