// The one order variants are listed in on every page: by code, digits read as numbers (FR4-60 before FR4-100),
// letters compared without regard to case, the id breaking a tie, so a new variant takes its place at once and
// stays there after a reload instead of coming last (or wherever its random id falls).
import type { Book, Variant } from './book.ts';

const collator = new Intl.Collator('en', { numeric: true, sensitivity: 'base' });

/** Compares two variants in the Book's order. */
export function compareVariants(a: Variant, b: Variant): number {
  return collator.compare(a.code, b.code) || (a.code < b.code ? -1 : a.code > b.code ? 1 : 0) || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0);
}

/** The variants in the Book's order, as a new list. */
export function sortVariants(variants: readonly Variant[]): Variant[] {
  return [...variants].sort(compareVariants);
}

/** The Book with its variants in order; the same object when they already are. */
export function inVariantOrder(book: Book): Book {
  const v = book.variants;
  for (let i = 1; i < v.length; i++) {
    if (compareVariants(v[i - 1]!, v[i]!) > 0) return { ...book, variants: sortVariants(v) };
  }
  return book;
}
