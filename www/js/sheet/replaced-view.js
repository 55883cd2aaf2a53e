// The list of replaced sheets on the page: a disclosure under the toolbar, one line
// per sheet (when, why, how many cells, whether a reload keeps it) with a button
// that puts it back. DOM only; the list itself is ./replaced.js.

import { el, clear } from '../dom.js';

/** "3 Dec 2026, 10:42" in the reader's own locale. */
export function whenText(at) {
  return new Date(at).toLocaleString([], { dateStyle: 'medium', timeStyle: 'short' });
}

function line(entry, index, onRestore) {
  const cells = entry.cells === null ? '' : `, ${entry.cells} cell${entry.cells === 1 ? '' : 's'}`;
  const first = entry.first ? ` starting “${entry.first}”` : '';
  const kept = entry.stored
    ? ''
    : ' (kept only until this page is closed: no room for it in this browser’s storage)';
  return el(
    'li',
    {},
    `${whenText(entry.at)}: replaced ${entry.reason}${cells}${first}${kept} `,
    el(
      'button',
      {
        type: 'button',
        class: 'button',
        id: `sheet-replaced-${index}`,
        onclick: () => onRestore(entry),
      },
      'Put back',
    ),
  );
}

/** Mount the list; returns `render(entries)`, to call whenever the list changes. */
export function mountReplacedView(host, { onRestore }) {
  const summary = el('summary');
  const items = el('ol', { class: 'sheet-replaced-list' });
  const box = el('details', { class: 'sheet-replaced', id: 'sheet-replaced', hidden: true }, [
    summary,
    el(
      'p',
      { class: 'sheet-replaced-about' },
      'Sheets that a link, a file, the demo or putting back an earlier sheet replaced, newest first. Putting one back keeps the current sheet here too.',
    ),
    items,
  ]);
  host.append(box);
  return function render(entries) {
    box.hidden = entries.length === 0;
    summary.textContent = `Replaced sheets (${entries.length})`;
    clear(items);
    entries.forEach((entry, i) => {
      items.append(line(entry, i, onRestore));
    });
  };
}
