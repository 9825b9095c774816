// Mains and logic-supply formula functions against worked values (IEC 60038:2009, IEC 60335-1 cl. 22.5; circuit theory from memory) and bad arguments.
import { describe, expect, it } from 'vitest';
import { formulaSheet, near4 } from './functions-helpers.ts';

const { calc, fails } = formulaSheet('supply');

describe('MAINS_PEAK', () => {
  it('√2 · V_rms · (1 + tol): IEC 60038:2009 table 1 nominal and +10 %', () => {
    near4(calc('=MAINS_PEAK(230)'), 325.3);
    near4(calc('=MAINS_PEAK(230, 0.1)'), 357.8);
    near4(calc('=MAINS_PEAK(240, 10%)'), 373.4);
    near4(calc('=MAINS_PEAK(120, 0.1)'), 186.7);
  });
  it('derived switch rating at 80 % derating: 230 V +10 % needs ≥ 447.2 V (common practice)', () => {
    near4(calc('=MAINS_PEAK(230, 0.1) / 0.8'), 447.2);
  });
  it('refuses a negative voltage and a tolerance outside 0 … 0.5, naming the argument', () => {
    expect(fails('=MAINS_PEAK(-230)').message).toMatch(/MAINS_PEAK: v_rms \(V\) must be 0 or more/);
    // 10 is a percentage typed as a number: read as a fraction it would make the peak 3,578 V.
    expect(fails('=MAINS_PEAK(230, 10)').message).toBe('MAINS_PEAK: tol must be a fraction from 0 to 0.5 (0.1 or 10% for ±10 %), got 10');
    expect(fails('=MAINS_PEAK(230, -0.1)').message).toMatch(/tol must be a fraction from 0 to 0.5/);
    // The ends are allowed: 0.5 gives √2 · 230 · 1.5 = 487.9 V (worked by hand).
    near4(calc('=MAINS_PEAK(230, 0.5)'), 487.9);
  });
});

describe('XCAP_AMPS and XCAP_FOR (basic circuit theory, from memory)', () => {
  it('0.47 µF at 230 V 50 Hz passes 33.96 mA; 0.22 µF 15.90 mA; 1.0 µF 72.26 mA; 0.47 µF at 120 V 60 Hz 21.26 mA', () => {
    near4(calc('=XCAP_AMPS(0.47e-6, 230, 50)'), 33.96e-3);
    near4(calc('=XCAP_AMPS(0.22e-6, 230, 50)'), 15.9e-3);
    near4(calc('=XCAP_AMPS(1e-6, 230, 50)'), 72.26e-3);
    near4(calc('=XCAP_AMPS(0.47e-6, 120, 60)'), 21.26e-3);
  });
  it('X_C of 0.47 µF at 50 Hz is 6.773 kΩ, so V / XCAP_AMPS gives it back', () => {
    near4(calc('=230 / XCAP_AMPS(0.47e-6, 230, 50)'), 6773);
  });
  it('XCAP_FOR inverts XCAP_AMPS: 33.96 mA at 230 V 50 Hz needs 0.47 µF', () => {
    near4(calc('=XCAP_FOR(33.96e-3, 230, 50)'), 0.47e-6);
  });
  it('accepts engineering text in a number argument, in the argument\'s unit', () => {
    expect(calc('=XCAP_AMPS("0.47 uF", "230 V", "50Hz")')).toBe(calc('=XCAP_AMPS(0.47e-6, 230, 50)'));
    expect(calc('=XCAP_AMPS("470n", 230, 50)')).toBe(calc('=XCAP_AMPS(0.47e-6, 230, 50)'));
  });
  it('refuses negative capacitance, zero frequency, text and a wrong unit with clear messages', () => {
    const neg = fails('=XCAP_AMPS(-1e-6, 230, 50)');
    expect(neg.value).toBe('#NUM!');
    expect(neg.message).toBe('XCAP_AMPS: c (F) must be 0 or more, got -0.000001');
    expect(fails('=XCAP_AMPS(1e-6, 230, 0)').message).toMatch(/f \(Hz\) must be greater than 0/);
    const text = fails('=XCAP_AMPS("lots", 230, 50)');
    expect(text.value).toBe('#VALUE!');
    expect(text.message).toMatch(/XCAP_AMPS: c: could not read "lots"/);
    expect(fails('=XCAP_AMPS("0.47 V", 230, 50)').message).toMatch(/in V but F was expected/);
    expect(fails('=XCAP_FOR(0.03, 0, 50)').message).toMatch(/v_rms \(V\) must be greater than 0/);
  });
  it('says which argument is an empty cell', () => {
    expect(fails('=XCAP_AMPS(Z99, 230, 50)').message).toBe('XCAP_AMPS: c (F) is empty');
  });
});

describe('BLEED_TIME (RC discharge; IEC 60335-1 cl. 22.5 as quoted in secondary sources)', () => {
  it('942.2 kΩ with 0.47 µF takes 1.000 s from 325.3 V to 34 V: the largest passing bleeder', () => {
    // τ = 942.2 kΩ · 0.47 µF = 0.4428 s; ln(325.3 / 34) = 2.2584; t = 0.4428 · 2.2584 = 1.000 s.
    near4(calc('=BLEED_TIME(942.2e3, 0.47e-6, 325.3, 34)'), 1.0);
    near4(calc('=BLEED_TIME(442.8e3, 1e-6, 325.3, 34)'), 1.0);
  });
  it('1 MΩ with 0.47 µF is too slow: it takes 1.061 s (by hand: 0.47 · ln(325.3/34) = 0.47 · 2.2584)', () => {
    near4(calc('=BLEED_TIME(1e6, 0.47e-6, 325.3, 34)'), 1.061);
    expect(calc('=BLEED_TIME(1e6, 0.47e-6, 325.3, 34)')).toBeGreaterThan(1);
  });
  it('and leaves 38.74 V after 1 s, the failing case under IEC 60335-1 cl. 22.5', () => {
    near4(calc('=325.3 * EXP(-1 / (1e6 * 0.47e-6))'), 38.74);
  });
  it('is 0 when the start is already at or below the end voltage; refuses 0 V targets', () => {
    expect(calc('=BLEED_TIME(1e6, 1e-6, 30, 34)')).toBe(0);
    expect(fails('=BLEED_TIME(1e6, 1e-6, 325, 0)').message).toMatch(/v_end \(V\) must be greater than 0/);
  });
});

describe('DROP_DC and ZENER_WORST (charge balance; basic circuit theory, from memory)', () => {
  it('230 V 50 Hz, 0.47 µF, 12 V zener, 0.7 V diode: half-wave 14.99 mA, full-wave 29.32 mA', () => {
    near4(calc('=DROP_DC(0.47e-6, 230, 50, 12, 0.7)'), 14.99e-3);
    near4(calc('=DROP_DC(0.47e-6, 230, 50, 12, 0.7, FALSE())'), 14.99e-3);
    near4(calc('=DROP_DC(0.47e-6, 230, 50, 12, 0.7, TRUE())'), 29.32e-3);
  });
  it('with an ideal clamp (v_z = v_f = 0) is 0.4502 · I_rms half-wave and 0.9003 · I_rms full-wave (≈ 0.45 / 0.90, basic circuit theory, from memory)', () => {
    // By hand: half-wave fC · 2√2·V over 2πfC·V = √2/π = 0.4502; full-wave 4fC·√2·V over 2πfC·V = 2√2/π = 0.9003.
    near4(calc('=DROP_DC(0.47e-6, 230, 50, 0, 0) / XCAP_AMPS(0.47e-6, 230, 50)'), 0.4502);
    near4(calc('=DROP_DC(0.47e-6, 230, 50, 0, 0, TRUE()) / XCAP_AMPS(0.47e-6, 230, 50)'), 0.9003);
  });
  it('worst case, half-wave, 253 V, 0.517 µF, 12 V: 18.17 mA and 0.2308 W in the zener', () => {
    near4(calc('=DROP_DC(0.517e-6, 253, 50, 12, 0.7)'), 18.17e-3);
    // 0.2308 W = 18.17 mA × (12 V reverse + 0.7 V forward on the resetting half cycle).
    near4(calc('=ZENER_WORST(0.517e-6, 253, 50, 12, 0.7)'), 0.2308);
  });
  it('full-wave zener dissipation is the DC current at V_z only (no forward half cycle through the zener)', () => {
    // By hand: 4 · 50 · 0.47e-6 · (325.27 − 12 − 1.4) = 29.316 mA; × 12 V = 0.3518 W.
    near4(calc('=ZENER_WORST(0.47e-6, 230, 50, 12, 0.7, TRUE())'), 0.3518);
  });
  it('gives 0, not a negative current, when the mains peak cannot reach the clamp', () => {
    expect(calc('=DROP_DC(0.47e-6, 5, 50, 12, 0.7, TRUE())')).toBe(0);
  });
  it('refuses a non-boolean full_wave and a negative zener voltage', () => {
    expect(fails('=DROP_DC(0.47e-6, 230, 50, -12, 0.7)').message).toMatch(/v_z \(V\) must be 0 or more/);
    expect(fails('=DROP_DC(0.47e-6, 230, 50, 12, 0.7, "both")').value).toBe('#VALUE!');
  });
});
