// What a check reads, worked out from its formulas: the parameters it names, the part ratings it names by role (the
// part the variant's line gives) and the parameters that choose those parts, through the checks it names.
import { describe, expect, it } from 'vitest';
import type { Book, Check } from '../../src/domain/book.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { checkInputs } from '../../src/engine/check-inputs.ts';
import { resolveFamily } from '../../src/engine/family.ts';
import { loadBuiltInChecks } from '../../src/cli/check-sheets-fs.ts';

function demo(): Book {
  return { ...demoBook(), checks: loadBuiltInChecks() };
}

function inputsOf(book: Book, variantCode: string, checkName: string, formulaOf?: (c: Check) => string) {
  const v = book.variants.find((x) => x.code === variantCode)!;
  const check = book.checks.find((c) => c.name === checkName)!;
  const resolved = resolveFamily(book).variants.find((r) => r.variantId === v.id);
  return checkInputs(book, check, resolved, formulaOf);
}

describe('checkInputs', () => {
  it('lists the bleeder check’s part values and the parameter that chooses the bleeder (r_bleed)', () => {
    const book = demo();
    const inputs = inputsOf(book, 'FR5-75-CD', 'bleeder_time');
    // BLEED_TIME(bleeder_value, xcap_value * (1 + xcap_tol), MAINS_PEAK(mains_v, mains_tol), 34), applies on supply.
    expect(inputs.ratings.map((r) => r.key)).toEqual(['bleeder_value', 'xcap_value', 'xcap_tol']);
    const bleeder = inputs.ratings[0]!;
    // FR5-75-CD sets r_bleed to 1 MΩ, so the bleeder line's part rule picks the 1 MΩ resistor.
    expect(bleeder.line?.id).toBe('line_bleeder');
    expect(bleeder.part?.mpn).toBe('AV-MF50-1M0');
    expect(bleeder.rating).toBe('value');
    expect(inputs.ratings[2]!.rating).toBe('tol');
    const names = inputs.params.map((p) => p.name);
    expect(names).toEqual(expect.arrayContaining(['r_bleed', 'c_drop', 'mains_v', 'mains_tol', 'supply']));
    expect(inputs.params.find((p) => p.name === 'r_bleed')?.line?.id).toBe('line_bleeder');
    expect(inputs.params.find((p) => p.name === 'mains_v')?.line).toBeUndefined();
    // Each input once.
    expect(new Set(names).size).toBe(names.length);
  });

  it('follows the checks a formula names, and a typed formula in place of the kept one', () => {
    const book = demo();
    const own: Check = { ...book.checks.find((c) => c.name === 'bleeder_time')!, id: 'check_own', name: 'bleeder_twice', formula: '2 * bleeder_time', appliesWhen: '', builtIn: false };
    const withOwn = { ...book, checks: [...book.checks, own] };
    const through = inputsOf(withOwn, 'FR5-75-CD', 'bleeder_twice');
    expect(through.params.map((p) => p.name)).toContain('r_bleed');
    expect(through.ratings.map((r) => r.key)).toContain('bleeder_value');
    const typed = inputsOf(withOwn, 'FR5-75-CD', 'bleeder_twice', (c) => (c.id === own.id ? 'load_w * 2' : c.formula));
    expect(typed.ratings).toEqual([]);
    expect(typed.params.map((p) => p.name)).toContain('load_w');
    expect(typed.params.map((p) => p.name)).not.toContain('r_bleed');
  });

  it('names a role no line gives the variant, with the rules that would give it', () => {
    const book = demo();
    // FR5-150-RT has a transformer supply: no dropper line applies, so there is no bleeder part to show.
    const inputs = inputsOf(book, 'FR5-150-RT', 'bleeder_time');
    const bleeder = inputs.ratings.find((r) => r.key === 'bleeder_value')!;
    expect(bleeder.part).toBeUndefined();
    expect(bleeder.line).toBeUndefined();
    expect(inputs.params.find((p) => p.name === 'supply')).toBeDefined();
  });
});
