// IEC 60062 RKM codes: reading, writing and tolerance letters.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { formatRkm, parseRkm, toRkm } from '../../src/domain/rkm.ts';

describe('parseRkm reads the IEC 60062 examples', () => {
  it.each([
    ['R47', 0.47, 'resistance'],
    ['4R7', 4.7, 'resistance'],
    ['4K7', 4700, 'resistance'],
    ['47K3', 47300, 'resistance'],
    ['2M2', 2.2e6, 'resistance'],
    ['4n7', 4.7e-9, 'capacitance'],
    ['1µ0', 1e-6, 'capacitance'],
  ])('%s = %d (%s)', (text, value, kind) => {
    expect(parseRkm(text)).toEqual({ ok: true, value, kind });
  });

  it('accepts the common variants: small k, u for micro, a leading 0 before R', () => {
    expect(parseRkm('4k7')).toEqual({ ok: true, value: 4700, kind: 'resistance' });
    expect(parseRkm('1u0')).toEqual({ ok: true, value: 1e-6, kind: 'capacitance' });
    expect(parseRkm('0R22')).toEqual({ ok: true, value: 0.22, kind: 'resistance' });
    expect(parseRkm('2n2')).toEqual({ ok: true, value: 2.2e-9, kind: 'capacitance' });
    expect(parseRkm('1M0')).toEqual({ ok: true, value: 1e6, kind: 'resistance' });
    expect(parseRkm('100n')).toEqual({ ok: true, value: 1e-7, kind: 'capacitance' });
  });

  it('reads a final tolerance letter: "4K7K" is 4.7 kΩ ±10 % (IEC 60062)', () => {
    expect(parseRkm('4K7K')).toEqual({ ok: true, value: 4700, kind: 'resistance', tolerance: 0.1 });
  });

  it.each([
    ['10KJ', 10000, 0.05],
    ['1M0M', 1e6, 0.2],
    ['4K99F', 4990, 0.01],
    ['2K2G', 2200, 0.02],
    ['100RD', 100, 0.005],
    ['4n7K', 4.7e-9, 0.1],
  ])('%s has tolerance %d (IEC 60062 letters J 5 %%, K 10 %%, M 20 %%, F 1 %%, G 2 %%, D 0.5 %%)', (text, value, tol) => {
    const r = parseRkm(text);
    expect(r.ok && r.value).toBe(value);
    expect(r.ok && r.tolerance).toBe(tol);
  });

  it.each(['', 'K', '4.7K', '47', '4K7X', 'abc', '4KK7', '4 K7'])('refuses "%s" with a message', (text) => {
    const r = parseRkm(text);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error).toMatch(/RKM|digits/);
  });
});

describe('formatRkm writes codes (convention: capital R K M G for resistance, small p n µ m for capacitance)', () => {
  it.each([
    [4700, 'resistance', '4K7'],
    [0.22, 'resistance', 'R22'],
    [0.47, 'resistance', 'R47'],
    [4.7, 'resistance', '4R7'],
    [47300, 'resistance', '47K3'],
    [2.2e6, 'resistance', '2M2'],
    [1e6, 'resistance', '1M0'],
    [10, 'resistance', '10R'],
    [470000, 'resistance', '470K'],
    [2.2e-9, 'capacitance', '2n2'],
    [4.7e-9, 'capacitance', '4n7'],
    [1e-6, 'capacitance', '1µ0'],
    [1e-7, 'capacitance', '100n'],
    [4.7e-13, 'capacitance', 'p47'],
  ] as const)('%d %s → %s', (value, kind, text) => {
    expect(formatRkm(value, kind)).toBe(text);
  });

  it('rounds to three figures and carries into the next letter', () => {
    expect(formatRkm(4987, 'resistance')).toBe('4K99');
    expect(formatRkm(999.7, 'resistance')).toBe('1K0');
  });

  it('refuses zero, negatives, NaN and an unknown kind with a message', () => {
    for (const [v, k] of [[0, 'resistance'], [-1, 'resistance'], [NaN, 'capacitance'], [100, 'unknown']] as const) {
      const r = toRkm(v, k);
      expect(r.ok).toBe(false);
    }
    expect(formatRkm(NaN, 'resistance')).not.toMatch(/^NaN/);
  });

  it('parses what it writes, to three significant figures', () => {
    fc.assert(
      fc.property(fc.double({ min: -2, max: 11, noNaN: true }), (exp) => {
        const x = 10 ** exp;
        const r = parseRkm(formatRkm(x, 'resistance'));
        expect(r.ok).toBe(true);
        if (r.ok) expect(Math.abs(r.value - x)).toBeLessThanOrEqual(5e-3 * x);
      }),
    );
  });
});
