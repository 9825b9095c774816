// Surge and protection: the varistor functions against worked values, and the checks of sheets/70-surge.checks
// on every demo variant — the 1 kV line-to-line surge of IEC 61000-4-5 clamped under each switch and bridge.
import { describe, expect, it } from 'vitest';
import { demoBook } from '../../src/domain/demo-book.ts';
import { evaluateChecks } from '../../src/engine/family.ts';
import type { CheckResult } from '../../src/engine/family.ts';
import { loadBuiltInChecks, readSheetTexts } from '../../src/cli/check-sheets-fs.ts';
import { parseCheckSheet } from '../../src/engine/check-sheets.ts';
import { formulaSheet, near4 } from './functions-helpers.ts';
import { foreignTopology } from './topology-helpers.ts';

const { calc, fails } = formulaSheet('surge');
const CHECKS = loadBuiltInChecks();

describe('VDR_CLAMP (power law through the varistor voltage and the clamping voltage)', () => {
  it('passes through both datasheet points (from memory: the usual varistor model)', () => {
    expect(calc('=VDR_CLAMP(430, 710, 10, 0.001)')).toBeCloseTo(430, 9);
    expect(calc('=VDR_CLAMP(430, 710, 10, 10)')).toBeCloseTo(710, 9);
  });
  it('430 V at 1 mA and 710 V at 10 A reach 804.8 V at 100 A (by hand: α = ln 10⁴ / ln(710/430) = 18.37)', () => {
    near4(calc('=VDR_CLAMP(430, 710, 10, 100)'), 804.8);
  });
  it('refuses points that do not rise', () => {
    expect(fails('=VDR_CLAMP(430, 400, 10, 1)').message).toMatch(/v_c must be above v_1ma/);
    expect(fails('=VDR_CLAMP(430, 710, 0.0005, 1)').message).toMatch(/i_c must be above the 1 mA/);
  });
});

describe('VDR_SURGE_AMPS and VDR_ENERGY', () => {
  it('1 kV behind 2 Ω (IEC 61000-4-5 line to line, from memory) into 430 V / 710 V at 10 A: 98.02 A at 804.0 V', () => {
    const amps = calc('=VDR_SURGE_AMPS(1000, 2, 430, 710, 10)');
    near4(amps, 98.02);
    // The operating point: generator voltage = drop in its 2 Ω + varistor voltage.
    expect(amps * 2 + calc(`=VDR_CLAMP(430, 710, 10, ${amps})`)).toBeCloseTo(1000, 6);
  });
  it('never exceeds the generator\'s short-circuit current of 1 kV / 2 Ω = 500 A (IEC 61000-4-5, from memory)', () => {
    expect(calc('=VDR_SURGE_AMPS(1000, 2, 430, 710, 10)')).toBeLessThan(500);
    expect(calc('=VDR_SURGE_AMPS(1000, 2, 1, 1.01, 10)')).toBeLessThan(500);
    expect(calc('=VDR_SURGE_AMPS(1000, 2, 1, 1.01, 10)')).toBeGreaterThan(499);
  });
  it('711 V at 144.5 A for 20 µs is 2.055 J (the 8/20 µs wave as a rectangle to half value, from memory)', () => {
    near4(calc('=VDR_ENERGY(711, 144.5)'), 2.055);
    near4(calc('=VDR_ENERGY(711, 144.5, 20e-6)'), 2.055);
  });
});

function find(results: readonly CheckResult[], code: string, check: string): CheckResult {
  const r = results.find((x) => x.variantCode === code && x.checkName === check);
  if (!r) throw new Error(`no result for ${code} ${check}`);
  return r;
}

const SHEET = (() => {
  const parsed = parseCheckSheet(readSheetTexts()['70-surge.checks']!, '70-surge.checks');
  if (!parsed.ok) throw new Error('70-surge.checks does not parse');
  return parsed.checks;
})();

describe('surge and protection checks on the demo Book', () => {
  const book = demoBook();
  const results = evaluateChecks(book, CHECKS);

  it('clamp 1 kV at 711.0 V with the 20 mm 275 V disc and at 471.5 V with the 7 mm 150 V disc', () => {
    // 20 mm: 430 V at 1 mA, 700 V at 100 A → 144.5 A, 711.0 V; 7 mm 150 V: 240 V, 395 V at 10 A → 264.2 A, 471.5 V
    // (IEC 61000-4-5 generator, varistor power law: worked by hand, from memory).
    near4(find(results, 'FR4-60-CD', 'surge_i').value as number, 144.5);
    near4(find(results, 'FR4-60-CD', 'surge_clamp_v').value as number, 711.0);
    near4(find(results, 'FR4-100-MT-U', 'surge_i').value as number, 264.2);
    near4(find(results, 'FR4-100-MT-U', 'surge_clamp_v').value as number, 471.5);
    near4(find(results, 'FR4-60-CD', 'surge_energy').value as number, 2.055);
  });

  it('pass on every variant, with n/a only where the topology lacks the part', () => {
    for (const v of book.variants) {
      for (const c of SHEET) {
        const r = find(results, v.code, c.name);
        const expected = foreignTopology(c.appliesWhen, v.params) ? 'n/a' : 'pass';
        expect(r.status, `${v.code} ${c.name}: ${r.message}`).toBe(expected);
      }
    }
  });

  it('fail a 600 V switch and bridge behind a 275 V varistor at 1 kV (the trap the 800 V parts avoid)', () => {
    const b = demoBook();
    b.buildLines.find((l) => l.id === 'line_mosfet')!.partRule = 'IF(load_w>100, "QX-N8006", "QX-N6004")';
    b.buildLines.find((l) => l.id === 'line_bridge')!.partRule = '"QX-B06-1"';
    const r = evaluateChecks(b, CHECKS);
    // 711.0 V > 600 V (IEC 61000-4-5 1 kV clamped as above).
    expect(find(r, 'FR4-60-CD', 'surge_switch_v').status).toBe('fail');
    expect(find(r, 'FR4-60-CD', 'surge_bridge_v').status).toBe('fail');
    // At 120 V the 150 V varistor holds 471.5 V: 79 % of 600 V, under the 10 % band → still a pass.
    expect(find(r, 'FR3-60-CD-U', 'surge_switch_v').status).toBe('pass');
  });

  it('fail the fuse I²t check when the triac variant gets a time-lag fuse', () => {
    const b = demoBook();
    b.buildLines.find((l) => l.id === 'line_fuse')!.partRule = '"TK-F315T"';
    const r = find(evaluateChecks(b, CHECKS), 'FR4-100-MT-U', 'fuse_i2t_switch');
    // 11 A²s of the 3.15 A time-lag fuse against the triac's 4.5 A²s (common practice: the fuse must clear first).
    expect(r.value).toBe(11);
    expect(r.status).toBe('fail');
  });
});
