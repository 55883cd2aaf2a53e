// A small static file server for the page, bound to 127.0.0.1 only.
// Usage: node scripts/serve.mjs [root] [port]   (port 0 picks a free one)
// Prints "serving <url>" once listening. Used by `make serve` and the page tests.

import { createServer } from 'node:http';
import { readFile, stat } from 'node:fs/promises';
import { extname, join, normalize, resolve, sep } from 'node:path';

const TYPES = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.mjs': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.json': 'application/json',
  '.wasm': 'application/wasm',
  '.svg': 'image/svg+xml',
  '.png': 'image/png',
  '.ts': 'text/plain; charset=utf-8',
};

export function startServer(root, port = 0) {
  const base = resolve(root);
  const server = createServer(async (req, res) => {
    try {
      const path = decodeURIComponent(new URL(req.url, 'http://localhost').pathname);
      let file = normalize(join(base, path));
      if (file !== base && !file.startsWith(base + sep))
        throw Object.assign(new Error('outside root'), { status: 403 });
      if ((await stat(file)).isDirectory()) file = join(file, 'index.html');
      const body = await readFile(file);
      res.writeHead(200, {
        'content-type': TYPES[extname(file)] ?? 'application/octet-stream',
        'cache-control': 'no-store',
        'x-content-type-options': 'nosniff',
      });
      res.end(body);
    } catch (err) {
      res.writeHead(err.status ?? 404, { 'content-type': 'text/plain' });
      res.end(err.status === 403 ? 'forbidden' : 'not found');
    }
  });
  return new Promise((ok, fail) => {
    server.once('error', fail);
    server.listen(port, '127.0.0.1', () =>
      ok({ server, url: `http://127.0.0.1:${server.address().port}/` }),
    );
  });
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const root = process.argv[2] ?? 'www';
  const port = Number(process.argv[3] ?? process.env.PORT ?? 8080);
  const { url } = await startServer(root, port);
  console.log(`serving ${url}  (Ctrl-C to stop)`);
}
