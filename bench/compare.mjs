// Each benchmark case of a base checkout (another worktree, its package built with
// `make package`) beside this checkout's, in the same run, their samples taken in
// turn so that the machine's load falls on both alike. Each side runs its own
// bench/cases.mjs against its own pkg/node.mjs, so a case keeps the call form of its
// version (positional at 0.1, options objects at 0.2) and does the same work.
// Prints a Markdown table; figures only, nothing here asserts a time.
//
//   node bench/compare.mjs /tmp/orig [--runs N] [--out FILE] [--cases KEY,KEY]
// `--runs N` repeats the whole interleaved measurement N times and reports, per
// case, the median of the per-run medians and the range of the per-run ratios (the
// noise a reader should allow for). `--cases` times only the cases of those keys.

import { execFileSync } from 'node:child_process';
import { writeFileSync } from 'node:fs';
import { cpus, loadavg, platform, release } from 'node:os';
import { join, dirname, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { timeInterleaved, formatNs } from './harness.mjs';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const args = process.argv.slice(2);
const flag = (name, fallback) => {
  const i = args.indexOf(name);
  return i >= 0 ? args[i + 1] : fallback;
};
const base = resolve(args[0] ?? '/tmp/orig');
const runs = Number(flag('--runs', '3'));
const out = flag('--out', null);
const only = flag('--cases', null)?.split(',');

const load = async (dir) => ({
  lw: await import(pathToFileURL(join(dir, 'pkg', 'node.mjs')).href),
  cases: (await import(pathToFileURL(join(dir, 'bench', 'cases.mjs')).href)).CASES,
});
const old = await load(base);
const now = await load(root);

const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const rows = [];
for (const c of now.cases) {
  if (only && !only.includes(c.key)) continue;
  const before = old.cases.find((o) => o.key === c.key);
  if (!before) {
    rows.push([c.area, c.what, NaN, NaN, [], 'new case']);
    continue;
  }
  const options = c.heavy ? { minSampleMs: 1, samples: 7 } : {};
  const fns = [before.make(old.lw), c.make(now.lw)];
  const pairs = [];
  for (let r = 0; r < runs; r++) pairs.push(timeInterleaved(fns, options));
  const a = median(pairs.map((p) => p[0]));
  const b = median(pairs.map((p) => p[1]));
  const ratios = pairs.map((p) => p[1] / p[0]);
  rows.push([c.area, c.what, a, b, ratios, '']);
}

const commit = (dir) => {
  try {
    return execFileSync('git', ['-C', dir, 'rev-parse', '--short', 'HEAD'], {
      encoding: 'utf8',
    }).trim();
  } catch {
    return 'unknown commit';
  }
};
const lines = [
  '## Benchmarks: base beside this checkout',
  '',
  `Produced by \`node bench/compare.mjs ${base} --runs ${runs}\` (\`make bench-compare\`), both packages built with \`make package\`.`,
  `Base: ${base} at ${commit(base)}; this: ${commit(root)} (plus any uncommitted changes).`,
  `Machine: ${cpus().length} × ${cpus()[0]?.model ?? 'CPU'}, ${platform()} ${release()}, Node ${process.version}, load average ${loadavg()[0].toFixed(1)} at the end of the run.`,
  `${runs} interleaved runs per case (each the median of its samples); time = median of the runs; ratio = this ÷ base, median and range over the runs.`,
  '',
  '| area | case | base | this | this ÷ base | range over runs |',
  '|---|---|---|---|---|---|',
];
for (const [area, what, a, b, ratios, note] of rows) {
  const r = ratios.length ? median(ratios).toFixed(2) : '—';
  const range = ratios.length
    ? `${Math.min(...ratios).toFixed(2)} … ${Math.max(...ratios).toFixed(2)}`
    : note;
  lines.push(`| ${area} | ${what} | ${formatNs(a)} | ${formatNs(b)} | ${r} | ${range} |`);
}
const text = `${lines.join('\n')}\n`;
process.stdout.write(text);
if (out) writeFileSync(out, text);
