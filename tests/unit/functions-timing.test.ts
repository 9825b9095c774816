// 555-type astable, RC charge, divider and control-pin node functions against textbook worked values.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { formulaSheet, near4 } from './functions-helpers.ts';

const { calc, fails } = formulaSheet('timing');

describe('555-type astable (textbook 555 formulas, from memory)', () => {
  it('R_A 1 kΩ, R_B 10 kΩ, C 10 nF: t_H 76.25 µs, t_L 69.31 µs, f 6.870 kHz, D 52.38 %', () => {
    near4(calc('=ASTABLE_HIGH(1000, 10000, 10e-9)'), 76.25e-6);
    near4(calc('=ASTABLE_LOW(10000, 10e-9)'), 69.31e-6);
    near4(calc('=ASTABLE_HZ(1000, 10000, 10e-9)'), 6870);
    near4(calc('=ASTABLE_DUTY(1000, 10000)'), 0.5238);
  });
  it('the 1.44 approximation gives 6.857 kHz, within 0.2 % of the exact ln 2 form', () => {
    near4(calc('=1.44 / ((1000 + 2 * 10000) * 10e-9)'), 6857);
    expect(Math.abs(calc('=ASTABLE_HZ(1000, 10000, 10e-9)') / 6857 - 1)).toBeLessThan(0.002);
  });
  it('control pin at 9.5 V of 10 V, C = 10 µF: t_H 0.2587 s, t_L 0.06931 s, f 3.049 Hz', () => {
    near4(calc('=ASTABLE_HIGH(1000, 10000, 10e-6, 10, 9.5)'), 0.2587);
    near4(calc('=ASTABLE_LOW(10000, 10e-6)'), 0.06931);
    near4(calc('=ASTABLE_HZ(1000, 10000, 10e-6, 10, 9.5)'), 3.049);
  });
  it('reduces to ln 2 at V_c = ⅔ V_cc, and vcc alone means V_c = ⅔ V_cc', () => {
    const plain = calc('=ASTABLE_HIGH(1000, 10000, 10e-9)');
    expect(calc('=ASTABLE_HIGH(1000, 10000, 10e-9, 12, 8)')).toBeCloseTo(plain, 15);
    expect(calc('=ASTABLE_HIGH(1000, 10000, 10e-9, 12)')).toBeCloseTo(plain, 15);
  });
  it('duty sweep at V_cc 12 V, V_c 2/4/6/8/10/11 V: 13.14/26.15/39.15/52.38/66.53/74.81 %', () => {
    const expected = [0.1314, 0.2615, 0.3915, 0.5238, 0.6653, 0.7481];
    [2, 4, 6, 8, 10, 11].forEach((vc, i) => near4(calc(`=ASTABLE_DUTY(1000, 10000, 12, ${vc})`), expected[i]!));
  });
  it('refuses a control voltage outside 0 < V_c < V_cc with #NUM! and a message', () => {
    for (const vc of [0, 12, 13, -1]) {
      const e = fails(`=ASTABLE_DUTY(1000, 10000, 12, ${vc})`);
      expect(e.value).toBe('#NUM!');
      expect(e.message).toMatch(/ASTABLE_DUTY: vctl must lie between 0 and vcc/);
    }
    expect(fails('=ASTABLE_HIGH(1000, 10000, 10e-9, 0, 5)').message).toMatch(/vcc \(V\) must be greater than 0/);
    expect(fails('=ASTABLE_HZ(1000, 10000, 10e-9, , 5)').message).toMatch(/give vcc together with vctl/);
  });
  it('refuses R_B or C of zero, and R_A of zero or less with the reason: the discharge pin would short the supply', () => {
    expect(fails('=ASTABLE_HZ(1000, 0, 10e-9)').message).toMatch(/rb \(Ω\) must be greater than 0/);
    expect(fails('=ASTABLE_LOW(10000, 0)').message).toMatch(/c \(F\) must be greater than 0/);
    expect(fails('=ASTABLE_DUTY(-1, 10000)').message).toMatch(/ra \(Ω\) must be greater than 0/);
    const e = fails('=ASTABLE_DUTY(0, 10000)');
    expect(e.value).toBe('#NUM!');
    expect(e.message).toBe('ASTABLE_DUTY: ra (Ω) must be greater than 0, got 0: with RA = 0 the discharge pin shorts the supply each time it turns on');
    expect(fails('=ASTABLE_HIGH(0, 10000, 10e-9)').message).toMatch(/discharge pin shorts the supply/);
    expect(fails('=ASTABLE_HZ(0, 10000, 10e-9)').message).toMatch(/discharge pin shorts the supply/);
  });
  it('duty rises with control voltage (property over resistors, supply and two control voltages)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 100, max: 1e6, noNaN: true }),
        fc.double({ min: 100, max: 1e6, noNaN: true }),
        fc.double({ min: 3, max: 30, noNaN: true }),
        fc.double({ min: 0.01, max: 0.99, noNaN: true }),
        fc.double({ min: 0.01, max: 0.99, noNaN: true }),
        (ra, rb, vcc, f1, f2) => {
          fc.pre(Math.abs(f1 - f2) > 1e-6);
          const [lo, hi] = f1 < f2 ? [f1, f2] : [f2, f1];
          const dLo = calc(`=ASTABLE_DUTY(${ra}, ${rb}, ${vcc}, ${lo * vcc})`);
          const dHi = calc(`=ASTABLE_DUTY(${ra}, ${rb}, ${vcc}, ${hi * vcc})`);
          expect(dHi).toBeGreaterThan(dLo);
          expect(dLo).toBeGreaterThan(0);
          expect(dHi).toBeLessThan(1);
        },
      ),
      { numRuns: 200 },
    );
  });
});

describe('RC_REACH (RC charge to a threshold; basic circuit theory, from memory)', () => {
  it('100 kΩ × 100 nF reaches ½ V_cc in 6.931 ms and ⅔ V_cc in 10.99 ms', () => {
    near4(calc('=RC_REACH(100e3, 100e-9, 5, 2.5)'), 6.931e-3);
    near4(calc('=RC_REACH(100e3, 100e-9, 12, 8)'), 10.99e-3);
  });
  it('refuses a threshold at or above the supply', () => {
    expect(fails('=RC_REACH(100e3, 100e-9, 5, 5)').message).toMatch(/never reaches 5 V from a 5 V supply/);
  });
});

describe('DIVIDER_OUT (unloaded divider, basic circuit theory)', () => {
  it('12 V over 10 kΩ / 10 kΩ is 6 V; with a 0.7 V series diode (12 − 0.7) · ½ = 5.65 V (by hand)', () => {
    expect(calc('=DIVIDER_OUT(12, 10000, 10000)')).toBe(6);
    expect(calc('=DIVIDER_OUT(12, 10000, 10000, 0.7)')).toBeCloseTo(5.65, 12);
  });
  it('refuses both resistors at 0', () => {
    expect(fails('=DIVIDER_OUT(12, 0, 0)').message).toMatch(/both 0/);
  });
  it('refuses a diode drop above the input, which would give a negative output (5 V, 10 V drop: −2.5 V)', () => {
    const e = fails('=DIVIDER_OUT(5, 1000, 1000, 10)');
    expect(e.value).toBe('#NUM!');
    expect(e.message).toBe(
      'DIVIDER_OUT: v_drop (V) 10 exceeds v_in (V) 5: a diode drop above the input leaves the diode off, so the divider has no output',
    );
    expect(fails('=DIVIDER_OUT(12, 1000, 1000, -0.7)').message).toMatch(/v_drop \(V\) must be 0 or more/);
    // A drop equal to the input leaves nothing across the divider: 0 V.
    expect(calc('=DIVIDER_OUT(5, 1000, 1000, 5)')).toBe(0);
    // No diode: a negative input divides as usual, (−12) · ½ = −6 V.
    expect(calc('=DIVIDER_OUT(-12, 10000, 10000)')).toBe(-6);
  });
});

describe('CTL_NODE (Kirchhoff node equation; the pin is ⅔ V_cc behind the timer kind\'s source: bipolar 3.33 kΩ, CMOS 66.67 kΩ for a 3 × 100 kΩ divider — Thevenin arithmetic, divider values from memory)', () => {
  it('12 V, 10 kΩ / 10 kΩ: 7.2 V, by two hand methods', () => {
    // Nodal: (12/10k + 8/3.333k) / (1/10k + 1/10k + 1/3.333k) = (1.2 + 2.4) mA / 0.5 mS = 7.2 V.
    // Thévenin: the divider is 6 V behind 5 kΩ; with 8 V behind 3.333 kΩ: (6·3.333 + 8·5) / 8.333 = 7.2 V.
    expect(calc('=CTL_NODE(12, 10000, 10000, 10000/3)')).toBeCloseTo(7.2, 10);
  });
  it('a CMOS part (3 × 100 kΩ divider, 66.67 kΩ source) on the same divider: 6.140 V, near the plain divider\'s 6 V', () => {
    // Nodal: (1.2 + 8/66.667k) mA / (0.1 + 0.1 + 0.015) mS = 1.32 / 0.215 = 6.1395 V.
    expect(calc('=CTL_NODE(12, 10000, 10000, 200000/3)')).toBeCloseTo(1.32 / 0.215, 10);
    // Thevenin: R_th = 10 kΩ to ground alone gives 8 · 10k/(10k + R_th): 6.000 V bipolar (worked value), 1.0435 V CMOS.
    expect(calc('=CTL_NODE(12, 1e300, 10000, 10000/3)')).toBeCloseTo(6, 9);
    expect(calc('=CTL_NODE(12, 1e300, 10000, 200000/3)')).toBeCloseTo(1.0435, 4);
  });
  it('has no default source: without r_int it says to take it from the timer part', () => {
    const e = fails('=CTL_NODE(12, 10000, 10000)');
    expect(e.value).toBe('#VALUE!');
    expect(e.message).toMatch(/^CTL_NODE: give r_int, the timer's control-pin source resistance \(its part's r_ctl rating/);
  });
  it('with no divider pull (r_top and r_bottom very large) the pin rests at ⅔ V_cc', () => {
    expect(calc('=CTL_NODE(12, 1e15, 1e15, 10000/3)')).toBeCloseTo(8, 6);
  });
  it('takes an explicit internal source and resistance', () => {
    // (10/10k + 5/5k) / (1/10k + 1/10k + 1/5k) = 2 mA / 0.4 mS = 5 V.
    expect(calc('=CTL_NODE(10, 10000, 10000, 5000, 5)')).toBeCloseTo(5, 10);
  });
  it('is 0 V with the pin shorted to ground, and refuses r_top of 0', () => {
    expect(calc('=CTL_NODE(12, 10000, 0, 10000/3)')).toBe(0);
    expect(fails('=CTL_NODE(12, 0, 10000, 10000/3)').message).toMatch(/r_top \(Ω\) must be greater than 0/);
  });
  it('feeds ASTABLE_DUTY: a lower pin voltage gives a lower duty', () => {
    const hi = calc('=ASTABLE_DUTY(1000, 10000, 12, CTL_NODE(12, 10000, 100000, 10000/3))');
    const lo = calc('=ASTABLE_DUTY(1000, 10000, 12, CTL_NODE(12, 10000, 4700, 10000/3))');
    expect(lo).toBeLessThan(hi);
  });
});
