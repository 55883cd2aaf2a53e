// The worksheet grid: a 26 × 200 table of cells with a formula bar, keyboard
// navigation and editing, range selection, TSV copy and paste, results that fan
// out into neighbouring cells (each part named from the catalog: result-parts.js)
// and error values explained on hover and focus.
//
// mountGrid(host, sheet, {onChange, partNames}) where `sheet` is the engine's Worksheet. The
// grid keeps no values of its own: it asks the engine what each cell shows. Its
// parts: grid-view.js (DOM and painting), grid-state.js (active cell, selection),
// grid-editing.js (typing, clearing, naming), grid-keys.js, grid-pointer.js and grid-clipboard.js (events).

import { buildGridView } from './grid-view.js';
import { createGridState } from './grid-state.js';
import { addEditing } from './grid-editing.js';
import { wireKeyboard } from './grid-keys.js';
import { wirePointer } from './grid-pointer.js';
import { wireClipboard } from './grid-clipboard.js';

export { shownText } from './grid-view.js';

export function mountGrid(host, sheet, { onChange = () => {}, partNames = null } = {}) {
  const g = addEditing(createGridState(buildGridView(host), sheet, partNames), onChange);
  wireKeyboard(g);
  wirePointer(g);
  wireClipboard(g);
  return {
    /** Re-read every cell from the engine (after a load). */
    refresh: g.refresh,
    renderAll: g.renderAll,
    /** Put text into the formula bar for the active cell, ready to commit. */
    propose(text) {
      g.startEditing(text);
    },
    focus() {
      g.focusCell(g.active());
    },
    get activeAddress() {
      return g.activeAddress();
    },
  };
}
