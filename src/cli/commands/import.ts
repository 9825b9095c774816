// `rungbook import`: brings a supplier price file into a Book file, all rows or none, with the app's own import code.
import { readFile } from 'node:fs/promises';
import { basename } from 'node:path';
import { parseEncodingChoice } from '../../io/price-decode.ts';
import { parseColumnMapping } from '../../io/price-map.ts';
import type { PriceProblem } from '../../io/price-map.ts';
import { importPrices } from '../../io/price-import.ts';
import type { ImportPricesOptions, ImportSummary } from '../../io/price-import.ts';
import { loadBook } from '../book-read.ts';
import { writeBookSafely } from '../book-write.ts';
import { parseArgs } from '../command.ts';
import type { CliCommand, CliIo } from '../command.ts';
import { shown } from '../terminal.ts';

const HELP = `usage: rungbook import BOOK.rungbook.json PRICES.csv --supplier NAME [options]

Imports a supplier price file into the Book: every row is checked first, and on any problem nothing is written
(row errors go to stderr, exit status 1). Otherwise the new Book is written and a summary printed. The new Book
is written beside the target, read back and checked, and only then put in its place.

options:
  --supplier NAME      supplier the prices come from (name or id; required)
  --mapping MAP.json   column mapping to use instead of the supplier's saved one
                       ({"columns": {"mpn": "Part No", "price": "Unit Price", ...}, "layout": "long"})
  --out NEW.json       write the new Book here instead of replacing BOOK
  --valid-rows-only    import the rows without problems even when other rows have some
  --create-parts       create a new part for each row whose part is not in the Book (default: skip them)
  --decimal point|comma  decimal mark of the numbers, when the file cannot tell
  --encoding auto|utf-8|windows-1252
                       how to read the price file (default auto: UTF-8, else Windows-1252; lines of a UTF-8
                       file that are not UTF-8 are read as Windows-1252 and named in a warning)
  --allow-reimport     import a file already imported for this supplier`;

function formatProblem(p: PriceProblem): string {
  const where = p.row > 0 ? `line ${p.row}` : 'file';
  const col = p.column ? `, column "${shown(p.column)}"` : '';
  const value = p.value ? `, value "${shown(p.value.length > 60 ? p.value.slice(0, 57) + '...' : p.value)}"` : '';
  return `${where}${col}${value}: ${shown(p.reason)}`;
}

function formatSummary(s: ImportSummary, outPath: string): string {
  const lines = [
    `imported ${shown(s.fileName)} for ${shown(s.supplier)} into ${outPath}`,
    `  read: ${s.encoding}, ${s.delimiter}-separated, header on line ${s.headerLine}, ${s.dataRows} data row(s), ${s.layout} layout`,
    `  numbers: ${s.decimal}`,
    `  columns: ${Object.entries(s.columns).map(([k, v]) => `${k}="${shown(v)}"`).join(', ')}`,
    `  matched: ${s.matchedByMpn} by maker part number, ${s.matchedByCode} by supplier code`,
    `  quotes: ${s.newQuotes} new, ${s.supersededQuotes} older superseded (kept in history); ${s.newParts} new part(s)`,
  ];
  if (s.rejectedOffers) lines.push(`  left out: ${s.rejectedOffers} offer(s) with problems (--valid-rows-only)`);
  const skipped = s.unmatched.filter((u) => u.decision === 'skip');
  if (skipped.length) {
    lines.push(`  skipped, no such part in the Book (use --create-parts to add them): ${skipped.length}`);
    for (const u of skipped.slice(0, 20)) lines.push(`    line ${u.line}: ${shown(u.mpn || u.supplierCode)}${u.note ? ` (${shown(u.note)})` : ''}`);
    if (skipped.length > 20) lines.push(`    … and ${skipped.length - 20} more`);
  }
  for (const n of s.notes) lines.push(`  note: ${shown(n)}`);
  if (s.batchId) lines.push(`  batch: ${s.batchId}`);
  return lines.join('\n');
}

async function run(args: string[], io: CliIo): Promise<number> {
  let parsed;
  try {
    parsed = parseArgs(args, {
      flags: ['valid-rows-only', 'create-parts', 'allow-reimport'],
      values: ['supplier', 'mapping', 'out', 'decimal', 'encoding'],
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
  const encodingOpt = parsed.options.get('encoding');
  const encoding = typeof encodingOpt === 'string' ? parseEncodingChoice(encodingOpt) : undefined;
  if (encodingOpt !== undefined && encoding === undefined) {
    io.err('rungbook import: --encoding must be "auto", "utf-8" or "windows-1252"');
    return 2;
  }

  // The Book is read as every command reads it: a file `info` or `check` would refuse is refused here too.
  const book = await loadBook('import', bookPath, io);
  if (!book) return 1;
  let priceBytes: Uint8Array;
  try {
    priceBytes = new Uint8Array(await readFile(pricesPath));
  } catch (e) {
    io.err(`rungbook import: cannot read the price file ${pricesPath}: ${(e as NodeJS.ErrnoException).code ?? (e as Error).message}`);
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
  if (encoding) options.encoding = encoding;
  const mappingPath = parsed.options.get('mapping');
  if (typeof mappingPath === 'string') {
    let json: unknown;
    try {
      // Decoded strictly, so a mapping that is not UTF-8 is refused rather than saved on the supplier with U+FFFD.
      json = JSON.parse(new TextDecoder('utf-8', { fatal: true }).decode(await readFile(mappingPath)));
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
  const encodingWarning = result.analysis?.encodingWarning;
  if (encodingWarning) io.err(`rungbook import: warning: ${basename(pricesPath)}: ${encodingWarning}`);
  if (!result.ok || !result.book) {
    io.err(`rungbook import: nothing imported from ${basename(pricesPath)}: ${shown(result.reason ?? 'unknown reason')}`);
    for (const p of result.problems) io.err(`  ${formatProblem(p)}`);
    return 1;
  }
  for (const p of result.problems) io.err(`rungbook import: left out ${formatProblem(p)}`);

  const outPath = typeof parsed.options.get('out') === 'string' ? (parsed.options.get('out') as string) : bookPath;
  const written = await writeBookSafely(outPath, result.book);
  if (written) {
    io.err(`rungbook import: nothing written, ${outPath} is as it was: ${written}`);
    return 1;
  }
  io.out(formatSummary(result.summary, outPath));
  if (encodingWarning) io.out(`  warning: ${shown(encodingWarning)}`);
  return 0;
}

export const command: CliCommand = { name: 'import', help: HELP, run };
