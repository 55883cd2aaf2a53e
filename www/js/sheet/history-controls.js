// The worksheet's undo and redo controls: two toolbar buttons that say what they
// would take back or do again, and the keys Ctrl/Cmd+Z (undo), Ctrl+Y and
// Shift+Ctrl/Cmd+Z (redo) anywhere in the worksheet except in a text field, where
// the field's own undo of its text applies. The history itself is history.js.

import { el } from '../dom.js';
import { createHistory } from './history.js';

const isTextField = (node) =>
  node instanceof HTMLInputElement || node instanceof HTMLTextAreaElement;

/** Which history step a key press asks for: 'undo', 'redo' or null. */
export function historyKey(e) {
  if (!(e.ctrlKey || e.metaKey) || e.altKey) return null;
  const key = e.key.toLowerCase();
  if (key === 'z') return e.shiftKey ? 'redo' : 'undo';
  if (key === 'y' && !e.shiftKey) return 'redo';
  return null;
}

/**
 * Add undo and redo to the worksheet panel `panel` = `{sheet, grid, note, autosave}`:
 * the buttons go at the start of `toolbar`, the keys are heard on `host`. Sets and
 * returns `panel.history`.
 */
export function mountHistoryControls(panel, { toolbar, host }) {
  const undoButton = el('button', {
    type: 'button',
    class: 'button',
    id: 'sheet-step-back',
    'aria-keyshortcuts': 'Control+Z Meta+Z',
  });
  const redoButton = el('button', {
    type: 'button',
    class: 'button',
    id: 'sheet-step-again',
    'aria-keyshortcuts': 'Control+Y Shift+Control+Z Shift+Meta+Z',
  });

  function showState() {
    const h = panel.history;
    undoButton.textContent = '↶ Undo';
    redoButton.textContent = '↷ Redo';
    undoButton.disabled = !h.canUndo;
    redoButton.disabled = !h.canRedo;
    undoButton.title = h.canUndo ? `Undo ${h.undoLabel}` : 'Nothing to undo';
    redoButton.title = h.canRedo ? `Redo ${h.redoLabel}` : 'Nothing to redo';
  }

  panel.history = createHistory(panel.sheet, {
    apply: () => {
      panel.grid.refresh();
      panel.autosave.soon();
    },
    onState: () => showState(),
  });

  function step(kind) {
    const h = panel.history;
    const label = kind === 'undo' ? h.undoLabel : h.redoLabel;
    const done = kind === 'undo' ? h.undo() : h.redo();
    if (done) panel.note.textContent = `${kind === 'undo' ? 'Undone' : 'Done again'}: ${label}.`;
    return done;
  }

  undoButton.addEventListener('click', () => step('undo'));
  redoButton.addEventListener('click', () => step('redo'));
  host.addEventListener('keydown', (e) => {
    const kind = historyKey(e);
    if (!kind || isTextField(e.target)) return;
    e.preventDefault();
    step(kind);
  });
  toolbar.prepend(undoButton, redoButton);
  showState();
  return panel.history;
}
