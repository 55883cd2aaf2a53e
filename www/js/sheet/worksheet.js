// The worksheet panel: toolbar (open, save, CSV, share link, demo), the grid, the
// function help, the autosave with recovery after a reload, and the list of
// replaced sheets.
//
// Nothing the user typed is lost: every load that replaces the sheet (a share link,
// a file, the demo, an earlier sheet) first succeeds on the engine, which leaves the
// sheet as it was when it refuses a document, and only then keeps the sheet it
// replaced in the list of replaced sheets, with an undo in the message. A failed
// autosave is shown, with the offer to save to a file, until one succeeds.

import { el, clear } from '../dom.js';
import { mountGrid } from './grid.js';
import { mountHelp } from './help.js';
import * as store from './storage.js';
import { createReplaced } from './replaced.js';
import { mountReplacedView, whenText } from './replaced-view.js';
import { DEMO_SHEET } from './demo.js';

/** Delay between the last edit and its autosave, ms. */
const AUTOSAVE_DELAY_MS = 300;

const button = (id, label, onclick) =>
  el('button', { type: 'button', class: 'button', id, onclick }, label);

const megabytes = (bytes) => `${(bytes / 1e6).toFixed(1)} MB`;

function toolbar(actions, fileInput) {
  return el(
    'div',
    { class: 'sheet-toolbar', role: 'toolbar', 'aria-label': 'worksheet' },
    button('sheet-open', 'Open…', () => fileInput.click()),
    button('sheet-save', 'Save file', actions.save),
    button('sheet-csv', 'Values as CSV', actions.csv),
    button('sheet-share', 'Share link', actions.share),
    button('sheet-demo', 'Load demo', actions.demo),
    fileInput,
  );
}

/** What the warning says when an autosave was not kept. */
function unsavedText(outcome) {
  return outcome.reason === 'full'
    ? `Not kept in this browser: the sheet (${megabytes(outcome.bytes)}) does not fit in its storage, even compressed, so a reload would lose your latest edits. Save it to a file to keep it.`
    : 'Not kept in this browser: it does not let this page store anything here, so a reload would lose the sheet. Save it to a file to keep it.';
}

/** What the share message says about who can open the link. */
function shareScope() {
  return location.protocol === 'file:'
    ? 'It carries the whole sheet, but it points to the page file on this computer: it opens only where that file is at the same place. To share the sheet, send the page file with the sheet saved as a file.'
    : 'It carries the whole sheet; anyone who opens it gets a copy.';
}

/**
 * Mount the worksheet in `host`. `onLink()` is called when a share link pasted into
 * this tab's address bar (a fragment change, no reload) was opened or refused.
 * Resolves to `{sheet, grid, cameWithLink}`: `cameWithLink` is true when the page
 * was opened with a share link, whether its sheet was loaded or refused (the
 * worksheet says which).
 */
export async function mountWorksheet(host, api, { onLink = () => {} } = {}) {
  const sheet = new api.Worksheet();
  const note = el('p', { class: 'sheet-note', role: 'status', 'aria-live': 'polite' });
  const warning = el('div', {
    class: 'sheet-warning',
    id: 'sheet-warning',
    role: 'alert',
    hidden: true,
  });
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
  const gridHost = el('div', { class: 'sheet-main' });
  const helpHost = el('aside', { class: 'sheet-help', 'aria-label': 'function help' });
  host.append(
    toolbar(
      {
        save: () => store.saveFile(sheet),
        csv: () => store.exportCsv(sheet),
        share,
        demo: loadDemo,
      },
      fileInput,
    ),
    note,
    warning,
    shareOut,
  );
  const replaced = createReplaced();
  const renderReplaced = mountReplacedView(host, { onRestore: restore });
  host.append(el('div', { class: 'sheet-layout' }, gridHost, helpHost));

  let saveTimer = null;
  const grid = mountGrid(gridHost, sheet, {
    onChange() {
      clearTimeout(saveTimer);
      saveTimer = setTimeout(saveNow, AUTOSAVE_DELAY_MS);
    },
  });
  mountHelp(helpHost, api.functionCatalog(), { onUse: (formula) => grid.propose(formula) });

  /** Autosave at once, and show or clear the warning of a failed one. */
  async function saveNow() {
    clearTimeout(saveTimer);
    saveTimer = null;
    const outcome = await store.autosave(sheet.saveDocument());
    host.dataset.autosave = outcome.ok ? (outcome.packed ? 'packed' : 'plain') : 'failed';
    clear(warning);
    warning.hidden = outcome.ok;
    if (!outcome.ok)
      warning.append(
        unsavedText(outcome),
        ' ',
        button('sheet-warning-save', 'Save to a file', () => store.saveFile(sheet)),
      );
    return outcome;
  }

  // The page is going away with an autosave pending: one last plain write.
  window.addEventListener('pagehide', () => {
    if (saveTimer === null) return;
    clearTimeout(saveTimer);
    saveTimer = null;
    store.autosaveNow(sheet.saveDocument());
  });

  function undoButton(entry) {
    return button('sheet-undo', 'Undo: put back the sheet it replaced', () => restore(entry));
  }

  /**
   * Replace the sheet with `text`; on success keep the sheet it replaced (unless
   * empty) as replaced `reason`. Resolves to `{entry}` on success, null when the
   * engine refused the document (the sheet, the screen and the storage unchanged).
   */
  async function replaceWith(text, what, reason) {
    const before = sheet.saveDocument();
    try {
      sheet.loadDocument(text);
    } catch (err) {
      note.textContent = `${what} was not loaded: ${err.message}. The sheet is as it was.`;
      return null;
    }
    grid.refresh();
    const entry = await replaced.add(before, reason);
    renderReplaced(replaced.list());
    await saveNow();
    return { entry };
  }

  /** Show `message`, with the undo of the replacement that `done` reports. */
  function announce(done, message) {
    note.textContent = message;
    if (done.entry) note.append(' ', undoButton(done.entry));
  }

  async function restore(entry) {
    let text;
    try {
      text = await replaced.text(entry);
    } catch (err) {
      note.textContent = `That sheet could not be put back: ${err.message}. The sheet is as it was.`;
      return;
    }
    const done = await replaceWith(text, 'The earlier sheet', 'when an earlier sheet was put back');
    if (!done) return;
    replaced.remove(entry);
    renderReplaced(replaced.list());
    note.textContent = `The sheet replaced ${whenText(entry.at)} is back. The one it replaced is under Replaced sheets.`;
  }

  async function share() {
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

  async function loadDemo() {
    const done = await replaceWith(DEMO_SHEET, 'The demo', 'by the demo');
    if (done)
      announce(
        done,
        'Demo loaded: a hydrophone preamplifier and its line driver. Change any blue input.',
      );
  }

  fileInput.addEventListener('change', async () => {
    const file = fileInput.files?.[0];
    if (!file) return;
    fileInput.value = '';
    const done = await replaceWith(
      await store.readFile(file),
      `"${file.name}"`,
      `by the file "${file.name}"`,
    );
    if (done) announce(done, `Opened "${file.name}".`);
  });

  // A link pasted into the address bar of this tab changes only the fragment.
  window.addEventListener('hashchange', openLinkInPlace);

  const cameWithLink = /^#sheet=/.test(location.hash);
  await start();
  renderReplaced(replaced.list());
  grid.refresh();
  return { sheet, grid, cameWithLink };

  async function openLinkInPlace() {
    let text;
    try {
      text = await store.decodeFragment(location.hash);
    } catch (err) {
      dropFragment();
      note.textContent = `The link's sheet could not be read: ${err.message}. The sheet is as it was.`;
      onLink();
      return;
    }
    if (text === null) return;
    dropFragment();
    const done = await replaceWith(text, "The link's sheet", 'by a share link');
    if (done) announce(done, 'Opened the sheet from the link.');
    onLink();
  }

  /** Drop a sheet fragment from the address, so that a reload shows the autosave. */
  function dropFragment() {
    if (/^#sheet=/.test(location.hash))
      history.replaceState(null, '', location.href.replace(/#.*$/, ''));
  }

  /**
   * Start: a share link wins when the engine takes its sheet, and the autosave it
   * replaces joins the replaced sheets; a link that cannot be read or is refused
   * leaves the autosave on screen and in storage.
   */
  async function start() {
    let fromLink = null;
    const messages = [];
    try {
      fromLink = await store.decodeFragment(location.hash);
    } catch (err) {
      messages.push(`The link's sheet could not be read: ${err.message}.`);
    }
    dropFragment();
    let saved = null;
    try {
      saved = await store.recovered();
    } catch (err) {
      messages.push(`The sheet autosaved in this browser could not be read: ${err.message}.`);
    }
    await replaced.ready;
    if (fromLink !== null) {
      try {
        sheet.loadDocument(fromLink);
        const entry = saved ? await replaced.add(saved.text, 'by a share link') : null;
        await saveNow();
        announce({ entry }, 'Opened the sheet from the link.');
        return;
      } catch (err) {
        messages.push(`The link's sheet was not loaded: ${err.message}.`);
      }
    }
    if (saved) messages.push(await recover(saved, messages.length > 0));
    note.textContent = messages.join(' ');
  }

  /**
   * Load the autosave; the sentence that says so. One the engine refuses joins the
   * replaced sheets, so that the next edit's autosave does not take its only copy.
   */
  async function recover(saved, afterProblem) {
    try {
      sheet.loadDocument(saved.text);
    } catch (err) {
      await replaced.add(saved.text, 'when it could not be loaded on opening the page');
      return `The sheet autosaved in this browser was not loaded: ${err.message}. Its text is kept under Replaced sheets.`;
    }
    const recovered = afterProblem
      ? 'Your own sheet is shown as it was.'
      : 'Recovered your sheet from this browser.';
    return saved.behind
      ? `${recovered} Edits made after ${whenText(saved.behind.at)} could not be kept (the sheet was ${megabytes(saved.behind.bytes)}).`
      : recovered;
  }
}
