// A large invented price file and a Book whose parts it prices, for the benchmark (50,000 rows × 4 breaks by
// default) and for speed-sensitive tests. Deterministic: the same seed gives the same bytes.
import { emptyBook } from '../domain/book.ts';
import type { Book, Part, Quote } from '../domain/book.ts';
import { seededRandom } from '../domain/refamily.ts';

export interface PriceSample {
  book: Book;
  bytes: Uint8Array;
  fileName: string;
  /** Name of the supplier in `book` the file comes from. */
  supplier: string;
  rows: number;
  breaks: number;
}

export interface PriceSampleOptions {
  rows?: number;
  breaks?: number;
  seed?: number;
  /** Share of parts that already have a quote from the supplier, to be superseded (default 0.5). */
  quotedShare?: number;
}

const BREAK_QTYS = [1, 10, 100, 1000, 5000, 10000, 25000, 50000];

/** The benchmark's price file: wide layout, comma separated, decimal point, one row per part. */
export function samplePriceFile(options: PriceSampleOptions = {}): PriceSample {
  const rows = options.rows ?? 50_000;
  const breaks = Math.min(options.breaks ?? 4, BREAK_QTYS.length);
  // Seeded, so benchmark files do not change between runs.
  const rnd = seededRandom(options.seed ?? 1);
  const quotedShare = options.quotedShare ?? 0.5;
  const book = emptyBook();
  book.settings.rates = { EUR: 1, USD: 0.92 };
  const supplierId = 'supplier_sample';
  book.suppliers.push({ id: supplierId, rev: 1, name: 'Sample Components Depot', currency: 'EUR', notes: 'invented, for the benchmark' });

  const header = ['Manufacturer Part No', 'Order Code', 'Description', 'MOQ', 'Pack Qty', 'Lead Time (days)'];
  for (let b = 1; b <= breaks; b++) header.push(`Qty ${b}`, `Price ${b}`);
  const lines: string[] = [header.join(',')];
  const parts: Part[] = new Array(rows);
  const quotes: Quote[] = [];
  for (let i = 0; i < rows; i++) {
    const mpn = `SMP-${String(i).padStart(6, '0')}-${(i * 7919) % 97}`;
    parts[i] = { id: `part_s${i}`, rev: 1, mpn, maker: 'Sample Maker', description: `sample part ${i}`, kind: 'resistor', ratings: {}, package: '0805' };
    let price = 0.01 + rnd() * 20;
    const cells: string[] = [mpn, `OC${100000 + i}`, `"Sample part ${i}, ${Math.round(rnd() * 1000)} ohm"`, '1', String(1 + Math.floor(rnd() * 4) * 5), String(Math.floor(rnd() * 60))];
    for (let b = 0; b < breaks; b++) {
      cells.push(String(BREAK_QTYS[b]), price.toFixed(4));
      price *= 0.85;
    }
    lines.push(cells.join(','));
    if (rnd() < quotedShare) {
      quotes.push({
        id: `quote_s${i}`,
        rev: 1,
        partId: parts[i]!.id,
        supplierId,
        supplierCode: `OC${100000 + i}`,
        currency: 'EUR',
        breaks: [{ qty: 1, price: 1 }],
        moq: 1,
        pack: 1,
        leadDays: 10,
        date: '2026-01-05',
        source: 'manual',
      });
    }
  }
  book.parts = parts;
  book.quotes = quotes;
  const text = lines.join('\r\n') + '\r\n';
  return { book, bytes: new TextEncoder().encode(text), fileName: `sample-${rows}x${breaks}.csv`, supplier: 'Sample Components Depot', rows, breaks };
}
