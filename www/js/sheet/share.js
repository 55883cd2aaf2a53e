// Carrying a sheet document in a URL fragment: deflate (the browser's own
// CompressionStream) and base64url. Pure functions over strings; no DOM.

const PREFIX = 'sheet=';

function toBase64Url(bytes) {
  let bin = '';
  for (let i = 0; i < bytes.length; i += 0x8000)
    bin += String.fromCharCode(...bytes.subarray(i, i + 0x8000));
  return btoa(bin).replace(/\+/g, '-').replace(/\//g, '_').replace(/=+$/, '');
}

function fromBase64Url(text) {
  const b64 = text.replace(/-/g, '+').replace(/_/g, '/');
  const bin = atob(b64 + '='.repeat((4 - (b64.length % 4)) % 4));
  const bytes = new Uint8Array(bin.length);
  for (let i = 0; i < bin.length; i++) bytes[i] = bin.charCodeAt(i);
  return bytes;
}

async function pipe(bytes, stream) {
  const out = new Response(new Blob([bytes]).stream().pipeThrough(stream));
  return new Uint8Array(await out.arrayBuffer());
}

/** Document text → "sheet=<deflated, base64url>". */
export async function encodeFragment(documentText) {
  const packed = await pipe(
    new TextEncoder().encode(documentText),
    new CompressionStream('deflate-raw'),
  );
  return PREFIX + toBase64Url(packed);
}

/** A location.hash ("#sheet=…") → document text, or null when it carries no sheet. Throws on a damaged link. */
export async function decodeFragment(hash) {
  const body = String(hash ?? '').replace(/^#/, '');
  if (!body.startsWith(PREFIX)) return null;
  let bytes;
  try {
    bytes = fromBase64Url(body.slice(PREFIX.length));
  } catch {
    throw new Error('the share link is damaged (not base64url)');
  }
  try {
    return new TextDecoder('utf-8', { fatal: true }).decode(
      await pipe(bytes, new DecompressionStream('deflate-raw')),
    );
  } catch {
    throw new Error('the share link is damaged (it does not decompress)');
  }
}
