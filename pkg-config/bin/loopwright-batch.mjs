#!/usr/bin/env node
// loopwright-batch: evaluate designs from a CSV file, row by row, streaming (bounded
// memory for any number of rows in CSV and JSON lines). The file goes to the core in
// chunks (`BatchRun`): it reads the CSV by RFC 4180, reads each value with the core's
// value reader, computes every number and writes the output. A workbook (.xlsx,
// .ods) is made from the output CSV by the spreadsheet-file module, loaded only
// then. This file only handles the command line, the files, the progress line and
// the exit status.

import { createReadStream, createWriteStream, writeFileSync } from 'node:fs';
import { once } from 'node:events';
import { BatchRun } from '../node.mjs';

const USAGE = `usage: loopwright-batch [options] designs.csv
Reads a CSV (RFC 4180) with a header row; each row is one design. Columns it knows
(any order, any case; other columns are copied to the output):
  feedback     topology, a, beta, target_gain, gain_error, zi, zo, a_min, a_max
  freq         a (gain at DC), beta, a_poles_hz (poles in Hz separated by blanks)
  stage        stage (a stage document, JSON), or kind with the stage's fields as
               columns: a0, gbw_hz, poles_hz, rd, ro, rf, rg, cf, rs, cs, rl, cl, riso, ...
  noise        noise_at_hz, f_low_hz, f_high_hz, signal_rms, temperature_k (300 K empty)
  distortion   a, beta, hd2, hd3 (open-loop fractions at amplitude), amplitude (peak out)
  network      series (E6 ... E192), resistor; network (non-inverting, inverting,
               divider), pair_target, total_min, total_max
  design       target_pm_deg (with a stage holding rf for Cf, cl for Riso)
  tolerance    rf_tol, rg_tol, cf_tol, rs_tol, cs_tol, rl_tol, cl_tol, riso_tol (% uniform),
               gain_at_hz with gain_min_db and/or gain_max_db, pm_min_deg (with a stage);
               tol_trials (1000 empty), tol_seed (1 empty); or in place of a stage:
               circuit (a circuit document, JSON, its elements' own tolerance), input,
               output (or output_element: an element's current), output_minus,
               controlled, amplifier_spread (JSON: {"gbwHz":{"min","typ","max"}} or
               by amplifier, {"U1":{"gbwHz":...},"U2":{...}})
Steps and what they write:
  stage       closed_loop_gain, loop_gain, feedback_amount, feedback_amount_db, sensitivity
  impedance   input_impedance, output_impedance
  inverse     beta_for_target, min_open_loop_gain
  spread      spread_percent, spread_ppm
  freq        freq_phase_margin_deg, freq_crossover_hz, freq_gain_margin_db,
              freq_stable, freq_bandwidth_hz, freq_peaking_db
  loop        phase_margin_deg, crossover_hz, gain_margin_db, closed_loop_stable, dc_gain
  noise       noise_density, noise_input_density, noise_rms, noise_input_rms,
              snr_db, largest_source, largest_share
  distortion  hd2_closed, hd3_closed, hd2_ratio, hd3_ratio
  eseries     standard_value, standard_error
  pair        r1, r2, pair_achieved, pair_error
  design      design_cf, design_cf_pm_deg, design_cf_at_range_end, design_riso,
              design_riso_pm_deg, design_riso_at_range_end
  tolerance   tol_gain_min_db, tol_gain_max_db, tol_pm_min_deg, tol_pm_max_deg (worst case),
              tol_yield, tol_gain_yield, tol_pm_yield (Monte Carlo, fixed seed)
Values are read as loopwright reads them everywhere: 4700, 4.7k, 4k7, 10m, 1e-3.
Writes "line" (the record's line in the input), the input columns, the results and
an "error" column naming the problem of a row that could not be computed; every row
is written. Text that a spreadsheet would run as a formula gets a ' in front.
  --compute LIST   the steps, comma-separated (default: all that the columns allow)
  --format F       csv, jsonl (one JSON object a line), xlsx or ods (a workbook; needs
                   -o); default: from the -o file's extension, else csv
  -o FILE          write to FILE instead of standard output
  --strict         exit with status 1 if any row was reported with an error
  --progress       print a progress line on standard error (on by default on a terminal)
  -h, --help       this text
Exit status: 0 done, 1 rows reported under --strict, 2 the file or the options refused.`;

const FORMATS = ['csv', 'jsonl', 'xlsx', 'ods'];

function parseArgs(argv) {
  const opts = {
    strict: false,
    progress: process.stderr.isTTY,
    out: null,
    compute: null,
    format: null,
    input: null,
  };
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === '--strict') opts.strict = true;
    else if (a === '--progress') opts.progress = true;
    else if (a === '-o') opts.out = argv[++i];
    else if (a === '--compute') opts.compute = argv[++i] ?? '';
    else if (a === '--format') opts.format = argv[++i] ?? '';
    else if (a === '-h' || a === '--help') {
      console.log(USAGE);
      process.exit(0);
    } else if (a.startsWith('-')) throw new Error(`unknown option ${a}`);
    else if (opts.input === null) opts.input = a;
    else throw new Error(`more than one input file: ${a}`);
  }
  if (opts.input === null) throw new Error('no input file');
  if (opts.out === undefined) throw new Error('-o needs a file name');
  if (opts.format === null) {
    const ext = opts.out?.match(/\.([a-z]+)$/i)?.[1].toLowerCase();
    opts.format = FORMATS.includes(ext) ? ext : 'csv';
  }
  if (!FORMATS.includes(opts.format)) {
    throw new Error(`--format must be one of ${FORMATS.join(', ')}, not "${opts.format}"`);
  }
  const workbook = opts.format === 'xlsx' || opts.format === 'ods';
  if (workbook && !opts.out) throw new Error(`--format ${opts.format} needs -o FILE`);
  return { ...opts, workbook };
}

function summary(run) {
  return `${run.rowsIn} rows in, ${run.rowsWritten} written with results, ${run.rowsReported} reported with an error`;
}

async function main() {
  let opts;
  let run;
  try {
    opts = parseArgs(process.argv.slice(2));
    run = new BatchRun(opts.compute ?? undefined, opts.format === 'jsonl' ? 'jsonl' : 'csv');
  } catch (err) {
    console.error(`loopwright-batch: ${err.message}\n${USAGE}`);
    process.exit(2);
  }
  // A workbook is written at the end from the whole CSV; the others as they come.
  const kept = [];
  const out = opts.workbook ? null : opts.out ? createWriteStream(opts.out) : process.stdout;
  const write = async (text) => {
    if (!text) return;
    if (opts.workbook) kept.push(text);
    else if (!out.write(text)) await once(out, 'drain');
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
  if (opts.workbook) {
    const { tableFile, MAX_FILE_BYTES } = await import('../sheetfiles.mjs');
    const text = kept.join('');
    if (text.length > MAX_FILE_BYTES) {
      throw new Error(
        `the results (${text.length} characters of CSV) are over the workbook limit of ${MAX_FILE_BYTES}: write csv or jsonl for a file this large`,
      );
    }
    const bytes = tableFile(text, opts.format, 'loopwright-batch results');
    writeFileSync(opts.out, bytes);
  } else if (opts.out) {
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
