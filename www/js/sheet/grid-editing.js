// Editing the worksheet grid: typing into the formula bar, committing a cell,
// clearing the selection, naming the active cell; every change the engine reports
// is repainted and passed to `onChange(changed, what)` (the history and the
// autosave), `what` saying in words which change it was ("typing in B3").

import { addressesIn, rangeText } from './address.js';

/**
 * How long the confirmation of a new name stays, ms: time to read a short sentence
 * after looking back from the name box (common practice, no source: 5 s or more
 * for a message that goes away by itself).
 */
export const NAMED_CONFIRMATION_MS = 8000;

/** Add the editing actions to the grid state `g` (grid-state.js). */
export function addEditing(g, onChange) {
  const { sheet } = g;
  const { bar } = g.view;

  /** Put the engine's changes on screen and report them (also none: a name may be new). */
  g.changed = (changed, what) => {
    g.renderAll(changed);
    onChange(changed, what);
  };

  g.commit = (text) => {
    const address = g.activeAddress();
    let changed;
    try {
      changed = sheet.setCell(address, text);
    } catch (err) {
      g.say(`${address}: ${err.message}`);
      return false;
    }
    g.renderAll([address, ...changed]);
    onChange(changed, `typing in ${address}`);
    return true;
  };

  g.clearSelection = (what = `clearing ${rangeText(g.selection())}`) => {
    const changed = [];
    for (const a of addressesIn(g.selection())) {
      if ((sheet.input(a) ?? '') !== '') changed.push(a, ...sheet.setCell(a, ''));
    }
    g.renderAll(changed);
    if (changed.length) onChange(changed, what);
    g.showActive();
  };

  g.startEditing = (initial) => {
    g.editing = true;
    bar.value = initial ?? sheet.input(g.activeAddress()) ?? '';
    bar.focus();
    bar.setSelectionRange(bar.value.length, bar.value.length);
  };

  /**
   * Name the active cell; the confirmation stays on screen for
   * NAMED_CONFIRMATION_MS, across moves, unless an error value must be explained.
   */
  g.nameActive = (name) => {
    const address = g.activeAddress();
    try {
      g.changed(sheet.setName(name, address), `naming ${address} ${name}`);
    } catch (err) {
      g.say(`Name "${name}" not set: ${err.message}`);
      return;
    }
    g.focusCell(g.active());
    g.say(`${address} is now named ${name}.`, { hold: NAMED_CONFIRMATION_MS });
  };

  return g;
}
