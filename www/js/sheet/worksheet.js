// The worksheet panel: toolbar (open, save, CSV, share link, demo), the grid, the
// function help, and autosave with recovery after a reload.

import { el } from '../dom.js';
import { useCore } from '../format.js';
import { mountGrid } from './grid.js';
import { mountHelp } from './help.js';
import * as store from './storage.js';
import { DEMO_SHEET } from './demo.js';

export async function mountWorksheet(host, api) {
  useCore(api);
  const sheet = new api.Worksheet();
  const note = el('p', { class: 'sheet-note', role: 'status', 'aria-live': 'polite' });
  const fileInput = el('input', {
    type: 'file',
    accept: '.json,application/json',
    class: 'visually-hidden',
    id: 'sheet-file',
    tabindex: '-1',
  });
  const shareOut = el('input', {
    class: 'sheet-share',
    readonly: true,
    'aria-label': 'share link',
    hidden: true,
  });
  const toolbar = el(
    'div',
    { class: 'sheet-toolbar', role: 'toolbar', 'aria-label': 'worksheet' },
    el(
      'button',
      { type: 'button', class: 'button', id: 'sheet-open', onclick: () => fileInput.click() },
      'Open…',
    ),
    el(
      'button',
      { type: 'button', class: 'button', id: 'sheet-save', onclick: () => store.saveFile(sheet) },
      'Save file',
    ),
    el(
      'button',
      { type: 'button', class: 'button', id: 'sheet-csv', onclick: () => store.exportCsv(sheet) },
      'Values as CSV',
    ),
    el(
      'button',
      { type: 'button', class: 'button', id: 'sheet-share', onclick: share },
      'Share link',
    ),
    el(
      'button',
      { type: 'button', class: 'button', id: 'sheet-demo', onclick: loadDemo },
      'Load demo',
    ),
    fileInput,
  );
  const gridHost = el('div', { class: 'sheet-main' });
  const helpHost = el('aside', { class: 'sheet-help', 'aria-label': 'function help' });
  host.append(toolbar, note, shareOut, el('div', { class: 'sheet-layout' }, gridHost, helpHost));

  let saveTimer = null;
  const grid = mountGrid(gridHost, sheet, {
    onChange() {
      clearTimeout(saveTimer);
      saveTimer = setTimeout(() => store.autosave(sheet), 300);
    },
  });
  mountHelp(helpHost, api.functionCatalog(), { onUse: (formula) => grid.propose(formula) });

  function load(text, what) {
    try {
      sheet.loadDocument(text);
    } catch (err) {
      note.textContent = `${what} was not loaded: ${err.message}. The sheet is as it was.`;
      return false;
    }
    grid.refresh();
    store.autosave(sheet);
    return true;
  }

  async function share() {
    const url = await store.shareUrl(sheet);
    shareOut.hidden = false;
    shareOut.value = url;
    shareOut.select();
    try {
      await navigator.clipboard.writeText(url);
      note.textContent =
        'Share link copied. It carries the whole sheet; anyone who opens it gets a copy.';
    } catch {
      note.textContent = 'Share link ready below; copy it from the box.';
    }
  }

  function loadDemo() {
    if (load(DEMO_SHEET, 'The demo'))
      note.textContent =
        'Demo loaded: a hydrophone preamplifier and its line driver. Change any blue input.';
  }

  fileInput.addEventListener('change', async () => {
    const file = fileInput.files?.[0];
    if (!file) return;
    if (load(await store.readFile(file), `"${file.name}"`))
      note.textContent = `Opened "${file.name}".`;
    fileInput.value = '';
  });

  // Start: a share link wins (the previous autosave is kept aside); otherwise the
  // autosave of this browser is recovered.
  let fromLink = null;
  try {
    fromLink = await store.decodeFragment(location.hash);
  } catch (err) {
    note.textContent = `The link's sheet could not be read: ${err.message}.`;
  }
  if (fromLink !== null) {
    const hadSaved = store.backUpAutosave();
    // Drop the fragment so that a reload shows the autosave of later edits.
    history.replaceState(null, '', location.href.replace(/#.*$/, ''));
    if (load(fromLink, 'The shared sheet')) {
      note.textContent = 'Opened the sheet from the link.';
      if (hadSaved) {
        note.append(
          ' ',
          el(
            'button',
            {
              type: 'button',
              class: 'button',
              id: 'sheet-restore',
              onclick: () => {
                if (load(store.backup(), 'The previous sheet'))
                  note.textContent = 'Your previous sheet is back.';
              },
            },
            'Restore my previous sheet',
          ),
        );
      }
    }
  } else {
    const saved = store.recovered();
    if (saved && load(saved, 'The autosaved sheet'))
      note.append(`${note.textContent ? ' ' : ''}Recovered your sheet from this browser.`);
  }
  grid.refresh();
  return { sheet, grid };
}
