// The demo supplier price files in public/demo import cleanly into the demo Book, each read the way its layout says.
import Papa from 'papaparse';
import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { mpnKey } from '../../src/domain/book.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { importPrices } from '../../src/io/price-import.ts';

const DEMO = resolve(__dirname, '../../public/demo');
const NOW = new Date('2026-11-30T09:00:00Z');

function rowsOf(name: string, delimiter: string): Record<string, string>[] {
  return Papa.parse<Record<string, string>>(readFileSync(resolve(DEMO, name), 'utf8'), { header: true, delimiter, skipEmptyLines: true }).data;
}

async function importDemo(name: string, supplier: string) {
  const book = demoBook();
  const bytes = new Uint8Array(readFileSync(resolve(DEMO, name)));
  const r = await importPrices(book, bytes, { supplier, fileName: name, now: NOW });
  expect(r.problems).toEqual([]);
  expect(r.ok).toBe(true);
  const created = r.book!.quotes.filter((q) => q.batchId === r.summary.batchId);
  const partOf = new Map(r.book!.parts.map((p) => [p.id, p]));
  return { r, book, created, byMpn: new Map(created.map((q) => [mpnKey(partOf.get(q.partId)!.mpn), q])) };
}

describe('demo price files import into the demo Book', () => {
  it('wide comma file, EUR, several quantity/price pairs', async () => {
    const { r, byMpn } = await importDemo('halvern-price-list-2026-09.csv', 'Halvern Component Supply');
    expect(r.summary).toMatchObject({ layout: 'wide', delimiter: 'comma', skippedOffers: 2 });
    const rows = rowsOf('halvern-price-list-2026-09.csv', ',');
    expect(r.summary.newQuotes).toBe(rows.length - 2);
    for (const row of rows) {
      const q = byMpn.get(mpnKey(row['Manufacturer Part Number']!));
      if (!q) continue;
      const breaks = [1, 2, 3, 4, 5].filter((i) => row[`Qty ${i}`]).map((i) => ({ qty: Number(row[`Qty ${i}`]), price: Number(row[`Price ${i}`]) }));
      expect(q.breaks).toEqual(breaks);
      expect(q).toMatchObject({ currency: row['Currency'], supplierCode: row['Order Code'], moq: Number(row['Minimum Order']), pack: Number(row['Pack Quantity']) });
      expect(q.leadDays).toBe(Number(row['Lead Time (days)']));
      expect(q.date).toBe(row['Quote Date']);
    }
  });

  it('long comma file, prices in USD, lead time in weeks', async () => {
    const { r, byMpn } = await importDemo('kelvaro-quote-2026-08.csv', 'Kelvaro Parts Direct');
    expect(r.summary).toMatchObject({ layout: 'long', skippedOffers: 2 });
    for (const row of rowsOf('kelvaro-quote-2026-08.csv', ',')) {
      const q = byMpn.get(mpnKey(row['Mfr Part No']!));
      if (!q) continue;
      expect(q.currency).toBe('USD');
      expect(q.breaks).toContainEqual({ qty: Number(row['Break Qty']), price: Number(row['Unit Price (USD)']) });
      // Weeks to days: 7 days a week.
      expect(q.leadDays).toBe(Number(row['Lead Time (weeks)']) * 7);
    }
  });

  it('semicolon file with decimal commas, thousands points, £ and prices per 100', async () => {
    const { r, book, byMpn } = await importDemo('brindlecote-passives-2026-07.csv', 'Brindlecote Electronics');
    expect(r.summary).toMatchObject({ layout: 'wide', delimiter: 'semicolon', skippedOffers: 2 });
    expect(r.summary.decimal).toMatch(/decimal comma/);
    const partByKey = new Map(book.parts.map((p) => [mpnKey(p.mpn), p]));
    for (const row of rowsOf('brindlecote-passives-2026-07.csv', ';')) {
      const key = mpnKey(row['Maker part no.']!);
      const q = byMpn.get(key);
      if (!q) continue;
      expect(q.currency).toBe('GBP');
      // The Book's own quote from this supplier holds the same prices, per unit (checked against the file by demo-book.test.ts).
      const before = book.quotes.find((x) => x.supplierId === 'sup_brindle' && x.partId === partByKey.get(key)!.id)!;
      expect(q.breaks.map((b) => b.qty)).toEqual(before.breaks.map((b) => b.qty));
      q.breaks.forEach((b, i) => expect(b.price).toBeCloseTo(before.breaks[i]!.price, 9));
    }
  });
});
