// The page's pure helpers (no DOM): engineering number parsing and formatting, and
// the plot scales and ticks.

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { parseEngineering, formatEngineering, formatPlain } from '../../www/js/format.js';
import { linearTicks, decadeTicks, makeScale, tickLabel, extent } from '../../www/js/plot/scale.js';

test('IEC 60062 letter codes', () => {
  // IEC 60062:2016, section 4 (resistance code), examples (from memory):
  // R47 = 0.47 Ω, 4R7 = 4.7 Ω, 470R = 470 Ω, 4K7 = 4.7 kΩ, 47K = 47 kΩ, 1M5 = 1.5 MΩ.
  const cases = [['R47', 0.47], ['4R7', 4.7], ['470R', 470], ['4K7', 4700], ['4k7', 4700], ['47K', 47e3], ['1M5', 1.5e6], ['2R2', 2.2], ['6G8', 6.8e9]];
  for (const [text, value] of cases) assert.ok(Math.abs(parseEngineering(text).value - value) < value * 1e-12, text);
});

test('SI prefixes and unit words', () => {
  // SI Brochure, 9th ed. (2019), table 7: p 10⁻¹², n 10⁻⁹, µ 10⁻⁶, m 10⁻³, k 10³, M 10⁶, G 10⁹, T 10¹².
  const cases = [['10p', 10e-12], ['2.2n', 2.2e-9], ['4.7µ', 4.7e-6], ['4.7u', 4.7e-6], ['15m', 0.015], ['1.5k', 1500],
    ['3M', 3e6], ['1G', 1e9], ['2T', 2e12], ['10 kΩ', 1e4], ['3 MHz', 3e6], ['-0.5', -0.5], ['1e-3', 1e-3], ['100 V/V', 100]];
  for (const [text, value] of cases) assert.ok(Math.abs(parseEngineering(text).value - value) <= Math.abs(value) * 1e-12, text);
});

test('rejected input says why and never returns a number', () => {
  for (const text of ['', 'abc', '1..2', '4k7k', 'k', 'R', '1e999', '<b>1</b>', '1,5']) {
    const r = parseEngineering(text);
    assert.ok('error' in r && !('value' in r), text);
  }
});

test('formatting keeps significant digits and SI prefixes', () => {
  assert.equal(formatEngineering(99.90009990009), '99.90');
  assert.equal(formatEngineering(1e9), '1.000G');
  assert.equal(formatEngineering(0.075), '75.00m');
  assert.equal(formatEngineering(-4700), '-4.700k');
  assert.equal(formatEngineering(Number.NaN), '—');
  assert.equal(formatPlain(0.00999), '0.00999');
  assert.equal(formatPlain(1e-7), '1.00000e-7');
});

test('plot ticks', () => {
  assert.deepEqual(linearTicks(0, 10, 5).ticks, [0, 2, 4, 6, 8, 10]);
  assert.deepEqual(linearTicks(-180, 0, 4).ticks, [-200, -150, -100, -50, 0].filter((t) => t >= -180));
  const d = decadeTicks(3, 2e5);
  assert.deepEqual(d.domain, [1, 1e6]);
  assert.equal(d.ticks.length, 7);
  const s = makeScale([1, 1000], [0, 300], true);
  assert.ok(Math.abs(s(10) - 100) < 1e-9 && Math.abs(s(1000) - 300) < 1e-9);
  assert.equal(tickLabel(1e4), '10k');
  assert.equal(tickLabel(2.5e-6), '2.5µ');
  assert.deepEqual(extent([[1, -2, Number.NaN, 5]], true), [1, 5]);
});
