// The transformer logic supply: its formula functions against worked values, the checks of
// sheets/60-transformer.checks on the demo's transformer variants, and those variants fully checked.
import { describe, expect, it } from 'vitest';
import { demoBook } from '../../src/domain/demo-book.ts';
import { evaluateChecks } from '../../src/engine/family.ts';
import type { CheckResult } from '../../src/engine/family.ts';
import { loadBuiltInChecks, readSheetTexts } from '../../src/cli/check-sheets-fs.ts';
import { parseCheckSheet } from '../../src/engine/check-sheets.ts';
import { formulaSheet, near4 } from './functions-helpers.ts';
import { foreignTopology } from './topology-helpers.ts';

const { calc } = formulaSheet('transformer');
const CHECKS = loadBuiltInChecks();

describe('RECT_TROUGH, XFMR_VA and REG_LOSS', () => {
  it('12 V AC through a bridge of 1.0 V diodes into 470 µF at 15 mA, 60 Hz: trough 14.71 V (basic circuit theory, from memory)', () => {
    // √2 · 12 = 16.97 V, less 2 · 1.0 V, less 15 mA / (2 · 60 Hz · 470 µF) = 0.2660 V of ripple.
    near4(calc('=RECT_TROUGH(12, 1, 0.015, 60, 470e-6)'), 14.71);
    near4(calc('=RECT_TROUGH(12, 1, 0, 60, 470e-6)'), 14.97);
  });
  it('a 12 V secondary feeding 15 mA DC carries 0.324 VA with the 1.8 form factor (from memory)', () => {
    near4(calc('=XFMR_VA(12, 0.015)'), 0.324);
    near4(calc('=XFMR_VA(12, 0.015, 1.6)'), 0.288);
  });
  it('a regulator dropping 15.5 V to 5 V at 15 mA dissipates 0.1575 W, nothing when the input is below the output (basic circuit theory, from memory)', () => {
    near4(calc('=REG_LOSS(15.5, 5, 0.015)'), 0.1575);
    expect(calc('=REG_LOSS(4, 5, 0.015)')).toBe(0);
  });
});

function find(results: readonly CheckResult[], code: string, check: string): CheckResult {
  const r = results.find((x) => x.variantCode === code && x.checkName === check);
  if (!r) throw new Error(`no result for ${code} ${check}`);
  return r;
}

const SHEET = (() => {
  const parsed = parseCheckSheet(readSheetTexts()['60-transformer.checks']!, '60-transformer.checks');
  if (!parsed.ok) throw new Error('60-transformer.checks does not parse');
  return parsed.checks;
})();

describe('transformer checks on the demo Book', () => {
  const book = demoBook();
  const results = evaluateChecks(book, CHECKS);
  const transformer = book.variants.filter((v) => v.params.supply === 'transformer');

  it('apply to the transformer variants only, and pass on both', () => {
    expect(transformer.map((v) => v.code)).toEqual(['FR5-150-RT', 'FR4-100-MT-U']);
    for (const c of SHEET) {
      for (const v of book.variants) {
        const r = find(results, v.code, c.name);
        expect(r.status, `${v.code} ${c.name}: ${r.message}`).toBe(v.params.supply === 'transformer' ? 'pass' : 'n/a');
      }
    }
  });

  it('give the values worked by hand', () => {
    // FR5-150-RT: 15 V secondary at 230 V − 10 % (IEC 60038:2009, table 1) → 13.5 V; √2 · 13.5 − 2 · 1.0 −
    // 6 mA/(2 · 50 · 470 µF) = 19.09 − 2 − 0.1277 = 16.96 V against 12 V + 1.7 V dropout (band to 15.07 V).
    near4(find(results, 'FR5-150-RT', 'xfmr_headroom').value as number, 16.96);
    expect(find(results, 'FR5-150-RT', 'xfmr_headroom').limits.limit).toBeCloseTo(13.7, 9);
    // High mains, no load: 15 · 1.1 · 1.25 · √2 − 2 = 27.17 V into the 35 V regulator and the 50 V capacitor.
    near4(find(results, 'FR5-150-RT', 'reg_v_in').value as number, 27.17);
    // FR4-100-MT-U: 9 V secondary; 9 · 1.1 · 1.25 · √2 − 2 = 15.50 V, (15.50 − 5) · 15 mA = 0.1575 W.
    near4(find(results, 'FR4-100-MT-U', 'reg_v_in').value as number, 15.5);
    near4(find(results, 'FR4-100-MT-U', 'reg_loss').value as number, 0.1575);
    // Low mains: 9 · 0.9 · √2 − 2 − 15 mA/(2 · 60 · 470 µF) = 11.46 − 2 − 0.2660 = 9.189 V.
    near4(find(results, 'FR4-100-MT-U', 'xfmr_headroom').value as number, 9.189);
    // 9 V · 15 mA · 1.8 = 0.243 VA of 1.5 VA (from memory).
    near4(find(results, 'FR4-100-MT-U', 'xfmr_va').value as number, 0.243);
    // The 63 mA fuse between 1.8 · 15 mA · 1.25 = 33.75 mA and the 167 mA secondary (common practice).
    near4(find(results, 'FR4-100-MT-U', 'xfmr_fuse').limits.low!, 0.03375);
  });

  it('fails the headroom of a 12 V rail from a 12 V secondary, the trap the 15 V transformer avoids', () => {
    const b = demoBook();
    const line = b.buildLines.find((l) => l.id === 'line_xfmr')!;
    line.partRule = 'IF(mains_v>200, "TK-TR230-12", "TK-TR120-09")';
    const r = find(evaluateChecks(b, CHECKS), 'FR5-150-RT', 'xfmr_headroom');
    // √2 · 10.8 − 2 − 0.1277 = 13.15 V < 13.7 V (basic circuit theory, from memory).
    near4(r.value as number, 13.15);
    expect(r.status).toBe('fail');
  });
});

describe('the demo transformer variants are fully checked', () => {
  it('show n/a only for checks of another stage, supply or selector, or of steps they do not have', () => {
    const book = demoBook();
    const results = evaluateChecks(book, CHECKS);
    for (const v of book.variants.filter((x) => x.params.supply === 'transformer')) {
      const na = results.filter((r) => r.variantId === v.id && r.status === 'n/a').map((r) => r.checkName);
      const expected = CHECKS.filter((c) => foreignTopology(c.appliesWhen, v.params)).map((c) => c.name);
      expect(na.sort(), v.code).toEqual(expected.sort());
      for (const c of SHEET) expect(na, `${v.code} ${c.name}`).not.toContain(c.name);
    }
  });
});
