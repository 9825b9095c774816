// Engineering values: reading and writing SI-prefixed values with units, and their round trip.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { NOT_A_NUMBER_MARK, formatValue, parseValue } from '../../src/domain/units.ts';

function valueOf(text: string, unit?: string): number {
  const r = parseValue(text, unit);
  if (!r.ok) throw new Error(r.error);
  return r.value;
}

describe('parseValue reads SI prefixes (SI Brochure, 9th ed., table 7: p 1e-12 … G 1e9)', () => {
  it.each([
    ['4.7 kΩ', 4700, 'Ω'],
    ['4.7k', 4700, ''],
    ['4.7K', 4700, ''],
    ['330n', 330e-9, ''],
    ['330 nF', 330e-9, 'F'],
    ['0.47 uF', 0.47e-6, 'F'],
    ['0.47µF', 0.47e-6, 'F'], // micro sign
    ['0.47μF', 0.47e-6, 'F'], // Greek mu
    ['18 mA', 0.018, 'A'],
    ['1.2e3', 1200, ''],
    ['230 V', 230, 'V'],
    ['50Hz', 50, 'Hz'],
    ['-5', -5, ''],
    ['−5 V', -5, 'V'], // typographic minus
    ['10 ms', 0.01, 's'],
    ['2.2 MΩ', 2.2e6, 'Ω'],
    ['1.5 mΩ', 1.5e-3, 'Ω'],
    ['4.7 kohm', 4700, 'Ω'],
    ['100 ohms', 100, 'Ω'],
    ['10R', 10, 'Ω'],
    ['5 K/W', 5, 'K/W'],
    ['25 °C', 25, '°C'],
    ['2 W', 2, 'W'],
    ['.5', 0.5, ''],
    ['4.7\u2009kΩ', 4700, 'Ω'], // thin space
    ['1.5e-15 F', 1.5e-15, 'F'],
  ])('%s is %d %s', (text, value, unit) => {
    const r = parseValue(text);
    expect(r).toEqual({ ok: true, value, unit });
  });

  it('gives exactly the double a user typing the plain decimal gets (4.7n is 4.7e-9, not 4.7 × 1e-9)', () => {
    expect(valueOf('4.7n')).toBe(4.7e-9);
    expect(valueOf('0.1 uF')).toBe(1e-7);
  });
});

describe('parseValue delegates RKM codes (IEC 60062 examples)', () => {
  it.each([
    ['4k7', 4700, 'Ω'],
    ['4K7', 4700, 'Ω'],
    ['2M2', 2.2e6, 'Ω'],
    ['0R22', 0.22, 'Ω'],
    ['R47', 0.47, 'Ω'],
    ['4K7K', 4700, 'Ω'], // ±10 % tolerance letter is dropped from the value
    ['2n2', 2.2e-9, 'F'],
    ['1µ0', 1e-6, 'F'],
    ['4k7 Ω', 4700, 'Ω'],
    ['-4k7', -4700, 'Ω'],
  ])('%s is %d %s', (text, value, unit) => {
    expect(parseValue(text)).toEqual({ ok: true, value, unit });
  });
});

describe('parseValue with an expected unit', () => {
  it('gives a bare number or prefix the expected unit', () => {
    expect(parseValue('330n', 'F')).toEqual({ ok: true, value: 330e-9, unit: 'F' });
    expect(parseValue('230', 'V')).toEqual({ ok: true, value: 230, unit: 'V' });
  });
  it('accepts a spelling of the same unit', () => {
    expect(parseValue('4.7 kohm', 'Ω')).toEqual({ ok: true, value: 4700, unit: 'Ω' });
    expect(parseValue('4k7', 'ohm')).toEqual({ ok: true, value: 4700, unit: 'Ω' });
  });
  it('refuses a value in another unit, naming both', () => {
    const r = parseValue('330 nF', 'V');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error).toMatch(/F but V was expected/);
    expect(parseValue('2n2', 'Ω').ok).toBe(false);
  });
});

describe('parseValue refuses bad input with a clear message', () => {
  it.each(['', '   ', 'abc', '4.7 kV/m', '1e', '4,7k', 'k', '4k7 F', '5 k°C', '1e999'])('"%s"', (text) => {
    const r = parseValue(text);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.length).toBeGreaterThan(5);
  });
  it('refuses an SI prefix on a value in °C or K/W: "25 K" would otherwise read as 25,000 °C', () => {
    expect(parseValue('25 K', '°C')).toEqual({ ok: false, error: '"25 K" has the SI prefix K (kilo), but °C takes no prefix; write the number alone or with °C' });
    expect(parseValue('2m', 'K/W')).toEqual({ ok: false, error: '"2m" has the SI prefix m (milli), but K/W takes no prefix; write the number alone or with K/W' });
    expect(parseValue('25', '°C')).toEqual({ ok: true, value: 25, unit: '°C' });
    expect(parseValue('-10 °C', '°C')).toEqual({ ok: true, value: -10, unit: '°C' });
    // Other units keep their prefixes.
    expect(parseValue('25 k', 'Ω')).toEqual({ ok: true, value: 25000, unit: 'Ω' });
  });
  it('hints at the decimal point when a comma was used', () => {
    const r = parseValue('4,7k');
    expect(!r.ok && r.error).toMatch(/decimal separator/);
  });
});

describe('formatValue writes engineering notation', () => {
  it.each([
    [4700, 'Ω', '4.7 kΩ'],
    [330e-9, 'F', '330 nF'],
    [0.01823, 'A', '18.2 mA'],
    [325.27, 'V', '325 V'], // √2 · 230 V (IEC 60038:2009, table 1 nominal)
    [0.47e-6, 'F', '470 nF'],
    [2.2e6, 'ohm', '2.2 MΩ'],
    [50, 'Hz', '50 Hz'],
    [0, 'V', '0 V'],
    [-5, 'V', '-5 V'],
    [-0.0182, 'A', '-18.2 mA'],
    [999.95, 'V', '1 kV'], // rounding to 3 figures carries into the next prefix
    [4700, '', '4.7k'],
    [25.123, '°C', '25.1 °C'], // no prefix on temperatures
    [1.5e-15, 'F', '1.5e-15 F'], // below pico: exponent form
    [3e12, 'Hz', '3e12 Hz'],
  ])('%d %s → %s', (value, unit, text) => {
    expect(formatValue(value, unit)).toBe(text);
  });
  it('honours the number of significant figures', () => {
    expect(formatValue(4987.6, 'Ω', 2)).toBe('5 kΩ');
    expect(formatValue(4987.6, 'Ω', 4)).toBe('4.988 kΩ');
    expect(formatValue(123456, 'Hz', 6)).toBe('123.456 kHz');
  });
  it('never shows NaN or a bare Infinity', () => {
    expect(formatValue(NaN, 'V')).toBe(NOT_A_NUMBER_MARK);
    expect(formatValue(NaN, 'V')).not.toMatch(/NaN/);
    expect(formatValue(Infinity, 'Ω')).toBe('∞ Ω');
    expect(formatValue(-Infinity, 'V')).toBe('-∞ V');
  });
});

describe('parse(format(x)) round trip', () => {
  const units = ['Ω', 'F', 'V', 'A', 'W', 'Hz', 's', 'H', ''];
  it('recovers x to 6 significant figures from 1e-18 to 1e18, both signs', () => {
    fc.assert(
      fc.property(
        fc.double({ min: -18, max: 18, noNaN: true }),
        fc.boolean(),
        fc.constantFrom(...units),
        (exp, negative, unit) => {
          const x = (negative ? -1 : 1) * 10 ** exp;
          const text = formatValue(x, unit, 6);
          const r = parseValue(text, unit);
          expect(r.ok, text).toBe(true);
          if (r.ok) expect(Math.abs(r.value - x)).toBeLessThanOrEqual(5e-6 * Math.abs(x));
        },
      ),
      { numRuns: 2000 },
    );
  });
  it('recovers exactly zero', () => {
    expect(valueOf(formatValue(0, 'F', 6), 'F')).toBe(0);
  });
});
