// The worksheet grid's clipboard: copy and cut the selection as TSV (full
// precision, as the engine writes it), paste TSV from another spreadsheet at the
// selection's top-left cell.

import { addressOf, rangeText } from './address.js';

function copySelection(g, e) {
  e.clipboardData.setData('text/plain', g.sheet.rangeToTsv(rangeText(g.selection())));
  e.preventDefault();
}

/** Wire copy, cut and paste of the table to `g`. */
export function wireClipboard(g) {
  const { table } = g.view;
  table.addEventListener('copy', (e) => {
    try {
      copySelection(g, e);
    } catch (err) {
      g.say(err.message);
    }
  });
  table.addEventListener('cut', (e) => {
    try {
      copySelection(g, e);
      g.clearSelection(`cutting ${rangeText(g.selection())}`);
    } catch (err) {
      g.say(err.message);
    }
  });
  table.addEventListener('paste', (e) => {
    const text = e.clipboardData.getData('text/plain');
    if (!text) return;
    e.preventDefault();
    const { c0, r0 } = g.selection();
    try {
      g.changed(g.sheet.pasteTsv(addressOf(c0, r0), text), `pasting at ${addressOf(c0, r0)}`);
      g.showActive();
    } catch (err) {
      g.say(err.message);
    }
  });
}
