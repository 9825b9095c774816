// `rungbook receive FILE ORDER`: records parts received on an open order (whole or in part) in a Book file; each
// receipt is a stock movement on its order line. The file is replaced only by a Book that reads back whole.
import { isIsoDate, todayIso } from '../../domain/dates.ts';
import { receive, receiveAll } from '../../domain/orders.ts';
import { loadBook } from '../book-read.ts';
import { writeChange } from '../book-write.ts';
import { parseArgs } from '../command.ts';
import type { CliCommand, CommandIo } from '../command.ts';
import { shown } from '../terminal.ts';

const HELP = `usage: rungbook receive FILE ORDER [LINE=QTY ...] [--all] [--date YYYY-MM-DD] [--out NEW.json]

Records parts received on an open order of the Book (ORDER is its order number): LINE=QTY receives QTY parts on
line LINE (counted from 1, as the order lists them); --all receives everything still to come. Each receipt is a
'received' stock movement on its order line; the order becomes part-received or received. More than is still to
come on a line, or a cancelled order, refuses the whole receipt and nothing is written.

  --date D      the date received (default: today)
  --out NEW     write the new Book here instead of replacing FILE

The new Book is written beside the target, read back and checked, and only then put in its place.
Exit status: 0 written, 1 refused (nothing written), 2 bad arguments or an unreadable Book file.`;

async function run(args: string[], io: CommandIo): Promise<number> {
  let parsed;
  try {
    parsed = parseArgs(args, { flags: ['all'], values: ['date', 'out'] });
  } catch (e) {
    io.err(`rungbook receive: ${(e as Error).message}\n\n${HELP}`);
    return 2;
  }
  const [path, number, ...pairs] = parsed.positional;
  if (!path || !number) {
    io.err(`rungbook receive: give a Book file and an order number\n\n${HELP}`);
    return 2;
  }
  const all = parsed.options.has('all');
  if (all === (pairs.length > 0)) {
    io.err('rungbook receive: give LINE=QTY pairs or --all (one of the two)');
    return 2;
  }
  const receipts: { line: number; quantity: number }[] = [];
  for (const p of pairs) {
    const m = /^(\d+)=(\d+)$/.exec(p);
    if (!m || Number(m[1]) < 1) {
      io.err(`rungbook receive: ${shown(p)} is not LINE=QTY (a line number from 1 and a whole quantity)`);
      return 2;
    }
    receipts.push({ line: Number(m[1]) - 1, quantity: Number(m[2]) });
  }
  const d = parsed.options.get('date');
  if (d !== undefined && (typeof d !== 'string' || !isIsoDate(d))) {
    io.err('rungbook receive: --date must be YYYY-MM-DD');
    return 2;
  }
  const date = typeof d === 'string' ? d : todayIso();
  const read = await loadBook('receive', path, io);
  if (!read) return 2;
  const book = read.book;
  const order = book.orders.find((o) => o.number === number);
  if (!order) {
    io.err(`rungbook receive: no order numbered ${shown(number)} in the Book`);
    return 1;
  }
  const change = all ? receiveAll(book, order.id, date) : receive(book, order.id, date, receipts);
  if (!change.ok) {
    io.err(`rungbook receive: nothing written: ${shown(change.error)}`);
    return 1;
  }
  const out = typeof parsed.options.get('out') === 'string' ? (parsed.options.get('out') as string) : path;
  const written = await writeChange(book, change.value, out);
  if (!written.ok) {
    io.err(`rungbook receive: nothing written: ${written.why}`);
    return 1;
  }
  const after = written.book.orders.find((o) => o.id === order.id)!;
  io.out(`order ${shown(after.number)} is ${after.status}; received on ${date}:`);
  for (const m of change.value.put?.stockMoves ?? []) {
    const line = after.lines[m.orderLine!]!;
    const mpn = book.parts.find((x) => x.id === m.partId)?.mpn ?? m.partId;
    io.out(`  line ${m.orderLine! + 1} ${shown(mpn)}: ${m.quantity} (${line.received} of ${line.quantity} in)`);
  }
  io.out(`written to ${out}`);
  return 0;
}

export const command: CliCommand = { name: 'receive', help: HELP, run };
