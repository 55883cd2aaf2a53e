// The worksheet panel: toolbar (undo, redo, open, save, CSV, share link, demo), the grid, the
// function help, the autosave with recovery after a reload, and the list of
// replaced sheets. Nothing the user typed is lost: see replacing.js (every load
// that replaces the sheet can be undone), opening.js (a refused link leaves the
// sheet as it was) and autosave.js (a failed autosave is shown, with the file).

import { el } from '../dom.js';
import { useCore } from '../format.js';
import { mountGrid } from './grid.js';
import { mountHelp } from './help.js';
import * as store from './storage.js';
import { createReplaced } from './replaced.js';
import { mountReplacedView } from './replaced-view.js';
import { createAutosave } from './autosave.js';
import { createReplacing } from './replacing.js';
import { openAtStart, watchLinks, hasSheetLink } from './opening.js';
import { DEMO_SHEET } from './demo.js';
import { mountSheetFiles } from './sheetfiles.js';
import { mountHistoryControls } from './history-controls.js';
import { createPartNames } from './result-parts.js';

const button = (id, label, onclick) =>
  el('button', { type: 'button', class: 'button', id, onclick }, label);

/** What the link carries, whatever page it points to. */
const SHARE_CARRIES =
  'The link itself carries every cell input and name of this sheet (values are recomputed when it opens); it does not carry the replaced sheets, the undo steps or the calculators’ fields, and nothing is sent to a server.';

/** What the share message says about where the link opens. */
function shareScope() {
  return location.protocol === 'file:'
    ? `${SHARE_CARRIES} It points to the page file on this computer, so it opens only on a computer that has that file at the same place; to share the sheet with someone else, send them the page file and the sheet saved as a file.`
    : `${SHARE_CARRIES} It opens this page with a copy of the sheet, on the worksheet, for whoever can reach this page’s address.`;
}

/** The panel's elements, appended to `host` in their order (the grid and help last). */
function buildPanel(host) {
  const parts = {
    fileInput: el('input', {
      type: 'file',
      accept: '.json,application/json',
      class: 'visually-hidden',
      id: 'sheet-file',
      tabindex: '-1',
    }),
    toolbar: el('div', { class: 'sheet-toolbar', role: 'toolbar', 'aria-label': 'worksheet' }),
    note: el('p', { class: 'sheet-note', role: 'status', 'aria-live': 'polite' }),
    warning: el('div', {
      class: 'sheet-warning',
      id: 'sheet-warning',
      role: 'alert',
      hidden: true,
    }),
    shareOut: el('input', {
      class: 'sheet-share',
      readonly: true,
      'aria-label': 'share link',
      hidden: true,
    }),
    replacedHost: el('div'),
    gridHost: el('div', { class: 'sheet-main' }),
    helpHost: el('aside', { class: 'sheet-help', 'aria-label': 'function help' }),
  };
  host.append(
    parts.toolbar,
    parts.note,
    parts.warning,
    parts.shareOut,
    parts.replacedHost,
    el('div', { class: 'sheet-layout' }, parts.gridHost, parts.helpHost),
  );
  return parts;
}

async function share(sheet, { note, shareOut }) {
  const url = await store.shareUrl(sheet);
  shareOut.hidden = false;
  shareOut.value = url;
  shareOut.select();
  let copied = true;
  try {
    await navigator.clipboard.writeText(url);
  } catch {
    copied = false;
  }
  note.textContent = `${copied ? 'Share link copied.' : 'Share link ready below; copy it from the box.'} ${shareScope()}`;
}

function fillToolbar(panel, parts) {
  const { sheet } = panel;
  const loadDemo = async () => {
    const done = await panel.replaceWith(DEMO_SHEET, 'The demo', 'by the demo');
    if (done)
      panel.announce(
        done,
        'Demo loaded: a hydrophone preamplifier and its line driver. Change any blue input.',
      );
  };
  const openFile = async () => {
    const file = parts.fileInput.files?.[0];
    if (!file) return;
    parts.fileInput.value = '';
    const text = await store.readFile(file);
    const done = await panel.replaceWith(text, `"${file.name}"`, `by the file "${file.name}"`);
    if (done) panel.announce(done, `Opened "${file.name}".`);
  };
  parts.fileInput.addEventListener('change', openFile);
  parts.toolbar.append(
    button('sheet-open', 'Open…', () => parts.fileInput.click()),
    button('sheet-save', 'Save file', () => store.saveFile(sheet)),
    button('sheet-csv', 'Values as CSV', () => store.exportCsv(sheet)),
    button('sheet-share', 'Share link', () => share(sheet, parts)),
    button('sheet-demo', 'Load demo', loadDemo),
    parts.fileInput,
  );
  mountSheetFiles(panel, parts.toolbar);
}

/**
 * Mount the worksheet in `host`. `onLink()` is called when a share link pasted into
 * this tab's address bar (a fragment change, no reload) was opened or refused.
 * Resolves to `{sheet, grid, cameWithLink, record}`: `cameWithLink` is true when the
 * page was opened with a share link, whether its sheet was loaded or refused (the
 * worksheet says which); `record(what)` keeps a change made from outside the grid
 * (the stage view's block) as one undo step and autosaves it.
 */
export async function mountWorksheet(host, api, { onLink = () => {} } = {}) {
  useCore(api);
  const sheet = new api.Worksheet();
  const parts = buildPanel(host);
  const replaced = createReplaced();
  const panel = { sheet, note: parts.note, replaced };
  const autosave = createAutosave(sheet, {
    host,
    warning: parts.warning,
    replaced,
    onReplacedStored: () => panel.showReplaced(),
  });
  const catalog = api.functionCatalog();
  const grid = mountGrid(parts.gridHost, sheet, {
    partNames: createPartNames(JSON.parse(catalog)),
    onChange: (_changed, what) => {
      panel.history.record(what);
      autosave.soon();
    },
  });
  mountHelp(parts.helpHost, catalog, { onUse: (f) => grid.propose(f) });
  Object.assign(panel, { grid, autosave });
  const render = mountReplacedView(parts.replacedHost, {
    onRestore: (entry) => panel.restore(entry),
  });
  panel.showReplaced = () => render(replaced.list());
  Object.assign(panel, createReplacing(panel));
  fillToolbar(panel, parts);
  mountHistoryControls(panel, { toolbar: parts.toolbar, host });
  watchLinks(panel, onLink);

  const cameWithLink = hasSheetLink();
  await openAtStart(panel);
  panel.history.reset();
  panel.showReplaced();
  grid.refresh();
  const record = (what) => {
    panel.history.record(what);
    autosave.soon();
  };
  return { sheet, grid, cameWithLink, record };
}
