// Writing the Book as a downloaded Book file, for the Book menu and the Export page. The text is made a slice at a
// time between frames (a large Book takes seconds), and a file the reader would refuse is never offered: every Book
// the app writes must open again.
import type { Book } from '../domain/book.ts';
import { bookFileName, bookFileWriteProblem, serializeBookSliced } from '../io/book-file.ts';

/** The Book as a Book file Blob, or why none was made. */
export async function bookFileBlob(book: Book): Promise<{ ok: true; blob: Blob } | { ok: false; message: string }> {
  const pieces = await serializeBookSliced(book);
  const blob = new Blob(pieces, { type: 'application/json' });
  const problem = bookFileWriteProblem(blob.size);
  return problem ? { ok: false, message: problem } : { ok: true, blob };
}

/** Offers the Book as a download; returns why no file was made, or undefined once the browser has it. */
export async function downloadBookFile(book: Book): Promise<string | undefined> {
  const made = await bookFileBlob(book);
  if (!made.ok) return made.message;
  const url = URL.createObjectURL(made.blob);
  const a = document.createElement('a');
  a.href = url;
  a.download = bookFileName(book);
  a.click();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
  return undefined;
}
