// The hostile-call campaign (hostile.mjs) against the built package (pkg/, from
// scripts/build-package.sh): at least 20 000 calls over every export and Worksheet
// method, then 100 000 failing calls for the memory check. LOOPWRIGHT_HOSTILE_LONG=1
// runs 1 000 000 of each; LOOPWRIGHT_HOSTILE_SEED picks another seed (default 1).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { ROOT } from './browser.mjs';
import { campaign, goodCalls, healthy, leak, load, sweepTarget } from './hostile.mjs';

const LONG = process.env.LOOPWRIGHT_HOSTILE_LONG === '1';
const CALLS = LONG ? 1_000_000 : 24_000;
const LEAK_CALLS = LONG ? 1_000_000 : 100_000;
const SEED = Number(process.env.LOOPWRIGHT_HOSTILE_SEED ?? 1);

test(`${CALLS} hostile calls: no trap, no NaN or ∞, every refusal typed, module healthy`, async () => {
  const { lw } = await load(join(ROOT, 'pkg'));
  const r = campaign(lw, { calls: CALLS, seed: SEED });
  assert.deepEqual(r.missing, [], 'every export and method has a working call in the table');
  assert.equal(r.figures.calls, CALLS);
  // The fixed hostile circuit documents and spreads texts ran too.
  assert.ok(r.figures.once >= 100, `once ${r.figures.once}`);
  assert.ok(Object.keys(goodCalls()).length >= 70, 'the table covers the exports');
  assert.equal(r.figures.traps, 0, `traps: ${r.examples.join('; ')}`);
  assert.equal(r.figures.nonFinite, 0, `non-finite results: ${r.examples.join('; ')}`);
  assert.equal(r.figures.untyped, 0, `untyped refusals: ${r.examples.join('; ')}`);
  // Most hostile calls are refused, and some mutations leave a valid call.
  assert.ok(r.figures.refused > CALLS / 2, `refused ${r.figures.refused}`);
  assert.ok(r.figures.answered > 0, `answered ${r.figures.answered}`);
  assert.ok(r.healthy, 'known-good calls give their right answers afterwards');
});

test(`memory flat over ${LEAK_CALLS} failing calls (the error paths leak nothing)`, async () => {
  const { lw, memoryBytes } = await load(join(ROOT, 'pkg'));
  const l = leak(lw, memoryBytes, LEAK_CALLS);
  assert.equal(l.errors, LEAK_CALLS, 'every call of the leak run fails');
  // Before the fix: 10.3 MiB per million calls of loopAt({gain: 1e5, polesHz: '10'}).
  assert.equal(l.after - l.before, 0, `memory grew ${l.before} → ${l.after} bytes`);
  assert.ok(healthy(lw));
});

test('the issue reproducers: typed errors, never NaN or ∞', async () => {
  const { lw } = await load(join(ROOT, 'pkg'));
  const refused = (f, code, param) =>
    assert.throws(f, (e) => e.name === 'LoopwrightError' && e.code === code && e.param === param);
  // A string where a number is expected is an error, not converted.
  refused(() => lw.closedLoopGain('1e4', '0.0999'), 'wrong_type', 'a');
  refused(() => lw.parseValue(4700), 'wrong_type', 'text');
  refused(() => lw.parseValue({ length: 2 ** 31 }), 'wrong_type', 'text');
  refused(() => lw.topologyInfo(true), 'wrong_type', 'topologyName');
  refused(() => new lw.Worksheet().setCell('A1', 5), 'wrong_type', 'input');
  refused(() => lw.closedLoopGain(1n, 1), 'wrong_type', 'a');
  refused(
    () => lw.loopAt({ gain: 1e5, polesHz: '10' }, 0.01, 1),
    'wrong_type',
    'amplifier.polesHz',
  );
  refused(
    () => lw.loopAt({ gain: 1e5, polesHz: [10, 20, '3'] }, 0.01, 1),
    'wrong_type',
    'amplifier.polesHz[2]',
  );
  refused(
    () =>
      lw.loopAt(
        {
          get gain() {
            throw new Error('x');
          },
        },
        0.01,
        1,
      ),
    'wrong_type',
    'amplifier.gain',
  );
  // Sizes refused before allocation.
  refused(() => new lw.Worksheet().pasteTsv('A3', '\t'.repeat(3e7)), 'too_large', 'text');
  // Results that would be ±Infinity or NaN: the same refusal as the worksheet's #NUM!.
  refused(() => lw.summarizeFeedback('series-shunt', 1e5, 5e-324), 'overflow', 'idealGain');
  for (const args of [
    [1e-308, 1e3, 3],
    [1e-300, 1e-300, 1e-300],
  ]) {
    assert.throws(
      () => lw.twoPoleResponse(...args),
      (e) => e.name === 'LoopwrightError' && typeof e.code === 'string',
    );
  }
  // Counts past a stageTolerance limit name that limit, not the wasm usize's
  // 4294967295 (the campaign's trials: 2 ** 53 said "the limit is 4294967295").
  const demo = {
    stage: {
      format: 'loopwright-stage',
      version: 1,
      kind: 'non-inverting',
      amplifier: { a0: { min: 5e4, typ: 2e5 }, gbwHz: '10M' },
      parts: { rf: '10k', rg: '1k' },
    },
    parts: [{ part: 'rf', tolerance: { distribution: 'uniform', percent: 1 } }],
    spec: [{ figure: 'gainDb', freqHz: 1e3 }],
    trials: 50,
  };
  for (const [field, limit] of [
    ['trials', 100000],
    ['bins', 1000],
    ['keepFailures', 1000],
    ['maxCorners', 65536],
  ]) {
    for (const x of [limit + 1, 2 ** 32, 2 ** 53]) {
      assert.throws(
        () => lw.stageTolerance({ ...demo, [field]: x }),
        (e) =>
          e.name === 'LoopwrightError' &&
          e.code === 'too_large' &&
          e.param === field &&
          e.message.includes(`limit is ${limit}`),
        `${field}: ${x}`,
      );
    }
  }
  // The module answers right afterwards.
  assert.ok(healthy(lw));
});

test('circuitTwoPort: a regular options object crosses packed, with the answer and errors of the options reader', async () => {
  const { lw } = await load(join(ROOT, 'pkg'));
  const web = join(ROOT, 'pkg', 'web');
  const glue = await import(pathToFileURL(join(web, 'loopwright_glue.js')).href);
  const guard = await import(pathToFileURL(join(web, 'guard.js')).href);
  // The general path of every other options export: the copy, the module's options
  // reader (src/wasm/options.rs), the result walked for non-finite numbers.
  const general = (o) => guard.finite(glue.circuitTwoPort(guard.options(o, '')), 'result');
  const outcome = (f) => {
    try {
      return { value: f() };
    } catch (e) {
      return { error: [e.name, e.code, e.param, e.message] };
    }
  };
  const stage = {
    topology: 'series-shunt',
    ri: 1e5,
    ro: 1e3,
    gain: 1e4,
    rf: 1e6,
    rg: 1e3,
    rs: 1e4,
    rl: 2e3,
  };
  const { ri, ...noRi } = stage;
  let throwingGetter = 0;
  const cases = [
    stage,
    // Every optional field given, each a different value (a field put in the wrong
    // place of the packed call would change the answer).
    { ...stage, ci: 1e-11, co: 3e-12, cf: 2e-13, frequencyHz: 2e5 },
    { cf: 1e-12, ...stage, topology: 'shunt-shunt', rg: 0, frequencyHz: 1e4 },
    { ...stage, topology: 'series-series', ci: undefined, unknownButUndefined: undefined },
    { ...stage, topology: 'shunt-series', co: 5e-12, frequencyHz: 3e4 },
    { ...stage, topology: 'voltage-series' },
    { ...stage, ri: -1 },
    { ...stage, ri: Number.NaN },
    { ...stage, ri: Number.POSITIVE_INFINITY },
    { ...stage, topology: 'sideways' },
    { ...stage, topology: 5 },
    { ...stage, ri: '1e5' },
    { ...stage, polez: 1 },
    { polez: 1, ...stage, ri: 'x' },
    { ...stage, rl: undefined },
    { ...stage, frequencyHz: -1 },
    { ...stage, frequencyHz: null },
    { ...stage, gain: [1] },
    { ...stage, rs: { re: 1 } },
    noRi,
    {},
    3,
    null,
    [stage],
    new Float64Array(2),
    {
      ...stage,
      get rg() {
        throwingGetter++;
        throw new Error('no');
      },
    },
    Object.fromEntries(Array.from({ length: 65 }, (_, i) => [`f${i}`, i])),
  ];
  for (const [i, o] of cases.entries()) {
    const packed = outcome(() => lw.circuitTwoPort(o));
    const plain = outcome(() => general(o));
    assert.deepEqual(packed, plain, `case ${i}`);
    // The packed result is built in the entry module (twoPortFromPacked): the same
    // fields in the same order as the module's own object, every number the same.
    assert.equal(JSON.stringify(packed), JSON.stringify(plain), `case ${i}, field order`);
  }
  assert.equal(throwingGetter, 2, 'the getter ran once per call');
  assert.ok(
    outcome(() => lw.circuitTwoPort(cases[1])).value.af.exact.im !== 0,
    'at 200 kHz Af is complex',
  );
});

test('the …Into sweeps: hostile arrays refused by the field, the arrays untouched, no caller code run', async () => {
  const { lw } = await load(join(ROOT, 'pkg'));
  const options = {
    amplifier: { gain: 1e5, polesHz: [10, 1e6] },
    beta: 0.01,
    startHz: 1,
    stopHz: 1e8,
  };
  const want = lw.loopGainSweep({ ...options, points: 20 });
  const same = (into, what) => {
    for (const k of ['freqHz', 'magnitudeDb', 'phaseDeg']) {
      assert.deepStrictEqual(Array.from(into[k]), Array.from(want[k]), `${what}: ${k}`);
    }
  };
  /** The typed arrays among `into`'s own data fields (no getter is run). */
  const arraysOf = (into) =>
    Object.values(Object.getOwnPropertyDescriptors(into))
      .map((d) => d.value)
      .filter((v) => ArrayBuffer.isView(v));
  /** `into` refused with `code` on `param`, and each of its arrays still all 7. */
  const refused = (into, code, param) => {
    for (const a of arraysOf(into)) a.fill(7);
    assert.throws(
      () => lw.loopGainSweepInto(options, into),
      (e) => e.name === 'LoopwrightError' && e.code === code && e.param === param,
      `${code} ${param}`,
    );
    for (const a of arraysOf(into))
      assert.ok(
        a.every((x) => x === 7),
        `${param}: untouched`,
      );
  };
  const plain = sweepTarget(20);
  /** Three views side by side over one array of 60 numbers. */
  const sideBySideIn = (all) => ({
    freqHz: all.subarray(0, 20),
    magnitudeDb: all.subarray(20, 40),
    phaseDeg: all.subarray(40),
  });
  refused({ ...plain, freqHz: new Proxy(new Float64Array(20), {}) }, 'wrong_type', 'into.freqHz');
  refused({ ...plain, magnitudeDb: new Float32Array(20) }, 'wrong_type', 'into.magnitudeDb');
  refused({ ...plain, phaseDeg: new Array(20).fill(0) }, 'wrong_type', 'into.phaseDeg');
  refused({ ...plain, phaseDeg: new Float64Array(19) }, 'out_of_domain', 'into.phaseDeg');
  refused({ freqHz: plain.freqHz, magnitudeDb: plain.magnitudeDb }, 'missing', 'into.phaseDeg');
  refused({ ...plain, phase: new Float64Array(20) }, 'unknown_field', 'into.phase');
  // Views of one buffer: overlapping is refused, side by side is fine.
  const buffer = new Float64Array(60);
  refused(
    {
      freqHz: buffer.subarray(0, 20),
      magnitudeDb: buffer.subarray(19, 39),
      phaseDeg: buffer.subarray(40),
    },
    'out_of_domain',
    'into.magnitudeDb',
  );
  refused({ ...plain, phaseDeg: plain.freqHz }, 'out_of_domain', 'into.phaseDeg');
  const sideBySide = sideBySideIn(buffer);
  lw.loopGainSweepInto(options, sideBySide);
  same(sideBySide, 'views of one buffer');
  // A getter that throws, a Proxy whose traps throw: refused, naming where.
  const getter = { ...plain };
  Object.defineProperty(getter, 'magnitudeDb', {
    enumerable: true,
    get() {
      throw new Error('hostile getter');
    },
  });
  refused(getter, 'wrong_type', 'into.magnitudeDb');
  const trap = new Proxy(sweepTarget(20), {
    ownKeys() {
      throw new Error('hostile trap');
    },
  });
  assert.throws(
    () => lw.loopGainSweepInto(options, trap),
    (e) => e.code === 'wrong_type' && e.param === 'into',
  );
  // Counts: too few without `points`, too many, detached buffers.
  refused(sweepTarget(1), 'out_of_domain', 'into.freqHz');
  refused(sweepTarget(100_001), 'too_large', 'into.freqHz');
  const detached = sweepTarget(20);
  for (const a of Object.values(detached)) structuredClone(a.buffer, { transfer: [a.buffer] });
  assert.throws(
    () => lw.loopGainSweepInto(options, detached),
    (e) => e.code === 'out_of_domain' && e.param === 'into.freqHz',
  );
  // A subclass whose own `set` and `length` would lie: filled through the intrinsics,
  // so neither runs and the numbers are right.
  let ran = 0;
  class Lying extends Float64Array {
    set() {
      ran++;
      throw new Error('caller code ran');
    }
    get length() {
      ran++;
      return 3;
    }
  }
  const lying = { freqHz: new Lying(20), magnitudeDb: new Lying(20), phaseDeg: new Lying(20) };
  assert.equal(lw.loopGainSweepInto(options, lying), lying);
  assert.equal(ran, 0, 'no method of the caller ran');
  for (const k of ['freqHz', 'magnitudeDb', 'phaseDeg']) {
    assert.deepStrictEqual(Array.from(new Float64Array(lying[k].buffer)), Array.from(want[k]), k);
  }
  // Arrays on shared memory are filled too.
  const sharedInto = sideBySideIn(new Float64Array(new SharedArrayBuffer(8 * 60)));
  lw.loopGainSweepInto(options, sharedInto);
  same(sharedInto, 'shared memory');
  // The module's memory grows between two calls (a 100 000-point sweep): the views
  // the entry module copies through are made afresh, and the numbers stay right.
  const again = sweepTarget(20);
  lw.loopGainSweepInto(options, again);
  lw.loopGainSweep({ ...options, points: 100_000 });
  again.freqHz.fill(0);
  lw.loopGainSweepInto(options, again);
  same(again, 'after the memory grew');
  assert.ok(healthy(lw));
});
