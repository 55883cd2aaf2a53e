// How the worksheet opens: from a share link in the address (at start, or pasted
// into the open tab, which changes only the fragment), else from the autosave of
// this browser. A link that cannot be read or that the engine refuses leaves the
// autosave on screen and in storage; one that loads puts the autosave it replaces
// among the replaced sheets.

import * as store from './storage.js';
import { megabytes } from './autosave.js';
import { whenText } from './replaced-view.js';

const SHEET_FRAGMENT = /^#sheet=/;

/** Is there a share link's sheet in the address? */
export const hasSheetLink = () => SHEET_FRAGMENT.test(location.hash);

/** Drop a sheet fragment from the address, so that a reload shows the autosave. */
function dropFragment() {
  if (hasSheetLink()) history.replaceState(null, '', location.href.replace(/#.*$/, ''));
}

/**
 * Load the autosave; the sentence that says so. One the engine refuses joins the
 * replaced sheets, so that the next edit's autosave does not take its only copy.
 */
async function recover(panel, saved, afterProblem) {
  try {
    panel.sheet.loadDocument(saved.text);
  } catch (err) {
    await panel.replaced.add(saved.text, 'when it could not be loaded on opening the page');
    return `The sheet autosaved in this browser was not loaded: ${err.message}. Its text is kept under Replaced sheets.`;
  }
  const recovered = afterProblem
    ? 'Your own sheet is shown as it was.'
    : 'Recovered your sheet from this browser.';
  return saved.behind
    ? `${recovered} Edits made after ${whenText(saved.behind.at)} could not be kept (the sheet was ${megabytes(saved.behind.bytes)}).`
    : recovered;
}

/** The link's document and the autosave, each null when absent or unreadable. */
async function readSources(messages) {
  let fromLink = null;
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
  return { fromLink, saved };
}

/**
 * Open the sheet at start. `panel` = `{sheet, note, replaced, autosave, announce}`
 * (`announce` from replacing.js).
 */
export async function openAtStart(panel) {
  const messages = [];
  const { fromLink, saved } = await readSources(messages);
  await panel.replaced.ready;
  if (fromLink !== null) {
    let refusal = null;
    try {
      panel.sheet.loadDocument(fromLink);
    } catch (err) {
      refusal = err;
    }
    if (!refusal) {
      const entry = saved ? await panel.replaced.add(saved.text, 'by a share link') : null;
      await panel.autosave.now({ retryReplaced: true });
      panel.announce({ entry }, 'Opened the sheet from the link.');
      return;
    }
    messages.push(`The link's sheet was not loaded: ${refusal.message}.`);
  }
  if (saved) messages.push(await recover(panel, saved, messages.length > 0));
  panel.note.textContent = messages.join(' ');
}

/**
 * Open share links pasted into this tab's address bar, with `replaceWith` from
 * replacing.js; `onLink()` after each (opened or refused).
 */
export function watchLinks(panel, onLink) {
  window.addEventListener('hashchange', async () => {
    let text;
    try {
      text = await store.decodeFragment(location.hash);
    } catch (err) {
      dropFragment();
      panel.note.textContent = `The link's sheet could not be read: ${err.message}. The sheet is as it was.`;
      onLink();
      return;
    }
    if (text === null) return;
    dropFragment();
    const done = await panel.replaceWith(text, "The link's sheet", 'by a share link');
    if (done) panel.announce(done, 'Opened the sheet from the link.');
    onLink();
  });
}
