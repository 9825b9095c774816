// A quote's terms edited in place in the costing workbook (CostingWorkbook.updateQuote) and through the live figures:
// an expiry that makes a quote unusable or usable again, a supersede, MOQ, pack and break quantities, a delete. After
// each, every unit cost (and why one cannot be computed) and a costed BOM equal a workbook opened afresh on the edited
// Book, which is how the command line costs it; what the layout of the open cannot hold is refused, and the live
// figures build the workbook again for it. Random sequences of such edits (fast-check) agree with a fresh workbook too.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import type { Book, PriceBreak, Quote, Supplier } from '../../src/domain/book.ts';
import { costingDateOf, quoteProblem } from '../../src/domain/costing.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { CostingWorkbook, resolutionFromFamily } from '../../src/engine/costing.ts';
import { resolveFamily } from '../../src/engine/family.ts';
import { LiveFigures, SYNC_KINDS } from '../../src/engine/figures.ts';

function open(book: Book): CostingWorkbook {
  const wb = CostingWorkbook.open(book, resolutionFromFamily(resolveFamily(book)));
  if (!wb.ok) throw new Error(wb.error);
  return wb.value;
}

/** Every unit cost, or why there is none, by variant and run size. */
function figures(wb: CostingWorkbook): Map<string, number | string> {
  return new Map(wb.allUnitCosts().map((r) => [`${r.variantId}@${r.run}`, Number.isFinite(r.unitCost) ? r.unitCost : (r.error ?? 'NaN')] as const));
}

const withQuote = (book: Book, q: Quote): Book => ({ ...book, quotes: book.quotes.map((x) => (x.id === q.id ? q : x)) });

/** Checks the live workbook against one opened afresh on `book`: unit costs, problems, and each variant's costed BOM. */
function agrees(live: CostingWorkbook, book: Book): void {
  const fresh = open(book);
  try {
    expect(figures(live)).toEqual(figures(fresh));
    for (const v of book.variants) {
      const a = live.costedBom(v.id, book.settings.runSizes[0]!);
      const b = fresh.costedBom(v.id, book.settings.runSizes[0]!);
      expect(a).toEqual(b);
    }
  } finally {
    fresh.close();
  }
}

const book0 = demoBook();
const date = costingDateOf(book0.settings);
const expire = (q: Quote): Quote => ({ ...q, rev: q.rev + 1, expires: '2020-01-01' });
/**
 * A usable quote whose part has another usable quote (so withdrawing it leaves one) and whose expiry moves some unit
 * cost, as a workbook opened afresh tells.
 */
const shared = (() => {
  const base = figures(open(book0));
  for (const q of book0.quotes) {
    if (quoteProblem(q, date, 1) !== undefined) continue;
    if (!book0.quotes.some((o) => o.id !== q.id && o.partId === q.partId && quoteProblem(o, date, 1) === undefined)) continue;
    const wb = open(withQuote(book0, expire(q)));
    const moved = [...figures(wb)].some(([k, v]) => base.get(k) !== v);
    wb.close();
    if (moved) return q;
  }
  throw new Error('no quote of the demo Book whose expiry moves a unit cost');
})();

describe('a quote’s terms edited in place in the costing workbook', () => {
  it('takes an expiry that makes a quote unusable, and back, as a workbook opened afresh', () => {
    const wb = open(book0);
    try {
      const expired = expire(shared);
      expect(quoteProblem(expired, date, 1)).toBeDefined();
      const r = wb.updateQuote(shared.id, expired);
      expect(r.ok).toBe(true);
      // The unit costs it moved are those it reports.
      expect(r.ok && r.value.length).toBeGreaterThan(0);
      agrees(wb, withQuote(book0, expired));
      // Its expiry moved on again: usable once more, from the same row.
      const again = { ...expired, rev: expired.rev + 1, expires: undefined };
      delete again.expires;
      expect(wb.updateQuote(shared.id, again).ok).toBe(true);
      agrees(wb, withQuote(book0, again));
    } finally {
      wb.close();
    }
  });

  it('takes a supersede, a new MOQ, pack, lead time and break quantities, and a delete', () => {
    const wb = open(book0);
    try {
      let book = book0;
      const other = book0.quotes.find((o) => o.id !== shared.id && o.partId === shared.partId && quoteProblem(o, date, 1) === undefined)!;
      // The other quote's terms: a larger MOQ and pack, a longer lead, its first break at a higher quantity.
      const terms: Quote = { ...other, rev: other.rev + 1, moq: other.moq + 250, pack: 25, leadDays: other.leadDays + 10, breaks: other.breaks.map((b, i) => (i === 0 ? { ...b, qty: b.qty + 1 } : b)) };
      expect(wb.updateQuote(other.id, terms).ok).toBe(true);
      book = withQuote(book, terms);
      agrees(wb, book);
      // The shared quote superseded by the other.
      const superseded = { ...shared, rev: shared.rev + 1, supersededBy: other.id };
      expect(wb.updateQuote(shared.id, superseded).ok).toBe(true);
      book = withQuote(book, superseded);
      agrees(wb, book);
      // The superseded quote deleted: nothing reads it any more.
      expect(wb.updateQuote(shared.id, undefined).ok).toBe(true);
      book = { ...book, quotes: book.quotes.filter((q) => q.id !== shared.id) };
      agrees(wb, book);
    } finally {
      wb.close();
    }
  });

  it('refuses what its layout cannot hold, and changes nothing', () => {
    const wb = open(book0);
    try {
      const before = figures(wb);
      // The last usable quote of a part: its lines would say why only as a workbook opened afresh says it.
      const only = book0.quotes.find((q) => quoteProblem(q, date, 1) === undefined && !book0.quotes.some((o) => o.id !== q.id && o.partId === q.partId && quoteProblem(o, date, 1) === undefined))!;
      expect(wb.updateQuote(only.id, { ...only, rev: only.rev + 1, expires: '2020-01-01' })).toMatchObject({ ok: false, error: expect.stringMatching(/last usable quote/) });
      // More breaks than the Quotes sheet's widest row.
      const wide = { ...shared, rev: shared.rev + 1, breaks: Array.from({ length: 12 }, (_, i) => ({ qty: 10 * (i + 1), price: 1 })) };
      expect(wb.updateQuote(shared.id, wide).ok).toBe(false);
      // Moved to another part.
      expect(wb.updateQuote(shared.id, { ...shared, partId: only.partId }).ok).toBe(false);
      // A quote not laid out at open (superseded then) becoming usable.
      const unused = book0.quotes.find((q) => quoteProblem(q, date, 1) !== undefined);
      if (unused) expect(wb.updateQuote(unused.id, { ...unused, supersededBy: undefined, expires: undefined, rev: unused.rev + 1 }).ok).toBe(quoteProblem({ ...unused, supersededBy: undefined, expires: undefined }, date, 1) !== undefined);
      expect(figures(wb)).toEqual(before);
    } finally {
      wb.close();
    }
  });

  it('refuses to blank the last quote of a supplier a line is pinned to', () => {
    // A line some variant buys the quote's part through (a part rule may choose it).
    const lineId = resolveFamily(book0).variants.flatMap((v) => v.lines).find((l) => l.applies && l.partId === shared.partId)!.lineId;
    const line = book0.buildLines.find((l) => l.id === lineId)!;
    expect(book0.quotes.filter((q) => q.partId === shared.partId && q.supplierId === shared.supplierId && quoteProblem(q, date, 1) === undefined)).toHaveLength(1);
    const pinned: Book = { ...book0, buildLines: book0.buildLines.map((l) => (l.id === line.id ? { ...l, pinnedSupplierId: shared.supplierId } : l)) };
    const wb = open(pinned);
    try {
      const before = figures(wb);
      expect(wb.updateQuote(shared.id, expire(shared))).toMatchObject({ ok: false, error: expect.stringMatching(/last usable quote/) });
      expect(figures(wb)).toEqual(before);
    } finally {
      wb.close();
    }
  });
});

describe('a new quote taken in place in the costing workbook', () => {
  it('reads a new quote of a part beside the old ones, a supersede with it, and ties broken by id as at open', () => {
    const wb = open(book0);
    try {
      let book = book0;
      // A cheaper quote from the same supplier superseding the old one, as an import or the quote form makes it.
      const cheaper: Quote = { ...shared, id: 'quote_zz_cheaper', rev: 1, breaks: shared.breaks.map((b) => ({ ...b, price: Math.round(b.price * 80) / 100 })) };
      expect(wb.addQuote(cheaper)).toMatchObject({ ok: true });
      expect(wb.updateQuote(shared.id, { ...shared, rev: shared.rev + 1, supersededBy: cheaper.id }).ok).toBe(true);
      book = { ...withQuote(book, { ...shared, rev: shared.rev + 1, supersededBy: cheaper.id }), quotes: [...withQuote(book, { ...shared, rev: shared.rev + 1, supersededBy: cheaper.id }).quotes, cheaper] };
      agrees(wb, book);
      // Two quotes equal to it in every term, one ranked before it by id and one after: the costed BOM buys from the
      // first in id order, as chooseQuote decides.
      for (const id of ['quote_aa_twin', 'quote_zzz_twin']) {
        const twin: Quote = { ...cheaper, id, breaks: cheaper.breaks.map((b) => ({ ...b })) };
        expect(wb.addQuote(twin).ok).toBe(true);
        book = { ...book, quotes: [...book.quotes, twin] };
        agrees(wb, book);
      }
      // A quote of it from a supplier that had none for the part, and an unusable one (expired already).
      const other = book0.suppliers.find((x) => !book.quotes.some((q) => q.partId === shared.partId && q.supplierId === x.id))!;
      const elsewhere: Quote = { ...cheaper, id: 'quote_elsewhere', supplierId: other.id, currency: book0.settings.baseCurrency };
      const stale: Quote = { ...cheaper, id: 'quote_stale', expires: '2020-01-01' };
      for (const q of [elsewhere, stale]) {
        expect(wb.addQuote(q).ok).toBe(true);
        book = { ...book, quotes: [...book.quotes, q] };
        agrees(wb, book);
      }
      // The old quote's row withdrawn now leaves the new ones.
      expect(wb.updateQuote(cheaper.id, undefined).ok).toBe(true);
      book = { ...book, quotes: book.quotes.filter((q) => q.id !== cheaper.id) };
      agrees(wb, book);
    } finally {
      wb.close();
    }
  });

  it('breaks a tie between suppliers as at open, by id, so the charge per order of the supplier chosen is the same', () => {
    // A supplier nothing else is bought from, charging per order, quoting the part exactly as its one usable quote:
    // which of the two is chosen moves the unit cost by that charge.
    const base = book0.settings.baseCurrency;
    const tie: Supplier = { id: 'sup_tie', rev: 1, name: 'Tie Test Supply', currency: base, notes: '', chargesPerOrder: { amount: 40, currency: base } };
    const book1: Book = {
      ...book0,
      suppliers: [
        ...book0.suppliers.map((x) => {
          if (x.id !== shared.supplierId) return x;
          // No landed percentages or charges on the quote's own supplier: the two cost the same but for the charge.
          const { freightPct: _f, dutyPct: _d, chargesPct: _c, freightPerOrder: _o, chargesPerOrder: _p, ...plain } = x;
          return plain;
        }),
        tie,
      ],
      quotes: book0.quotes.map((q) =>
        q.id === shared.id ? { ...q, currency: base, leadDays: 5 } : q.partId === shared.partId ? { ...q, expires: '2020-01-01' } : q,
      ),
    };
    const mine = book1.quotes.find((q) => q.id === shared.id)!;
    const alone = open(book1);
    const before = figures(alone);
    alone.close();
    for (const id of [`${shared.id}_a`, 'quote_0_first']) {
      const wb = open(book1);
      try {
        const twin: Quote = { ...mine, id, supplierId: tie.id, breaks: mine.breaks.map((b) => ({ ...b })) };
        expect(wb.addQuote(twin).ok).toBe(true);
        agrees(wb, { ...book1, quotes: [...book1.quotes, twin] });
        // The twin ranked first carries its supplier's charge per order into the unit costs; ranked after, nothing moves.
        const moved = [...figures(wb)].some(([k, v]) => before.get(k) !== v);
        expect(moved).toBe(id < mine.id);
      } finally {
        wb.close();
      }
    }
  });

  it('refuses a quote of a part that had no usable quote at open, and one wider than the widest row', () => {
    const bare = book0.parts.find((p) => !book0.quotes.some((q) => q.partId === p.id && quoteProblem(q, date, 1) === undefined));
    const wb = open(book0);
    try {
      const before = figures(wb);
      if (bare) expect(wb.addQuote({ ...shared, id: 'quote_bare', partId: bare.id })).toMatchObject({ ok: false, error: expect.stringMatching(/no usable quote/) });
      expect(wb.addQuote({ ...shared, id: 'quote_wide', breaks: Array.from({ length: 12 }, (_, i) => ({ qty: 10 * (i + 1), price: 1 })) }).ok).toBe(false);
      expect(wb.addQuote({ ...shared })).toMatchObject({ ok: false, error: expect.stringMatching(/there already/) });
      expect(figures(wb)).toEqual(before);
    } finally {
      wb.close();
    }
  });
});

describe('a quote’s terms through the live figures', () => {
  it('edits in place for an expiry, a new quote superseding one and a delete, builds afresh for the last usable quote of a part, and agrees with a fresh workbook', () => {
    const live = new LiveFigures();
    try {
      const costs = (book: Book): Map<string, number> => {
        const wb = open(book);
        const out = new Map(wb.allUnitCosts().map((r) => [`${r.variantId}@${r.run}`, r.unitCost] as const));
        wb.close();
        return out;
      };
      const seen = new Map<string, number>();
      const merge = (u: ReturnType<LiveFigures['update']>): void => {
        if (u.costsFull) seen.clear();
        for (const c of u.costs) seen.set(`${c.variantId}@${c.run}`, c.value);
      };
      const first = live.update(book0);
      expect(first.costsFull).toBe(true);
      merge(first);
      let book = book0;
      const steps: [string, Book, string][] = [];
      const expired = expire(shared);
      steps.push(['expiry', withQuote(book, expired), SYNC_KINDS.edited]);
      book = steps.at(-1)![1];
      const back = { ...expired, rev: expired.rev + 1 };
      delete back.expires;
      steps.push(['expiry undone', withQuote(book, back), SYNC_KINDS.edited]);
      book = steps.at(-1)![1];
      // A new quote superseding it, as the quote form or a small import saves it.
      const fresh: Quote = { ...shared, id: 'quote_zz_new', rev: 1, breaks: shared.breaks.map((b) => ({ ...b, price: Math.round(b.price * 90) / 100 })) };
      steps.push(['supersede', { ...book, quotes: [...book.quotes.map((q) => (q.id === shared.id ? { ...q, rev: q.rev + 1, supersededBy: fresh.id } : q)), fresh] }, SYNC_KINDS.edited]);
      book = steps.at(-1)![1];
      steps.push(['delete', { ...book, quotes: book.quotes.filter((q) => q.id !== shared.id) }, SYNC_KINDS.edited]);
      book = steps.at(-1)![1];
      const only = book.quotes.find((q) => quoteProblem(q, date, 1) === undefined && !book.quotes.some((o) => o.id !== q.id && o.partId === q.partId && quoteProblem(o, date, 1) === undefined))!;
      steps.push(['last usable quote expired', withQuote(book, { ...only, rev: only.rev + 1, expires: '2020-01-01' }), SYNC_KINDS.rebuilt]);
      for (const [what, next, kind] of steps) {
        const u = live.update(next);
        expect(u.kind, what).toBe(kind);
        merge(u);
        expect(seen, what).toEqual(costs(next));
      }
    } finally {
      live.close();
    }
  });
});

describe('quote edits in any order through the live figures (fast-check)', () => {
  type Op = { kind: 'expire' | 'renew' | 'reprice' | 'terms' | 'delete' | 'supersede' | 'add'; pick: number; factor: number; other: number };
  const opArb: fc.Arbitrary<Op> = fc.record({
    kind: fc.constantFrom('expire', 'renew', 'reprice', 'terms', 'delete', 'supersede', 'add'),
    pick: fc.nat(10_000),
    factor: fc.integer({ min: 50, max: 150 }),
    other: fc.nat(10_000),
  });

  /** The Book after one operation on the quote `pick` chooses (a new quote's id counts up with `n`). */
  function apply(book: Book, op: Op, n: number): Book {
    const q = book.quotes[op.pick % book.quotes.length]!;
    const put = (next: Quote): Book => withQuote(book, next);
    const priced = (x: Quote): PriceBreak[] => x.breaks.map((b) => ({ ...b, price: Math.round(b.price * op.factor * 100) / 10_000 }));
    switch (op.kind) {
      case 'expire':
        return put(expire(q));
      case 'renew': {
        const { expires: _gone, supersededBy: _by, ...rest } = q;
        return put({ ...rest, rev: q.rev + 1 });
      }
      case 'reprice':
        return put({ ...q, rev: q.rev + 1, breaks: priced(q) });
      case 'terms':
        return put({ ...q, rev: q.rev + 1, moq: (op.factor % 7) * 50, pack: 1 + (op.factor % 4) * 5, leadDays: op.factor % 30 });
      case 'delete':
        return { ...book, quotes: book.quotes.filter((x) => x.id !== q.id) };
      case 'supersede':
      case 'add': {
        const supplier = book.suppliers[op.other % book.suppliers.length]!;
        const fresh: Quote = { ...q, id: `quote_prop_${n}`, rev: 1, supplierId: supplier.id, breaks: priced(q) };
        delete fresh.supersededBy;
        delete fresh.expires;
        const quotes = op.kind === 'supersede' ? book.quotes.map((x) => (x.id === q.id ? { ...x, rev: x.rev + 1, supersededBy: fresh.id } : x)) : book.quotes;
        return { ...book, quotes: [...quotes, fresh] };
      }
    }
  }

  it('gives every unit cost a workbook opened afresh gives, after each change', () => {
    fc.assert(
      fc.property(fc.array(opArb, { minLength: 1, maxLength: 5 }), (ops) => {
        const live = new LiveFigures();
        try {
          const seen = new Map<string, number>();
          const merge = (u: ReturnType<LiveFigures['update']>): void => {
            if (u.costsFull) seen.clear();
            for (const c of u.costs) seen.set(`${c.variantId}@${c.run}`, c.value);
          };
          let book = book0;
          merge(live.update(book));
          ops.forEach((op, n) => {
            book = apply(book, op, n);
            merge(live.update(book));
            const wb = open(book);
            const want = new Map(wb.allUnitCosts().map((r) => [`${r.variantId}@${r.run}`, r.unitCost] as const));
            wb.close();
            expect(seen).toEqual(want);
          });
        } finally {
          live.close();
        }
      }),
      { numRuns: 12, seed: 20261203 },
    );
  });
});
