// Runs inside a temporary project that installed the packed tarball: every value
// below is checked against the same closed forms as the Rust tests.
import assert from 'node:assert/strict';
import init, * as lw from 'loopwright';

await init(); // a no-op in Node, kept so browser code runs unchanged

// Sedra & Smith, Microelectronic Circuits, 7th ed., Example 10.1 (from memory):
// A = 10⁴, Af = 10 → β = 0.0999, D = 1000, 60 dB.
const beta = lw.betaForGain(1e4, 10);
assert.ok(Math.abs(beta - 0.0999) < 1e-15);
assert.ok(Math.abs(lw.closedLoopGain(1e4, beta) - 10) < 1e-12);
assert.ok(Math.abs(lw.feedbackAmountDb(1e4, beta) - 60) < 1e-9);
assert.ok(Math.abs(lw.gainSensitivity(1e4, beta) - 1e-3) < 1e-15);
assert.ok(Math.abs(lw.loopGain(1e4, beta) - 999) < 1e-9);
assert.ok(Math.abs(lw.feedbackAmount(1e4, beta) - 1000) < 1e-9);
// min A = (1 − ε)/(ε·β): 0.999/(0.001·0.01) = 99 900 (sympy closed form, tests/reference).
assert.ok(Math.abs(lw.minOpenLoopGain(0.01, 0.001) - 99900) < 1e-8);

const s = lw.summarizeFeedback('Voltage-Shunt', -1e5, -1e-3);
assert.equal(s.topology, 'shunt-shunt');
assert.equal(s.gainUnit, 'V/A');
assert.ok(Math.abs(s.closedLoopGain + 1e5 / 101) < 1e-9);

// Shunt mixing divides Zi, voltage sampling divides Zo (Sedra & Smith, 7th ed., Table 10.1, from memory).
const z = lw.impedancesWithFeedback('shunt-shunt', 1e5, 0, 1e3, 0, 1e4, 0, 0.0999, 0);
assert.ok(Math.abs(z.input.re - 100) < 1e-9 && Math.abs(z.output.re - 1) < 1e-12);

const g = lw.gainSpread(0.01, 5e4, 1e5, 2e5);
assert.equal(g.positiveFeedback, false);
assert.ok(Math.abs(g.spreadPpm - g.spreadPercent * 1e4) < 1e-6);

const throws = (fn, code, param) => assert.throws(fn, (e) => {
  assert.ok(e instanceof Error);
  assert.equal(e.name, 'LoopwrightError');
  assert.equal(e.code, code);
  assert.equal(e.param, param);
  return true;
});
throws(() => lw.closedLoopGain(Number.NaN, 1), 'not_finite', 'a');
throws(() => lw.closedLoopGain(-100, 0.01), 'oscillation', 'beta');
throws(() => lw.betaForGain(10, 100), 'unreachable', 'target_gain');
throws(() => lw.summarizeFeedback('parallel-parallel', 1, 1), 'unknown_name', 'topology');
throws(() => lw.impedancesWithFeedback('series-shunt', -1, 0, 1, 0, 1, 0, 1, 0), 'out_of_domain', 'zi');

// Network area. IEC 60063 E24 holds 4.7 and 5.1 next to each other: 4.8k is
// nearest to 4.7k, 5.0k nearest to 5.1k, whether distance is taken linearly or by ratio.
assert.equal(lw.standardValue('E24', 4800, 'nearest'), 4700);
assert.equal(lw.standardValue('E24', 5000, 'nearest'), 5100);
assert.equal(lw.standardValue('E24', 4800, 'up'), 5100);
assert.equal(lw.parseValue('4k7'), 4700); // IEC 60062 letter code
const pairs = lw.bestPairs('non-inverting', 11, 'E24', 1e3, 1e6, undefined, undefined, 'none', 3);
assert.equal(pairs.idealRatio, 10); // 1 + R2/R1 = 11
assert.ok(Math.abs(pairs.candidates[0].error) < 1e-12, 'E24 has exact decade ratios (e.g. 1k/10k)');
throws(() => lw.standardValue('E7', 100, 'nearest'), 'unknown_name', 'series');
const mc1 = lw.monteCarlo('inverting', 10e3, 47e3, 0.01, 0.01, 5e4, 1e5, 2e5, 1e6, 75, 5, 'uniform', 3, 'uniform', 3, 'gain', 1000, 7, undefined, undefined, 10);
const mc2 = lw.monteCarlo('inverting', 10e3, 47e3, 0.01, 0.01, 5e4, 1e5, 2e5, 1e6, 75, 5, 'uniform', 3, 'uniform', 3, 'gain', 1000, 7, undefined, undefined, 10);
assert.equal(mc1.stats.mean, mc2.stats.mean, 'same seed, same numbers');

// Distortion and noise. 4kTR: 1 kΩ at 300 K ≈ 4.07 nV/√Hz (common practice, no source).
assert.ok(Math.abs(lw.thermalNoiseDensity(1e3, 300) - 4.07e-9) < 0.01e-9);
// Full-power bandwidth SR/(2π·Vp): 1 V/µs at 10 V peak = 15.9 kHz.
assert.ok(Math.abs(lw.fullPowerBandwidth(1e6, 10) - 1e6 / (2 * Math.PI * 10)) < 1e-9);
// Closed-loop series: b1 = a1/(1 + a1·β) (Gray, Hurst, Lewis & Meyer, 5th ed., ch. 8, from memory).
assert.ok(Math.abs(lw.closedLoopSeries(1e4, 1e6, -2e10, 0.01).a1 - 1e4 / 101) < 1e-9);
throws(() => lw.thermalNoiseDensity(1e3, -1), 'out_of_domain', 'temperature_k');
const sweep = lw.noiseDensitySweep('non-inverting', 9e3, 1e3, 0, 300, 4e-9, 10, 1e-12, 100, 10e6, new Float64Array(0), 1, 1e7, 50);
assert.ok(sweep.frequencies instanceof Float64Array && sweep.frequencies.length === 50);

console.log('consumer: all checks passed');

// Errors must leave the module healthy: a thrown error may not leak wasm stack or
// heap (an earlier design that threw from inside wasm broke after 32 764 errors).
let caught = 0;
for (let i = 0; i < 100_000; i++) {
  try { lw.closedLoopGain(-100, 0.01); } catch (e) { if (e.code === 'oscillation') caught++; }
  try { lw.summarizeFeedback('nope', 1, 1); } catch (e) { if (e.code === 'unknown_name') caught++; }
}
assert.equal(caught, 200_000);
assert.ok(Math.abs(lw.summarizeFeedback('series-shunt', 1e5, 0.00999).closedLoopGain - 100) < 1e-9);
console.log('consumer: 200 000 errors later the module is healthy');
