// The Book every sharing measurement loads: the bench's reference family (200 variants) with its quotes repeated up
// to the count asked for (hugeBook, as the Book file bench makes its largest Book).
import type { Book } from '../../src/domain/book.ts';
import { hugeBook } from '../../tests/bench/book-file.ts';

export const SHARED_BOOK_QUOTES = 100_000;

export function sharedBook(quotes: number = SHARED_BOOK_QUOTES): Book {
  return hugeBook(quotes);
}
