// The worksheet grid's state: the active cell and the selection, what the name box,
// the formula bar and the explanation line show for them, and repainting cells from
// the engine. Editing is added by grid-editing.js; the event handlers (grid-keys.js,
// grid-pointer.js, grid-clipboard.js) only call these.

import { COLS, ROWS, addressOf, parseAddress, rectOf, rangeText, addressesIn } from './address.js';
import { paintCell } from './grid-view.js';
import { partCaption } from './result-parts.js';

/** The grid's controller over `view` (buildGridView) and the engine's `sheet`. */
export function createGridState(view, sheet, partNames = null) {
  const { nameBox, bar, explain, table, cells } = view;
  /** The named part of a result that fans out, for the engine's value `v`. */
  const partOf = (v) =>
    partNames && (v.spill || v.spilledFrom) ? partNames.partOf(sheet, v) : null;
  let active = { col: 0, row: 0 };
  let anchor = active;
  const g = { editing: false, dragging: false, sheet, view };
  const tdAt = (pos) => cells[pos.row][pos.col];
  const activeAddress = () => addressOf(active.col, active.row);

  g.active = () => active;
  g.activeAddress = activeAddress;
  g.selection = () => rectOf(anchor, active);
  // A confirmation said with `hold` stays until that many ms have passed, even when
  // the active cell moves (a move would otherwise clear it before it is read).
  let heldUntil = 0;
  g.say = (text, { hold = 0 } = {}) => {
    explain.textContent = text;
    heldUntil = hold ? Date.now() + hold : 0;
  };
  const sayUnlessHeld = (text) => {
    if (text === '' && Date.now() < heldUntil) return;
    g.say(text);
  };

  g.render = (address) => {
    const pos = parseAddress(address);
    if (!pos) return;
    try {
      const v = sheet.value(address);
      paintCell(tdAt(pos), v, partOf(v));
    } catch {
      // An address outside the grid: nothing to draw.
    }
  };
  g.renderAll = (addresses) => {
    for (const a of addresses) g.render(a);
  };
  /** Re-read every cell from the engine (after a load). */
  g.refresh = () => {
    const rows = sheet.values(`A1:${addressOf(COLS - 1, ROWS - 1)}`);
    rows.forEach((row, r) => {
      row.forEach((v, c) => {
        paintCell(cells[r][c], v, partOf(v));
      });
    });
    g.showActive();
  };

  function paintSelection() {
    for (const td of table.querySelectorAll('td.selected')) td.classList.remove('selected');
    for (const a of addressesIn(g.selection())) tdAt(parseAddress(a)).classList.add('selected');
  }

  g.showActive = () => {
    const address = activeAddress();
    nameBox.value = rangeText(g.selection());
    if (!g.editing) bar.value = sheet.input(address) ?? '';
    const v = sheet.value(address);
    const part = partOf(v);
    if (v.kind === 'error') g.say(`${address} shows ${v.error}: ${v.message}`);
    else if (part) g.say(`${address}: ${partCaption(part)} — from ${part.name}.`);
    else sayUnlessHeld('');
  };

  g.focusCell = (pos, { extend = false } = {}) => {
    tdAt(active).tabIndex = -1;
    active = pos;
    if (!extend) anchor = pos;
    const td = tdAt(active);
    td.tabIndex = 0;
    td.focus({ preventScroll: false });
    paintSelection();
    g.showActive();
  };

  return g;
}
