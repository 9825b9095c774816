// A Book file's bytes to a Book: the bytes must be UTF-8 (a byte-order mark is allowed), decoded strictly, never with
// bad bytes silently replaced; then the Book file parser. The app's file reader (book-worker.ts) and every command
// (cli/book-read.ts) read through here, so a file one refuses the other refuses in the same words.
import { parseBookFile } from './book-file.ts';
import type { BookFileResult } from './book-file.ts';
import { utf8Lines } from './price-decode.ts';

/** Why bytes that are not UTF-8 are not a Book file, naming the first line that is not. */
export function notUtf8Problem(bytes: Uint8Array): string {
  const first = utf8Lines(bytes).find((l) => !l.valid);
  return `the file is not UTF-8 text${first ? ` (line ${first.number} is not)` : ''}, so it is not a Book file`;
}

/** Book file bytes to a Book, or the problems. */
export function bookFromBytes(bytes: Uint8Array): BookFileResult {
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    return { ok: false, problems: [{ path: '', message: notUtf8Problem(bytes) }], total: 1 };
  }
  return parseBookFile(text);
}
