// Shared set-up of the page tests: Debian's Chromium driven by playwright-core
// (no browser download), and the project's own static server on 127.0.0.1.

import { before, after } from 'node:test';
import { chromium } from 'playwright-core';
import { mkdirSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';
import { startServer } from '../../scripts/serve.mjs';

const here = dirname(fileURLToPath(import.meta.url));
export const ROOT = join(here, '..', '..');
export const ARTIFACTS = join(ROOT, 'tests', 'artifacts');

const CHROMIUM_FLAGS = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--no-first-run',
  '--disable-quic',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
];

export async function launch() {
  mkdirSync(ARTIFACTS, { recursive: true });
  return chromium.launch({
    executablePath: process.env.CHROMIUM ?? '/usr/bin/chromium',
    args: CHROMIUM_FLAGS,
    headless: true,
  });
}

export function serveWww() {
  return startServer(join(ROOT, 'www'), 0);
}

/**
 * Open `url` in a fresh context that records console errors, page errors and
 * every request that leaves `allowedOrigin`.
 */
export async function openPage(browser, url, { width = 1280, height = 900, allowedOrigin } = {}) {
  const context = await browser.newContext({ viewport: { width, height } });
  const page = await context.newPage();
  const problems = [];
  const foreign = [];
  page.on('console', (msg) => {
    if (msg.type() === 'error') problems.push(`console: ${msg.text()}`);
  });
  page.on('pageerror', (err) => problems.push(`pageerror: ${err.message}`));
  await context.route('**/*', (route) => {
    const u = route.request().url();
    if (allowedOrigin && !u.startsWith(allowedOrigin)) {
      foreign.push(u);
      return route.abort();
    }
    return route.continue();
  });
  await page.goto(url);
  await page.waitForSelector('html[data-ready="true"]', { timeout: 15000 });
  return { context, page, problems, foreign };
}

/**
 * The set-up of a browser test file: before its tests, the project's server on
 * 127.0.0.1 and a browser from `start` (Debian's Chromium by default); after them,
 * both closed (`stop`). Returns an object whose `browser`, `server` and `url` are
 * set by the time the tests run.
 */
export function servedPageTests({ start = launch, stop = (b) => b.close() } = {}) {
  const env = { browser: null, server: null, url: null };
  before(async () => {
    ({ server: env.server, url: env.url } = await serveWww());
    env.browser = await start();
  });
  after(async () => {
    if (env.browser) await stop(env.browser);
    env.server?.close();
  });
  return env;
}
