// Cell addressing shared by the workbooks: column letters as the engine's formulas write them.

/** Column letters of a 0-based column index: 0 → A, 25 → Z, 26 → AA. */
export function columnLetters(col: number): string {
  let s = '';
  let n = col + 1;
  while (n > 0) {
    const r = (n - 1) % 26;
    s = String.fromCharCode(65 + r) + s;
    n = Math.floor((n - 1) / 26);
  }
  return s;
}
