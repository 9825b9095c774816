// Round trip: random quotes written as a price file in a random layout, delimiter and decimal style (quoted per
// RFC 4180 §2) come back from the importer unchanged.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { decimalVote } from '../../src/io/price-map.ts';
import { analyse, bytesOf } from './import-helpers.ts';

interface GenQuote {
  mpn: string;
  supplierCode: string;
  description: string;
  currency: 'EUR' | 'USD' | 'GBP';
  breaks: { qty: number; price: number }[];
  moq: number;
  pack: number;
  leadDays: number;
  date: string;
}

const DESCRIPTION_CHARS = ['a', 'B', '7', ' ', ',', ';', '|', '\t', '"', '\n', '\r\n', 'é', '€', '<', '>', '=', '@', "'"];

const quoteArb = (i: number): fc.Arbitrary<GenQuote> =>
  fc.record({
    mpn: fc.constant(`FC-${i}-${'ABCDEFGH'[i % 8]}`),
    supplierCode: fc.constant(`SC${1000 + i}`),
    description: fc.array(fc.constantFrom(...DESCRIPTION_CHARS), { maxLength: 20 }).map((a) => a.join('').trim()),
    currency: fc.constantFrom('EUR', 'USD', 'GBP'),
    // Distinct rising quantities, each with a price of up to four decimals.
    breaks: fc
      .uniqueArray(fc.integer({ min: 1, max: 2_000_000 }), { minLength: 1, maxLength: 5 })
      .chain((qtys) =>
        fc.tuple(...qtys.sort((a, b) => a - b).map((qty) => fc.integer({ min: 1, max: 999_999 }).map((n) => ({ qty, price: n / 10_000 })))),
      ),
    moq: fc.integer({ min: 1, max: 5000 }),
    pack: fc.integer({ min: 1, max: 5000 }),
    leadDays: fc.integer({ min: 0, max: 365 }),
    date: fc.date({ min: new Date('2020-01-01T00:00:00Z'), max: new Date('2030-12-31T00:00:00Z'), noInvalidDate: true }).map((d) => d.toISOString().slice(0, 10)),
  });

const fileArb: fc.Arbitrary<GenFile> = fc.record({
  quotes: fc.integer({ min: 1, max: 8 }).chain((n) => fc.tuple(...Array.from({ length: n }, (_, i) => quoteArb(i)))),
  layout: fc.constantFrom('wide' as const, 'long' as const),
  delimiter: fc.constantFrom(',' as const, ';' as const, '\t' as const, '|' as const),
  decimal: fc.constantFrom('.' as const, ',' as const),
  groupThousands: fc.boolean(),
  crlf: fc.boolean(),
});

/** RFC 4180 §2: a field holding the delimiter, a quote or a line break is quoted, inner quotes doubled. */
function field(s: string, d: string): string {
  return s.includes(d) || s.includes('"') || s.includes('\n') || s.includes('\r') ? `"${s.replace(/"/g, '""')}"` : s;
}

function num(n: number, decimal: string, group: boolean): string {
  const [int, frac] = String(n).split('.') as [string, string | undefined];
  const sep = decimal === '.' ? ',' : '.';
  const grouped = group ? int.replace(/\B(?=(\d{3})+(?!\d))/g, sep) : int;
  return frac === undefined ? grouped : `${grouped}${decimal}${frac}`;
}

interface GenFile {
  quotes: GenQuote[];
  layout: 'wide' | 'long';
  delimiter: ',' | ';' | '\t' | '|';
  decimal: '.' | ',';
  groupThousands: boolean;
  crlf: boolean;
}

function writeFile(f: GenFile): string {
  const d = f.delimiter;
  const n = (x: number) => num(x, f.decimal, f.groupThousands);
  const common = (q: GenQuote) => [q.mpn, q.supplierCode, q.description, q.currency, n(q.moq), n(q.pack), String(q.leadDays), q.date];
  const head = ['Manufacturer part no', 'Order code', 'Description', 'Currency', 'MOQ', 'Pack qty', 'Lead time (days)', 'Quote date'];
  const lines: string[][] = [];
  if (f.layout === 'wide') {
    const most = Math.max(...f.quotes.map((q) => q.breaks.length));
    lines.push([...head, ...Array.from({ length: most }, (_, i) => [`Qty ${i + 1}`, `Price ${i + 1}`]).flat()]);
    for (const q of f.quotes) {
      const cells = q.breaks.flatMap((b) => [n(b.qty), n(b.price)]);
      while (cells.length < most * 2) cells.push('');
      lines.push([...common(q), ...cells]);
    }
  } else {
    lines.push([...head, 'Qty', 'Unit price']);
    for (const q of f.quotes) for (const b of q.breaks) lines.push([...common(q), n(b.qty), n(b.price)]);
  }
  const eol = f.crlf ? '\r\n' : '\n';
  return lines.map((cells) => cells.map((c) => field(c, d)).join(d)).join(eol) + eol;
}

describe('price file round trip (property)', () => {
  it('random quotes written in any layout, delimiter and decimal style come back unchanged', async () => {
    await fc.assert(
      fc.asyncProperty(fileArb, async (f) => {
        const text = writeFile(f);
        // When no number in the file settles the decimal mark, the user states it, as the import screen asks.
        const numbers = f.quotes.flatMap((q) => [q.moq, q.pack, ...q.breaks.flatMap((b) => [b.qty, b.price])]);
        const decisive = numbers.some((x) => decimalVote(num(x, f.decimal, f.groupThousands)) !== undefined);
        const a = await analyse(bytesOf(text), decisive ? {} : { decimal: f.decimal });
        expect(a.problems).toEqual([]);
        expect(a.layout).toBe(f.layout);
        expect(a.delimiter).toBe(f.delimiter);
        expect(a.decimal).toBe(f.decimal);
        expect(
          a.offers.map((o) => ({
            mpn: o.mpn,
            supplierCode: o.supplierCode,
            description: o.description,
            currency: o.currency,
            breaks: o.breaks,
            moq: o.moq,
            pack: o.pack,
            leadDays: o.leadDays,
            date: o.date,
          })),
        ).toEqual(f.quotes);
      }),
      { numRuns: 150 },
    );
  });
});
