#!/usr/bin/env node
// loopwright-batch: evaluate feedback-stage designs from a CSV file, row by row,
// streaming (bounded memory for any number of rows). Each bad row gets an entry in
// the `error` column and the run goes on; `--strict` makes the exit status 1 when
// any row failed.

import { createReadStream, createWriteStream } from 'node:fs';
import { createInterface } from 'node:readline';
import { once } from 'node:events';
import * as lw from '../node.mjs';

const USAGE = `usage: loopwright-batch [options] designs.csv
Reads a CSV with a header row. Columns it knows (any order, case-insensitive):
  topology, a, beta, target_gain, gain_error, zi, zo, a_min, a_max
Writes the input columns, then the results, then an "error" column.
  --compute LIST   what to compute: stage,impedance,inverse,spread (default: all that
                   the columns allow)
  -o FILE          write to FILE instead of standard output
  --strict         exit with status 1 if any row had an error
  --progress       print a progress line on standard error (on by default on a terminal)
  -h, --help       this text`;

const STEPS = {
  stage: {
    needs: ['a', 'beta'],
    columns: [
      'closed_loop_gain',
      'loop_gain',
      'feedback_amount',
      'feedback_amount_db',
      'sensitivity',
    ],
    run: (v) => {
      const s = lw.summarizeFeedback(v.topology ?? 'series-shunt', v.a, v.beta);
      return [s.closedLoopGain, s.loopGain, s.feedbackAmount, s.feedbackAmountDb, s.sensitivity];
    },
  },
  impedance: {
    needs: ['a', 'beta', 'zi', 'zo'],
    columns: ['input_impedance', 'output_impedance'],
    run: (v) => {
      const z = lw.impedancesWithFeedback({
        topology: v.topology ?? 'series-shunt',
        ziRe: v.zi,
        zoRe: v.zo,
        aRe: v.a,
        betaRe: v.beta,
      });
      return [z.input.re, z.output.re];
    },
  },
  inverse: {
    needs: ['a', 'target_gain'],
    columns: ['beta_for_target', 'min_open_loop_gain'],
    run: (v) => {
      const beta = lw.betaForGain(v.a, v.target_gain);
      const aMin =
        v.gain_error === undefined ? '' : lw.minOpenLoopGain(1 / v.target_gain, v.gain_error);
      return [beta, aMin];
    },
  },
  spread: {
    needs: ['beta', 'a_min', 'a_max'],
    columns: ['spread_percent', 'spread_ppm'],
    run: (v) => {
      const s = lw.gainSpread(v.beta, v.a_min, v.a ?? Math.sqrt(v.a_min * v.a_max), v.a_max);
      return [s.spreadPercent, s.spreadPpm];
    },
  },
};

const NUMERIC = new Set(['a', 'beta', 'target_gain', 'gain_error', 'zi', 'zo', 'a_min', 'a_max']);

/** Split one CSV record (RFC 4180 quoting) into fields. */
export function splitCsv(line) {
  const fields = [];
  let field = '';
  let quoted = false;
  for (let i = 0; i < line.length; i++) {
    const c = line[i];
    if (quoted) {
      if (c === '"' && line[i + 1] === '"') {
        field += '"';
        i++;
      } else if (c === '"') quoted = false;
      else field += c;
    } else if (c === '"') quoted = true;
    else if (c === ',') {
      fields.push(field);
      field = '';
    } else field += c;
  }
  fields.push(field);
  return fields;
}

/** Quote a field when it holds a comma, a quote or a line break. */
export function csvField(value) {
  const s =
    typeof value === 'number' ? (Number.isFinite(value) ? String(value) : '') : String(value ?? '');
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

function parseArgs(argv) {
  const opts = {
    strict: false,
    progress: process.stderr.isTTY,
    out: null,
    compute: null,
    input: null,
  };
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === '--strict') opts.strict = true;
    else if (a === '--progress') opts.progress = true;
    else if (a === '-o') opts.out = argv[++i];
    else if (a === '--compute')
      opts.compute = (argv[++i] ?? '')
        .split(',')
        .map((s) => s.trim())
        .filter(Boolean);
    else if (a === '-h' || a === '--help') {
      console.log(USAGE);
      process.exit(0);
    } else if (a.startsWith('-')) throw new Error(`unknown option ${a}`);
    else if (opts.input === null) opts.input = a;
    else throw new Error(`more than one input file: ${a}`);
  }
  if (opts.input === null) throw new Error('no input file');
  for (const step of opts.compute ?? [])
    if (!(step in STEPS))
      throw new Error(`unknown --compute step "${step}"; known: ${Object.keys(STEPS).join(', ')}`);
  return opts;
}

async function main() {
  let opts;
  try {
    opts = parseArgs(process.argv.slice(2));
  } catch (err) {
    console.error(`loopwright-batch: ${err.message}\n${USAGE}`);
    process.exit(2);
  }
  const out = opts.out ? createWriteStream(opts.out) : process.stdout;
  const write = async (text) => {
    if (!out.write(text)) await once(out, 'drain');
  };
  const lines = createInterface({ input: createReadStream(opts.input), crlfDelay: Infinity });

  let header = null;
  let steps = [];
  let rowNumber = 0;
  let errors = 0;
  let pending = '';
  for await (const raw of lines) {
    // A quoted field may hold a line break: keep reading until the quotes balance.
    pending = pending ? `${pending}\n${raw}` : raw;
    if ((pending.match(/"/g)?.length ?? 0) % 2 === 1) continue;
    const line = pending;
    pending = '';
    if (header === null) {
      header = splitCsv(line).map((h) => h.trim().toLowerCase());
      const have = new Set(header);
      const chosen =
        opts.compute ?? Object.keys(STEPS).filter((k) => STEPS[k].needs.every((n) => have.has(n)));
      for (const k of chosen) {
        const missing = STEPS[k].needs.filter((n) => !have.has(n));
        if (missing.length) {
          console.error(
            `loopwright-batch: --compute ${k} needs the column(s) ${missing.join(', ')}`,
          );
          process.exit(2);
        }
      }
      steps = chosen.map((k) => STEPS[k]);
      await write(
        `row,${header.map(csvField).join(',')},${steps.flatMap((s) => s.columns).join(',')},error\n`,
      );
      continue;
    }
    if (line.trim() === '') continue;
    rowNumber++;
    const fields = splitCsv(line);
    const results = steps.map((s) => s.columns.map(() => ''));
    let error = '';
    try {
      if (fields.length !== header.length)
        throw new Error(`row has ${fields.length} fields, the header has ${header.length}`);
      const values = {};
      header.forEach((name, i) => {
        const text = fields[i].trim();
        if (text === '') return;
        if (!NUMERIC.has(name)) {
          values[name] = text;
          return;
        }
        const x = Number(text);
        if (!Number.isFinite(x))
          throw Object.assign(new Error(`"${text}" is not a number`), { param: name });
        values[name] = x;
      });
      steps.forEach((s, i) => {
        results[i] = s.run(values);
      });
    } catch (err) {
      errors++;
      error = err.param
        ? `${err.code ?? 'bad_value'} ${err.param}: ${err.message.replace(/^\S+: /, '')}`
        : err.message;
    }
    await write(
      `${rowNumber},${fields.map(csvField).join(',')},${results.flat().map(csvField).join(',')},${csvField(error)}\n`,
    );
    if (opts.progress && rowNumber % 10000 === 0)
      process.stderr.write(`loopwright-batch: ${rowNumber} rows, ${errors} with errors\r`);
  }
  if (opts.progress)
    process.stderr.write(`loopwright-batch: ${rowNumber} rows, ${errors} with errors\n`);
  if (opts.out) {
    out.end();
    await once(out, 'finish');
  }
  process.exitCode = opts.strict && errors > 0 ? 1 : 0;
}

if (
  import.meta.url === `file://${process.argv[1]}` ||
  process.argv[1]?.endsWith('loopwright-batch')
) {
  main().catch((err) => {
    console.error(`loopwright-batch: ${err.message}`);
    process.exit(2);
  });
}
