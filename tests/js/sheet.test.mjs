// The worksheet driven as a person would: keyboard entry and navigation, formulas
// and error values, range copy and paste as TSV, save and open, the share link,
// autosave recovery, the demo and the help panel. Expected values are worked by
// hand beside each check.

import { test, before, after } from 'node:test';
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { launch, serveWww, ARTIFACTS } from './browser.mjs';

let browser;
let server;
let url;

before(async () => {
  ({ server, url } = await serveWww());
  browser = await launch();
});

after(async () => {
  await browser?.close();
  server?.close();
});

async function openSheet(context, address = url) {
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

async function shareLink(page) {
  await page.click('#sheet-share');
  await page.waitForFunction(() => document.querySelector('.sheet-share').value !== '');
  return page.inputValue('.sheet-share');
}

async function typeAt(page, address, text) {
  await cell(page, address).click();
  await page.keyboard.type(text);
  await page.keyboard.press('Enter');
}

test('keyboard entry, formulas, navigation and error values', async () => {
  const context = await browser.newContext();
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
  // Arrow keys move; Tab moves right.
  await page.keyboard.press('ArrowUp');
  await page.keyboard.press('Tab');
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
  const context = await browser.newContext({ permissions: ['clipboard-read', 'clipboard-write'] });
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
  const context = await browser.newContext({ acceptDownloads: true });
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
  const other = await browser.newContext({ acceptDownloads: true });
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
  const context = await browser.newContext();
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
  const other = await browser.newContext();
  const { page: page2, problems } = await openSheet(other, link);
  assert.equal(
    await page2.evaluate(() => document.querySelector('#cell-B4').title),
    await page.evaluate(() => document.querySelector('#cell-B4').title),
  );
  assert.match(await page2.locator('.sheet-note').textContent(), /from the link/);
  assert.ok(!page2.url().includes('#sheet='), 'the fragment is dropped after opening');
  // A damaged link says so and leaves an empty, working sheet.
  const { page: page3, problems: p3 } = await openSheet(other, `${url}#sheet=%%%`);
  assert.match(await page3.locator('.sheet-note').textContent(), /could not be read/);
  assert.deepEqual(problems, []);
  assert.deepEqual(p3, []);
  await other.close();
  await context.close();
});

test('naming a cell from the name box, and going to an address', async () => {
  const context = await browser.newContext();
  const { page, problems } = await openSheet(context);
  await typeAt(page, 'B2', '250k');
  await cell(page, 'B2').click();
  await page.fill('#sheet-namebox', 'aol');
  await page.press('#sheet-namebox', 'Enter');
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
  const context = await browser.newContext();
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
  const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
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
  const context = await browser.newContext({ viewport: { width: 390, height: 844 } });
  const { page, problems } = await openSheet(context);
  await page.click('#sheet-demo');
  const overflow = await page.evaluate(
    () => document.documentElement.scrollWidth - window.innerWidth,
  );
  assert.ok(overflow <= 0, `page is ${overflow}px wider than the viewport`);
  await page.screenshot({ path: join(ARTIFACTS, 'worksheet-390px.png'), fullPage: false });
  assert.deepEqual(problems, []);
  await context.close();
});
