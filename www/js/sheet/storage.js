// Keeping the worksheet in this browser and in files: the autosave (plain, or
// packed when the plain text does not fit), the stored list of replaced sheets,
// save and open as a file (the engine's document format), CSV export and the share
// link. DOM-light: file pickers and downloads only.
//
// Local storage holds a few MB per origin (5 MiB of UTF-16 in Chromium and Firefox).
// A write that does not fit throws; every write here says whether it was kept, so
// that the page can tell the user instead of losing edits on the next reload.

import { encodeFragment, decodeFragment } from './share.js';
import { pack, unpack } from './pack.js';
import { downloadBlob } from '../dom.js';

export const AUTOSAVE_KEY = 'loopwright.sheet.autosave';
/** Set while the autosave is older than the sheet on screen: `{at, bytes}`. */
export const BEHIND_KEY = 'loopwright.sheet.autosave-behind';
/** The replaced sheets, newest first: `[{at, reason, cells, first, packed}]`. */
export const REPLACED_KEY = 'loopwright.sheet.replaced';
/** Where an earlier version kept the one sheet a share link replaced. */
export const LEGACY_BACKUP_KEY = 'loopwright.sheet.before-share-link';
/** Marks a stored document that is packed (./pack.js) rather than plain JSON. */
const PACKED_MARK = 'deflate-raw:';

/** Size of a text in bytes as UTF-8 (what a file of it would take). */
export function byteSize(text) {
  return new Blob([text]).size;
}

function isQuotaError(err) {
  return (
    err?.name === 'QuotaExceededError' ||
    err?.name === 'NS_ERROR_DOM_QUOTA_REACHED' ||
    err?.code === 22 ||
    err?.code === 1014
  );
}

/** Write one item: 'ok', 'full' (over the quota) or 'unavailable' (storage off). */
function put(key, value) {
  try {
    localStorage.setItem(key, value);
    return 'ok';
  } catch (err) {
    return isQuotaError(err) ? 'full' : 'unavailable';
  }
}

function get(key) {
  try {
    return localStorage.getItem(key);
  } catch {
    return null;
  }
}

function remove(key) {
  try {
    localStorage.removeItem(key);
  } catch {
    // storage off: nothing to remove
  }
}

/** A document as stored: plain when `packed` is false, else marked and packed. */
export async function storedForm(text, packed) {
  return packed ? PACKED_MARK + (await pack(text)) : text;
}

/** The document text of a stored form. Throws when a packed form is damaged. */
export async function fromStoredForm(stored) {
  if (!stored.startsWith(PACKED_MARK)) return stored;
  try {
    return await unpack(stored.slice(PACKED_MARK.length));
  } catch (err) {
    throw new Error(`the stored copy is damaged (${err.message})`);
  }
}

/**
 * Keep `text` as the autosave: plain if it fits, else packed; while the packed form
 * does not fit either, `makeRoom()` may free space (it returns false when it has
 * nothing left to free). Resolves to `{ok: true, bytes, packed}` or
 * `{ok: false, bytes, reason: 'full' | 'unavailable'}`; on failure the previous
 * autosave stays and is marked as behind the screen.
 */
export async function autosave(text, { makeRoom = () => false } = {}) {
  const bytes = byteSize(text);
  let outcome = put(AUTOSAVE_KEY, text);
  let packed = false;
  if (outcome === 'full') {
    packed = true;
    const form = await storedForm(text, true);
    outcome = put(AUTOSAVE_KEY, form);
    while (outcome === 'full' && makeRoom()) outcome = put(AUTOSAVE_KEY, form);
  }
  if (outcome === 'ok') {
    remove(BEHIND_KEY);
    return { ok: true, bytes, packed };
  }
  put(BEHIND_KEY, JSON.stringify({ at: Date.now(), bytes }));
  return { ok: false, bytes, reason: outcome };
}

/** A last, synchronous plain write (the page is being hidden): true when kept. */
export function autosaveNow(text) {
  return put(AUTOSAVE_KEY, text) === 'ok';
}

/**
 * The autosaved document, or null when there is none: `{text, behind}` where
 * `behind` is `{at, bytes}` when later edits could not be kept. Throws when the
 * stored copy is damaged.
 */
export async function recovered() {
  const stored = get(AUTOSAVE_KEY);
  if (stored === null) return null;
  let behind = null;
  try {
    behind = JSON.parse(get(BEHIND_KEY) ?? 'null');
  } catch {
    behind = null;
  }
  return { text: await fromStoredForm(stored), behind };
}

/** The stored list of replaced sheets (newest first); [] when none or unreadable. */
export function readReplaced() {
  let list;
  try {
    list = JSON.parse(get(REPLACED_KEY) ?? '[]');
  } catch {
    return [];
  }
  if (!Array.isArray(list)) return [];
  return list.filter(
    (e) =>
      e && typeof e.packed === 'string' && Number.isFinite(e.at) && typeof e.reason === 'string',
  );
}

/**
 * Store the list of replaced sheets (each `{at, reason, cells, first, packed}`,
 * newest first), newest first as far as they fit: one that does not fit beside the
 * newer ones is left out. Returns, for each entry, whether it is now stored.
 */
export function writeReplaced(list) {
  remove(REPLACED_KEY);
  const kept = [];
  const stored = list.map((entry) => {
    // A write that does not fit leaves the item as the last one that did.
    if (put(REPLACED_KEY, JSON.stringify([...kept, entry])) !== 'ok') return false;
    kept.push(entry);
    return true;
  });
  return stored;
}

/**
 * The sheet an earlier version kept aside before a share link, or null. It stays in
 * storage until `dropLegacyBackup()`: the caller drops it only once it is stored in
 * the replaced list, so a page closed in between does not lose it.
 */
export function readLegacyBackup() {
  return get(LEGACY_BACKUP_KEY);
}

/** Take the earlier version's kept sheet out of storage (it is stored elsewhere now). */
export function dropLegacyBackup() {
  remove(LEGACY_BACKUP_KEY);
}

export function download(text, name, type) {
  downloadBlob(new Blob([text], { type }), name);
}

export function saveFile(sheet) {
  download(sheet.saveDocument(), 'worksheet.loopwright.json', 'application/json');
}

/**
 * The values as CSV, UTF-8 with a byte-order mark: without it, common spreadsheet
 * programs read the file in a legacy code page and garble °, − and ≥.
 */
export function exportCsv(sheet) {
  download(`\uFEFF${sheet.toCsv()}`, 'worksheet.csv', 'text/csv;charset=utf-8');
}

/** Read a chosen file's text. */
export function readFile(file) {
  return file.text();
}

/** The page URL with the sheet in its fragment. */
export async function shareUrl(sheet) {
  const base = location.href.replace(/#.*$/, '');
  return `${base}#${await encodeFragment(sheet.saveDocument())}`;
}

export { decodeFragment };
