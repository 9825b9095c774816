// applyChange: the in-memory twin of the store's apply, with the same revision rules; and the storage helpers'
// feature detection.
import { describe, expect, it } from 'vitest';
import { applyChange } from '../../src/domain/book-ops.ts';
import { requestPersistence, storageEstimate } from '../../src/store/storage.ts';
import { sampleBook } from '../fixtures/sample-book.ts';

describe('applyChange', () => {
  it('bumps revisions, appends new records, removes deleted ones, and leaves the original Book untouched', () => {
    const book = sampleBook();
    const snapshot = structuredClone(book);
    const edited = { ...book.quotes[1]!, moq: 500 };
    const result = applyChange(book, {
      put: { quotes: [edited], suppliers: [{ id: 'sup_c', rev: 0, name: 'Third', currency: 'EUR', notes: '' }] },
      delete: { quotes: ['quote_1'], pages: ['page_1', 'page_missing'] },
    });
    expect(result.ok).toBe(true);
    if (!result.ok) return;
    expect(result.book.quotes).toEqual([{ ...edited, rev: 2 }]);
    expect(result.book.suppliers.map((s) => [s.id, s.rev])).toEqual([
      ['sup_a', 1],
      ['sup_b', 1],
      ['sup_c', 1],
    ]);
    expect(result.book.pages).toEqual([]);
    expect(result.book.parts).toBe(book.parts);
    expect(book).toEqual(snapshot);
  });

  it('refuses a settings save from an old revision', () => {
    const book = sampleBook();
    const result = applyChange(book, { settings: { ...book.settings, rev: 2 } });
    expect(result).toEqual({ ok: false, conflict: { collection: 'settings', recordId: 'settings', storedRev: 3, givenRev: 2 } });
  });

  it('refuses a new record (rev 0) whose id is taken', () => {
    const book = sampleBook();
    const result = applyChange(book, { put: { runs: [{ ...book.runs[0]!, rev: 0 }] } });
    expect(result.ok).toBe(false);
  });
});

describe('storage helpers', () => {
  it('answer undefined where the browser has no storage manager', async () => {
    expect(await requestPersistence(undefined)).toBeUndefined();
    expect(await storageEstimate(undefined)).toBeUndefined();
    expect(await storageEstimate({})).toBeUndefined();
  });

  it('ask for persistence only when not yet persistent, and report usage', async () => {
    let asked = 0;
    const storage = {
      persisted: async () => asked > 0,
      persist: async () => {
        asked++;
        return true;
      },
      estimate: async () => ({ usage: 1_500_000, quota: 300_000_000 }),
    };
    expect(await requestPersistence(storage)).toBe(true);
    expect(await requestPersistence(storage)).toBe(true);
    expect(asked).toBe(1);
    expect(await storageEstimate(storage)).toEqual({ usage: 1_500_000, quota: 300_000_000, persisted: true });
  });

  it('treat a refused persistence request as not persistent', async () => {
    const storage = { persist: () => Promise.reject(new Error('not allowed here')) };
    expect(await requestPersistence(storage)).toBe(false);
  });
});
