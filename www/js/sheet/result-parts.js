// Names of the parts of a result that fans out into neighbouring cells, taken
// from the engine's function catalog (each entry's `spill` list: what each column
// holds, left to right; a result over several rows has one row per candidate,
// pole or item). The page only looks the name up: it computes nothing.

import { parseAddress } from './address.js';

/** `=NAME(` at the start of a formula: the function whose results fan out. */
const CALL = /^\s*=\s*([A-Za-z][A-Za-z0-9_.]*)\s*\(/;

/**
 * The function a formula is a call of, when the whole formula is one call
 * (`=NETWORK.PAIR(…)`, not `=2*NETWORK.PAIR(…)`, whose parts may mean something
 * else). Upper case, or null.
 */
export function calledFunction(input) {
  const m = CALL.exec(input ?? '');
  if (!m) return null;
  let depth = 0;
  let quoted = false;
  const body = input.trim();
  for (let i = body.indexOf('('); i < body.length; i++) {
    const ch = body[i];
    if (ch === '"') quoted = !quoted;
    else if (quoted) continue;
    else if (ch === '(') depth += 1;
    else if (ch === ')') {
      depth -= 1;
      if (depth === 0) return i === body.length - 1 ? m[1].toUpperCase() : null;
    }
  }
  return null;
}

/**
 * A lookup of part names over the catalog (the parsed functionCatalog() JSON).
 * `partOf(sheet, v)` for the engine's value `v` of a cell that a result fans out
 * into (or of the formula's own cell) returns `{name, label, row, rows}`: the
 * function, the catalog's name of the part, the row (1-based) and the number of
 * rows; null when the result's parts have no names in the catalog.
 */
export function createPartNames(catalog) {
  const parts = new Map(catalog.functions.map((f) => [f.name.toUpperCase(), f.spill ?? []]));

  function partOf(sheet, v) {
    const anchor = v.spill ? v.address : v.spilledFrom;
    if (!anchor) return null;
    const name = calledFunction(sheet.input(anchor));
    const labels = name ? parts.get(name) : null;
    if (!labels?.length) return null;
    const from = parseAddress(anchor);
    const here = parseAddress(v.address);
    const range = sheet.value(anchor).spill;
    if (!from || !here || !range) return null;
    const [, last] = range.split(':');
    const end = parseAddress(last ?? range);
    const label = labels[here.col - from.col];
    if (label === undefined || !end) return null;
    return { name, label, row: here.row - from.row + 1, rows: end.row - from.row + 1 };
  }

  return { partOf };
}

/** The caption of a part: "Af at a_min", or "Q (row 2 of 3)" for one of several rows. */
export function partCaption(part) {
  return part.rows > 1 ? `${part.label} (row ${part.row} of ${part.rows})` : part.label;
}
