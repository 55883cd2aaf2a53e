// `make bench`: loopwright against the peers a user would use instead, in one run.
// Prints a Markdown table (median times, ratios, machine) and writes it to
// bench/RESULTS.md. `--quick` runs every case briefly (used by `make test` so the
// benches cannot rot) and writes nothing. Figures only; nothing here asserts a time.

import { execFileSync } from 'node:child_process';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { gzipSync } from 'node:zlib';
import { cpus, totalmem, platform, release } from 'node:os';
import { join, dirname } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { timeInterleaved, formatNs } from './harness.mjs';
import { CASES } from './cases.mjs';
import { coldStarts } from './first-load.mjs';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const quick = process.argv.includes('--quick');
const lw = await import(pathToFileURL(join(root, 'pkg', 'node.mjs')).href);

function pythonPeers() {
  const venv =
    process.env.LOOPWRIGHT_VENV ?? join(process.env.HOME ?? '', '.cache', 'loopwright', 'venv');
  const py = join(venv, 'bin', 'python');
  if (!existsSync(py)) return { error: 'reference venv missing (run scripts/setup.sh)' };
  try {
    const out = execFileSync(py, [join(root, 'bench', 'peers.py'), ...(quick ? ['--quick'] : [])], {
      encoding: 'utf8',
      // Let numpy use its own best kernel for a fair peer (see the env notes in DEVELOPERS.md).
      env: { ...process.env, OPENBLAS_CORETYPE: '', OPENBLAS_L2_SIZE: '' },
    });
    return JSON.parse(out);
  } catch (err) {
    return { error: `bench/peers.py failed: ${err.message.split('\n')[0]}` };
  }
}

function sizes() {
  const wasm = (...dir) => readFileSync(join(root, 'pkg', 'web', ...dir, 'loopwright_bg.wasm'));
  const row = (name, bytes, target) => [
    name,
    bytes.length,
    gzipSync(bytes, { level: 9 }).length,
    target,
  ];
  const rows = [
    row(
      'wasm, lite module (feedback, freq, network, distortion, noise; embedded panel, loopwright/lite)',
      wasm('lite'),
      '< 150 KB gzipped',
    ),
    row('wasm, full module (+ circuit solver and worksheet; the page, loopwright)', wasm(), ''),
  ];
  const single = join(root, 'dist', 'loopwright.html');
  if (existsSync(single)) {
    const html = readFileSync(single);
    rows.push(['single-file page', html.length, gzipSync(html, { level: 9 }).length, '']);
  }
  return rows;
}

async function coldStart() {
  const times = await coldStarts(undefined, quick ? 2 : 7);
  if (!times) return null;
  return times[Math.floor(times.length / 2)];
}

const python = pythonPeers();
const lines = [];
const say = (s = '') => {
  lines.push(s);
  console.log(s);
};

say(`## Benchmarks${quick ? ' (quick mode: too short to trust)' : ''}`);
say();
say(
  `Machine: ${cpus().length} × ${cpus()[0]?.model ?? 'unknown CPU'}, ${(totalmem() / 2 ** 30).toFixed(0)} GiB, ${platform()} ${release()}, Node ${process.version}.`,
);
say(
  'Median of repeated samples on a noisy shared machine: read the ratios, not the absolute times.',
);
say();
say('| area | case | loopwright (wasm, Node) | peer | peer time | loopwright ÷ peer | target |');
say('|---|---|---|---|---|---|---|');
for (const c of CASES) {
  const options = { quick, ...(c.heavy ? { minSampleMs: 1, samples: quick ? 1 : 7 } : {}) };
  // loopwright and its plain-JS peer are sampled in turn, so that their ratio is not
  // skewed by the machine's load changing between the two.
  const [ours, plain] = timeInterleaved(
    c.plainJs ? [c.make(lw), c.plainJs()] : [c.make(lw)],
    options,
  );
  const peers = [];
  if (c.plainJs) peers.push(['plain JS', plain]);
  if (c.python) {
    const p = python[c.pythonKey ?? c.key];
    peers.push([c.pythonLabel ?? 'numpy/python', typeof p === 'number' ? p : NaN]);
  }
  if (peers.length === 0) peers.push(['—', NaN]);
  for (const [name, t] of peers) {
    const ratio = Number.isFinite(t) ? (ours / t).toFixed(2) : '—';
    say(
      `| ${c.area} | ${c.what} | ${formatNs(ours)} | ${name} | ${formatNs(t)} | ${ratio} | ${c.target} |`,
    );
  }
}
if (python.error) say(`\nPython peers not run: ${python.error}`);
say();
say('| artifact | bytes | gzipped | target |');
say('|---|---|---|---|');
for (const [name, raw, gz, target] of sizes()) say(`| ${name} | ${raw} | ${gz} | ${target} |`);
const cold = await coldStart();
if (cold !== null) {
  say();
  say(
    `Cold start of dist/loopwright.html in headless Chromium to the first computed result: ${cold.toFixed(0)} ms (median; target < 300 ms).`,
  );
}
if (!quick) writeFileSync(join(root, 'bench', 'RESULTS.md'), `${lines.join('\n')}\n`);
