// The worksheet grid's keyboard: moving and selecting in the table (arrows; the
// table is one tab stop, Tab leaves it), editing in the formula bar (Enter and Tab
// commit and return to the grid, Escape leaves editing without a change), going to
// an address or naming a cell in the name box.

import { moved, parseAddress } from './address.js';

const ARROWS = { ArrowUp: [0, -1], ArrowDown: [0, 1], ArrowLeft: [-1, 0], ArrowRight: [1, 0] };

function onTableKey(g, e) {
  const step = ARROWS[e.key];
  const active = g.active();
  if (step) {
    e.preventDefault();
    g.focusCell(moved(active, ...step), { extend: e.shiftKey });
  } else if (e.key === 'Tab') {
    // The grid is one tab stop (the ARIA grid pattern): Tab and Shift+Tab leave it
    // for the next or previous control, and the grid keeps its active cell for when
    // focus comes back. Arrow keys move inside.
    return;
  } else if (e.key === 'Enter' || e.key === 'F2') {
    e.preventDefault();
    g.startEditing();
  } else if (e.key === 'Delete' || e.key === 'Backspace') {
    e.preventDefault();
    g.clearSelection();
  } else if (e.key === 'Home') {
    e.preventDefault();
    g.focusCell({ col: 0, row: e.ctrlKey ? 0 : active.row });
  } else if (e.key.length === 1 && !e.ctrlKey && !e.metaKey && !e.altKey) {
    e.preventDefault();
    g.startEditing(e.key);
  }
}

function onBarKey(g, e) {
  const bar = g.view.bar;
  if (e.key === 'Enter' || e.key === 'Tab') {
    e.preventDefault();
    g.editing = false;
    if (!g.commit(bar.value)) {
      bar.focus();
      return;
    }
    const across = e.key === 'Tab' ? (e.shiftKey ? -1 : 1) : 0;
    const down = e.key === 'Enter' ? (e.shiftKey ? -1 : 1) : 0;
    g.focusCell(moved(g.active(), across, down));
  } else if (e.key === 'Escape') {
    e.preventDefault();
    g.editing = false;
    g.focusCell(g.active());
  }
}

function onNameBoxKey(g, e) {
  if (e.key === 'Escape') {
    e.preventDefault();
    g.focusCell(g.active());
    return;
  }
  if (e.key !== 'Enter') return;
  e.preventDefault();
  const text = g.view.nameBox.value.trim();
  const target = parseAddress(text);
  if (target) g.focusCell(target);
  else g.nameActive(text);
}

/** Wire the keyboard of the table, the formula bar and the name box to `g`. */
export function wireKeyboard(g) {
  const { table, bar, nameBox } = g.view;
  table.addEventListener('keydown', (e) => onTableKey(g, e));
  bar.addEventListener('keydown', (e) => onBarKey(g, e));
  nameBox.addEventListener('keydown', (e) => onNameBoxKey(g, e));
  bar.addEventListener('focus', () => {
    g.editing = true;
  });
  bar.addEventListener('blur', () => {
    g.editing = false;
  });
}
