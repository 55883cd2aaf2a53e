// Replacing the worksheet's sheet so that nothing is lost: the new document first
// succeeds on the engine (which leaves the sheet as it was when it refuses one), and
// only then does the sheet it replaced join the replaced sheets, with an undo in
// the message; putting an earlier sheet back is a replacement too.

import { el } from '../dom.js';
import { whenText } from './replaced-view.js';

/**
 * The replacing actions over `panel` = `{sheet, grid, note, replaced, showReplaced,
 * autosave, history}` (`showReplaced()` redraws the list; a load is one step of
 * `history`, so it can be undone there too). Returns `{replaceWith, announce}`.
 */
export function createReplacing(panel) {
  const { sheet, grid, note, replaced, showReplaced, autosave } = panel;

  /**
   * Replace the sheet with `text`; on success keep the sheet it replaced (unless
   * empty) as replaced `reason`. Resolves to `{entry}` on success (entry null when
   * nothing was kept), null when the engine refused the document: then the sheet,
   * the screen and the storage are unchanged and `note` says "`what` was not loaded".
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
    panel.history?.record(`loading ${what.replace(/^The /, 'the ')}`);
    const entry = await replaced.add(before, reason);
    showReplaced();
    await autosave.now({ retryReplaced: true });
    return { entry };
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
    showReplaced();
    note.textContent = `The sheet replaced ${whenText(entry.at)} is back. The one it replaced is under Replaced sheets.`;
  }

  /** Show `message`, with the undo of the replacement that `done` reports. */
  function announce(done, message) {
    note.textContent = message;
    if (done.entry)
      note.append(
        ' ',
        el(
          'button',
          {
            type: 'button',
            class: 'button',
            id: 'sheet-undo',
            onclick: () => restore(done.entry),
          },
          'Undo: put back the sheet it replaced',
        ),
      );
  }

  return { replaceWith, announce, restore };
}
