// The benchmark's page in Chromium: runs the costing and planning measurements (costing-core.ts, planning-core.ts)
// and the price import the app makes (file → Web Worker → plan → save through the Book service into IndexedDB), for
// tests/bench/browser.ts.
import { applyChange } from '../../../src/domain/book-ops.ts';
import { todayIso } from '../../../src/domain/dates.ts';
import { findSupplier, knownCurrencies } from '../../../src/io/price-import.ts';
import { planImportInSlices } from '../../../src/io/price-plan.ts';
import { samplePriceFile } from '../../fixtures/price-sample.ts';
import type { PriceSampleOptions } from '../../fixtures/price-sample.ts';
import type { AnalyseOptions } from '../../../src/io/price-validate.ts';
import { runPriceImportInWorker } from '../../../src/io/price-worker-client.ts';
import { deleteBook } from '../../../src/store/idb-store.ts';
import { BookService } from '../../../src/ui/book-service.ts';
import { measureCosting } from '../costing-core.ts';
import { measurePlanning } from '../planning-core.ts';
import { round } from '../stats.ts';
import type { Figures } from '../stats.ts';

const MB = 1_048_576;

/** Heap in use after a full collection (Chromium started with --js-flags=--expose-gc and precise memory info). */
function heapMb(): number {
  const w = window as unknown as { gc?: () => void };
  w.gc?.();
  w.gc?.();
  const memory = (performance as unknown as { memory?: { usedJSHeapSize: number } }).memory;
  return memory ? memory.usedJSHeapSize / MB : Number.NaN;
}

function costing(quick: boolean, naive: boolean): Figures {
  // Progress goes to the console; browser.ts forwards it to the bench's log.
  return measureCosting({ quick, naive, heapMb, log: (text) => console.info(`bench: ${text}`) });
}

function planning(quick: boolean): Figures {
  return measurePlanning({ quick, log: (text) => console.info(`bench: ${text}`) });
}

/** The app's import path, timed from the file's bytes to the change stored in IndexedDB. */
async function importPrices(options: PriceSampleOptions): Promise<Figures> {
  const sample = samplePriceFile(options);
  const dbName = 'rungbook-bench-import';
  await deleteBook(dbName);
  const service = await BookService.open(dbName);
  try {
    const t0 = performance.now();
    const replaced = await service.replaceBook(sample.book);
    if (!replaced.ok) throw new Error(replaced.message);
    const setupMs = performance.now() - t0;
    const book = service.book;
    const supplier = findSupplier(book, sample.supplier);
    if (!supplier) throw new Error('the sample Book lost its supplier');
    const analyse: AnalyseOptions = {
      defaultCurrency: supplier.currency,
      knownCurrencies: knownCurrencies(book),
      today: todayIso(),
    };
    if (supplier.mapping) analyse.mapping = supplier.mapping;

    // The set-up above (the file made in this page, a Book of 75,000 records written through IndexedDB) leaves
    // garbage the import did not make; collected before the clock starts, so a collection the set-up made necessary
    // is not counted as the import's longest task (window.gc: the bench's Chromium exposes it).
    (window as unknown as { gc?: () => void }).gc?.();
    // Long tasks (50 ms or more) on this page's thread while the import runs: the page must stay responsive.
    const long: { start: number; duration: number }[] = [];
    const observer = new PerformanceObserver((list) => {
      for (const e of list.getEntries()) long.push({ start: e.startTime, duration: e.duration });
    });
    observer.observe({ type: 'longtask' });
    const start = performance.now();
    performance.mark('import-start');
    // As the Import page does: the chosen File's bytes, then a copy to the worker.
    const file = new File([sample.bytes as Uint8Array<ArrayBuffer>], sample.fileName, { type: 'text/csv' });
    const bytes = new Uint8Array(await file.arrayBuffer());
    const analysis = await runPriceImportInWorker(bytes.slice(), analyse);
    const read = performance.now();
    performance.mark('import-read');
    const plan = await planImportInSlices(service.book, analysis, {
      supplierId: supplier.id,
      fileName: sample.fileName,
      at: new Date().toISOString(),
      decisions: {},
      validRowsOnly: false,
      allowReimport: false,
    });
    const planned = performance.now();
    performance.mark('import-plan');
    if (!plan.ok || !plan.change) throw new Error(`the sample file was not importable: ${plan.reason ?? 'no plan'}`);
    if (plan.newQuotes !== sample.rows) throw new Error(`only ${plan.newQuotes} of ${sample.rows} rows would be imported`);
    const before = service.book;
    const saved = await service.save(plan.change);
    const stored = performance.now();
    performance.mark('import-end');
    // Let the observer deliver the entries of the last tasks.
    await new Promise((r) => setTimeout(r, 50));
    observer.disconnect();
    if (!saved.ok) throw new Error(saved.message);
    // The save writes to IndexedDB and then applies the change in memory; time the memory half alone (untimed above)
    // so the commit figure can be split between the store and the page.
    const memoryStart = performance.now();
    const again = applyChange(before, plan.change);
    /** The longest task that started between two moments, in ms. */
    const longest = (from: number, to: number): number => round(long.filter((t) => t.start >= from && t.start < to).reduce((m, t) => Math.max(m, t.duration), 0));
    const memoryMs = performance.now() - memoryStart;
    if (!again.ok) throw new Error('the change did not apply in memory a second time');
    return {
      import_browser_rows: sample.rows,
      import_browser_ms: round(stored - start),
      import_browser_read_ms: round(read - start),
      import_browser_plan_ms: round(planned - read),
      import_browser_commit_ms: round(stored - planned),
      import_browser_commit_memory_ms: round(memoryMs),
      import_browser_setup_ms: round(setupMs),
      import_browser_quotes: service.book.quotes.length,
      // Tasks from the import's start on: the one running when it starts is the tail of the setup above.
      import_browser_longest_task_ms: longest(start, Infinity),
      // Which step holds the page longest: reading (in the worker, then the answer's copy), planning, committing.
      import_browser_longest_task_read_ms: longest(start, read),
      import_browser_longest_task_plan_ms: longest(read, planned),
      import_browser_longest_task_commit_ms: longest(planned, Infinity),
    };
  } finally {
    service.close();
    await deleteBook(dbName).catch(() => undefined);
  }
}

export interface BenchPage {
  costing(quick: boolean, naive: boolean): Figures;
  planning(quick: boolean): Figures;
  importPrices(options: PriceSampleOptions): Promise<Figures>;
  heapMb(): number;
}

declare global {
  interface Window {
    rbBench?: BenchPage;
  }
}

window.rbBench = { costing, planning, importPrices, heapMb };
