// The page's two modules: the first view (the calculator cards) works with only the
// lite module loaded; the full one (circuit solver, worksheet) is requested when the
// worksheet is opened or the loaded-stage card scrolled near, and not before.
// The time to the first result is a benchmark (bench/run.mjs, bench/first-load.mjs),
// not asserted here.

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { servedPageTests, ARTIFACTS, ROOT } from './browser.mjs';

const env = servedPageTests();

const result = (page, card, name) =>
  page.locator(`#${card} dd[data-name="${name}"] output`).textContent();

/** Open the page, recording which wasm files it asks for. */
async function openRecording(options = {}) {
  const wasm = [];
  const context = await env.browser.newContext({ viewport: { width: 1280, height: 900 } });
  const page = await context.newPage();
  const problems = [];
  page.on('pageerror', (err) => problems.push(err.message));
  page.on('console', (msg) => {
    if (msg.type() === 'error') problems.push(msg.text());
  });
  page.on('request', (r) => {
    const path = new URL(r.url()).pathname;
    if (path.endsWith('.wasm')) wasm.push(path);
  });
  await page.goto(options.url ?? env.url);
  await page.waitForSelector('html[data-ready="true"]', { timeout: 15000 });
  return { context, page, problems, wasm };
}

const LITE = '/pkg/lite/loopwright_bg.wasm';
const FULL = '/pkg/loopwright_bg.wasm';

test('first view works with the lite module alone; the worksheet brings the full one', async () => {
  const { context, page, problems, wasm } = await openRecording();
  assert.deepEqual(wasm, [LITE]);
  // Typed by keyboard into the first card: Af = A/(1 + Aβ) with A = 1000, β = 0.1
  // gives 1000/101 = 9.90099 (the closed form, worked by hand).
  await page.click('#card-stage-a');
  await page.keyboard.press('Control+A');
  await page.keyboard.type('1000');
  await page.click('#card-stage-beta');
  await page.keyboard.press('Control+A');
  await page.keyboard.type('0.1');
  assert.match(await result(page, 'card-stage', 'af'), /^9\.90/);
  // A card of every lite area computed (no card message) without the full module.
  for (const id of ['card-stage', 'card-loop', 'card-pairs', 'card-distortion']) {
    assert.equal(await page.locator(`#${id} .card-message`).textContent(), '', id);
  }
  // The loaded-stage card waits below, unmounted: still only the lite module.
  assert.equal(await page.locator('#card-loaded-pending').count(), 1);
  await page.waitForTimeout(300);
  assert.deepEqual(wasm, [LITE]);
  await page.screenshot({ path: join(ARTIFACTS, 'loader-lite-only.png') });

  // Opening the worksheet requests the full module and mounts the sheet.
  await page.click('#tab-sheet');
  await page.waitForSelector('html[data-sheet="ready"]');
  assert.deepEqual(wasm, [LITE, FULL]);
  await page.click('#cell-A1');
  await page.keyboard.type('=2*21');
  await page.keyboard.press('Enter');
  assert.equal((await page.locator('#cell-A1').textContent()).trim(), '42');
  assert.deepEqual(problems, []);
  await context.close();
});

test('the loaded-stage card loads the full module when scrolled near', async () => {
  const { context, page, problems, wasm } = await openRecording();
  assert.deepEqual(wasm, [LITE]);
  await page.locator('#card-loaded-pending').scrollIntoViewIfNeeded();
  // β = Rg/(Rf + Rg) = 1k/(9k + 1k) = 0.1 (the card's defaults, worked by hand).
  assert.equal(await result(page, 'card-loaded', 'beta'), '0.1');
  assert.deepEqual(wasm, [LITE, FULL]);
  assert.equal(await page.locator('#card-loaded-pending').count(), 0);
  // Then the worksheet reuses the module already loaded.
  await page.click('#tab-sheet');
  await page.waitForSelector('html[data-sheet="ready"]');
  assert.deepEqual(wasm, [LITE, FULL]);
  assert.deepEqual(problems, []);
  await context.close();
});

test('a page opened on the worksheet is ready once the sheet is', async () => {
  const { context, page, problems, wasm } = await openRecording({ url: `${env.url}?view=sheet` });
  assert.equal(await page.getAttribute('html', 'data-sheet'), 'ready');
  assert.equal(await page.getAttribute('#tab-sheet', 'aria-selected'), 'true');
  assert.deepEqual(wasm, [LITE, FULL]);
  assert.deepEqual(problems, []);
  await context.close();
});

test('a full module that fails to load leaves the first view working and says so', async () => {
  const context = await env.browser.newContext();
  await context.route(`**${FULL}`, (route) => route.abort());
  const page = await context.newPage();
  await page.goto(env.url);
  await page.waitForSelector('html[data-ready="true"]');
  await page.click('#tab-sheet');
  await page.waitForSelector('html[data-sheet="failed"]');
  assert.match(await page.locator('#worksheet').textContent(), /could not be loaded/);
  assert.equal(await page.locator('#card-stage .card-message').textContent(), '');
  // The loaded-stage card's place says so too, and stays a placeholder.
  await page.click('#tab-cards');
  const pending = page.locator('#card-loaded-pending');
  await pending.scrollIntoViewIfNeeded();
  await page.waitForFunction(() =>
    /could not be loaded/.test(document.getElementById('card-loaded-pending').textContent),
  );
  await pending.screenshot({ path: join(ARTIFACTS, 'loader-full-failed.png') });
  await context.close();
});

test('single file: the worksheet decodes the inlined full module, with no request', async () => {
  const context = await env.browser.newContext();
  const page = await context.newPage();
  const requests = [];
  const problems = [];
  page.on('request', (r) => {
    if (!r.url().startsWith('file:')) requests.push(r.url());
  });
  page.on('pageerror', (err) => problems.push(err.message));
  page.on('console', (msg) => {
    if (msg.type() === 'error') problems.push(msg.text());
  });
  await page.goto(pathToFileURL(join(ROOT, 'dist', 'loopwright.html')).href);
  await page.waitForSelector('html[data-ready="true"]');
  assert.equal(await page.getAttribute('html', 'data-sheet'), null);
  await page.click('#tab-sheet');
  await page.waitForSelector('html[data-sheet="ready"]');
  await page.click('#cell-A1');
  await page.keyboard.type('=6*7');
  await page.keyboard.press('Enter');
  assert.equal((await page.locator('#cell-A1').textContent()).trim(), '42');
  assert.deepEqual(requests, []);
  assert.deepEqual(problems, []);
  await context.close();
});
