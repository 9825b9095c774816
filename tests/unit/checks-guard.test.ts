// Check formulas and build rules pass the formula guard before they reach the engine: a Book file or a form cannot
// hand the engine a formula that would freeze the page or overflow its stack (issue 8, formula safety).
import { describe, expect, it } from 'vitest';
import { emptyBook } from '../../src/domain/book.ts';
import type { Book, Check } from '../../src/domain/book.ts';
import { FamilyWorkbook, evaluateChecks } from '../../src/engine/family.ts';

function check(name: string, formula: string): Check {
  return { id: `c_${name}`, rev: 1, name, title: name, formula, unit: 'V', rule: { kind: 'max', limit: '400' }, appliesWhen: '', note: 'test', builtIn: false, group: 'test' };
}

function book(checks: Check[]): Book {
  return { ...emptyBook(), variants: [{ id: 'v1', rev: 1, code: 'D-230', name: 'D-230', params: { mains_v: 230, mains_tol: 0.1 } }], checks };
}

const DEEP = '('.repeat(500) + 'mains_v' + ')'.repeat(500);

describe('formula guard in the family workbook', () => {
  it('reports a check over a range of the whole sheet as an error with the guard message, beside a sound check', () => {
    const results = evaluateChecks(book([check('huge', 'SUM(A1:XFD1048576)'), check('peak', 'MAINS_PEAK(mains_v, mains_tol)')]));
    const huge = results.find((r) => r.checkName === 'huge')!;
    expect(huge.status).toBe('error');
    expect(huge.message).toMatch(/range/i);
    // 230 V + 10 %: √2 · 253 = 357.8 V (IEC 60038:2009, table 1, +10 %).
    const peak = results.find((r) => r.checkName === 'peak')!;
    expect(peak.status).toBe('pass');
    expect(peak.value as number).toBeCloseTo(357.8, 1);
  });

  it('reports a check nested 500 deep as an error instead of overflowing the engine', () => {
    const [r] = evaluateChecks(book([check('deep', DEEP)]));
    expect(r!.status).toBe('error');
    expect(r!.message).toMatch(/nest|deep/i);
  });

  it('refuses a typed check formula nested 500 deep and keeps the old one', () => {
    const session = FamilyWorkbook.open(book([check('peak', 'MAINS_PEAK(mains_v, mains_tol)')]));
    const edit = session.setCheckFormula('c_peak', DEEP);
    expect(edit.ok).toBe(false);
    if (!edit.ok) expect(edit.error).toMatch(/nest|deep/i);
    expect(session.results()[0]!.value as number).toBeCloseTo(357.8, 1);
    session.close();
  });
});
