// The triac stage: its formula functions against worked values, the checks of sheets/50-triac.checks on the demo's
// triac variant, and that variant having every check its topology needs applicable.
import { describe, expect, it } from 'vitest';
import { demoBook } from '../../src/domain/demo-book.ts';
import { evaluateChecks } from '../../src/engine/family.ts';
import type { CheckResult } from '../../src/engine/family.ts';
import { loadBuiltInChecks, readSheetTexts } from '../../src/cli/check-sheets-fs.ts';
import { parseCheckSheet } from '../../src/engine/check-sheets.ts';
import { formulaSheet, near4 } from './functions-helpers.ts';
import { foreignTopology } from './topology-helpers.ts';

const { calc, fails } = formulaSheet('triac');
const CHECKS = loadBuiltInChecks();

describe('PHASE_VRMS (phase-angle control of a sine)', () => {
  it('230 V fired at π/2 passes 162.6 V and at 2π/3 101.7 V (power electronics textbooks, from memory)', () => {
    near4(calc('=PHASE_VRMS(230, PI()/2)'), 162.6);
    near4(calc('=PHASE_VRMS(230, 2*PI()/3)'), 101.7);
  });
  it('passes the whole voltage at 0 and nothing at π (the formula at its ends)', () => {
    expect(calc('=PHASE_VRMS(230, 0)')).toBeCloseTo(230, 12);
    expect(calc('=PHASE_VRMS(230, PI())')).toBeCloseTo(0, 12);
  });
  it('refuses a firing angle past half a cycle', () => {
    expect(fails('=PHASE_VRMS(230, 4)').message).toMatch(/alpha \(rad\) must be at most π/);
  });
});

describe('TRIAC_LOSS (P = V_T0 · I_T(AV) + r_T · I_rms²)', () => {
  it('0.5 A, V_T0 0.85 V, r_T 0.05 Ω → 0.3951 W (V_T0, r_T as IEC 60747-6 defines them; worked from memory)', () => {
    near4(calc('=TRIAC_LOSS(0.5, 0.85, 0.05)'), 0.3951);
    // I_T(AV) = 2√2/π · I_rms = 0.4502 A for 0.5 A (basic circuit theory, from memory): the V_T0 term alone.
    near4(calc('=TRIAC_LOSS(0.5, 1, 0)'), 0.4502);
  });
});

describe('GATE_COLD, GATE_AMPS and COMMUTATION_DIDT', () => {
  it('doubles I_GT at −40 °C, half-way at −7.5 °C, and keeps the 25 °C figure when warm (datasheet curves, from memory)', () => {
    expect(calc('=GATE_COLD(0.01, -40)')).toBeCloseTo(0.02, 12);
    expect(calc('=GATE_COLD(0.01, -7.5)')).toBeCloseTo(0.015, 12);
    expect(calc('=GATE_COLD(0.01, 60)')).toBe(0.01);
    expect(calc('=GATE_COLD(1, -60, 1.5)')).toBeCloseTo(1.5, 12);
  });
  it('drives (5 V − 1.2 V) / 330 Ω = 11.52 mA into a gate (basic circuit theory, from memory), nothing below V_GT', () => {
    near4(calc('=GATE_AMPS(5, 1.2, 330)'), 0.01152);
    expect(calc('=GATE_AMPS(1, 1.2, 330)')).toBe(0);
  });
  it('a 1 A sine at 50 Hz falls through zero at 444.3 A/s (2π · f · √2 · I, basic circuit theory, from memory)', () => {
    near4(calc('=COMMUTATION_DIDT(1, 50)'), 444.3);
  });
});

function find(results: readonly CheckResult[], code: string, check: string): CheckResult {
  const r = results.find((x) => x.variantCode === code && x.checkName === check);
  if (!r) throw new Error(`no result for ${code} ${check}`);
  return r;
}

const TRIAC_SHEET = (() => {
  const parsed = parseCheckSheet(readSheetTexts()['50-triac.checks']!, '50-triac.checks');
  if (!parsed.ok) throw new Error('50-triac.checks does not parse');
  return parsed.checks;
})();

describe('triac checks on the demo Book', () => {
  const book = demoBook();
  const results = evaluateChecks(book, CHECKS);
  const code = 'FR4-100-MT-U';

  it('apply to the triac variant only', () => {
    for (const c of TRIAC_SHEET) {
      for (const v of book.variants.filter((x) => x.params.stage !== 'triac')) {
        expect(find(results, v.code, c.name).status, `${v.code} ${c.name}`).toBe('n/a');
      }
    }
  });

  it('give the triac variant the values worked by hand, each passing', () => {
    // 120 V − 10 % = 108 V (IEC 60038:2009, table 1) fired at 1.8 rad: √(1 − 0.57296 − 0.07043) = 0.59717 → 64.49 V,
    // against the fan's 55 V (band to 60.5 V) → pass. Steps 2–4 at 1.3, 0.8, 0.3 rad rise to 107.7 V.
    near4(find(results, code, 'phase_v_s1').value as number, 64.49);
    near4(find(results, code, 'phase_v_s4').value as number, 107.7);
    expect(find(results, code, 'phase_v_rising').value).toBe(true);
    // Load 100 W / (120 V · 0.9) = 0.9259 A (basic circuit theory, from memory); V_T0 0.95 V, r_T 0.09 Ω:
    // 0.95 · 0.9003 · 0.9259 + 0.09 · 0.9259² = 0.7919 + 0.07716 = 0.8691 W (IEC 60747-6 model).
    near4(find(results, code, 'triac_loss').value as number, 0.8691);
    // T_j = 45 + 0.8691 · (3.3 + 1 + 20) = 66.12 °C against 125 − 25 = 100 °C (thermal chain, from memory).
    near4(find(results, code, 'triac_tj').value as number, 66.12);
    // −10 °C is 35/65 of the way to −40 °C: V_GT 1 V · 1.269 → (5 − 1.269)/330 Ω = 11.31 mA against
    // I_GT 5 mA · 1.538 = 7.692 mA in quadrants II and III (negative drive) → pass (datasheet curves, from memory).
    near4(find(results, code, 'triac_gate_i').value as number, 0.01131);
    near4(find(results, code, 'triac_gate_i').limits.limit!, 0.007692);
    // Lowest step at low mains: 0.9259 A · 64.49/120 = 0.4976 A rms, peak 0.7038 A (fixed-impedance fan, from memory).
    near4(find(results, code, 'triac_hold').value as number, 0.4976);
    near4(find(results, code, 'triac_latch').value as number, 0.7038);
    // 2π · 60 · √2 · 0.9259 = 493.7 A/s against (dI/dt)c 1.8 A/ms (basic circuit theory, from memory).
    near4(find(results, code, 'triac_commutation').value as number, 493.7);
    for (const c of TRIAC_SHEET) {
      const r = find(results, code, c.name);
      const step = /^phase_v_s(\d)$/.exec(c.name);
      if (step && Number(step[1]) > 4) expect(r.status, c.name).toBe('n/a');
      else expect(r.status, `${c.name}: ${r.message}`).toBe('pass');
    }
  });

  it('fails the gate current when the driver fires in quadrant IV, whose I_GT is twice as large', () => {
    const b = demoBook();
    b.variants.find((v) => v.code === code)!.params.gate_polarity = 'positive';
    const r = find(evaluateChecks(b, CHECKS), code, 'triac_gate_i');
    // I_GT 10 mA · 1.538 = 15.38 mA cold against 11.31 mA from the driver (datasheet curves, from memory).
    near4(r.limits.limit!, 0.01538);
    expect(r.status).toBe('fail');
  });

  it('fails the lowest step when its firing angle leaves the fan under its running voltage', () => {
    const b = demoBook();
    b.variants.find((v) => v.code === code)!.params.alpha_s1 = 2.2;
    const r = find(evaluateChecks(b, CHECKS), code, 'phase_v_s1');
    // 108 V · √(1 − 0.70028 + sin 4.4/(2π)) = 108 · √(0.29972 − 0.15155) = 41.57 V < 55 V (from memory).
    near4(r.value as number, 41.57);
    expect(r.status).toBe('fail');
  });
});

describe('the demo triac variant is fully checked', () => {
  it('shows n/a only for checks of another stage, supply or selector, or of steps it does not have', () => {
    const book = demoBook();
    const v = book.variants.find((x) => x.code === 'FR4-100-MT-U')!;
    const results = evaluateChecks(book, CHECKS).filter((r) => r.variantId === v.id);
    const na = results.filter((r) => r.status === 'n/a').map((r) => r.checkName);
    const expected = CHECKS.filter((c) => foreignTopology(c.appliesWhen, v.params)).map((c) => c.name);
    expect(na.sort()).toEqual(expected.sort());
    // Every triac, surge and protection check that concerns a triac stage applies.
    for (const name of ['switch_v_stress', 'load_i', 'snubber_r_loss', 'triac_loss', 'triac_tj', 'triac_gate_i', 'triac_gate_v',
      'triac_latch', 'triac_hold', 'triac_commutation', 'surge_switch_v', 'fuse_i2t_switch', 'fuse_rating']) {
      expect(na, name).not.toContain(name);
    }
    // 28 of the built-in checks at the time of writing (3 before the triac, transformer and surge sheets).
    expect(results.filter((r) => r.status !== 'n/a').length).toBeGreaterThanOrEqual(25);
  });
});
