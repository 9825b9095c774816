// `rungbook count FILE COUNT.csv`: records a stock count in a Book file, read as the app reads it (count-import.ts).
// Each counted part gets a 'counted' movement of the difference from its ledger, all rows or none, kept as an import
// batch the app can undo. The file is replaced only by a Book that reads back.
import { readFile } from 'node:fs/promises';
import { basename } from 'node:path';
import { isIsoDate, todayIso } from '../../domain/dates.ts';
import { importCount } from '../../domain/stock.ts';
import { analyseCountFile, countProblemsText } from '../../io/count-import.ts';
import type { CountColumns } from '../../io/count-import.ts';
import { parseEncodingChoice } from '../../io/price-decode.ts';
import { loadBook } from '../book-read.ts';
import { writeChange } from '../book-write.ts';
import { parseArgs } from '../command.ts';
import type { CliCommand, CommandIo } from '../command.ts';
import { shown } from '../terminal.ts';

const HELP = `usage: rungbook count FILE COUNT.csv [--date YYYY-MM-DD] [--part-column H] [--count-column H]
                      [--encoding auto|utf-8|windows-1252] [--out NEW.json]

Records a stock count: COUNT.csv has a column of maker part numbers and a column of counts, found by their
headers (mpn, part number, item…; counted, count, qty, on hand…) or named with --part-column and --count-column;
comma, semicolon, tab or pipe separated, UTF-8 or Windows-1252, title lines above the header skipped. For each
counted part the difference between the count and its ledger on the count date is written as a 'counted' stock
movement (no movement where they agree), and the count is kept as an import batch that the app's import history
can undo. A row naming a part the Book does not hold, a part counted twice, or a count that is not a whole number
≥ 0 refuses the whole file (each such row is named) and nothing is written.

  --date D            the date counted (default: today)
  --part-column H     the header of the column of maker part numbers
  --count-column H    the header of the column of counts
  --encoding E        how to read the file's bytes (default: auto)
  --out NEW           write the new Book here instead of replacing FILE

Exit status: 0 written, 1 refused (nothing written), 2 bad arguments or an unreadable Book file.`;

async function run(args: string[], io: CommandIo): Promise<number> {
  let parsed;
  try {
    parsed = parseArgs(args, { values: ['date', 'part-column', 'count-column', 'encoding', 'out'] });
  } catch (e) {
    io.err(`rungbook count: ${(e as Error).message}\n\n${HELP}`);
    return 2;
  }
  const [path, countPath, ...extra] = parsed.positional;
  if (!path || !countPath || extra.length) {
    io.err(`rungbook count: give a Book file and a count file\n\n${HELP}`);
    return 2;
  }
  const d = parsed.options.get('date');
  if (d !== undefined && (typeof d !== 'string' || !isIsoDate(d))) {
    io.err('rungbook count: --date must be YYYY-MM-DD');
    return 2;
  }
  const encText = parsed.options.get('encoding');
  const encoding = typeof encText === 'string' ? parseEncodingChoice(encText) : undefined;
  if (encText !== undefined && encoding === undefined) {
    io.err('rungbook count: --encoding must be auto, utf-8 or windows-1252');
    return 2;
  }
  const columns: CountColumns = {};
  for (const [f, opt] of [['mpn', 'part-column'], ['counted', 'count-column']] as const) {
    const h = parsed.options.get(opt);
    if (typeof h === 'string') columns[f] = h;
  }
  const read = await loadBook('count', path, io);
  if (!read) return 2;
  let bytes: Uint8Array;
  try {
    bytes = new Uint8Array(await readFile(countPath));
  } catch (e) {
    io.err(`rungbook count: cannot read the count file ${countPath}: ${(e as NodeJS.ErrnoException).code ?? (e as Error).message}`);
    return 1;
  }
  const book = read.book;
  const file = await analyseCountFile(book, bytes, { columns, ...(encoding ? { encoding } : {}) });
  if (file.problems.length) {
    io.err(`rungbook count: nothing written: ${shown(countProblemsText(file.problems))}`);
    return 1;
  }
  const date = typeof d === 'string' ? d : todayIso();
  const counted = importCount(book, date, file.lines, { fileName: basename(countPath), hash: file.hash, rows: file.dataRows, at: new Date().toISOString() });
  if (!counted.ok) {
    io.err(`rungbook count: nothing written: ${shown(counted.error)}`);
    return 1;
  }
  const out = typeof parsed.options.get('out') === 'string' ? (parsed.options.get('out') as string) : path;
  const written = await writeChange(book, counted.value.change, out);
  if (!written.ok) {
    io.err(`rungbook count: nothing written: ${written.why}`);
    return 1;
  }
  const mpn = new Map(book.parts.map((p) => [p.id, p.mpn] as const));
  io.out(`counted ${counted.value.lines.length} parts on ${date} (part numbers from "${shown(file.columns.mpn ?? '')}", counts from "${shown(file.columns.counted ?? '')}", ${file.delimiterName ?? ''} separated, ${file.encoding ?? ''}):`);
  for (const l of counted.value.lines) {
    io.out(`  ${shown(mpn.get(l.partId) ?? l.partId)}: ledger ${l.before}, counted ${l.counted}, ${l.difference === 0 ? 'agrees' : `movement ${l.difference > 0 ? '+' : ''}${l.difference}`}`);
  }
  io.out(`written to ${out}`);
  return 0;
}

export const command: CliCommand = { name: 'count', help: HELP, run };
