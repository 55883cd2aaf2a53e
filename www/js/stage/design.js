// Design actions of the stage view: the feedback capacitor for a target margin,
// the isolation resistor for the load capacitance, the dominant pole, and the
// resistor pair against the gain spec (the pair search of the network area, each
// candidate judged by worst case and Monte Carlo through tolerance.js). Each answer
// has one "Use" button that puts the value into the stage as one undoable step.

import { el, clear } from '../dom.js';
import { formatEngineering, formatFull, formatPlain } from '../format.js';
import { stageTolerance, toleranceSpec } from './tolerance.js';

const PAIR_NETWORK = { 'non-inverting': 'non-inverting', inverting: 'inverting' };

/** The helpers of stageDesign the view offers: part, label, unit, fields it sets. */
const HELPERS = [
  { part: 'cf', label: 'Cf for the target margin', unit: 'F', set: (v) => ({ cf: v }) },
  { part: 'riso', label: 'Riso for the load Cl', unit: 'Ω', set: (v) => ({ riso: v }) },
  {
    part: 'dominantPoleHz',
    label: 'Dominant pole for the target margin (A0 held)',
    unit: 'Hz',
    set: (v) => ({ dominantPoleHz: v, gbwHz: '' }),
  },
];

function useButton(id, text, onUse) {
  return el('button', { type: 'button', class: 'button', id, onclick: onUse }, text);
}

/**
 * Fill `host` with the design actions for the analysed stage `r` (analyses.js).
 * `use(fields, what)` puts field texts into the stage as one step.
 */
export function renderDesign(host, api, r, values, use) {
  clear(host);
  const target = r.numbers.minPhaseMarginDeg;
  const list = el('dl', { class: 'results stage-design-list' });
  for (const h of HELPERS) {
    let answer;
    try {
      const d = api.stageDesign({ stage: r.doc, part: h.part, targetPhaseMarginDeg: target });
      const text = formatFull(d.value);
      const pm = formatPlain(d.phaseMarginDeg, 3, '°');
      // An answer at the end of the scanned range (Cf 1e-18 F, a pole at 1 GHz) is
      // no design value: the target is met without the part, so no value and no Use.
      answer = d.atRangeEnd
        ? el(
            'span',
            { class: 'stage-design-none' },
            el(
              'output',
              { id: `stage-design-${h.part}` },
              `not needed: the target margin is met without it (PM ${pm})`,
            ),
          )
        : el(
            'span',
            {},
            el('output', { id: `stage-design-${h.part}` }, formatEngineering(d.value, 4, h.unit)),
            ` (PM ${pm}) `,
            useButton(`stage-use-${h.part}`, 'Use', () =>
              use(
                h.set(text),
                `${h.part} = ${formatEngineering(d.value, 4, h.unit)} from the design`,
              ),
            ),
          );
    } catch (err) {
      answer = el('span', { class: 'stage-design-none' }, err.message);
    }
    list.append(el('dt', {}, `${h.label} (${formatPlain(target, 3, '°')})`), el('dd', {}, answer));
  }
  host.append(el('h3', {}, 'Compensation'), list);
  host.append(
    el('h3', {}, `Resistor pair for |Af| = ${formatPlain(r.numbers.gain, 6)} (${values.series})`),
  );
  host.append(pairTable(api, r, values, use));
}

function pairTable(api, r, values, use) {
  const network = PAIR_NETWORK[values.kind];
  if (!network)
    return el('p', {}, 'The pair search covers the non-inverting and inverting stages.');
  let result;
  try {
    result = api.bestPairs({
      network,
      target: r.numbers.gain,
      series: values.series,
      // The span of Rf + Rg the spec allows (noise and loading set it), else 1 kΩ … 1 MΩ.
      totalMin: r.numbers.pairTotalMin ?? 1e3,
      totalMax: r.numbers.pairTotalMax ?? 1e6,
      // Candidates whose nominal error is within half the gain tolerance rank first,
      // fewest parts first: the other half is left to the parts' tolerance and A0
      // (common practice, no source).
      maxError: r.numbers.tolerance / 2,
      combine: 'either',
      count: 6,
    });
  } catch (err) {
    return el('p', { class: 'card-message' }, err.message);
  }
  const n = r.numbers;
  const head = el(
    'tr',
    {},
    ['Rg', 'Rf', 'nominal error', 'worst-case error', 'yield', ''].map((h) =>
      el('th', { scope: 'col' }, h),
    ),
  );
  const rows = result.candidates.map((c, i) => {
    const leg = c.r2;
    const rfText =
      leg.joint === 'single'
        ? formatEngineering(leg.value, 4, 'Ω')
        : `${formatEngineering(leg.first, 3, 'Ω')} ${leg.joint === 'series' ? '+' : '‖'} ${formatEngineering(leg.second, 3, 'Ω')}`;
    let judged;
    try {
      // The candidate in the stage, judged on the gain alone (the spec's gain window).
      const doc = { ...r.doc, parts: { ...r.doc.parts, rf: leg.value, rg: c.r1 } };
      judged = stageTolerance(api, doc, n, {
        spec: [toleranceSpec(n)[0]],
        analyses: ['worstCase', 'monteCarlo'],
        trials: 500,
      });
    } catch {
      judged = {};
    }
    const w = judged.worstCase?.figures[0];
    return el(
      'tr',
      { class: w ? (w.meets ? 'passes' : 'fails') : null },
      el('td', {}, formatEngineering(c.r1, 4, 'Ω')),
      el('td', {}, rfText),
      el('td', { class: 'num' }, formatPlain(c.error * 100, 3, '%')),
      el(
        'td',
        { class: 'num' },
        w
          ? `${formatPlain(w.min.value, 3, '%')} … ${formatPlain(w.max.value, 3, '%')} ${w.meets ? 'pass' : 'fail'}`
          : '—',
      ),
      el(
        'td',
        { class: 'num' },
        judged.monteCarlo ? formatPlain(judged.monteCarlo.yieldFraction * 100, 4, '%') : '—',
      ),
      el(
        'td',
        {},
        useButton(`stage-use-pair-${i}`, 'Use', () =>
          use(
            // The stage holds one Rf: the total; the two parts go in the field's note
            // and the report's inputs (rfParts).
            {
              rf: formatFull(leg.value),
              rg: formatFull(c.r1),
              rfParts: leg.joint === 'single' ? '' : rfText,
            },
            `the pair Rg ${formatEngineering(c.r1, 4, 'Ω')}, Rf ${rfText}`,
          ),
        ),
      ),
    );
  });
  return el(
    'div',
    { class: 'result-table-scroller' },
    el(
      'table',
      { class: 'result-table stage-pairs' },
      el(
        'caption',
        {},
        'Candidates, each judged against the gain tolerance with the stage’s amplifier',
      ),
      el('thead', {}, head),
      el('tbody', {}, rows),
    ),
  );
}
