// `rungbook order-doc`: an order's document, or a draft per supplier of a run's purchase list, with the very bytes the
// app downloads; unknown orders and runs named with what the Book has; a refused document leaves files as they were.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { main } from '../../src/cli/main.ts';
import type { Book } from '../../src/domain/book.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { orderDocumentOf, purchaseDocuments } from '../../src/domain/order-doc.ts';
import { acceptSuggestions } from '../../src/domain/planning.ts';
import { purchaseList } from '../../src/domain/purchase.ts';
import { exportBytes } from '../../src/io/csv-write.ts';
import type { ExportOptions } from '../../src/io/csv-write.ts';
import { orderDocCsv, orderDocFileName } from '../../src/io/order-doc-export.ts';
import { planBook } from '../../src/io/plan-export.ts';
import { runCosting } from '../../src/io/run-export.ts';
import { captureIo, writeBook } from './cli-helpers.ts';
import { value } from './costing-fixtures.ts';

let dir = '';
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'rungbook-order-doc-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** The demo Book with the plan's suggested orders placed, as a person would from the Plan page. */
function bookWithOrders(): Book {
  const book = demoBook();
  const today = '2027-01-11';
  const plan = value(planBook(book, { today }));
  const placed = acceptSuggestions(book, plan.suggestions, today);
  if (!placed.ok) throw new Error(placed.error);
  return { ...book, orders: placed.value.orders, settings: { ...book.settings, nextOrderNumber: book.settings.nextOrderNumber + placed.value.orders.length } };
}

const SEMI: ExportOptions = { delimiter: 'semicolon', decimal: 'comma', bom: true };

describe('rungbook order-doc', () => {
  it('prints its help', async () => {
    const io = captureIo();
    expect(await main(['order-doc', '--help'], io)).toBe(0);
    expect(io.stdout).toMatch(/usage: rungbook order-doc FILE --order NUMBER/);
    expect(io.stdout).toMatch(/Nothing of our own\s+workings/);
  });

  it('prints an order’s document with the app’s bytes, under the default and other CSV choices', async () => {
    const book = bookWithOrders();
    const file = writeBook(dir, 'orders.rungbook.json', book);
    const order = book.orders[0]!;
    const plain = captureIo();
    expect(await main(['order-doc', file, '--order', order.number], plain)).toBe(0);
    expect(plain.stdout).toBe(value(orderDocCsv(orderDocumentOf(book, order))));
    const semi = captureIo();
    expect(await main(['order-doc', file, '--order', order.number, '--delimiter', 'semicolon', '--decimal', 'comma', '--bom'], semi)).toBe(0);
    expect(Buffer.from(exportBytes(semi.stdout)).equals(Buffer.from(exportBytes(value(orderDocCsv(orderDocumentOf(book, order), SEMI)))))).toBe(true);
  });

  it('writes an order’s document to a file or into a folder', async () => {
    const book = bookWithOrders();
    const file = writeBook(dir, 'orders2.rungbook.json', book);
    const order = book.orders[1] ?? book.orders[0]!;
    const out = join(dir, 'one.csv');
    const io = captureIo();
    expect(await main(['order-doc', file, '--order', order.number, '--out', out], io)).toBe(0);
    const doc = orderDocumentOf(book, order);
    expect(readFileSync(out).equals(Buffer.from(exportBytes(value(orderDocCsv(doc)))))).toBe(true);
    const folder = join(dir, 'into');
    rmSync(folder, { recursive: true, force: true });
    expect(await main(['order-doc', file, '--order', order.number, '--out', dir], captureIo())).toBe(0);
    expect(existsSync(join(dir, orderDocFileName(doc)))).toBe(true);
  });

  it('writes one draft per supplier of a run’s purchase list into a folder, with the app’s bytes', async () => {
    const book = demoBook();
    const file = writeBook(dir, 'demo.rungbook.json', book);
    const run = book.runs[0]!;
    const folder = join(dir, 'drafts');
    const io = captureIo();
    expect(await main(['order-doc', file, '--run', run.name, '--out', folder, '--date', '2026-10-02'], io)).toBe(0);
    const list = purchaseList(value(runCosting(book, run)).bom, { dateWanted: run.dateWanted });
    const docs = purchaseDocuments(book, list.orders, '2026-10-02');
    expect(readdirSync(folder).sort()).toEqual(docs.map(orderDocFileName).sort());
    for (const d of docs) expect(readFileSync(join(folder, orderDocFileName(d))).equals(Buffer.from(exportBytes(value(orderDocCsv(d)))))).toBe(true);
    expect(io.stdout.split('\n').filter((l) => l.startsWith('wrote ')).length).toBe(docs.length);
  });

  it('names an unknown order or run with what the Book has, and writes nothing', async () => {
    const book = bookWithOrders();
    const file = writeBook(dir, 'orders3.rungbook.json', book);
    const out = join(dir, 'never.csv');
    const order = captureIo();
    expect(await main(['order-doc', file, '--order', 'TAC-999', '--out', out], order)).toBe(2);
    expect(order.stderr).toMatch(/no order numbered TAC-999 in the Book; its orders are TAC-1/);
    const run = captureIo();
    expect(await main(['order-doc', file, '--run', 'Autumn', '--out', join(dir, 'never')], run)).toBe(2);
    expect(run.stderr).toContain(`no run named Autumn in the Book; its runs are ${book.runs.map((r) => r.name).join(', ')}`);
    expect(existsSync(out)).toBe(false);
    expect(existsSync(join(dir, 'never'))).toBe(false);
  });

  it('refuses bad arguments with a message: both or neither of --order and --run, a run without --out, a bad date', async () => {
    const file = writeBook(dir, 'demo2.rungbook.json', demoBook());
    const cases: [string[], RegExp][] = [
      [['order-doc', file], /either --order NUMBER or --run NAME/],
      [['order-doc', file, '--order', 'TAC-1', '--run', 'x'], /either --order NUMBER or --run NAME/],
      [['order-doc', file, '--run', 'x'], /--out FOLDER/],
      [['order-doc', file, '--run', 'x', '--out', dir, '--date', '2027-02-30'], /--date must be YYYY-MM-DD/],
      [['order-doc', file, '--order', 'TAC-1', '--frobnicate'], /unknown option --frobnicate/],
    ];
    for (const [argv, message] of cases) {
      const io = captureIo();
      expect(await main(argv, io)).toBe(2);
      expect(io.stderr).toMatch(message);
    }
  });

  it('never replaces a good file with a document that cannot be made (clashing CSV choices)', async () => {
    const book = bookWithOrders();
    const file = writeBook(dir, 'orders4.rungbook.json', book);
    const out = join(dir, 'kept.csv');
    writeFileSync(out, 'a good file\r\n');
    const io = captureIo();
    expect(await main(['order-doc', file, '--order', book.orders[0]!.number, '--out', out, '--decimal', 'comma'], io)).toBe(2);
    expect(io.stderr).toMatch(/decimal comma/);
    expect(readFileSync(out, 'utf8')).toBe('a good file\r\n');
    expect(readdirSync(dir).filter((n) => n.endsWith('.tmp'))).toEqual([]);
  });
});
