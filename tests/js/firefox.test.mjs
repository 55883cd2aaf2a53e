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
    `return document.querySelector('#card-stage dd[data-name="af"] output')?.textContent === '10.00'`,
  );
  assert.equal(await env.browser.text('#card-stage dd[data-name="d"] output'), '1000');
}

test('Firefox: the served page loads and computes', async () => {
  await smoke(env.url);
});

test('Firefox: the single file loads from file:// and computes', async () => {
  await smoke(pathToFileURL(join(ROOT, 'dist', 'loopwright.html')).href);
});
