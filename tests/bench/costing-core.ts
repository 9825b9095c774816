// The costing measurements of the benchmark, written once and run both in Node (tests/bench/costing.ts) and in
// Chromium (tests/bench/page), so the two columns of the table time the same code on the same family.
import { LARGE_FAMILY, REFERENCE_FAMILY, referenceFamily } from '../fixtures/reference-family.ts';
import { CostingWorkbook } from '../../src/engine/costing.ts';
import type { Resolution } from '../../src/engine/costing.ts';
import type { Book } from '../../src/domain/book.ts';
import { buildNaive } from './naive.ts';
import { planPlain, plainUnitCosts } from './plain.ts';
import { median, round, timeMs } from './stats.ts';
import type { Figures } from './stats.ts';

export interface CostingRunOptions {
  quick: boolean;
  log(text: string): void;
  /** Heap in use after a full collection, in MB, as the host measures it. */
  heapMb(): number;
  /** Also build the naive one-formula-per-cell layout (several seconds per build). */
  naive: boolean;
}

/** Plain loops per timing (see the exchange-rate step). */
const PLAIN_BATCH = 20;

function openOrThrow(book: Book, resolution: Resolution): CostingWorkbook {
  const r = CostingWorkbook.open(book, resolution);
  if (!r.ok) throw new Error(r.error);
  return r.value;
}

/** Edits that matter: the break each of 20 (variant, line) pairs actually buys at, made 3 % cheaper. */
export function priceEdits(wb: CostingWorkbook, book: Book, count: number): { quoteId: string; breakIndex: number; price: number }[] {
  const edits: { quoteId: string; breakIndex: number; price: number }[] = [];
  const quotes = new Map(book.quotes.map((q) => [q.id, q] as const));
  const seen = new Set<string>();
  for (let i = 0; edits.length < count && i < book.variants.length * 4; i++) {
    const v = book.variants[(i * 7) % book.variants.length]!;
    const bom = wb.costedBom(v.id, book.settings.runSizes[i % book.settings.runSizes.length]!);
    if (!bom.ok || bom.value.lines.length === 0) continue;
    const line = bom.value.lines[(i * 13) % bom.value.lines.length]!;
    const q = quotes.get(line.quoteId)!;
    const breakIndex = q.breaks.findIndex((b) => b.qty === line.breakQty);
    const key = `${q.id}:${breakIndex}`;
    if (seen.has(key)) continue;
    seen.add(key);
    edits.push({ quoteId: q.id, breakIndex, price: Math.round(line.unitPrice * 0.97 * 10_000) / 10_000 });
  }
  return edits;
}

/** Engine unit costs in the plain loop's order (variant-major, then run size). */
export function engineUnitCosts(wb: CostingWorkbook): Float64Array {
  return Float64Array.from(wb.allUnitCosts().map((r) => r.unitCost));
}

/** open, edit, global change against the plain loop, optionally the naive layout, and the large family. */
export function measureCosting({ quick, log, heapMb, naive }: CostingRunOptions): Figures {
  const f: Figures = {};
  let t = performance.now();
  const ref = referenceFamily(REFERENCE_FAMILY);
  f['gen_ms'] = round(performance.now() - t);
  f['family'] = `${REFERENCE_FAMILY.variants} variants × ${REFERENCE_FAMILY.lines} lines × ${REFERENCE_FAMILY.breaks} breaks × ${REFERENCE_FAMILY.runSizes.length} run sizes`;

  log('costing: open');
  let wb: CostingWorkbook | undefined;
  const opens: number[] = [];
  for (let i = 0; i < (quick ? 4 : 8); i++) {
    wb?.close();
    opens.push(timeMs(() => (wb = openOrThrow(ref.book, ref.resolution))));
    // Reading every unit cost is part of "open" (data to every unit cost computed).
    opens[i]! += timeMs(() => wb!.allUnitCosts());
  }
  f['open_cold_ms'] = round(opens[0]!);
  f['open_ms'] = round(median(opens.slice(1)));
  f['formulas'] = wb!.formulaCount();

  log('costing: price edits');
  const edits = priceEdits(wb!, ref.book, 20);
  const editTimes: number[] = [];
  const changed: number[] = [];
  for (const e of edits) {
    let n = 0;
    editTimes.push(
      timeMs(() => {
        const r = wb!.setQuotePrice(e.quoteId, e.breakIndex, e.price);
        if (!r.ok) throw new Error(r.error);
        n = r.value.length;
      }),
    );
    changed.push(n);
  }
  f['edit_ms'] = round(median(editTimes), 2);
  f['edit_max_ms'] = round(Math.max(...editTimes), 2);
  f['edit_changed_costs'] = median(changed);

  log('costing: exchange rate against the plain loop');
  const rates = { ...ref.book.settings.rates };
  const globals: number[] = [];
  const plains: number[] = [];
  const rounds = quick ? 7 : 21;
  let equal = true;
  // The plain loop runs on the edited prices too: copy the edits into its Book.
  const edited: Book = structuredClone(ref.book);
  for (const e of edits) edited.quotes.find((q) => q.id === e.quoteId)!.breaks[e.breakIndex]!.price = e.price;
  const editedPlan = planPlain(edited, ref.resolution);
  for (let i = 0; i < rounds; i++) {
    const usd = i % 2 ? 0.9213 : 0.9513;
    rates['USD'] = usd;
    globals.push(
      timeMs(() => {
        const r = wb!.setRate('USD', usd);
        if (!r.ok) throw new Error(r.error);
      }),
    );
    // The loop takes well under a millisecond and browsers round performance.now() to 0.1 ms: time a batch of
    // loops and divide, in Node too, so both columns measure alike.
    let plain: Float64Array = new Float64Array();
    plains.push(
      timeMs(() => {
        for (let k = 0; k < PLAIN_BATCH; k++) plain = plainUnitCosts(editedPlan, edited, rates);
      }) / PLAIN_BATCH,
    );
    const engine = engineUnitCosts(wb!);
    if (engine.length !== plain.length || engine.some((u, k) => Math.round(u * 100) !== Math.round(plain[k]! * 100))) equal = false;
  }
  f['global_ms'] = round(median(globals), 2);
  f['plain_ms'] = round(median(plains), 3);
  f['engine_vs_plain'] = round(median(globals) / median(plains), 1);
  f['plain_equals_engine'] = equal;
  wb!.close();

  if (naive) {
    log('costing: naive layout (one ordinary formula per cost cell)');
    const naiveTimes: number[] = [];
    for (let i = 0; i < (quick ? 1 : 2); i++) {
      let cells = 0;
      naiveTimes.push(
        timeMs(() => {
          const n = buildNaive(ref.book, ref.resolution, ref.book.settings.runSizes[1] ?? ref.book.settings.runSizes[0]!);
          for (const c of n.cells) if (typeof n.hf.getCellValue(c) === 'number') cells++;
          f['naive_formulas'] = n.hf.getSheetNames().reduce((s, name) => s + n.hf.getSheetFormulas(n.hf.getSheetId(name)!).flat().filter((x) => x !== undefined).length, 0);
          n.hf.destroy();
        }),
      );
      f['naive_unit_costs'] = cells;
    }
    f['naive_open_ms'] = round(median(naiveTimes));
    f['naive_note'] = 'one run size, no buy-up: less work than the workbook, so open_vs_naive is conservative';
    f['open_vs_naive'] = round((f['open_ms'] as number) / (f['naive_open_ms'] as number), 3);
  }

  log('costing: large family');
  const large = referenceFamily(LARGE_FAMILY);
  f['large_family'] = `${LARGE_FAMILY.variants} variants × ${LARGE_FAMILY.lines} lines`;
  const before = heapMb();
  t = performance.now();
  const big = openOrThrow(large.book, large.resolution);
  big.allUnitCosts();
  f['large_open_ms'] = round(performance.now() - t);
  f['large_heap_mb'] = round(heapMb(), 1);
  f['large_heap_workbook_mb'] = round((f['large_heap_mb'] as number) - before, 1);
  f['large_formulas'] = big.formulaCount();
  big.close();
  return f;
}
