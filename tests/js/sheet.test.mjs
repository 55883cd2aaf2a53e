// The worksheet driven as a person would: keyboard entry and navigation, formulas
// and error values, range copy and paste as TSV, save and open, the share link,
// autosave recovery, the demo and the help panel. Expected values are worked by
// hand beside each check.

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { servedPageTests, ARTIFACTS, ROOT } from './browser.mjs';

const env = servedPageTests();

async function openSheet(context, address = env.url) {
  const page = await context.newPage();
  const problems = [];
  page.on('console', (msg) => {
    if (msg.type() === 'error') problems.push(msg.text());
  });
  page.on('pageerror', (err) => problems.push(err.message));
  await page.goto(address);
  await page.waitForSelector('html[data-ready="true"]');
  // Keyboard only: from the first tab, the arrow key selects the worksheet tab.
  await page.focus('#tab-cards');
  await page.keyboard.press('ArrowRight');
  assert.equal(await page.getAttribute('#tab-sheet', 'aria-selected'), 'true');
  return { page, problems };
}

const cell = (page, a) => page.locator(`#cell-${a}`);
const shown = async (page, a) => (await cell(page, a).textContent()).trim();

/** The link the share button makes now (not one an earlier click left in the field). */
async function shareLink(page) {
  const before = await page.evaluate(() => document.querySelector('.sheet-share')?.value ?? '');
  await page.click('#sheet-share');
  await page.waitForFunction((old) => {
    const value = document.querySelector('.sheet-share').value;
    return value !== '' && value !== old;
  }, before);
  return page.inputValue('.sheet-share');
}

async function typeAt(page, address, text) {
  await cell(page, address).click();
  await page.keyboard.type(text);
  await page.keyboard.press('Enter');
}

test('keyboard entry, formulas, navigation and error values', async () => {
  const context = await env.browser.newContext();
  const { page, problems } = await openSheet(context);
  await cell(page, 'A1').focus();
  // Typing starts an edit in the formula bar; Enter commits and moves down.
  await page.keyboard.type('4k7');
  await page.keyboard.press('Enter');
  await page.keyboard.type('=A1*2');
  await page.keyboard.press('Enter');
  assert.equal(await page.evaluate(() => document.activeElement.id), 'cell-A3');
  // IEC 60062: 4k7 = 4700; doubled 9400; shown by the one display (docs/notation.md).
  assert.equal(await shown(page, 'A1'), '4.7 k');
  assert.equal(await shown(page, 'A2'), '9.4 k');
  // Arrow keys move (Tab leaves the grid: page-fixes.test.mjs).
  await page.keyboard.press('ArrowUp');
  await page.keyboard.press('ArrowRight');
  assert.equal(await page.evaluate(() => document.activeElement.id), 'cell-B2');
  // OpenFormula: 1/0 is #DIV/0!, explained on focus and on hover.
  await page.keyboard.type('=1/0');
  await page.keyboard.press('Enter');
  assert.equal(await shown(page, 'B2'), '#DIV/0!');
  await cell(page, 'B2').focus();
  await page.keyboard.press('ArrowDown');
  await page.keyboard.press('ArrowUp');
  assert.match(await page.locator('#sheet-explain').textContent(), /#DIV\/0!/);
  assert.match(await cell(page, 'B2').getAttribute('title'), /#DIV\/0!/);
  // A circular reference is an error value in every cell of the cycle.
  await typeAt(page, 'C1', '=C2+1');
  await typeAt(page, 'C2', '=C1+1');
  assert.match(await shown(page, 'C1'), /^#/);
  assert.match(await shown(page, 'C2'), /^#/);
  // Editing an input changes its dependents.
  await typeAt(page, 'A1', '1k');
  assert.equal(await shown(page, 'A2'), '2 k');
  // Delete clears the selected cell; its dependent follows.
  await cell(page, 'A1').click();
  await page.keyboard.press('Delete');
  assert.equal(await shown(page, 'A1'), '');
  assert.equal(await shown(page, 'A2'), '0');
  assert.deepEqual(problems, []);
  await context.close();
});

test('copy and paste of a range as TSV', async () => {
  const context = await env.browser.newContext({
    permissions: ['clipboard-read', 'clipboard-write'],
  });
  const { page, problems } = await openSheet(context);
  await typeAt(page, 'A1', '1');
  await typeAt(page, 'A2', '2');
  await typeAt(page, 'B1', '=A1*10');
  await typeAt(page, 'B2', '=A2*10');
  // Select A1:B2 with the keyboard and copy.
  await cell(page, 'A1').click();
  await page.keyboard.press('Shift+ArrowRight');
  await page.keyboard.press('Shift+ArrowDown');
  assert.equal(await page.inputValue('#sheet-namebox'), 'A1:B2');
  await page.keyboard.press('Control+C');
  const copied = await page.evaluate(() => navigator.clipboard.readText());
  assert.equal(copied.replace(/\r?\n$/, ''), '1\t10\n2\t20');
  // Paste TSV from another spreadsheet at D5.
  await page.evaluate(() => navigator.clipboard.writeText('3.3\t4k7\n=D5*2\ttext'));
  await cell(page, 'D5').click();
  await page.keyboard.press('Control+V');
  assert.equal(await shown(page, 'D5'), '3.3');
  assert.equal(await shown(page, 'E5'), '4.7 k');
  assert.equal(await shown(page, 'D6'), '6.6');
  assert.equal(await shown(page, 'E6'), 'text');
  assert.deepEqual(problems, []);
  await context.close();
});

test('save to a file and open it again, nothing lost', async () => {
  const context = await env.browser.newContext({ acceptDownloads: true });
  const { page } = await openSheet(context);
  await typeAt(page, 'A1', '100k');
  await typeAt(page, 'A2', '=FEEDBACK.GAIN(A1; 0.01)');
  await typeAt(page, 'A3', 'a note with ; and "quotes"');
  const [download] = await Promise.all([page.waitForEvent('download'), page.click('#sheet-save')]);
  const path = join(ARTIFACTS, 'saved.loopwright.json');
  await download.saveAs(path);
  const saved = readFileSync(path, 'utf8');
  assert.match(saved, /"format": "loopwright-sheet"/);
  // A fresh browser profile (no autosave) opens the file.
  const other = await env.browser.newContext({ acceptDownloads: true });
  const { page: page2, problems } = await openSheet(other);
  await page2.setInputFiles('#sheet-file', path);
  await page2.waitForFunction(() => document.querySelector('#cell-A2').textContent.trim() !== '');
  // Af = 10⁵/(1 + 10⁵·0.01) = 99.90 (closed form).
  assert.equal(await shown(page2, 'A2'), '99.9001');
  assert.equal(await shown(page2, 'A3'), 'a note with ; and "quotes"');
  // Save again: byte-identical.
  const [d2] = await Promise.all([page2.waitForEvent('download'), page2.click('#sheet-save')]);
  assert.equal(readFileSync(await d2.path(), 'utf8'), saved);
  // A malformed file is refused whole, and the sheet keeps what it had.
  const bad = join(ARTIFACTS, 'bad.loopwright.json');
  (await import('node:fs')).writeFileSync(
    bad,
    '{"format": "loopwright-sheet", "version": 99, "cells": {}}',
  );
  await page2.setInputFiles('#sheet-file', bad);
  await page2.waitForFunction(() =>
    /not loaded/.test(document.querySelector('.sheet-note').textContent),
  );
  assert.equal(await shown(page2, 'A2'), '99.9001');
  assert.deepEqual(problems, []);
  await other.close();
  await context.close();
});

test('share link carries the sheet; autosave recovers after a reload', async () => {
  const context = await env.browser.newContext();
  const { page } = await openSheet(context);
  await typeAt(page, 'B3', '2.2n');
  await typeAt(page, 'B4', '=B3*1000');
  const link = await shareLink(page);
  assert.match(link, /#sheet=[A-Za-z0-9_-]+$/);
  // Autosave: reload the same page, the sheet comes back.
  await page.waitForTimeout(500);
  await page.reload();
  await page.waitForSelector('html[data-ready="true"]');
  assert.match(await page.locator('.sheet-note').textContent(), /Recovered/);
  // 2.2n·1000 = 2.2µ, shown with its SI prefix; the tooltip keeps full precision.
  assert.equal(await shown(page, 'B4'), '2.2 µ');
  assert.equal(await page.evaluate(() => document.querySelector('#cell-B3').title), '2.2e-9');
  // The link opens in a fresh profile with the same sheet.
  const other = await env.browser.newContext();
  const { page: page2, problems } = await openSheet(other, link);
  assert.equal(
    await page2.evaluate(() => document.querySelector('#cell-B4').title),
    await page.evaluate(() => document.querySelector('#cell-B4').title),
  );
  assert.match(await page2.locator('.sheet-note').textContent(), /from the link/);
  assert.ok(!page2.url().includes('#sheet='), 'the fragment is dropped after opening');
  // A damaged link says so and leaves an empty, working sheet.
  const { page: page3, problems: p3 } = await openSheet(other, `${env.url}#sheet=%%%`);
  assert.match(await page3.locator('.sheet-note').textContent(), /could not be read/);
  assert.deepEqual(problems, []);
  assert.deepEqual(p3, []);
  await other.close();
  await context.close();
});

test('naming a cell from the name box, and going to an address', async () => {
  const context = await env.browser.newContext();
  const { page, problems } = await openSheet(context);
  await typeAt(page, 'B2', '250k');
  await cell(page, 'B2').click();
  await page.fill('#sheet-namebox', 'aol');
  await page.press('#sheet-namebox', 'Enter');
  // The confirmation stays on screen (it was cleared at once before).
  assert.equal(await page.locator('#sheet-explain').textContent(), 'B2 is now named aol.');
  // A name alone is autosaved: a reload keeps it.
  await autosaveHas(page, '"aol"');
  await typeAt(page, 'C2', '=FEEDBACK.GAIN(aol; 0.1)');
  // Af = 250 000/(1 + 25 000) = 9.9996 (closed form).
  assert.equal(await shown(page, 'C2'), '9.9996');
  await page.fill('#sheet-namebox', 'Z200');
  await page.press('#sheet-namebox', 'Enter');
  assert.equal(await page.evaluate(() => document.activeElement.id), 'cell-Z200');
  // A name that is not an identifier is refused, as text, running nothing.
  await page.fill('#sheet-namebox', '<img src=x onerror=alert(1)>');
  await page.press('#sheet-namebox', 'Enter');
  assert.match(await page.locator('#sheet-explain').textContent(), /not set/);
  assert.equal(await page.locator('.sheet-explain img').count(), 0);
  assert.deepEqual(problems, []);
  await context.close();
});

test('script-like text in cells renders as text and runs nothing', async () => {
  const context = await env.browser.newContext();
  const { page, problems } = await openSheet(context);
  const payload = '<img src=x onerror="document.title=\'pwned\'">';
  await typeAt(page, 'A1', payload);
  await typeAt(page, 'A2', '="<script>alert(1)</script>"&"x"');
  assert.equal(await shown(page, 'A1'), payload);
  assert.equal(await page.locator('.sheet-grid img, .sheet-grid script').count(), 0);
  assert.notEqual(await page.title(), 'pwned');
  // The same payload through a share link.
  const link = await shareLink(page);
  const { page: page2 } = await openSheet(context, link);
  assert.equal(await shown(page2, 'A1'), payload);
  assert.equal(await page2.locator('.sheet-grid img').count(), 0);
  assert.deepEqual(problems, []);
  await context.close();
});

test('the demo loads without error values; help comes from the catalog', async () => {
  const context = await env.browser.newContext({ viewport: { width: 1280, height: 900 } });
  const { page, problems } = await openSheet(context);
  await page.click('#sheet-demo');
  await page.waitForFunction(() => document.querySelector('#cell-B8').textContent.trim() !== '');
  assert.equal(await page.locator('.sheet-grid td.k-error').count(), 0);
  // β for Af = 40 with A = 250 000: 1/40 − 1/250000 = 0.024996 (closed form).
  assert.equal(await shown(page, 'B7'), '24.996 m');
  // The help panel lists the catalog and filters it.
  const all = await page.locator('.help-fn').count();
  assert.ok(all >= 30, `${all} functions in the help`);
  await page.fill('.help-search', 'sensitivity');
  assert.ok((await page.locator('.help-fn').count()) < all);
  // "use" puts the example into the formula bar for the active cell.
  await cell(page, 'H2').click();
  await page.locator('.help-fn').first().locator('summary').click();
  await page.locator('.help-fn').first().getByRole('button', { name: 'use' }).first().click();
  assert.match(await page.inputValue('#formula-bar'), /^=FEEDBACK\./);
  await page.keyboard.press('Enter');
  assert.notEqual(await shown(page, 'H2'), '');
  await page.screenshot({ path: join(ARTIFACTS, 'worksheet-demo.png') });
  assert.deepEqual(problems, []);
  await context.close();
});

test('the worksheet at phone width', async () => {
  const context = await env.browser.newContext({ viewport: { width: 390, height: 844 } });
  const { page, problems } = await openSheet(context);
  // With a sheet of one's own, the demo brings its undo and the replaced list.
  await typeAt(page, 'A1', 'mine');
  await page.click('#sheet-demo');
  await page.waitForSelector('#sheet-undo');
  await page.click('#sheet-replaced summary');
  const overflow = await page.evaluate(
    () => document.documentElement.scrollWidth - window.innerWidth,
  );
  assert.ok(overflow <= 0, `page is ${overflow}px wider than the viewport`);
  await page.screenshot({ path: join(ARTIFACTS, 'worksheet-390px.png'), fullPage: false });
  assert.deepEqual(problems, []);
  await context.close();
});

// ---- No path loses a sheet: links, refused links, large sheets, the demo. ----

const AUTOSAVE_KEY = 'loopwright.sheet.autosave';
const REPLACED_KEY = 'loopwright.sheet.replaced';

const stored = (page, key) => page.evaluate((k) => localStorage.getItem(k), key);

/** Wait until the autosave holds `needle` (a plain autosave, as small sheets are kept). */
async function autosaveHas(page, needle) {
  await page.waitForFunction(
    ([k, n]) => (localStorage.getItem(k) ?? '').includes(n),
    [AUTOSAVE_KEY, needle],
  );
}

/** Wait until the autosave differs from `before`. */
async function autosaveChanged(page, before) {
  await page.waitForFunction(([k, b]) => localStorage.getItem(k) !== b, [AUTOSAVE_KEY, before]);
}

/** Open a page without choosing a tab: the page decides which view it opens on. */
async function openAsIs(context, address) {
  const page = await context.newPage();
  const problems = [];
  page.on('pageerror', (err) => problems.push(err.message));
  await page.goto(address);
  await page.waitForSelector('html[data-ready="true"]');
  return { page, problems };
}

/** Links to two sheets typed in another browser profile. */
async function twoSharedSheets() {
  const other = await env.browser.newContext();
  const { page } = await openSheet(other);
  await typeAt(page, 'A1', 'sheet A');
  const linkA = await shareLink(page);
  await typeAt(page, 'A1', 'sheet B');
  await typeAt(page, 'B1', '2');
  const linkB = await shareLink(page);
  await other.close();
  return { linkA, linkB };
}

test('own sheet, then link A, then link B: both earlier sheets can be put back', async () => {
  const { linkA, linkB } = await twoSharedSheets();
  const context = await env.browser.newContext();
  const { page } = await openSheet(context);
  await typeAt(page, 'A1', 'own sheet');
  await typeAt(page, 'B1', '42');
  await autosaveHas(page, 'own sheet');
  // Link A opens in a new tab of the same browser, on the worksheet tab.
  const { page: tabA, problems } = await openAsIs(context, linkA);
  assert.equal(await tabA.getAttribute('#tab-sheet', 'aria-selected'), 'true');
  assert.equal(await shown(tabA, 'A1'), 'sheet A');
  assert.match(await tabA.locator('.sheet-note').textContent(), /from the link/);
  assert.equal(await tabA.locator('#sheet-undo').count(), 1);
  // Link B pasted into the address bar of the same tab (only the fragment changes).
  await tabA.goto(linkB);
  await tabA
    .waitForFunction(() => document.querySelector('#cell-A1').textContent === 'sheet B')
    .catch(async (err) => {
      const note = await tabA.locator('.sheet-note').textContent();
      throw new Error(`${err.message}; url ${tabA.url()}; note: ${note}; ${problems}`);
    });
  // The list is drawn once sheet A is packed and kept.
  await tabA.waitForFunction(
    () => document.querySelector('#sheet-replaced summary').textContent === 'Replaced sheets (2)',
  );
  assert.ok(!tabA.url().includes('#sheet='), 'the fragment is dropped');
  const lines = await tabA.locator('.sheet-replaced-list li').allTextContents();
  assert.match(lines[0], /replaced by a share link, 1 cell starting “sheet A” /);
  assert.match(lines[1], /replaced by a share link, 2 cells starting “own sheet” /);
  await tabA.click('#sheet-replaced summary');
  await tabA.screenshot({ path: join(ARTIFACTS, 'worksheet-replaced-sheets.png') });
  // The own sheet comes back, and B joins the list in its place.
  await tabA.click('#sheet-replaced-1');
  await tabA.waitForFunction(() => document.querySelector('#cell-A1').textContent === 'own sheet');
  assert.equal(await shown(tabA, 'B1'), '42');
  await tabA.waitForFunction(() =>
    /is back/.test(document.querySelector('.sheet-note').textContent),
  );
  assert.equal(await tabA.locator('#sheet-replaced summary').textContent(), 'Replaced sheets (2)');
  await autosaveHas(tabA, 'own sheet');
  // A reload keeps the sheet, the worksheet tab and the list.
  await tabA.reload();
  await tabA.waitForSelector('html[data-ready="true"]');
  assert.equal(await tabA.getAttribute('#tab-sheet', 'aria-selected'), 'true');
  assert.equal(await shown(tabA, 'A1'), 'own sheet');
  assert.equal(JSON.parse(await stored(tabA, REPLACED_KEY)).length, 2);
  const after = await tabA.locator('.sheet-replaced-list li').allTextContents();
  assert.match(after[0], /replaced when an earlier sheet was put back, 2 cells starting “sheet B”/);
  assert.match(after[1], /replaced by a share link, 1 cell starting “sheet A”/);
  assert.deepEqual(problems, []);
  await context.close();
});

test('a refused link (version 2) leaves the sheet on screen and in storage', async () => {
  const context = await env.browser.newContext();
  const { page } = await openSheet(context);
  await typeAt(page, 'A1', 'own sheet');
  await typeAt(page, 'A2', '=2*21');
  await autosaveHas(page, '=2*21');
  const autosaveBefore = await stored(page, AUTOSAVE_KEY);
  // A link to a document of a later version, packed the way the page packs links.
  const newer = JSON.stringify({ format: 'loopwright-sheet', version: 2, cells: { A1: 'x' } });
  const fragment = await page.evaluate(
    async (text) => (await import('./js/sheet/share.js')).encodeFragment(text),
    newer,
  );
  const { page: tab, problems } = await openAsIs(context, `${env.url}#${fragment}`);
  assert.match(await tab.locator('.sheet-note').textContent(), /not loaded: .*version/);
  assert.match(await tab.locator('.sheet-note').textContent(), /Your own sheet is shown as it was/);
  assert.equal(await shown(tab, 'A1'), 'own sheet');
  assert.equal(await shown(tab, 'A2'), '42');
  assert.equal(await stored(tab, AUTOSAVE_KEY), autosaveBefore);
  assert.equal(await stored(tab, REPLACED_KEY), null);
  // One edit keeps the rest of the sheet in the autosave.
  assert.equal(await tab.getAttribute('#tab-sheet', 'aria-selected'), 'true');
  await typeAt(tab, 'A3', 'one edit');
  await autosaveHas(tab, 'one edit');
  assert.match(await stored(tab, AUTOSAVE_KEY), /own sheet/);
  await tab.screenshot({ path: join(ARTIFACTS, 'worksheet-refused-link.png') });
  assert.deepEqual(problems, []);
  await context.close();
});

/** A 26 × 200 sheet document of about 6 MB: every cell a text of `cellText(address)`. */
function bigDocument(cellText) {
  const cells = {};
  for (let r = 1; r <= 200; r++)
    for (let c = 0; c < 26; c++) {
      const a = `${String.fromCharCode(65 + c)}${r}`;
      cells[a] = cellText(a);
    }
  return `${JSON.stringify({ format: 'loopwright-sheet', version: 1, cells, names: {} }, null, 2)}\n`;
}

const SIX_MB = 6e6;
/** Characters per cell that make 5 200 cells come to a little over 6 MB. */
const CELL_CHARS = Math.ceil(SIX_MB / 5200);

test('a 6 MB sheet from a file: kept packed when it compresses, else a warning with save', async () => {
  const { randomBytes } = await import('node:crypto');
  const { writeFileSync } = await import('node:fs');
  const prose = 'Loop gain checked at each corner of the amplifier spread. ';
  const plain = bigDocument((a) => `${a} ${prose.repeat(30)}`.slice(0, CELL_CHARS));
  const noise = bigDocument(
    (a) =>
      `${a} ${randomBytes(CELL_CHARS)
        .toString('base64')
        .slice(0, CELL_CHARS - 5)}`,
  );
  assert.ok(plain.length > SIX_MB && noise.length > SIX_MB);
  const plainPath = join(ARTIFACTS, 'six-mb-prose.loopwright.json');
  const noisePath = join(ARTIFACTS, 'six-mb-noise.loopwright.json');
  writeFileSync(plainPath, plain);
  writeFileSync(noisePath, noise);

  const context = await env.browser.newContext({ acceptDownloads: true });
  const { page, problems } = await openSheet(context);
  await typeAt(page, 'A1', 'own sheet');
  await autosaveHas(page, 'own sheet');
  // Compressible: too large for the storage as it is, kept packed, no warning.
  await page.setInputFiles('#sheet-file', plainPath);
  await page.waitForFunction(() =>
    ['packed', 'failed'].includes(document.querySelector('#worksheet').dataset.autosave),
  );
  assert.equal(await page.getAttribute('#worksheet', 'data-autosave'), 'packed');
  assert.ok(await page.locator('#sheet-warning').isHidden());
  assert.match(await stored(page, AUTOSAVE_KEY), /^deflate-raw:/);
  const packedBefore = await stored(page, AUTOSAVE_KEY);
  await typeAt(page, 'B2', 'edited after opening');
  await autosaveChanged(page, packedBefore);
  await page.reload();
  await page.waitForSelector('html[data-ready="true"]');
  assert.equal(await shown(page, 'B2'), 'edited after opening');
  assert.match(await shown(page, 'C3'), /^C3 Loop gain checked/);
  assert.match(await page.locator('.sheet-note').textContent(), /Recovered/);

  // Incompressible: even packed it does not fit. The warning offers the file.
  await page.setInputFiles('#sheet-file', noisePath);
  await page.waitForSelector('#sheet-warning:not([hidden])');
  assert.equal(await page.getAttribute('#worksheet', 'data-autosave'), 'failed');
  assert.match(await page.locator('#sheet-warning').textContent(), /6\.\d MB\) does not fit/);
  await typeAt(page, 'A1', 'typed into the noise');
  await page.waitForTimeout(600);
  const [download] = await Promise.all([
    page.waitForEvent('download'),
    page.click('#sheet-warning-save'),
  ]);
  const savedPath = join(ARTIFACTS, 'six-mb-noise-saved.loopwright.json');
  await download.saveAs(savedPath);
  const saved = JSON.parse(readFileSync(savedPath, 'utf8'));
  assert.equal(saved.cells.A1, 'typed into the noise');
  assert.equal(saved.cells.Z200, JSON.parse(noise).cells.Z200);
  await page.screenshot({ path: join(ARTIFACTS, 'worksheet-autosave-failed.png') });
  // A reload shows the last sheet that was kept, and says that later edits were not.
  await page.reload();
  await page.waitForSelector('html[data-ready="true"]');
  assert.equal(await shown(page, 'B2'), 'edited after opening');
  assert.match(
    await page.locator('.sheet-note').textContent(),
    /could not be kept \(the sheet was 6\.\d MB\)/,
  );
  assert.deepEqual(problems, []);
  await context.close();
});

test('Load demo can be undone: the sheet it replaced comes back', async () => {
  const context = await env.browser.newContext();
  const { page, problems } = await openSheet(context);
  // On an empty sheet there is nothing to undo.
  await page.click('#sheet-demo');
  await page.waitForFunction(() => document.querySelector('#cell-B8').textContent.trim() !== '');
  assert.equal(await page.locator('#sheet-undo').count(), 0);
  await typeAt(page, 'A1', 'my stage');
  await typeAt(page, 'B3', '470');
  await typeAt(page, 'B4', '=B3*2');
  await autosaveHas(page, 'my stage');
  await page.click('#sheet-demo');
  await page.waitForFunction(() =>
    document.querySelector('#cell-A1').textContent.startsWith('Hydrophone'),
  );
  assert.match(await stored(page, AUTOSAVE_KEY), /Hydrophone/);
  await page.screenshot({ path: join(ARTIFACTS, 'worksheet-demo-undo.png') });
  await page.click('#sheet-undo');
  await page.waitForFunction(() => document.querySelector('#cell-A1').textContent === 'my stage');
  assert.equal(await shown(page, 'B4'), '940');
  await autosaveHas(page, 'my stage');
  // The demo is now the replaced sheet, one click from coming back.
  await page.waitForFunction(() =>
    /is back/.test(document.querySelector('.sheet-note').textContent),
  );
  assert.match(
    await page.locator('.sheet-replaced-list li').first().textContent(),
    /when an earlier sheet was put back/,
  );
  assert.deepEqual(problems, []);
  await context.close();
});

test('the CSV export starts with a UTF-8 byte-order mark; the share message from file://', async () => {
  const context = await env.browser.newContext({ acceptDownloads: true });
  const { page, problems } = await openSheet(context);
  await page.click('#sheet-demo');
  await page.waitForFunction(() => document.querySelector('#cell-B8').textContent.trim() !== '');
  const [download] = await Promise.all([page.waitForEvent('download'), page.click('#sheet-csv')]);
  const bytes = readFileSync(await download.path());
  // The UTF-8 encoding of U+FEFF (The Unicode Standard, §23.8).
  assert.deepEqual([...bytes.subarray(0, 3)], [0xef, 0xbb, 0xbf]);
  assert.match(bytes.toString('utf8'), /Preamp phase margin \(°\)/);
  const file = pathToFileURL(join(ROOT, 'dist', 'loopwright.html')).href;
  const { page: local } = await openSheet(context, file);
  await typeAt(local, 'A1', 'local');
  await local.click('#sheet-share');
  await local.waitForFunction(() => document.querySelector('.sheet-share').value !== '');
  const message = await local.locator('.sheet-note').textContent();
  assert.doesNotMatch(message, /anyone/);
  assert.match(message, /opens only on a computer that has that file at the same place/);
  assert.deepEqual(problems, []);
  await context.close();
});

test('the sheet on screen comes first: replaced sheets give up their storage to it', async () => {
  const { randomBytes } = await import('node:crypto');
  const { writeFileSync } = await import('node:fs');
  // Two incompressible sheets of 2.7 MB: one fits in the 5 MiB of local storage
  // (measured: 5 242 308 characters in one item in Chromium), two do not.
  const chars = Math.ceil(2.7e6 / 5200);
  const noisy = (tag) =>
    bigDocument(
      (a) =>
        `${tag} ${a} ${randomBytes(chars)
          .toString('base64')
          .slice(0, chars - 10)}`,
    );
  const paths = ['first', 'second'].map((tag) => {
    const path = join(ARTIFACTS, `noise-2.7mb-${tag}.loopwright.json`);
    writeFileSync(path, noisy(tag));
    return path;
  });
  const context = await env.browser.newContext();
  const { page, problems } = await openSheet(context);
  const storedEntries = async () => JSON.parse((await stored(page, REPLACED_KEY)) ?? '[]').length;
  await page.setInputFiles('#sheet-file', paths[0]);
  await page.waitForFunction(() =>
    document.querySelector('#cell-A1').textContent.startsWith('first'),
  );
  // The demo replaces it: once the autosave has shrunk, the first sheet is stored.
  await page.click('#sheet-demo');
  await page.waitForFunction(() =>
    document.querySelector('#cell-A1').textContent.startsWith('Hydrophone'),
  );
  await page.waitForFunction((k) => localStorage.getItem(k) !== null, REPLACED_KEY);
  assert.equal(await storedEntries(), 1);
  // The second sheet does not fit beside the first: the first gives up its storage.
  await page.setInputFiles('#sheet-file', paths[1]);
  await page.waitForFunction(() =>
    document.querySelector('#cell-A1').textContent.startsWith('second'),
  );
  await page.waitForFunction(
    () => document.querySelector('#worksheet').dataset.autosave === 'packed',
  );
  assert.ok(await page.locator('#sheet-warning').isHidden());
  assert.equal(await storedEntries(), 1);
  const lines = await page.locator('.sheet-replaced-list li').allTextContents();
  assert.equal(lines.length, 2);
  assert.match(lines[0], /by the file "noise-2\.7mb-second.*starting “Hydrophone/);
  assert.match(lines[1], /starting “first A1.*kept only until this page is closed: no room/);
  // Within this page it can still be put back.
  await page.click('#sheet-replaced summary');
  await page.click('#sheet-replaced-1');
  await page.waitForFunction(() =>
    document.querySelector('#cell-A1').textContent.startsWith('first'),
  );
  // After a reload the sheet on screen is there (the note follows its autosave).
  await page.waitForFunction(() =>
    /is back/.test(document.querySelector('.sheet-note').textContent),
  );
  assert.notEqual(await page.getAttribute('#worksheet', 'data-autosave'), 'failed');
  await page.reload();
  await page.waitForSelector('html[data-ready="true"]');
  assert.match(await shown(page, 'A1'), /^first A1 /);
  assert.deepEqual(problems, []);
  await context.close();
});

test('packing (Node, no browser): round trip, and damaged text named', async () => {
  const { pack, unpack } = await import('../../www/js/sheet/pack.js');
  const text = '{"cells": {"A1": "Ω ≥ − ° µ 4k7"}}\n'.repeat(50);
  const packed = await pack(text);
  assert.match(packed, /^[A-Za-z0-9_-]+$/);
  assert.ok(packed.length < text.length / 5, `${packed.length} of ${text.length}`);
  assert.equal(await unpack(packed), text);
  await assert.rejects(unpack('%%%'), /not base64url/);
  // 0xFF… starts a deflate block of the reserved type 3 (RFC 1951, §3.2.3): invalid.
  await assert.rejects(unpack('________'), /does not decompress/);
});

test('the sheet an earlier version kept aside stays stored until the list holds it (Node, no browser)', async () => {
  // A page closed while the kept sheet is being packed must not lose it: at every
  // moment it is in storage, first under the old key, then in the replaced list.
  const items = new Map();
  globalThis.localStorage = {
    getItem: (k) => (items.has(k) ? items.get(k) : null),
    setItem: (k, v) => items.set(k, String(v)),
    removeItem: (k) => items.delete(k),
  };
  try {
    const { createReplaced } = await import('../../www/js/sheet/replaced.js');
    const { LEGACY_BACKUP_KEY, REPLACED_KEY } = await import('../../www/js/sheet/storage.js');
    const kept = JSON.stringify({ format: 'loopwright-sheet', version: 1, cells: { A1: 'kept' } });
    items.set(LEGACY_BACKUP_KEY, kept);
    const replaced = createReplaced();
    // Packing is under way (asynchronous): the old copy is still where it was.
    assert.equal(items.get(LEGACY_BACKUP_KEY), kept);
    assert.equal(items.has(REPLACED_KEY), false);
    const entry = await replaced.ready;
    assert.equal(entry.stored, true);
    assert.equal(items.has(LEGACY_BACKUP_KEY), false);
    const stored = JSON.parse(items.get(REPLACED_KEY));
    assert.equal(stored.length, 1);
    assert.equal(stored[0].first, 'kept');
    // With no room for the list, the old copy stays for the next visit.
    items.clear();
    items.set(LEGACY_BACKUP_KEY, kept);
    globalThis.localStorage.setItem = () => {
      throw Object.assign(new Error('full'), { name: 'QuotaExceededError' });
    };
    const full = createReplaced();
    assert.equal((await full.ready).stored, false);
    assert.equal(items.get(LEGACY_BACKUP_KEY), kept);
  } finally {
    delete globalThis.localStorage;
  }
});

test('the sheet an earlier version kept aside before a share link joins the replaced sheets', async () => {
  const context = await env.browser.newContext();
  const { page, problems } = await openSheet(context);
  // The worksheet of this first page mounts once the full module is in: wait for it,
  // so that the kept sheet is read by the reloaded page only (a first page that
  // mounts while reloading is the race the Node test above covers).
  await page.waitForSelector('html[data-sheet="ready"]');
  const kept = JSON.stringify({
    format: 'loopwright-sheet',
    version: 1,
    cells: { A1: 'kept aside' },
  });
  await page.evaluate((t) => localStorage.setItem('loopwright.sheet.before-share-link', t), kept);
  await page.reload();
  await page.waitForSelector('html[data-ready="true"]');
  assert.equal(await stored(page, 'loopwright.sheet.before-share-link'), null);
  assert.match(
    await page.locator('.sheet-replaced-list li').first().textContent(),
    /kept before a share link \(earlier version of the page\), 1 cell starting “kept aside”/,
  );
  await page.click('#tab-sheet');
  await page.click('#sheet-replaced summary');
  await page.click('#sheet-replaced-0');
  await page.waitForFunction(() => document.querySelector('#cell-A1').textContent === 'kept aside');
  assert.deepEqual(problems, []);
  await context.close();
});

test('a whole spec in cells: the stage and the limits typed, the yield fans out with captions', async () => {
  const context = await env.browser.newContext({ viewport: { width: 1280, height: 900 } });
  const { page, problems } = await openSheet(context);
  const typed = [
    ['A1', 'kind'],
    ['B1', 'non-inverting'],
    ['A2', 'a0'],
    ['B2', '200k'],
    ['A3', 'gbwHz'],
    ['B3', '10M'],
    ['A4', 'rf'],
    ['B4', '47k'],
    ['A5', 'rg'],
    ['B5', '1k'],
    ['D1', 'figure'],
    ['E1', 'frequency'],
    ['F1', 'lower'],
    ['G1', 'upper'],
    ['D2', 'gainDb'],
    ['E2', '1k'],
    ['F2', '=20*LOG10(48*0.995)'],
    ['G2', '=20*LOG10(48*1.005)'],
    ['D3', 'bandwidthHz'],
    ['F3', '200k'],
  ];
  for (const [address, text] of typed) await typeAt(page, address, text);
  await typeAt(
    page,
    'A8',
    '=TOLERANCE.SPECYIELD(A1:B5; "rf=1%, rg=1%, gbw=8M/10M/12M"; D1:G3; 2000; 48)',
  );
  await page.waitForFunction(() => document.querySelector('#cell-A10').textContent.trim() !== '');
  // Three rows: every limit, the gain, the bandwidth; the first row's figure
  // cells hold no single figure.
  assert.equal(await shown(page, 'C8'), '#N/A');
  const yieldOf = async (a) => Number(await cell(page, a).getAttribute('data-value'));
  const [all, gain, bandwidth] = [await yieldOf('A8'), await yieldOf('A9'), await yieldOf('A10')];
  assert.ok(all > 0 && all <= Math.min(gain, bandwidth), `${all} ${gain} ${bandwidth}`);
  assert.match(await cell(page, 'A8').getAttribute('data-part'), /^yield/);
  assert.match(await cell(page, 'C8').getAttribute('data-part'), /^nominal/);
  await page.screenshot({ path: join(ARTIFACTS, 'worksheet-spec-yield.png') });
  // A bad row is an error value naming the row and the column.
  await typeAt(page, 'D3', 'loudness');
  await page.waitForFunction(() => document.querySelector('#cell-A8').textContent.includes('#'));
  assert.match(
    await cell(page, 'A8').getAttribute('title'),
    /spec: row 3: figure: unknown figure "loudness"/,
  );
  await page.screenshot({ path: join(ARTIFACTS, 'worksheet-spec-yield-error.png') });
  assert.deepEqual(problems, []);
  await context.close();
});
