// The stage view: one stage described once (the amplifier by its datasheet figures
// with the A0 spread, the network, source and load, the spec) and every answer for
// it together — checks with pass or fail, plots, design actions — with undo and
// redo of every change (sheet/history.js over the view's field texts), the stage to
// the worksheet and back, and the printable report.

import { el, clear } from '../dom.js';
import { formatEngineering, formatFull, formatPlain } from '../format.js';
import { createHistory } from '../sheet/history.js';
import { historyKey } from '../sheet/history-controls.js';
import { DEMO, FIELDS, GROUPS, fieldOfParam, readListField } from './fields.js';
import { analyseStage, withChecks } from './analyses.js';
import { stagePlots } from './plots.js';
import { renderDesign } from './design.js';
import { renderReport, checkValue, checkLimit, verdictText } from './report.js';
import { toSheet, fromSheet } from './sheet-block.js';
import { toleranceSection, stageToleranceRun } from './tolerance.js';
import { createToleranceRunner } from './tolerance-run.js';

/** How long the view waits after a change before the tolerance analyses start, ms. */
const TOLERANCE_DELAY_MS = 150;

/** The tolerance analyses as the progress line names them, in the order they run. */
const ANALYSIS_WORDS = {
  worstCase: 'worst case',
  sensitivity: 'sensitivities',
  monteCarlo: 'Monte Carlo',
};

const isTextField = (node) => node instanceof HTMLInputElement || node instanceof HTMLSelectElement;

const button = (id, label, onclick) =>
  el('button', { type: 'button', class: 'button', id, onclick }, label);

function fieldInput(f, value, note) {
  const id = `stage-${f.key}`;
  const noteId = note ? `${id}-note` : undefined;
  const control = f.choices
    ? el(
        'select',
        { id, name: f.key, 'aria-describedby': noteId },
        f.choices.map(([v, label]) => el('option', { value: v, selected: v === value }, label)),
      )
    : el('input', {
        id,
        name: f.key,
        value,
        autocomplete: 'off',
        spellcheck: 'false',
        inputmode: 'text',
        'aria-describedby': noteId,
      });
  return el(
    'div',
    { class: 'cell' },
    el('label', { class: 'cell-name', for: id }, f.label),
    control,
    el('span', { class: 'cell-unit' }, f.unit === 'gain' ? '' : (f.unit ?? '')),
    note ? el('span', { class: 'cell-note', id: noteId }, note) : null,
  );
}

/**
 * A field's note: Rf made of two parts (a pair put in from the design) says which;
 * the stage document holds one Rf, the total.
 */
const fieldNote = (f, values) =>
  f.key === 'rf' && values.rfParts
    ? `two parts: ${values.rfParts}; the stage carries their total`
    : null;

function buildForm(values) {
  const form = el('form', { class: 'stage-form', id: 'stage-form', novalidate: true });
  for (const [group, title] of GROUPS)
    form.append(
      el(
        'fieldset',
        { class: `stage-group stage-group-${group}` },
        el('legend', {}, title),
        el(
          'div',
          { class: 'cells' },
          FIELDS.filter((f) => f.group === group).map((f) =>
            fieldInput(f, values[f.key], fieldNote(f, values)),
          ),
        ),
      ),
    );
  return form;
}

function checksTable(r) {
  const table = el(
    'table',
    { class: 'result-table stage-checks', id: 'stage-checks' },
    el('caption', { class: 'result-table-caption' }, 'Against the spec'),
    el(
      'thead',
      {},
      el(
        'tr',
        {},
        ['check', 'result', 'spec', ''].map((h) => el('th', { scope: 'col' }, h)),
      ),
    ),
    el(
      'tbody',
      {},
      r.checks.map((c) =>
        el(
          'tr',
          {
            class: c.pass === true ? 'passes' : c.pass === false ? 'fails' : null,
            'data-check': c.name,
          },
          el('td', {}, c.what),
          el('td', {}, checkValue(c)),
          el('td', {}, checkLimit(c)),
          el('td', { class: 'stage-verdict' }, verdictText(c.pass)),
        ),
      ),
    ),
  );
  return el('div', { class: 'result-table-scroller' }, table);
}

function summary(r) {
  const m = r.margins;
  const rows = [
    [
      'margin-pm',
      'Phase margin',
      m.phaseMarginDeg === null ? 'no unity crossing' : formatPlain(m.phaseMarginDeg, 4, '°'),
    ],
    [
      'margin-fc',
      'Crossover',
      m.crossoverHz === null ? '—' : formatEngineering(m.crossoverHz, 4, 'Hz'),
    ],
    [
      'margin-gm',
      'Gain margin',
      m.gainMarginDb === null ? 'no −180° crossing' : formatPlain(m.gainMarginDb, 4, 'dB'),
    ],
  ];
  for (const p of ['min', 'typ', 'max']) {
    const s = r.spread[p];
    rows.push([
      `pm-${p}`,
      `Phase margin at A0 ${p}`,
      s.error
        ? s.error.message
        : s.phaseMarginDeg === null
          ? '—'
          : formatPlain(s.phaseMarginDeg, 4, '°'),
    ]);
  }
  if (!r.within.error)
    rows.push([
      'within',
      'Gain within its tolerance up to',
      r.within.status === 'outside-at-start'
        ? `outside already at ${formatEngineering(r.within.limitHz, 3, 'Hz')}`
        : `${formatEngineering(r.within.limitHz, 4, 'Hz')}${r.within.status === 'within-to-end' ? ' (end of the scan)' : ''}`,
    ]);
  if (!r.zin.error)
    rows.push(['zin', '|Zin| at the low end', formatEngineering(r.zin.magnitudeOhm[0], 4, 'Ω')]);
  if (!r.zout.error)
    rows.push(['zout', '|Zout| at the low end', formatEngineering(r.zout.magnitudeOhm[0], 4, 'Ω')]);
  if (!r.step.error)
    rows.push(
      ['overshoot', 'Step overshoot', formatPlain(r.step.overshootPercent, 3, '%')],
      ['settling', 'Settling to ±1 %', formatEngineering(r.step.settlingTimeS, 4, 's')],
    );
  else rows.push(['step', 'Step response', r.step.error.message]);
  if (!r.noiseBand.error) {
    const b = r.noiseBand;
    rows.push([
      'noise',
      `Output noise ${formatEngineering(b.bandHz[0], 3, 'Hz')} … ${formatEngineering(b.bandHz[1], 3, 'Hz')}`,
      formatEngineering(b.totalRms, 4, 'V rms'),
    ]);
    const parts = [...b.sources]
      .sort((x, y) => y.rms - x.rms)
      .slice(0, 4)
      .map((s) => `${s.name} ${formatPlain(s.share * 100, 3, '%')}`)
      .join(', ');
    if (parts) rows.push(['noise-parts', 'Largest sources (share of power)', parts]);
  } else rows.push(['noise', 'Noise', r.noiseBand.error.message]);
  if (!r.nyquist.error) {
    const e = r.nyquist.encirclements;
    rows.push([
      'nyquist',
      'Encirclements of −1',
      `N = ${e.clockwise}, P = ${e.openLoopRhpPoles}, Z = ${e.closedLoopRhpPoles}: ${e.verdict}`,
    ]);
  }
  const d = r.distortion;
  rows.push([
    'distortion',
    'Distortion (HD2, HD3)',
    d.closed
      ? `${formatPlain(Math.abs(d.closed.hd2) * 100, 3, '%')}, ${formatPlain(Math.abs(d.closed.hd3) * 100, 3, '%')} at ${formatPlain(d.closed.outputAmplitude, 3, 'V')} peak, ${formatEngineering(d.frequencyHz, 3, 'Hz')} (loop gain there ${formatPlain(d.loopGains[0].magnitude, 4)}; open loop ${formatPlain(Math.abs(d.open.hd2) * 100, 3, '%')}, ${formatPlain(Math.abs(d.open.hd3) * 100, 3, '%')})`
      : (d.error?.message ?? d.note),
  ]);
  return el(
    'dl',
    { class: 'results stage-summary' },
    rows.flatMap(([id, k, v]) => [
      el('dt', {}, k),
      el('dd', {}, el('output', { id: `stage-out-${id}` }, v)),
    ]),
  );
}

/** The stage's results as tab-separated text at full precision (for the clipboard). */
function resultsTsv(r) {
  const lines = [['quantity', 'value', 'unit']];
  const m = r.margins;
  const add = (q, v, u) => {
    if (Number.isFinite(v)) lines.push([q, formatFull(v), u]);
  };
  add('phase margin', m.phaseMarginDeg, '°');
  add('crossover', m.crossoverHz, 'Hz');
  add('gain margin', m.gainMarginDb, 'dB');
  if (!r.within.error) {
    add('gain at low end', r.within.gainAtStart, r.circuit.gainUnit);
    add('gain within tolerance up to', r.within.limitHz, 'Hz');
  }
  if (!r.noiseBand.error) add('output noise rms', r.noiseBand.totalRms, 'V');
  if (!r.step.error) {
    add('step overshoot', r.step.overshootPercent, '%');
    add('step settling', r.step.settlingTimeS, 's');
  }
  return lines.map((l) => l.join('\t')).join('\n');
}

/**
 * Mount the stage view in `host`. `worksheet()` returns (or resolves to) the
 * worksheet handle `{sheet, record(what), refresh(), show()}`, or null when there is none.
 */
export function mountStageView(host, api, { worksheet = () => null } = {}) {
  let values = { ...DEMO };
  let last = null;
  const runner = createToleranceRunner(api);
  /** The tolerance run of `last`: `{done: [analysis…], cancelled}` while it is not in. */
  let run = null;
  const state = {
    saveDocument: () => JSON.stringify(values),
    loadDocument: (text) => {
      values = { ...DEMO, ...JSON.parse(text) };
    },
  };
  const undoButton = el(
    'button',
    { type: 'button', class: 'button', id: 'stage-undo', 'aria-keyshortcuts': 'Control+Z' },
    '↶ Undo',
  );
  const redoButton = el(
    'button',
    { type: 'button', class: 'button', id: 'stage-redo', 'aria-keyshortcuts': 'Control+Y' },
    '↷ Redo',
  );
  const note = el('p', {
    class: 'stage-note',
    id: 'stage-note',
    role: 'status',
    'aria-live': 'polite',
  });
  const message = el('p', { class: 'card-message', id: 'stage-message', role: 'alert' });
  const formHost = el('div');
  const checksHost = el('div', { class: 'stage-results' });
  const plotsHost = el('div', { class: 'stage-plots' });
  const designHost = el('section', { class: 'stage-design', 'aria-label': 'design actions' });
  const reportHost = el('section', {
    class: 'stage-report',
    id: 'stage-report',
    hidden: true,
    'aria-label': 'design report',
  });
  const blockAt = el('input', {
    id: 'stage-block-at',
    value: 'A1',
    size: 5,
    'aria-label': 'block’s first cell',
  });
  const blockName = el('input', {
    id: 'stage-block-name',
    value: 'stage_1',
    size: 9,
    'aria-label': 'block’s name',
  });

  const history = createHistory(state, {
    apply: () => {
      showForm();
      recompute();
    },
    onState: () => showHistory(),
  });
  function showHistory() {
    undoButton.disabled = !history.canUndo;
    redoButton.disabled = !history.canRedo;
    undoButton.title = history.canUndo ? `Undo ${history.undoLabel}` : 'Nothing to undo';
    redoButton.title = history.canRedo ? `Redo ${history.redoLabel}` : 'Nothing to redo';
  }
  function step(kind) {
    const label = kind === 'undo' ? history.undoLabel : history.redoLabel;
    if (kind === 'undo' ? history.undo() : history.redo())
      note.textContent = `${kind === 'undo' ? 'Undone' : 'Done again'}: ${label}.`;
  }

  function showForm() {
    clear(formHost).append(buildForm(values));
  }

  function markField(key) {
    for (const node of formHost.querySelectorAll('[aria-invalid]'))
      node.removeAttribute('aria-invalid');
    if (key) formHost.querySelector(`#stage-${key}`)?.setAttribute('aria-invalid', 'true');
  }

  let toleranceTimer = null;
  function recompute() {
    clearTimeout(toleranceTimer);
    // A changed stage ends the run of the one it replaces.
    runner.cancel();
    run = null;
    let r;
    try {
      r = analyseStage(api, values, { deferTolerance: true });
    } catch (err) {
      const key = err.field ?? fieldOfParam(err.param);
      markField(key);
      const label = FIELDS.find((f) => f.key === key)?.label;
      message.textContent = label ? `${label}: ${err.message}` : err.message;
      last = null;
      return;
    }
    markField(null);
    message.textContent = '';
    last = r;
    showAnswers(r);
    clear(plotsHost).append(
      ...stagePlots(r).map((p) =>
        el('figure', { class: 'stage-plot', 'data-plot': p.name }, p.svg),
      ),
    );
    renderDesign(designHost, api, r, values, use);
    if (!reportHost.hidden) renderReport(reportHost, api, r, values);
    // The tolerance analyses are the slowest: run off the page thread once the rest
    // is shown, and only for the latest stage (a change before then starts again).
    if (r.tolerance === null) {
      run = { done: [], cancelled: false };
      toleranceTimer = setTimeout(() => startTolerance(r), TOLERANCE_DELAY_MS);
    }
  }

  /** Resolves when the tolerance answers of the stage on screen are in (or failed). */
  let toleranceWaiters = [];
  const toleranceIn = () =>
    last && last.tolerance === null
      ? new Promise((resolve) => toleranceWaiters.push(resolve))
      : Promise.resolve();

  /** Run the tolerance analyses of `r` in the worker, showing their progress. */
  function startTolerance(r) {
    if (last !== r) return;
    clearTimeout(toleranceTimer);
    const mine = { done: [], cancelled: false };
    run = mine;
    showAnswers(r);
    const onDone = (done) => {
      if (run !== mine) return;
      mine.done = done;
      showProgress();
    };
    stageToleranceRun(runner, r.doc, r.numbers, { onDone }).then(
      (t) => finish(r, mine, t),
      (err) => {
        if (err.name === 'Cancelled') return;
        finish(r, mine, { error: err });
      },
    );
  }

  function finish(r, mine, t) {
    if (run !== mine || last !== r) return;
    run = null;
    r.tolerance = t;
    withChecks(r);
    showAnswers(r);
    if (!reportHost.hidden) renderReport(reportHost, api, r, values);
    const waiters = toleranceWaiters;
    toleranceWaiters = [];
    for (const w of waiters) w();
  }

  function cancelTolerance() {
    if (!run || !last) return;
    clearTimeout(toleranceTimer);
    runner.cancel();
    run.cancelled = true;
    showAnswers(last);
    note.textContent = 'Tolerance run cancelled: the answers above it stay; Run again computes it.';
  }

  /** The running line: which analyses are done, as a progress bar and in words. */
  function showProgress() {
    const host = checksHost.querySelector('#stage-tolerance-progress');
    if (!host || !run) return;
    const order = Object.keys(ANALYSIS_WORDS);
    const bar = host.querySelector('progress');
    bar.value = run.done.length;
    const next = order.find((a) => !run.done.includes(a));
    const trials = last?.numbers.mcTrials ?? 1000;
    host.querySelector('.stage-tolerance-step').textContent =
      `${run.done.length} of ${order.length} done${run.done.length ? ` (${run.done.map((a) => ANALYSIS_WORDS[a]).join(', ')})` : ''}; ${next === 'monteCarlo' ? `Monte Carlo of ${trials} trials` : ANALYSIS_WORDS[next]} running…`;
  }

  /** The checks, the summary and the tolerance answers (or that they are coming). */
  function showAnswers(r) {
    clear(checksHost).append(checksTable(r), summary(r));
    const t = r.tolerance;
    const section = el(
      'section',
      {
        class: 'stage-tolerance',
        id: 'stage-tolerances',
        'aria-label': 'tolerance',
        'aria-busy': t === null && !run?.cancelled ? 'true' : 'false',
        'data-state': t !== null ? 'ready' : run?.cancelled ? 'cancelled' : 'running',
        'data-thread': runner.thread,
      },
      el('h3', {}, 'Tolerance: worst case, Monte Carlo, sensitivity'),
    );
    if (t?.error) {
      const label = FIELDS.find((f) => f.key === t.error.field)?.label;
      section.append(
        el(
          'p',
          { class: 'card-message', id: 'stage-tolerance-message', role: 'alert' },
          label ? `${label}: ${t.error.message}` : t.error.message,
        ),
      );
      if (t.error.field) markField(t.error.field);
    }
    if (t === null && run?.cancelled)
      section.append(
        el(
          'p',
          { class: 'result-table-note', id: 'stage-tolerance-cancelled' },
          'Cancelled: the worst case, Monte Carlo and sensitivities of this stage were not computed. ',
          button('stage-tolerance-run', 'Run again', () => startTolerance(r)),
        ),
      );
    else if (t === null)
      section.append(
        el(
          'div',
          { class: 'stage-tolerance-progress', id: 'stage-tolerance-progress' },
          el(
            'p',
            { class: 'result-table-note' },
            'Worst case, sensitivities and Monte Carlo are being computed (off the page: the fields stay live): ',
            el('progress', {
              max: Object.keys(ANALYSIS_WORDS).length,
              value: run?.done.length ?? 0,
              'aria-label': 'tolerance analyses done',
            }),
            ' ',
            el('span', { class: 'stage-tolerance-step', role: 'status' }),
          ),
          button('stage-tolerance-cancel', 'Cancel', cancelTolerance),
        ),
      );
    else if (!t.error) section.append(...toleranceSection(t));
    checksHost.append(section);
    if (t === null && !run?.cancelled) showProgress();
  }

  /** Put field texts into the stage as one undoable step. */
  function use(fields, what) {
    values = { ...values, ...fields };
    history.record(what);
    showForm();
    recompute();
    note.textContent = `Used ${what}.`;
  }

  formHost.addEventListener('change', (e) => {
    const key = e.target.name;
    if (!key) return;
    values = { ...values, [key]: e.target.value };
    // A typed Rf is no longer the two parts of a pair.
    if (key === 'rf' && values.rfParts) {
      values.rfParts = '';
      formHost.querySelector('#stage-rf-note')?.remove();
      formHost.querySelector('#stage-rf')?.removeAttribute('aria-describedby');
    }
    const label = FIELDS.find((f) => f.key === key)?.label ?? key;
    history.record(`typing in ${label}`);
    recompute();
  });
  formHost.addEventListener('submit', (e) => e.preventDefault());

  undoButton.addEventListener('click', () => step('undo'));
  redoButton.addEventListener('click', () => step('redo'));
  host.addEventListener('keydown', (e) => {
    const kind = historyKey(e);
    if (!kind || isTextField(e.target)) return;
    e.preventDefault();
    step(kind);
  });

  const toWorksheet = async () => {
    const ws = await worksheet();
    if (!ws) return;
    try {
      const out = { ...values };
      // Lists go to the sheet separated by spaces (docs/worksheet.md), at full precision.
      if (String(out.polesHz).trim() !== '')
        out.polesHz = readListField(api, values, 'polesHz')
          .map((x) => formatFull(x))
          .join(' ');
      const { range, heading } = toSheet(ws, out, blockAt.value.trim(), blockName.value.trim());
      note.textContent = `The stage is in the worksheet at ${range} under ${heading}, named ${blockName.value.trim()}; its formulas refer to ${range}. Undo in the worksheet takes it back.`;
    } catch (err) {
      note.textContent = err.message;
    }
  };
  const fromWorksheet = async () => {
    const ws = await worksheet();
    if (!ws) return;
    try {
      const read = fromSheet(ws, blockName.value.trim());
      values = { ...values, ...read };
      if ('rf' in read) values.rfParts = '';
      history.record(`the stage from the worksheet block ${blockName.value.trim()}`);
      showForm();
      recompute();
      note.textContent = `Read ${Object.keys(read).length} fields from the worksheet block ${blockName.value.trim()}.`;
    } catch (err) {
      note.textContent = err.message;
    }
  };
  const copyResults = async () => {
    if (!last) return;
    const text = resultsTsv(last);
    try {
      await navigator.clipboard.writeText(text);
      note.textContent = 'Results copied at full precision (tab-separated).';
    } catch {
      note.textContent = 'The clipboard is not available here.';
    }
  };
  const showReport = () => {
    if (!last) return;
    reportHost.hidden = false;
    // A cancelled run starts again: the report has the tolerance answers.
    if (last.tolerance === null && run?.cancelled) startTolerance(last);
    renderReport(reportHost, api, last, values);
    reportHost.scrollIntoView?.();
  };
  const loadDemo = () => use({ ...DEMO }, 'the demo stage');

  host.append(
    el(
      'div',
      { class: 'stage-toolbar', role: 'toolbar', 'aria-label': 'stage' },
      undoButton,
      redoButton,
      button('stage-demo', 'Demo stage', loadDemo),
      button('stage-report-button', 'Design report', showReport),
      button('stage-print', 'Print report', async () => {
        showReport();
        await toleranceIn();
        window.print();
      }),
      button('stage-copy', 'Copy results', copyResults),
      el('span', { class: 'stage-block' }, 'Block', blockName, 'at', blockAt),
      button('stage-to-sheet', 'To worksheet', toWorksheet),
      button('stage-from-sheet', 'From worksheet', fromWorksheet),
    ),
    note,
    el(
      'div',
      { class: 'stage-layout' },
      el('div', { class: 'stage-inputs' }, formHost, message),
      el('div', { class: 'stage-answers' }, checksHost, plotsHost),
    ),
    designHost,
    reportHost,
  );
  showForm();
  showHistory();
  recompute();
  return {
    get values() {
      return { ...values };
    },
    get results() {
      return last;
    },
    /** Resolves once the tolerance answers of the stage on screen are in. */
    toleranceIn,
    history,
  };
}
