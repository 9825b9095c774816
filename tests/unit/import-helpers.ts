// Shared pieces of the price import tests: a small invented Book and shortcuts from CSV text to an analysis.
import { emptyBook } from '../../src/domain/book.ts';
import type { Book, Part, Quote } from '../../src/domain/book.ts';
import { analysePriceFile } from '../../src/io/price-validate.ts';
import type { AnalyseOptions, PriceAnalysis } from '../../src/io/price-validate.ts';

export const SUPPLIER_ID = 'supplier_test';
export const SUPPLIER_NAME = 'Quillmoor Test Supply';

function part(id: string, mpn: string): Part {
  return { id, rev: 1, mpn, maker: 'Invented Maker', description: `part ${mpn}`, kind: 'resistor', ratings: {}, package: '0603' };
}

/** An invented Book: three parts, one supplier in EUR, rates for EUR, USD and GBP, one earlier quote. */
export function testBook(): Book {
  const book = emptyBook();
  book.settings.rates = { EUR: 1, USD: 0.9, GBP: 1.15 };
  book.suppliers.push({ id: SUPPLIER_ID, rev: 1, name: SUPPLIER_NAME, currency: 'EUR', notes: '' });
  book.suppliers.push({ id: 'supplier_other', rev: 1, name: 'Other Invented Supply', currency: 'USD', notes: '' });
  book.parts.push(part('part_r1', 'QT-R10K-06'), part('part_c1', 'QT-C100N-50'), part('part_d1', 'QT-D400-1A'));
  const old: Quote = {
    id: 'quote_old_r1',
    rev: 2,
    partId: 'part_r1',
    supplierId: SUPPLIER_ID,
    supplierCode: 'QS-1001',
    currency: 'EUR',
    breaks: [{ qty: 1, price: 0.05 }],
    moq: 1,
    pack: 1,
    leadDays: 7,
    date: '2026-01-10',
    source: 'manual',
  };
  const otherSupplier: Quote = { ...old, id: 'quote_other_r1', rev: 1, supplierId: 'supplier_other', supplierCode: 'OS-9', currency: 'USD' };
  const diode: Quote = { ...old, id: 'quote_old_d1', rev: 1, partId: 'part_d1', supplierCode: 'QS-3003' };
  book.quotes.push(old, otherSupplier, diode);
  return book;
}

export const BASE_OPTIONS: AnalyseOptions = { defaultCurrency: 'EUR', knownCurrencies: ['EUR', 'USD', 'GBP'], today: '2026-11-30' };

export function bytesOf(text: string): Uint8Array {
  return new TextEncoder().encode(text);
}

export function analyse(text: string | Uint8Array, options: Partial<AnalyseOptions> = {}): Promise<PriceAnalysis> {
  return analysePriceFile(typeof text === 'string' ? bytesOf(text) : text, { ...BASE_OPTIONS, ...options });
}
