// Follow-ups of issue 20 on the stage view and the worksheet display, driven by real
// clicks and typing: the Nyquist plot readable for a high loop gain (radially
// compressed beyond |T| = 1, with N, P, Z and the least |1 + T| from circuitNyquist),
// a compensation that is not needed said so (no 1e-18 F, no Use), a two-part Rf shown
// in the Rf field's note and the report, and fanned-out percentages shown as %.

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { join } from 'node:path';
import { servedPageTests, openPage, ARTIFACTS } from './browser.mjs';
import { demoStage, typeStageField } from './stage-demo.mjs';

const env = servedPageTests();

/** The demo stage of the view (fields.js DEMO) as a stage document. */
const DEMO_STAGE = demoStage();

test('the Nyquist plot of a loop gain near 10⁴ shows both its far part and −1', async () => {
  const { context, page, problems } = await openPage(env.browser, env.url, {
    width: 1366,
    height: 900,
  });
  await page.click('#tab-stage');
  await page.waitForSelector('html[data-stage="ready"]');
  const api = await page.evaluate(async (stage) => {
    const m = await import('/pkg/loopwright.js');
    const n = m.circuitNyquist({ circuit: stage });
    let far = 0;
    for (let i = 0; i < n.curve.re.length; i++)
      far = Math.max(far, Math.hypot(n.curve.re[i], n.curve.im[i]));
    return {
      far,
      e: n.encirclements,
      least: m.formatPlain(n.leastDistance.distance, '', 3),
      at: m.formatValue(n.leastDistance.freqHz, 'Hz', 3),
    };
  }, DEMO_STAGE);
  // The demo's loop gain: A0·β = 1M/101, about 10⁴ (the linear ±4 window showed a
  // vertical line).
  assert.ok(api.far > 5e3, `largest |T| ${api.far}`);
  const plot = page.locator('.stage-plots svg.plot').filter({ hasText: 'Nyquist' });
  await plot.scrollIntoViewIfNeeded();
  await plot.screenshot({ path: join(ARTIFACTS, 'stage-nyquist-1366.png') });
  const title = await plot.locator('.plot-title').textContent();
  assert.equal(
    title,
    `Nyquist: N = ${api.e.clockwise}, P = ${api.e.openLoopRhpPoles}, Z = ${api.e.closedLoopRhpPoles} (${api.e.verdict})`,
  );
  const text = await plot.textContent();
  assert.ok(text.includes('Radius drawn as |T| up to 1 and 1 + log₁₀|T| beyond'), text);
  assert.ok(text.includes(`Least |1 + T| = ${api.least} at ${api.at}.`), text);
  // The curve reaches the ring of its largest decade: the tick at that radius names
  // 10^⌈log₁₀ max|T|⌉ (the mapping of docs/stage.md), so the far part is inside.
  const decade = 10 ** Math.ceil(Math.log10(api.far));
  const ticks = await plot.locator('.plot-tick').allTextContents();
  assert.ok(ticks.includes(String(decade)), `${decade} in ${ticks}`);
  const geometry = await plot.evaluate((svg) => {
    const frame = svg.querySelector('.plot-frame').getBBox();
    const curve = svg.querySelector('.plot-series-a').getBBox();
    const unit = svg.querySelector('.plot-series-unit').getBBox();
    const ring = svg.querySelector('.plot-marker circle');
    return {
      frame: { x: frame.x, y: frame.y, w: frame.width, h: frame.height },
      curve: { x: curve.x, y: curve.y, w: curve.width, h: curve.height },
      unit: { x: unit.x, y: unit.y, w: unit.width, h: unit.height },
      minus1: { x: Number(ring.getAttribute('cx')), y: Number(ring.getAttribute('cy')) },
    };
  });
  const { frame, curve, unit, minus1 } = geometry;
  // Not a vertical line: the curve is wide as well as tall, and inside the frame.
  assert.ok(curve.w > 0.15 * frame.w, `curve ${curve.w} px wide in ${frame.w}`);
  // ω > 0 runs in the lower half (the mirror above): from the real axis down to its
  // farthest decade, most of the half.
  assert.ok(curve.h > 0.4 * frame.h, `curve ${curve.h} px tall in ${frame.h}`);
  assert.ok(curve.y >= frame.y - 1 && curve.y + curve.h <= frame.y + frame.h + 1);
  // −1 sits on the unit circle's left edge, and the unit circle is round on screen.
  assert.ok(Math.abs(unit.x - minus1.x) < 1.5, `${unit.x} vs ${minus1.x}`);
  assert.ok(Math.abs(unit.y + unit.h / 2 - minus1.y) < 1.5);
  assert.ok(Math.abs(unit.w / unit.h - 1) < 0.15, `unit circle ${unit.w} × ${unit.h}`);
  // The unit circle is 2 of the drawn radius, the decade ring at 10 is 2 radii out:
  // the neighbourhood of −1 takes a readable share of the plot.
  assert.ok(unit.h > 0.12 * frame.h, `unit circle ${unit.h} px in ${frame.h}`);
  assert.deepEqual(problems, []);
  await context.close();
});

test('the Nyquist plot stays round and inside at 390 px', async () => {
  const { context, page, problems } = await openPage(env.browser, env.url, {
    width: 390,
    height: 844,
  });
  await page.click('#tab-stage');
  await page.waitForSelector('html[data-stage="ready"]');
  const plot = page.locator('.stage-plots svg.plot').filter({ hasText: 'Nyquist' });
  await plot.scrollIntoViewIfNeeded();
  const g = await plot.evaluate((svg) => {
    const frame = svg.querySelector('.plot-frame').getBBox();
    const unit = svg.querySelector('.plot-series-unit').getBBox();
    return { fw: frame.width, fh: frame.height, uw: unit.width, uh: unit.height };
  });
  assert.ok(Math.abs(g.uw / g.uh - 1) < 0.2, `unit circle ${g.uw} × ${g.uh}`);
  await plot.screenshot({ path: join(ARTIFACTS, 'stage-nyquist-390.png') });
  assert.deepEqual(problems, []);
  await context.close();
});

test('a compensation the target does not need says so and offers no Use', async () => {
  const { context, page, problems } = await openPage(env.browser, env.url, {
    width: 1366,
    height: 900,
  });
  await page.click('#tab-stage');
  await page.waitForSelector('html[data-stage="ready"]');
  // The demo stage meets 45° without Cf: stageDesign's answer is the end of its
  // range (1e-18 F), which is no design value.
  const d = await page.evaluate(async (stage) => {
    const m = await import('/pkg/loopwright.js');
    const cf = m.stageDesign({ stage, part: 'cf', targetPhaseMarginDeg: 45 });
    return { atRangeEnd: cf.atRangeEnd, pm: m.formatPlain(cf.phaseMarginDeg, '°', 3) };
  }, DEMO_STAGE);
  assert.equal(d.atRangeEnd, true);
  const shown = await page.locator('#stage-design-cf').textContent();
  assert.equal(shown, `not needed: the target margin is met without it (PM ${d.pm})`);
  assert.equal(await page.locator('#stage-use-cf').count(), 0);
  assert.doesNotMatch(await page.locator('.stage-design').textContent(), /e-18|aF/);
  await page.locator('.stage-design').screenshot({
    path: join(ARTIFACTS, 'stage-design-not-needed.png'),
  });
  // A stage that does need it: gain 2 with 1 MΩ parts puts the input capacitance's
  // pole in β (1/(2π·500 kΩ·7 pF), about 45 kHz) under the crossover (about
  // 500 kHz); Cf then has a value and a Use that gives the target margin.
  await typeStageField(page, 'rf', '1M');
  await typeStageField(page, 'rg', '1M');
  const cfText = await page.locator('#stage-design-cf').textContent();
  assert.doesNotMatch(cfText, /not needed/);
  assert.match(cfText, /F$/);
  await page.click('#stage-use-cf');
  const pm = Number.parseFloat(await page.locator('#stage-out-margin-pm').textContent());
  assert.ok(pm >= 45 - 0.01, `PM ${pm} after the Cf`);
  assert.deepEqual(problems, []);
  await context.close();
});

test('a pair with a two-part Rf shows the parts in the Rf note and the report', async () => {
  const { context, page, problems } = await openPage(env.browser, env.url, {
    width: 1366,
    height: 900,
  });
  await page.click('#tab-stage');
  await page.waitForSelector('html[data-stage="ready"]');
  // The gain-48 ± 0.5 % job of issue 20 on E96 parts.
  await typeStageField(page, 'gain', '48');
  await typeStageField(page, 'tolerance', '0.5%');
  const rows = page.locator('.stage-pairs tbody tr');
  const n = await rows.count();
  let pick = -1;
  let parts = '';
  for (let i = 0; i < n; i++) {
    const rf = await rows.nth(i).locator('td').nth(1).textContent();
    if (/[+‖]/.test(rf)) {
      pick = i;
      parts = rf;
      break;
    }
  }
  assert.ok(pick >= 0, 'a two-part Rf among the candidates');
  await page.click(`#stage-use-pair-${pick}`);
  const rf = await page.inputValue('#stage-rf');
  // The stage gets the total: the two parts' sum (series) read by the core's reader.
  const total = await page.evaluate(
    async ({ rf, parts }) => {
      const m = await import('/pkg/loopwright.js');
      const [a, b] = parts.split(/ [+‖] /).map((t) => m.parseValue(t, { unit: 'Ω' }));
      return {
        rf: m.parseValue(rf, { unit: 'Ω' }),
        sum: parts.includes('+') ? a + b : (a * b) / (a + b),
      };
    },
    { rf, parts },
  );
  // The table shows the parts to three digits (E96 values have three): the total
  // agrees to that.
  assert.ok(Math.abs(total.rf / total.sum - 1) < 1e-9, `${total.rf} vs ${total.sum}`);
  const note = await page.locator('#stage-rf-note').textContent();
  assert.equal(note, `two parts: ${parts}; the stage carries their total`);
  assert.equal(await page.getAttribute('#stage-rf', 'aria-describedby'), 'stage-rf-note');
  await page.locator('.stage-group-parts').screenshot({
    path: join(ARTIFACTS, 'stage-rf-two-parts.png'),
  });
  await page.click('#stage-report-button');
  const inputs = await page.locator('#stage-report .report-inputs').allTextContents();
  assert.ok(
    inputs.some((t) => t.includes(`${rf} (two parts: ${parts})`)),
    inputs.join(' | '),
  );
  // Typing another Rf drops the note (it no longer names the parts); undo brings both back.
  await typeStageField(page, 'rf', '4k7');
  assert.equal(await page.locator('#stage-rf-note').count(), 0);
  await page.click('#stage-undo');
  assert.equal(await page.inputValue('#stage-rf'), rf);
  assert.equal(await page.locator('#stage-rf-note').textContent(), note);
  assert.deepEqual(problems, []);
  await context.close();
});

test('fanned-out percentages show as %, and formulas and copies get the same number', async () => {
  for (const width of [1366, 390]) {
    const { context, page, problems } = await openPage(env.browser, env.url, {
      width,
      height: 900,
    });
    await context.grantPermissions(['clipboard-read', 'clipboard-write']);
    await page.click('#tab-sheet');
    const cellOf = (a) => page.locator(`#cell-${a}`);
    const typeAt = async (a, text) => {
      await cellOf(a).click();
      await page.keyboard.type(text);
      await page.keyboard.press('Enter');
    };
    await typeAt('A1', '=FEEDBACK.SPREAD(0.01; 50k; 100k; 200k)');
    // FEEDBACK.SPREAD's catalog example (closed form Af = A/(1 + Aβ),
    // src/sheet/functions/feedback.rs): lowest Af relative to typical
    // −0.09980039920160234 %, spread 0.1497754116953593 %, 1497.754116953593 ppm.
    assert.equal((await cellOf('D1').textContent()).trim(), '-0.0998004 %');
    assert.equal((await cellOf('F1').textContent()).trim(), '0.149775 %');
    // Af itself keeps its plain display; ppm is not a percentage.
    assert.equal((await cellOf('B1').textContent()).trim(), '99.9001');
    assert.equal((await cellOf('G1').textContent()).trim(), '1.49775 k');
    // The number is unchanged: the cell's full value, a formula that refers to it
    // and a copy all carry −0.09980039920160234.
    assert.equal(await cellOf('D1').getAttribute('data-value'), '-0.09980039920160234');
    await typeAt('A3', '=D1*1000');
    assert.equal((await cellOf('A3').textContent()).trim(), '-99.8004 %');
    await typeAt('A4', '=D1+1Ω');
    assert.equal((await cellOf('A4').textContent()).trim(), '#VALUE!');
    // The migration of pkg-config/CHANGELOG.md: SUM gives the plain number.
    // −0.09980039920160234 + 1 = 0.9001996007983977 Ω.
    await typeAt('A5', '=SUM(D1)+1Ω');
    assert.equal((await cellOf('A5').textContent()).trim(), '900.2 mΩ');
    await cellOf('D1').click();
    await page.keyboard.press('Control+C');
    const copied = await page.evaluate(() => navigator.clipboard.readText());
    assert.equal(copied.trim(), '-0.09980039920160234');
    // NETWORK.WORSTCASE's deviations relative to nominal (its catalog example,
    // corners closed form, tests/reference/sheet_catalog.py): −1.79165 %, +1.82318 %.
    await typeAt(
      'A6',
      '=NETWORK.WORSTCASE("non-inverting"; "gain"; 1k; 9k; 1%; 50k; 100k; 200k; 1M; 50; 10 Hz)',
    );
    assert.equal((await cellOf('D6').textContent()).trim(), '-1.79165 %');
    assert.equal((await cellOf('E6').textContent()).trim(), '1.82318 %');
    assert.equal((await cellOf('B6').textContent()).trim(), '9.81985');
    assert.match(
      await cellOf('D6').getAttribute('title'),
      /^minimum relative to nominal, % — NETWORK\.WORSTCASE: -1\.79164805646\d* %$/,
    );
    await cellOf('A1').scrollIntoViewIfNeeded();
    await page.screenshot({ path: join(ARTIFACTS, `worksheet-percent-${width}.png`) });
    assert.deepEqual(problems, []);
    await context.close();
  }
});
