// The one way every command reads a Book file from disk: size first, then the bytes as UTF-8 text (refused, with the
// first line that is not, when they are not UTF-8), then the Book file parser (io/book-bytes.ts, shared with the
// app's file reader). What one command refuses, all refuse, and the app too.
import { readFile, stat } from 'node:fs/promises';
import type { Book } from '../domain/book.ts';
import { bookFromBytes } from '../io/book-bytes.ts';
import { bookFileSizeProblem } from '../io/book-file.ts';
import type { BookFileProblem, BookFileResult } from '../io/book-file.ts';
import type { CliIo } from './command.ts';

function refuse(message: string): BookFileResult {
  return { ok: false, problems: [{ path: '', message }], total: 1 };
}

function reason(e: unknown): string {
  const code = (e as NodeJS.ErrnoException).code;
  if (code === 'ENOENT') return 'no such file';
  if (code === 'EACCES' || code === 'EPERM') return 'permission denied';
  return e instanceof Error ? e.message : String(e);
}

/** Reads and validates a Book file from disk; the size is checked before anything is read. */
export async function readBookFile(path: string): Promise<BookFileResult> {
  let size: number;
  try {
    const s = await stat(path);
    if (!s.isFile()) return refuse(`${path} is not a file`);
    size = s.size;
  } catch (e) {
    return refuse(`cannot read ${path}: ${reason(e)}`);
  }
  const tooBig = bookFileSizeProblem(size);
  if (tooBig) return { ok: false, problems: [tooBig], total: 1 };
  let bytes: Uint8Array;
  try {
    bytes = await readFile(path);
  } catch (e) {
    return refuse(`cannot read ${path}: ${reason(e)}`);
  }
  return bookFromBytes(bytes);
}

/** The problems of a refused file, one per line, with a count of those not listed. */
export function formatProblems(problems: readonly BookFileProblem[], total: number): string {
  const lines = problems.map((p) => (p.path ? `  ${p.path}: ${p.message}` : `  ${p.message}`));
  if (total > problems.length) lines.push(`  … and ${total - problems.length} more problem${total - problems.length === 1 ? '' : 's'}`);
  return lines.join('\n');
}

/** Reads a Book file for command `name`; a refused file is reported on stderr in the same words by every command. */
export async function loadBook(name: string, path: string, io: CliIo): Promise<{ book: Book; savedAt?: string } | undefined> {
  const read = await readBookFile(path);
  if (!read.ok) {
    io.err(`rungbook ${name}: ${path} cannot be used as a Book file:\n${formatProblems(read.problems, read.total)}`);
    return undefined;
  }
  return read;
}
