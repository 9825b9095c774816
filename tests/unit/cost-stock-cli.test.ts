// `rungbook cost --stock` through main(): with no stock it is the plain costing to the cent (landed cost included),
// stock on hand is taken first and valued by the Book's rule, only the rest is bought, and the totals re-add.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Papa from 'papaparse';
import { demoBook } from '../../src/domain/demo-book.ts';
import { captureIo, runCli, writeBook } from './cli-helpers.ts';
import { main } from '../../src/cli/main.ts';

let dir = '';
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'rungbook-cost-stock-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const ARGS = ['--variant', 'FR3-40-CD', '--run', '500'];
const cents = (n: number): number => Math.round(n * 100);

interface StockJson {
  lines: { mpn: string; need: number; fromStock: number; stockValue: number; valuedAt: string; toBuy: number; buy: number; unitPrice: number; boughtBase: number; landedBase: number }[];
  stockRun: number;
  boughtRun: number;
  landedRun: number;
  materialRun: number;
}
interface PlainJson {
  lines: { mpn: string; need: number; buy: number; unitPrice: number; currency: string; extendedBase: number; freight: number; duty: number; charges: number }[];
  materialRun: number;
  landedRun: number;
  currency: string;
}

async function json<T>(argv: string[]): Promise<T> {
  const io = captureIo();
  const code = await main(argv, io);
  expect(code, io.stderr).toBe(0);
  return JSON.parse(io.stdout) as T;
}

describe('rungbook cost --stock', () => {
  it('with no stock is the plain costing to the cent, landed cost and all', async () => {
    const file = writeBook(dir, 'empty.json', demoBook());
    const plain = await json<PlainJson>(['cost', file, ...ARGS, '--json']);
    const stock = await json<StockJson>(['cost', file, ...ARGS, '--stock', '--json']);
    // The demo's suppliers have landed terms, so this checks the still-to-buy part carries them: the cost of purchase
    // includes import duties and transport (IAS 2, Inventories, paragraph 11; from memory).
    expect(cents(plain.landedRun)).toBeGreaterThan(0);
    expect([cents(stock.materialRun), cents(stock.landedRun), cents(stock.stockRun)]).toEqual([cents(plain.materialRun), cents(plain.landedRun), 0]);
    expect(stock.lines.map((l) => [l.mpn, l.toBuy, l.buy, l.boughtBase])).toEqual(plain.lines.map((l) => [l.mpn, l.need, l.buy, l.extendedBase]));
    expect(stock.lines.map((l) => cents(l.landedBase))).toEqual(plain.lines.map((l) => cents(l.freight) + cents(l.duty) + cents(l.charges)));
  });

  it('takes stock on hand first, values it at today\'s quote when nothing was paid for it, and buys only the rest', async () => {
    const file = writeBook(dir, 'stocked.json', demoBook());
    const plain = await json<PlainJson>(['cost', file, ...ARGS, '--json']);
    const [covered, partly] = plain.lines.filter((l) => l.currency === plain.currency && l.need > 1);
    const count = join(dir, 'count.csv');
    writeFileSync(count, `mpn,counted\n${covered!.mpn},${covered!.need + 10}\n${partly!.mpn},1\n`);
    expect((await runCli(['count', file, count, '--date', '2000-01-03'])).code).toBe(0);
    const stock = await json<StockJson>(['cost', file, ...ARGS, '--stock', '--json']);
    const c = stock.lines.find((l) => l.mpn === covered!.mpn)!;
    // Material drawn from stores is charged to the job at the stores' valuation and only the shortfall is purchased
    // (common practice in job costing, from memory). The whole need from stock, valued at the quote's unit price
    // (same currency as the base: rate 1), nothing bought.
    expect([c.fromStock, c.toBuy, c.buy, c.boughtBase, c.landedBase, c.valuedAt]).toEqual([covered!.need, 0, 0, 0, 0, "today's quote"]);
    expect(cents(c.stockValue)).toBe(Math.round(covered!.need * covered!.unitPrice * 100));
    const p = stock.lines.find((l) => l.mpn === partly!.mpn)!;
    expect([p.fromStock, p.toBuy]).toEqual([1, partly!.need - 1]);
    expect(p.buy).toBeGreaterThanOrEqual(p.toBuy);
    // Totals re-add from their lines: stock value + goods + landed = run material.
    const sum = (f: (l: StockJson['lines'][number]) => number): number => stock.lines.reduce((s, l) => s + cents(f(l)), 0);
    expect(cents(stock.stockRun)).toBe(sum((l) => l.stockValue));
    expect(cents(stock.landedRun)).toBe(sum((l) => l.landedBase));
    expect(cents(stock.boughtRun)).toBe(sum((l) => l.boughtBase) + sum((l) => l.landedBase));
    expect(cents(stock.materialRun)).toBe(cents(stock.stockRun) + cents(stock.boughtRun));
  });

  it('prints the same figures as a table and as CSV, with the mains caution', async () => {
    const file = writeBook(dir, 'out.json', demoBook());
    const table = captureIo();
    expect(await main(['cost', file, ...ARGS, '--stock'], table)).toBe(0);
    expect(table.stdout).toMatch(/from stock \(EUR\)\s+0\.00/);
    expect(table.stdout).toMatch(/run material \(EUR\)\s+\d+\.\d{2}/);
    expect(table.stdout.trimEnd().split('\n').at(-1)).toMatch(/Caution/);
    const csv = captureIo();
    expect(await main(['cost', file, ...ARGS, '--stock', '--csv'], csv)).toBe(0);
    const rows = Papa.parse<string[]>(csv.stdout.trimEnd(), { newline: '\r\n' }).data;
    expect(rows[0]!.slice(0, 5)).toEqual(['designators', 'mpn', 'need', 'from_stock', 'stock_value_EUR']);
    expect(rows.every((r) => r.length === rows[0]!.length)).toBe(true);
    const j = await json<StockJson>(['cost', file, ...ARGS, '--stock', '--json']);
    expect(rows.find((r) => r[0] === 'run material (EUR)')![11]).toBe(j.materialRun.toFixed(2));
    expect(csv.stderr).toMatch(/Caution/);
  });
});
