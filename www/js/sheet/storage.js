// Keeping the worksheet: autosave to this browser's local storage with recovery,
// save and open as a file (the engine's document format), CSV export, and the
// share link. DOM-light: file pickers and downloads only.

import { encodeFragment, decodeFragment } from './share.js';
import { downloadBlob } from '../dom.js';

export const AUTOSAVE_KEY = 'loopwright.sheet.autosave';
export const BACKUP_KEY = 'loopwright.sheet.before-share-link';

export function autosave(sheet) {
  try {
    localStorage.setItem(AUTOSAVE_KEY, sheet.saveDocument());
    return true;
  } catch {
    return false; // storage full or disabled (file:// in some browsers): keep working
  }
}

export function recovered() {
  try {
    return localStorage.getItem(AUTOSAVE_KEY);
  } catch {
    return null;
  }
}

/** Keep the current autosave aside before a share link replaces the sheet. */
export function backUpAutosave() {
  try {
    const current = localStorage.getItem(AUTOSAVE_KEY);
    if (current) localStorage.setItem(BACKUP_KEY, current);
    return current !== null;
  } catch {
    return false;
  }
}

export function backup() {
  try {
    return localStorage.getItem(BACKUP_KEY);
  } catch {
    return null;
  }
}

export function download(text, name, type) {
  downloadBlob(new Blob([text], { type }), name);
}

export function saveFile(sheet) {
  download(sheet.saveDocument(), 'worksheet.loopwright.json', 'application/json');
}

export function exportCsv(sheet) {
  download(sheet.toCsv(), 'worksheet.csv', 'text/csv');
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
