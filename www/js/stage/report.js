// The printable design report of a stage: inputs, spec, results with pass or fail,
// the tolerance answers (worst case, Monte Carlo, sensitivities), the plots, the cautions, the core's version and the date. It is a section of the
// page shown for printing (the print stylesheet hides everything else), so the
// browser's own print or print to PDF makes the file.

import { el, clear } from '../dom.js';
import { formatEngineering, formatPlain } from '../format.js';
import { FIELDS, GROUPS } from './fields.js';
import { stagePlots } from './plots.js';
import { toleranceSection } from './tolerance.js';

/** A check's measured value as text. */
export function checkValue(c) {
  if (c.text) return c.text;
  if (c.range) {
    const v = (x) =>
      c.unit?.endsWith('rms') ? formatEngineering(x, 4, c.unit) : formatPlain(x, 5, c.unit ?? '');
    return `${v(c.range[0])} … ${v(c.range[1])}`;
  }
  return c.unit === 'V' ? formatEngineering(c.value, 4, 'V rms') : formatPlain(c.value, 5, c.unit);
}

/** A check's limit as text. */
export function checkLimit(c) {
  if (!c.limit) return c.name === 'stable' ? 'stable' : '—';
  const fmt = (x) =>
    c.unit === 'V'
      ? formatEngineering(x, 4, 'V rms')
      : c.unit?.endsWith('rms')
        ? formatEngineering(x, 4, c.unit)
        : formatPlain(x, 6, c.unit ?? '');
  const { lower, upper } = c.limit;
  if (lower !== undefined && upper !== undefined) return `${fmt(lower)} … ${fmt(upper)}`;
  return lower !== undefined ? `≥ ${fmt(lower)}` : `≤ ${fmt(upper)}`;
}

export const verdictText = (pass) => (pass === true ? 'pass' : pass === false ? 'FAIL' : 'shown');

function inputsTable(values) {
  return GROUPS.map(([group, title]) =>
    el(
      'table',
      { class: 'result-table report-inputs' },
      el('caption', {}, title),
      el(
        'tbody',
        {},
        FIELDS.filter((f) => f.group === group && String(values[f.key] ?? '').trim() !== '').map(
          (f) =>
            el(
              'tr',
              {},
              el('th', { scope: 'row' }, f.label),
              el(
                'td',
                {},
                f.key === 'rf' && values.rfParts
                  ? `${values.rf} (two parts: ${values.rfParts})`
                  : String(values[f.key]),
              ),
            ),
        ),
      ),
    ),
  );
}

function checksTable(r) {
  return el(
    'table',
    { class: 'result-table report-checks' },
    el('caption', {}, 'Results against the spec'),
    el(
      'thead',
      {},
      el(
        'tr',
        {},
        ['check', 'result', 'spec', 'verdict'].map((h) => el('th', { scope: 'col' }, h)),
      ),
    ),
    el(
      'tbody',
      {},
      r.checks.map((c) =>
        el(
          'tr',
          { class: c.pass === true ? 'passes' : c.pass === false ? 'fails' : null },
          el('td', {}, c.what),
          el('td', {}, checkValue(c)),
          el('td', {}, checkLimit(c)),
          el('td', { class: 'report-verdict' }, verdictText(c.pass)),
        ),
      ),
    ),
  );
}

/** Fill `host` with the report of the analysed stage `r` and its field texts. */
export function renderReport(host, api, r, values, { date = new Date() } = {}) {
  clear(host);
  const m = r.margins;
  const summary = [
    [
      'Phase margin (at the A0 point analysed)',
      m.phaseMarginDeg === null ? '—' : formatPlain(m.phaseMarginDeg, 4, '°'),
    ],
    ['Crossover', m.crossoverHz === null ? '—' : formatEngineering(m.crossoverHz, 4, 'Hz')],
    ['Gain margin', m.gainMarginDb === null ? '—' : formatPlain(m.gainMarginDb, 4, 'dB')],
    [
      'Gain within tolerance up to',
      r.within.error
        ? r.within.error.message
        : r.within.status === 'outside-at-start'
          ? 'outside at the low end'
          : formatEngineering(r.within.limitHz, 4, 'Hz'),
    ],
    [
      'Distortion at the level and frequency (HD2, HD3)',
      r.distortion.closed
        ? `${formatPlain(Math.abs(r.distortion.closed.hd2) * 100, 3, '%')}, ${formatPlain(Math.abs(r.distortion.closed.hd3) * 100, 3, '%')}`
        : (r.distortion.error?.message ?? r.distortion.note),
    ],
  ];
  host.append(
    el('h2', {}, 'Stage design report'),
    el(
      'p',
      { class: 'report-meta' },
      `loopwright core ${api.version()} · ${date.toISOString().slice(0, 10)} · ${values.kind} stage`,
    ),
    el('h3', {}, 'Inputs and spec'),
    el('div', { class: 'report-grid' }, inputsTable(values)),
    el('h3', {}, 'Results'),
    checksTable(r),
    el(
      'dl',
      { class: 'results' },
      summary.flatMap(([k, v]) => [el('dt', {}, k), el('dd', {}, v)]),
    ),
    el('h3', {}, 'Tolerance: worst case, Monte Carlo, sensitivity'),
    ...(r.tolerance === null
      ? [
          el(
            'p',
            { class: 'result-table-note', id: 'report-tolerance-pending' },
            'Being computed: the report is filled in when the run is done.',
          ),
        ]
      : r.tolerance.error
        ? [el('p', { class: 'card-message' }, r.tolerance.error.message)]
        : toleranceSection(r.tolerance, { prefix: 'report' })),
    el('h3', {}, 'Plots'),
    el(
      'div',
      { class: 'report-plots' },
      stagePlots(r).map((p) => el('figure', {}, p.svg)),
    ),
    el('h3', {}, 'Cautions'),
    el(
      'p',
      { class: 'report-cautions' },
      document.querySelector('.cautions p')?.textContent ??
        'Results are small-signal, linear models: check every design on the bench.',
    ),
  );
}
