// The one order of variants on every page (domain/variant-order.ts).
import { describe, expect, it } from 'vitest';
import type { Book, Variant } from '../../src/domain/book.ts';
import { emptyBook } from '../../src/domain/book.ts';
import { inVariantOrder, sortVariants } from '../../src/domain/variant-order.ts';

const v = (id: string, code: string): Variant => ({ id, rev: 1, code, name: code, params: {} });

describe('variant order', () => {
  it('sorts by code with numbers read as numbers and case ignored, the id breaking a tie', () => {
    const list = [v('b', 'FR4-100'), v('a', 'fr4-60'), v('c', 'FR3-40'), v('z', 'FR4-60-copy')];
    expect(sortVariants(list).map((x) => x.code)).toEqual(['FR3-40', 'fr4-60', 'FR4-60-copy', 'FR4-100']);
  });

  it('gives the same Book back when its variants are already in order', () => {
    const book: Book = { ...emptyBook(), variants: [v('a', 'A1'), v('b', 'A2')] };
    expect(inVariantOrder(book)).toBe(book);
    const shuffled: Book = { ...book, variants: [book.variants[1]!, book.variants[0]!] };
    expect(inVariantOrder(shuffled).variants.map((x) => x.code)).toEqual(['A1', 'A2']);
  });
});
