// The worksheet grid: a 26 × 200 table of cells with a formula bar, keyboard
// navigation and editing, range selection, TSV copy and paste, spilled arrays and
// error values explained on hover and focus.
//
// mountGrid(host, sheet, {onChange}) where `sheet` is the engine's Worksheet. The
// grid keeps no values of its own: it asks the engine what each cell shows.

import { el } from '../dom.js';
import { formatEngineering } from '../format.js';
import {
  COLS,
  ROWS,
  addressOf,
  parseAddress,
  rectOf,
  rangeText,
  moved,
  addressesIn,
} from './address.js';

/**
 * What a cell shows: numbers through the core's one display, six significant
 * digits with an SI prefix on the unit (none on dB), the unit after a space;
 * everything else as the engine displays it. The full-precision form stays in the
 * cell's tooltip and in copies.
 */
export function shownText(v) {
  if (v.kind === 'empty') return '';
  if (v.kind !== 'number') return v.display;
  return formatEngineering(v.number, 6, v.unit ?? '');
}

export function mountGrid(host, sheet, { onChange = () => {} } = {}) {
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
  const explain = el('p', {
    class: 'sheet-explain',
    id: 'sheet-explain',
    role: 'status',
    'aria-live': 'polite',
  });
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
  const scroller = el('div', { class: 'sheet-scroller' }, table);
  host.append(el('div', { class: 'sheet-bar' }, nameBox, bar), scroller, explain);

  let active = { col: 0, row: 0 };
  let anchor = active;
  let editing = false;
  let dragging = false;
  cells[0][0].tabIndex = 0;

  const tdAt = (pos) => cells[pos.row][pos.col];
  const selection = () => rectOf(anchor, active);

  function render(address) {
    const pos = parseAddress(address);
    if (!pos) return;
    try {
      paint(tdAt(pos), sheet.value(address));
    } catch {
      // An address outside the grid: nothing to draw.
    }
  }

  function paint(td, v) {
    td.textContent = shownText(v);
    // The full value stays available to a pointer and to assistive technology.
    if (v.kind === 'number') td.dataset.value = String(v.number);
    else delete td.dataset.value;
    const typed = typeof v.input === 'string' && v.input !== '';
    const classes = [`k-${v.kind}`];
    if (v.spill) classes.push('spill-anchor');
    if (!typed && v.kind !== 'empty') classes.push('spilled');
    if (typed && v.kind === 'number' && !v.input.trimStart().startsWith('='))
      classes.push('k-input');
    td.className = classes.join(' ');
    if (v.kind === 'error') {
      td.title = `${v.error}: ${v.message}`;
      td.setAttribute('aria-description', `${v.error}: ${v.message}`);
    } else if (v.kind === 'number') {
      td.title = v.display;
      td.removeAttribute('aria-description');
    } else {
      td.removeAttribute('title');
      td.removeAttribute('aria-description');
    }
  }

  function renderAll(addresses) {
    for (const a of addresses) render(a);
  }

  function paintSelection() {
    for (const td of table.querySelectorAll('td.selected')) td.classList.remove('selected');
    for (const a of addressesIn(selection())) tdAt(parseAddress(a)).classList.add('selected');
  }

  function showActive() {
    const address = addressOf(active.col, active.row);
    nameBox.value = rangeText(selection());
    if (!editing) bar.value = sheet.input(address) ?? '';
    const v = sheet.value(address);
    explain.textContent = v.kind === 'error' ? `${address} shows ${v.error}: ${v.message}` : '';
  }

  function focusCell(pos, { extend = false } = {}) {
    tdAt(active).tabIndex = -1;
    active = pos;
    if (!extend) anchor = pos;
    const td = tdAt(active);
    td.tabIndex = 0;
    td.focus({ preventScroll: false });
    paintSelection();
    showActive();
  }

  function commit(text) {
    const address = addressOf(active.col, active.row);
    let changed;
    try {
      changed = sheet.setCell(address, text);
    } catch (err) {
      explain.textContent = `${address}: ${err.message}`;
      return false;
    }
    renderAll([address, ...changed]);
    onChange(changed);
    return true;
  }

  function clearSelection() {
    const changed = [];
    for (const a of addressesIn(selection())) {
      if ((sheet.input(a) ?? '') !== '') changed.push(a, ...sheet.setCell(a, ''));
    }
    renderAll(changed);
    if (changed.length) onChange(changed);
    showActive();
  }

  function startEditing(initial) {
    editing = true;
    bar.value = initial ?? sheet.input(addressOf(active.col, active.row)) ?? '';
    bar.focus();
    bar.setSelectionRange(bar.value.length, bar.value.length);
  }

  table.addEventListener('keydown', (e) => {
    const step = { ArrowUp: [0, -1], ArrowDown: [0, 1], ArrowLeft: [-1, 0], ArrowRight: [1, 0] }[
      e.key
    ];
    if (step) {
      e.preventDefault();
      focusCell(moved(active, ...step), { extend: e.shiftKey });
    } else if (e.key === 'Tab') {
      e.preventDefault();
      focusCell(moved(active, e.shiftKey ? -1 : 1, 0));
    } else if (e.key === 'Enter' || e.key === 'F2') {
      e.preventDefault();
      startEditing();
    } else if (e.key === 'Delete' || e.key === 'Backspace') {
      e.preventDefault();
      clearSelection();
    } else if (e.key === 'Home') {
      e.preventDefault();
      focusCell({ col: 0, row: e.ctrlKey ? 0 : active.row });
    } else if (e.key.length === 1 && !e.ctrlKey && !e.metaKey && !e.altKey) {
      e.preventDefault();
      startEditing(e.key);
    }
  });

  bar.addEventListener('keydown', (e) => {
    if (e.key === 'Enter' || e.key === 'Tab') {
      e.preventDefault();
      editing = false;
      if (commit(bar.value))
        focusCell(
          moved(
            active,
            e.key === 'Tab' ? (e.shiftKey ? -1 : 1) : 0,
            e.key === 'Enter' ? (e.shiftKey ? -1 : 1) : 0,
          ),
        );
      else bar.focus();
    } else if (e.key === 'Escape') {
      e.preventDefault();
      editing = false;
      focusCell(active);
    }
  });
  nameBox.addEventListener('keydown', (e) => {
    if (e.key === 'Escape') {
      e.preventDefault();
      focusCell(active);
      return;
    }
    if (e.key !== 'Enter') return;
    e.preventDefault();
    const text = nameBox.value.trim();
    const target = parseAddress(text);
    if (target) {
      focusCell(target);
      return;
    }
    const address = addressOf(active.col, active.row);
    try {
      const changed = sheet.setName(text, address);
      renderAll(changed);
      onChange(changed);
      explain.textContent = `${address} is now named ${text}.`;
      focusCell(active);
    } catch (err) {
      explain.textContent = `Name "${text}" not set: ${err.message}`;
    }
  });
  bar.addEventListener('focus', () => {
    editing = true;
  });
  bar.addEventListener('blur', () => {
    editing = false;
  });

  // Focus that arrives by other means (a screen reader, a script) makes that cell active.
  table.addEventListener('focusin', (e) => {
    const td = e.target.closest('td[role="gridcell"]');
    if (!td) return;
    const pos = { col: Number(td.dataset.col), row: Number(td.dataset.row) };
    if (pos.col !== active.col || pos.row !== active.row) focusCell(pos);
  });

  table.addEventListener('mousedown', (e) => {
    const td = e.target.closest('td[role="gridcell"]');
    if (!td) return;
    e.preventDefault();
    dragging = true;
    focusCell({ col: Number(td.dataset.col), row: Number(td.dataset.row) }, { extend: e.shiftKey });
  });
  table.addEventListener('mouseover', (e) => {
    const td = dragging && e.target.closest('td[role="gridcell"]');
    if (td)
      focusCell({ col: Number(td.dataset.col), row: Number(td.dataset.row) }, { extend: true });
  });
  window.addEventListener('mouseup', () => {
    dragging = false;
  });
  table.addEventListener('dblclick', () => startEditing());

  table.addEventListener('copy', (e) => {
    try {
      e.clipboardData.setData('text/plain', sheet.rangeToTsv(rangeText(selection())));
      e.preventDefault();
    } catch (err) {
      explain.textContent = err.message;
    }
  });
  table.addEventListener('cut', (e) => {
    try {
      e.clipboardData.setData('text/plain', sheet.rangeToTsv(rangeText(selection())));
      e.preventDefault();
      clearSelection();
    } catch (err) {
      explain.textContent = err.message;
    }
  });
  table.addEventListener('paste', (e) => {
    const text = e.clipboardData.getData('text/plain');
    if (!text) return;
    e.preventDefault();
    const at = addressOf(selection().c0, selection().r0);
    try {
      const changed = sheet.pasteTsv(at, text);
      renderAll(changed);
      onChange(changed);
      showActive();
    } catch (err) {
      explain.textContent = err.message;
    }
  });

  return {
    /** Re-read every cell from the engine (after a load). */
    refresh() {
      const rows = sheet.values(`A1:${addressOf(COLS - 1, ROWS - 1)}`);
      rows.forEach((row, r) => {
        row.forEach((v, c) => {
          paint(cells[r][c], v);
        });
      });
      showActive();
    },
    renderAll,
    /** Put text into the formula bar for the active cell, ready to commit. */
    propose(text) {
      startEditing(text);
    },
    focus() {
      focusCell(active);
    },
    get activeAddress() {
      return addressOf(active.col, active.row);
    },
  };
}
