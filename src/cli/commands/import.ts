// `rungbook import`: brings a supplier price file into a Book file, all rows or none, with the app's own import code.
import { readFile, rename, writeFile } from 'node:fs/promises';
import { basename } from 'node:path';
import { parseBookFile, serializeBook } from '../../io/book-file.ts';
import { parseColumnMapping } from '../../io/price-map.ts';
import type { PriceProblem } from '../../io/price-map.ts';
import { importPrices } from '../../io/price-import.ts';
import type { ImportPricesOptions, ImportSummary } from '../../io/price-import.ts';
import { parseArgs } from '../command.ts';
import type { CliCommand, CliIo } from '../command.ts';

const HELP = `usage: rungbook import BOOK.rungbook.json PRICES.csv --supplier NAME [options]

Imports a supplier price file into the Book: every row is checked first, and on any problem nothing is written
(row errors go to stderr, exit status 1). Otherwise the new Book is written and a summary printed.

options:
  --supplier NAME      supplier the prices come from (name or id; required)
  --mapping MAP.json   column mapping to use instead of the supplier's saved one
                       ({"columns": {"mpn": "Part No", "price": "Unit Price", ...}, "layout": "long"})
  --out NEW.json       write the new Book here instead of replacing BOOK
  --valid-rows-only    import the rows without problems even when other rows have some
  --create-parts       create a new part for each row whose part is not in the Book (default: skip them)
  --decimal point|comma  decimal mark of the numbers, when the file cannot tell
  --allow-reimport     import a file already imported for this supplier`;

function formatProblem(p: PriceProblem): string {
  const where = p.row > 0 ? `line ${p.row}` : 'file';
  const col = p.column ? `, column "${p.column}"` : '';
  const value = p.value ? `, value "${p.value.length > 60 ? p.value.slice(0, 57) + '...' : p.value}"` : '';
  return `${where}${col}${value}: ${p.reason}`;
}

function formatSummary(s: ImportSummary, outPath: string): string {
  const lines = [
    `imported ${s.fileName} for ${s.supplier} into ${outPath}`,
    `  read: ${s.encoding}, ${s.delimiter}-separated, header on line ${s.headerLine}, ${s.dataRows} data row(s), ${s.layout} layout`,
    `  numbers: ${s.decimal}`,
    `  columns: ${Object.entries(s.columns).map(([k, v]) => `${k}="${v}"`).join(', ')}`,
    `  matched: ${s.matchedByMpn} by maker part number, ${s.matchedByCode} by supplier code`,
    `  quotes: ${s.newQuotes} new, ${s.supersededQuotes} older superseded (kept in history); ${s.newParts} new part(s)`,
  ];
  if (s.rejectedOffers) lines.push(`  left out: ${s.rejectedOffers} offer(s) with problems (--valid-rows-only)`);
  const skipped = s.unmatched.filter((u) => u.decision === 'skip');
  if (skipped.length) {
    lines.push(`  skipped, no such part in the Book (use --create-parts to add them): ${skipped.length}`);
    for (const u of skipped.slice(0, 20)) lines.push(`    line ${u.line}: ${u.mpn || u.supplierCode}${u.note ? ` (${u.note})` : ''}`);
    if (skipped.length > 20) lines.push(`    … and ${skipped.length - 20} more`);
  }
  for (const n of s.notes) lines.push(`  note: ${n}`);
  if (s.batchId) lines.push(`  batch: ${s.batchId}`);
  return lines.join('\n');
}

async function run(args: string[], io: CliIo): Promise<number> {
  let parsed;
  try {
    parsed = parseArgs(args, {
      flags: ['valid-rows-only', 'create-parts', 'allow-reimport'],
      values: ['supplier', 'mapping', 'out', 'decimal'],
    });
  } catch (e) {
    io.err(`rungbook import: ${(e as Error).message}\n\n${HELP}`);
    return 2;
  }
  const [bookPath, pricesPath, ...extra] = parsed.positional;
  const supplier = parsed.options.get('supplier');
  if (!bookPath || !pricesPath || extra.length || typeof supplier !== 'string') {
    io.err(`rungbook import: needs a Book file, a price file and --supplier NAME\n\n${HELP}`);
    return 2;
  }
  const decimalOpt = parsed.options.get('decimal');
  if (decimalOpt !== undefined && decimalOpt !== 'point' && decimalOpt !== 'comma') {
    io.err('rungbook import: --decimal must be "point" or "comma"');
    return 2;
  }

  let bookText: string;
  let priceBytes: Uint8Array;
  try {
    bookText = await readFile(bookPath, 'utf8');
  } catch (e) {
    io.err(`rungbook import: cannot read the Book file ${bookPath}: ${(e as NodeJS.ErrnoException).code ?? (e as Error).message}`);
    return 1;
  }
  try {
    priceBytes = new Uint8Array(await readFile(pricesPath));
  } catch (e) {
    io.err(`rungbook import: cannot read the price file ${pricesPath}: ${(e as NodeJS.ErrnoException).code ?? (e as Error).message}`);
    return 1;
  }
  const book = parseBookFile(bookText);
  if (!book.ok) {
    io.err(`rungbook import: ${bookPath} is not a usable Book file:`);
    for (const p of book.problems) io.err(`  ${p.path || 'file'}: ${p.message}`);
    return 1;
  }

  const options: ImportPricesOptions = {
    supplier,
    fileName: basename(pricesPath),
    validRowsOnly: parsed.options.has('valid-rows-only'),
    createParts: parsed.options.has('create-parts'),
    allowReimport: parsed.options.has('allow-reimport'),
  };
  if (decimalOpt) options.decimal = decimalOpt === 'comma' ? ',' : '.';
  const mappingPath = parsed.options.get('mapping');
  if (typeof mappingPath === 'string') {
    let json: unknown;
    try {
      json = JSON.parse(await readFile(mappingPath, 'utf8'));
    } catch (e) {
      io.err(`rungbook import: cannot read the mapping ${mappingPath}: ${(e as Error).message}`);
      return 1;
    }
    const m = parseColumnMapping(json);
    if (!m.ok) {
      io.err(`rungbook import: mapping ${mappingPath}: ${m.reason}`);
      return 1;
    }
    options.mapping = m.mapping;
  }

  const result = await importPrices(book.book, priceBytes, options);
  if (!result.ok || !result.book) {
    io.err(`rungbook import: nothing imported from ${basename(pricesPath)}: ${result.reason ?? 'unknown reason'}`);
    for (const p of result.problems) io.err(`  ${formatProblem(p)}`);
    return 1;
  }
  for (const p of result.problems) io.err(`rungbook import: left out ${formatProblem(p)}`);

  const outPath = typeof parsed.options.get('out') === 'string' ? (parsed.options.get('out') as string) : bookPath;
  // Write beside the target and rename, so an interrupted write never leaves half a Book.
  const temp = `${outPath}.${process.pid}.tmp`;
  try {
    await writeFile(temp, serializeBook(result.book), 'utf8');
    await rename(temp, outPath);
  } catch (e) {
    io.err(`rungbook import: cannot write ${outPath}: ${(e as Error).message}`);
    return 1;
  }
  io.out(formatSummary(result.summary, outPath));
  return 0;
}

export const command: CliCommand = { name: 'import', help: HELP, run };
