// Long work cut into slices (domain/slices.ts): run at once or a slice at a time it gives the same result, the page
// gets its turn between slices, an abort stops it between slices, and waiting for idle time ends by itself. The price
// import's plan, planned in slices, is the plan planned at once.
import { afterEach, describe, expect, it, vi } from 'vitest';
import { onIdle, runAtOnce, runInSlices, whenIdle } from '../../src/domain/slices.ts';
import type { Sliced } from '../../src/domain/slices.ts';
import { planImport, planImportInSlices } from '../../src/io/price-plan.ts';
import type { ImportPlan } from '../../src/io/price-plan.ts';
import { analyse, SUPPLIER_ID, testBook } from './import-helpers.ts';

afterEach(() => vi.unstubAllGlobals());

/** Sums 1..n, yielding after each item. */
function* sum(n: number, seen: number[] = []): Sliced<number> {
  let total = 0;
  for (let i = 1; i <= n; i++) {
    total += i;
    seen.push(i);
    yield;
  }
  return total;
}

describe('sliced work', () => {
  it('gives the same result at once and in slices', async () => {
    expect(runAtOnce(sum(100))).toBe(5050);
    expect(await runInSlices(sum(100))).toBe(5050);
  });

  it('lets other tasks run between slices once a slice has used its time', async () => {
    const seen: number[] = [];
    let otherRanAfter = -1;
    setTimeout(() => (otherRanAfter = seen.length), 0);
    // A budget of 0 ms: every item is a slice of its own, so the timer above runs before the work ends.
    expect(await runInSlices(sum(50, seen), { budgetMs: 0 })).toBe(1275);
    expect(otherRanAfter).toBeGreaterThan(0);
    expect(otherRanAfter).toBeLessThan(50);
  });

  it('stops between slices with an AbortError when asked to', async () => {
    const seen: number[] = [];
    const stop = new AbortController();
    const work = runInSlices(sum(1000, seen), { budgetMs: 0, signal: stop.signal });
    stop.abort();
    await expect(work).rejects.toMatchObject({ name: 'AbortError' });
    expect(seen.length).toBeLessThan(1000);
  });

  it('waits for idle time where the platform has it, at most the time given, and for a new task where it has not', async () => {
    await expect(whenIdle(50)).resolves.toBeUndefined();
    const asked: { timeout?: number }[] = [];
    vi.stubGlobal('requestIdleCallback', (cb: () => void, options: { timeout?: number }) => {
      asked.push(options);
      setTimeout(cb, 0);
      return 1;
    });
    await whenIdle(100);
    expect(asked).toEqual([{ timeout: 100 }]);
  });

  it('runs a wait for idle time without an idle callback at once, in a new task or after the time asked, as told', async () => {
    const ran: string[] = [];
    onIdle(() => ran.push('at once'), 5_000, 'at once');
    onIdle(() => ran.push('next task'), 5_000);
    onIdle(() => ran.push('after 30 ms'), 5_000, { afterMs: 30 });
    expect(ran).toEqual(['at once']);
    await new Promise((r) => setTimeout(r, 5));
    expect(ran).toEqual(['at once', 'next task']);
    await new Promise((r) => setTimeout(r, 60));
    expect(ran).toEqual(['at once', 'next task', 'after 30 ms']);
    // With an idle callback, every kind waits for it, with its limit.
    const asked: number[] = [];
    const waiting: (() => void)[] = [];
    vi.stubGlobal('requestIdleCallback', (cb: () => void, options: { timeout: number }) => {
      asked.push(options.timeout);
      waiting.push(cb);
      return 1;
    });
    onIdle(() => ran.push('idle'), 300, 'at once');
    onIdle(() => ran.push('idle'), 5_000, { afterMs: 0 });
    await new Promise((r) => setTimeout(r, 10));
    expect(ran).toHaveLength(3);
    expect(asked).toEqual([300, 5_000]);
    for (const cb of waiting) cb();
    expect(ran).toEqual(['at once', 'next task', 'after 30 ms', 'idle', 'idle']);
  });
});

/** A plan with its new ids (drawn at random) replaced by their order of appearance, so two plans compare. */
function withIdsInOrder(plan: ImportPlan): unknown {
  const ids = new Map<string, string>();
  return JSON.parse(JSON.stringify(plan), (_k, v: unknown) => {
    if (typeof v !== 'string' || !/^(quote|batch|part)_[0-9a-z]{12}$/.test(v)) return v;
    if (!ids.has(v)) ids.set(v, `id${ids.size}`);
    return ids.get(v);
  });
}

describe('the price import planned in slices', () => {
  it('is the plan planned at once, superseded quotes and batch included', async () => {
    const book = testBook();
    const a = await analyse('MPN,Order code,Qty,Price\nQT-R10K-06,QS-1001,1,0.05\nQT-R10K-06,QS-1001,100,0.03\nQT-C100N-50,QS-2002,10,0.12\n');
    const options = { supplierId: SUPPLIER_ID, fileName: 'prices.csv', at: '2026-11-30T10:00:00.000Z' };
    const atOnce = planImport(book, a, options);
    const sliced = await planImportInSlices(book, a, options);
    expect(atOnce.ok).toBe(true);
    expect(atOnce.newQuotes).toBe(2);
    expect(atOnce.supersededQuotes).toBeGreaterThan(0);
    expect(withIdsInOrder(sliced)).toEqual(withIdsInOrder(atOnce));
  });

  it('stops with an AbortError when stopped while it waits for the page to be idle', async () => {
    const a = await analyse('MPN,Price\nQT-R10K-06,0.05\n');
    const stop = new AbortController();
    const plan = planImportInSlices(testBook(), a, { supplierId: SUPPLIER_ID, fileName: 'p.csv', at: '2026-11-30T10:00:00.000Z' }, stop.signal);
    stop.abort();
    await expect(plan).rejects.toMatchObject({ name: 'AbortError' });
  });
});
