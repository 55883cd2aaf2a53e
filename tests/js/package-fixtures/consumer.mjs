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
const z = lw.impedancesWithFeedback({
  topology: 'shunt-shunt',
  ziRe: 1e5,
  zoRe: 1e3,
  aRe: 1e4,
  betaRe: 0.0999,
});
assert.ok(Math.abs(z.input.re - 100) < 1e-9 && Math.abs(z.output.re - 1) < 1e-12);

const g = lw.gainSpread(0.01, 5e4, 1e5, 2e5);
assert.equal(g.positiveFeedback, false);
assert.ok(Math.abs(g.spreadPpm - g.spreadPercent * 1e4) < 1e-6);

const throws = (fn, code, param) =>
  assert.throws(fn, (e) => {
    assert.ok(e instanceof Error);
    assert.equal(e.name, 'LoopwrightError');
    assert.equal(e.code, code);
    assert.equal(e.param, param);
    return true;
  });
throws(() => lw.closedLoopGain(Number.NaN, 1), 'not_finite', 'a');
throws(() => lw.closedLoopGain(-100, 0.01), 'oscillation', 'beta');
throws(() => lw.betaForGain(10, 100), 'unreachable', 'targetGain');
throws(() => lw.summarizeFeedback('parallel-parallel', 1, 1), 'unknown_name', 'topology');
throws(
  () =>
    lw.impedancesWithFeedback({ topology: 'series-shunt', ziRe: -1, zoRe: 1, aRe: 1, betaRe: 1 }),
  'out_of_domain',
  'ziRe',
);

// Network area. IEC 60063 E24 holds 4.7 and 5.1 next to each other: 4.8k is
// nearest to 4.7k, 5.0k nearest to 5.1k, whether distance is taken linearly or by ratio.
assert.equal(lw.standardValue('E24', 4800, 'nearest'), 4700);
assert.equal(lw.standardValue('E24', 5000, 'nearest'), 5100);
assert.equal(lw.standardValue('E24', 4800, 'up'), 5100);
assert.equal(lw.parseValue('4k7'), 4700); // IEC 60062 letter code
// The one reader and display (docs/notation.md; SI Brochure, 9th ed., §5.4.3).
assert.equal(lw.parseValue('50 %', { percent: true }), 0.5);
assert.deepEqual(Array.from(lw.parseList('12 Hz, 4 MHz', { unit: 'Hz' })), [12, 4e6]);
throws(() => lw.parseValue('4k7k'), 'syntax', 'text');
assert.equal(lw.formatValue(4700, 'Ω', 4), '4.7 kΩ');
const pairs = lw.bestPairs({
  network: 'non-inverting',
  target: 11,
  series: 'E24',
  totalMin: 1e3,
  totalMax: 1e6,
  count: 3,
});
assert.equal(pairs.idealRatio, 10); // 1 + R2/R1 = 11
assert.ok(Math.abs(pairs.candidates[0].error) < 1e-12, 'E24 has exact decade ratios (e.g. 1k/10k)');
throws(() => lw.standardValue('E7', 100, 'nearest'), 'unknown_name', 'series');
const stageOptions = {
  stage: 'inverting',
  r1: 10e3,
  r2: 47e3,
  tolR1: 0.01,
  tolR2: 0.01,
  aMin: 5e4,
  aTyp: 1e5,
  aMax: 2e5,
  ri: 1e6,
  ro: 75,
  poleHz: 5,
};
const mcOptions = { ...stageOptions, trials: 1000, seed: 7, bins: 10 };
const mc1 = lw.monteCarlo(mcOptions);
const mc2 = lw.monteCarlo({ ...mcOptions });
assert.equal(mc1.stats.mean, mc2.stats.mean, 'same seed, same numbers');
throws(() => lw.monteCarlo({ ...mcOptions, tolR1: 0 }), 'out_of_domain', 'tolR1');
// The spread of A keeps GBW = aTyp·poleHz by default: at A = aMax the pole is at
// 500 kHz/2e5 = 2.5 Hz, so the narrowest bandwidth is 2.5·(1 + 2e5·β) (closed form).
const wc = lw.worstCase(stageOptions);
assert.ok(Math.abs(wc.bandwidthHz.min / (2.5 * (1 + 2e5 * (9.9e3 / 57.37e3))) - 1) < 1e-12);

// Distortion and noise. 4kTR: 1 kΩ at 300 K ≈ 4.07 nV/√Hz (common practice, no source).
assert.ok(Math.abs(lw.thermalNoiseDensity(1e3, 300) - 4.07e-9) < 0.01e-9);
// Full-power bandwidth SR/(2π·Vp): 1 V/µs at 10 V peak = 15.9 kHz.
assert.ok(Math.abs(lw.fullPowerBandwidth(1e6, 10) - 1e6 / (2 * Math.PI * 10)) < 1e-9);
// Closed-loop series: b1 = a1/(1 + a1·β) (Gray, Hurst, Lewis & Meyer, 5th ed., ch. 8, from memory).
assert.ok(Math.abs(lw.closedLoopSeries(1e4, 1e6, -2e10, 0.01).a1 - 1e4 / 101) < 1e-9);
throws(() => lw.thermalNoiseDensity(1e3, -1), 'out_of_domain', 'temperatureK');
const noiseStage = {
  kind: 'non-inverting',
  rFeedback: 9e3,
  rGain: 1e3,
  voltageDensity: 4e-9,
  voltageCornerHz: 10,
  currentDensity: 1e-12,
  currentCornerHz: 100,
  gbwHz: 10e6,
};
const sweep = lw.noiseDensitySweep({ ...noiseStage, fStart: 1, fStop: 1e7, points: 50 });
assert.ok(sweep.frequencies instanceof Float64Array && sweep.frequencies.length === 50);
// The noise bandwidth is that of the band integrated: below f_c = 1 MHz, about the
// band's width (fc·(atan(fH/fc) − atan(fL/fc)), the Lorentzian's integral).
const band = lw.integratedNoise({ ...noiseStage, fLow: 20, fHigh: 20e3 });
const lorentz = 1e6 * (Math.atan(20e3 / 1e6) - Math.atan(20 / 1e6));
assert.ok(Math.abs(band.noiseBandwidthHz / lorentz - 1) < 1e-9);
throws(() => lw.integratedNoise({ ...noiseStage, fLow: -1 }), 'out_of_domain', 'fLow');
const hd = lw.distortionAtFrequency({
  a1: 4.167e5,
  a2: 1e8,
  a3: -2e12,
  beta: 0.01,
  amplitude: 1,
  poleHz: 12,
  frequencyHz: 1e3,
});
assert.ok(Math.abs(hd.loopGains[0].magnitude - 50) < 0.05, 'loop gain at 1 kHz ≈ 50');

// Frequency response and stability. A single-pole amplifier A(s) = A0/(1 + s/ωp) with
// A0 = 10⁵, fp = 10 Hz, and β = 0.01: T0 = 1000, D = 1001, so the closed loop is a
// single pole at fp·D = 10 010 Hz with Af0 = 10⁵/1001 (Af = A/(1 + Aβ) with A one pole;
// common practice, no source).
const one = { gain: 1e5, polesHz: [10] };
const af0 = 1e5 / 1001;
const near = (x, y, rel, what) =>
  assert.ok(Math.abs(x - y) <= rel * Math.abs(y), `${what}: ${x} vs ${y}`);
const bw = lw.closedLoopBandwidth(one, 0.01);
near(bw.midbandGain, af0, 1e-12, 'midband gain');
near(bw.highHz, 10010, 1e-9, 'upper −3 dB');
assert.equal(bw.lowHz, null); // no low cut in the model
near(lw.singlePoleHighCutoff(10, 1e5, 0.01), 10010, 1e-12, 'fH·(1 + A0β)');
// |Af| at the −3 dB frequency is Af0/√2 at −45° (single pole at f = fH).
const at = lw.loopAt(one, 0.01, 10010);
near(at.closedLoopGain.magnitude, af0 / Math.SQRT2, 1e-12, '|Af(fH)|');
near(at.closedLoopGain.phaseDeg, -45, 1e-12, '∠Af(fH)');
// T(jf) = 1000/(1 + j·1001) there: |T| = 1000/√(1 + 1001²).
near(at.loopGain.magnitude, 1000 / Math.hypot(1, 1001), 1e-12, '|T(fH)|');
// Same model with the pole list as a Float64Array (accepted at runtime and by the types).
near(
  lw.loopAt({ gain: 1e5, polesHz: new Float64Array([10]) }, 0.01, 10010).closedLoopGain.magnitude,
  af0 / Math.SQRT2,
  1e-12,
  'Float64Array poles',
);
// Unity-gain crossover where 1000/√(1 + (f/10)²) = 1: f = 10·√(10⁶ − 1); PM = 180° − atan(f/10).
const m1 = lw.stabilityMargins(one, 0.01);
near(m1.crossoverHz, 10 * Math.sqrt(1e6 - 1), 1e-9, 'crossover');
near(
  m1.phaseMarginDeg,
  180 - (Math.atan(Math.sqrt(1e6 - 1)) * 180) / Math.PI,
  1e-9,
  'phase margin',
);
assert.equal(m1.gainMarginDb, null); // one pole never reaches −180°
assert.equal(m1.validity, 'meaningful');
// The closed-loop pole: s = −2π·10 010 rad/s, real, ζ = 1.
const p1 = lw.closedLoopPoles(one, 0.01);
assert.equal(p1.poles.length, 1);
near(p1.poles[0].re, -2 * Math.PI * 10010, 1e-9, 'pole');
assert.equal(p1.poles[0].q, null);
assert.equal(p1.verdict, 'stable');
assert.equal(p1.padeOrder, 0); // no delay in the loop
// Af as a rational function: its DC value numerator[0]/denominator[0] is Af0.
const tf = lw.closedLoopTransfer(one, 0.01);
near(tf.numerator[0] / tf.denominator[0], af0, 1e-12, 'transfer at DC');
// First-order step: final value Af0, no overshoot, 10–90 % rise ln 9·τ and 1 % settling
// ln 100·τ with τ = 1/(2π·10 010) (exponential step, common practice, no source).
const tau = 1 / (2 * Math.PI * 10010);
const st = lw.stepResponse(one, 0.01, 0.01, 200);
near(st.finalValue, af0, 1e-9, 'final value');
assert.equal(st.overshootPercent, 0);
assert.equal(st.peakTimeS, null);
near(st.riseTimeS, Math.log(9) * tau, 1e-6, 'rise time');
near(st.settlingTimeS, Math.log(100) * tau, 1e-6, 'settling time');
assert.ok(
  st.timeS instanceof Float64Array && st.timeS.length === 200 && st.output instanceof Float64Array,
);
const wf = lw.stepWaveform(one, 0.01, 5 * tau, 6);
// y(t) = Af0·(1 − e^(−t/τ)) at t = τ (sample 1 of 0, τ, …, 5τ).
near(wf.output[1], af0 * (1 - Math.exp(-1)), 1e-6, 'y(τ)');
const an = lw.analyzeLoop(one, 0.01, 0.01, 50);
near(an.bandwidth.highHz, 10010, 1e-9, 'analyzeLoop bandwidth');
assert.ok(Array.isArray(an.step.waveform.output) && an.step.waveform.output.length === 50);
assert.equal(an.bandwidthNote, null);
const sw = lw.loopGainSweep({ amplifier: one, beta: 0.01, startHz: 10, stopHz: 1e6, points: 6 }); // 10 Hz … 1 MHz, one point per decade
assert.ok(sw.freqHz instanceof Float64Array && sw.freqHz.length === 6);
near(sw.freqHz[3], 1e4, 1e-12, 'log spacing');
// |T| at fp = 10 Hz is T0/√2: 60 dB − 3.0103 dB.
near(sw.magnitudeDb[0], 60 - 10 * Math.log10(2), 1e-12, '|T(fp)| dB');
near(
  lw.closedLoopSweep({ amplifier: one, beta: 0.01, startHz: 10, stopHz: 1e6, points: 6 })
    .magnitudeDb[0],
  20 * Math.log10(af0 / Math.hypot(1, 10 / 10010)),
  1e-9,
  '|Af(10 Hz)| dB',
);
// The …Into forms write the same numbers into the caller's arrays (points = their
// length) and return the object they were given.
{
  const into = {
    freqHz: new Float64Array(6),
    magnitudeDb: new Float64Array(6),
    phaseDeg: new Float64Array(6),
  };
  const range = { amplifier: one, beta: 0.01, startHz: 10, stopHz: 1e6 };
  assert.equal(lw.loopGainSweepInto(range, into), into);
  for (const k of ['freqHz', 'magnitudeDb', 'phaseDeg']) assert.deepStrictEqual(into[k], sw[k], k);
  const cl = lw.closedLoopSweep({ ...range, points: 6 });
  lw.closedLoopSweepInto({ ...range, points: 6 }, into);
  for (const k of ['freqHz', 'magnitudeDb', 'phaseDeg']) assert.deepStrictEqual(into[k], cl[k], k);
  // A refused call leaves the arrays as they were.
  into.phaseDeg.fill(7);
  throws(() => lw.loopGainSweepInto({ ...range, points: 5 }, into), 'out_of_domain', 'into.freqHz');
  throws(() => lw.loopGainSweepInto({ ...range, stopHz: 1 }, into), 'out_of_domain', 'stopHz');
  assert.ok(into.phaseDeg.every((x) => x === 7));
  const one1 = {
    freqHz: new Float64Array(1),
    magnitudeDb: new Float64Array(1),
    phaseDeg: new Float64Array(1),
  };
  throws(() => lw.loopGainSweepInto(range, one1), 'out_of_domain', 'into.freqHz');
  throws(
    () => lw.loopGainSweepInto(range, { ...into, phaseDeg: [0, 0, 0, 0, 0, 0] }),
    'wrong_type',
    'into.phaseDeg',
  );
}
// Three equal poles at 1 kHz: 1 + T0/(1 + s/ω)³ = 0 puts poles on the jω axis at ω·√3
// when T0 = 8, so 8 is the marginal loop gain and the phase crossover is at √3 kHz
// (common practice, no source). With T0 = 4 the gain margin is 20·log10(8/4) dB.
const three = (gain) => ({ gain, polesHz: [1e3, 1e3, 1e3] });
const p3 = lw.closedLoopPoles(three(8), 1);
assert.equal(p3.verdict, 'marginal');
near(p3.poles[0].naturalHz, 1e3 * Math.sqrt(3), 1e-9, 'marginal pole');
near(p3.poles[2].naturalHz, 3e3, 1e-9, 'real pole at 3ω');
const m3 = lw.stabilityMargins(three(4), 1);
near(m3.gainMarginDb, 20 * Math.log10(2), 1e-9, 'gain margin');
near(m3.phaseCrossoverHz, 1e3 * Math.sqrt(3), 1e-9, 'phase crossover');
// Two equal poles at 1 kHz with T0 = 3: ωn = ω1·√(1 + T0) = 2 kHz, ζ = 1/√(1 + T0) = 0.5,
// Q = 1; overshoot e^(−πζ/√(1−ζ²)), peaking Q/√(1 − 1/(4Q²)) at ωn·√(1 − 2ζ²); maximally
// flat at T0 = 1 (second-order system; Ogata, Modern Control Engineering, 5th ed., ch. 5, from memory).
const tp2 = lw.twoPoleResponse(1e3, 1e3, 3);
near(tp2.naturalHz, 2000, 1e-12, 'ωn');
near(tp2.zeta, 0.5, 1e-12, 'ζ');
near(tp2.overshootPercent, 100 * Math.exp(-Math.PI / Math.sqrt(3)), 1e-9, 'overshoot');
near(tp2.peakingDb, 20 * Math.log10(1 / Math.sqrt(0.75)), 1e-9, 'peaking');
near(tp2.peakHz, 2000 * Math.SQRT1_2, 1e-9, 'peak frequency');
near(tp2.maximallyFlatLoopGain, 1, 1e-12, 'maximally flat T0');
// Compensation: whatever the pole or β found, the loop it describes must have the target
// margin when analysed on its own, and Af = A0/(1 + A0β) (Af = A/(1 + Aβ)).
const dom = lw.dominantPoleForMargin({ gain: 1e5, polesHz: [1e6, 1e7] }, 1, 60);
near(dom.phaseMarginDeg, 60, 1e-6, 'dominant-pole margin');
near(
  lw.stabilityMargins({ gain: 1e5, polesHz: [dom.value, 1e6, 1e7] }, 1).phaseMarginDeg,
  60,
  1e-6,
  'margin of the compensated loop',
);
near(dom.closedLoopGain, 1e5 / (1 + 1e5), 1e-12, 'follower Af');
const mb = lw.maxBetaForMargin({ gain: 1e5, polesHz: [10, 1e6] }, 60, 1);
near(
  lw.stabilityMargins({ gain: 1e5, polesHz: [10, 1e6] }, mb.value).phaseMarginDeg,
  60,
  1e-6,
  'margin at the largest β',
);
near(mb.closedLoopGain, 1e5 / (1 + 1e5 * mb.value), 1e-12, 'Af at the largest β');
throws(() => lw.loopAt({ gain: 1, poleHz: [1] }, 1, 1), 'unknown_field', 'amplifier.poleHz'); // misspelt field
throws(
  () => lw.loopAt({ gain: 1 }, { gain: 1, padeOrder: 3 }, 1),
  'out_of_domain',
  'beta.padeOrder',
);
throws(
  () => lw.loopGainSweep({ amplifier: one, beta: 0.01, startHz: 1, stopHz: 1e6, points: 1e6 }),
  'too_large',
  'points',
);
throws(() => lw.stepResponse(one, 0.01, 0.9, 10), 'out_of_domain', 'settleBand');
throws(() => lw.twoPoleResponse(-1, 1e3, 3), 'out_of_domain', 'f1');
throws(() => lw.dominantPoleForMargin(one, 1, 200), 'out_of_domain', 'targetPmDeg');
throws(() => lw.singlePoleHighCutoff(0, 1e5, 0.01), 'out_of_domain', 'fH');

// Circuits. A 10 V source on a 1k/3k divider: I = 10/4k = 2.5 mA, V(mid) = 7.5 V, and
// the divider seen from mid with the source zeroed is 1k ‖ 3k = 750 Ω (Ohm's law).
const doc = (elements) => JSON.stringify({ format: 'loopwright-circuit', version: 1, elements });
const divider = doc([
  { name: 'Vs', kind: 'voltage-source', nodes: ['top', '0'], value: 10 },
  { name: 'R1', kind: 'resistor', nodes: ['top', 'mid'], value: '1k' },
  { name: 'R2', kind: 'resistor', nodes: ['mid', '0'], value: '3k' },
]);
const sol = lw.circuitSolve(divider, 0);
near(sol.nodeVoltages.find((v) => v.name === 'mid').re, 7.5, 1e-12, 'V(mid)');
near(sol.elementCurrents.find((v) => v.name === 'R2').re, 2.5e-3, 1e-12, 'I(R2)');
near(lw.circuitPortImpedance(divider, 'mid', '0', 0).re, 750, 1e-12, 'Rth');
// RC low pass with fc = 1/(2πRC) = 1 kHz: H(j·fc) = 1/(1 + j) = 0.5 − 0.5j; H(0) = 1.
const rc = doc([
  { name: 'Vs', kind: 'voltage-source', nodes: ['in', '0'], value: 1 },
  { name: 'R', kind: 'resistor', nodes: ['in', 'out'], value: 1e3 },
  { name: 'C', kind: 'capacitor', nodes: ['out', '0'], value: 1e-6 / (2 * Math.PI) },
]);
const h = lw.circuitSweep({
  circuit: rc,
  source: 'Vs',
  plus: 'out',
  minus: '0',
  frequencies: new Float64Array([1e3, 0]),
});
assert.ok(h.re instanceof Float64Array && h.im instanceof Float64Array);
near(h.re[0], 0.5, 1e-12, 'Re H(fc)');
near(h.im[0], -0.5, 1e-12, 'Im H(fc)');
near(h.re[1], 1, 1e-12, 'H(0)');
// A non-inverting template, Rf = 9k, Rg = 1k: the feedback network's h parameters are
// h12 = β = Rg/(Rf + Rg) = 0.1, h11 = Rf ‖ Rg = 900 Ω, h22 = 1/(Rf + Rg); 1/β = 10 (divider
// by Ohm's law). The method's Af must be A/(1 + Aβ) of its own A and β.
const twoPort = lw.circuitTwoPort({
  topology: 'series-shunt',
  ri: 1e5,
  ro: 100,
  gain: 1e4,
  rf: 9e3,
  rg: 1e3,
  rs: 1e3,
  rl: 1e4,
});
assert.equal(twoPort.parameters.kind, 'h');
assert.equal(twoPort.gainUnit, 'V/V');
near(twoPort.beta.re, 0.1, 1e-12, 'β');
near(twoPort.parameters.p11.re, 900, 1e-9, 'h11');
near(twoPort.parameters.p22.re, 1e-4, 1e-9, 'h22');
near(twoPort.idealAf.re, 10, 1e-12, '1/β');
near(
  twoPort.af.twoPort.re,
  twoPort.a.re / (1 + twoPort.a.re * twoPort.beta.re),
  1e-12,
  'Af = A/(1 + Aβ)',
);
assert.ok(twoPort.af.relativeError < 1e-6, 'the two-port method is close for a stiff stage');
// Blackman's formula and the asymptotic gain are exact (Blackman, "Effect of feedback on
// impedance", Bell System Technical Journal, 1943, from memory): they agree with the solve.
const views = lw.circuitStageViews({
  topology: 'series-shunt',
  ri: 1e5,
  ro: 100,
  gain: 1e4,
  rf: 9e3,
  rg: 1e3,
  rs: 1e3,
  rl: 1e4,
});
near(views.gain.gInf.re, 10, 1e-12, 'G∞ = 1/β');
assert.ok(
  views.gain.relativeError < 1e-12 &&
    views.input.relativeError < 1e-9 &&
    views.output.relativeError < 1e-9,
);
// VCVS k = 1e3 with input resistance Ri = 10k between p and n, Rf = 9k (o–n), Rg = 1k (n–0):
// nodal analysis with a test current I into p gives V(n) = I·(9k + 10⁷)/10 and
// Zin = 1 010 900 Ω; Z0 (k = 0) = Ri + Rf ‖ Rg = 10 900 Ω; with p open no current flows in
// Ri, so the return ratio with the port open is 0.
const zin = doc([
  { name: 'Ri', kind: 'resistor', nodes: ['p', 'n'], value: 1e4 },
  { name: 'E', kind: 'vcvs', nodes: ['o', '0'], control: ['p', 'n'], value: 1e3 },
  { name: 'Rf', kind: 'resistor', nodes: ['o', 'n'], value: 9e3 },
  { name: 'Rg', kind: 'resistor', nodes: ['n', '0'], value: 1e3 },
]);
const bl = lw.circuitBlackman({ circuit: zin, controlled: 'E', plus: 'p', minus: '0' });
near(bl.exact.re, 1010900, 1e-12, 'Zin');
near(bl.blackman.re, 1010900, 1e-12, 'Blackman Zin');
near(bl.z0.re, 10900, 1e-12, 'Z0');
assert.equal(Math.abs(bl.tOpen.re), 0);
// An ideal VCVS of gain 99 with a 9k/1k divider: T = 99·0.1 = 9.9, G∞ = 1/β = 10, G0 = 0,
// Af = 99/(1 + 9.9) (Af = A/(1 + Aβ)); the current of the 1k foot is V(n)/1k = 0.1·Af mA.
const follower = doc([
  { name: 'Vs', kind: 'voltage-source', nodes: ['p', '0'], value: 1 },
  { name: 'E', kind: 'vcvs', nodes: ['o', '0'], control: ['p', 'n'], value: 99 },
  { name: 'R1', kind: 'resistor', nodes: ['o', 'n'], value: 9e3 },
  { name: 'R2', kind: 'resistor', nodes: ['n', '0'], value: 1e3 },
]);
const ag = lw.circuitAsymptoticGain({
  circuit: follower,
  controlled: 'E',
  source: 'Vs',
  plus: 'o',
  minus: '0',
});
near(ag.t.re, 9.9, 1e-12, 'T');
near(ag.gInf.re, 10, 1e-12, 'G∞');
assert.equal(ag.g0.re, 0);
near(ag.af.re, 99 / 10.9, 1e-12, 'Af');
near(
  lw.circuitAsymptoticGainCurrent({
    circuit: follower,
    controlled: 'E',
    source: 'Vs',
    element: 'R2',
  }).af.re,
  (0.1 * (99 / 10.9)) / 1e3,
  1e-12,
  'I(R2)',
);
const circuitThrows = (fn, code, param, subject) =>
  assert.throws(fn, (e) => {
    assert.equal(e.name, 'LoopwrightError');
    assert.deepEqual([e.code, e.param, e.subject], [code, param, subject]);
    return true;
  });
circuitThrows(
  () => lw.circuitSolve(divider.replace('"3k"', '"-3k"'), 0),
  'out_of_domain',
  'value',
  'R2',
);
circuitThrows(
  () => lw.circuitPortImpedance(divider, 'mid', 'nowhere', 0),
  'unknown_name',
  'node',
  'nowhere',
);
circuitThrows(
  () =>
    lw.circuitSweep({
      circuit: rc,
      source: 'Vs',
      plus: 'out',
      minus: '0',
      frequencies: new Float64Array([-1]),
    }),
  'out_of_domain',
  'frequency',
  '',
);
circuitThrows(
  () =>
    lw.circuitTemplate({
      topology: 'parallel',
      ri: 1e5,
      ro: 100,
      gain: 1e4,
      rf: 9e3,
      rg: 1e3,
      rs: 1e3,
      rl: 1e4,
    }),
  'unknown_name',
  'topology',
  '',
);
circuitThrows(
  () =>
    lw.circuitTwoPort({
      topology: 'series-shunt',
      ri: -1,
      ro: 100,
      gain: 1e4,
      rf: 9e3,
      rg: 1e3,
      rs: 1e3,
      rl: 1e4,
    }),
  'out_of_domain',
  'ri',
  '',
);
circuitThrows(
  () =>
    lw.circuitStageViews({
      topology: 'series-shunt',
      ri: 1e5,
      ro: 100,
      gain: 1e4,
      rf: 9e3,
      rg: 1e3,
      rs: 0,
      rl: 1e4,
    }),
  'out_of_domain',
  'rs',
  '',
);
circuitThrows(
  () => lw.circuitBlackman({ circuit: zin, controlled: 'Rf', plus: 'p', minus: '0' }),
  'out_of_domain',
  'controlled',
  'Rf',
);
circuitThrows(
  () =>
    lw.circuitAsymptoticGain({
      circuit: follower,
      controlled: 'E',
      source: 'R1',
      plus: 'o',
      minus: '0',
    }),
  'out_of_domain',
  'source',
  'R1',
);
circuitThrows(
  () =>
    lw.circuitAsymptoticGainCurrent({
      circuit: follower,
      controlled: 'E',
      source: 'Vs',
      element: 'Rx',
    }),
  'unknown_name',
  'element',
  'Rx',
);

// Shapes: each result has exactly the keys its TypeScript interface lists (the lists below
// are copied from the interfaces in src/wasm/freq.rs and src/wasm/circuit.rs), so the
// hand-written types cannot drift from what the code returns.
const keys = (o) => Object.keys(o).sort();
const shape = (obj, expected, what) =>
  assert.deepEqual(keys(obj), [...expected].sort(), `${what} keys`);
const PHASOR = ['re', 'im', 'magnitude', 'phaseDeg'];
const SWEEP = ['freqHz', 'magnitudeDb', 'phaseDeg'];
const MARGINS = [
  'phaseMarginDeg',
  'crossoverHz',
  'gainMarginDb',
  'phaseCrossoverHz',
  'gainCrossings',
  'phaseCrossings',
  'validity',
  'closedLoop',
];
const CROSSING = ['freqHz', 'margin', 'rising'];
const POLES = ['poles', 'verdict', 'minZeta', 'padeOrder'];
const POLE = ['re', 'im', 'naturalHz', 'zeta', 'q'];
const BANDWIDTH = ['midbandGain', 'highHz', 'lowHz', 'bandwidthHz', 'peakingDb', 'peakHz'];
const METRICS = [
  'finalValue',
  'overshootPercent',
  'peakTimeS',
  'undershootPercent',
  'riseTimeS',
  'settlingTimeS',
  'settleBand',
];
const WAVEFORM = ['timeS', 'output'];
const COMPENSATION = ['value', 'phaseMarginDeg', 'crossoverHz', 'closedLoopGain', 'holdsFrom'];
shape(sw, SWEEP, 'loopGainSweep');
shape(
  lw.closedLoopSweep({ amplifier: one, beta: 0.01, startHz: 10, stopHz: 1e6, points: 5 }),
  SWEEP,
  'closedLoopSweep',
);
shape(at, ['loopGain', 'closedLoopGain'], 'loopAt');
shape(at.loopGain, PHASOR, 'loopAt.loopGain');
shape(m3, MARGINS, 'stabilityMargins');
shape(m3.gainCrossings[0], CROSSING, 'gainCrossings[0]');
shape(m3.phaseCrossings[0], CROSSING, 'phaseCrossings[0]');
shape(p3, POLES, 'closedLoopPoles');
shape(p3.poles[0], POLE, 'poles[0]');
shape(tf, ['omegaN', 'numerator', 'denominator'], 'closedLoopTransfer');
assert.ok(Array.isArray(tf.numerator) && Array.isArray(tf.denominator));
shape(bw, BANDWIDTH, 'closedLoopBandwidth');
shape(st, [...METRICS, ...WAVEFORM], 'stepResponse');
shape(an, ['margins', 'poles', 'bandwidth', 'bandwidthNote', 'step', 'stepNote'], 'analyzeLoop');
shape(an.margins, MARGINS, 'analyzeLoop.margins');
shape(an.poles, POLES, 'analyzeLoop.poles');
shape(an.bandwidth, BANDWIDTH, 'analyzeLoop.bandwidth');
shape(an.step, [...METRICS, 'waveform'], 'analyzeLoop.step');
shape(an.step.waveform, WAVEFORM, 'analyzeLoop.step.waveform');
shape(wf, WAVEFORM, 'stepWaveform');
shape(dom, COMPENSATION, 'dominantPoleForMargin');
shape(mb, COMPENSATION, 'maxBetaForMargin');
shape(
  tp2,
  ['naturalHz', 'q', 'zeta', 'peakingDb', 'peakHz', 'overshootPercent', 'maximallyFlatLoopGain'],
  'twoPoleResponse',
);
const COMPLEX = ['re', 'im'];
const COMPARISON = ['twoPort', 'exact', 'relativeError'];
const BLACKMAN = ['z0', 'tShort', 'tOpen', 'blackman', 'exact', 'relativeError'];
const ASYMPTOTIC = ['gInf', 'g0', 't', 'af', 'exact', 'relativeError'];
shape(sol, ['frequencyHz', 'nodeVoltages', 'elementCurrents'], 'circuitSolve');
shape(sol.nodeVoltages[0], ['name', 're', 'im'], 'nodeVoltages[0]');
shape(sol.elementCurrents[0], ['name', 're', 'im'], 'elementCurrents[0]');
shape(lw.circuitPortImpedance(divider, 'mid', '0', 0), COMPLEX, 'circuitPortImpedance');
shape(h, COMPLEX, 'circuitSweep');
shape(
  twoPort,
  [
    'topology',
    'frequencyHz',
    'gainUnit',
    'parameters',
    'a',
    'beta',
    'loopGain',
    'feedbackAmount',
    'ri',
    'ro',
    'af',
    'rif',
    'rof',
    'rin',
    'rout',
    'idealAf',
    'idealAfError',
  ],
  'circuitTwoPort',
);
shape(twoPort.parameters, ['kind', 'p11', 'p12', 'p21', 'p22'], 'circuitTwoPort.parameters');
for (const k of ['a', 'beta', 'loopGain', 'feedbackAmount', 'ri', 'ro', 'idealAf'])
  shape(twoPort[k], COMPLEX, `circuitTwoPort.${k}`);
for (const k of ['af', 'rif', 'rof', 'rin', 'rout'])
  shape(twoPort[k], COMPARISON, `circuitTwoPort.${k}`);
shape(twoPort.af.exact, COMPLEX, 'circuitTwoPort.af.exact');
shape(views, ['gain', 'input', 'output'], 'circuitStageViews');
shape(views.gain, ASYMPTOTIC, 'circuitStageViews.gain');
shape(views.input, BLACKMAN, 'circuitStageViews.input');
shape(views.output, BLACKMAN, 'circuitStageViews.output');
shape(bl, BLACKMAN, 'circuitBlackman');
shape(bl.tShort, COMPLEX, 'circuitBlackman.tShort');
shape(ag, ASYMPTOTIC, 'circuitAsymptoticGain');
shape(
  lw.circuitAsymptoticGainCurrent({
    circuit: follower,
    controlled: 'E',
    source: 'Vs',
    element: 'R2',
  }),
  ASYMPTOTIC,
  'circuitAsymptoticGainCurrent',
);
// The circuit document written by circuitTemplate has the CircuitDocument shape.
const tdoc = JSON.parse(
  lw.circuitTemplate({
    topology: 'series-shunt',
    ri: 1e5,
    ro: 100,
    gain: 1e4,
    rf: 9e3,
    rg: 1e3,
    rs: 1e3,
    rl: 1e4,
  }),
);
shape(
  tdoc,
  'nodes' in tdoc ? ['format', 'version', 'nodes', 'elements'] : ['format', 'version', 'elements'],
  'circuitTemplate document',
);
for (const e of tdoc.elements) {
  const extra =
    {
      vcvs: ['control'],
      vccs: ['control'],
      ccvs: ['controlElement'],
      cccs: ['controlElement'],
      admittance: ['valueIm'],
    }[e.kind] ?? [];
  shape(e, ['name', 'kind', 'nodes', 'value', ...extra], `template element ${e.name}`);
}

// Worksheet engine: a sheet built from JS, recalculated, saved and loaded.
const ws = new lw.Worksheet();
ws.setCell('A1', '100k');
ws.setCell('A2', '0.01');
const changed = ws.setCell('A3', '=FEEDBACK.GAIN(A1; A2)');
assert.ok(changed.includes('A3'));
// Af = 10⁵/(1 + 10⁵·0.01) = 99.90 (closed form).
assert.ok(Math.abs(ws.value('A3').number - 1e5 / 1001) < 1e-9);
assert.deepEqual(ws.setCell('A1', '200k').sort(), ['A1', 'A3']);
ws.setCell('B1', '=1/0');
assert.equal(ws.value('B1').error, '#DIV/0!');
const sheetDoc = ws.saveDocument();
const ws2 = new lw.Worksheet();
ws2.loadDocument(sheetDoc);
assert.equal(ws2.saveDocument(), sheetDoc, 'save → load → save is byte-identical');
throws(
  () => ws2.loadDocument('{"format":"loopwright-sheet","version":99,"cells":{}}'),
  'bad_document',
  'document',
);
assert.equal(ws2.value('A3').number, ws.value('A3').number, 'nothing lost by the refused document');
// Stage area. A follower on an A0 = 1e5, GBW = 1 MHz amplifier with no input or
// output parts: T(jω) = A(jω) (β = 1), so at 1 kHz T = 1e5/(1 + j·100) and the
// closed-loop gain A/(1 + A); the closed loop has one pole at −2π·(GBW + fp)
// (single-pole algebra, common practice, no source).
const stageFollower = {
  format: 'loopwright-stage',
  version: 1,
  kind: 'non-inverting',
  amplifier: { a0: 1e5, gbwHz: '1M' },
};
const written = lw.stageCircuit(stageFollower);
assert.deepEqual(Object.keys(written).sort(), [
  'amplifier',
  'circuit',
  'gainUnit',
  'input',
  'output',
  'outputCurrent',
  'source',
]);
assert.equal(JSON.parse(written.circuit).version, 2);
const tl = lw.circuitLoopGain({ circuit: stageFollower, frequenciesHz: [1e3] });
assert.ok(tl.re instanceof Float64Array && tl.magnitudeDb instanceof Float64Array);
near(tl.re[0], 1e5 / (1 + 1e4), 1e-12, 'follower T re');
near(tl.im[0], -1e7 / (1 + 1e4), 1e-12, 'follower T im');
const gl = lw.circuitGain({ circuit: JSON.stringify(stageFollower), frequenciesHz: [0] });
near(gl.re[0], 1e5 / (1 + 1e5), 1e-12, 'follower DC gain');
const pl = lw.circuitPoles({ circuit: stageFollower });
assert.equal(pl.verdict, 'stable');
assert.equal(pl.poles.length, 1);
near(pl.poles[0].re, -2 * Math.PI * (1e6 + 10), 1e-12, 'follower pole');
const zl = lw.circuitImpedance({ circuit: written.circuit, port: 'out', frequenciesHz: [1e3] });
assert.deepEqual(Object.keys(zl).sort(), ['freqHz', 'im', 'magnitudeOhm', 'phaseDeg', 're']);
throws(
  () => lw.stageCircuit({ ...stageFollower, parts: { rf: '10k', rg: 0 } }),
  'out_of_domain',
  'parts.rg',
);
throws(
  () => lw.amplifierOpenLoop({ amplifier: { a0: 1e5, gbwHz: -1 }, frequenciesHz: [1] }),
  'out_of_domain',
  'amplifier.gbwHz',
);
throws(() => lw.circuitPoles({ circuit: stageFollower, spread: 'min' }), 'unknown_field', 'spread');

const catalog = JSON.parse(lw.functionCatalog());
assert.ok(catalog.functions.some((f) => f.name === 'FEEDBACK.GAIN'));
ws.free();
ws2.free();

// Circuit noise: two 1 kΩ resistors to ground at 300 K are 500 Ω of thermal noise,
// √(4kT·500) = 2.878 nV/√Hz (Johnson–Nyquist, k exact in the 2019 SI), each half the power.
const pair = doc([
  { name: 'R1', kind: 'resistor', nodes: ['a', '0'], value: 1e3 },
  { name: 'R2', kind: 'resistor', nodes: ['a', '0'], value: 1e3 },
]);
const nd = lw.circuitNoise({ circuit: pair, output: 'a', frequenciesHz: [10, 1e6] });
assert.ok(nd.total instanceof Float64Array && nd.sources.R1 instanceof Float64Array);
near(nd.total[1], Math.sqrt(4 * 1.380649e-23 * 300 * 500), 1e-12, 'parallel pair noise');
near(nd.shares.R2[0], 0.5, 1e-12, 'share');
assert.equal(nd.kinds.R1, 'thermal');
assert.equal(nd.noiseGainPeak, null);
// Over 0…10 kHz: white noise, rms = density·√(10 kHz).
const nb = lw.circuitNoiseIntegral({
  circuit: pair,
  output: 'a',
  bandHz: [0, 1e4],
  signalRms: 1e-3,
});
near(nb.totalRms, nd.total[0] * 100, 1e-8, 'band rms');
near(nb.snrDb, 20 * Math.log10(1e-3 / nb.totalRms), 1e-12, 'SNR');
assert.deepEqual(Object.keys(nb).sort(), [
  'bandHz',
  'evaluations',
  'inputReferredRms',
  'snrDb',
  'sources',
  'totalRms',
]);
assert.throws(
  () => lw.circuitNoise({ circuit: pair, output: 'nowhere', frequenciesHz: [1] }),
  (e) => e.code === 'unknown_name' && e.param === 'output' && e.subject === 'nowhere',
);
assert.throws(
  () => lw.circuitNoise({ circuit: pair, output: 'a', frequenciesHz: [1], temperatureK: -5 }),
  (e) => e.param === 'temperatureK',
);
assert.throws(
  () => lw.circuitNoiseIntegral({ circuit: pair, output: 'a', bandHz: [10, 1] }),
  (e) => e.param === 'bandHz',
);

// stageTolerance on a circuit document (an RC low-pass inside the loop, which no
// stage document describes): its elements carry their own tolerances. Expected:
// tests/reference/tolerance_stage.py "rcloop.corners", closed forms at all 64 corners.
const rcloop = {
  format: 'loopwright-circuit',
  version: 2,
  elements: [
    { name: 'Vs', kind: 'voltage-source', nodes: ['in', '0'], value: 1 },
    {
      name: 'U1',
      kind: 'amplifier',
      nodes: ['out', '0'],
      control: ['in', 'fb'],
      model: { a0: { min: 5e4, typ: 2e5, max: 1e6 }, gbwHz: 1e7, ro: 0 },
    },
    {
      name: 'R3',
      kind: 'resistor',
      nodes: ['out', 'x'],
      value: '1k',
      tolerance: { distribution: 'uniform', percent: 5 },
    },
    {
      name: 'C3',
      kind: 'capacitor',
      nodes: ['x', '0'],
      value: '100p',
      tolerance: { distribution: 'normal', percent: 10, sigmas: 3 },
    },
    {
      name: 'Rf',
      kind: 'resistor',
      nodes: ['x', 'fb'],
      value: '9k',
      tolerance: { distribution: 'uniform', percent: 1 },
    },
    {
      name: 'Rg',
      kind: 'resistor',
      nodes: ['fb', '0'],
      value: '1k',
      tolerance: { distribution: 'uniform', percent: 1 },
    },
  ],
};
const circuitTol = {
  circuit: rcloop,
  input: 'Vs',
  output: 'out',
  amplifierSpread: { gbwHz: { min: 7e6, typ: 1e7, max: 1.3e7 } },
  spec: [
    { figure: 'gainDb', freqHz: 1e4 },
    { figure: 'phaseMarginDeg', lower: 65 },
  ],
  analyses: ['worstCase', 'monteCarlo'],
  maxCorners: 64,
  trials: 200,
  seed: 3,
};
const ct = lw.stageTolerance(circuitTol);
assert.deepEqual(
  ct.parts.map((p) => p.name),
  ['R3', 'C3', 'Rf', 'Rg', 'U1.a0', 'U1.gbwHz'],
);
assert.equal(ct.worstCase.method, 'corners');
for (const [k, lo, hi, tol] of [
  [0, 20.636026634192113, 21.017458221991273, 1e-9],
  [1, 56.712513877551245, 73.53588119845445, 1e-6],
]) {
  assert.ok(Math.abs(ct.worstCase.figures[k].min.value - lo) < tol, `figure ${k} min`);
  assert.ok(Math.abs(ct.worstCase.figures[k].max.value - hi) < tol, `figure ${k} max`);
}
assert.deepEqual(lw.stageTolerance(circuitTol).monteCarlo, ct.monteCarlo);
throws(() => lw.stageTolerance({ ...circuitTol, input: 'R3' }), 'out_of_domain', 'input');
throws(() => lw.stageTolerance({ ...circuitTol, output: undefined }), 'missing', 'output');
throws(
  () => lw.stageTolerance({ ...circuitTol, parts: [{ part: 'rf' }] }),
  'out_of_domain',
  'parts',
);
const badTol = structuredClone(rcloop);
badTol.elements[2].tolerance.percent = 120;
throws(
  () => lw.stageTolerance({ ...circuitTol, circuit: badTol }),
  'out_of_domain',
  'circuit.elements[2].tolerance',
);
throws(
  () => lw.stageTolerance({ ...circuitTol, temperatureC: [85, -40] }),
  'out_of_domain',
  'temperatureC',
);
console.log('consumer: stageTolerance on a circuit document matches the corners');

console.log('consumer: all checks passed');

// Errors must leave the module healthy: a thrown error may not leak wasm stack or
// heap (an earlier design that threw from inside wasm broke after 32 764 errors).
let caught = 0;
for (let i = 0; i < 100_000; i++) {
  try {
    lw.closedLoopGain(-100, 0.01);
  } catch (e) {
    if (e.code === 'oscillation') caught++;
  }
  try {
    lw.summarizeFeedback('nope', 1, 1);
  } catch (e) {
    if (e.code === 'unknown_name') caught++;
  }
}
assert.equal(caught, 200_000);
assert.ok(Math.abs(lw.summarizeFeedback('series-shunt', 1e5, 0.00999).closedLoopGain - 100) < 1e-9);
console.log('consumer: 200 000 errors later the module is healthy');
