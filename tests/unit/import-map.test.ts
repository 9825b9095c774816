// Column mapping and cell readers: header synonyms, wide and long layouts, decimal comma or point decided per file,
// currencies (ISO 4217 codes or € $ £), prices per 100 / 1000 / pack, lead time in days or weeks, dates.
import { describe, expect, it } from 'vitest';
import {
  breakHeader,
  decimalVote,
  guessField,
  parseColumnMapping,
  parseDate,
  parseLeadDays,
  parseNumber,
  resolveMapping,
  splitMoney,
} from '../../src/io/price-map.ts';
import { analyse } from './import-helpers.ts';

describe('guessing columns from header words', () => {
  const cases: [string, string][] = [
    ['MPN', 'mpn'],
    ['Maker part number', 'mpn'],
    ['Mfr. Part #', 'mpn'],
    ['Manufacturer Part No.', 'mpn'],
    ['Supplier code', 'supplierCode'],
    ['Order Code', 'supplierCode'],
    ['SKU', 'supplierCode'],
    ['Stock No.', 'supplierCode'],
    ['Description', 'description'],
    ['Manufacturer', 'maker'],
    ['Qty', 'qty'],
    ['Quantity', 'qty'],
    ['Break', 'qty'],
    ['From', 'qty'],
    ['Price', 'price'],
    ['Unit Price (USD)', 'price'],
    ['Each', 'price'],
    ['Currency', 'currency'],
    ['MOQ', 'moq'],
    ['Minimum order', 'moq'],
    ['Pack', 'pack'],
    ['Pack qty', 'pack'],
    ['Multiple', 'pack'],
    ['Reel', 'pack'],
    ['Lead time (weeks)', 'leadTime'],
    ['Lead time days', 'leadTime'],
    ['Quote date', 'date'],
    ['Valid from', 'date'],
    ['Valid until', 'expires'],
    ['Expires', 'expires'],
    ['Price list date', 'date'],
  ];
  for (const [header, field] of cases) {
    it(`reads "${header}" as ${field}`, () => expect(guessField(header)).toBe(field));
  }
  it('leaves unknown headers unmapped', () => {
    expect(guessField('Remark')).toBeUndefined();
    expect(guessField('RoHS')).toBeUndefined();
  });
});

describe('wide layout columns', () => {
  it('pairs "Qty N" / "Price N" and "Break N" / "Price N" columns', () => {
    expect(breakHeader('Qty 1')).toEqual({ kind: 'qty', index: 1 });
    expect(breakHeader('Break 2')).toEqual({ kind: 'qty', index: 2 });
    expect(breakHeader('Price 2')).toEqual({ kind: 'price', index: 2 });
  });

  it('reads "10+", "1,000+" and ">= 5000" headers as break quantities', () => {
    expect(breakHeader('10+')).toEqual({ kind: 'fixed', qty: 10 });
    expect(breakHeader('1,000+')).toEqual({ kind: 'fixed', qty: 1000 });
    expect(breakHeader('>= 5000')).toEqual({ kind: 'fixed', qty: 5000 });
    expect(breakHeader('Price 100+')).toEqual({ kind: 'fixed', qty: 100 });
  });

  it('resolves a wide header into ordered breaks and remembers it as a mapping', () => {
    const headers = ['MPN', 'Qty 1', 'Price 1', 'Qty 2', 'Price 2', 'MOQ'];
    const m = resolveMapping(headers, 1);
    expect(m.layout).toBe('wide');
    expect(m.breaks).toEqual([
      { qtyCol: 1, priceCol: 2 },
      { qtyCol: 3, priceCol: 4 },
    ]);
    expect(m.saved).toEqual({ layout: 'wide', columns: { mpn: 'MPN', moq: 'MOQ', qty1: 'Qty 1', price1: 'Price 1', qty2: 'Qty 2', price2: 'Price 2' } });
  });

  it('never guesses a field or break the person set to "not used"', async () => {
    const headers = ['MPN', 'Qty 1', 'Price 1', 'Qty 2', 'Price 2', 'MOQ', 'Pack'];
    const m = resolveMapping(headers, 1, { layout: 'wide', columns: { mpn: 'MPN' } }, ['moq', 'qty2', 'price2']);
    expect(m.saved.columns).toEqual({ mpn: 'MPN', pack: 'Pack', qty1: 'Qty 1', price1: 'Price 1' });
    expect(m.breaks).toEqual([{ qtyCol: 1, priceCol: 2 }]);
    const a = await analyse('MPN,Qty,Price,MOQ\nQT-R10K-06,1,0.05,10\n', { unused: ['moq'] });
    expect(a.mapping.columns['moq']).toBeUndefined();
    expect(a.offers[0]!.moq).toBe(1);
  });

  it('reads a "10+ / 100+ / 1000+" file into three breaks per row', async () => {
    const a = await analyse('MPN,1+,10+,100+\nQT-R10K-06,0.05,0.04,0.03\n');
    expect(a.problems).toEqual([]);
    expect(a.layout).toBe('wide');
    expect(a.offers[0]!.breaks).toEqual([
      { qty: 1, price: 0.05 },
      { qty: 10, price: 0.04 },
      { qty: 100, price: 0.03 },
    ]);
  });

  it('groups long-layout rows of the same part (by normalised maker part number) into one quote', async () => {
    const a = await analyse('MPN,Qty,Price\nQT-R10K-06,1,0.05\nQT-C100N-50,1,0.2\nqt r10k 06,100,0.03\n');
    expect(a.layout).toBe('long');
    expect(a.offers.map((o) => [o.mpn, o.breaks.map((b) => b.qty)])).toEqual([
      ['QT-R10K-06', [1, 100]],
      ['QT-C100N-50', [1]],
    ]);
  });

  it('applies a saved mapping before guessing, so unusual headers import', async () => {
    const mapping = { columns: { mpn: 'Artikel', qty: 'Menge', price: 'Preis' }, layout: 'long' as const };
    const a = await analyse('Artikel;Menge;Preis\nQT-R10K-06;100;0,05\n', { mapping });
    expect(a.problems).toEqual([]);
    expect(a.offers[0]!.breaks).toEqual([{ qty: 100, price: 0.05 }]);
  });

  it('refuses a file with no price column or no part column', async () => {
    const noPrice = await analyse('MPN,Qty,Description\nQT-R10K-06,1,x\nQT-C100N-50,1,y\n');
    // One problem for the header, not one per row.
    expect(noPrice.problems).toEqual([{ row: 1, column: '', value: 'MPN | Qty | Description', reason: expect.stringMatching(/no price column/) }]);
    expect(noPrice.offers).toEqual([]);
    const noPart = await analyse('Description,Qty,Price\nx,1,0.05\n');
    expect(noPart.problems.map((p) => p.reason).join(' ')).toMatch(/no part column/);
  });
});

describe('numbers', () => {
  it('reads decimal point and decimal comma with thousands separators', () => {
    expect(parseNumber('1,234.5', '.')).toBe(1234.5);
    expect(parseNumber('1.234,5', ',')).toBe(1234.5);
    expect(parseNumber('1 234,5', ',')).toBe(1234.5);
    expect(parseNumber("1'234.5", '.')).toBe(1234.5);
    expect(parseNumber('0,05', ',')).toBe(0.05);
    expect(parseNumber('.5', '.')).toBe(0.5);
  });

  it('refuses thousands groups that are not three digits and other junk', () => {
    expect(parseNumber('1,23.5', '.')).toBeUndefined();
    expect(parseNumber('0,05', '.')).toBeUndefined();
    expect(parseNumber('1.2.3', '.')).toBeUndefined();
    expect(parseNumber('abc', '.')).toBeUndefined();
    expect(parseNumber('', '.')).toBeUndefined();
  });

  it('lets each cell vote for a decimal mark only when it can be read one way', () => {
    expect(decimalVote('0,05')).toBe(',');
    expect(decimalVote('12.50')).toBe('.');
    expect(decimalVote('1.234,5')).toBe(',');
    expect(decimalVote('1,234.5')).toBe('.');
    expect(decimalVote('1.234.567')).toBe(',');
    expect(decimalVote('1,234')).toBeUndefined();
    expect(decimalVote('100')).toBeUndefined();
  });

  it('decides the decimal mark once per file from the data and reports why', async () => {
    const a = await analyse('MPN;Qty;Price\nQT-R10K-06;1.000;0,05\nQT-C100N-50;10;1,5\n');
    expect(a.decimal).toBe(',');
    expect(a.decimalReason).toMatch(/decimal comma: 2 number cell/);
    // "1.000" is a thousand under decimal comma.
    expect(a.offers[0]!.breaks[0]).toEqual({ qty: 1000, price: 0.05 });
  });

  it('reads every row under the decimal mark the whole file decides, even when only a late row settles it', async () => {
    // Rows are checked as they are read: the first price reads either way, the last one only with a decimal comma.
    const a = await analyse('MPN,Qty,Price\nQT-R10K-06,1,"1,234"\nQT-C100N-50,10,"2,5"\nQT-D400-1A,5,"0,5"\n');
    expect(a.decimal).toBe(',');
    expect(a.decimalReason).toMatch(/decimal comma: 2 number cell/);
    expect(a.offers.map((o) => o.breaks[0]!.price)).toEqual([1.234, 2.5, 0.5]);
    expect(a.problems).toEqual([]);
  });

  it('lets the user override the decimal mark when the file cannot tell', async () => {
    const text = 'MPN,Qty,Price\nQT-R10K-06,1,1.250\n';
    const guessed = await analyse(text);
    expect(guessed.decimalReason).toMatch(/do not tell/);
    expect(guessed.offers[0]!.breaks[0]!.price).toBe(1.25);
    const chosen = await analyse(text, { decimal: ',' });
    expect(chosen.decimalReason).toMatch(/as you chose/);
    expect(chosen.offers[0]!.breaks[0]!.price).toBe(1250);
  });
});

describe('currencies', () => {
  it('reads symbols and ISO 4217 codes before or after the number', () => {
    // ISO 4217: EUR, USD, GBP are the codes for euro, US dollar and pound sterling.
    expect(splitMoney('€0.12')).toEqual({ text: '0.12', currency: 'EUR' });
    expect(splitMoney('0,12 €')).toEqual({ text: '0,12', currency: 'EUR' });
    expect(splitMoney('$1.20')).toEqual({ text: '1.20', currency: 'USD' });
    expect(splitMoney('£3')).toEqual({ text: '3', currency: 'GBP' });
    expect(splitMoney('USD 0.12')).toEqual({ text: '0.12', currency: 'USD' });
    expect(splitMoney('0.12 gbp')).toEqual({ text: '0.12', currency: 'GBP' });
    expect(splitMoney('€1 USD')).toMatchObject({ conflict: 'EUR and USD' });
  });

  it('takes the currency from a column, a cell, the price header or the supplier, in that order', async () => {
    const a = await analyse('MPN,Currency,Price (USD)\nQT-R10K-06,GBP,0.05\nQT-C100N-50,,€0.10\nQT-D400-1A,,0.20\n');
    expect(a.problems).toEqual([]);
    expect(a.offers.map((o) => o.currency)).toEqual(['GBP', 'EUR', 'USD']);
    const plain = await analyse('MPN,Price\nQT-R10K-06,0.05\n');
    expect(plain.offers[0]!.currency).toBe('EUR');
  });
});

describe('price units, lead times and dates', () => {
  it('divides prices per 100 and per 1000 to unit prices', async () => {
    // Unit price = list price / price unit (arithmetic; common practice in price lists).
    const per100 = await analyse('MPN,Price per 100\nQT-R10K-06,1.23\n');
    expect(per100.offers[0]!.breaks[0]!.price).toBe(0.0123);
    const per1000 = await analyse('MPN,Price / 1000\nQT-R10K-06,4.5\n');
    expect(per1000.offers[0]!.breaks[0]!.price).toBe(0.0045);
  });

  it('divides prices per pack by the pack quantity', async () => {
    const a = await analyse('MPN,Pack,Price per pack\nQT-R10K-06,50,2.00\n');
    expect(a.offers[0]!.breaks[0]!.price).toBe(0.04);
    expect(a.offers[0]!.pack).toBe(50);
  });

  it('reads a price unit column row by row', async () => {
    const a = await analyse('MPN,Price,Per\nQT-R10K-06,5,100\nQT-C100N-50,5,1\n');
    expect(a.offers.map((o) => o.breaks[0]!.price)).toEqual([0.05, 5]);
  });

  it('reads lead times in days or weeks, from the cell or the header', () => {
    // A week is 7 days (ISO 8601 week); fractional days round to the nearest day (common practice).
    expect(parseLeadDays('28', '.', undefined)).toBe(28);
    expect(parseLeadDays('28 days', '.', 'weeks')).toBe(28);
    expect(parseLeadDays('4 wk', '.', undefined)).toBe(28);
    expect(parseLeadDays('4 weeks', '.', undefined)).toBe(28);
    expect(parseLeadDays('4', '.', 'weeks')).toBe(28);
    expect(parseLeadDays('2,5 wks', ',', undefined)).toBe(18);
    expect(parseLeadDays('soon', '.', undefined)).toBeUndefined();
  });

  it('uses the unit in a "Lead time (weeks)" header', async () => {
    const a = await analyse('MPN,Price,Lead time (weeks)\nQT-R10K-06,0.05,3\n');
    expect(a.offers[0]!.leadDays).toBe(21);
  });

  it('reads ISO 8601 dates, dotted day.month.year and slashed dates in the file\'s order', () => {
    expect(parseDate('2026-03-05', 'dmy')).toBe('2026-03-05');
    expect(parseDate('05.03.2026', 'dmy')).toBe('2026-03-05');
    expect(parseDate('05/03/2026', 'dmy')).toBe('2026-03-05');
    expect(parseDate('03/05/2026', 'mdy')).toBe('2026-03-05');
    // 2026 is not a leap year (Gregorian rule), so 29 February does not exist.
    expect(parseDate('2026-02-29', 'dmy')).toBeUndefined();
    expect(parseDate('2028-02-29', 'dmy')).toBe('2028-02-29');
  });

  it('decides month/day order from a date that can only be read one way', async () => {
    const a = await analyse('MPN,Price,Quote date\nQT-R10K-06,0.05,12/25/2026\nQT-C100N-50,0.1,03/04/2026\n');
    expect(a.dateOrder).toBe('mdy');
    expect(a.offers.map((o) => o.date)).toEqual(['2026-12-25', '2026-03-04']);
  });

  it('reads every date in the order the whole file decides, even when only the last row settles it', async () => {
    const a = await analyse('MPN,Price,Quote date\nQT-R10K-06,0.05,03/04/2026\nQT-C100N-50,0.1,05/06/2026\nQT-D400-1A,0.2,12/25/2026\n');
    expect(a.dateOrder).toBe('mdy');
    expect(a.offers.map((o) => o.date)).toEqual(['2026-03-04', '2026-05-06', '2026-12-25']);
  });

  it('dates quotes with the import day when the file gives none', async () => {
    const a = await analyse('MPN,Price\nQT-R10K-06,0.05\n', { today: '2026-11-30' });
    expect(a.offers[0]!.date).toBe('2026-11-30');
  });
});

describe('mapping files', () => {
  it('accepts a valid mapping', () => {
    const r = parseColumnMapping({ columns: { mpn: 'Part', 'price@10': '10+' }, layout: 'wide', decimal: ',' });
    expect(r).toEqual({ ok: true, mapping: { columns: { mpn: 'Part', 'price@10': '10+' }, layout: 'wide', decimal: ',' } });
  });

  it('refuses unknown fields and bad values with a message naming them', () => {
    expect(parseColumnMapping({ columns: { colour: 'X' } })).toMatchObject({ ok: false, reason: expect.stringMatching(/unknown field "colour"/) });
    expect(parseColumnMapping({ columns: {}, layout: 'diagonal' })).toMatchObject({ ok: false, reason: expect.stringMatching(/layout/) });
    expect(parseColumnMapping([])).toMatchObject({ ok: false });
    expect(parseColumnMapping({ columns: { mpn: '' } })).toMatchObject({ ok: false, reason: expect.stringMatching(/non-empty/) });
  });
});
