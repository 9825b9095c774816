// `rungbook order-doc FILE --order NUMBER | --run NAME`: the document a supplier receives, as CSV — the one order's,
// or a draft per supplier of a run's purchase list — with the very bytes the app downloads (io/order-doc-export.ts).
import { mkdir, readFile, rename, rm, stat, writeFile } from 'node:fs/promises';
import { basename, dirname, join } from 'node:path';
import type { Book } from '../../domain/book.ts';
import { isIsoDate, todayIso } from '../../domain/dates.ts';
import { orderDocumentOf, purchaseDocuments } from '../../domain/order-doc.ts';
import type { OrderDocument } from '../../domain/order-doc.ts';
import { purchaseList } from '../../domain/purchase.ts';
import { orderDocCsv, orderDocFileName } from '../../io/order-doc-export.ts';
import { exportBytes } from '../../io/csv-write.ts';
import type { ExportOptions } from '../../io/csv-write.ts';
import { runCosting } from '../../io/run-export.ts';
import { loadBook } from '../book-read.ts';
import { parseArgs } from '../command.ts';
import type { CliCommand, CommandIo, ParsedArgs } from '../command.ts';
import { shown } from '../terminal.ts';
import { CSV_CHOICES, csvChoices } from './cost.ts';

const HELP = `usage: rungbook order-doc FILE --order NUMBER [--out FILE] [CSV CHOICES]
       rungbook order-doc FILE --run NAME --out FOLDER [--date YYYY-MM-DD] [CSV CHOICES]

The order document a supplier receives, as CSV: our firm, our order number, the ship-to address (the Book's
settings), the supplier's name, address and payment terms, the order and delivery dates, then per line the
supplier's part number and ours, the maker, the quote the price came from, the quantity, the unit price in the
supplier's currency, the line total and the delivery term (Incoterms 2020), and the order total. Nothing of our own
workings is on it: no need, designators, base-currency figures, reasons for buying more, margins or run costs.

  --order NUMBER  an order of the Book, by its number (for example TAC-3); printed, or written to --out FILE
  --run NAME      a run of the Book, by its name: one draft document per supplier of its purchase list, written
                  into --out FOLDER as NUMBER-SUPPLIER-order.csv (drafts are unnumbered until the order is placed)
  --out PATH      where to write; a file already there is replaced only by a document that was made whole
  --date D        the drafts' order date (default today); they are due when the slowest line arrives
  --csv           accepted, and implied: the document is always CSV
${CSV_CHOICES}

The CSV has three blocks, an empty record between them: who and where (label, value), the lines (a header row,
then one row per line) and the order total (label, value). It has the same bytes as the app's download with the
same choices.

Exit status: 0 written, 1 a run line has no usable quote (it is on no document) or a file could not be written,
2 bad arguments, an unknown order or run, or an unreadable Book file.`;

/** Writes `text` to `path` through a file beside it that must read back byte for byte; then renames it over `path`. */
async function writeSafely(path: string, text: string): Promise<string | undefined> {
  const temp = join(dirname(path), `.${basename(path)}.${process.pid}.tmp`);
  const bytes = exportBytes(text);
  try {
    await writeFile(temp, bytes);
    const back = await readFile(temp);
    if (!back.equals(Buffer.from(bytes))) return `${path} is as it was: the new file did not read back whole`;
    await rename(temp, path);
    return undefined;
  } catch (e) {
    return `${path} is as it was: ${e instanceof Error ? e.message : String(e)}`;
  } finally {
    await rm(temp, { force: true });
  }
}

async function isFolder(path: string): Promise<boolean> {
  try {
    return (await stat(path)).isDirectory();
  } catch {
    return false;
  }
}

function text(parsed: ParsedArgs, name: string): string | undefined {
  const v = parsed.options.get(name);
  return typeof v === 'string' ? v : undefined;
}

/** The documents asked for, or a message and exit status. */
function documents(book: Book, parsed: ParsedArgs, today: string): { docs: OrderDocument[]; missing: string[] } | { error: string } {
  const number = text(parsed, 'order');
  if (number !== undefined) {
    const order = book.orders.find((o) => o.number === number.trim());
    if (!order) {
      const numbers = book.orders.map((o) => shown(o.number));
      return { error: `no order numbered ${shown(number)} in the Book; ${numbers.length ? `its orders are ${numbers.join(', ')}` : 'it has no orders'}` };
    }
    return { docs: [orderDocumentOf(book, order)], missing: [] };
  }
  const name = text(parsed, 'run')!.trim();
  const run = book.runs.find((r) => r.name === name) ?? book.runs.find((r) => r.id === name);
  if (!run) {
    const names = book.runs.map((r) => shown(r.name));
    return { error: `no run named ${shown(name)} in the Book; ${names.length ? `its runs are ${names.join(', ')}` : 'it has no runs'}` };
  }
  const costing = runCosting(book, run);
  if (!costing.ok) return { error: `run ${shown(run.name)} cannot be costed: ${shown(costing.error)}` };
  const list = purchaseList(costing.value.bom, { dateWanted: run.dateWanted });
  const missing = list.missing.map((p) => `${shown(p.designators || p.lineId || 'a line')}: ${shown(p.message)}`);
  return { docs: purchaseDocuments(book, list.orders, today), missing };
}

export const command: CliCommand = {
  name: 'order-doc',
  help: HELP,
  async run(args: string[], io: CommandIo): Promise<number> {
    let parsed: ParsedArgs;
    try {
      parsed = parseArgs(args, { flags: ['csv', 'bom'], values: ['order', 'run', 'out', 'date', 'delimiter', 'decimal'] });
    } catch (e) {
      io.err(`rungbook order-doc: ${e instanceof Error ? e.message : String(e)}\n\n${HELP}`);
      return 2;
    }
    if (parsed.positional.length !== 1) {
      io.err(`rungbook order-doc: give exactly one Book file\n\n${HELP}`);
      return 2;
    }
    const byOrder = parsed.options.has('order');
    if (byOrder === parsed.options.has('run')) {
      io.err(`rungbook order-doc: give either --order NUMBER or --run NAME\n\n${HELP}`);
      return 2;
    }
    const out = parsed.options.get('out');
    if (out === '' || (!byOrder && out === undefined)) {
      io.err(`rungbook order-doc: a run gives one document per supplier: name the folder for them with --out FOLDER`);
      return 2;
    }
    const date = text(parsed, 'date');
    if (date !== undefined && (byOrder || !isIsoDate(date))) {
      io.err(byOrder ? 'rungbook order-doc: --date dates the drafts of a run; an order keeps its own dates' : 'rungbook order-doc: --date must be YYYY-MM-DD');
      return 2;
    }
    // The document is always CSV: the choices are read as with --csv.
    parsed.options.set('csv', true);
    const choices: ExportOptions | number = csvChoices('order-doc', parsed, io);
    if (typeof choices === 'number') return choices;
    const read = await loadBook('order-doc', parsed.positional[0]!, io);
    if (!read) return 2;
    const found = documents(read.book, parsed, date ?? todayIso());
    if ('error' in found) {
      io.err(`rungbook order-doc: ${found.error}`);
      return 2;
    }
    // Every document is made before any file is touched: a refusal leaves every file as it was.
    const files: { name: string; text: string }[] = [];
    for (const doc of found.docs) {
      const csv = orderDocCsv(doc, choices);
      if (!csv.ok) {
        io.err(`rungbook order-doc: ${csv.error}`);
        return 2;
      }
      files.push({ name: orderDocFileName(doc), text: csv.value });
    }
    for (const m of found.missing) io.err(`rungbook order-doc: not on any document, no usable quote: ${m}`);
    if (typeof out !== 'string') {
      io.data(files[0]!.text);
      return 0;
    }
    let folder: string | undefined;
    if (!byOrder) {
      folder = out;
      try {
        await mkdir(folder, { recursive: true });
      } catch (e) {
        io.err(`rungbook order-doc: cannot make the folder ${out}: ${e instanceof Error ? e.message : String(e)}`);
        return 1;
      }
    } else if (await isFolder(out)) {
      folder = out;
    }
    let failed = false;
    for (const f of files) {
      const path = folder === undefined ? out : join(folder, f.name);
      const why = await writeSafely(path, f.text);
      if (why) {
        io.err(`rungbook order-doc: ${why}`);
        failed = true;
      } else io.out(`wrote ${path}`);
    }
    if (files.length === 0) io.out('nothing to order: the run has no priced line to buy');
    return failed || found.missing.length > 0 ? 1 : 0;
  },
};
