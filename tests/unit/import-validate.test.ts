// Every row is checked before anything is written; each problem names the file line, the column, the cell text and
// the reason. An offer with any problem is left out of the offers list.
import { describe, expect, it } from 'vitest';
import { analyse } from './import-helpers.ts';

const HEADER = 'MPN,Qty,Price,Currency,MOQ,Pack,Lead time,Quote date,Valid until';
const GOOD = 'QT-C100N-50,10,0.10,EUR,10,10,14,2026-11-01,2027-01-31';

async function problemsFor(row: string) {
  const a = await analyse(`${HEADER}\n${GOOD}\n${row}\n`);
  // The good row still yields its offer; the bad one does not.
  expect(a.offers.map((o) => o.mpn)).toEqual(['QT-C100N-50']);
  return a.problems;
}

describe('row checks', () => {
  it('reports a missing price', async () => {
    expect(await problemsFor('QT-R10K-06,100,,EUR,1,1,7,2026-11-01,')).toEqual([
      { row: 3, column: 'Price', value: '', reason: 'price is missing' },
    ]);
  });

  it('reports a price that is not a number', async () => {
    expect(await problemsFor('QT-R10K-06,100,call us,EUR,1,1,7,2026-11-01,')).toEqual([
      { row: 3, column: 'Price', value: 'call us', reason: 'price is not a number (read with decimal point)' },
    ]);
  });

  it('reports a zero or negative price', async () => {
    expect(await problemsFor('QT-R10K-06,100,-0.05,EUR,1,1,7,2026-11-01,')).toEqual([
      { row: 3, column: 'Price', value: '-0.05', reason: 'price must be above zero' },
    ]);
  });

  it('reports zero and negative quantities', async () => {
    expect(await problemsFor('QT-R10K-06,0,0.05,EUR,1,1,7,2026-11-01,')).toEqual([
      { row: 3, column: 'Qty', value: '0', reason: 'break quantity must be above zero' },
    ]);
    expect(await problemsFor('QT-R10K-06,-5,0.05,EUR,1,1,7,2026-11-01,')).toEqual([
      { row: 3, column: 'Qty', value: '-5', reason: 'break quantity must be above zero' },
    ]);
  });

  it('reports a fractional break quantity', async () => {
    expect((await problemsFor('QT-R10K-06,2.5,0.05,EUR,1,1,7,2026-11-01,'))[0]).toMatchObject({ column: 'Qty', reason: 'break quantity must be a whole number' });
  });

  it('reports an unknown currency, listing the ones the Book can convert', async () => {
    expect(await problemsFor('QT-R10K-06,100,0.05,CHF,1,1,7,2026-11-01,')).toEqual([
      { row: 3, column: 'Price', value: '0.05', reason: 'unknown currency CHF: the Book has exchange rates for EUR, GBP, USD; add a rate first' },
    ]);
  });

  it('reports a currency cell that is not a code', async () => {
    expect((await problemsFor('QT-R10K-06,100,0.05,euro,1,1,7,2026-11-01,'))[0]).toMatchObject({ column: 'Currency', value: 'euro' });
  });

  it('reports MOQ and pack that are not positive whole numbers', async () => {
    expect(await problemsFor('QT-R10K-06,100,0.05,EUR,0,2.5,7,2026-11-01,')).toEqual([
      { row: 3, column: 'MOQ', value: '0', reason: 'MOQ must be a whole number above zero' },
      { row: 3, column: 'Pack', value: '2.5', reason: 'pack quantity must be a whole number above zero' },
    ]);
  });

  it('reports bad dates and an expiry before the quote date', async () => {
    expect(await problemsFor('QT-R10K-06,100,0.05,EUR,1,1,7,2026-13-01,')).toEqual([
      { row: 3, column: 'Quote date', value: '2026-13-01', reason: 'not a date: use YYYY-MM-DD (or DD.MM.YYYY)' },
    ]);
    expect(await problemsFor('QT-R10K-06,100,0.05,EUR,1,1,7,2026-11-01,2026-10-01')).toEqual([
      { row: 3, column: 'Valid until', value: '2026-10-01', reason: 'expires (2026-10-01) before the quote date (2026-11-01)' },
    ]);
  });

  it('reports a bad lead time', async () => {
    expect((await problemsFor('QT-R10K-06,100,0.05,EUR,1,1,ages,2026-11-01,'))[0]).toMatchObject({ column: 'Lead time', value: 'ages' });
  });

  it('reports a row without any part identifier', async () => {
    expect((await problemsFor(',100,0.05,EUR,1,1,7,2026-11-01,'))[0]).toMatchObject({ row: 3, column: 'MPN', reason: 'no maker part number or supplier code on this row' });
  });

  it('reports long-layout breaks out of order and duplicated, with both lines', async () => {
    const a = await analyse('MPN,Qty,Price\nQT-R10K-06,100,0.04\nQT-R10K-06,10,0.05\nQT-C100N-50,10,0.1\nQT-C100N-50,10,0.09\n');
    expect(a.offers).toEqual([]);
    expect(a.problems).toEqual([
      { row: 3, column: 'Qty', value: '10', reason: 'break quantity 10 is below the previous break (100, line 2): breaks out of order' },
      { row: 5, column: 'Qty', value: '10', reason: 'break quantity 10 is given twice for this part (also line 4)' },
    ]);
  });

  it('reports wide-layout breaks out of order and duplicated', async () => {
    const a = await analyse('MPN,Qty 1,Price 1,Qty 2,Price 2\nQT-R10K-06,100,0.04,10,0.05\nQT-C100N-50,10,0.1,10,0.09\n');
    expect(a.offers).toEqual([]);
    expect(a.problems).toEqual([
      { row: 2, column: 'Qty 2', value: '10', reason: 'break quantity 10 is below the previous break (100): breaks out of order' },
      { row: 3, column: 'Qty 2', value: '10', reason: 'break quantity 10 is given twice' },
    ]);
  });

  it('reports a price with no quantity in a wide row', async () => {
    const a = await analyse('MPN,Qty 1,Price 1,Qty 2,Price 2\nQT-R10K-06,1,0.05,,0.04\n');
    expect(a.problems).toEqual([{ row: 2, column: 'Qty 2', value: '', reason: 'price without a break quantity' }]);
  });

  it('reports one part quoted on two wide rows', async () => {
    const a = await analyse('MPN,10+\nQT-R10K-06,0.05\nqt-r10k-06,0.04\n');
    expect(a.problems).toEqual([{ row: 3, column: 'MPN', value: 'qt-r10k-06', reason: 'the same part is already on line 2' }]);
  });

  it('takes the smallest MOQ when a long-layout file gives one per price break, and says so naming the part', async () => {
    const a = await analyse('MPN,Qty,Price,MOQ\nQT-R10K-06,1,0.05,10\nQT-R10K-06,100,0.04,50\n');
    expect(a.problems).toEqual([]);
    expect(a.offers).toHaveLength(1);
    expect(a.offers[0]).toMatchObject({ moq: 10, breaks: [{ qty: 1, price: 0.05 }, { qty: 100, price: 0.04 }] });
    expect(a.notes.join('\n')).toContain('MOQ differs between price breaks for 1 part(s) (QT-R10K-06 (line 2))');
  });

  it('names the part and the line when long-layout rows of one part disagree on the pack quantity', async () => {
    const a = await analyse('MPN,Qty,Price,Pack\nQT-R10K-06,1,0.05,10\nQT-R10K-06,100,0.04,50\n');
    expect(a.problems).toEqual([{ row: 3, column: 'Pack', value: '50', reason: 'differs from line 2 for the same part QT-R10K-06 (10)' }]);
    expect(a.offers).toHaveLength(0);
  });

  it('defaults MOQ to the first break, pack to 1 and lead time to 0 when the file is silent', async () => {
    // Common practice: a price list's lowest break is the least a supplier sells; no pack size means single pieces.
    const a = await analyse('MPN,Qty,Price\nQT-R10K-06,25,0.05\n');
    expect(a.offers[0]).toMatchObject({ moq: 25, pack: 1, leadDays: 0 });
  });

  it('counts every problem row, not only the first', async () => {
    const rows = Array.from({ length: 30 }, (_, i) => `QT-X${i},10,bad`).join('\n');
    const a = await analyse(`MPN,Qty,Price\n${rows}\n`);
    expect(a.problems).toHaveLength(30);
    expect(a.problems.map((p) => p.row)).toEqual(Array.from({ length: 30 }, (_, i) => i + 2));
    expect(a.rejectedOffers).toBe(30);
  });
});
