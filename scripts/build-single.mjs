// Builds dist/loopwright.html: the page as one self-contained file, with the
// scripts bundled (esbuild), the CSS and the wasm inlined, and a content security
// policy that allows exactly the inlined script and style by their SHA-256 hashes
// (no 'unsafe-inline', no 'unsafe-eval'; 'wasm-unsafe-eval' for the core).
// Needs www/pkg (scripts/build-wasm.sh) and the npm packages of tests/js.
// Usage: node scripts/build-single.mjs

import { readFileSync, writeFileSync, mkdirSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { gzipSync } from 'node:zlib';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const require = createRequire(join(root, 'tests', 'js', 'package.json'));
const esbuild = require('esbuild');

// Both core modules: the lite one, decoded at once for the first view, and the full
// one, decoded only when the worksheet, the Stage view or the loaded-stage card first
// needs it.
const wasm = {
  lite: readFileSync(join(root, 'www', 'pkg', 'lite', 'loopwright_bg.wasm')),
  full: readFileSync(join(root, 'www', 'pkg', 'loopwright_bg.wasm')),
};
// The spreadsheet-file module (.ods/.xlsx export and import), inlined as well so that
// the worksheet's file buttons work from file://: gzipped, base64, in a data block
// (<script type="application/octet-stream">, never run, so outside the CSP and
// outside the script the page parses at start), decoded on the first use only.
const sheetfilesWasm = readFileSync(join(root, 'www', 'pkg', 'sheetfiles', 'loopwright_bg.wasm'));
const sheetfilesGz = gzipSync(sheetfilesWasm, { level: 9 });

// The Stage view's tolerance worker (www/js/stage/tolerance-worker.js and the full
// core's glue), bundled on its own as a classic script: the page starts it from a
// Blob of this text (the CSP allows blob: workers only; a module worker from a Blob
// does not start from file://) and hands it the compiled full module, so the glue's
// import.meta (only read when no module is given) is never used.
const workerBundle = await esbuild.build({
  entryPoints: [join(root, 'www', 'js', 'stage', 'tolerance-worker.js')],
  bundle: true,
  format: 'iife',
  minify: true,
  write: false,
  legalComments: 'none',
  logLevel: 'error',
});
const workerText = workerBundle.outputFiles[0].text;

const inlineWasm = {
  name: 'inline-wasm',
  setup(build) {
    build.onResolve({ filter: /wasm-source\.js$/ }, () => ({
      path: 'wasm-source',
      namespace: 'inline-wasm',
    }));
    build.onLoad({ filter: /.*/, namespace: 'inline-wasm' }, () => ({
      contents: `const WASM_BASE64 = {
  lite: ${JSON.stringify(wasm.lite.toString('base64'))},
  full: ${JSON.stringify(wasm.full.toString('base64'))},
};
function decode(base64) {
  const text = atob(base64);
  const bytes = new Uint8Array(text.length);
  for (let i = 0; i < text.length; i++) bytes[i] = text.charCodeAt(i);
  return bytes;
}
export function wasmSource(name) {
  return decode(WASM_BASE64[name]);
}
export function toleranceWorkerSource() {
  return ${JSON.stringify(workerText)};
}
export async function sheetfilesSource() {
  const block = document.getElementById('loopwright-sheetfiles-wasm');
  const gz = new Blob([decode(block.textContent.trim())]);
  const wasm = gz.stream().pipeThrough(new DecompressionStream('gzip'));
  return new Uint8Array(await new Response(wasm).arrayBuffer());
}`,
      loader: 'js',
    }));
  },
};

const bundle = await esbuild.build({
  entryPoints: [join(root, 'www', 'js', 'main.js')],
  bundle: true,
  format: 'esm',
  minify: true,
  write: false,
  legalComments: 'none',
  plugins: [inlineWasm],
  logLevel: 'error',
});
// A literal "</script" inside the inlined module would end the element early.
const script = bundle.outputFiles[0].text.replace(/<\/script/gi, '<\\/script');
const style = readFileSync(join(root, 'www', 'css', 'style.css'), 'utf8');
const hash = (text) => `'sha256-${createHash('sha256').update(text, 'utf8').digest('base64')}'`;

let html = readFileSync(join(root, 'www', 'index.html'), 'utf8');
const replaceOnce = (from, to) => {
  if (!html.includes(from)) throw new Error(`build-single: index.html no longer contains ${from}`);
  html = html.replace(from, () => to);
};
const icon = readFileSync(join(root, 'www', 'favicon.svg')).toString('base64');
replaceOnce(
  '<link rel="icon" href="favicon.svg">',
  `<link rel="icon" href="data:image/svg+xml;base64,${icon}">`,
);
replaceOnce('<link rel="stylesheet" href="css/style.css">', `<style>${style}</style>`);
replaceOnce(
  '<script type="module" src="js/main.js"></script>',
  `<script type="module">${script}</script>`,
);
replaceOnce(
  '</body>',
  `<script type="application/octet-stream" id="loopwright-sheetfiles-wasm">${sheetfilesGz.toString('base64')}</script>\n</body>`,
);
html = html.replace(
  /<meta http-equiv="Content-Security-Policy" content="[^"]*">/,
  () =>
    `<meta http-equiv="Content-Security-Policy" content="default-src 'none'; script-src ${hash(script)} 'wasm-unsafe-eval'; worker-src blob:; style-src ${hash(style)}; img-src data:; object-src 'none'; base-uri 'none'; form-action 'none'">`,
);

mkdirSync(join(root, 'dist'), { recursive: true });
writeFileSync(join(root, 'dist', 'loopwright.html'), html);
console.error(
  `build-single: dist/loopwright.html ${Buffer.byteLength(html)} bytes (wasm ${wasm.lite.length} + ${wasm.full.length} bytes inlined, the tolerance worker's script ${Buffer.byteLength(workerText)} bytes, the spreadsheet-file wasm ${sheetfilesWasm.length} gzipped to ${sheetfilesGz.length})`,
);
