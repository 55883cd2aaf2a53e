#!/usr/bin/env node
// loopwright-batch: evaluate feedback-stage designs from a CSV file, row by row,
// streaming (bounded memory for any number of rows). The file goes to the core in
// chunks (`BatchRun`): it reads the CSV by RFC 4180, reads each value with the core's
// value reader, computes every number and writes the output CSV. This file only
// handles the command line, the files, the progress line and the exit status.

import { createReadStream, createWriteStream } from 'node:fs';
import { once } from 'node:events';
import { BatchRun } from '../node.mjs';

const USAGE = `usage: loopwright-batch [options] designs.csv
Reads a CSV (RFC 4180) with a header row. Columns it knows (any order, any case):
  topology, a, beta, target_gain, gain_error, zi, zo, a_min, a_max
Values are read as loopwright reads them everywhere: 4700, 4.7k, 4k7, 10m, 1e-3.
Writes "line" (the record's line in the input), the input columns, the results and
an "error" column; text that a spreadsheet would run as a formula gets a ' in front.
  --compute LIST   what to compute: stage,impedance,inverse,spread (default: all that
                   the columns allow)
  -o FILE          write to FILE instead of standard output
  --strict         exit with status 1 if any row was reported with an error
  --progress       print a progress line on standard error (on by default on a terminal)
  -h, --help       this text
Exit status: 0 done, 1 rows reported under --strict, 2 the file or the options refused.`;

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
    else if (a === '--compute') opts.compute = argv[++i] ?? '';
    else if (a === '-h' || a === '--help') {
      console.log(USAGE);
      process.exit(0);
    } else if (a.startsWith('-')) throw new Error(`unknown option ${a}`);
    else if (opts.input === null) opts.input = a;
    else throw new Error(`more than one input file: ${a}`);
  }
  if (opts.input === null) throw new Error('no input file');
  if (opts.out === undefined) throw new Error('-o needs a file name');
  return opts;
}

function summary(run) {
  return `${run.rowsIn} rows in, ${run.rowsWritten} written with results, ${run.rowsReported} reported with an error`;
}

async function main() {
  let opts;
  let run;
  try {
    opts = parseArgs(process.argv.slice(2));
    run = new BatchRun(opts.compute ?? undefined);
  } catch (err) {
    console.error(`loopwright-batch: ${err.message}\n${USAGE}`);
    process.exit(2);
  }
  const out = opts.out ? createWriteStream(opts.out) : process.stdout;
  const write = async (text) => {
    if (text && !out.write(text)) await once(out, 'drain');
  };
  let shown = 0;
  for await (const chunk of createReadStream(opts.input)) {
    await write(run.feed(chunk));
    if (opts.progress && run.rowsIn - shown >= 10000) {
      shown = run.rowsIn;
      process.stderr.write(`loopwright-batch: ${summary(run)}\r`);
    }
  }
  await write(run.finish());
  if (opts.out) {
    out.end();
    await once(out, 'finish');
  }
  process.stderr.write(`loopwright-batch: ${summary(run)}\n`);
  process.exitCode = opts.strict && run.rowsReported > 0 ? 1 : 0;
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
