// The resistor-pair card's series-and-grade table (chooseParts), driven in Chromium
// as a person would: real clicks and typing, at a desktop and a phone width.

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { join } from 'node:path';
import { servedPageTests, ARTIFACTS } from './browser.mjs';

const env = servedPageTests();

async function retype(page, selector, text) {
  await page.click(selector);
  await page.keyboard.press('Control+A');
  await page.keyboard.type(text);
}

/** A number as the card shows it ("47.76", "1 kΩ", "-0.019 %") back to a number. */
function fromShown(text) {
  const prefixes = { p: 1e-12, n: 1e-9, µ: 1e-6, m: 1e-3, '': 1, k: 1e3, M: 1e6, G: 1e9 };
  const m = /(-?[\d.]+(?:e[-+]?\d+)?)\s*([pnµmkMG]?)/.exec(text.replace('−', '-'));
  assert.ok(m, `not a shown number: ${text}`);
  return Number(m[1]) * prefixes[m[2]];
}

/** Relative rounding of a value shown to four or five significant digits. */
const SHOWN_DIGITS_REL = 1e-3;

/** The customary tolerance of each series (IEC 60063, from memory). */
const CUSTOMARY = { E6: 0.2, E12: 0.1, E24: 0.05, E48: 0.02, E96: 0.01, E192: 0.005 };

/**
 * P(lo ≤ R2/R1 ≤ hi) for R1 = n1(1 + u), R2 = n2(1 + v), u, v uniform on [−p, p],
 * independent: the midpoint rule over u of the share of v inside (the conditional
 * probability of a ratio of two uniform variables), 200 000 steps. Independent of
 * the core's closed form (a sum of trapezoids between the corners).
 */
function ratioYield(lo, hi, n1, n2, p) {
  const steps = 200_000;
  let sum = 0;
  for (let i = 0; i < steps; i++) {
    const u = -p + ((i + 0.5) * 2 * p) / steps;
    const a = Math.max(-p, (lo * n1 * (1 + u)) / n2 - 1);
    const b = Math.min(p, (hi * n1 * (1 + u)) / n2 - 1);
    sum += Math.max(0, b - a) / (2 * p);
  }
  return sum / steps;
}

test('resistor pair: every series and grade against the spec, cheapest first', async () => {
  for (const width of [1366, 390]) {
    const context = await env.browser.newContext({ viewport: { width, height: 900 } });
    const page = await context.newPage();
    const problems = [];
    page.on('pageerror', (err) => problems.push(err.message));
    await page.goto(env.url);
    await page.waitForSelector('html[data-ready="true"]');
    // Gain 48 ± 0.5 %: 47.76 … 48.24, grades 1 %, 0.5 %, 0.25 %, 0.1 %.
    await retype(page, '#card-pairs-target', '48');
    await retype(page, '#card-pairs-r1_min', '2k');
    await retype(page, '#card-pairs-r1_max', '5k');
    await retype(page, '#card-pairs-r2_min', '100k');
    await retype(page, '#card-pairs-r2_max', '200k');
    await retype(page, '#card-pairs-spec_low', '47.76');
    await retype(page, '#card-pairs-spec_high', '48.24');
    await retype(page, '#card-pairs-grades', '1%, 0.5%, 0.25%, 0.1%');
    await retype(page, '#card-pairs-a_typ', '1M');
    await retype(page, '#card-pairs-a_max', '10M');
    const sel = '#card-pairs [data-name="part-choices"] tbody tr';
    // Each keystroke recomputes the card at once (an input event).
    await page.waitForSelector(sel);
    const table = await page.locator(sel).evaluateAll((trs) =>
      trs.map((tr) => ({
        cells: [...tr.querySelectorAll('td')].map((td) => td.textContent),
        passes: tr.classList.contains('passes'),
      })),
    );
    assert.ok(table.length >= 6, `${table.length} choices`);
    const A = 1e6;
    let checkedYield = 0;
    let seenMiss = false;
    let lastCost = 0;
    let lastYield = Infinity;
    for (const { cells, passes } of table) {
      const [, series, grade, legs, values, error, range, yieldText, cost] = cells;
      const p = fromShown(grade) / 100;
      // A series only at its customary tolerance or tighter.
      assert.ok(p <= CUSTOMARY[series] + 1e-12, `${series} at ${grade}`);
      // Those reaching the least yield first, in cost order; then by yield.
      const y = fromShown(yieldText) / 100;
      if (passes) {
        assert.ok(!seenMiss, 'a passing row after a missing one');
        assert.ok(Number(cost) > lastCost, `cost ${cost} after ${lastCost}`);
        lastCost = Number(cost);
        assert.ok(y >= 0.99, yieldText);
      } else {
        seenMiss = true;
        assert.ok(y <= lastYield + 1e-9, `${yieldText} after ${lastYield}`);
        lastYield = y;
      }
      if (!legs.startsWith('2')) continue;
      // One-resistor legs: R1 / R2 as shown, the closed-loop gain
      // G = (1 + q)·A/(A + 1 + q), q = R2/R1 (Franco, Design with Operational
      // Amplifiers, 4th ed., ch. 1, from memory), A = A typ = 1M.
      const [r1, r2] = values.split('/').map(fromShown);
      const q = r2 / r1;
      const g = ((1 + q) * A) / (A + 1 + q);
      const shownError = fromShown(error) / 100;
      assert.ok(Math.abs(g / 48 - 1 - shownError) < 5e-5, `${values}: ${error}`);
      const [low, high] = range.split('…').map(fromShown);
      assert.ok(low <= g && g <= high, range);
      // The yield against the midpoint rule, the window on q from the closed loop:
      // 1 + q = G·A/(A − G) at each spec limit.
      if (yieldText.includes('±')) continue;
      const qOf = (G) => (G * A) / (A - G) - 1;
      const want = ratioYield(qOf(47.76), qOf(48.24), r1, r2, p);
      assert.ok(
        Math.abs(y - want) < 5e-4 + SHOWN_DIGITS_REL * want,
        `${values} ${grade}: ${yieldText} vs ${want}`,
      );
      checkedYield++;
    }
    assert.ok(checkedYield >= 3, `${checkedYield} yields checked`);
    // The recommendation names the first passing row.
    const verdict = await page.locator('#card-pairs dd[data-name="choice"] output').textContent();
    if (table[0].passes) {
      assert.match(verdict, /^cheapest reaching 99 %/);
      assert.ok(verdict.includes(table[0].cells[1]), verdict);
    } else {
      assert.match(verdict, /^none reaches 99 %/);
    }
    // Sensitivity to R2 of a gain of 48: (G − 1)/G = 0.979 (less a q/(A + 1 + q)).
    const s = fromShown(
      await page.locator('#card-pairs dd[data-name="sensitivity"] output').textContent(),
    );
    assert.ok(Math.abs(s - 47 / 48) < 1e-3, String(s));
    await page
      .locator('#card-pairs [data-name="part-choices"]')
      .screenshot({ path: join(ARTIFACTS, `card-pairs-choices-${width}.png`) });
    // A grade below zero marks its cell.
    await retype(page, '#card-pairs-grades', '1%, -0.1%');
    await page.waitForFunction(
      () => document.querySelector('#card-pairs-grades')?.getAttribute('aria-invalid') === 'true',
    );
    assert.deepEqual(problems, []);
    await context.close();
  }
});
