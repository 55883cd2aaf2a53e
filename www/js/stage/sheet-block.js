// A stage to the worksheet and back. To: a heading cell named `name` (the block's
// handle), under it one row per stage field — its name, its text as typed — and
// under those, formulas on the block's range (STAGE.MARGIN, STAGE.GAIN, STAGE.ZOUT,
// docs/worksheet.md), so the sheet recomputes when a cell of the block changes.
// Written only where every cell is empty (nothing in the sheet is overwritten: the
// block moves right to the first free place) and recorded in the worksheet's history as one step. Back: the rows under the named
// heading, read until the first empty name cell, by each cell's input text.

import { STAGE_KEYS } from './fields.js';

/** The column letters and row number of an A1 address. */
function split(address) {
  const m = /^([A-Z]+)(\d+)$/.exec(address.toUpperCase());
  if (!m) throw new Error(`"${address}" is not a cell address such as H1`);
  return [m[1], Number(m[2])];
}

/** The column after `col` (H → I, Z → AA). */
function nextColumn(col) {
  const letters = [...col];
  let i = letters.length - 1;
  while (i >= 0 && letters[i] === 'Z') letters[i--] = 'A';
  if (i < 0) return `A${letters.join('')}`;
  letters[i] = String.fromCharCode(letters[i].charCodeAt(0) + 1);
  return letters.join('');
}

/** The cells `toSheet` would write for `values` at `anchor`: [[address, input]]. */
export function blockCells(values, anchor, name) {
  const [col, row] = split(anchor);
  const col2 = nextColumn(col);
  const rows = STAGE_KEYS.filter((k) => String(values[k] ?? '').trim() !== '');
  const cells = [[`${col}${row}`, `stage ${name}`]];
  rows.forEach((k, i) => {
    cells.push([`${col}${row + 1 + i}`, k], [`${col2}${row + 1 + i}`, String(values[k])]);
  });
  const range = `${col}${row + 1}:${col2}${row + rows.length}`;
  const r0 = row + rows.length + 2;
  cells.push(
    [`${col}${r0}`, 'phase margin, crossover'],
    [`${col2}${r0}`, `=STAGE.MARGIN(${range})`],
    [`${col}${r0 + 2}`, 'gain at 1 kHz, phase'],
    [`${col2}${r0 + 2}`, `=STAGE.GAIN(${range}; 1 kHz)`],
    [`${col}${r0 + 4}`, 'Zout at 1 kHz, phase'],
    [`${col2}${r0 + 4}`, `=STAGE.ZOUT(${range}; 1 kHz)`],
  );
  return { cells, range, heading: `${col}${row}` };
}

/**
 * Write the stage `values` as a block at `anchor` named `name` in the worksheet
 * `ws` = {sheet, record(what), refresh()}, at the first place from `anchor` to the
 * right where every cell it needs is empty. Throws, writing nothing, when the name
 * is taken or no place is found.
 */
export function toSheet(ws, values, anchor, name) {
  if (ws.sheet.names()[name])
    throw new Error(
      `The worksheet already has the name "${name}"; choose another name for this block.`,
    );
  const [col0, row] = split(anchor);
  // From the first cell asked for, three columns to the right at a time, the first
  // place where every cell the block needs is empty.
  let col = col0;
  for (let tries = 0; tries < 40; tries++) {
    const { cells, range, heading } = blockCells(values, `${col}${row}`, name);
    // The formulas' results fill the cell to their right too (value, phase).
    const needed = cells.flatMap(([a, input]) => {
      if (!input.startsWith('=')) return [a];
      const [c, r] = split(a);
      return [a, `${nextColumn(c)}${r}`];
    });
    if (needed.every((a) => !ws.sheet.value(a).input)) {
      for (const [a, input] of cells) ws.sheet.setCell(a, input);
      ws.sheet.setName(name, heading);
      ws.record(`the stage as block ${name} at ${heading}`);
      ws.refresh();
      return { range, heading };
    }
    col = nextColumn(nextColumn(nextColumn(col)));
  }
  throw new Error(
    `No empty place for the block to the right of ${anchor}; choose another first cell.`,
  );
}

/**
 * The field texts of the block under the heading named `name`: `{values, range}`.
 * Unknown names in the block are refused (an Error naming the row).
 */
export function fromSheet(ws, name) {
  const heading = ws.sheet.names()[name];
  if (!heading) throw new Error(`The worksheet has no name "${name}".`);
  const [col, row] = split(heading);
  const col2 = nextColumn(col);
  const values = {};
  for (let r = row + 1; r < row + 1 + 64; r++) {
    const key = (ws.sheet.value(`${col}${r}`).input ?? '').trim();
    if (key === '') break;
    const known = STAGE_KEYS.find((k) => k.toLowerCase() === key.toLowerCase());
    if (!known)
      throw new Error(`${col}${r}: "${key}" is not a field of a stage (${STAGE_KEYS.join(', ')}).`);
    values[known] = ws.sheet.value(`${col2}${r}`).input ?? '';
  }
  return values;
}
