// Second engine: a smoke run of the served page and of the single file in headless
// Firefox ESR over WebDriver. It loads, computes a card from typed input, and
// reaches the ready state (which a script error on start-up would prevent).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { servedPageTests, ROOT } from './browser.mjs';
import { startGecko } from './webdriver.mjs';

const env = servedPageTests({ start: startGecko, stop: (ff) => ff.quit() });

async function smoke(address) {
  await env.browser.go(address);
  await env.browser.waitFor("return document.documentElement.dataset.ready === 'true'");
  assert.equal(
    await env.browser.run("return document.getElementById('load-status').dataset.state"),
    'ready',
  );
  // A = 10k, β = 99.9m: D = 1000, Af = 10 (Sedra & Smith, 7th ed., Example 10.1, from memory).
  await env.browser.clearAndType('#card-stage-a', '10k');
  await env.browser.clearAndType('#card-stage-beta', '99.9m');
  await env.browser.waitFor(
    `return document.querySelector('#card-stage dd[data-name="af"] output')?.textContent === '10 V/V'`,
  );
  assert.equal(await env.browser.text('#card-stage dd[data-name="d"] output'), '1000');
}

test('Firefox: the served page loads and computes', async () => {
  await smoke(env.url);
});

test('Firefox: the single file loads from file:// and computes', async () => {
  await smoke(pathToFileURL(join(ROOT, 'dist', 'loopwright.html')).href);
});

test('Firefox: a pasted share link replaces the sheet, undo brings it back, packed autosave', async () => {
  const ff = env.browser;
  const cellText = (a) => `return document.getElementById('cell-${a}').textContent`;
  await ff.go(env.url);
  await ff.waitFor("return document.documentElement.dataset.ready === 'true'");
  await ff.run("localStorage.clear(); document.getElementById('tab-sheet').click();");
  // The worksheet is mounted with the full module, fetched when its tab is first opened.
  await ff.waitFor("return document.documentElement.dataset.sheet === 'ready'");
  // Typed into A1 through the formula bar; Enter (U+E007 in WebDriver) commits.
  await ff.clearAndType('#formula-bar', 'own sheet\uE007');
  await ff.waitFor(
    "return (localStorage.getItem('loopwright.sheet.autosave') ?? '').includes('own sheet')",
  );
  const fragment = await ff.run(
    `return import('./js/sheet/share.js').then((m) => m.encodeFragment(JSON.stringify({
      format: 'loopwright-sheet', version: 1, cells: { A1: 'from the link' }, names: {} })));`,
  );
  await ff.go(`${env.url}#${fragment}`);
  await ff.waitFor(`${cellText('A1')} === 'from the link'`);
  // The undo is offered once the replaced sheet is packed and kept.
  await ff.waitFor("return document.getElementById('sheet-undo') !== null");
  await ff.run("document.getElementById('sheet-undo').click();");
  await ff.waitFor(`${cellText('A1')} === 'own sheet'`);
  // An autosave kept packed (as a sheet too large for plain storage is) is read back.
  await ff.run(
    `return import('./js/sheet/storage.js').then(async (m) => localStorage.setItem(
      m.AUTOSAVE_KEY, await m.storedForm(JSON.stringify({
        format: 'loopwright-sheet', version: 1, cells: { B2: 'packed in Firefox' }, names: {} }), true)));`,
  );
  await ff.go(env.url);
  await ff.waitFor("return document.documentElement.dataset.ready === 'true'");
  assert.equal(await ff.run(cellText('B2')), 'packed in Firefox');
  assert.match(
    await ff.run("return localStorage.getItem('loopwright.sheet.autosave')"),
    /^deflate-raw:/,
  );
});

test('Firefox: the stage view computes a typed stage and its margin is the API’s', async () => {
  const ff = env.browser;
  await ff.go(env.url);
  await ff.waitFor("return document.documentElement.dataset.ready === 'true'");
  await ff.run("document.getElementById('tab-stage').click();");
  await ff.waitFor("return document.documentElement.dataset.stage === 'ready'");
  // Gain 11 instead of the demo's 101: Rf 10k over Rg 1k; Tab (U+E004) commits the field.
  await ff.clearAndType('#stage-rf', '10k\uE004');
  await ff.clearAndType('#stage-gain', '11\uE004');
  const api = await ff.run(
    `return import('./pkg/loopwright.js').then(async (m) => {
      await m.default();
      const stage = { format: 'loopwright-stage', version: 1, kind: 'non-inverting',
        amplifier: { a0: { min: '200k', typ: '1M', max: '5M' }, gbwHz: '1M', polesHz: [15e6],
          rd: '10M', cd: '3p', rcm: '1G', ccm: '4p', ro: '50', slewRate: '0.5M' },
        parts: { rf: '10k', rg: '1k', rs: '350', rl: '10k', cl: '1n' } };
      return m.formatPlain(m.circuitMargins({ circuit: stage }).phaseMarginDeg, '°', 4);
    });`,
  );
  await ff.waitFor(
    `return document.getElementById('stage-out-margin-pm')?.textContent === ${JSON.stringify(api)}`,
  );
  assert.match(
    await ff.text('#stage-checks tr[data-check="gain"]'),
    /pass/,
    'gain 11 within 1 % of the spec',
  );
});

test('Firefox: the stage view’s tolerance run is in a worker, served and from file://, with the same answers', async () => {
  const ff = env.browser;
  const shown = [];
  for (const address of [env.url, pathToFileURL(join(ROOT, 'dist', 'loopwright.html')).href]) {
    await ff.go(address);
    await ff.waitFor("return document.documentElement.dataset.ready === 'true'");
    await ff.run("document.getElementById('tab-stage').click();");
    await ff.waitFor("return document.documentElement.dataset.stage === 'ready'");
    await ff.waitFor(
      "return document.getElementById('stage-tolerances')?.dataset.state === 'ready'",
    );
    assert.equal(
      await ff.run("return document.getElementById('stage-tolerances').dataset.thread"),
      'worker',
      address,
    );
    shown.push(await ff.text('#stage-out-yield'));
  }
  // The module worker of the served page and the Blob worker of the single file run
  // the same core on the same stage: the same yield to the last digit shown.
  assert.equal(shown[0], shown[1]);
  assert.match(shown[0], /%$/);
});
