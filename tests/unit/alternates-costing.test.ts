// Approved alternates in run costing and planning: the cheapest approved part that can be had in time is bought
// unless one is pinned, and the costed BOM says which part and why; a line with one approved source is marked.
// Buying the cheapest source that can deliver by the date wanted is common practice in purchasing; the costs are
// the costing's own rules (domain/costing.ts), worked here by hand.
import { describe, expect, it } from 'vitest';
import type { Book, Run } from '../../src/domain/book.ts';
import { PART_CHOICE } from '../../src/domain/alternates.ts';
import { costVariantRun, prepareCosting } from '../../src/domain/costing.ts';
import type { CostedBom, SupplyOptions } from '../../src/domain/costing.ts';
import { runDemands } from '../../src/domain/planning.ts';
import { CostingWorkbook, resolutionFromFamily } from '../../src/engine/costing.ts';
import { resolveFamily } from '../../src/engine/family.ts';
import { costedBomRows, runCosting } from '../../src/io/run-export.ts';
import { planBook, runNeeds } from '../../src/io/plan-export.ts';
import { buildRun } from '../../src/domain/stock.ts';
import { part, smallBook, value } from './costing-fixtures.ts';

/**
 * The X2 capacitor line C1 (100 per run, no attrition) approves its own part and two second sources; costing date
 * 2025-06-01. Own part €0.30 in 10 days; first alternate €0.20 but 30 days; second alternate €0.35 in 5 days.
 * Line R1 has one approved part.
 */
function book(lineExtra: { alternates?: string[]; pinnedPartId?: string } = { alternates: ['cap_b', 'cap_c'] }): Book {
  const b = smallBook({
    parts: [part('cap_a', { kind: 'capacitor' }), part('cap_b', { kind: 'capacitor' }), part('cap_c', { kind: 'capacitor' }), part('res')],
    quotes: {
      cap_a: [{ id: 'qa', breaks: [{ qty: 1, price: 0.3 }], leadDays: 10 }],
      cap_b: [{ id: 'qb', breaks: [{ qty: 1, price: 0.2 }], leadDays: 30 }],
      cap_c: [{ id: 'qc', breaks: [{ qty: 1, price: 0.35 }], leadDays: 5 }],
      res: [{ id: 'qr', breaks: [{ qty: 1, price: 0.01 }], leadDays: 3 }],
    },
    lines: [
      { id: 'xcap', partId: 'cap_a', qty: 1, designators: 'C1' },
      { id: 'bleed', partId: 'res', qty: 1, designators: 'R1' },
    ],
  });
  b.buildLines = b.buildLines.map((l) => (l.id === 'xcap' ? { ...l, ...lineExtra } : l));
  return b;
}

function cost(b: Book, supply: SupplyOptions = {}): CostedBom {
  const ctx = value(prepareCosting(b));
  const lines = resolveFamily(b).variants[0]!.lines;
  return value(costVariantRun(ctx, b.variants[0]!, lines, 100, supply));
}

const capLine = (bom: CostedBom) => bom.lines.find((l) => l.lineId === 'xcap')!;

describe('costing chooses among approved parts', () => {
  it('with no date wanted buys the cheapest approved part', () => {
    const l = capLine(cost(book()));
    // 100 × €0.20 = €20.00, below 100 × €0.30 and 100 × €0.35.
    expect(l).toMatchObject({ partId: 'cap_b', quoteId: 'qb', extendedBase: 20, partChoice: { reason: PART_CHOICE.cheapest, approved: 3 } });
  });

  it('under shortage the cheaper part with no quote in time is passed over for the next', () => {
    // Wanted 2025-06-20: the €0.20 part arrives 2025-07-01 (30 days), too late; of the two in time the own part at
    // €0.30 (arrives 2025-06-11) beats €0.35 (2025-06-06): 100 × €0.30 = €30.00.
    const l = capLine(cost(book(), { dateWanted: '2025-06-20' }));
    expect(l).toMatchObject({ partId: 'cap_a', quoteId: 'qa', extendedBase: 30, leadDays: 10, partChoice: { reason: PART_CHOICE.cheapest, approved: 3 } });
    // Wanted 2025-06-08: only the 5-day part arrives in time (2025-06-06); 100 × €0.35 = €35.00.
    const tight = capLine(cost(book(), { dateWanted: '2025-06-08' }));
    expect(tight).toMatchObject({ partId: 'cap_c', extendedBase: 35, partChoice: { reason: PART_CHOICE.onlyInTime } });
    // Wanted 2025-06-03: nothing arrives in time; the cheapest approved is costed and the reason says so.
    const late = capLine(cost(book(), { dateWanted: '2025-06-03' }));
    expect(late).toMatchObject({ partId: 'cap_b', partChoice: { reason: PART_CHOICE.noneInTime } });
  });

  it('stock on hand counts as available: the cheap part in stock is chosen although its quote is late', () => {
    const l = capLine(cost(book(), { dateWanted: '2025-06-20', onHand: new Map([['cap_b', 150]]) }));
    expect(l).toMatchObject({ partId: 'cap_b', extendedBase: 20, partChoice: { reason: PART_CHOICE.cheapest } });
    // Too little stock (99 < 100) does not count.
    expect(capLine(cost(book(), { dateWanted: '2025-06-20', onHand: new Map([['cap_b', 99]]) })).partId).toBe('cap_a');
  });

  it('a pinned part is kept even when dearer', () => {
    const b = book({ alternates: ['cap_b', 'cap_c'], pinnedPartId: 'cap_c' });
    for (const supply of [{}, { dateWanted: '2025-06-20' }]) {
      expect(capLine(cost(b, supply))).toMatchObject({ partId: 'cap_c', extendedBase: 35, partChoice: { reason: PART_CHOICE.pinned, approved: 3 } });
    }
  });

  it('buys a chosen part only from its quotes in time', () => {
    const b = book();
    // The own part also has a cheaper quote that takes 40 days: wanted 2025-06-20, the 10-day quote is used.
    b.quotes.push({ ...b.quotes.find((q) => q.id === 'qa')!, id: 'qa_slow', breaks: [{ qty: 1, price: 0.25 }], leadDays: 40 });
    expect(capLine(cost(b, { dateWanted: '2025-06-20' }))).toMatchObject({ partId: 'cap_a', quoteId: 'qa', extendedBase: 30 });
  });

  it('marks a line with a single approved source, and a line with no alternates is costed as before', () => {
    const bom = cost(book());
    expect(bom.lines.find((l) => l.lineId === 'bleed')!.partChoice).toEqual({ reason: PART_CHOICE.single, approved: 1 });
    const plain = cost(book({}));
    expect(capLine(plain)).toMatchObject({ partId: 'cap_a', extendedBase: 30, partChoice: { reason: PART_CHOICE.single, approved: 1 } });
  });

  it('the costing workbook and the costed BOM agree on the unit cost with alternates', () => {
    const b = book();
    const wb = value(CostingWorkbook.open({ ...b, settings: { ...b.settings, runSizes: [100] } }, resolutionFromFamily(resolveFamily(b))));
    try {
      const bom = value(wb.costedBom('v1', 100));
      expect(capLine(bom).partId).toBe('cap_b');
      expect(wb.unitCost('v1', 100)).toBe(bom.unitCost);
    } finally {
      wb.close();
    }
  });

  it('a live price edit lets the line choose again, as a workbook opened afresh does', () => {
    const b = book();
    const sized = { ...b, settings: { ...b.settings, runSizes: [100] } };
    const wb = value(CostingWorkbook.open(sized, resolutionFromFamily(resolveFamily(b))));
    try {
      // The €0.20 part goes up to €0.50: the own part at €0.30 is now the cheapest approved.
      value(wb.setQuotePrice('qb', 0, 0.5));
      expect(capLine(value(wb.costedBom('v1', 100))).partId).toBe('cap_a');
      const edited = { ...sized, quotes: sized.quotes.map((q) => (q.id === 'qb' ? { ...q, breaks: [{ qty: 1, price: 0.5 }] } : q)) };
      const fresh = value(CostingWorkbook.open(edited, resolutionFromFamily(resolveFamily(edited))));
      expect(wb.unitCost('v1', 100)).toBe(fresh.unitCost('v1', 100));
      fresh.close();
    } finally {
      wb.close();
    }
  });

  it("a run's costing uses its date wanted, and the costed BOM export names the part and why", () => {
    const b = book();
    const run: Run = { id: 'run1', rev: 1, name: 'June run', variantId: 'v1', quantity: 100, dateWanted: '2025-06-08', notes: '' };
    const c = value(runCosting({ ...b, runs: [run] }, run));
    expect(capLine(c.bom).partId).toBe('cap_c');
    const rows = costedBomRows(c);
    // The table's header row, after the file's head block.
    const head = rows.find((r) => r[0] === 'designators') as string[];
    const row = rows.find((r) => r[0] === 'C1')!;
    expect(row[head.indexOf('mpn')]).toBe('TST-CAP_C');
    expect(row[head.indexOf('part_choice')]).toBe(PART_CHOICE.onlyInTime);
    expect(row[head.indexOf('approved_parts')]).toMatchObject({ n: 3 });
    expect(rows.find((r) => r[0] === 'R1')![head.indexOf('part_choice')]).toBe(PART_CHOICE.single);
  });

  it('marking a run built issues the approved part the plan allocated to it: the same need date, the same stock', () => {
    // Wanted 2025-06-15 less 5 kitting and 2 safety days: parts in by 2025-06-08. Planned on 2025-06-01 only the
    // 5-day part (in 2025-06-06) is in time; by the date wanted alone the 10-day own part (in 2025-06-11) would be,
    // and with no date at all the €0.20 part would be bought.
    const b = book();
    b.settings = { ...b.settings, kittingDays: 5, safetyDays: 2 };
    const run: Run = { id: 'run1', rev: 1, name: 'June run', variantId: 'v1', quantity: 100, dateWanted: '2025-06-15', notes: '' };
    b.runs = [run];
    const today = '2025-06-01';
    const alone = value(planBook(b, { today }));
    expect([...alone.runs[0]!.needs]).toEqual([
      ['cap_c', 100],
      ['res', 100],
    ]);
    expect([...value(runNeeds(b, run, today))]).toEqual([...alone.runs[0]!.needs]);

    // 100 of the own part on hand covers one run's need, so it can be had in time and, cheaper than the 5-day
    // part, is chosen; an earlier run takes that stock first, so this run buys the 5-day part again.
    const stock = (partId: string, quantity: number, i: number) => ({ id: `m${i}`, rev: 1, partId, date: '2025-05-30', quantity, kind: 'counted' as const, reason: 'count' });
    b.stockMoves = [stock('cap_a', 100, 1), stock('cap_c', 100, 2), stock('res', 300, 3)];
    const first: Run = { ...run, id: 'run0', name: 'Early June run', dateWanted: '2025-06-12' };
    b.runs = [run, first];
    const both = value(planBook(b, { today }));
    expect(both.runs.map((r) => [r.run.id, [...r.needs]])).toEqual([
      ['run0', [['cap_a', 100], ['res', 100]]],
      ['run1', [['cap_c', 100], ['res', 100]]],
    ]);
    for (const r of [first, run]) {
      const needs = value(runNeeds(b, r, today));
      expect([...needs]).toEqual([...both.runs.find((x) => x.run.id === r.id)!.needs]);
      // What is issued is what the plan gave the run, and the stock holds it.
      const built = value(buildRun(b, r, today, needs));
      expect(built.put!.stockMoves!.map((m) => [m.partId, m.quantity, m.kind])).toEqual([...needs].map(([partId, n]) => [partId, -n, 'issued']));
    }
  });

  it('planning needs the part the run can have in time', () => {
    const b = book();
    const ctx = value(prepareCosting(b));
    const lines = resolveFamily(b).variants[0]!.lines;
    const { demands } = runDemands(ctx, lines, 100, { dateWanted: '2025-06-08' });
    expect(demands.map((d) => [d.partId, d.need])).toEqual([
      ['cap_c', 100],
      ['res', 100],
    ]);
  });
});
