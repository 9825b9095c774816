// `rungbook count FILE COUNT.csv`: records a stock count in a Book file. Each counted part gets a 'counted'
// movement of the difference from its ledger; all rows or none. The file is replaced only by a Book that reads back.
import { readFile } from 'node:fs/promises';
import { basename } from 'node:path';
import { isIsoDate, todayIso } from '../../domain/dates.ts';
import { LIMITS } from '../../domain/schema.ts';
import { stockCount } from '../../domain/stock.ts';
import { readStockCount } from '../../io/plan-export.ts';
import { loadBook } from '../book-read.ts';
import { writeChange } from '../book-write.ts';
import { parseArgs } from '../command.ts';
import type { CliCommand, CommandIo } from '../command.ts';
import { shown } from '../terminal.ts';

const HELP = `usage: rungbook count FILE COUNT.csv [--date YYYY-MM-DD] [--reason TEXT] [--out NEW.json]

Records a stock count: COUNT.csv has a column of maker part numbers (headed mpn or part) and a column of counts
(headed counted, count or qty); comma, semicolon or tab separated, UTF-8 or Windows-1252. For each counted part
the difference between the count and its ledger on the count date is written as a 'counted' stock movement (no
movement where they agree). A row naming a part the Book does not hold, or a count that is not a whole number
≥ 0, refuses the whole file and nothing is written.

  --date D       the date counted (default: today)
  --reason TEXT  the movements' reason (default: stock count COUNT.csv)
  --out NEW      write the new Book here instead of replacing FILE

Exit status: 0 written, 1 refused (nothing written), 2 bad arguments or an unreadable Book file.`;

async function run(args: string[], io: CommandIo): Promise<number> {
  let parsed;
  try {
    parsed = parseArgs(args, { values: ['date', 'reason', 'out'] });
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
  const reasonOpt = parsed.options.get('reason');
  const reason = typeof reasonOpt === 'string' ? reasonOpt : `stock count ${basename(countPath)}`.slice(0, LIMITS.shortText);
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
  const lines = readStockCount(book, bytes);
  if (!lines.ok) {
    io.err(`rungbook count: nothing written: ${shown(lines.error)}`);
    return 1;
  }
  const date = typeof d === 'string' ? d : todayIso();
  const counted = stockCount(book, date, lines.value, reason);
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
  io.out(`counted ${counted.value.lines.length} parts on ${date}:`);
  for (const l of counted.value.lines) {
    io.out(`  ${shown(mpn.get(l.partId) ?? l.partId)}: ledger ${l.before}, counted ${l.counted}, ${l.difference === 0 ? 'agrees' : `movement ${l.difference > 0 ? '+' : ''}${l.difference}`}`);
  }
  io.out(`written to ${out}`);
  return 0;
}

export const command: CliCommand = { name: 'count', help: HELP, run };
