// Carrying a sheet document in a URL fragment: "sheet=" and the packed document
// (./pack.js). Pure functions over strings; no DOM.

import { pack, unpack } from './pack.js';

const PREFIX = 'sheet=';

/** Document text → "sheet=<deflated, base64url>". */
export async function encodeFragment(documentText) {
  return PREFIX + (await pack(documentText));
}

/** A location.hash ("#sheet=…") → document text, or null when it carries no sheet. Throws on a damaged link. */
export async function decodeFragment(hash) {
  const body = String(hash ?? '').replace(/^#/, '');
  if (!body.startsWith(PREFIX)) return null;
  try {
    return await unpack(body.slice(PREFIX.length));
  } catch (err) {
    throw new Error(`the share link is damaged (${err.message})`);
  }
}
