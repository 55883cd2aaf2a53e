// The page's pure helpers (no DOM): engineering number formatting, and
// the plot scales and ticks.

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { formatEngineering, formatPlain } from '../../www/js/format.js';
import { linearTicks, decadeTicks, makeScale, tickLabel, extent } from '../../www/js/plot/scale.js';

test('formatting keeps significant digits and SI prefixes', () => {
  assert.equal(formatEngineering(99.90009990009), '99.90');
  assert.equal(formatEngineering(1e9), '1.000G');
  assert.equal(formatEngineering(0.075), '75.00m');
  assert.equal(formatEngineering(-4700), '-4.700k');
  assert.equal(formatEngineering(Number.NaN), '—');
  assert.equal(formatPlain(0.00999), '0.00999');
  assert.equal(formatPlain(1e-7), '1.00000e-7');
  assert.equal(formatPlain(1e6), '1000000');
  assert.equal(formatPlain(79972.79564730356), '79972.8');
});

test('plot ticks', () => {
  assert.deepEqual(linearTicks(0, 10, 5).ticks, [0, 2, 4, 6, 8, 10]);
  assert.deepEqual(
    linearTicks(-180, 0, 4).ticks,
    [-200, -150, -100, -50, 0].filter((t) => t >= -180),
  );
  const d = decadeTicks(3, 2e5);
  assert.deepEqual(d.domain, [1, 1e6]);
  assert.equal(d.ticks.length, 7);
  const s = makeScale([1, 1000], [0, 300], true);
  assert.ok(Math.abs(s(10) - 100) < 1e-9 && Math.abs(s(1000) - 300) < 1e-9);
  assert.equal(tickLabel(1e4), '10k');
  assert.equal(tickLabel(2.5e-6), '2.5µ');
  assert.deepEqual(extent([[1, -2, Number.NaN, 5]], true), [1, 5]);
});
