// Approved alternates and the checks: every approved part of a line is judged and the worst result is the
// variant's, naming the part that gives it, so approving a weaker part can never hide a failure.
import { describe, expect, it } from 'vitest';
import type { Book, Part } from '../../src/domain/book.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { FamilyWorkbook, evaluateChecks } from '../../src/engine/family.ts';
import type { CheckResult } from '../../src/engine/family.ts';
import { loadBuiltInChecks } from '../../src/cli/check-sheets-fs.ts';

const CHECKS = loadBuiltInChecks();

function part(id: string, mpn: string, from: Part, ratings: Record<string, number>): Part {
  return { ...from, id, mpn, ratings: { ...from.ratings, ...ratings } };
}

/** The demo Book with its checks, the given variants only, extra parts, and no approved alternates of its own. */
function book(codes: readonly string[], extra: readonly Part[] = []): Book {
  const b = demoBook();
  const buildLines = b.buildLines.map(({ alternates: _a, ...l }) => l);
  return { ...b, checks: CHECKS, buildLines, variants: b.variants.filter((v) => codes.includes(v.code)), parts: [...b.parts, ...extra] };
}

function result(results: readonly CheckResult[], code: string, check: string): CheckResult {
  return results.find((r) => r.variantCode === code && r.checkName === check)!;
}

const snubber = (b: Book): Part => b.parts.find((p) => p.id === 'part_r_snub_100r')!;

/** The X2 line given a fixed part (the 0.47 µF the rule picks for FR4-60-CD) so it can carry alternates. */
function fixedXcap(b: Book, alternates: string[]): Book {
  return {
    ...b,
    buildLines: b.buildLines.map((l) => {
      if (l.id !== 'line_xcap') return l;
      const { partRule: _rule, ...rest } = l;
      return { ...rest, partId: 'part_xcap_470n', alternates };
    }),
  };
}

function withAlternates(b: Book, lineId: string, alternates: string[], pinnedPartId?: string): Book {
  return { ...b, buildLines: b.buildLines.map((l) => (l.id === lineId ? { ...l, alternates, ...(pinnedPartId ? { pinnedPartId } : {}) } : l)) };
}

describe('checks judge every approved part', () => {
  it('a snubber resistor of lower power rating turns the snubber loss check to fail, naming that part', () => {
    const base = book(['FR6-100-CD']);
    const weak = part('part_r_snub_1w', 'ZX-MO1W-100R', snubber(base), { p_max: 1 });
    const b = withAlternates(book(['FR6-100-CD'], [weak]), 'line_snub_r', ['part_r_snub_1w']);
    const before = result(evaluateChecks(base), 'FR6-100-CD', 'snubber_r_loss');
    // P = C·V²·f at the peak (sheets/20-power.checks: basic circuit theory, from memory): 2.2 nF·357.8²·2830 Hz =
    // 0.7971 W against half of 2 W (common practice) → pass, as checks-demo.test.ts works out by hand.
    expect(before.status).toBe('pass');
    expect(before.value).toBeCloseTo(0.7971, 3);
    expect(before.approvedPart).toBeUndefined();
    const after = result(evaluateChecks(b), 'FR6-100-CD', 'snubber_r_loss');
    // Half of the 1 W alternate's rating is 0.5 W < 0.7971 W → fail.
    expect(after.status).toBe('fail');
    expect(after.limits.limit).toBeCloseTo(0.5, 9);
    expect(after.approvedPart).toEqual({ lineId: 'line_snub_r', partId: 'part_r_snub_1w', mpn: 'ZX-MO1W-100R', judged: 2 });
    expect(after.message).toContain('worst of 2 approved parts on R2: ZX-MO1W-100R');
  });

  it('a resistor within the margin band turns the check to margin; a stronger one changes nothing and the own part is named', () => {
    const base = book(['FR6-100-CD']);
    const close = part('part_r_snub_175', 'ZX-MO175-100R', snubber(base), { p_max: 1.75 });
    const strong = part('part_r_snub_3w', 'ZX-MO3W-100R', snubber(base), { p_max: 3 });
    const b = withAlternates(book(['FR6-100-CD'], [close, strong]), 'line_snub_r', ['part_r_snub_3w', 'part_r_snub_175']);
    const r = result(evaluateChecks(b), 'FR6-100-CD', 'snubber_r_loss');
    // 0.875 W limit, margin band 20 % (sheets/20-power.checks) from 0.7 W: 0.7971 W lies in it → margin.
    expect(r.status).toBe('margin');
    expect(r.approvedPart).toMatchObject({ partId: 'part_r_snub_175', judged: 3 });
    const onlyStrong = withAlternates(book(['FR6-100-CD'], [strong]), 'line_snub_r', ['part_r_snub_3w']);
    const s = result(evaluateChecks(onlyStrong), 'FR6-100-CD', 'snubber_r_loss');
    // 3 W → 1.5 W limit: pass either way; the tie keeps the line's own part.
    expect(s.status).toBe('pass');
    expect(s.limits.limit).toBeCloseTo(1, 9);
    expect(s.approvedPart).toMatchObject({ partId: 'part_r_snub_100r', mpn: 'AV-MO2W-100R', judged: 2 });
  });

  it('an X2 capacitor of lower AC rating fails or sits in the margin of the AC stress check', () => {
    const b0 = book(['FR4-60-CD']);
    const x2 = b0.parts.find((p) => p.id === 'part_xcap_470n')!;
    const low = part('part_xcap_470n_250', 'ZX-X2-474-250', x2, { v_ac: 250 });
    const near = part('part_xcap_470n_265', 'ZX-X2-474-265', x2, { v_ac: 265 });
    const own = result(evaluateChecks(fixedXcap(b0, [])), 'FR4-60-CD', 'xcap_ac_stress');
    // Highest mains 230 V + 10 % = 253 V (IEC 60038:2009, table 1) against the 275 V AC rating (IEC 60384-14, from
    // memory, as sheets/10-mains.checks cites): below 275 − 5 % = 261.25 V → pass.
    expect(own.status).toBe('pass');
    expect(own.value).toBeCloseTo(253, 9);
    const failing = result(evaluateChecks(fixedXcap(book(['FR4-60-CD'], [low]), ['part_xcap_470n_250'])), 'FR4-60-CD', 'xcap_ac_stress');
    // 253 V > 250 V AC → fail.
    expect(failing.status).toBe('fail');
    expect(failing.approvedPart?.mpn).toBe('ZX-X2-474-250');
    const margin = result(evaluateChecks(fixedXcap(book(['FR4-60-CD'], [near]), ['part_xcap_470n_265'])), 'FR4-60-CD', 'xcap_ac_stress');
    // 265 V AC: the band is 251.75 … 265 V and 253 V lies in it → margin.
    expect(margin.status).toBe('margin');
    // The checks that do not read the capacitor are not touched.
    expect(result(evaluateChecks(fixedXcap(book(['FR4-60-CD'], [low]), ['part_xcap_470n_250'])), 'FR4-60-CD', 'load_i').approvedPart).toBeUndefined();
  });

  it('an edit to a variant re-judges its approved alternates too', () => {
    const b0 = book(['FR4-60-CD', 'FR3-40-CD']);
    const x2 = b0.parts.find((p) => p.id === 'part_xcap_470n')!;
    const low = part('part_xcap_470n_250', 'ZX-X2-474-250', x2, { v_ac: 250 });
    const wb = FamilyWorkbook.open(fixedXcap(book(['FR4-60-CD', 'FR3-40-CD'], [low]), ['part_xcap_470n_250']));
    try {
      expect(result(wb.results(), 'FR4-60-CD', 'xcap_ac_stress').status).toBe('fail');
      // With no mains tolerance the highest mains is 230 V, below 250 V − 5 % = 237.5 V → pass on every approved part.
      expect(wb.setParam('variant_fr4_60_cd', 'mains_tol', 0)).toEqual({ ok: true });
      const r = result(wb.results(), 'FR4-60-CD', 'xcap_ac_stress');
      expect(r.status).toBe('pass');
      expect(r.value).toBeCloseTo(230, 9);
      expect(result(wb.results(), 'FR3-40-CD', 'xcap_ac_stress').status).toBe('fail');
    } finally {
      wb.close();
    }
  });

  it('a check formula edited in an open family is judged with every approved part again', () => {
    const base = book(['FR6-100-CD']);
    const weak = part('part_r_snub_1w', 'ZX-MO1W-100R', snubber(base), { p_max: 1 });
    const wb = FamilyWorkbook.open(withAlternates(book(['FR6-100-CD'], [weak]), 'line_snub_r', ['part_r_snub_1w']));
    try {
      const check = wb.currentBook().checks.find((c) => c.name === 'snubber_r_loss')!;
      expect(result(wb.results(), 'FR6-100-CD', 'snubber_r_loss').status).toBe('fail');
      // Half the loss: 0.3986 W, under half of 1 W less the 20 % band (0.4 W) → pass on both approved parts.
      expect(wb.setCheckFormula(check.id, `${check.formula} / 2`)).toEqual({ ok: true });
      const r = result(wb.results(), 'FR6-100-CD', 'snubber_r_loss');
      expect(r.value).toBeCloseTo(0.7971 / 2, 3);
      expect(r.status).toBe('pass');
      // Back to the sheet's formula: the weaker part fails it again.
      expect(wb.setCheckFormula(check.id, check.formula)).toEqual({ ok: true });
      expect(result(wb.results(), 'FR6-100-CD', 'snubber_r_loss')).toMatchObject({ status: 'fail', approvedPart: { mpn: 'ZX-MO1W-100R' } });
    } finally {
      wb.close();
    }
  });

  it('a Book without alternates gives the same results as before, and line resolution is unchanged by alternates', () => {
    const b = book(['FR4-60-CD', 'FR6-100-CD', 'FR4-100-MT-U']);
    const plain = evaluateChecks(b);
    expect(plain.every((r) => r.approvedPart === undefined)).toBe(true);
    const extra = part('part_r_snub_3w', 'ZX-MO3W-100R', snubber(b), { p_max: 3 });
    const alt = withAlternates({ ...b, parts: [...b.parts, extra] }, 'line_snub_r', ['part_r_snub_3w']);
    const judged = evaluateChecks(alt);
    expect(judged.map((r) => r.status)).toEqual(plain.map((r) => r.status));
    const wb = FamilyWorkbook.open(alt);
    try {
      expect(wb.resolve().variants.map((v) => v.lines.find((l) => l.lineId === 'line_snub_r')!.partId)).toEqual(['part_r_snub_100r', 'part_r_snub_100r', 'part_r_snub_100r']);
    } finally {
      wb.close();
    }
  });
});
