// Runs: form drafts checked against the Book; a frozen costing keeps the prices and quotes it was made with; the
// comparison with a fresh costing names what changed per line and in the totals; bad snapshots are refused.
import { describe, expect, it } from 'vitest';
import { costVariantRun, prepareCosting } from '../../src/domain/costing.ts';
import type { Book } from '../../src/domain/book.ts';
import { compareCostings, freezeRun, readSnapshot, runDraft, unfreezeRun, validateRun } from '../../src/domain/freeze.ts';
import { parseBookFile, serializeBook } from '../../src/io/book-file.ts';
import { resolveFixedLines } from '../fixtures/fixed-lines.ts';
import { part, smallBook, value } from './costing-fixtures.ts';

function costed(book: Book, run: number) {
  const ctx = value(prepareCosting(book));
  const v = book.variants[0]!;
  return value(costVariantRun(ctx, v, resolveFixedLines(book), run));
}

function small(priceA = 0.1, priceB = 2): Book {
  const b = smallBook({
    parts: [part('a'), part('b')],
    quotes: {
      a: [{ id: 'qa', breaks: [{ qty: 1, price: priceA }], moq: 1, pack: 1 }],
      b: [{ id: 'qb', breaks: [{ qty: 1, price: priceB }], moq: 1, pack: 1 }],
    },
    lines: [
      { partId: 'a', qty: 4, designators: 'R1-R4' },
      { partId: 'b', qty: 1, designators: 'U1' },
    ],
    settings: { labourRatePerHour: 30, labourMinutesPerUnit: 2, overheadPct: 50, rates: { EUR: 1, USD: 0.9 } },
  });
  b.runs = [{ id: 'run1', rev: 1, name: 'Pilot', variantId: 'v1', quantity: 100, dateWanted: '2025-09-01', notes: '' }];
  return b;
}

describe('run drafts', () => {
  const b = small();
  const good = { name: 'Autumn', variantId: 'v1', quantity: '2 000', dateWanted: '2025-10-01', notes: ' first ' };

  it('turn into a new run with rev 0, the quantity read with spaces as grouping', () => {
    const r = validateRun(good, b, undefined, () => 'run_new');
    expect(r).toEqual({ ok: true, record: { id: 'run_new', rev: 0, name: 'Autumn', variantId: 'v1', quantity: 2000, dateWanted: '2025-10-01', notes: 'first' } });
  });

  it('refuse bad input field by field', () => {
    const r = validateRun({ name: ' pilot ', variantId: 'nope', quantity: '12.5', dateWanted: '2025-02-30', notes: '' }, b);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.problems.name).toMatch(/already called pilot/);
    expect(r.problems.variantId).toMatch(/no longer in the Book/);
    expect(r.problems.quantity).toMatch(/whole number of units ≥ 1/);
    expect(r.problems.dateWanted).toMatch(/calendar date YYYY-MM-DD/);
    const empty = validateRun(runDraft(), b);
    expect(empty.ok ? {} : empty.problems).toEqual({
      name: 'name is required',
      variantId: 'choose the variant to build',
      quantity: 'quantity is required',
      dateWanted: 'date wanted is required',
    });
    const zero = validateRun({ ...good, quantity: '0' }, b);
    expect(zero.ok ? '' : zero.problems.quantity).toMatch(/≥ 1/);
    const huge = validateRun({ ...good, quantity: '20000000' }, b);
    expect(huge.ok ? '' : huge.problems.quantity).toMatch(/at most 10,000,000/);
  });

  it('keep an edited run’s id and rev, and a frozen run’s variant and quantity', () => {
    const run = b.runs[0]!;
    const edited = validateRun({ ...runDraft(run), notes: 'moved' }, b, run);
    expect(edited.ok && edited.record).toMatchObject({ id: 'run1', rev: 1, notes: 'moved' });
    const frozen = value(freezeRun(run, costed(b, 100), b));
    const r = validateRun({ ...runDraft(frozen), quantity: '200' }, b, frozen);
    expect(r.ok ? '' : r.problems.quantity).toMatch(/frozen: unfreeze it before changing the quantity/);
    const kept = validateRun({ ...runDraft(frozen), dateWanted: '2025-12-01' }, b, frozen);
    expect(kept.ok && kept.record.frozen).toEqual(frozen.frozen);
  });
});

describe('freezing', () => {
  it('keeps the prices and quotes it was costed with after the quotes change', () => {
    const b = small();
    const run = b.runs[0]!;
    const frozen = value(freezeRun(run, costed(b, 100), b, new Date('2025-06-02T08:00:00Z')));
    expect(frozen.frozen!.at).toBe('2025-06-02T08:00:00.000Z');
    // The Book's quote is edited in place afterwards: the snapshot is a copy and does not follow.
    b.quotes[0]!.breaks[0]!.price = 0.5;
    b.settings.labourRatePerHour = 60;
    const snap = value(readSnapshot(frozen.frozen!));
    expect(snap.quotes.find((q) => q.id === 'qa')!.breaks[0]!.price).toBe(0.1);
    expect(snap.settings.labourRatePerHour).toBe(30);
    expect(snap.parts.map((p) => p.id).sort()).toEqual(['a', 'b']);
    // By hand: 400 × 0.10 = 40.00 + 100 × 2.00 = 200.00 → material 240.00, 2.4000 per unit.
    expect(snap.bom.materialRun).toBe(240);
    expect(snap.bom.material).toBe(2.4);
  });

  it('survives a trip through a Book file', () => {
    const b = small();
    const bom = costed(b, 100);
    expect(bom.lines.length).toBe(2);
    const frozen = value(freezeRun(b.runs[0]!, bom, b));
    const back = parseBookFile(serializeBook({ ...b, runs: [frozen] }));
    if (!back.ok) throw new Error(JSON.stringify(back.problems));
    expect(value(readSnapshot(back.book.runs[0]!.frozen!))).toEqual(value(readSnapshot(frozen.frozen!)));
  });

  it('is refused for a costing with unpriced lines, of another quantity, or twice', () => {
    const b = small();
    b.quotes = b.quotes.filter((q) => q.id !== 'qb');
    const run = b.runs[0]!;
    expect(freezeRun(run, costed(b, 100), b)).toMatchObject({ ok: false, error: expect.stringMatching(/1 line could not be priced/) });
    const ok = small();
    expect(freezeRun(run, costed(ok, 50), ok)).toMatchObject({ ok: false, error: expect.stringMatching(/V1 × 50/) });
    const once = value(freezeRun(run, costed(ok, 100), ok));
    expect(freezeRun(once, costed(ok, 100), ok)).toMatchObject({ ok: false, error: expect.stringMatching(/already frozen/) });
    expect(unfreezeRun(once)).toEqual(run);
  });

  it('reads back only snapshots it understands, naming the first bad field', () => {
    const b = small();
    const frozen = value(freezeRun(b.runs[0]!, costed(b, 100), b)).frozen!;
    const snap = frozen.snapshot as Record<string, unknown>;
    const bom = snap['bom'] as Record<string, unknown>;
    const cases: [unknown, RegExp][] = [
      ['text', /must be an object, not text/],
      [{ ...snap, format: 'other' }, /format must be "rungbook-frozen-costing", not "other"/],
      [{ ...snap, version: 9 }, /version 9 is not a version/],
      [{ ...snap, bom: { ...bom, runTotal: 'lots' } }, /bom\.runTotal/],
      [{ ...snap, bom: { ...bom, lines: [{ ...(bom['lines'] as object[])[0], need: null }] } }, /bom\.lines\[0\]\.need/],
      [{ ...snap, parts: 'none' }, /parts must be a list, not text/],
      [{ ...snap, settings: { ...(snap['settings'] as object), marginPct: '30' } }, /settings\.marginPct/],
    ];
    for (const [snapshot, message] of cases) {
      expect(readSnapshot({ at: frozen.at, snapshot: snapshot as never })).toMatchObject({ ok: false, error: expect.stringMatching(message) });
    }
  });
});

describe('frozen against fresh', () => {
  it('shows nothing changed when nothing did', () => {
    const b = small();
    const c = compareCostings(costed(b, 100), costed(b, 100));
    expect(c.unchanged).toBe(true);
    expect(c.lines.every((l) => l.kind === 'same' && l.deltaBase === 0)).toBe(true);
  });

  it('names the changed line and gives every total’s difference, worked by hand', () => {
    const then = costed(small(0.1, 2), 100);
    const now = costed(small(0.125, 2), 100);
    const c = compareCostings(then, now);
    expect(c.unchanged).toBe(false);
    const a = c.lines.find((l) => l.designators === 'R1-R4')!;
    expect(a.kind).toBe('changed');
    expect(a.fields).toEqual(['unitPrice', 'extendedBase']);
    // By hand: 400 × (0.125 − 0.10) = 10.00 more for the line.
    expect(a.deltaBase).toBe(10);
    expect(c.lines.find((l) => l.designators === 'U1')!.kind).toBe('same');
    const t = Object.fromEntries(c.totals.map((x) => [x.field, x.delta]));
    // Material 240.00 → 250.00 for 100 units: +10.00 per run, +0.1000 per unit; labour, test and overhead unchanged.
    expect(t['materialRun']).toBe(10);
    expect(t['material']).toBe(0.1);
    expect(t['labour']).toBe(0);
    expect(t['overhead']).toBe(0);
    expect(t['unitCost']).toBe(0.1);
    expect(t['runTotal']).toBe(10);
  });

  it('shows a line that no longer applies as removed and a new one as added', () => {
    const before = small();
    const after = small();
    after.parts.push(part('c'));
    after.quotes.push({ ...after.quotes[0]!, id: 'qc', partId: 'c', breaks: [{ qty: 1, price: 1 }] });
    after.buildLines = [after.buildLines[0]!, { ...after.buildLines[1]!, id: 'l3', partId: 'c', designators: 'U2' }];
    const c = compareCostings(costed(before, 100), costed(after, 100));
    expect(c.lines.map((l) => [l.designators, l.kind])).toEqual([
      ['R1-R4', 'same'],
      ['U1', 'removed'],
      ['U2', 'added'],
    ]);
    // By hand: U1 200.00 gone, U2 100 × 1.00 = 100.00 new → run material −100.00.
    expect(c.lines[1]!.deltaBase).toBe(-200);
    expect(c.lines[2]!.deltaBase).toBe(100);
    expect(c.totals.find((x) => x.field === 'materialRun')!.delta).toBe(-100);
  });

  it('lists lines that cannot be priced today', () => {
    const b = small();
    const then = costed(b, 100);
    b.quotes = b.quotes.map((q) => (q.id === 'qb' ? { ...q, expires: '2025-01-31' } : q));
    const c = compareCostings(then, costed(b, 100));
    expect(c.freshProblems[0]!.message).toMatch(/expired 2025-01-31/);
    expect(c.lines.find((l) => l.designators === 'U1')!.kind).toBe('removed');
    expect(c.unchanged).toBe(false);
  });
});
