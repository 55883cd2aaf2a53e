// The worksheet grid under a pointer and other ways focus arrives: click to make a
// cell active, shift-click or drag to select a range, double-click to edit.

const cellOf = (target) => target.closest('td[role="gridcell"]');
const posOf = (td) => ({ col: Number(td.dataset.col), row: Number(td.dataset.row) });

/** Wire pointer and focus events of the table to `g`. */
export function wirePointer(g) {
  const { table } = g.view;
  // Focus that arrives by other means (a screen reader, a script) makes that cell active.
  table.addEventListener('focusin', (e) => {
    const td = cellOf(e.target);
    if (!td) return;
    const pos = posOf(td);
    const active = g.active();
    if (pos.col !== active.col || pos.row !== active.row) g.focusCell(pos);
  });
  table.addEventListener('mousedown', (e) => {
    const td = cellOf(e.target);
    if (!td) return;
    e.preventDefault();
    g.dragging = true;
    g.focusCell(posOf(td), { extend: e.shiftKey });
  });
  table.addEventListener('mouseover', (e) => {
    const td = g.dragging && cellOf(e.target);
    if (td) g.focusCell(posOf(td), { extend: true });
  });
  window.addEventListener('mouseup', () => {
    g.dragging = false;
  });
  table.addEventListener('dblclick', () => g.startEditing());
}
