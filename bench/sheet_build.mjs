// The worksheet benchmark sheet: 5 columns × 2000 rows = 10 000 cells, plus F1.
// A: constants with prefixes; B: a 2000-long chain; C: FEEDBACK.GAIN per row;
// D: ten-cell sums (ranges); E: DB.VOLTAGE per row, the first 100 rows also
// scaled by F1 (so an edit of F1 reaches exactly 100 dependents).

export const ROWS = 2000;

export function buildSheet(lw) {
  const ws = new lw.Worksheet();
  ws.setCell('F1', '1');
  for (let n = 1; n <= ROWS; n++) {
    ws.setCell(`A${n}`, `${n}k`);
    ws.setCell(`B${n}`, n === 1 ? '=A1' : `=B${n - 1}*0.5 + A${n}`);
    ws.setCell(`C${n}`, `=FEEDBACK.GAIN(A${n}*100; 0.01)`);
    ws.setCell(`D${n}`, `=SUM(A${Math.max(1, n - 9)}:A${n})`);
    ws.setCell(`E${n}`, n <= 100 ? `=DB.VOLTAGE(C${n})*$F$1` : `=DB.VOLTAGE(C${n})`);
  }
  return ws;
}
