// Power-stage and thermal formula functions against published worked values (power electronics textbooks and basic circuit theory, from memory).
import { describe, expect, it } from 'vitest';
import { formulaSheet, near4 } from './functions-helpers.ts';

const { calc, fails } = formulaSheet('power');

describe('LOAD_AMPS (I = P / (V · PF))', () => {
  it('60 W at 230 V, PF 0.9 draws 0.2899 A (basic circuit theory, from memory)', () => {
    near4(calc('=LOAD_AMPS(60, 230, 0.9)'), 0.2899);
  });
  it('refuses a power factor of 0 or above 1 and a voltage of 0', () => {
    expect(fails('=LOAD_AMPS(60, 230, 0)').message).toMatch(/pf must be above 0 and at most 1/);
    expect(fails('=LOAD_AMPS(60, 230, 1.2)').message).toMatch(/pf must be above 0 and at most 1/);
    expect(fails('=LOAD_AMPS(60, 0, 0.9)').message).toMatch(/v \(V\) must be greater than 0/);
  });
});

describe('COND_LOSS and BRIDGE_LOSS', () => {
  it('conduction loss I²·R: 2 A through 0.5 Ω is 2 W (by hand: 2² × 0.5)', () => {
    expect(calc('=COND_LOSS(2, 0.5)')).toBe(2);
  });
  it('R_on roughly doubling from 25 °C to 125 °C doubles the loss (rule of thumb, from memory)', () => {
    expect(calc('=COND_LOSS(0.29, 2 * 1.2) / COND_LOSS(0.29, 1.2)')).toBeCloseTo(2, 12);
  });
  it('bridge loss 2·V_f·I_avg with I_avg = 0.9003·I_rms: 0.5 A rms, 1.0 V → 0.9003 W (basic circuit theory, from memory)', () => {
    near4(calc('=BRIDGE_LOSS(0.9003 * 0.5, 1.0)'), 0.9003);
    // The sine's average-to-RMS ratio 2√2/π, computed rather than typed:
    near4(calc('=BRIDGE_LOSS(2 * SQRT(2) / PI() * 0.5, 1.0)'), 0.9003);
  });
  it('refuses a negative on-resistance and forward voltage', () => {
    expect(fails('=COND_LOSS(1, -0.1)').message).toMatch(/r_on \(Ω\) must be 0 or more/);
    expect(fails('=BRIDGE_LOSS(0.5, -1)').message).toMatch(/v_f \(V\) must be 0 or more/);
  });
});

describe('SNUB_WATTS (P = C·V²·f)', () => {
  it('10 nF, 230 V rms, 1 kHz: 0.529 W; with the peak voltage 1.058 W (basic circuit theory, from memory)', () => {
    near4(calc('=SNUB_WATTS(10e-9, 230, 1000)'), 0.529);
    near4(calc('=SNUB_WATTS(10e-9, MAINS_PEAK(230), 1000)'), 1.058);
  });
  it('refuses a negative capacitance', () => {
    expect(fails('=SNUB_WATTS(-10e-9, 230, 1000)').message).toMatch(/c \(F\) must be 0 or more/);
  });
});

describe('JUNCTION_C and SINK_RTH_MAX (thermal chain T_j = T_a + P·ΣRθ; power electronics textbooks)', () => {
  it('5 W through 3 + 1 + 8 K/W at 25 °C: 85 °C (power electronics textbooks, from memory)', () => {
    expect(calc('=JUNCTION_C(5, 25, 3 + 1 + 8)')).toBe(85);
  });
  it('the largest heatsink for 85 °C at 5 W, 25 °C, 3 and 1 K/W is 8 K/W: the same chain solved for Rθ_sa', () => {
    expect(calc('=SINK_RTH_MAX(5, 85, 25, 3, 1)')).toBeCloseTo(8, 12);
    expect(calc('=JUNCTION_C(5, 25, 3 + 1 + SINK_RTH_MAX(5, 85, 25, 3, 1))')).toBeCloseTo(85, 12);
  });
  it('goes negative when even a perfect heatsink is not enough', () => {
    // By hand: (50 − 25) / 10 − 3 − 1 = −1.5 K/W.
    expect(calc('=SINK_RTH_MAX(10, 50, 25, 3, 1)')).toBeCloseTo(-1.5, 12);
  });
  it('answers #DIV/0! with a message for no power, and refuses negative thermal resistance', () => {
    const e = fails('=SINK_RTH_MAX(0, 125, 25, 3, 1)');
    expect(e.value).toBe('#DIV/0!');
    expect(e.message).toMatch(/any heatsink will do/);
    expect(fails('=JUNCTION_C(5, 25, -1)').message).toMatch(/rth_total \(K\/W\) must be 0 or more/);
  });
  it('takes temperatures in °C without an SI prefix: "25 K" is refused instead of read as 25,000 °C', () => {
    // The chain worked above (5 W, 3 + 1 + 8 K/W, 25 °C → 85 °C; power electronics textbooks, from memory), with
    // the ambient typed as text in its unit.
    expect(calc('=JUNCTION_C(5, "25 °C", 12)')).toBe(85);
    expect(calc('=JUNCTION_C(5, "25", "12 K/W")')).toBe(85);
    const e = fails('=JUNCTION_C(5, "25 K", 12)');
    expect(e.value).toBe('#VALUE!');
    expect(e.message).toBe('JUNCTION_C: t_amb: "25 K" has the SI prefix K (kilo), but °C takes no prefix; write the number alone or with °C');
    expect(fails('=SINK_RTH_MAX(5, "85k", 25, 3, 1)').message).toMatch(/tj_max: "85k" has the SI prefix k \(kilo\), but °C takes no prefix/);
    expect(fails('=JUNCTION_C(5, 25, "12m")').message).toMatch(/rth_total: "12m" has the SI prefix m \(milli\), but K\/W takes no prefix/);
  });
});
