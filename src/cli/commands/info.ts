// `rungbook info FILE`: what a Book file holds (counts and a summary), or why it cannot be read.
import { readFile, stat } from 'node:fs/promises';
import { COLLECTIONS } from '../../domain/book.ts';
import type { Book, CollectionName } from '../../domain/book.ts';
import { bookFileSizeProblem, parseBookFile } from '../../io/book-file.ts';
import type { BookFileProblem, BookFileResult } from '../../io/book-file.ts';
import { parseArgs } from '../command.ts';
import type { CliCommand, CliIo } from '../command.ts';

export const MAINS_CAUTION =
  'Caution: mains regulators are live, non-isolated circuits that can kill. These figures are a design aid, not a ' +
  "certification; follow local electrical codes and have a qualified person review the design.";

const LABELS: Record<CollectionName, string> = {
  parts: 'parts',
  suppliers: 'suppliers',
  quotes: 'quotes',
  variants: 'variants',
  buildLines: 'build lines',
  checks: 'checks',
  runs: 'runs',
  importBatches: 'import batches',
  pages: 'notebook pages',
};

const HELP = `usage: rungbook info FILE [--json]

Reads a Book file (.rungbook.json), checks all of it, and prints what it holds: counts of parts, suppliers,
quotes, variants, build lines, checks, runs, import batches and pages, and a summary (book name, company, base
currency, currencies with their rates, variant codes). A file that cannot be used is refused with its first
problems, each with its place in the file; the exit status is then 1.

options:
  --json   print the counts and summary as JSON`;

/** Reads and validates a Book file from disk; the size is checked before anything is read. */
export async function readBookFile(path: string): Promise<BookFileResult> {
  let size: number;
  try {
    const s = await stat(path);
    if (!s.isFile()) return refuse(`${path} is not a file`);
    size = s.size;
  } catch (e) {
    return refuse(`cannot read ${path}: ${(e as NodeJS.ErrnoException).code === 'ENOENT' ? 'no such file' : String(e)}`);
  }
  const tooBig = bookFileSizeProblem(size);
  if (tooBig) return { ok: false, problems: [tooBig], total: 1 };
  const bytes = await readFile(path);
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    return refuse('the file is not UTF-8 text, so it is not a Book file');
  }
  return parseBookFile(text);
}

function refuse(message: string): BookFileResult {
  return { ok: false, problems: [{ path: '', message }], total: 1 };
}

/** The problems of a refused file, one per line, with a count of those not listed. */
export function formatProblems(problems: readonly BookFileProblem[], total: number): string {
  const lines = problems.map((p) => (p.path ? `  ${p.path}: ${p.message}` : `  ${p.message}`));
  if (total > problems.length) lines.push(`  … and ${total - problems.length} more problem${total - problems.length === 1 ? '' : 's'}`);
  return lines.join('\n');
}

export interface BookSummary {
  bookName: string;
  company: string;
  savedAt?: string;
  baseCurrency: string;
  /** Currency → units of base currency per unit. */
  rates: Record<string, number>;
  variantCodes: string[];
  counts: Record<CollectionName, number>;
}

export function summarize(book: Book, savedAt?: string): BookSummary {
  const counts = {} as Record<CollectionName, number>;
  for (const c of COLLECTIONS) counts[c] = book[c].length;
  const summary: BookSummary = {
    bookName: book.settings.bookName,
    company: book.settings.company,
    baseCurrency: book.settings.baseCurrency,
    rates: { ...book.settings.rates },
    variantCodes: book.variants.map((v) => v.code),
    counts,
  };
  if (savedAt !== undefined) summary.savedAt = savedAt;
  return summary;
}

export function formatSummary(s: BookSummary): string {
  const base = s.baseCurrency;
  const others = Object.keys(s.rates)
    .filter((c) => c !== base)
    .sort()
    .map((c) => `${c} at ${s.rates[c]} ${base}`);
  const rows: [string, string][] = [
    ['book', s.bookName],
    ['company', s.company || '(none)'],
    ...(s.savedAt ? ([['saved', s.savedAt]] as [string, string][]) : []),
    ['base currency', base],
    ['currencies', [`${base} (base)`, ...others].join(', ')],
    ['variant codes', s.variantCodes.length ? s.variantCodes.join(', ') : '(none)'],
    ['', ''],
    ...COLLECTIONS.map((c): [string, string] => [LABELS[c], String(s.counts[c])]),
  ];
  const width = Math.max(...rows.map(([k]) => k.length));
  return rows.map(([k, v]) => (k ? `${k.padEnd(width)}  ${v}` : '')).join('\n');
}

export const command: CliCommand = {
  name: 'info',
  help: HELP,
  async run(args: string[], io: CliIo): Promise<number> {
    const { positional, options } = parseArgs(args, { flags: ['json'] });
    if (positional.length !== 1) {
      io.err(`rungbook info: give exactly one Book file\n\n${HELP}`);
      return 2;
    }
    const file = positional[0]!;
    const result = await readBookFile(file);
    if (!result.ok) {
      io.err(`rungbook info: ${file} cannot be used as a Book file:\n${formatProblems(result.problems, result.total)}`);
      return 1;
    }
    const summary = summarize(result.book, result.savedAt);
    if (options.has('json')) io.out(JSON.stringify(summary, null, 2));
    else io.out(`${formatSummary(summary)}\n\n${MAINS_CAUTION}`);
    return 0;
  },
};
