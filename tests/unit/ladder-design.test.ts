// The step ladder designer against hand-worked values from the 555 control-voltage form (textbook 555 formulas, from memory).
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { astableDuty, bottomForCtl, controlPinSource, ctlForDuty, ctlNode, designLadder, ladderParams } from '../../src/domain/ladder.ts';

// Control-pin source resistances of the two timer kinds (Thevenin arithmetic on the internal divider of three equal
// resistors; the resistor values are from memory — confirm against a datasheet of the kind): a bipolar 555 has
// 3 × 5 kΩ, a CMOS 555-type part a divider of far higher impedance, here the 3 × 100 kΩ class.
const BIPOLAR = controlPinSource(5_000);
const CMOS = controlPinSource(100_000);

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

describe('control-pin node equation with the source of the timer kind (Thevenin arithmetic; divider values from memory)', () => {
  it('the source is the upper divider resistor ∥ the lower two: bipolar 3 × 5 kΩ → 3.333 kΩ, CMOS 3 × 100 kΩ → 66.67 kΩ', () => {
    expect(BIPOLAR).toBeCloseTo(3333.33, 2);
    expect(CMOS).toBeCloseTo(66666.67, 2);
  });

  it('a 10 kΩ to ground alone: 6.000 V on a bipolar part at 12 V, only 1.043 V on a CMOS one', () => {
    // Thevenin: V_c = ⅔V_cc · R/(R + R_th). Bipolar: 8 · 10k/13.333k = 6.000 V (worked value); CMOS: 8 · 10k/76.667k
    // = 1.0435 V — the same resistor pulls a CMOS pin far lower, so R_th must come from the fitted part.
    expect(ctlNode(12, Infinity, 10000, BIPOLAR)).toBeCloseTo(6, 9);
    expect(ctlNode(12, Infinity, 10000, CMOS)).toBeCloseTo(1.0435, 4);
  });

  it('a 10 kΩ top and 5 kΩ bottom at Vcc 12 V put a bipolar pin at 6 V, and 6 V needs 5 kΩ back', () => {
    // By hand: currents in = 12/10k + 8/3.333k = 1.2 mA + 2.4 mA = 3.6 mA;
    // conductance = 1/10k + 1/5k + 1/3.333k = 0.1 + 0.2 + 0.3 mS = 0.6 mS → 3.6 / 0.6 = 6 V.
    expect(ctlNode(12, 10000, 5000, BIPOLAR)).toBeCloseTo(6, 9);
    expect(bottomForCtl(6, 12, 10000, BIPOLAR)).toBeCloseTo(5000, 6);
  });

  it('the same divider on a CMOS pin: 4.211 V, and 4.211 V needs 5 kΩ back', () => {
    // By hand: currents in = 1.2 mA + 8/66.667k = 1.32 mA; conductance = 0.1 + 0.2 + 0.015 = 0.315 mS → 4.1905 V.
    expect(ctlNode(12, 10000, 5000, CMOS)).toBeCloseTo(1.32 / 0.315, 9);
    expect(ctlNode(12, 10000, 5000, CMOS)).toBeCloseTo(4.1905, 4);
    expect(bottomForCtl(1.32 / 0.315, 12, 10000, CMOS)).toBeCloseTo(5000, 6);
  });

  it('step 1 of the six-step ladder (10 kΩ over 1 kΩ, 11.3 V, RA 4.7 kΩ, RB 47 kΩ): 16.87 % on a bipolar part, 7.80 % on a CMOS one', () => {
    // Bipolar: Vc/Vcc = (0.1 + 0.2)/(0.1 + 1 + 0.3) = 0.21429; x = (1 − 0.10714)/(1 − 0.21429) = 1.13636, ln x = 0.12783;
    // t_H ∝ 51.7k · 0.12783 = 6609, t_L ∝ 47k · ln2 = 32578 → D = 0.1687.
    expect(astableDuty(4700, 47000, 11.3, ctlNode(11.3, 10000, 1000, BIPOLAR))).toBeCloseTo(0.1687, 4);
    // CMOS: Vc/Vcc = (0.1 + 0.01)/(0.1 + 1 + 0.015) = 0.098655; x = (1 − 0.049327)/(1 − 0.098655) = 1.054725, ln x = 0.053280;
    // t_H ∝ 51.7k · 0.053280 = 2754.6 → D = 2754.6/(2754.6 + 32578) = 0.07796.
    expect(astableDuty(4700, 47000, 11.3, ctlNode(11.3, 10000, 1000, CMOS))).toBeCloseTo(0.07796, 4);
  });

  it('controlPinSource is ⅔ of the divider resistor (property)', () => {
    fc.assert(
      fc.property(fc.double({ min: 1, max: 1e7, noNaN: true }), (r) => {
        expect(controlPinSource(r) / ((2 / 3) * r)).toBeCloseTo(1, 12);
      }),
    );
  });
});

describe('designLadder', () => {
  it('designs the 39.15 % step: ideal ≈ 5 kΩ, E12 4.7 kΩ, achieved 38.34 %', () => {
    const r = designLadder({ vcc: 12, ra: 1000, rb: 10000, rTop: 10000, rInt: BIPOLAR, duties: [0.3915], series: 12 });
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
    const e24 = designLadder({ vcc: 12, ra: 1000, rb: 10000, rTop: 10000, rInt: BIPOLAR, duties: [0.3915], series: 24 });
    const e96 = designLadder({ vcc: 12, ra: 1000, rb: 10000, rTop: 10000, rInt: BIPOLAR, duties: [0.3915], series: 96 });
    expect(e24.ok && e24.steps[0]!.chosenR).toBe(5100);
    expect(e96.ok && e96.steps[0]!.chosenR).toBe(4990);
  });

  it('spreads duties evenly and gives rising resistors for rising duty', () => {
    const r = designLadder({ vcc: 12, ra: 1000, rb: 10000, rTop: 10000, rInt: BIPOLAR, spread: { steps: 3, min: 0.2, max: 0.5 }, series: 24 });
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
    const r = designLadder({ vcc: 12, ra: 1000, rb: 10000, rTop: 10000, rInt: BIPOLAR, duties: [0.3, 0.6], series: 12 });
    expect(r).toEqual({ ok: false, error: expect.stringMatching(/^step 2: .*9\.000 V/) });
  });

  it('designs for the fitted timer: a CMOS pin needs a far larger step resistor for the same duty', () => {
    // The same 39.15 % (6 V) target: by the node equation with 66.67 kΩ, (1.2 + 0.12) mA / 6 V − 0.1 − 0.015 mS =
    // 0.105 mS → 9.524 kΩ (5 kΩ on a bipolar part, above), E12 10 kΩ.
    const r = designLadder({ vcc: 12, ra: 1000, rb: 10000, rTop: 10000, rInt: CMOS, duties: [0.3915], series: 12 });
    expect(r.ok && r.steps[0]!.idealR / (1 / 0.000105)).toBeCloseTo(1, 2);
    expect(r.ok && r.steps[0]!.chosenR).toBe(10000);
    expect(designLadder({ vcc: 12, ra: 1000, rb: 10000, rTop: 10000, rInt: 0, duties: [0.3], series: 12 })).toEqual({
      ok: false,
      error: "r_int (the timer part's r_ctl rating) must be a positive number",
    });
  });

  it('refuses bad input with a message', () => {
    expect(designLadder({ vcc: 0, ra: 1000, rb: 10000, rTop: 10000, rInt: BIPOLAR, duties: [0.3], series: 12 })).toEqual({ ok: false, error: 'vcc must be a positive number' });
    expect(designLadder({ vcc: 12, ra: 1000, rb: 10000, rTop: 10000, rInt: BIPOLAR, duties: [1.2], series: 12 }).ok).toBe(false);
    expect(designLadder({ vcc: 12, ra: 1000, rb: 10000, rTop: 10000, rInt: BIPOLAR, series: 12 }).ok).toBe(false);
    expect(designLadder({ vcc: 12, ra: 1000, rb: 10000, rTop: 10000, rInt: BIPOLAR, duties: [0.3], series: 7 }).ok).toBe(false);
  });
});
