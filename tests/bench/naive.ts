// The naive layout the benchmark compares against: the family as one ordinary spreadsheet formula per cost figure,
// built only with standard functions (CEILING, MAX, INDEX, MATCH, ROUND, MIN, SUM), no Rungbook functions.
// Per variant and line: need; per quote: buy, unit price, base-currency cents; the line's cheapest. Per variant:
// labour, overhead, material, unit cost, price. It costs ONE run size and does not buy up to higher breaks, so it
// does less work than the costing workbook (which costs every run size with buy-up): open_vs_naive is conservative.
import type { HyperFormula } from 'hyperformula';
import type { Book } from '../../src/domain/book.ts';
import { attritionFor, placementsPerUnit, prepareCosting, quoteProblem } from '../../src/domain/costing.ts';
import type { ResolvedLine } from '../../src/domain/costing.ts';
import { columnLetters } from '../../src/engine/cells.ts';
import { createEngine } from '../../src/engine/create.ts';

export function buildNaive(
  book: Book,
  resolution: Map<string, readonly ResolvedLine[]>,
  run: number,
): { hf: HyperFormula; cells: { sheet: number; row: number; col: number }[] } {
  const prepared = prepareCosting(book);
  if (!prepared.ok) throw new Error(prepared.error);
  const ctx = prepared.value;
  const s = book.settings;
  const currencies = [...new Set([s.baseCurrency, ...Object.keys(s.rates), ...book.quotes.map((q) => q.currency)])];
  const rates = currencies.map((c) => [c, c === s.baseCurrency ? 1 : (s.rates[c] ?? 0)]);
  const maxB = Math.max(1, ...book.quotes.map((q) => q.breaks.length));
  const quoteRows: (number | string | null)[][] = [];
  const rowsOfPart = new Map<string, number[]>();
  for (const q of book.quotes) {
    if (quoteProblem(q, ctx.date, 1) !== undefined) continue;
    const r = quoteRows.length;
    const row: (number | string | null)[] = [`=Rates!$B$${currencies.indexOf(q.currency) + 1}`, q.moq, q.pack];
    for (let i = 0; i < maxB; i++) row.push(q.breaks[i]?.qty ?? null);
    for (let i = 0; i < maxB; i++) row.push(q.breaks[i]?.price ?? null);
    quoteRows.push(row);
    const list = rowsOfPart.get(q.partId) ?? [];
    list.push(r);
    rowsOfPart.set(q.partId, list);
  }
  const maxQ = Math.max(1, ...[...rowsOfPart.values()].map((l) => l.length));
  const costCol = 1 + 3 * maxQ;
  const settings = [[s.labourRatePerHour, s.labourMinutesPerUnit, s.labourMinutesPerPlacement, s.testCostPerUnit, s.overheadPct, s.marginPct]];
  const lineRows: (string | null)[][] = [];
  const variantRows: string[][] = [];
  for (const v of book.variants) {
    const lines = resolution.get(v.id) ?? [];
    const vr = variantRows.length + 1;
    const costRefs: string[] = [];
    for (const l of lines) {
      if (!l.applies || !(l.qtyPerUnit > 0) || l.partId === undefined) continue;
      const part = ctx.parts.get(l.partId)!;
      const att = attritionFor(ctx, ctx.lines.get(l.lineId), part);
      const lr = lineRows.length + 1;
      const cells: (string | null)[] = [`=CEILING(ROUND(${l.qtyPerUnit}*${run}*(1+${att}),9),1)`];
      const bases: string[] = [];
      (rowsOfPart.get(l.partId) ?? []).forEach((qr, j) => {
        const q = qr + 1;
        const buy = `${columnLetters(1 + 3 * j)}${lr}`;
        const price = `${columnLetters(2 + 3 * j)}${lr}`;
        cells.push(
          `=CEILING(MAX($A${lr},Quotes!$B$${q})/Quotes!$C$${q},1)*Quotes!$C$${q}`,
          `=IFERROR(INDEX(Quotes!$${columnLetters(3 + maxB)}$${q}:$${columnLetters(2 + 2 * maxB)}$${q},1,MATCH(${buy},Quotes!$D$${q}:$${columnLetters(2 + maxB)}$${q},1)),999999999999)`,
          `=ROUND(ROUND(${buy}*${price},2)*Quotes!$A$${q}*100,0)`,
        );
        bases.push(`${columnLetters(3 + 3 * j)}${lr}`);
      });
      while (cells.length < costCol) cells.push(null);
      cells.push(`=MIN(${bases.join(',') || '0'})`);
      lineRows.push(cells);
      costRefs.push(`Lines!$${columnLetters(costCol)}$${lr}`);
    }
    const placements = placementsPerUnit(ctx, lines);
    variantRows.push([
      `=ROUND((Settings!$B$1+Settings!$C$1*${placements})/60*Settings!$A$1,4)`,
      `=ROUND(A${vr}*Settings!$E$1/100,4)`,
      `=ROUND(SUM(${costRefs.join(',') || '0'})/100/${run},4)`,
      `=C${vr}+A${vr}+ROUND(Settings!$D$1,4)+B${vr}`,
      `=ROUND(D${vr}/(1-Settings!$F$1/100),4)`,
    ]);
  }
  const hf = createEngine({ undoLimit: 0, maxRows: 1_000_000 }, { Rates: rates, Settings: settings, Quotes: quoteRows, Lines: lineRows, Variants: variantRows });
  const sheet = hf.getSheetId('Variants')!;
  return { hf, cells: variantRows.map((_, row) => ({ sheet, row, col: 3 })) };
}
