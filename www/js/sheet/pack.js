// Packing a sheet document as text that is short and safe to carry anywhere a
// string goes (a URL fragment, local storage): deflate by the browser's own
// CompressionStream, then base64url. Pure functions over strings; no DOM.

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

/** Text → deflated (raw), base64url. */
export async function pack(text) {
  const packed = await pipe(new TextEncoder().encode(text), new CompressionStream('deflate-raw'));
  return toBase64Url(packed);
}

/**
 * The inverse of `pack`. Throws an Error whose message says what is wrong:
 * "it is not base64url" or "it does not decompress" (which includes text that is not UTF-8).
 */
export async function unpack(packed) {
  let bytes;
  try {
    bytes = fromBase64Url(packed);
  } catch {
    throw new Error('it is not base64url');
  }
  try {
    return new TextDecoder('utf-8', { fatal: true }).decode(
      await pipe(bytes, new DecompressionStream('deflate-raw')),
    );
  } catch {
    throw new Error('it does not decompress');
  }
}
