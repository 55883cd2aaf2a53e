// The worksheet's autosave: a write soon after each edit, one at once after a load,
// writes one after another (so that a slow packed write never lands after a newer
// one), a last plain write when the page is hidden, and a warning with "Save to a
// file" for as long as the sheet on screen is not kept in this browser.

import { clear, el } from '../dom.js';
import * as store from './storage.js';

/** Delay between the last edit and its autosave, ms. */
const AUTOSAVE_DELAY_MS = 300;

/** "6.2 MB" */
export const megabytes = (bytes) => `${(bytes / 1e6).toFixed(1)} MB`;

/** What the warning says when an autosave was not kept. */
function unsavedText(outcome) {
  return outcome.reason === 'full'
    ? `Not kept in this browser: the sheet (${megabytes(outcome.bytes)}) does not fit in its storage, even compressed, so a reload would lose your latest edits. Save it to a file to keep it.`
    : 'Not kept in this browser: it does not let this page store anything here, so a reload would lose the sheet. Save it to a file to keep it.';
}

/**
 * The autosave of `sheet`. `host.dataset.autosave` tells the last outcome ('plain',
 * 'packed' or 'failed'); `warning` shows a failure. The sheet on screen comes before
 * the replaced sheets: when it does not fit, `replaced` (replaced.js) gives up the
 * storage of its oldest entries, and after a load it stores again what now fits;
 * `onReplacedStored()` follows either. Returns `{soon, now}`; `now()` resolves to
 * the outcome of `store.autosave`.
 */
export function createAutosave(sheet, { host, warning, replaced, onReplacedStored }) {
  let timer = null;
  let writing = Promise.resolve();

  function show(outcome) {
    host.dataset.autosave = outcome.ok ? (outcome.packed ? 'packed' : 'plain') : 'failed';
    clear(warning);
    warning.hidden = outcome.ok;
    if (!outcome.ok)
      warning.append(
        unsavedText(outcome),
        ' ',
        el(
          'button',
          {
            type: 'button',
            class: 'button',
            id: 'sheet-warning-save',
            onclick: () => store.saveFile(sheet),
          },
          'Save to a file',
        ),
      );
    return outcome;
  }

  /** Write at once; `retryReplaced` after a load, when the autosave may have shrunk. */
  function now({ retryReplaced = false } = {}) {
    clearTimeout(timer);
    timer = null;
    let moved = false;
    const makeRoom = () => {
      const freed = replaced.unstoreOldest();
      moved ||= freed;
      return freed;
    };
    writing = writing
      .then(() => store.autosave(sheet.saveDocument(), { makeRoom }))
      .catch(() => ({ ok: false, bytes: 0, reason: 'unavailable' }))
      .then((outcome) => {
        if (outcome.ok && retryReplaced && !moved) moved = replaced.storeAgain();
        if (moved) onReplacedStored();
        return show(outcome);
      });
    return writing;
  }

  // The page is going away with an autosave pending: one last plain write.
  window.addEventListener('pagehide', () => {
    if (timer === null) return;
    clearTimeout(timer);
    timer = null;
    store.autosaveNow(sheet.saveDocument());
  });

  return {
    now,
    soon() {
      clearTimeout(timer);
      timer = setTimeout(() => now(), AUTOSAVE_DELAY_MS);
    },
  };
}
