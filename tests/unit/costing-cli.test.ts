// `rungbook cost` and `rungbook buy` through main(): same unit costs as the app's costing workbook, clear refusals.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { main } from '../../src/cli/main.ts';
import { csvBlocks, csvRecords } from './csv-blocks.ts';
import { captureIo, writeBook } from './cli-helpers.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { CostingWorkbook, resolutionFromFamily } from '../../src/engine/costing.ts';
import { resolveFamily } from '../../src/engine/family.ts';
import { daysBefore } from '../../src/domain/dates.ts';

let dir = '';
let demoFile = '';

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'rungbook-cost-'));
  demoFile = writeBook(dir, 'demo.rungbook.json', demoBook());
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('rungbook cost', () => {
  it('gives the same unit cost as the app workbook for every demo variant and run size', async () => {
    const book = demoBook();
    const wb = CostingWorkbook.open(book, resolutionFromFamily(resolveFamily(book)));
    if (!wb.ok) throw new Error(wb.error);
    for (const row of wb.value.allUnitCosts()) {
      const io = captureIo();
      const code = await main(['cost', demoFile, '--variant', row.variant, '--run', String(row.run), '--json'], io);
      expect(code, io.stderr).toBe(0);
      const json = JSON.parse(io.stdout) as { unitCost: number; variant: string; run: number };
      expect([json.variant, json.run, json.unitCost]).toEqual([row.variant, row.run, row.unitCost]);
    }
    wb.value.close();
  }, 120_000);

  it('prints --json with the documented keys, totals equal to the sum of lines, and the caution on stderr', async () => {
    const io = captureIo();
    expect(await main(['cost', demoFile, '--variant', 'FR4-60-CD', '--run', '2000', '--json'], io)).toBe(0);
    const json = JSON.parse(io.stdout) as Record<string, unknown> & { lines: Record<string, unknown>[]; materialRun: number; unitCost: number };
    for (const k of ['variant', 'run', 'currency', 'lines', 'material', 'labour', 'overhead', 'unitCost', 'runTotal']) expect(json).toHaveProperty(k);
    for (const k of ['designators', 'mpn', 'need', 'buy', 'supplier', 'unitPrice', 'extended', 'leftover']) expect(json.lines[0]).toHaveProperty(k);
    // Run material is the goods plus their landed cost (freight, duty, charges), line by line.
    const lineCents = (l: Record<string, unknown>, k: string): number => Math.round(((l[k] as number | undefined) ?? 0) * 100);
    const cents = json.lines.reduce((s, l) => s + ['extendedBase', 'freight', 'duty', 'charges'].reduce((t, k) => t + lineCents(l, k), 0), 0);
    expect(Math.round(json.materialRun * 100)).toBe(cents);
    const landed = json.lines.reduce((s, l) => s + ['freight', 'duty', 'charges'].reduce((t, k) => t + lineCents(l, k), 0), 0);
    expect(Math.round((json['landedRun'] as number) * 100)).toBe(landed);
    expect(io.stderr).toMatch(/Caution/);
    expect(io.stdout).not.toMatch(/Caution/);
  });

  it('prints a table with the totals and the mains caution at its end', async () => {
    const io = captureIo();
    expect(await main(['cost', demoFile, '--variant', 'FR3-40-CD', '--run', '500'], io)).toBe(0);
    // A variant's unit cost to the cent, as every page shows it (domain/format.ts).
    expect(io.stdout).toMatch(/unit cost \(EUR\)\s+\d+\.\d{2}$/m);
    expect(io.stdout).toMatch(/run total \(EUR\)\s+\d+\.\d{2}/);
    expect(io.stdout.trimEnd().split('\n').at(-1)).toMatch(/Caution/);
  });

  it('prints --csv that an RFC 4180 reader takes back, with the caution kept out of the data', async () => {
    const io = captureIo();
    expect(await main(['cost', demoFile, '--variant', 'FR3-40-CD', '--run', '500', '--csv'], io)).toBe(0);
    expect(io.stdout).toContain('\r\n');
    const records = csvRecords(io.stdout);
    expect(records.every((r) => r.length === records[0]!.length)).toBe(true);
    // The head, the table and the totals, an empty record between them.
    const [head, rows, totals] = csvBlocks(io.stdout);
    expect(head![0]!.slice(0, 2)).toEqual(['file', 'costed BOM']);
    expect(rows![0]!.slice(0, 5)).toEqual(['designators', 'mpn', 'description', 'need', 'buy']);
    expect(totals!.find((r) => r[0] === 'unit cost (EUR)')).toBeDefined();
    expect(io.stdout).not.toMatch(/Caution/);
    expect(io.stderr).toMatch(/Caution/);
  });

  it('neutralises a supplier code that looks like a formula in --csv', async () => {
    const book = demoBook();
    book.quotes = book.quotes.map((q) => ({ ...q, supplierCode: `=HYPERLINK("x","${q.supplierCode}")` }));
    const file = writeBook(dir, 'formula.rungbook.json', book);
    const io = captureIo();
    expect(await main(['cost', file, '--variant', 'FR3-40-CD', '--run', '500', '--csv'], io)).toBe(0);
    expect(io.stdout).toMatch(/,"'=HYPERLINK\(""x"",/);
  });

  it('refuses bad arguments with a message and status 2', async () => {
    const cases: [string[], RegExp][] = [
      [['cost', demoFile, '--variant', 'NOPE', '--run', '500'], /no variant with code NOPE/],
      [['cost', demoFile, '--variant', 'FR3-40-CD', '--run', '12.5'], /--run must be a whole number/],
      [['cost', demoFile, '--variant', 'FR3-40-CD', '--run', '0'], /--run must be a whole number/],
      [['cost', demoFile, '--variant', 'FR3-40-CD'], /--run must be/],
      [['cost', demoFile, '--run', '5'], /--variant/],
      [['cost', demoFile, '--variant', 'FR3-40-CD', '--run', '5', '--json', '--csv'], /one of --json and --csv/],
      [['cost', join(dir, 'missing.json'), '--variant', 'X', '--run', '5'], /cannot be used as a Book file/],
      [['cost', demoFile, '--variant', 'FR3-40-CD', '--run', '5', '--bogus'], /unknown option --bogus/],
    ];
    for (const [args, message] of cases) {
      const io = captureIo();
      expect(await main(args, io), args.join(' ')).toBe(2);
      expect(io.stderr).toMatch(message);
      expect(io.stdout).toBe('');
    }
  });

  it('lists a line with no usable quote as not priced and exits 1', async () => {
    const book = demoBook();
    const terminal = book.quotes[0]!;
    book.quotes = book.quotes.map((q) => (q.partId === terminal.partId ? { ...q, expires: '2000-01-01' } : q));
    const file = writeBook(dir, 'expired.rungbook.json', book);
    const io = captureIo();
    expect(await main(['cost', file, '--variant', 'FR3-40-CD', '--run', '500'], io)).toBe(1);
    expect(io.stdout).toMatch(/NOT PRICED/);
    expect(io.stdout).toMatch(/INCOMPLETE/);
    expect(io.stderr).toMatch(/expired 2000-01-01/);
  });
});

describe('rungbook buy', () => {
  it('counts the latest order date back from the date wanted by the lead time (by hand)', () => {
    // 2026-12-01 − 10 days = 2026-11-21; 2026-03-01 − 1 day = 2026-02-28 (not a leap year); 2028-03-01 − 1 = 2028-02-29.
    expect(daysBefore('2026-12-01', 10)).toBe('2026-11-21');
    expect(daysBefore('2026-03-01', 1)).toBe('2026-02-28');
    expect(daysBefore('2028-03-01', 1)).toBe('2028-02-29');
    expect(daysBefore('2026-13-01', 1)).toBeUndefined();
  });

  it('groups the order by supplier with packs × pack = order quantity and supplier totals equal to their lines', async () => {
    const io = captureIo();
    expect(await main(['buy', demoFile, '--variant', 'FR3-40-CD', '--run', '500', '--wanted', '2026-12-01', '--csv'], io)).toBe(0);
    const rows = csvBlocks(io.stdout)[1]!;
    const head = rows[0]!;
    const at = (name: string): number => head.indexOf(name);
    const body = rows.slice(1);
    expect(body.length).toBeGreaterThan(5);
    for (const r of body) {
      expect(Number(r[at('packs')]) * Number(r[at('pack')])).toBe(Number(r[at('order_qty')]));
      expect(Number(r[at('order_qty')])).toBeGreaterThanOrEqual(Number(r[at('need')]));
      expect(Number(r[at('order_qty')])).toBeGreaterThanOrEqual(Number(r[at('moq')]));
      expect(r[at('latest_order_date')]).toBe(daysBefore('2026-12-01', Number(r[at('lead_days')])));
    }
    // Rows of one supplier are together.
    const order = body.map((r) => r[at('supplier')]!);
    const seen = new Set<string>();
    for (let i = 0; i < order.length; i++) {
      if (i > 0 && order[i] !== order[i - 1]) expect(seen.has(order[i]!)).toBe(false);
      seen.add(order[i]!);
    }
    // The whole list costs what the costed BOM's run material says, less its landed cost (the suppliers' prices
    // alone: freight, duty and charges are not on their order lines).
    const cost = captureIo();
    await main(['cost', demoFile, '--variant', 'FR3-40-CD', '--run', '500', '--json'], cost);
    const listCents = body.reduce((s, r) => s + Math.round(Number(r[at('line_price_EUR')]) * 100), 0);
    const run = JSON.parse(cost.stdout) as { materialRun: number; landedRun: number };
    expect(listCents).toBe(Math.round(run.materialRun * 100) - Math.round(run.landedRun * 100));
  });

  it('prints a table per supplier with the caution at the end, and says when no date wanted is known', async () => {
    const io = captureIo();
    expect(await main(['buy', demoFile, '--variant', 'FR3-40-CD', '--run', '777'], io)).toBe(0);
    expect(io.stdout).toMatch(/No date wanted/);
    expect(io.stdout).toMatch(/packs × pack/);
    expect(io.stdout.trimEnd().split('\n').at(-1)).toMatch(/Caution/);
  });

  it('refuses a bad date wanted', async () => {
    const io = captureIo();
    expect(await main(['buy', demoFile, '--variant', 'FR3-40-CD', '--run', '500', '--wanted', '1/12/2026'], io)).toBe(2);
    expect(io.stderr).toMatch(/--wanted must be a date/);
  });
});
