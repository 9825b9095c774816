// The one way a command replaces a Book file: never a good file by one that would be refused.
import { rename, rm, writeFile } from 'node:fs/promises';
import { basename, dirname, join } from 'node:path';
import { COLLECTIONS } from '../domain/book.ts';
import type { Book } from '../domain/book.ts';
import { applyChange } from '../domain/book-ops.ts';
import type { BookChange } from '../domain/book-ops.ts';
import { checkBook } from '../domain/schema.ts';
import { serializeBook } from '../io/book-file.ts';
import { formatProblems, readBookFile } from './book-read.ts';

/**
 * Writes `book` to `path` so that a good file is never replaced by a damaged one: the text goes to a temporary file in
 * the same folder, which is read back with the very reader every command uses and must give a Book with every record;
 * only then is it renamed over `path` (a rename within one folder replaces the file whole). Returns why not, or
 * undefined when written.
 */
export async function writeBookSafely(path: string, book: Book): Promise<string | undefined> {
  const temp = join(dirname(path), `.${basename(path)}.${process.pid}.tmp`);
  try {
    await writeFile(temp, serializeBook(book), 'utf8');
    const back = await readBookFile(temp);
    if (!back.ok) return `the new Book does not read back:\n${formatProblems(back.problems, back.total)}`;
    const lost = COLLECTIONS.filter((c) => back.book[c].length !== book[c].length);
    if (lost.length) return `the new Book reads back with other counts of ${lost.join(', ')}`;
    await rename(temp, path);
    return undefined;
  } catch (e) {
    return `cannot write it: ${e instanceof Error ? e.message : String(e)}`;
  } finally {
    await rm(temp, { force: true });
  }
}

/**
 * Applies a change to a Book read from a file and writes the result to `out` safely. The changed Book must pass the
 * Book's checks first. Returns the Book written, or why nothing was written.
 */
export async function writeChange(book: Book, change: BookChange, out: string): Promise<{ ok: true; book: Book } | { ok: false; why: string }> {
  const next = applyChange(book, change);
  const checked = next.ok ? checkBook(next.book) : undefined;
  if (!checked?.ok) return { ok: false, why: 'the change would leave a Book that does not read' };
  const written = await writeBookSafely(out, checked.value);
  return written ? { ok: false, why: `${out} is as it was: ${written}` } : { ok: true, book: checked.value };
}
