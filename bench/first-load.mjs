// Cold start of the single-file page (dist/loopwright.html, scripts/build-single.mjs)
// in headless Chromium: the time from navigation to the first computed result (the
// `loopwright-first-result` performance mark, set by www/js/main.js once the first
// card has computed), each run in a fresh browser context. bench/run.mjs reports
// the median; run alone, this prints every run. Figures only, nothing asserted.
// Usage: node bench/first-load.mjs [file.html] [runs]

import { existsSync } from 'node:fs';
import { join, dirname, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');

/**
 * Times in ms of `runs` cold starts of `file`, sorted: the first result's mark, and
 * when the page said it was ready (`html[data-ready]`, measured in the page).
 */
export async function coldStarts(file = join(root, 'dist', 'loopwright.html'), runs = 7) {
  if (!existsSync(file)) return null;
  const { launch } = await import(pathToFileURL(join(root, 'tests', 'js', 'browser.mjs')).href);
  const browser = await launch();
  const first = [];
  try {
    for (let i = 0; i < runs; i++) {
      const context = await browser.newContext();
      const page = await context.newPage();
      await page.goto(pathToFileURL(file).href);
      await page.waitForSelector('html[data-ready="true"]');
      first.push(
        await page.evaluate(
          () => performance.getEntriesByName('loopwright-first-result')[0]?.startTime ?? NaN,
        ),
      );
      await context.close();
    }
  } finally {
    await browser.close();
  }
  return first.sort((a, b) => a - b);
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const file = process.argv[2] ? resolve(process.argv[2]) : undefined;
  const times = await coldStarts(file, Number(process.argv[3] ?? 9));
  if (!times) {
    console.error('first-load: no single file (node scripts/build-single.mjs)');
    process.exit(1);
  }
  const median = times[Math.floor(times.length / 2)];
  console.log(
    `first result after ${median.toFixed(0)} ms (median of ${times.length}; runs ${times.map((t) => t.toFixed(0)).join(', ')} ms)`,
  );
}
