// The one number formatter: one locale, grouped counts, fixed decimals, money with and without its currency, and
// short figures for messages.
import { describe, expect, it } from 'vitest';
import { LOCALE, MONEY_KINDS, MONEY_TEXTS_KEPT, currencyMoney, fixed, grouped, money, moneyDigits, signedMoney, significant } from '../../src/domain/format.ts';

describe('format', () => {
  it('writes figures in one locale', () => {
    expect(LOCALE).toBe('en-GB');
  });
  it('groups counts with commas', () => {
    expect(grouped(5_000_000)).toBe('5,000,000');
    expect(grouped(999)).toBe('999');
  });
  it('writes exactly the asked decimals, grouped', () => {
    expect(fixed(1234.5, 2)).toBe('1,234.50');
    expect(fixed(0.12345, 4)).toBe('0.1235');
    expect(fixed(12, 0)).toBe('12');
  });
  it('writes a variant’s unit cost and every total to the cent, a part’s price with up to four decimals, a dash when it is not a number', () => {
    expect(money(1.5, 'unitCost')).toBe('1.50');
    expect(money(12.34567, 'unitCost')).toBe('12.35');
    expect(money(1234.5, 'total')).toBe('1,234.50');
    expect(money(0.0042, 'partPrice')).toBe('0.0042');
    expect(money(0.00415, 'partPrice')).toBe('0.0042');
    expect(money(0.12, 'partPrice')).toBe('0.12');
    expect(money(1.5, 'partPrice')).toBe('1.50');
    expect(money(Number.NaN, 'total')).toBe('—');
    expect(money(Number.POSITIVE_INFINITY, 'unitCost')).toBe('—');
  });
  it('has one digit rule per kind: only a part’s price keeps sub-cent digits', () => {
    expect(MONEY_KINDS).toEqual({ partPrice: { min: 2, max: 4 }, unitCost: { min: 2, max: 2 }, total: { min: 2, max: 2 } });
  });
  it('rounds half away from zero as the costing does, not by the binary value (1.005 is 1.01)', () => {
    expect(money(1.005, 'unitCost')).toBe('1.01');
    expect(money(2.675, 'total')).toBe('2.68');
    expect(money(0.00005, 'partPrice')).toBe('0.0001');
  });
  it('writes the same digits without grouping for the CLI’s tables', () => {
    expect(moneyDigits(1234.5, 'total')).toBe('1234.50');
    expect(moneyDigits(12.34567, 'unitCost')).toBe('12.35');
    expect(moneyDigits(0.0042, 'partPrice')).toBe('0.0042');
    expect(moneyDigits(0.12, 'partPrice')).toBe('0.12');
    expect(moneyDigits(0.125, 'partPrice')).toBe('0.125');
    expect(moneyDigits(Number.NaN, 'total')).toBe('');
  });
  it('signs a difference with a true minus and no sign for zero', () => {
    expect(signedMoney(0.1234, 'unitCost')).toBe('+0.12');
    expect(signedMoney(-0.05, 'total')).toBe('−0.05');
    expect(signedMoney(-0.001, 'unitCost')).toBe('0.00');
    expect(signedMoney(0.1234, 'partPrice')).toBe('+0.1234');
    expect(signedMoney(-0.00001, 'partPrice')).toBe('0.00');
  });
  it('puts the currency sign before money, and leaves out a code the platform does not know', () => {
    expect(currencyMoney(1234.5, 'EUR', 'total')).toBe('€1,234.50');
    expect(currencyMoney(0.456, 'GBP', 'unitCost')).toBe('£0.46');
    expect(currencyMoney(0.0042, 'EUR', 'partPrice')).toBe('€0.0042');
    expect(currencyMoney(3, 'not a code', 'unitCost')).toBe('3.00');
  });
  it('writes a figure it wrote before the same, and the same as a format made afresh (common practice: Intl.NumberFormat)', () => {
    const fresh = new Intl.NumberFormat(LOCALE, { style: 'currency', currency: 'USD', minimumFractionDigits: 2, maximumFractionDigits: 2 });
    // More figures than are kept, twice over, so the kept texts are cleared and made again on the way.
    const amounts = Array.from({ length: MONEY_TEXTS_KEPT * 2 + 7 }, (_, i) => i * 0.37 - 500);
    for (const round of [1, 2]) {
      for (const a of amounts) {
        const want = fresh.format(Math.round(a * 100) / 100);
        if (currencyMoney(a, 'USD', 'unitCost') !== want) throw new Error(`round ${round}: ${a} written as ${currencyMoney(a, 'USD', 'unitCost')}, not ${want}`);
      }
    }
    expect(currencyMoney(12.345, 'USD', 'unitCost')).toBe('US$12.35');
    // A tiny loss rounds to zero with its sign, a tiny gain to plain zero, whichever was written first.
    expect(currencyMoney(-0.001, 'USD', 'unitCost')).toBe(fresh.format(-0));
    expect(currencyMoney(0.001, 'USD', 'unitCost')).toBe(fresh.format(0));
    expect(currencyMoney(-0.001, 'USD', 'unitCost')).toBe(fresh.format(-0));
  });
  it('keeps whole numbers and writes others to four significant digits without trailing zeros', () => {
    expect(significant(480)).toBe('480');
    expect(significant(357.77)).toBe('357.8');
    expect(significant(1.2)).toBe('1.2');
    expect(significant(0.000123456)).toBe('0.0001235');
    expect(significant(1000.4)).toBe('1000');
    expect(significant(12345.6)).toBe('12350');
  });
});
