// IEC 60063 preferred values: the written-out tables and nearest / up / down.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { E_SERIES, E_SERIES_NUMBERS, eDown, eNear, eUp } from '../../src/domain/eseries.ts';

function v(r: { ok: true; value: number } | { ok: false; error: string }): number {
  if (!r.ok) throw new Error(r.error);
  return r.value;
}

describe('E-series tables (IEC 60063)', () => {
  it('E6 and E12 are the listed values', () => {
    expect(E_SERIES[6]).toEqual([10, 15, 22, 33, 47, 68]);
    expect(E_SERIES[12]).toEqual([10, 12, 15, 18, 22, 27, 33, 39, 47, 56, 68, 82]);
  });
  it('E24 is E12 plus 11 13 16 20 24 30 36 43 51 62 75 91', () => {
    const added = [11, 13, 16, 20, 24, 30, 36, 43, 51, 62, 75, 91];
    expect(E_SERIES[24]).toEqual([...E_SERIES[12]!, ...added].sort((a, b) => a - b));
  });
  it('each series has n values per decade, ascending, and E(n) contains E(n/2)', () => {
    for (const n of E_SERIES_NUMBERS) {
      const t = E_SERIES[n]!;
      expect(t).toHaveLength(n);
      for (let i = 1; i < t.length; i++) expect(t[i]!).toBeGreaterThan(t[i - 1]!);
    }
    for (const [small, big] of [[6, 12], [12, 24], [48, 96], [96, 192]]) {
      for (const m of E_SERIES[small!]!) expect(E_SERIES[big!]).toContain(m);
    }
  });
  it('E48, E96, E192 are round(100·10^(i/n)) except E192 920 where the formula gives 919 (from memory)', () => {
    for (const n of [48, 96, 192]) {
      const table = E_SERIES[n]!;
      const differ: number[] = [];
      table.forEach((value, i) => {
        const formula = Math.round(100 * 10 ** (i / n));
        if (formula !== value) differ.push(formula);
      });
      expect(differ).toEqual(n === 192 ? [919] : []);
      if (n === 192) expect(table).toContain(920);
    }
  });
  it('E24 and below differ from round(10·10^(i/n)) exactly at 27 30 33 36 39 43 47 82 (IEC 60063)', () => {
    const differ = new Set<number>();
    for (const n of [6, 12, 24]) {
      E_SERIES[n]!.forEach((value, i) => {
        if (Math.round(10 * 10 ** (i / n)) !== value) differ.add(value);
      });
    }
    expect([...differ].sort((a, b) => a - b)).toEqual([27, 30, 33, 36, 39, 43, 47, 82]);
  });
});

describe('eNear, eUp, eDown', () => {
  it('nearest to 5 kΩ on a log scale: E12 4.7k, E24 5.1k, E96 4.99k (IEC 60063)', () => {
    expect(v(eNear(5000, 12))).toBe(4700);
    expect(v(eNear(5000, 24))).toBe(5100);
    expect(v(eNear(5000, 96))).toBe(4990);
  });
  it('log scale, not linear: between 4.7 and 5.6 the midpoint is √(4.7·5.6) = 5.130 (by hand)', () => {
    expect(v(eNear(5.12, 12))).toBe(4.7); // below the geometric mean 5.1303
    expect(v(eNear(5.14, 12))).toBe(5.6); // above it, though still below the linear midpoint 5.15
  });
  it('works over all decades and gives the double a user would type', () => {
    expect(v(eNear(4.6e-9, 12))).toBe(4.7e-9);
    expect(v(eNear(0.33, 6))).toBe(0.33);
    expect(v(eNear(9.6e5, 12))).toBe(1e6); // crosses into the next decade
    expect(v(eUp(8.3, 12))).toBe(10);
    expect(v(eDown(9.9, 12))).toBe(8.2);
    expect(v(eDown(1.0e-3, 12))).toBe(1.0e-3);
    expect(v(eDown(0.999e-3, 12))).toBe(8.2e-4);
  });
  it('a value already in the series is its own up and down, despite float noise', () => {
    expect(v(eUp(4700, 12))).toBe(4700);
    expect(v(eDown(4700, 12))).toBe(4700);
    expect(v(eUp(0.1 + 0.2, 6))).toBe(0.33); // 0.30000000000000004 is not E6's 0.33: next up
    expect(v(eDown(4.7e-9 * (1 + 1e-12), 12))).toBe(4.7e-9);
    expect(v(eUp(4701, 12))).toBe(5600);
    expect(v(eDown(4699, 12))).toBe(3900);
  });
  it('refuses values at or below zero, NaN, and unknown series with a message', () => {
    for (const r of [eNear(0, 12), eNear(-4700, 12), eUp(NaN, 12), eDown(Infinity, 12), eNear(4700, 7), eNear(4700, 12.5)]) {
      expect(r.ok).toBe(false);
      if (!r.ok) expect(r.error).toMatch(/above zero|finite|unknown series/);
    }
  });
  it('eNear returns a member of the series and no member is closer (property)', () => {
    fc.assert(
      fc.property(fc.double({ min: -12, max: 9, noNaN: true }), fc.constantFrom(...E_SERIES_NUMBERS), (exp, n) => {
        const x = 10 ** exp;
        const near = v(eNear(x, n));
        const table = E_SERIES[n]!;
        const figures = table[0] === 10 ? 2 : 3;
        const mantissa = Number((near / 10 ** Math.floor(Math.log10(near))).toPrecision(figures)) * 10 ** (figures - 1);
        expect(table).toContain(Math.round(mantissa));
        const d = Math.abs(Math.log(near / x));
        let closest = Infinity;
        for (let k = -14; k <= 11; k++) {
          for (const m of table) closest = Math.min(closest, Math.abs(Math.log((m * 10 ** (k - figures + 1)) / x)));
        }
        expect(d).toBeLessThanOrEqual(closest + 1e-12);
      }),
      { numRuns: 300 },
    );
  });
  it('eUp ≥ x ≥ eDown and both are members (property)', () => {
    fc.assert(
      fc.property(fc.double({ min: -12, max: 9, noNaN: true }), fc.constantFrom(...E_SERIES_NUMBERS), (exp, n) => {
        const x = 10 ** exp;
        const up = v(eUp(x, n));
        const down = v(eDown(x, n));
        expect(up).toBeGreaterThanOrEqual(x * (1 - 1e-9));
        expect(down).toBeLessThanOrEqual(x * (1 + 1e-9));
        expect(v(eNear(up, n))).toBe(up);
        expect(v(eNear(down, n))).toBe(down);
      }),
    );
  });
});
