// The step ladder designer against hand-worked values from the 555 control-voltage form (textbook 555 formulas, from memory).
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { astableDuty, bottomForCtl, ctlForDuty, ctlNode, designLadder, ladderParams, CTL_R_INT } from '../../src/domain/ladder.ts';

describe('astable duty with the control pin held (textbook 555 formulas, from memory)', () => {
  it('matches the hand-worked sweep at Vcc 12 V, RA 1 kΩ, RB 10 kΩ', () => {
    // Worked by hand from the control-voltage form: V_c = 2/4/6/8/10/11 V → D = 13.14/26.15/39.15/52.38/66.53/74.81 %.
    const want = [0.1314, 0.2615, 0.3915, 0.5238, 0.6653, 0.7481];
    [2, 4, 6, 8, 10, 11].forEach((vc, i) => expect(astableDuty(1000, 10000, 12, vc)).toBeCloseTo(want[i]!, 4));
  });

  it('matches the worked example Vcc 10 V, Vc 9.5 V (t_H 0.2587 s, t_L 0.06931 s with C = 10 µF)', () => {
    // Worked example (textbook 555 formulas, from memory); duty = t_H / (t_H + t_L) = 0.2587 / 0.32801 = 0.7887.
    expect(astableDuty(1000, 10000, 10, 9.5)).toBeCloseTo(0.2587 / (0.2587 + 0.06931), 3);
  });

  it('inverts duty back to the control voltage: 52.38 % at Vcc 12 V needs 8 V', () => {
    // Hand-worked sweep: V_c = 8 V → 52.38 % (= ⅔·Vcc, the textbook 11/21).
    expect(ctlForDuty(11 / 21, 1000, 10000, 12)).toBeCloseTo(8, 9);
  });

  it('ctlForDuty and astableDuty are inverse over the whole duty range (property)', () => {
    fc.assert(
      fc.property(fc.double({ min: 0.01, max: 0.95, noNaN: true }), fc.double({ min: 5, max: 18, noNaN: true }), (d, vcc) => {
        const vc = ctlForDuty(d, 1000, 10000, vcc);
        expect(vc).toBeGreaterThan(0);
        expect(vc).toBeLessThan(vcc);
        expect(astableDuty(1000, 10000, vcc, vc)).toBeCloseTo(d, 6);
      }),
    );
  });
});

describe('control-pin node equation (pin at ⅔Vcc behind ≈3.33 kΩ, from memory)', () => {
  it('a 10 kΩ top and 5 kΩ bottom at Vcc 12 V put the pin at 6 V, and 6 V needs 5 kΩ back', () => {
    // By hand: currents in = 12/10k + 8/3.333k = 1.2 mA + 2.4 mA = 3.6 mA;
    // conductance = 1/10k + 1/5k + 1/3.333k = 0.1 + 0.2 + 0.3 mS = 0.6 mS → 3.6 / 0.6 = 6 V.
    expect(ctlNode(12, 10000, 5000)).toBeCloseTo(6, 9);
    expect(bottomForCtl(6, 12, 10000)).toBeCloseTo(5000, 6);
    expect(CTL_R_INT).toBeCloseTo(3333.33, 2);
  });
});

describe('designLadder', () => {
  it('designs the 39.15 % step: ideal ≈ 5 kΩ, E12 4.7 kΩ, achieved 38.34 %', () => {
    const r = designLadder({ vcc: 12, ra: 1000, rb: 10000, rTop: 10000, duties: [0.3915], series: 12 });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    const s = r.steps[0]!;
    // 39.15 % is the hand-worked duty at 6 V (sweep above), and 6 V needs 5 kΩ (node equation above).
    expect(s.idealCtl).toBeCloseTo(6, 2);
    expect(s.idealR / 5000).toBeCloseTo(1, 2);
    // IEC 60063: nearest E12 value to 5 kΩ is 4.7 kΩ.
    expect(s.chosenR).toBe(4700);
    // By hand with 4.7 kΩ: conductance 0.4 mS + 1/4.7k = 0.61277 mS; Vc = 3.6 mA / 0.61277 mS = 5.875 V.
    expect(s.achievedCtl).toBeCloseTo(5.875, 6);
    // x = (12 − 5.875/2)/(12 − 5.875) = 9.0625/6.125 = 1.47959, ln x = 0.391766;
    // t_H ∝ 11 kΩ · 0.391766 = 4309.43, t_L ∝ 10 kΩ · ln2 = 6931.47 → D = 4309.43 / 11240.90 = 0.38337.
    expect(s.achievedDuty).toBeCloseTo(0.38337, 5);
    expect(s.error).toBeCloseTo(0.38337 - 0.3915, 5);
  });

  it('snaps to the series chosen: E24 gives 5.1 kΩ and E96 4.99 kΩ for the same step', () => {
    // IEC 60063: nearest to 5 kΩ is E24 5.1 k, E96 4.99 k.
    const e24 = designLadder({ vcc: 12, ra: 1000, rb: 10000, rTop: 10000, duties: [0.3915], series: 24 });
    const e96 = designLadder({ vcc: 12, ra: 1000, rb: 10000, rTop: 10000, duties: [0.3915], series: 96 });
    expect(e24.ok && e24.steps[0]!.chosenR).toBe(5100);
    expect(e96.ok && e96.steps[0]!.chosenR).toBe(4990);
  });

  it('spreads duties evenly and gives rising resistors for rising duty', () => {
    const r = designLadder({ vcc: 12, ra: 1000, rb: 10000, rTop: 10000, spread: { steps: 3, min: 0.2, max: 0.5 }, series: 24 });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.steps.map((s) => s.targetDuty)).toEqual([0.2, 0.35, 0.5]);
    // A larger bottom resistor lets the pin rise, and a higher pin voltage lengthens t_H (duty rises with Vc).
    expect(r.steps[0]!.idealR).toBeLessThan(r.steps[1]!.idealR);
    expect(r.steps[1]!.idealR).toBeLessThan(r.steps[2]!.idealR);
    expect(ladderParams(r)).toEqual({ r_s1: r.steps[0]!.chosenR, r_s2: r.steps[1]!.chosenR, r_s3: r.steps[2]!.chosenR });
  });

  it('refuses a duty the divider cannot reach, naming the step and the voltages', () => {
    // With no bottom resistor the pin sits at 3.6 mA / 0.4 mS = 9 V; 60 % needs about 9.1 V.
    const r = designLadder({ vcc: 12, ra: 1000, rb: 10000, rTop: 10000, duties: [0.3, 0.6], series: 12 });
    expect(r).toEqual({ ok: false, error: expect.stringMatching(/^step 2: .*9\.000 V/) });
  });

  it('refuses bad input with a message', () => {
    expect(designLadder({ vcc: 0, ra: 1000, rb: 10000, rTop: 10000, duties: [0.3], series: 12 })).toEqual({ ok: false, error: 'vcc must be a positive number' });
    expect(designLadder({ vcc: 12, ra: 1000, rb: 10000, rTop: 10000, duties: [1.2], series: 12 }).ok).toBe(false);
    expect(designLadder({ vcc: 12, ra: 1000, rb: 10000, rTop: 10000, series: 12 }).ok).toBe(false);
    expect(designLadder({ vcc: 12, ra: 1000, rb: 10000, rTop: 10000, duties: [0.3], series: 7 }).ok).toBe(false);
  });
});
