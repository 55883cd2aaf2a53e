// Undo and redo of the worksheet: one history of document states (the engine's
// saveDocument text: every cell input and every name), recorded after each change
// — typing, paste, clear, naming, a load, the demo, putting back a replaced sheet —
// and put back with loadDocument. Bounded twice: by the number of steps and by the
// characters all kept states hold; the oldest steps go first. Keeping whole states
// rather than commands makes every kind of change reversible by the same code, and
// the engine recomputes every value from the inputs it is given back.

/** Steps kept behind the current state. */
export const HISTORY_STEPS = 100;

/**
 * Characters all kept states may hold together (UTF-16 strings: about twice this in
 * bytes). The current state and the one before it are kept whatever their size,
 * so that the last change (a very large load, say) can always be undone.
 */
export const HISTORY_CHARS = 8_000_000;

/**
 * The history of `sheet` (the engine's Worksheet). `apply(text)` puts a state on
 * screen after the engine has loaded it (repaint, autosave). Returns
 * `{record(what), undo(), redo(), reset(), canUndo, canRedo, undoLabel, redoLabel}`.
 */
export function createHistory(sheet, { apply = () => {}, onState = () => {} } = {}) {
  // states[i] = {text, what}: `what` says which change led to that state.
  let states = [{ text: sheet.saveDocument(), what: 'the start' }];
  let at = 0;

  const size = () => states.reduce((n, s) => n + s.text.length, 0);

  function trim() {
    // The current state and the one before it always stay, whatever their size.
    while (states.length - 1 > HISTORY_STEPS || (size() > HISTORY_CHARS && at > 1)) {
      states.shift();
      at -= 1;
    }
  }

  /** After a change described by `what`: keep the new state (if it differs). */
  function record(what) {
    const text = sheet.saveDocument();
    if (text === states[at].text) return false;
    states = states.slice(0, at + 1);
    states.push({ text, what });
    at = states.length - 1;
    trim();
    onState();
    return true;
  }

  function go(to) {
    if (to < 0 || to >= states.length) return false;
    try {
      sheet.loadDocument(states[to].text);
    } catch {
      // A state the engine wrote itself is always readable; should it not be, the
      // sheet stays as it is and the step is not taken.
      return false;
    }
    at = to;
    apply(states[at].text);
    onState();
    return true;
  }

  return {
    record,
    /** Step back; false when there is nothing to undo. */
    undo: () => go(at - 1),
    /** Step forward again; false when there is nothing to redo. */
    redo: () => go(at + 1),
    /** Start the history at the sheet as it is now (after the sheet first opens). */
    reset() {
      states = [{ text: sheet.saveDocument(), what: 'the start' }];
      at = 0;
      onState();
    },
    get canUndo() {
      return at > 0;
    },
    get canRedo() {
      return at < states.length - 1;
    },
    /** What undo would take back, e.g. "typing in B3". */
    get undoLabel() {
      return at > 0 ? states[at].what : null;
    },
    /** What redo would do again. */
    get redoLabel() {
      return at < states.length - 1 ? states[at + 1].what : null;
    },
    /** Steps and characters kept (for tests and the bound). */
    get kept() {
      return { steps: states.length, chars: size() };
    },
  };
}
