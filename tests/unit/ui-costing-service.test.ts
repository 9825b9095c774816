// The shared costing service keeps its live workbooks in step with the Book: after a price, rate, cost setting or
// parameter edit (done in place) and after structural changes (rebuilt) it gives the same unit costs and check
// statuses as workbooks opened afresh from the new Book, which is how the CLI computes them.
import { describe, expect, it, vi } from 'vitest';
import type { Book, BuildLine } from '../../src/domain/book.ts';
import { costVariantRun, prepareCosting } from '../../src/domain/costing.ts';
import { applyChange, bookDelta } from '../../src/domain/book-ops.ts';
import type { BookChange } from '../../src/domain/book-ops.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { worstOf } from '../../src/domain/check-status.ts';
import { CostingWorkbook, resolutionFromFamily } from '../../src/engine/costing.ts';
import { FamilyWorkbook, evaluateChecks, resolveFamily } from '../../src/engine/family.ts';
import { addBuiltInChecks } from '../../src/engine/check-sheets.ts';
import { loadBuiltInChecks } from '../../src/cli/check-sheets-fs.ts';
import { costVariant } from '../../src/io/run-export.ts';
import { referenceFamily } from '../fixtures/reference-family.ts';
import { FiguresHost, QUOTES_PER_PART, stageQuotes } from '../../src/engine/figures-worker.ts';
import { LiveFigures } from '../../src/engine/figures.ts';
import { HOLD_MAX_MS } from '../../src/engine/figures-protocol.ts';
import type { FiguresRequest } from '../../src/engine/figures-worker.ts';
import { costingInWorker } from '../fixtures/fake-figures-worker.ts';
import type { FakeWorker } from '../fixtures/fake-figures-worker.ts';
import { trialProblems } from '../../src/ui/build-rules.ts';
import { ASK_LIMIT_MS, CostingService, REPLACED_WAIT_MS } from '../../src/ui/costing-service.ts';

const CHECKS = loadBuiltInChecks();

class Holder {
  constructor(public book: Book) {}
  change(change: BookChange): void {
    const r = applyChange(this.book, change);
    if (!r.ok) throw new Error(`conflict on ${r.conflict.recordId}`);
    this.book = r.book;
  }
}

/** A Book holder whose whole Book can be replaced (a file opened), counted as the Book service counts them. */
class Replacing extends Holder {
  replacements = 0;
  replace(book: Book): void {
    this.book = book;
    this.replacements += 1;
  }
}

function start(): { holder: Holder; costing: CostingService } {
  const holder = new Holder(addBuiltInChecks(demoBook(), CHECKS));
  return { holder, costing: CostingService.for(holder) };
}

/** Unit costs of a Book computed from scratch, as the CLI does. */
function fresh(book: Book): Map<string, number> {
  const wb = CostingWorkbook.open(book, resolutionFromFamily(resolveFamily(book)));
  if (!wb.ok) throw new Error(wb.error);
  const out = new Map(wb.value.allUnitCosts().map((r) => [`${r.variantId}@${r.run}`, r.unitCost] as const));
  wb.value.close();
  return out;
}

function live(costing: CostingService, book: Book): Map<string, number> {
  const out = new Map<string, number>();
  for (const v of book.variants) for (const run of costing.runSizes) out.set(`${v.id}@${run}`, costing.unitCost(v.id, run));
  return out;
}

function freshWorst(book: Book): Map<string, string> {
  const by = new Map<string, string[]>();
  for (const r of evaluateChecks(book)) by.set(r.variantId, [...(by.get(r.variantId) ?? []), r.status]);
  return new Map([...by].map(([id, list]) => [id, worstOf(list as never)] as const));
}

describe('CostingService', () => {
  it('is one service per open Book and computes every demo unit cost as a fresh workbook does', () => {
    const { holder, costing } = start();
    expect(CostingService.for(holder)).toBe(costing);
    const want = fresh(holder.book);
    expect(live(costing, holder.book)).toEqual(want);
    expect([...want.values()].every((n) => Number.isFinite(n) && n > 0)).toBe(true);
    for (const v of holder.book.variants) expect(costing.worstStatus(v.id)).toBe(freshWorst(holder.book).get(v.id));
  });

  it('takes a quote price edit in place and reports the unit costs that moved', () => {
    const { holder, costing } = start();
    const v = holder.book.variants[0]!;
    const run = holder.book.settings.runSizes[0]!;
    const bom = costVariant(holder.book, v.id, run);
    if (!bom.ok) throw new Error(bom.error);
    const line = bom.value.bom.lines[0]!;
    const quote = holder.book.quotes.find((q) => q.id === line.quoteId)!;
    const i = quote.breaks.findIndex((b) => b.qty === line.breakQty);
    const before = costing.unitCost(v.id, run);
    const events: string[] = [];
    costing.addEventListener('change', (e) => events.push((e as CustomEvent<{ kind: string }>).detail.kind));
    const breaks = quote.breaks.map((b, j) => (j === i ? { ...b, price: b.price + 1 } : b));
    holder.change({ put: { quotes: [{ ...quote, breaks }] } });

    const report = costing.sync();
    expect(report.kind).toBe('edited');
    expect(report.changed.some((c) => c.variantId === v.id && c.run === run)).toBe(true);
    expect(events).toEqual(['edited']);
    // One more currency unit on every bought part of that line raises the run's material by buy × 1 × rate.
    expect(costing.unitCost(v.id, run)).toBeGreaterThan(before);
    expect(live(costing, holder.book)).toEqual(fresh(holder.book));
  });

  it('takes rate and cost setting edits in place', () => {
    const { holder, costing } = start();
    costing.sync();
    const s = holder.book.settings;
    const foreign = Object.keys(s.rates).find((c) => c !== s.baseCurrency)!;
    holder.change({ settings: { ...s, rates: { ...s.rates, [foreign]: s.rates[foreign]! * 1.1 }, overheadPct: s.overheadPct + 5 } });
    expect(costing.sync().kind).toBe('edited');
    expect(live(costing, holder.book)).toEqual(fresh(holder.book));
  });

  it('takes a parameter edit in place, also when it changes what the variant is built from', () => {
    const { holder, costing } = start();
    costing.sync();
    const v = holder.book.variants.find((x) => x.code === 'FR3-40-CD')!;
    // No build rule reads the ambient temperature, so the parts stay and only the thermal checks move.
    holder.change({ put: { variants: [{ ...v, params: { ...v.params, t_amb: 95 } }] } });
    const edited = costing.sync();
    expect(edited.kind).toBe('edited');
    expect(edited.checks).toBe(true);
    expect(costing.worstStatus(v.id)).toBe(freshWorst(holder.book).get(v.id));
    expect(live(costing, holder.book)).toEqual(fresh(holder.book));

    // One step more needs one more ladder resistor: the lines change, and only that variant's costs are worked out
    // again (in place, with cells added for the new need), equal to a workbook opened afresh.
    const now = holder.book.variants.find((x) => x.id === v.id)!;
    holder.change({ put: { variants: [{ ...now, params: { ...now.params, steps: 4, r_s4: 47000 } }] } });
    const moved = costing.sync();
    expect(moved.kind).toBe('edited');
    expect(new Set(moved.changed.map((c) => c.variantId))).toEqual(new Set([v.id]));
    expect(live(costing, holder.book)).toEqual(fresh(holder.book));
  });

  it('works costs out again when a check and a parameter that changes the lines are saved together', () => {
    const { holder, costing } = start();
    costing.sync();
    const v = holder.book.variants.find((x) => x.code === 'FR3-40-CD')!;
    const check = holder.book.checks[0]!;
    holder.change({ put: { checks: [{ ...check, note: `${check.note} (edited)` }], variants: [{ ...v, params: { ...v.params, steps: 4, r_s4: 47000 } }] } });
    expect(costing.sync().kind).toBe('edited');
    expect(live(costing, holder.book)).toEqual(fresh(holder.book));
  });

  it('takes build line edits in place — a quantity, an attrition, a pinned supplier, a new line and a deleted one — and agrees with a fresh workbook', () => {
    const { holder, costing } = start();
    costing.sync();
    const lines = holder.book.buildLines;
    const fixed = lines.filter((l) => /^\d+$/.test(l.qtyRule) && l.partId !== undefined);
    const [a, b, c] = [fixed[0]!, fixed[1]!, fixed[2]!];
    const supplier = holder.book.quotes.find((q) => q.partId === c.partId)!.supplierId;
    const edits: BookChange[] = [
      { put: { buildLines: [{ ...a, qtyRule: String(Number(a.qtyRule) + 2) }] } },
      { put: { buildLines: [{ ...b, attrition: 0.2 }] } },
      { put: { buildLines: [{ ...c, pinnedSupplierId: supplier }] } },
      { put: { buildLines: [{ ...a, id: 'line_added', rev: 0, position: 999, designators: 'X99', qtyRule: '3' }] } },
      { delete: { buildLines: [b.id] } },
    ];
    for (const change of edits) {
      const current = holder.book.buildLines;
      const put = change.put?.buildLines?.map((l) => ({ ...l, rev: current.find((x) => x.id === l.id)?.rev ?? 0 }));
      holder.change(put ? { put: { buildLines: put } } : change);
      const r = costing.sync();
      expect(r.kind).toBe('edited');
      expect(live(costing, holder.book)).toEqual(fresh(holder.book));
    }
  });

  it('takes a quantity, attrition, designators, category or applies-when rule without laying the family table out again; another part lays it out', () => {
    const { holder, costing } = start();
    costing.sync();
    const opened = vi.spyOn(FamilyWorkbook, 'openInSteps');
    try {
      const line = holder.book.buildLines.find((l) => /^\d+$/.test(l.qtyRule) && l.partId !== undefined)!;
      const edits: Partial<typeof line>[] = [{ qtyRule: String(Number(line.qtyRule) + 3) }, { attrition: 0.07 }, { designators: 'R90–R99', category: 'hardware' }];
      for (const edit of edits) {
        const current = holder.book.buildLines.find((l) => l.id === line.id)!;
        holder.change({ put: { buildLines: [{ ...current, ...edit }] } });
        opened.mockClear();
        expect(costing.sync().kind).toBe('edited');
        expect(opened).not.toHaveBeenCalled();
        expect(live(costing, holder.book)).toEqual(fresh(holder.book));
        const worst = freshWorst(holder.book);
        for (const v of holder.book.variants) expect(costing.worstStatus(v.id)).toBe(worst.get(v.id));
      }
      // The lines each variant is built from are the Book's as it is now (what the Build and Runs pages show).
      const want = resolveFamily(holder.book).variants.map((v) => v.lines);
      expect(costing.resolution().variants.map((v) => v.lines)).toEqual(want);
      // A quantity that becomes a formula and an applies-when rule are new memos of the table, evaluated in place.
      for (const edit of [{ qtyRule: 'steps * 0 + 2' }, { appliesWhen: 'steps > 4' }]) {
        const current = holder.book.buildLines.find((l) => l.id === line.id)!;
        holder.change({ put: { buildLines: [{ ...current, ...edit }] } });
        opened.mockClear();
        expect(costing.sync().kind).toBe('edited');
        expect(opened).not.toHaveBeenCalled();
        expect(live(costing, holder.book)).toEqual(fresh(holder.book));
        const worst = freshWorst(holder.book);
        for (const v of holder.book.variants) expect(costing.worstStatus(v.id)).toBe(worst.get(v.id));
      }
      // Another part for the line changes the table's role names: it is laid out again.
      const current = holder.book.buildLines.find((l) => l.id === line.id)!;
      const other = holder.book.parts.find((p) => p.id !== current.partId && holder.book.quotes.some((q) => q.partId === p.id))!;
      holder.change({ put: { buildLines: [{ ...current, partId: other.id }] } });
      opened.mockClear();
      expect(costing.sync().kind).toBe('edited');
      expect(opened).toHaveBeenCalledTimes(1);
      expect(live(costing, holder.book)).toEqual(fresh(holder.book));
    } finally {
      opened.mockRestore();
    }
  });

  it('rebuilds when variants are added or deleted', () => {
    const { holder, costing } = start();
    costing.sync();
    const v = holder.book.variants[1]!;
    holder.change({ put: { variants: [{ ...v, id: 'var_copy', rev: 0, code: 'COPY-1' }] }, delete: { variants: [holder.book.variants[0]!.id] } });
    expect(costing.sync().kind).toBe('rebuilt');
    expect(live(costing, holder.book)).toEqual(fresh(holder.book));
    expect(costing.unitCost('var_copy', 500)).toBe(costing.unitCost(v.id, 500));
  });

  it('says why when the settings cannot be costed, and gives no numbers', () => {
    const { holder, costing } = start();
    holder.change({ settings: { ...holder.book.settings, runSizes: [] } });
    expect(costing.problem).toMatch(/no run sizes/);
    expect(Number.isNaN(costing.unitCost(holder.book.variants[0]!.id, 500))).toBe(true);
  });
});

/** Waits until the service holds the figures of the Book as it is now. */
async function settled(costing: CostingService): Promise<void> {
  for (let i = 0; i < 200 && (costing.sync(), costing.pending); i++) await new Promise((r) => setTimeout(r, 1));
  expect(costing.pending).toBe(false);
}

/** The demo Book's costing service with its figures worker stood in for by FakeWorker (those started are listed). */
function startInWorker(): { holder: Holder; costing: CostingService; workers: FakeWorker[] } {
  const holder = new Holder(addBuiltInChecks(demoBook(), CHECKS));
  return { holder, ...costingInWorker(holder) };
}
describe('CostingService with the figures worker', () => {
  it('answers from the worker: pending until the figures arrive, then the same figures as a fresh workbook', async () => {
    const { holder, costing, workers } = startInWorker();
    const events: string[] = [];
    costing.addEventListener('change', (e) => events.push((e as CustomEvent<{ kind: string }>).detail.kind));
    expect(costing.sync().kind).toBe('pending');
    expect(costing.pending).toBe(true);
    // Nothing is made up while the first figures are worked out.
    expect(Number.isNaN(costing.unitCost(holder.book.variants[0]!.id, 500))).toBe(true);
    expect(costing.costProblem(holder.book.variants[0]!.id, 500)).toBe('being worked out');
    await settled(costing);
    expect(events).toEqual(['rebuilt']);
    expect(live(costing, holder.book)).toEqual(fresh(holder.book));
    for (const v of holder.book.variants) expect(costing.worstStatus(v.id)).toBe(freshWorst(holder.book).get(v.id));
    expect(costing.resolution().variants.map((v) => v.variantId)).toEqual(holder.book.variants.map((v) => v.id));
    expect(workers).toHaveLength(1);
    expect(workers[0]!.sent.map((m) => m.type)).toEqual(['book']);
    // The first answer came in parts (8 variants, 24 unit costs), merged into one set of figures and one event.
    expect(workers[0]!.answered).toBeGreaterThan(4);
  });

  it('holds the worker while the page draws a page of its own, then lets it go on, and still gives the fresh figures', async () => {
    const { holder, costing, workers } = startInWorker();
    // No worker yet: nothing to hold.
    costing.holdWhileDrawing();
    await settled(costing);
    const line = holder.book.buildLines.find((l) => /^\d+$/.test(l.qtyRule) && l.appliesWhen === '')!;
    holder.change({ put: { buildLines: [{ ...line, qtyRule: String(Number(line.qtyRule) + 1) }] } });
    costing.sync();
    costing.holdWhileDrawing();
    // A build line edit, which the worker takes long over, is held until the page has drawn it (here, with no idle
    // callback, the next task), and so is the switch of pages.
    const hold = `hold ${HOLD_MAX_MS}`;
    expect(workers[0]!.order).toEqual(['book', hold, 'delta', hold]);
    await settled(costing);
    await new Promise((r) => setTimeout(r, 10));
    expect(workers[0]!.order).toEqual(['book', hold, 'delta', hold, 'go', 'go']);
    expect(live(costing, holder.book)).toEqual(fresh(holder.book));
  });

  it('sends only what changed, catches up with edits made while it was answering, and agrees with a fresh workbook', async () => {
    const { holder, costing, workers } = startInWorker();
    await settled(costing);
    const s = holder.book.settings;
    const foreign = Object.keys(s.rates).find((c) => c !== s.baseCurrency)!;
    const quote = holder.book.quotes[0]!;
    const v = holder.book.variants.find((x) => x.code === 'FR3-40-CD')!;
    // Three edits in a row: the first is sent at once, the other two wait and go together as one change.
    holder.change({ put: { quotes: [{ ...quote, breaks: quote.breaks.map((b) => ({ ...b, price: b.price * 1.5 })) }] } });
    expect(costing.sync().kind).toBe('pending');
    holder.change({ settings: { ...holder.book.settings, rates: { ...s.rates, [foreign]: s.rates[foreign]! * 1.1 } } });
    holder.change({ put: { variants: [{ ...v, params: { ...v.params, t_amb: 95 } }] }, delete: { variants: [holder.book.variants[0]!.id] } });
    costing.sync();
    await settled(costing);
    const kinds = workers[0]!.sent.map((m) => m.type);
    expect(kinds).toEqual(['book', 'delta', 'delta']);
    // The deltas carry the changed records only, never the whole quote list.
    const quotesSent = workers[0]!.sent.flatMap((m) => (m.type === 'delta' ? [m.delta.collections.quotes] : []));
    expect(quotesSent[0]).toEqual({ put: [holder.book.quotes.find((q) => q.id === quote.id)], delete: [] });
    expect(live(costing, holder.book)).toEqual(fresh(holder.book));
    for (const x of holder.book.variants) expect(costing.worstStatus(x.id)).toBe(freshWorst(holder.book).get(x.id));
  });

  it('stops a worker still working out a Book that was replaced, and works the new Book out in a new one', async () => {
    const demo = addBuiltInChecks(demoBook(), CHECKS);
    const holder = new Replacing(demo);
    const { costing, workers } = costingInWorker(holder);
    costing.sync();
    expect(workers).toHaveLength(1);
    // Replaced before the first worker answered: its answer would be of a Book no longer open.
    holder.replace({ ...demo, settings: { ...demo.settings, overheadPct: demo.settings.overheadPct + 5 } });
    costing.sync();
    expect(workers[0]!.terminated).toBe(true);
    expect(workers).toHaveLength(2);
    expect(workers[1]!.sent.map((m) => m.type)).toEqual(['book']);
    await settled(costing);
    expect(live(costing, holder.book)).toEqual(fresh(holder.book));
    // An edit is not a replacement: the next change waits for the answer in flight, in the same worker.
    holder.change({ settings: { ...holder.book.settings, overheadPct: holder.book.settings.overheadPct + 1 } });
    costing.sync();
    holder.change({ settings: { ...holder.book.settings, overheadPct: holder.book.settings.overheadPct + 1 } });
    costing.sync();
    await settled(costing);
    expect(workers).toHaveLength(2);
    expect(workers[1]!.terminated).toBe(false);
    expect(live(costing, holder.book)).toEqual(fresh(holder.book));
  });

  it('starts on a replaced Book once the page is idle, after stopping the worker still on the Book before', async () => {
    const idle: { run: () => void; timeout: number | undefined }[] = [];
    vi.stubGlobal('requestIdleCallback', (run: () => void, options?: { timeout?: number }) => idle.push({ run, timeout: options?.timeout }));
    try {
      const demo = addBuiltInChecks(demoBook(), CHECKS);
      const holder = new Replacing(demo);
      const { costing, workers } = costingInWorker(holder);
      // The first Book's figures never wait.
      costing.sync();
      expect(workers[0]!.sent.map((m) => m.type)).toEqual(['book']);
      const first = { ...demo, settings: { ...demo.settings, overheadPct: demo.settings.overheadPct + 5 } };
      holder.replace(first);
      expect(costing.sync().kind).toBe('pending');
      // The worker still on the Book before is stopped at once; nothing is started until the page is idle.
      expect(workers[0]!.terminated).toBe(true);
      expect(workers).toHaveLength(1);
      expect(idle).toHaveLength(1);
      expect(idle[0]!.timeout).toBe(REPLACED_WAIT_MS);
      // Reads meanwhile say the figures are being worked out, and ask for no second wait.
      expect(costing.costProblem(first.variants[0]!.id, 500)).toBe('being worked out');
      costing.sync();
      expect(idle).toHaveLength(1);
      // Replaced again before the page was idle: the new Book waits too, and only it is worked out.
      const second = { ...demo, settings: { ...demo.settings, overheadPct: demo.settings.overheadPct + 7 } };
      holder.replace(second);
      costing.sync();
      expect(idle).toHaveLength(2);
      idle[0]!.run();
      expect(workers).toHaveLength(1);
      idle[1]!.run();
      expect(workers).toHaveLength(2);
      expect(workers[1]!.sent.map((m) => m.type)).toEqual(['book']);
      await settled(costing);
      expect(costing.pending).toBe(false);
      expect(live(costing, holder.book)).toEqual(fresh(second));
      // An edit is not a replacement: sent at once (a parameter, quick to work out, without holding the worker).
      const v = holder.book.variants[0]!;
      holder.change({ put: { variants: [{ ...v, params: { ...v.params, t_amb: 41 } }] } });
      costing.sync();
      expect(workers[1]!.order).toEqual(['book', 'delta']);
      expect(idle).toHaveLength(2);
      await settled(costing);
      // A build line edit takes the worker long: it is held until the page is idle, and let go then.
      const line = holder.book.buildLines.find((l) => /^\d+$/.test(l.qtyRule))!;
      holder.change({ put: { buildLines: [{ ...line, qtyRule: String(Number(line.qtyRule) + 1) }] } });
      costing.sync();
      expect(workers[1]!.order).toEqual(['book', 'delta', `hold ${HOLD_MAX_MS}`, 'delta']);
      expect(idle).toHaveLength(3);
      expect(idle[2]!.timeout).toBe(HOLD_MAX_MS);
      idle[2]!.run();
      expect(workers[1]!.order.at(-1)).toBe('go');
      await settled(costing);
      expect(live(costing, holder.book)).toEqual(fresh(holder.book));
    } finally {
      vi.unstubAllGlobals();
    }
  });

  it('says why when the worker stops, is not left pending, and starts a new worker on the next change', async () => {
    const { holder, costing, workers } = startInWorker();
    await settled(costing);
    workers[0]!.crash = 'out of memory';
    holder.change({ settings: { ...holder.book.settings, overheadPct: holder.book.settings.overheadPct + 1 } });
    costing.sync();
    await settled(costing);
    expect(costing.problem).toMatch(/the worker stopped \(out of memory\)/);
    expect(costing.worstStatus(holder.book.variants[0]!.id)).toBe('error');
    expect(workers[0]!.terminated).toBe(true);
    holder.change({ settings: { ...holder.book.settings, overheadPct: holder.book.settings.overheadPct + 1 } });
    costing.sync();
    await settled(costing);
    expect(workers).toHaveLength(2);
    expect(workers[1]!.sent.map((m) => m.type)).toEqual(['book']);
    expect(costing.problem).toBeUndefined();
    expect(live(costing, holder.book)).toEqual(fresh(holder.book));
  });
});

/**
 * A Book source that saves as the app's Book service does: a save's Book is proposed ahead (`proposed` and a
 * `proposed` event) while it is written, then stored — the same records as other objects — or refused.
 */
class Saving extends EventTarget {
  proposed: Book | undefined;
  private change: BookChange | undefined;
  constructor(public book: Book) {
    super();
  }
  propose(change: BookChange): void {
    const r = applyChange(this.book, change);
    if (!r.ok) throw new Error(`conflict on ${r.conflict.recordId}`);
    this.change = change;
    this.proposed = r.book;
    this.dispatchEvent(new Event('proposed'));
  }
  /** The store took the change as proposed (`as`: it merged another tab's change in, and took that). */
  stored(as?: BookChange): void {
    const r = applyChange(this.book, as ?? this.change!);
    if (!r.ok) throw new Error(`conflict on ${r.conflict.recordId}`);
    this.proposed = undefined;
    this.book = r.book;
    this.dispatchEvent(new CustomEvent('change', { detail: { what: 'book' } }));
  }
  refused(): void {
    this.proposed = undefined;
    this.dispatchEvent(new CustomEvent('change', { detail: { what: 'status' } }));
  }
}

const answersIn = (): Promise<void> => new Promise((r) => setTimeout(r, 5));

describe('CostingService with a save under way', () => {
  /** The demo Book settled in the worker, and a parameter edit that changes what a variant is built from. */
  async function saving(): Promise<{ holder: Saving; costing: CostingService; workers: FakeWorker[]; edit: BookChange; before: Book }> {
    const holder = new Saving(addBuiltInChecks(demoBook(), CHECKS));
    const { costing, workers } = costingInWorker(holder);
    await settled(costing);
    const v = holder.book.variants.find((x) => x.code === 'FR3-40-CD')!;
    return { holder, costing, workers, edit: { put: { variants: [{ ...v, params: { ...v.params, steps: 4, r_s4: 47000 } }] } }, before: holder.book };
  }

  it('works the figures out while the save is written, shows them only once it is stored, and asks nothing more', async () => {
    const { holder, costing, workers, edit, before } = await saving();
    const events: string[] = [];
    costing.addEventListener('change', (e) => events.push((e as CustomEvent<{ kind: string }>).detail.kind));
    holder.propose(edit);
    expect(workers[0]!.sent.map((m) => m.type)).toEqual(['book', 'delta']);
    await answersIn();
    // Answered, but the Book is still the one before the save: its figures stand, settled.
    expect(events).toEqual([]);
    expect(costing.pending).toBe(false);
    expect(live(costing, holder.book)).toEqual(fresh(before));
    holder.stored();
    // Stored: the figures worked out ahead are the Book's at once, with no second request.
    expect(costing.pending).toBe(false);
    expect(events).toEqual(['edited']);
    expect(workers[0]!.sent).toHaveLength(2);
    expect(live(costing, holder.book)).toEqual(fresh(holder.book));
    expect(live(costing, holder.book)).not.toEqual(fresh(before));
    for (const x of holder.book.variants) expect(costing.worstStatus(x.id)).toBe(freshWorst(holder.book).get(x.id));
  });

  it('takes the answer as the stored Book’s when the save is stored before the worker answers', async () => {
    const { holder, costing, workers, edit } = await saving();
    holder.propose(edit);
    holder.stored();
    expect(costing.pending).toBe(true);
    await settled(costing);
    expect(workers[0]!.sent).toHaveLength(2);
    expect(live(costing, holder.book)).toEqual(fresh(holder.book));
    for (const x of holder.book.variants) expect(costing.worstStatus(x.id)).toBe(freshWorst(holder.book).get(x.id));
  });

  it('goes back to the figures of the Book as it stayed when the save is refused, before or after the answer', async () => {
    for (const early of [true, false]) {
      const { holder, costing, workers, edit, before } = await saving();
      holder.propose(edit);
      if (!early) await answersIn();
      holder.refused();
      // The worker is brought back to the Book as it stayed (once it has answered for the proposed one).
      for (let i = 0; i < 200 && workers[0]!.sent.length < 3; i++) await answersIn();
      await settled(costing);
      await answersIn();
      expect(costing.pending).toBe(false);
      expect(workers[0]!.sent.map((m) => m.type)).toEqual(['book', 'delta', 'delta']);
      expect(holder.book).toBe(before);
      expect(live(costing, before)).toEqual(fresh(before));
      for (const x of before.variants) expect(costing.worstStatus(x.id)).toBe(freshWorst(before).get(x.id));
    }
  });

  it('starts a new worker on the stored Book when the worker stops while working out the proposed one', async () => {
    const { holder, costing, workers, edit } = await saving();
    workers[0]!.crash = 'out of memory';
    holder.propose(edit);
    await answersIn();
    expect(costing.problem).toMatch(/the worker stopped \(out of memory\)/);
    holder.stored();
    await settled(costing);
    expect(workers).toHaveLength(2);
    expect(workers[1]!.sent.map((m) => m.type)).toEqual(['book']);
    expect(costing.problem).toBeUndefined();
    expect(live(costing, holder.book)).toEqual(fresh(holder.book));
  });

  it('catches up with the Book the store gave when it is not the one proposed (another tab’s change merged in)', async () => {
    const { holder, costing, edit } = await saving();
    holder.propose(edit);
    await answersIn();
    const v = edit.put!.variants![0]!;
    holder.stored({ put: { variants: [{ ...v, params: { ...v.params, t_amb: 95 } }] } });
    await settled(costing);
    expect(live(costing, holder.book)).toEqual(fresh(holder.book));
    for (const x of holder.book.variants) expect(costing.worstStatus(x.id)).toBe(freshWorst(holder.book).get(x.id));
  });
});

describe('What-if figures for the Compare page', () => {
  const wants = (ids: string[], runs: number[]) => ids.flatMap((variantId) => runs.map((run) => ({ variantId, run, bom: true })));

  it('costs the chosen variants with a what-if rate as a fresh workbook with that rate does, and takes the edit back', async () => {
    const { holder, costing } = start();
    const book = holder.book;
    const ids = book.variants.slice(0, 3).map((v) => v.id);
    const runs = [...book.settings.runSizes, 3700];
    const foreign = Object.keys(book.settings.rates).find((c) => c !== book.settings.baseCurrency)!;
    const rate = book.settings.rates[foreign]! * 1.25;
    const whatIf = { prices: new Map(), rates: new Map([[foreign, rate]]), settings: new Map(), runSizes: undefined };
    const answer = await costing.whatIf({ chosen: ids, whatIf, wants: wants(ids, runs) });
    expect(answer.refused).toEqual([]);
    const wb = CostingWorkbook.open(book, resolutionFromFamily(resolveFamily(book)));
    if (!wb.ok) throw new Error(wb.error);
    try {
      expect(wb.value.setRate(foreign, rate).ok).toBe(true);
      for (const f of answer.figures) {
        const want = book.settings.runSizes.includes(f.run) ? wb.value.unitCost(f.variantId, f.run) : (wb.value.costedBom(f.variantId, f.run) as { value: { unitCost: number } }).value.unitCost;
        expect(f.value, `${f.variantId} @ ${f.run}`).toBe(want);
        expect(f.bom?.ok && f.bom.value.unitCost).toBe(f.value);
      }
    } finally {
      wb.value.close();
    }
    // Taking the edit back gives the Book's own figures again.
    const plain = await costing.whatIf({ chosen: ids, whatIf: { ...whatIf, rates: new Map() }, wants: wants(ids, book.settings.runSizes) });
    for (const f of plain.figures) expect(f.value).toBe(costing.unitCost(f.variantId, f.run));
  });

  it('refuses an edit the workbook cannot take, by its field, and leaves the figures as they were', async () => {
    const { holder, costing } = start();
    const book = holder.book;
    const ids = [book.variants[0]!.id];
    const whatIf = { prices: new Map([['quote_that_is_not_held#0', 1]]), rates: new Map([['XXX', 2]]), settings: new Map(), runSizes: undefined };
    const answer = await costing.whatIf({ chosen: ids, whatIf, wants: wants(ids, book.settings.runSizes) });
    expect(answer.refused.map((r) => r.field)).toEqual(['rate:XXX']);
    expect(answer.refused[0]!.error).toMatch(/no quote or setting uses the currency XXX/);
    for (const f of answer.figures) expect(f.value).toBe(costing.unitCost(f.variantId, f.run));
  });

  it('is answered by the figures worker with the same figures as in-process', async () => {
    const local = start();
    const { holder, costing } = startInWorker();
    await settled(costing);
    const book = holder.book;
    const ids = book.variants.slice(2, 5).map((v) => v.id);
    const whatIf = { prices: new Map(), rates: new Map(), settings: new Map([['labourMinutesPerUnit' as const, 12]]), runSizes: undefined };
    const request = { chosen: ids, whatIf, wants: wants(ids, [500, 20000]) };
    const [inWorker, inProcess] = await Promise.all([costing.whatIf(request), local.costing.whatIf(request)]);
    expect(inWorker).toEqual(inProcess);
    expect(inWorker.figures.every((f) => Number.isFinite(f.value))).toBe(true);
  });
});

describe('Trying a build line on every variant', () => {
  it('gives each variant the line resolves for, and names the variants whose rules fail, in the worker as in-process', async () => {
    const local = start();
    const { costing: inWorker } = startInWorker();
    await settled(inWorker);
    const book = local.holder.book;
    const base = book.buildLines[0]!;
    // Two per step on the variants with more than four steps; an unknown name elsewhere.
    const line = { ...base, id: 'line_trial', qtyRule: 'IF(steps > 4, 2 * steps, nosuch)' };
    const [a, b] = await Promise.all([local.costing.trialLine(line), inWorker.trialLine(line)]);
    expect(a).toEqual(b);
    expect(a.map((o) => o.variantId)).toEqual(book.variants.map((v) => v.id));
    for (const o of a) {
      const steps = Number(book.variants.find((v) => v.id === o.variantId)!.params['steps']);
      if (steps > 4) {
        expect(o.problem).toBeUndefined();
        expect(o.qtyPerUnit).toBe(2 * steps);
      } else expect(o.problem).toMatch(/nosuch/);
    }
    const problems = trialProblems(a);
    const failing = book.variants.filter((v) => Number(v.params['steps']) <= 4).map((v) => v.code);
    expect(problems.qtyRule).toContain(failing.join(', '));
  });

  it('tries a line queued behind a change whose figures failed, on the Book that change gave', () => {
    const host = new FiguresHost();
    const book = addBuiltInChecks(demoBook(), CHECKS);
    expect(host.handle({ type: 'book', seq: 1, book }).at(-1)).toMatchObject({ type: 'figures', last: true });
    const added = { ...book.variants[0]!, id: 'var_added', code: 'ADDED-1', rev: 1 };
    const next = { ...book, variants: [...book.variants, added] };
    // The workbooks fail part-way through the change (the engine's own error): the worker closes them.
    const spy = vi.spyOn(LiveFigures.prototype, 'updateInSteps').mockImplementationOnce(function* () {
      throw new Error('engine failed');
    });
    try {
      const failed = host.handle({ type: 'delta', seq: 2, delta: bookDelta(book, next) });
      expect(failed).toEqual([{ type: 'failed', seq: 2, message: 'the figures could not be worked out: engine failed' }]);
    } finally {
      spy.mockRestore();
    }
    const [answer] = host.handle({ type: 'trial', id: 7, line: { ...book.buildLines[0]!, id: 'line_trial', qtyRule: '2' } });
    expect(answer).toMatchObject({ type: 'trial', id: 7 });
    const outcomes = (answer as Extract<typeof answer, { type: 'trial' }>).outcomes;
    expect(outcomes.map((o) => o.variantId)).toEqual(next.variants.map((v) => v.id));
    expect(outcomes.every((o) => o.qtyPerUnit === 2 && o.problem === undefined)).toBe(true);
    // The next change is worked out afresh on that Book: the figures are whole again.
    const after = { ...next, settings: { ...next.settings, overheadPct: next.settings.overheadPct + 1 } };
    const parts = host.handle({ type: 'delta', seq: 3, delta: bookDelta(next, after) });
    const last = parts.at(-1)!;
    expect(last).toMatchObject({ type: 'figures', last: true });
    const costs = new Map(parts.flatMap((m) => (m.type === 'figures' ? m.update.costs : [])).map((c) => [`${c.variantId}@${c.run}`, c.value] as const));
    expect(costs).toEqual(fresh(after));
  });

  it('gives up on a question the worker never answers, so a save waiting on its trial says why', async () => {
    const { holder, costing, workers } = startInWorker();
    await settled(costing);
    const worker = workers[0]!;
    const post = worker.postMessage.bind(worker);
    // This worker takes questions in and never answers them.
    worker.postMessage = (m) => {
      if (m.type !== 'trial') post(m);
    };
    vi.useFakeTimers();
    try {
      const trial = costing.trialLine({ ...holder.book.buildLines[0]!, id: 'line_trial' });
      const outcome = trial.then(
        () => 'answered',
        (e: Error) => e.message,
      );
      await vi.advanceTimersByTimeAsync(ASK_LIMIT_MS - 1);
      let seen: string | undefined;
      void outcome.then((o) => (seen = o));
      await vi.advanceTimersByTimeAsync(0);
      expect(seen).toBeUndefined();
      await vi.advanceTimersByTimeAsync(1);
      expect(await outcome).toBe(`the figures worker gave no answer in ${ASK_LIMIT_MS / 1000} s`);
    } finally {
      vi.useRealTimers();
    }
    // The worker still answers what it does answer.
    worker.postMessage = post;
    const outcomes = await costing.trialLine({ ...holder.book.buildLines[0]!, id: 'line_trial' });
    expect(outcomes).toHaveLength(holder.book.variants.length);
  });
});

describe('Edits in place on a large family', () => {
  it('gives the reference family (200 variants × 80 lines) the same unit costs as a fresh workbook after parameter and line edits', () => {
    const holder = new Holder(referenceFamily().book);
    const costing = CostingService.for(holder);
    costing.sync();
    const pick = (i: number) => holder.book.variants[(i * 37) % holder.book.variants.length]!;
    for (let i = 0; i < 4; i++) {
      const v = pick(i);
      const steps = Number(v.params['steps']);
      // Steps and load choose parts and quantities in the reference family (per-step lines, load-chosen parts).
      holder.change({ put: { variants: [{ ...v, params: { ...v.params, steps: steps >= 8 ? steps - 1 : steps + 1, load_w: Number(v.params['load_w']) >= 100 ? 60 : 150 } }] } });
      const r = costing.sync();
      expect(r.kind).toBe('edited');
      expect(new Set(r.changed.map((c) => c.variantId))).toEqual(new Set([v.id]));
    }
    const line = holder.book.buildLines.find((l) => /^\d+$/.test(l.qtyRule) && l.appliesWhen === '')!;
    holder.change({ put: { buildLines: [{ ...line, qtyRule: String(Number(line.qtyRule) + 1) }] } });
    expect(costing.sync().kind).toBe('edited');
    expect(live(costing, holder.book)).toEqual(fresh(holder.book));
  });
});

describe('A large Book or change sent to the figures worker in parts', () => {
  it('gives the same figures as the whole request at once, for a Book and for a change that adds quotes', () => {
    const base = referenceFamily().book;
    // Copies of the family's quotes at a slightly higher price, under new ids: many quotes, the same choices.
    const many = (n: number, tag: string): Book['quotes'] =>
      Array.from({ length: n }, (_, i) => {
        const q = base.quotes[i % base.quotes.length]!;
        return { ...q, id: `quote_${tag}_${i}`, breaks: q.breaks.map((b) => ({ ...b, price: b.price * 1.01 })) };
      });
    const book: Book = { ...base, quotes: [...base.quotes, ...many(9_000, 'a')] };
    const whole = new FiguresHost();
    const parted = new FiguresHost();
    const request = { type: 'book' as const, seq: 1, book };
    const parts = stageQuotes(request);
    expect(parts.length).toBeGreaterThan(2);
    expect(parts.slice(0, -1).every((p) => p.type === 'quotes' && p.quotes.length <= QUOTES_PER_PART)).toBe(true);
    const last = (host: FiguresHost, list: FiguresRequest[]) => list.map((p) => host.handle(structuredClone(p))).at(-1)!;
    expect(last(parted, parts)).toEqual(whole.handle(request));

    const next: Book = { ...book, quotes: [...book.quotes, ...many(5_000, 'b')] };
    const delta = { type: 'delta' as const, seq: 2, delta: bookDelta(book, next) };
    const deltaParts = stageQuotes(delta);
    expect(deltaParts.length).toBeGreaterThan(1);
    expect(last(parted, deltaParts)).toEqual(whole.handle(delta));
  });
});

/** Each variant's unit cost at each run size by the plain costing of the costed BOM (all its lines bought at once). */
function plain(book: Book): Map<string, number> {
  const ctx = prepareCosting(book);
  if (!ctx.ok) throw new Error(ctx.error);
  const out = new Map<string, number>();
  for (const v of resolveFamily(book).variants) {
    const variant = book.variants.find((x) => x.id === v.variantId)!;
    for (const run of book.settings.runSizes) {
      const bom = costVariantRun(ctx.value, variant, v.lines, run);
      out.set(`${v.variantId}@${run}`, bom.ok ? bom.value.unitCost : NaN);
    }
  }
  return out;
}

describe('Build line edits in place, costed block by block', () => {
  it('reworks only the variants whose lines a rule edit changed, and agrees with a fresh workbook on the reference family', () => {
    const holder = new Holder(referenceFamily().book);
    const costing = CostingService.for(holder);
    costing.sync();
    const lines = holder.book.buildLines.filter((l) => /^\d+$/.test(l.qtyRule) && l.appliesWhen === '' && l.partId !== undefined);
    const [qty, ruled] = [lines[0]!, lines[1]!];
    holder.change({ put: { buildLines: [{ ...qty, qtyRule: String(Number(qty.qtyRule) + 1) }] } });
    let r = costing.sync();
    expect(r.kind).toBe('edited');
    expect(new Set(r.changed.map((c) => c.variantId)).size).toBe(holder.book.variants.length);
    expect(live(costing, holder.book)).toEqual(fresh(holder.book));
    // The line stops applying to the 4-step variants: only their costs are worked out again.
    const fourStep = new Set(holder.book.variants.filter((v) => Number(v.params['steps']) === 4).map((v) => v.id));
    expect(fourStep.size).toBeGreaterThan(0);
    holder.change({ put: { buildLines: [{ ...ruled, appliesWhen: 'steps <> 4' }] } });
    r = costing.sync();
    expect(r.kind).toBe('edited');
    expect(new Set(r.changed.map((c) => c.variantId))).toEqual(fourStep);
    expect(live(costing, holder.book)).toEqual(fresh(holder.book));
    // And back: the same costs as before the rule edit.
    const current = holder.book.buildLines.find((l) => l.id === ruled.id)!;
    const before = live(costing, holder.book);
    holder.change({ put: { buildLines: [{ ...current, appliesWhen: '' }] } });
    r = costing.sync();
    expect(new Set(r.changed.map((c) => c.variantId))).toEqual(fourStep);
    expect(live(costing, holder.book)).toEqual(fresh(holder.book));
    for (const v of holder.book.variants) if (!fourStep.has(v.id)) for (const run of costing.runSizes) expect(costing.unitCost(v.id, run)).toBe(before.get(`${v.id}@${run}`));
  });

  it('buys a part once where one line may choose it as an alternate and another line buys it for every variant', () => {
    // The supply diode line (dropper variants only) is pinned to its approved alternate; a new line buys that part on
    // every variant. Bought in one purchase, 300 units per line reach the 500 break that two purchases of 300 miss.
    // Buying a run's whole need of a part as one order line, at the break that total reaches, is common practice in
    // purchasing; the reference here is the plain costing of the costed BOM, which buys each part once.
    const book = addBuiltInChecks(demoBook(), CHECKS);
    book.settings = { ...book.settings, runSizes: [300, 2000, 4000] };
    book.buildLines = book.buildLines.map((l) => (l.id === 'line_supply_diode' ? { ...l, pinnedPartId: 'part_diode_1a_fw' } : l));
    const spare: BuildLine = { id: 'line_spare_diode', rev: 1, position: 999, designators: 'D9', category: 'electronics', partId: 'part_diode_1a_fw', qtyRule: '1', appliesWhen: '' };
    book.buildLines.push(spare);
    const holder = new Holder(book);
    const costing = CostingService.for(holder);
    costing.sync();
    expect(live(costing, holder.book)).toEqual(plain(holder.book));
    const droppers = holder.book.variants.filter((v) => v.params['supply'] === 'dropper');
    expect(droppers.length).toBeGreaterThan(0);
    // In place: the spare line's quantity, then the supply line applying to every variant.
    const edits: Partial<BuildLine>[] = [{ qtyRule: '2' }, { qtyRule: '1' }];
    for (const edit of edits) {
      const current = holder.book.buildLines.find((l) => l.id === 'line_spare_diode')!;
      holder.change({ put: { buildLines: [{ ...current, ...edit }] } });
      expect(costing.sync().kind).toBe('edited');
      expect(live(costing, holder.book)).toEqual(plain(holder.book));
      expect(live(costing, holder.book)).toEqual(fresh(holder.book));
    }
    const supply = holder.book.buildLines.find((l) => l.id === 'line_supply_diode')!;
    holder.change({ put: { buildLines: [{ ...supply, appliesWhen: '' }] } });
    expect(costing.sync().kind).toBe('edited');
    expect(live(costing, holder.book)).toEqual(plain(holder.book));
    expect(live(costing, holder.book)).toEqual(fresh(holder.book));
  });
});
