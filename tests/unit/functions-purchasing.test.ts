// Purchasing functions: need with attrition, buy in MOQ and packs, all-units price breaks (operations-management texts, from memory).
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { formulaSheet } from './functions-helpers.ts';

// The operations-management worked example (from memory): breaks 1 @ 0.30, 100 @ 0.20, 500 @ 0.15, 1000 @ 0.12,
// 2500 @ 0.09, in A1:B5, with a sixth, empty break row for quotes with fewer breaks.
const { value, fails } = formulaSheet('purchasing', [
  [1, 0.3],
  [100, 0.2],
  [500, 0.15],
  [1000, 0.12],
  [2500, 0.09],
  [null, null],
  [100, 0.3],
  [50, 0.2],
  ['ten', 0.2],
]);

describe('NEED_QTY', () => {
  it('2 per unit × 450 units × 1.01 = 909 (all-units worked example)', () => {
    expect(value('=NEED_QTY(2, 450, 0.01)')).toBe(909);
  });
  it('100 × 1.1 is 110, not 111: the IEEE 754 double 110.00000000000001 is not ceiled up', () => {
    expect(100 * 1.1).toBeGreaterThan(110); // the trap itself
    expect(value('=NEED_QTY(1, 100, 0.1)')).toBe(110);
  });
  it('rounds a true fraction up: 3 × 7 × 1.05 = 22.05 → 23 (by hand)', () => {
    expect(value('=NEED_QTY(3, 7, 0.05)')).toBe(23);
  });
  it('refuses a fractional run, a negative quantity and an attrition of 1 or more', () => {
    expect(fails('=NEED_QTY(1, 10.5, 0)').message).toMatch(/NEED_QTY: run size must be a whole number/);
    expect(fails('=NEED_QTY(-1, 10, 0)').message).toMatch(/quantity per unit must be a number ≥ 0/);
    expect(fails('=NEED_QTY(1, 10, 1)').message).toMatch(/attrition must be a fraction/);
  });
});

describe('BUY_QTY', () => {
  it('909 needed, pack 10 → 910 (all-units worked example)', () => {
    expect(value('=BUY_QTY(909, 1, 10)')).toBe(910);
  });
  it('the MOQ lifts a small need, rounded to whole packs: need 30, MOQ 100, pack 40 → 120 (by hand)', () => {
    expect(value('=BUY_QTY(30, 100, 40)')).toBe(120);
  });
  it('buys nothing when nothing is needed (the costing rule of src/domain/costing.ts)', () => {
    expect(value('=BUY_QTY(0, 100, 10)')).toBe(0);
  });
  it('refuses a pack of 0 and a fractional need', () => {
    expect(fails('=BUY_QTY(10, 1, 0)').message).toMatch(/BUY_QTY: pack quantity must be a whole number ≥ 1/);
    expect(fails('=BUY_QTY(10.5, 1, 1)').message).toMatch(/need must be a whole number/);
  });
  it('is at least the need and the MOQ and a whole number of packs (property)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1e6 }), fc.integer({ min: 0, max: 1e5 }), fc.integer({ min: 1, max: 5000 }), (need, moq, pack) => {
        const buy = value(`=BUY_QTY(${need}, ${moq}, ${pack})`) as number;
        expect(buy).toBeGreaterThanOrEqual(need);
        expect(buy).toBeGreaterThanOrEqual(moq);
        expect(buy % pack).toBe(0);
        expect(buy - pack).toBeLessThan(Math.max(need, moq)); // and no more packs than that
      }),
      { numRuns: 300 },
    );
  });
});

describe('BREAK_PRICE (all-units price breaks; operations-management texts, from memory)', () => {
  it('910 pieces are priced at the 500 break, 0.15; 1000 pieces at 0.12', () => {
    expect(value('=BREAK_PRICE(A1:A5, B1:B5, 910)')).toBe(0.15);
    expect(value('=BREAK_PRICE(A1:A5, B1:B5, 1000)')).toBe(0.12);
  });
  it('buying 1000 costs 120.00, less than 910 at 136.50 (all-units worked example)', () => {
    expect(value('=ROUND(910 * BREAK_PRICE(A1:A5, B1:B5, 910), 2)')).toBe(136.5);
    expect(value('=ROUND(1000 * BREAK_PRICE(A1:A5, B1:B5, 1000), 2)')).toBe(120);
  });
  it('exactly at a break takes that break; the top break covers any larger quantity', () => {
    expect(value('=BREAK_PRICE(A1:A5, B1:B5, 100)')).toBe(0.2);
    expect(value('=BREAK_PRICE(A1:A5, B1:B5, 99)')).toBe(0.3);
    expect(value('=BREAK_PRICE(A1:A5, B1:B5, 1e6)')).toBe(0.09);
  });
  it('skips empty trailing breaks and accepts inline arrays', () => {
    expect(value('=BREAK_PRICE(A1:A6, B1:B6, 2600)')).toBe(0.09);
    expect(value('=BREAK_PRICE({1,100}, {0.3,0.2}, 150)')).toBe(0.2);
  });
  it('answers #N/A with a message below the lowest break', () => {
    const e = fails('=BREAK_PRICE(A2:A5, B2:B5, 50)');
    expect(e.value).toBe('#N/A');
    expect(e.message).toBe('BREAK_PRICE: 50 is below the lowest price break (100)');
  });
  it('refuses breaks that do not rise, text in a break, and ranges of different sizes', () => {
    expect(fails('=BREAK_PRICE(A7:A8, B7:B8, 500)').message).toMatch(/do not rise \(100 then 50\)/);
    expect(fails('=BREAK_PRICE(A8:A9, B8:B9, 500)').message).toMatch(/break 2 needs a number in both ranges/);
    expect(fails('=BREAK_PRICE(A1:A5, B1:B4, 500)').message).toMatch(/5 cells but break_prices has 4/);
  });
});
