// Editing the worksheet grid: typing into the formula bar, committing a cell,
// clearing the selection, naming the active cell; every change the engine reports
// is repainted and passed to `onChange` (the autosave).

import { addressesIn } from './address.js';

/** Add the editing actions to the grid state `g` (grid-state.js). */
export function addEditing(g, onChange) {
  const { sheet } = g;
  const { bar } = g.view;

  /** Put the engine's changes on screen and report them (also none: a name may be new). */
  g.changed = (changed) => {
    g.renderAll(changed);
    onChange(changed);
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
    onChange(changed);
    return true;
  };

  g.clearSelection = () => {
    const changed = [];
    for (const a of addressesIn(g.selection())) {
      if ((sheet.input(a) ?? '') !== '') changed.push(a, ...sheet.setCell(a, ''));
    }
    g.renderAll(changed);
    if (changed.length) onChange(changed);
    g.showActive();
  };

  g.startEditing = (initial) => {
    g.editing = true;
    bar.value = initial ?? sheet.input(g.activeAddress()) ?? '';
    bar.focus();
    bar.setSelectionRange(bar.value.length, bar.value.length);
  };

  /** Name the active cell; the confirmation stays until the next move. */
  g.nameActive = (name) => {
    const address = g.activeAddress();
    try {
      g.changed(sheet.setName(name, address));
    } catch (err) {
      g.say(`Name "${name}" not set: ${err.message}`);
      return;
    }
    g.focusCell(g.active());
    g.say(`${address} is now named ${name}.`);
  };

  return g;
}
