// Pure quote rules: which quotes are current, how a newer quote supersedes an older one, undoing an import batch,
// spotting a re-import, and applying a record change to an in-memory Book (the CLI's stand-in for a store write).
import type { Book, ImportBatch, Part, Quote, Supplier } from './book.ts';

/**
 * Records to write and ids to delete, in the same shape as the store's BookChange (src/store/types.ts) so the UI can
 * hand it to `store.apply` as one transaction. Put records carry the revision they were read at (new ones 0).
 */
export interface QuoteChange {
  put: {
    parts?: Part[];
    suppliers?: Supplier[];
    quotes?: Quote[];
    importBatches?: ImportBatch[];
  };
  delete: {
    quotes?: string[];
  };
}

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

export type UndoResult = { ok: true; change: QuoteChange } | { ok: false; reason: string };

/**
 * Undoing a batch deletes the quotes it created and restores the ones it superseded. Refused when a later batch has
 * already superseded this batch's quotes: undoing out of order would leave two current quotes for one part.
 */
export function undoBatch(book: Book, batchId: string): UndoResult {
  const batch = book.importBatches.find((b) => b.id === batchId);
  if (!batch) return { ok: false, reason: `no import batch with id ${batchId}` };
  if (batch.undone) return { ok: false, reason: `import batch ${batchId} (${batch.fileName}) was already undone` };
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

export type ApplyResult = { ok: true; book: Book } | { ok: false; reason: string };

/**
 * Applies a change to a Book held in memory, with the store's rules: each put record carries the revision it was read
 * at and is stored with rev + 1; a stale revision refuses the whole change. Returns a new Book; the input is untouched.
 */
export function applyChange(book: Book, change: QuoteChange): ApplyResult {
  const next: Book = { ...book };
  const collections = ['parts', 'suppliers', 'quotes', 'importBatches'] as const;
  for (const name of collections) {
    const puts = change.put[name] ?? [];
    const deletes = name === 'quotes' ? new Set(change.delete.quotes ?? []) : new Set<string>();
    if (puts.length === 0 && deletes.size === 0) continue;
    const list: { id: string; rev: number }[] = book[name];
    const position = new Map(list.map((r, i) => [r.id, i] as const));
    const out: { id: string; rev: number }[] = list.slice();
    for (const rec of puts as { id: string; rev: number }[]) {
      const at = position.get(rec.id);
      if (at === undefined) {
        if (rec.rev !== 0) return { ok: false, reason: `${name} record ${rec.id} is not in the Book (revision ${rec.rev})` };
        position.set(rec.id, out.length);
        out.push({ ...rec, rev: 1 });
      } else {
        const stored = out[at]!;
        if (stored.rev !== rec.rev) {
          return {
            ok: false,
            reason: `${name} record ${rec.id} was changed elsewhere (stored revision ${stored.rev}, yours ${rec.rev})`,
          };
        }
        out[at] = { ...rec, rev: rec.rev + 1 };
      }
    }
    (next as unknown as Record<string, unknown>)[name] = deletes.size ? out.filter((r) => !deletes.has(r.id)) : out;
  }
  return { ok: true, book: next };
}
