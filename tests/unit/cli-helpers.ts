// Shared pieces of the CLI tests: main() run with its output captured, and Book files written for it to read.
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { main } from '../../src/cli/main.ts';
import type { CliIo } from '../../src/cli/command.ts';
import type { Book } from '../../src/domain/book.ts';
import { serializeBook } from '../../src/io/book-file.ts';

export interface CapturedIo extends CliIo {
  stdout: string;
  stderr: string;
}

/** Captures stdout and stderr as the bytes the real process would write (UTF-8, a newline added only when missing). */
export function captureIo(): CapturedIo {
  const io = {
    stdout: '',
    stderr: '',
    out(text: string) {
      io.stdout += text.endsWith('\n') ? text : text + '\n';
    },
    err(text: string) {
      io.stderr += text.endsWith('\n') ? text : text + '\n';
    },
  };
  return io;
}

/** Runs the CLI on `argv`; each stream is the lines it was given, joined by newlines. */
export async function runCli(argv: string[]): Promise<{ code: number; out: string; err: string }> {
  const out: string[] = [];
  const err: string[] = [];
  const code = await main(argv, { out: (t) => out.push(t), err: (t) => err.push(t) });
  return { code, out: out.join('\n'), err: err.join('\n') };
}

/** Writes `book` as a Book file named `name` in `dir` and gives its path. */
export function writeBook(dir: string, name: string, book: Book): string {
  const file = join(dir, name);
  writeFileSync(file, serializeBook(book));
  return file;
}
