// Worst case, Monte Carlo and sensitivities of a stage against its spec, from the
// core's whole-stage tolerance engine (`stageTolerance`, docs/tolerance.md): every
// part the stage has with its tolerance and tempco, the amplifier's A0 over its
// min/typ/max (and its GBW and Ro when their spreads are given), a temperature
// range, and the view's spec as the limits. Every kind of
// stage the view offers. This file only gathers the inputs: each number shown is the
// core's.

import { el } from '../dom.js';
import { formatEngineering, formatPlain } from '../format.js';
import { histogramChart } from '../plot/histogram.js';

/** Which tolerance field and tempco field each stage part takes. */
const PART_GRADES = {
  rf: ['partTolerance', 'resistorTempco'],
  rg: ['partTolerance', 'resistorTempco'],
  riso: ['partTolerance', 'resistorTempco'],
  cf: ['capacitorTolerance', 'capacitorTempco'],
  cs: ['capacitorTolerance', 'capacitorTempco'],
  cl: ['capacitorTolerance', 'capacitorTempco'],
  rs: ['sourceLoadTolerance', 'resistorTempco'],
  rl: ['sourceLoadTolerance', 'resistorTempco'],
};

/** The spec's figures as the engine names them, with the view's words for each. */
export const FIGURE_WORDS = {
  gainErrorPercent: 'Gain error at 1 Hz',
  phaseMarginDeg: 'Phase margin',
  outputNoiseRms: 'Output noise over the band',
};

/** The display unit of each figure of a stage of kind `kind` (the page's label). */
export const figureUnits = (kind) => ({
  gainErrorPercent: '%',
  phaseMarginDeg: '°',
  // The transconductance and current-amplifier stages put out a current.
  outputNoiseRms: ['transconductance', 'current-amplifier'].includes(kind) ? 'A rms' : 'V rms',
});

/** Varied quantities as the view names them (`U1.a0` is the amplifier's A0). */
const AMPLIFIER_WORDS = { 'U1.a0': 'A0', 'U1.gbwHz': 'GBW', 'U1.ro': 'Ro' };
export const partWords = (name) => AMPLIFIER_WORDS[name] ?? name;

/**
 * The spec of the view's numbers `n` as engine limits: the gain within its tolerance
 * at 1 Hz (the low end of the gain check, as a percent error from the target gain,
 * the same for every kind and sign), the least phase margin, and the most output
 * noise over the noise band when one is given.
 */
export function toleranceSpec(n) {
  const spec = [
    {
      figure: 'gainErrorPercent',
      freqHz: 1,
      target: n.gain,
      lower: -n.tolerance * 100,
      upper: n.tolerance * 100,
    },
    { figure: 'phaseMarginDeg', lower: n.minPhaseMarginDeg },
  ];
  if (n.maxNoiseRms !== undefined)
    spec.push({
      figure: 'outputNoiseRms',
      bandHz: [n.noiseFromHz, n.noiseToHz],
      upper: n.maxNoiseRms,
    });
  return spec;
}

/**
 * The part spreads of the stage document `doc` from the view's numbers `n`: each part
 * the stage has, uniform within its grade's tolerance (a part sold as ±p % is screened
 * to it), with its grade's tempco; a grade left empty keeps its parts exact.
 */
export function toleranceParts(doc, n) {
  const parts = [];
  for (const [part, [tol, tc]] of Object.entries(PART_GRADES)) {
    if (!(part in doc.parts) || n[tol] === undefined) continue;
    parts.push({
      part,
      tolerance: { distribution: 'uniform', percent: n[tol] * 100 },
      tempcoPpm: n[tc] ?? 0,
    });
  }
  return parts;
}

/** The amplifier's spreads: the engine's name, the typ field and the min and max fields. */
const AMPLIFIER_SPREADS = [
  ['gbwHz', 'gbwHz', 'gbwMin', 'gbwMax'],
  ['ro', 'ro', 'roMin', 'roMax'],
];

/**
 * The amplifier's GBW and Ro spreads of the view's numbers `n` (stageTolerance's
 * `amplifierSpread`), or undefined when neither is given: min and max as typed (a
 * side left empty is the typ: not varied that way), typ the amplifier's own figure,
 * as the engine requires. A spread without its typ throws, naming the field.
 */
export function toleranceAmplifier(n) {
  const out = {};
  for (const [name, typ, min, max] of AMPLIFIER_SPREADS) {
    if (n[min] === undefined && n[max] === undefined) continue;
    if (n[typ] === undefined) {
      const err = new Error(
        name === 'ro'
          ? 'give the amplifier’s Ro (output): it is the typ of this spread'
          : 'give the amplifier’s Gain-bandwidth: it is the typ of this spread',
      );
      err.field = n[min] === undefined ? max : min;
      throw err;
    }
    out[name] = { min: n[min] ?? n[typ], typ: n[typ], max: n[max] ?? n[typ] };
  }
  return Object.keys(out).length ? out : undefined;
}

/**
 * The engine's answer for the stage document `doc` and the view's numbers `n`: the
 * options it was called with (`options`, so a test can call the core the same way)
 * and `{parts, temperaturesC, worstCase, monteCarlo, sensitivity}` as it returned them.
 * `spec` and `analyses` narrow what is asked (the design's candidates ask only for
 * the gain's worst case and yield).
 */
export function stageTolerance(api, doc, n, settings = {}) {
  const options = toleranceOptions(doc, n, settings);
  try {
    return { options, ...api.stageTolerance(options) };
  } catch (err) {
    throw withField(err, options, n);
  }
}

/**
 * The same answer as stageTolerance above, computed by `runner`
 * (tolerance-run.js: a worker, so the page stays free); `onDone` hears which
 * analyses are done. Rejects with the core's error (its `field` set) or as
 * Cancelled.
 */
export async function stageToleranceRun(runner, doc, n, { onDone } = {}) {
  const options = toleranceOptions(doc, n);
  try {
    return { options, ...(await runner.run(options, { onDone })) };
  } catch (err) {
    throw err.name === 'Cancelled' ? err : withField(err, options, n);
  }
}

/** `err` of stageTolerance with the view's field behind its `param`. */
function withField(err, options, n) {
  err.field = fieldOfToleranceParam(err.param, options.parts, n);
  return err;
}

/**
 * The options of stageTolerance for the stage document `doc` and the view's numbers
 * `n` (throws, naming the field, when an amplifier spread has no typ).
 */
export function toleranceOptions(
  doc,
  n,
  { spec = toleranceSpec(n), analyses, trials = n.mcTrials ?? 1000 } = {},
) {
  const options = {
    stage: doc,
    parts: toleranceParts(doc, n),
    amplifierSpread: toleranceAmplifier(n),
    temperatureC: [n.tempLowC ?? 25, n.tempHighC ?? 25],
    spec,
    trials,
    seed: 1,
    bins: 24,
    keepFailures: 0,
  };
  if (analyses) options.analyses = analyses;
  if (options.amplifierSpread === undefined) delete options.amplifierSpread;
  return options;
}

/**
 * The view's field behind a stageTolerance error's `param` (`parts[2].tolerance`,
 * `temperatureC`, `trials`, `spec[1].upper`), or undefined when it is the stage's.
 */
function fieldOfToleranceParam(param, parts, n) {
  if (typeof param !== 'string') return undefined;
  const amp = /^amplifierSpread\.(\w+)/.exec(param);
  if (amp) {
    const [, , min, max] = AMPLIFIER_SPREADS.find(([name]) => name === amp[1]) ?? [];
    return n[min] === undefined ? max : min;
  }
  const part = /^parts\[(\d+)\]\.(\w+)/.exec(param);
  if (part) {
    const [tol, tc] = PART_GRADES[parts[Number(part[1])]?.part] ?? [];
    return part[2] === 'tempcoPpm' ? tc : tol;
  }
  if (param === 'temperatureC') return 'tempLowC';
  if (param === 'trials') return 'mcTrials';
  const limit = /^spec\[(\d+)\]/.exec(param);
  if (limit) return ['tolerance', 'minPhaseMarginDeg', 'maxNoiseRms'][Number(limit[1])];
  return undefined;
}

const unitOfPart = (name) =>
  name === 'U1.gbwHz'
    ? 'Hz'
    : name === 'U1.ro' || name.startsWith('R')
      ? 'Ω'
      : name.startsWith('C')
        ? 'F'
        : '';
const partValue = (name, x) =>
  unitOfPart(name) ? formatEngineering(x, 4, unitOfPart(name)) : formatEngineering(x, 3);
/** A figure's value as the view shows it (`units` of figureUnits). */
export const figureValue = (units, figure, x, digits = 4) =>
  x === null || x === undefined
    ? '—'
    : units[figure].endsWith('rms')
      ? formatEngineering(x, digits, units[figure])
      : formatPlain(x, digits, units[figure]);
const limitText = (units, l) => {
  const f = l.figure.figure;
  const v = (x) => figureValue(units, f, x);
  if (l.lower !== null && l.upper !== null) return `${v(l.lower)} … ${v(l.upper)}`;
  return l.lower !== null ? `≥ ${v(l.lower)}` : `≤ ${v(l.upper)}`;
};
const verdict = (meets) => (meets ? 'pass' : 'FAIL');

/** The part values (at 25 °C) and the temperature of a worst-case extreme. */
const extremeAt = (names, e) =>
  `${names.map((p, i) => `${partWords(p)} ${partValue(p, e.values[i])}`).join(', ')}; ${formatPlain(e.temperatureC, 4, '°C')}`;

function table(id, caption, head, rows) {
  return el(
    'div',
    { class: 'result-table-scroller' },
    el(
      'table',
      { class: 'result-table stage-tolerance-table', id },
      el('caption', { class: 'result-table-caption' }, caption),
      el(
        'thead',
        {},
        el(
          'tr',
          {},
          head.map((h) => el('th', { scope: 'col' }, h)),
        ),
      ),
      el('tbody', {}, rows),
    ),
  );
}

/**
 * The tolerance answers `t` (stageTolerance above) as the view and the report show
 * them: what varies, the worst case with the part values at each extreme, the Monte
 * Carlo yield overall and per limit with a histogram of each figure, and each part's
 * sensitivity with the part to tighten first. `prefix` keeps the ids apart.
 */
export function toleranceSection(t, { prefix = 'stage' } = {}) {
  const out = [];
  const units = figureUnits(t.options.stage.kind);
  const show = (fig, x, digits) => figureValue(units, fig, x, digits);
  const varied = t.parts
    .map(
      (p) =>
        `${partWords(p.name)} ${partValue(p.name, p.low)} … ${partValue(p.name, p.high)}${p.tempcoPpm ? ` (${formatPlain(p.tempcoPpm, 4)} ppm/K)` : ''}`,
    )
    .join(', ');
  const [tLow, tHigh] = t.options.temperatureC;
  out.push(
    el(
      'p',
      { class: 'result-table-note', id: `${prefix}-tolerance-varied` },
      `Varied: ${varied}; ${formatPlain(tLow, 4)} … ${formatPlain(tHigh, 4, '°C')}. The whole stage is solved at every point (the core's tolerance engine).`,
    ),
  );
  const w = t.worstCase;
  if (w)
    out.push(
      table(
        `${prefix}-worst`,
        `Worst case: ${w.method === 'corners' ? 'every corner' : 'sensitivity-guided search'}, ${w.evaluations} evaluations`,
        ['figure', 'nominal', 'lowest', 'highest', 'spec', ''],
        w.figures.flatMap((f) => {
          const fig = f.limit.figure.figure;
          return [
            el(
              'tr',
              { class: f.meets ? 'passes' : 'fails', 'data-figure': fig },
              el('td', {}, FIGURE_WORDS[fig] ?? fig),
              el('td', { class: 'num' }, show(fig, f.nominal)),
              el('td', { class: 'num' }, show(fig, f.min.value)),
              el('td', { class: 'num' }, show(fig, f.max.value)),
              el('td', {}, limitText(units, f.limit)),
              el('td', { class: 'stage-verdict' }, verdict(f.meets)),
            ),
            el(
              'tr',
              { class: 'stage-at', 'data-figure': fig },
              el(
                'td',
                { colspan: 6 },
                `lowest at ${extremeAt(w.parts, f.min)}; highest at ${extremeAt(w.parts, f.max)}${f.searched.length ? `; searched inside ${f.searched.map(partWords).join(', ')} (not monotonic)` : ''}`,
              ),
            ),
          ];
        }),
      ),
    );
  const mc = t.monteCarlo;
  if (mc) {
    out.push(
      el(
        'p',
        { class: 'stage-yield' },
        'Monte Carlo yield against the whole spec: ',
        el('output', { id: `${prefix}-out-yield` }, formatPlain(mc.yieldFraction * 100, 4, '%')),
        ` of ${mc.trials} trials (seed ${mc.seed}).`,
      ),
      table(
        `${prefix}-yields`,
        'Monte Carlo per limit',
        ['figure', 'yield', 'mean', 'σ', '0.1 % … 99.9 %', 'not computed'],
        mc.limits.map((l) => {
          const fig = l.limit.figure.figure;
          const s = l.stats;
          const p = (q) => s?.percentiles.find((x) => x.percent === q)?.value;
          return el(
            'tr',
            { 'data-figure': fig },
            el('td', {}, FIGURE_WORDS[fig] ?? fig),
            el('td', { class: 'num' }, formatPlain(l.yieldFraction * 100, 4, '%')),
            el('td', { class: 'num' }, s ? show(fig, s.mean, 5) : '—'),
            el('td', { class: 'num' }, s ? show(fig, s.sd, 3) : '—'),
            el('td', { class: 'num' }, s ? `${show(fig, p(0.1))} … ${show(fig, p(99.9))}` : '—'),
            el('td', { class: 'num' }, String(l.undefined)),
          );
        }),
      ),
      el(
        'div',
        { class: 'stage-histograms' },
        mc.limits
          .filter((l) => l.stats)
          .map((l) => {
            const fig = l.limit.figure.figure;
            const words = FIGURE_WORDS[fig] ?? fig;
            const limits = [];
            if (l.limit.lower !== null) limits.push({ x: l.limit.lower, label: 'spec low' });
            if (l.limit.upper !== null) limits.push({ x: l.limit.upper, label: 'spec high' });
            return el(
              'figure',
              { class: 'stage-plot', 'data-plot': `histogram-${fig}` },
              histogramChart({
                title: `${words}, ${l.stats.count} values`,
                label: `${words} (${units[fig]}); ${mc.trials} trials × ${mc.temperaturesC.length} temperatures`,
                edges: l.stats.histogram.edges,
                counts: l.stats.histogram.counts,
                limits,
              }),
            );
          }),
      ),
    );
  }
  const s = t.sensitivity;
  if (s) {
    const rows = s.figures.flatMap((f) => {
      const fig = f.limit.figure.figure;
      return f.parts.map((p, i) =>
        el(
          'tr',
          { 'data-figure': fig, 'data-part': p.part },
          i === 0
            ? el('th', { scope: 'rowgroup', rowspan: f.parts.length }, FIGURE_WORDS[fig] ?? fig)
            : null,
          el('td', {}, partWords(p.part)),
          el('td', { class: 'num' }, show(fig, p.perUnit, 4)),
          el('td', { class: 'num' }, p.normalised === null ? '—' : formatPlain(p.normalised, 4)),
          el('td', { class: 'num' }, formatPlain(p.varianceShare * 100, 3, '%')),
          i === 0
            ? el(
                'td',
                { rowspan: f.parts.length },
                f.tightenFirst ? partWords(f.tightenFirst) : '—',
              )
            : null,
        ),
      );
    });
    out.push(
      table(
        `${prefix}-sensitivity`,
        `Sensitivity at nominal, ${formatPlain(s.temperatureC, 4, '°C')}`,
        ['figure', 'part', 'per unit x·∂F/∂x', 'normalised S', 'variance share', 'tighten first'],
        rows,
      ),
      el(
        'p',
        { class: 'stage-tighten' },
        'Part to tighten first over the spec: ',
        el(
          'output',
          { id: `${prefix}-out-tighten` },
          s.tightenFirst ? partWords(s.tightenFirst) : 'none (no part varies)',
        ),
        '.',
      ),
    );
  }
  return out;
}
