// `rungbook info FILE`: what a Book file holds (counts and a summary), or why it cannot be read.
import { COLLECTIONS } from '../../domain/book.ts';
import type { Book, CollectionName } from '../../domain/book.ts';
import { MAINS_CAUTION_LINE } from '../../domain/mains-caution.ts';
import { loadBook } from '../book-read.ts';
import { parseArgs } from '../command.ts';
import type { CliCommand, CliIo } from '../command.ts';
import { jsonText, shown } from '../terminal.ts';

// The commands print the one caution text (domain/mains-caution.ts), named by its first word.
export const MAINS_CAUTION = MAINS_CAUTION_LINE;

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
  priceLists: 'price lists',
  orders: 'orders',
  stockMoves: 'stock moves',
};

const HELP = `usage: rungbook info FILE [--json]

Reads a Book file (.rungbook.json), checks all of it, and prints what it holds: counts of parts, suppliers,
quotes, variants, build lines, checks, runs, import batches, pages, orders and stock movements, and a summary
(book name, company, base currency, currencies with their rates, variant codes). A file that cannot be used is
refused with its first problems, each with its place in the file; the exit status is then 1.

options:
  --json   print the counts and summary as JSON`;

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
    .map((c) => `${shown(c)} at ${s.rates[c]} ${shown(base)}`);
  // Every name and code comes from the file: shown with its control characters made visible.
  const rows: [string, string][] = [
    ['book', shown(s.bookName)],
    ['company', shown(s.company) || '(none)'],
    ...(s.savedAt ? ([['saved', shown(s.savedAt)]] as [string, string][]) : []),
    ['base currency', shown(base)],
    ['currencies', [`${shown(base)} (base)`, ...others].join(', ')],
    ['variant codes', s.variantCodes.length ? s.variantCodes.map(shown).join(', ') : '(none)'],
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
    const result = await loadBook('info', positional[0]!, io);
    if (!result) return 1;
    const summary = summarize(result.book, result.savedAt);
    if (options.has('json')) io.out(jsonText(summary));
    else io.out(`${formatSummary(summary)}\n\n${MAINS_CAUTION}`);
    return 0;
  },
};
