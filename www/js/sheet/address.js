// Pure helpers for cell addresses and rectangular selections. No DOM here.

export const COLS = 26;
export const ROWS = 200;

/** 0-based column and row → "B3". */
export function addressOf(col, row) {
  return `${String.fromCharCode(65 + col)}${row + 1}`;
}

/** "B3" → {col: 1, row: 2}, or null. */
export function parseAddress(text) {
  const m = /^([A-Z])([1-9]\d*)$/.exec(String(text).toUpperCase());
  if (!m) return null;
  const col = m[1].charCodeAt(0) - 65;
  const row = Number(m[2]) - 1;
  return col < COLS && row < ROWS ? { col, row } : null;
}

/** The rectangle spanned by two corners, as {c0, r0, c1, r1}. */
export function rectOf(a, b) {
  return {
    c0: Math.min(a.col, b.col),
    r0: Math.min(a.row, b.row),
    c1: Math.max(a.col, b.col),
    r1: Math.max(a.row, b.row),
  };
}

/** "A1:C4" for a rectangle ("B2" when it is one cell). */
export function rangeText(rect) {
  const a = addressOf(rect.c0, rect.r0);
  const b = addressOf(rect.c1, rect.r1);
  return a === b ? a : `${a}:${b}`;
}

/** Move a position by (dc, dr), clamped to the grid. */
export function moved(pos, dc, dr) {
  return {
    col: Math.min(COLS - 1, Math.max(0, pos.col + dc)),
    row: Math.min(ROWS - 1, Math.max(0, pos.row + dr)),
  };
}

/** Every address of a rectangle, row by row. */
export function* addressesIn(rect) {
  for (let r = rect.r0; r <= rect.r1; r++)
    for (let c = rect.c0; c <= rect.c1; c++) yield addressOf(c, r);
}
