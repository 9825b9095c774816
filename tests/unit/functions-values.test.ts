// E-series and RKM functions in formulas (IEC 60063 preferred values, IEC 60062 RKM code examples).
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { formulaSheet } from './functions-helpers.ts';
import { E_SERIES } from '../../src/domain/eseries.ts';

const { value, fails } = formulaSheet('values');

describe('E_NEAR, E_UP, E_DOWN', () => {
  it('nearest to 5 kΩ: E12 4.7k, E24 5.1k, E96 4.99k (IEC 60063)', () => {
    expect(value('=E_NEAR(5000, 12)')).toBe(4700);
    expect(value('=E_NEAR(5000, 24)')).toBe(5100);
    expect(value('=E_NEAR(5000, 96)')).toBe(4990);
  });
  it('up and down over decades; a member is its own up and down', () => {
    expect(value('=E_UP(4.8e-9, 12)')).toBe(5.6e-9);
    expect(value('=E_DOWN(4.8e-9, 12)')).toBe(4.7e-9);
    expect(value('=E_UP(4700, 12)')).toBe(4700);
    expect(value('=E_DOWN(4700, 12)')).toBe(4700);
    expect(value('=E_UP(9.2e5, 6)')).toBe(1e6);
  });
  it('takes engineering text: E_NEAR("5k", 96) = 4990', () => {
    expect(value('=E_NEAR("5k", 96)')).toBe(4990);
  });
  it('refuses an unknown series and a value of 0 with messages', () => {
    const e = fails('=E_NEAR(5000, 10)');
    expect(e.value).toBe('#NUM!');
    expect(e.message).toBe('E_NEAR: unknown series E10; use one of 3, 6, 12, 24, 48, 96, 192');
    expect(fails('=E_UP(0, 12)').message).toMatch(/value must be greater than 0/);
  });
  it('E_NEAR gives a member of the series with no member closer (property, through the engine)', () => {
    fc.assert(
      fc.property(fc.double({ min: -9, max: 7, noNaN: true }), fc.constantFrom(6, 12, 24, 48, 96, 192), (exp, n) => {
        const x = 10 ** exp;
        const near = value(`=E_NEAR(${x}, ${n})`) as number;
        const table = E_SERIES[n]!;
        const figures = table[0] === 10 ? 2 : 3;
        const decade = Math.floor(Math.log10(near) + 1e-12);
        expect(table).toContain(Math.round(near / 10 ** (decade - figures + 1)));
        let closest = Infinity;
        for (let k = decade - 2; k <= decade + 2; k++) {
          for (const m of table) closest = Math.min(closest, Math.abs(Math.log((m * 10 ** (k - figures + 1)) / x)));
        }
        expect(Math.abs(Math.log(near / x))).toBeLessThanOrEqual(closest + 1e-9);
      }),
      { numRuns: 200 },
    );
  });
});

describe('RKM and RKM_TEXT', () => {
  it.each([
    ['4K7', 4700],
    ['4k7', 4700],
    ['0R22', 0.22],
    ['R47', 0.47],
    ['2M2', 2.2e6],
    ['47K3', 47300],
    ['2n2', 2.2e-9],
    ['1µ0', 1e-6],
    ['4K7K', 4700], // 4.7 kΩ ±10 %: the tolerance letter does not change the value
  ])('RKM("%s") = %d (IEC 60062)', (code, expected) => {
    expect(value(`=RKM("${code}")`)).toBe(expected);
  });
  it('RKM_TEXT writes resistance by default and capacitance with "C"', () => {
    expect(value('=RKM_TEXT(4700)')).toBe('4K7');
    expect(value('=RKM_TEXT(0.47)')).toBe('R47');
    expect(value('=RKM_TEXT(1e6)')).toBe('1M0');
    expect(value('=RKM_TEXT(2.2e-9, "C")')).toBe('2n2');
    expect(value('=RKM(RKM_TEXT(E_NEAR(5000, 96)))')).toBe(4990);
  });
  it('refuses text that is not a code, a zero value and an unknown kind', () => {
    const e = fails('=RKM("4.7k")');
    expect(e.value).toBe('#VALUE!');
    expect(e.message).toMatch(/^RKM: "4.7k" is not an RKM code/);
    expect(fails('=RKM_TEXT(0)').message).toMatch(/value must be greater than 0/);
    expect(fails('=RKM_TEXT(100, "L")').message).toMatch(/kind must be "R" \(resistance\) or "C"/);
  });
});
