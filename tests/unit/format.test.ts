// The one number formatter: one locale, grouped counts, fixed decimals, money with and without its currency, and
// short figures for messages.
import { describe, expect, it } from 'vitest';
import { LOCALE, PART_UNIT_DIGITS, currencyMoney, fixed, grouped, money, signedMoney, significant } from '../../src/domain/format.ts';

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
  it('writes money to the cent by default, a part’s cost per unit to four decimals, a dash when it is not a number', () => {
    expect(money(1.5)).toBe('1.50');
    expect(money(1234.5)).toBe('1,234.50');
    expect(money(0.0012, PART_UNIT_DIGITS)).toBe('0.0012');
    expect(money(Number.NaN)).toBe('—');
    expect(money(Number.POSITIVE_INFINITY)).toBe('—');
  });
  it('signs a difference with a true minus and no sign for zero', () => {
    expect(signedMoney(0.1234)).toBe('+0.12');
    expect(signedMoney(-0.05)).toBe('−0.05');
    expect(signedMoney(-0.001)).toBe('0.00');
    expect(signedMoney(0.1234, PART_UNIT_DIGITS)).toBe('+0.1234');
    expect(signedMoney(-0.00001, PART_UNIT_DIGITS)).toBe('0.0000');
  });
  it('puts the currency sign before money, and leaves out a code the platform does not know', () => {
    expect(currencyMoney(1234.5, 'EUR')).toBe('€1,234.50');
    expect(currencyMoney(0.456, 'GBP')).toBe('£0.46');
    expect(currencyMoney(2, 'EUR', 4)).toBe('€2.0000');
    expect(currencyMoney(3, 'not a code')).toBe('3.00');
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
