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

  it('keeps each break’s own MOQ: a break whose MOQ is above its quantity starts at that MOQ, named in a note', async () => {
    // The rule is common practice (no published source): a distributor sells a price break from its own minimum
    // order, so a break cannot be bought below its MOQ whatever its quantity column says.
    const a = await analyse('MPN,Qty,Price,MOQ\nQT-R10K-06,1,0.05,10\nQT-R10K-06,100,0.04,50\n');
    expect(a.problems).toEqual([]);
    expect(a.offers).toHaveLength(1);
    // The first break cannot be bought below 10; the second's MOQ is below its quantity and changes nothing. The
    // quote's MOQ is that of its smallest break.
    expect(a.offers[0]).toMatchObject({ moq: 10, breaks: [{ qty: 10, price: 0.05 }, { qty: 100, price: 0.04 }] });
    expect(a.notes).toContain('1 price break(s) start at their own MOQ, above the break quantity the file gives: QT-R10K-06, break at 1 (line 2) starts at its MOQ 10');
  });

  it('no longer lets a larger break be bought below its own MOQ', async () => {
    // Before, the quote took the smallest MOQ (10) and the 0.03 break could be bought at 500 against a supplier MOQ of 1,000.
    const a = await analyse('MPN,Qty,Price,MOQ\nQT-R10K-06,10,0.05,10\nQT-R10K-06,500,0.03,1000\n');
    expect(a.problems).toEqual([]);
    expect(a.offers[0]).toMatchObject({ moq: 10, breaks: [{ qty: 10, price: 0.05 }, { qty: 1000, price: 0.03 }] });
    expect(a.notes.join('\n')).toContain('QT-R10K-06, break at 500 (line 3) starts at its MOQ 1000');
  });

  it('keeps the cheaper price when a raised break falls on the quantity of another, and says so', async () => {
    const a = await analyse('MPN,Qty,Price,MOQ\nQT-R10K-06,1,0.05,100\nQT-R10K-06,100,0.04,100\nQT-R10K-06,1000,0.03,1000\n');
    expect(a.problems).toEqual([]);
    expect(a.offers[0]).toMatchObject({ moq: 100, breaks: [{ qty: 100, price: 0.04 }, { qty: 1000, price: 0.03 }] });
    expect(a.notes).toContain(
      '1 price break(s) then fell on the quantity of another break of the same part; the cheaper price is kept: QT-R10K-06, lines 2 and 3 both at 100: kept 0.04 (line 3), left out 0.05',
    );
  });

  it('orders the breaks again when a raised break passes a later one, and takes the MOQ of the smallest break', async () => {
    const a = await analyse('MPN,Qty,Price,MOQ\nQT-R10K-06,1,0.05,500\nQT-R10K-06,100,0.04,20\n');
    expect(a.problems).toEqual([]);
    expect(a.offers[0]).toMatchObject({ moq: 20, breaks: [{ qty: 100, price: 0.04 }, { qty: 500, price: 0.05 }] });
  });

  it('takes one MOQ given alike on every row of a part as the quote’s MOQ and leaves the breaks as they are', async () => {
    const a = await analyse('MPN,Qty,Price,MOQ\nQT-R10K-06,1,0.05,10\nQT-R10K-06,100,0.04,10\n');
    expect(a.offers[0]).toMatchObject({ moq: 10, breaks: [{ qty: 1, price: 0.05 }, { qty: 100, price: 0.04 }] });
    expect(a.notes.join('\n')).not.toMatch(/MOQ|cheaper/);
  });

  it('leaves breaks whose MOQ is at or below their quantity as the file gives them, with no note', async () => {
    const a = await analyse('MPN,Qty,Price,MOQ\nQT-R10K-06,10,0.05,10\nQT-R10K-06,100,0.04,1\n');
    expect(a.offers[0]).toMatchObject({ moq: 10, breaks: [{ qty: 10, price: 0.05 }, { qty: 100, price: 0.04 }] });
    expect(a.notes.join('\n')).not.toMatch(/MOQ|cheaper/);
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
