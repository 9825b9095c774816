// Variant parameters by name in check formulas: the tokenizer's rewrite, unknown names, text parameters,
// checks reading checks, and the live session's edits.
import { describe, expect, it } from 'vitest';
import { emptyBook } from '../../src/domain/book.ts';
import type { Book, Check, Variant } from '../../src/domain/book.ts';
import { FamilyWorkbook, evaluateChecks } from '../../src/engine/family.ts';
import { constantNumber, formulaNames, rewriteFormula, splitAtWord, tokenizeFormula } from '../../src/engine/formula-names.ts';

function check(name: string, formula: string, rule: Check['rule'], appliesWhen = ''): Check {
  return { id: `c_${name}`, rev: 1, name, title: name, formula, unit: '', rule, appliesWhen, note: 'test', builtIn: false, group: 'test' };
}

function variant(id: string, code: string, params: Variant['params']): Variant {
  return { id, rev: 1, code, name: code, params };
}

function book(checks: Check[]): Book {
  return {
    ...emptyBook(),
    variants: [
      variant('v1', 'D-230', { mains_v: 230, mains_tol: 0.1, supply: 'dropper', c_drop: 0.47e-6 }),
      variant('v2', 'T-120', { mains_v: 120, mains_tol: 0.1, supply: 'transformer' }),
    ],
    checks,
  };
}

describe('formula names', () => {
  it('finds names outside strings and not followed by "(" — function names and text stay', () => {
    expect(formulaNames('IF(supply="dropper", MAINS_PEAK (mains_v, mains_tol), 0) + "load_w"')).toEqual({
      ok: true,
      names: ['supply', 'mains_v', 'mains_tol'],
    });
    expect(formulaNames('=TRUE')).toEqual({ ok: true, names: [] });
  });

  it('rewrites names to cells and keeps "" inside strings', () => {
    const r = rewriteFormula('IF(stage="say ""hi""", a_1 * 1.5E3, b)', (k) => ({ a_1: 'C7', b: 'D7', stage: 'E7' })[k]);
    expect(r).toEqual({ ok: true, formula: '=IF(E7="say ""hi""", C7 * 1.5E3, D7)' });
  });

  it('reports every unknown name together', () => {
    expect(rewriteFormula('x + y * known', (k) => (k === 'known' ? 'A1' : undefined))).toEqual({
      ok: false,
      error: 'unknown name x; unknown name y',
      unknown: ['x', 'y'],
    });
  });

  it('refuses an unclosed string with its position', () => {
    expect(tokenizeFormula('IF(a="x, 1, 2)')).toEqual({ ok: false, error: 'text starting at character 6 has no closing quote' });
  });

  it('knows constants and splits "between" limits at a bare and', () => {
    expect(constantNumber('2')).toBe(2);
    expect(constantNumber(' -1.5e2 ')).toBe(-150);
    expect(constantNumber('steps - 1')).toBeUndefined();
    expect(splitAtWord('f_min and AND(a, b) and "x and y"', 'and')).toEqual({ ok: true, parts: ['f_min', 'AND(a, b)', '"x and y"'] });
  });
});

describe('checks read variant parameters by name', () => {
  it('evaluates one formula per variant with its own parameters (IEC 60038:2009 table 1: 230 V +10 % → 357.8 V, 120 V → 186.7 V)', () => {
    const r = evaluateChecks(book([check('peak', 'MAINS_PEAK(mains_v, mains_tol)', { kind: 'max', limit: '400' })]));
    expect(r.map((x) => [x.variantCode, x.status])).toEqual([
      ['D-230', 'pass'],
      ['T-120', 'pass'],
    ]);
    expect(r[0]!.value).toBeCloseTo(357.8, 1);
    expect(r[1]!.value).toBeCloseTo(186.7, 1);
  });

  it('compares text parameters in IF and applies rules', () => {
    const r = evaluateChecks(
      book([
        check('kind', 'IF(supply="dropper", 1, 2)', { kind: 'max', limit: '1' }),
        check('xcap_amps', 'XCAP_AMPS(c_drop, mains_v, 50)', { kind: 'min', limit: '0.03' }, 'supply="dropper"'),
      ]),
    );
    expect(r.map((x) => [x.variantCode, x.checkName, x.value, x.status])).toEqual([
      ['D-230', 'kind', 1, 'pass'],
      // Basic circuit theory (from memory): 0.47 µF at 230 V / 50 Hz → 33.96 mA.
      ['D-230', 'xcap_amps', expect.closeTo(0.03396, 5), 'pass'],
      ['T-120', 'kind', 2, 'fail'],
      // The transformer variant has no c_drop, but the check does not apply there: n/a, not an error.
      ['T-120', 'xcap_amps', null, 'n/a'],
    ]);
  });

  it('gives "unknown name x" for a name no variant has, and for a name this variant lacks', () => {
    const r = evaluateChecks(
      book([check('a', 'mains_v * legs', { kind: 'max', limit: '1' }), check('b', 'c_drop * 2', { kind: 'max', limit: '1' })]),
    );
    expect(r.map((x) => [x.variantCode, x.checkName, x.status, x.message])).toEqual([
      ['D-230', 'a', 'error', expect.stringMatching(/^unknown name legs/)],
      ['D-230', 'b', 'pass', expect.any(String)],
      ['T-120', 'a', 'error', expect.stringMatching(/^unknown name legs/)],
      ['T-120', 'b', 'error', 'unknown name c_drop: variant T-120 has no parameter of that name'],
    ]);
  });

  it('lets a check read another check by name, and explains a name missing further down', () => {
    const r = evaluateChecks(
      book([
        check('peak', 'MAINS_PEAK(mains_v, mains_tol)', { kind: 'max', limit: '400' }),
        check('peak_margin', '400 - peak', { kind: 'min', limit: '0' }),
        check('cap_charge', 'c_drop * peak', { kind: 'max', limit: '1' }),
        check('cap_twice', 'cap_charge * 2', { kind: 'max', limit: '1' }),
      ]),
    );
    const t = (code: string, name: string) => r.find((x) => x.variantCode === code && x.checkName === name)!;
    expect(t('D-230', 'peak_margin').value).toBeCloseTo(400 - 357.8, 1);
    expect(t('T-120', 'cap_twice').message).toBe('unknown name c_drop: variant T-120 has no parameter of that name');
  });

  it('does not crash on bad formulas: syntax errors, cycles, text where a number goes', () => {
    const r = evaluateChecks(
      book([
        check('broken', 'mains_v +', { kind: 'max', limit: '1' }),
        check('loop_a', 'loop_b + 1', { kind: 'max', limit: '1' }),
        check('loop_b', 'loop_a + 1', { kind: 'max', limit: '1' }),
        check('texty', 'supply', { kind: 'max', limit: '1' }),
        check('mains_v', '1', { kind: 'max', limit: '1' }),
      ]),
    ).filter((x) => x.variantCode === 'D-230');
    expect(r.map((x) => [x.checkName, x.status])).toEqual([
      ['broken', 'error'],
      ['loop_a', 'error'],
      ['loop_b', 'error'],
      ['texty', 'error'],
      ['mains_v', 'error'],
    ]);
    expect(r[1]!.message).toMatch(/circular reference/);
    expect(r[3]!.message).toBe('expected a number, got text "dropper"');
    expect(r[4]!.message).toMatch(/also a variant parameter/);
  });

  it('keeps text parameters that look like numbers or formulas as text', () => {
    const b = book([check('is_text', 'ISTEXT(label)', { kind: 'true' })]);
    b.variants[0]!.params.label = '=1+1';
    b.variants[1]!.params.label = '12';
    expect(evaluateChecks(b).map((x) => x.status)).toEqual(['pass', 'pass']);
  });
});

describe('an open family workbook', () => {
  it('re-evaluates at once after a parameter edit, and refuses a bad value without changing anything', () => {
    const s = FamilyWorkbook.open(book([check('peak', 'MAINS_PEAK(mains_v, mains_tol)', { kind: 'max', limit: '400' })]));
    try {
      expect(s.results()[0]!.status).toBe('pass');
      expect(s.setParam('v1', 'mains_v', 260)).toEqual({ ok: true });
      // √2 · 260 · 1.1 = 404.5 V > 400 V.
      expect(s.results()[0]).toMatchObject({ status: 'fail', value: expect.closeTo(404.5, 1) });
      expect(s.setParam('v1', 'mains_v', Number.NaN)).toEqual({ ok: false, error: 'value of mains_v must be a finite number' });
      expect(s.setParam('nope', 'mains_v', 1).ok).toBe(false);
      expect(s.setParam('v1', 'peak', 1)).toMatchObject({ ok: false });
      expect(s.results()[0]!.value).toBeCloseTo(404.5, 1);
      expect(s.currentBook().variants[0]!.params.mains_v).toBe(260);
    } finally {
      s.close();
    }
  });

  it('adds a parameter no variant had, which clears an unknown name', () => {
    const s = FamilyWorkbook.open(book([check('doubled', 'legs * 2', { kind: 'max', limit: '10' })]));
    try {
      expect(s.results()[0]!.status).toBe('error');
      expect(s.setParam('v1', 'legs', 3)).toEqual({ ok: true });
      expect(s.results().map((r) => [r.status, r.value])).toEqual([
        ['pass', 6],
        ['error', null],
      ]);
    } finally {
      s.close();
    }
  });

  it('replaces a check formula and re-evaluates every variant; an unreadable formula changes nothing', () => {
    const s = FamilyWorkbook.open(book([check('peak', 'MAINS_PEAK(mains_v, mains_tol)', { kind: 'max', limit: '400' })]));
    try {
      expect(s.setCheckFormula('c_peak', '=MAINS_PEAK(mains_v)')).toEqual({ ok: true });
      // IEC 60038:2009, table 1: 230 V nominal, peak 325.3 V.
      expect(s.results()[0]!.value).toBeCloseTo(325.3, 1);
      expect(s.setCheckFormula('c_peak', 'IF(supply="open, 1, 2)').ok).toBe(false);
      expect(s.results()[0]!.value).toBeCloseTo(325.3, 1);
      expect(s.setCheckFormula('c_peak', 'mains_v * volts')).toEqual({ ok: true });
      expect(s.results()[0]!.message).toMatch(/^unknown name volts/);
      expect(s.setCheckFormula('c_peak', 'mains_v')).toEqual({ ok: true });
      expect(s.results().map((r) => r.value)).toEqual([230, 120]);
      expect(s.currentBook().checks[0]!.formula).toBe('mains_v');
    } finally {
      s.close();
    }
  });
});
