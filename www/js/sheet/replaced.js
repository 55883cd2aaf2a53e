// The sheets that loading a link, a file, the demo or an earlier sheet replaced:
// the last few, newest first, each with when and why, kept in memory for this page
// and in local storage (packed) for later visits, so that any of them can be put
// back. Restoring one replaces the sheet too, so the one it replaces joins the list.

import * as store from './storage.js';

/** How many replaced sheets are kept. */
export const REPLACED_KEPT = 5;

/** Characters of the first cell shown to tell replaced sheets apart. */
const PREVIEW_CHARS = 40;

/**
 * What tells a sheet document apart in the list: `{cells, first}`, the number of
 * cells and the start of the first cell's input; both null when the text is not a
 * readable document.
 */
export function describe(text) {
  try {
    const cells = JSON.parse(text)?.cells;
    if (!cells || typeof cells !== 'object') return { cells: null, first: null };
    const inputs = Object.values(cells).filter((v) => typeof v === 'string');
    const first = inputs[0] ?? null;
    return {
      cells: Object.keys(cells).length,
      first:
        first && first.length > PREVIEW_CHARS ? `${first.slice(0, PREVIEW_CHARS - 1)}…` : first,
    };
  } catch {
    return { cells: null, first: null };
  }
}

/**
 * The list of replaced sheets. Entries: `{at, reason, cells, first, packed, text,
 * stored}`
 * (`text` is filled when known; `stored` says whether a reload will still have it).
 */
export function createReplaced() {
  let entries = store.readReplaced().map((e) => ({ ...e, text: null, stored: true }));
  // What an earlier version kept aside joins the list; it leaves its old place only
  // once the list holds it in storage (packing it is asynchronous: a page closed or
  // reloaded meanwhile finds it where it was). Not stored for want of room, it stays
  // there too. An empty sheet, or one the list already has, is simply dropped.
  const legacy = store.readLegacyBackup();
  const ready =
    legacy === null
      ? null
      : add(legacy, 'kept before a share link (earlier version of the page)').then((entry) => {
          if (entry === null || entry.stored) store.dropLegacyBackup();
          return entry;
        });

  // How many entries may take storage: lowered when the autosave needs the room.
  let storable = REPLACED_KEPT;

  function persist() {
    const stored = store.writeReplaced(
      entries
        .slice(0, storable)
        .map(({ at, reason, cells, first, packed }) => ({ at, reason, cells, first, packed })),
    );
    entries.forEach((e, i) => {
      e.stored = stored[i] ?? false;
    });
  }

  /**
   * Keep `text` as replaced now because of `reason`. An empty sheet, or the same
   * document as the newest entry, is not kept. Resolves to the entry or null.
   */
  async function add(text, reason, at = Date.now()) {
    const { cells, first } = describe(text);
    if (cells === 0) return null;
    const packed = await store.storedForm(text, true);
    if (entries[0]?.packed === packed) return null;
    const entry = { at, reason, cells, first, packed, text, stored: false };
    entries = [entry, ...entries].slice(0, REPLACED_KEPT);
    storable = REPLACED_KEPT;
    persist();
    return entry;
  }

  return {
    /** Resolves when what an earlier version kept aside has joined the list. */
    ready: ready ?? Promise.resolve(null),
    add,
    /** The entries, newest first (a copy). */
    list() {
      return entries.slice();
    },
    /** The document text of an entry. Throws when its stored copy is damaged. */
    async text(entry) {
      entry.text ??= await store.fromStoredForm(entry.packed);
      return entry.text;
    },
    /**
     * Give the storage of the oldest stored entry to the autosave (the entry stays
     * in memory until the page is closed). False when none is stored.
     */
    unstoreOldest() {
      const oldest = entries.findLastIndex((e) => e.stored);
      if (oldest < 0) return false;
      storable = oldest;
      persist();
      return true;
    },
    /** Store what did not fit before (after the autosave shrank). True when more is stored. */
    storeAgain() {
      const count = () => entries.filter((e) => e.stored).length;
      if (entries.slice(0, storable).every((e) => e.stored)) return false;
      const before = count();
      persist();
      return count() > before;
    },
    /** Take an entry out of the list (it has been put back). */
    remove(entry) {
      entries = entries.filter((e) => e !== entry);
      persist();
    },
  };
}
