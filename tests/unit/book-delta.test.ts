// The figures worker holds a copy of the Book and is sent only what changed (bookDelta). Whatever the page did in
// between — saves, deletes, a record deleted and added back, undo — the copy brought forward equals the Book.
import { describe, expect, it } from 'vitest';
import type { Book } from '../../src/domain/book.ts';
import { applyBookDelta, applyChange, bookDelta } from '../../src/domain/book-ops.ts';
import type { BookChange } from '../../src/domain/book-ops.ts';
import { demoBook } from '../../src/domain/demo-book.ts';

function apply(book: Book, change: BookChange): Book {
  const r = applyChange(book, change);
  if (!r.ok) throw new Error(`conflict on ${r.conflict.recordId}`);
  return r.book;
}

/** A small deterministic generator, so a failure can be run again. */
function random(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s * 1664525 + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
}

describe('bookDelta', () => {
  it('sends nothing for an unchanged Book and only the saved record for one save', () => {
    const book = demoBook();
    expect(bookDelta(book, book)).toEqual({ collections: {} });
    const q = book.quotes[3]!;
    const next = apply(book, { put: { quotes: [{ ...q, moq: q.moq + 1 }] } });
    const delta = bookDelta(book, next);
    expect(Object.keys(delta.collections)).toEqual(['quotes']);
    expect(delta.collections.quotes).toEqual({ put: [next.quotes[3]], delete: [] });
    expect(delta.settings).toBeUndefined();
    expect(applyBookDelta(book, delta)).toStrictEqual(next);
  });

  it('sends the whole list when a record deleted and added back lands in another place', () => {
    const book = demoBook();
    const v = book.variants[0]!;
    const gone = apply(book, { delete: { variants: [v.id] } });
    const back = apply(gone, { put: { variants: [{ ...v, rev: 0 }] } });
    const delta = bookDelta(book, back);
    expect(delta.collections.variants).toEqual({ all: back.variants });
    expect(applyBookDelta(book, delta).variants.map((x) => x.id)).toEqual(back.variants.map((x) => x.id));
  });

  it('brings a copy forward over any run of saves, deletes and settings edits (200 random runs)', () => {
    for (let seed = 1; seed <= 200; seed++) {
      const rnd = random(seed);
      const pick = <T>(list: readonly T[]): T => list[Math.floor(rnd() * list.length)]!;
      // The page's Book, the Book it last sent, and the worker's copy (records copied, as postMessage does).
      let book = demoBook();
      let sent = book;
      let copy = structuredClone(book);
      const send = (): void => {
        copy = applyBookDelta(copy, structuredClone(bookDelta(sent, book)));
        sent = book;
      };
      const steps = 1 + Math.floor(rnd() * 6);
      for (let i = 0; i < steps; i++) {
        const roll = rnd();
        if (roll < 0.3 && book.quotes.length) {
          const q = pick(book.quotes);
          book = apply(book, { put: { quotes: [{ ...q, moq: q.moq + 1 }] } });
        } else if (roll < 0.5 && book.variants.length > 1) {
          book = apply(book, { delete: { variants: [pick(book.variants).id] } });
        } else if (roll < 0.7) {
          const p = pick(book.parts);
          book = apply(book, { put: { parts: [{ ...p, id: `part_new_${seed}_${i}`, rev: 0, mpn: `NEW-${seed}-${i}` }] } });
        } else if (roll < 0.85) {
          book = apply(book, { settings: { ...book.settings, overheadPct: book.settings.overheadPct + 1 } });
        } else {
          // Undo of a delete: the record comes back with its old revision, at the end of the list.
          const v = pick(book.variants);
          const without = apply(book, { delete: { variants: [v.id] } });
          book = apply(without, { put: { variants: [{ ...v, rev: 0 }] } });
        }
        // Half the time the copy is brought forward after each step, otherwise after several at once.
        if (rnd() < 0.5) send();
      }
      send();
      expect(copy, `seed ${seed}`).toStrictEqual(book);
    }
  });
});
