// The worksheet grid's DOM and its painting: the name box, the formula bar, the
// explanation line and a 26 × 200 table of cells; each cell painted from what the
// engine says it shows. No state and no events here.

import { el } from '../dom.js';
import { formatEngineering } from '../format.js';
import { COLS, ROWS, addressOf } from './address.js';
import { partCaption } from './result-parts.js';

/**
 * What a cell shows: numbers to six significant digits (with an SI prefix when
 * they carry a unit other than dB), everything else as the engine displays it.
 */
export function shownText(v) {
  if (v.kind === 'empty') return '';
  if (v.kind !== 'number') return v.display;
  return formatEngineering(v.number, 6, v.unit ?? '');
}

/** The words a pointer and assistive technology get for a cell, beside its text. */
function describeCell(v, part) {
  const name = part ? `${partCaption(part)} — ${part.name}` : null;
  if (v.kind === 'error') return `${v.error}: ${v.message}`;
  if (v.kind === 'number') return name ? `${name}: ${v.display}` : v.display;
  return name;
}

/**
 * Paint one cell from the engine's value `v` (text, kind classes, title,
 * description); `part` (result-parts.js) names the part of a result that fans
 * out, shown as a caption over the first row of its cells and in the title.
 */
export function paintCell(td, v, part = null) {
  td.textContent = shownText(v);
  if (part && part.row === 1) td.dataset.part = part.label;
  else delete td.dataset.part;
  // The full value stays available to a pointer and to assistive technology.
  if (v.kind === 'number') td.dataset.value = String(v.number);
  else delete td.dataset.value;
  const typed = typeof v.input === 'string' && v.input !== '';
  const classes = [`k-${v.kind}`];
  if (v.spill) classes.push('fan-anchor');
  if (!typed && v.kind !== 'empty') classes.push('fanned');
  if (typed && v.kind === 'number' && !v.input.trimStart().startsWith('=')) classes.push('k-input');
  td.className = classes.join(' ');
  const words = describeCell(v, part);
  if (words) td.title = words;
  else td.removeAttribute('title');
  if (v.kind === 'error' || part) td.setAttribute('aria-description', words);
  else td.removeAttribute('aria-description');
}

function barInputs() {
  // The name box shows the active cell or range; typing an address there moves to
  // it, typing a name (e.g. gain) names the active cell.
  const nameBox = el('input', {
    class: 'sheet-namebox',
    id: 'sheet-namebox',
    value: 'A1',
    autocomplete: 'off',
    spellcheck: 'false',
    'aria-label': 'active cell; type an address to go there or a name to name the cell',
  });
  const bar = el('input', {
    class: 'sheet-formula',
    id: 'formula-bar',
    'aria-label': 'cell input (formula bar)',
    autocomplete: 'off',
    spellcheck: 'false',
    placeholder: 'number, text or =formula',
  });
  return { nameBox, bar };
}

function gridTable() {
  const table = el('table', {
    class: 'sheet-grid',
    role: 'grid',
    'aria-label': 'worksheet',
    'aria-rowcount': ROWS,
    'aria-colcount': COLS,
  });
  const cells = [];
  const head = el('tr', {}, el('th', { class: 'sheet-corner' }));
  for (let c = 0; c < COLS; c++)
    head.append(el('th', { scope: 'col' }, String.fromCharCode(65 + c)));
  table.append(el('thead', {}, head));
  const body = el('tbody');
  for (let r = 0; r < ROWS; r++) {
    const tr = el('tr', {}, el('th', { scope: 'row' }, String(r + 1)));
    const row = [];
    for (let c = 0; c < COLS; c++) {
      const td = el('td', {
        role: 'gridcell',
        id: `cell-${addressOf(c, r)}`,
        tabindex: '-1',
        'data-col': c,
        'data-row': r,
      });
      row.push(td);
      tr.append(td);
    }
    cells.push(row);
    body.append(tr);
  }
  table.append(body);
  return { table, cells };
}

/** Build the grid in `host`: `{nameBox, bar, explain, table, cells}` (cells[row][col]). */
export function buildGridView(host) {
  const { nameBox, bar } = barInputs();
  const explain = el('p', {
    class: 'sheet-explain',
    id: 'sheet-explain',
    role: 'status',
    'aria-live': 'polite',
  });
  const { table, cells } = gridTable();
  const scroller = el('div', { class: 'sheet-scroller' }, table);
  host.append(el('div', { class: 'sheet-bar' }, nameBox, bar), scroller, explain);
  cells[0][0].tabIndex = 0;
  return { nameBox, bar, explain, table, cells };
}
