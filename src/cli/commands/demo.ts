// `rungbook demo --out FILE`: writes the invented demo Book, with the built-in checks, as a Book file.
import { access, rename, rm, writeFile } from 'node:fs/promises';
import { basename, dirname, join } from 'node:path';
import { demoBook } from '../../domain/demo-book.ts';
import type { Book } from '../../domain/book.ts';
import { addBuiltInChecks } from '../../engine/check-sheets.ts';
import { parseBookFile, serializeBook } from '../../io/book-file.ts';
import { parseArgs } from '../command.ts';
import type { CliCommand, CliIo } from '../command.ts';
import { formatProblems } from '../book-read.ts';
import { loadBuiltInChecks } from '../check-sheets-fs.ts';
import { MAINS_CAUTION } from './info.ts';

const HELP = `usage: rungbook demo --out FILE [--force]

Writes the demo Book (an invented firm, its suppliers, parts, quotes and regulator variants, with the built-in
checks) as a Book file. An existing file is left alone unless --force is given.

options:
  --out FILE   where to write (for example demo.rungbook.json)
  --force      overwrite FILE if it exists`;

/** The demo Book as the app starts it: the demo data plus the built-in checks from sheets/. */
export function demoBookWithChecks(): Book {
  return addBuiltInChecks(demoBook(), loadBuiltInChecks());
}

async function exists(path: string): Promise<boolean> {
  try {
    await access(path);
    return true;
  } catch {
    return false;
  }
}

export const command: CliCommand = {
  name: 'demo',
  help: HELP,
  async run(args: string[], io: CliIo): Promise<number> {
    const { positional, options } = parseArgs(args, { flags: ['force'], values: ['out'] });
    const out = options.get('out');
    if (typeof out !== 'string' || out === '' || positional.length > 0) {
      io.err(`rungbook demo: give the file to write with --out FILE\n\n${HELP}`);
      return 2;
    }
    if (!options.has('force') && (await exists(out))) {
      io.err(`rungbook demo: ${out} already exists; give --force to overwrite it`);
      return 1;
    }
    const book = demoBookWithChecks();
    const text = serializeBook(book);
    // The file must read back: a demo Book that fails its own validation is a defect, and nothing is written.
    const check = parseBookFile(text);
    if (!check.ok) {
      io.err(`rungbook demo: the demo Book does not pass validation, nothing written:\n${formatProblems(check.problems, check.total)}`);
      return 1;
    }
    // Write beside the target and rename, so a failed write never leaves half a file under the real name.
    const temp = join(dirname(out), `.${basename(out)}.${process.pid}.tmp`);
    try {
      await writeFile(temp, text, 'utf8');
      await rename(temp, out);
    } catch (e) {
      await rm(temp, { force: true });
      io.err(`rungbook demo: could not write ${out}: ${e instanceof Error ? e.message : String(e)}`);
      return 1;
    }
    io.out(
      `wrote ${out}: ${book.parts.length} parts, ${book.suppliers.length} suppliers, ${book.quotes.length} quotes, ` +
        `${book.variants.length} variants (${book.variants.map((v) => v.code).join(', ')}), ${book.checks.length} checks\n\n${MAINS_CAUTION}`,
    );
    return 0;
  },
};
