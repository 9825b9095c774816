// Pure quote rules: which quotes are current, how a newer quote supersedes an older one, undoing an import batch
// and spotting a re-import. Changes come back as BookChange, for store.apply or applyChange in book-ops.ts.
import type { Book, ImportBatch, Quote } from './book.ts';
import type { BookChange } from './book-ops.ts';
import { reverseCount } from './stock.ts';

/** A quote is current until a newer one for the same part and supplier supersedes it. */
export function isCurrent(q: Quote): boolean {
  return q.supersededBy === undefined;
}

function pairKey(partId: string, supplierId: string): string {
  return `${partId}\u0000${supplierId}`;
}

/** Current quotes indexed by part and supplier, for superseding many quotes in one pass. */
export function currentQuoteIndex(quotes: readonly Quote[]): Map<string, Quote[]> {
  const index = new Map<string, Quote[]>();
  for (const q of quotes) {
    if (!isCurrent(q)) continue;
    const k = pairKey(q.partId, q.supplierId);
    const list = index.get(k);
    if (list) list.push(q);
    else index.set(k, [q]);
  }
  return index;
}

/**
 * The old quotes a new quote replaces: every current quote for the same part and supplier, returned as updated copies
 * with `supersededBy` set (kept, not deleted, so their price and date stay in the history).
 */
export function supersede(index: Map<string, Quote[]>, fresh: Quote): Quote[] {
  const old = index.get(pairKey(fresh.partId, fresh.supplierId)) ?? [];
  return old.filter((q) => q.id !== fresh.id).map((q) => ({ ...q, supersededBy: fresh.id }));
}

/** The batch that already imported this exact file for this supplier and was not undone, if any. */
export function findReimport(book: Book, hash: string, supplierId: string): ImportBatch | undefined {
  return book.importBatches.find((b) => b.hash === hash && b.supplierId === supplierId && !b.undone);
}

export type UndoResult = { ok: true; change: BookChange } | { ok: false; reason: string };

/**
 * Undoing a price batch deletes the quotes it created and restores the ones it superseded; undoing a stock count
 * writes a reversing movement for each counted movement it wrote, keeping both. Refused when a later batch has
 * already superseded this batch's quotes: undoing out of order would leave two current quotes for one part.
 */
export function undoBatch(book: Book, batchId: string): UndoResult {
  const batch = book.importBatches.find((b) => b.id === batchId);
  if (!batch) return { ok: false, reason: `no import batch with id ${batchId}` };
  if (batch.undone) return { ok: false, reason: `import batch ${batchId} (${batch.fileName}) was already undone` };
  if (batch.kind === 'stock count') {
    // Stock is a ledger: the count's movements stay, each reversed on its own date (domain/stock.ts).
    return { ok: true, change: { put: { stockMoves: reverseCount(book, batch), importBatches: [{ ...batch, undone: true }] } } };
  }
  const created = new Set(batch.created);
  const byId = new Map(book.quotes.map((q) => [q.id, q] as const));
  for (const id of batch.created) {
    const q = byId.get(id);
    if (q?.supersededBy !== undefined && !created.has(q.supersededBy)) {
      const later = book.importBatches.find((b) => !b.undone && b.created.includes(q.supersededBy!));
      const what = later ? `import batch ${later.id} (${later.fileName})` : `quote ${q.supersededBy}`;
      return { ok: false, reason: `a later ${what} replaced quotes of this batch; undo that one first` };
    }
  }
  const restored: Quote[] = [];
  for (const id of batch.superseded) {
    const q = byId.get(id);
    if (!q) continue; // deleted by hand since: nothing to restore
    const { supersededBy, ...rest } = q;
    // Only restore quotes this batch superseded; one replaced again by hand stays as it is.
    if (supersededBy !== undefined && created.has(supersededBy)) restored.push(rest);
  }
  return {
    ok: true,
    change: {
      put: { quotes: restored, importBatches: [{ ...batch, undone: true }] },
      delete: { quotes: batch.created.filter((id) => byId.has(id)) },
    },
  };
}
