// The family workbook's shortcuts give the same answers as the plain way: rows copied from the first row's formulas
// equal each variant evaluated on its own, and a session edited step by step equals a family opened afresh from
// the edited Book. These compare two computations of the engine, so no engineering value is asserted here (the
// checks' own values are checked against their sources in checks-demo.test.ts).
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { demoBook } from '../../src/domain/demo-book.ts';
import { emptyBook } from '../../src/domain/book.ts';
import type { Book, Check, Variant } from '../../src/domain/book.ts';
import { FamilyWorkbook, evaluateChecks, resolveFamily } from '../../src/engine/family.ts';
import type { CheckResult } from '../../src/engine/family.ts';
import { loadBuiltInChecks } from '../../src/cli/check-sheets-fs.ts';

const CHECKS = loadBuiltInChecks();

/** The demo Book with `n` variants cycled from its own, loads and ambients varied so rows differ. */
function family(n: number): Book {
  const demo = demoBook();
  const loads = [40, 60, 75, 100, 150];
  const variants: Variant[] = [];
  for (let i = 0; i < n; i++) {
    const src = demo.variants[i % demo.variants.length]!;
    const params: Variant['params'] = { ...src.params, load_w: loads[(i * 3) % loads.length]! };
    if (typeof params['t_amb'] === 'number') params['t_amb'] = 35 + (i % 16);
    variants.push({ ...src, id: `${src.id}_${i}`, code: `${src.code}-${i}`, params });
  }
  return { ...demo, variants, checks: CHECKS };
}

/** Results without the variant, for comparing one variant's results across Books. */
function byCheck(results: readonly CheckResult[], variantId: string): unknown[] {
  return results.filter((r) => r.variantId === variantId).map(({ checkId, value, status, limit, message }) => ({ checkId, value, status, limit, message }));
}

describe('family workbook shortcuts', () => {
  it('gives every variant of a 37-variant family the results it has when evaluated alone', () => {
    // 37 is not a power of two, so the copy-down ends with a partial block.
    const book = family(37);
    const all = evaluateChecks(book);
    expect(all).toHaveLength(37 * CHECKS.length);
    for (const i of [0, 1, 2, 15, 16, 31, 32, 36]) {
      const v = book.variants[i]!;
      const alone = evaluateChecks({ ...book, variants: [v] });
      expect(byCheck(all, v.id)).toEqual(byCheck(alone, v.id));
    }
    const resolved = resolveFamily(book).variants;
    for (const i of [0, 17, 36]) {
      const v = book.variants[i]!;
      expect(resolved[i]!.lines).toEqual(resolveFamily({ ...book, variants: [v] }).variants[0]!.lines);
    }
  });

  it('copies formulas the engine prints differently (spacing, exponents) or cannot read correctly to every row', () => {
    const check = (name: string, formula: string, limit: string, appliesWhen = ''): Check => ({
      id: `c_${name}`,
      rev: 1,
      name,
      title: name,
      group: 'test',
      formula,
      unit: '',
      rule: { kind: 'max', limit },
      appliesWhen,
      note: 'test',
      builtIn: false,
    });
    const variants: Variant[] = [230, 120, 240, 100, 127].map((v, i) => ({ id: `v${i}`, rev: 1, code: `V${i}`, name: `V${i}`, params: { mains_v: v, label: i % 2 ? 'two  words' : 'plain' } }));
    const book: Book = {
      ...emptyBook(),
      variants,
      checks: [
        check('spaced', 'SUM( mains_v , 1 )', '1000'),
        check('scaled', 'mains_v * 1.5E3', '0.5E6'),
        check('quoted', 'IF( label = "two  words" , 1, 2)', '1'),
        // The engine cannot read this formula: every row says so, and the copy to other rows still works.
        check('broken', 'mains_v +', '1'),
        check('tiny', 'mains_v * 0.47e-6', '1e-4', 'AND( mains_v > 0 , label <> "x" )'),
      ],
    };
    const r = evaluateChecks(book);
    for (const [i, v] of [230, 120, 240, 100, 127].entries()) {
      const row = r.filter((x) => x.variantId === `v${i}`);
      // Each value worked by hand from the row's own mains_v.
      expect(row[0]).toMatchObject({ value: v + 1, status: 'pass', limit: '≤ 1000' });
      expect(row[1]).toMatchObject({ value: v * 1500, status: v * 1500 <= 500_000 ? 'pass' : 'fail' });
      expect(row[2]).toMatchObject({ value: i % 2 ? 1 : 2, status: i % 2 ? 'pass' : 'fail' });
      expect(row[3]).toMatchObject({ status: 'error', value: null });
      expect(row[4]!.value).toBeCloseTo(v * 0.47e-6, 15);
      expect(row[4]!.status).not.toBe('n/a');
    }
  });

  it('a session edited step by step agrees with the family opened afresh from the edited Book', () => {
    const base = family(12);
    const edit = fc.oneof(
      fc.record({
        kind: fc.constant('param' as const),
        variant: fc.nat(11),
        name: fc.constantFrom('load_w', 't_amb', 'mains_v', 'r_bleed', 'c_drop', 'steps', 'stage', 'supply'),
        pick: fc.nat(3),
      }),
      fc.record({ kind: fc.constant('formula' as const), check: fc.constantFrom('load_i', 'bleeder_time', 'gate_drive'), pick: fc.nat(2) }),
    );
    const paramValues: Record<string, readonly (number | string)[]> = {
      load_w: [40, 100, 150, 400],
      t_amb: [25, 45, 60, 70],
      mains_v: [230, 120, 240, 100],
      r_bleed: [220e3, 470e3, 1e6, 2.2e6],
      c_drop: [0.22e-6, 0.33e-6, 0.47e-6, 0.68e-6],
      steps: [2, 3, 5, 8],
      stage: ['mosfet', 'triac', 'mosfet', 'capacitor'],
      supply: ['dropper', 'transformer', 'dropper', 'switcher'],
    };
    const formulas: Record<string, readonly string[]> = {
      load_i: ['LOAD_AMPS(load_w, mains_v, pf)', 'load_w / mains_v', '0.5'],
      bleeder_time: ['BLEED_TIME(r_bleed, c_drop * 1.1, MAINS_PEAK(mains_v, mains_tol), 34)', 'r_bleed * c_drop', 'switch_i_max'],
      // bleeder_v_max is read by no built-in check: the session lays the table out again to give it a column.
      gate_drive: ['vcc', 'vcc - 1', 'bleeder_v_max'],
    };
    fc.assert(
      fc.property(fc.array(edit, { minLength: 1, maxLength: 6 }), (edits) => {
        const s = FamilyWorkbook.open(base);
        try {
          s.results();
          for (const e of edits) {
            if (e.kind === 'param') {
              const v = base.variants[e.variant]!;
              expect(s.setParam(v.id, e.name, paramValues[e.name]![e.pick]!)).toEqual({ ok: true });
            } else {
              expect(s.setCheckFormula(`check_${e.check}`, formulas[e.check]![e.pick]!)).toEqual({ ok: true });
            }
          }
          const fresh = FamilyWorkbook.open(s.currentBook());
          try {
            expect(s.results()).toEqual(fresh.results());
            expect(s.resolve()).toEqual(fresh.resolve());
          } finally {
            fresh.close();
          }
        } finally {
          s.close();
        }
      }),
      { numRuns: 25, seed: 16 },
    );
  });
});

describe('build line rules edited in place in the family workbook', () => {
  /** A line's rules edited in place, then everything it answers compared with a family opened afresh. */
  function agreesAfter(book: Book, edit: (line: Book['buildLines'][number]) => Partial<Book['buildLines'][number]>, pick: (book: Book) => Book['buildLines'][number]): boolean {
    const wb = FamilyWorkbook.open(book);
    try {
      wb.results();
      const line = pick(book);
      const next = { ...line, ...edit(line), rev: line.rev + 1 };
      const inPlace = wb.setLineTerms([next]);
      const edited: Book = { ...book, buildLines: book.buildLines.map((l) => (l.id === line.id ? next : l)) };
      // Refused, it changed nothing: it answers as the Book before the edit (the caller lays the table out again).
      const fresh = FamilyWorkbook.open(inPlace ? edited : book);
      try {
        expect(wb.resolve()).toEqual(fresh.resolve());
        expect(wb.results()).toEqual(fresh.results());
      } finally {
        fresh.close();
      }
      return inPlace;
    } finally {
      wb.close();
    }
  }

  /** A line with a role some check reads, so leaving variants out of it changes what the checks judge. */
  const roleLine = (book: Book): Book['buildLines'][number] => {
    const read = new Set(book.checks.flatMap((c) => [c.formula, c.appliesWhen, c.rule.limit ?? '', c.rule.low ?? '', c.rule.high ?? '']).join(' ').match(/[a-z][a-z0-9]*(?=_)/gi) ?? []);
    return book.buildLines.find((l) => l.role && read.has(l.role) && l.appliesWhen.trim() === '' && (l.alternates ?? []).length === 0)!;
  };

  it('takes an applies-when rule, a quantity formula and a part rule as new memos, with the checks judged again as afresh', () => {
    const book = family(24);
    const line = roleLine(book);
    expect(line).toBeDefined();
    // Fewer variants fit the line: its role's values go from the rest, and the checks reading them judge that.
    expect(agreesAfter(book, () => ({ appliesWhen: 'load_w >= 75' }), () => line)).toBe(true);
    expect(agreesAfter(book, () => ({ qtyRule: 'IF(load_w > 60, 2, 1)' }), () => line)).toBe(true);
    // Back to every variant, and a formula that is a constant.
    expect(agreesAfter({ ...book, buildLines: book.buildLines.map((l) => (l.id === line.id ? { ...l, appliesWhen: 'load_w >= 75' } : l)) }, () => ({ appliesWhen: '' }), () => line)).toBe(true);
    const ruled = book.buildLines.find((l) => l.partRule && l.partRule.trim() !== '');
    expect(ruled).toBeDefined();
    expect(agreesAfter(book, (l) => ({ partRule: `IF(load_w > 100, ${JSON.stringify(l.partId ?? '')}, ${l.partRule})` }), () => ruled!)).toBe(true);
  });

  it('takes parameter edits after a rule edit in place as a family opened afresh on both edits', () => {
    const book = family(16);
    const line = roleLine(book);
    const wb = FamilyWorkbook.open(book);
    try {
      const next = { ...line, appliesWhen: 'load_w >= 75', qtyRule: 'IF(load_w > 60, 2, 1)', rev: line.rev + 1 };
      expect(wb.setLineTerms([next])).toBe(true);
      // A variant now in, one now out of the line, by their load.
      const [a, b] = [book.variants[0]!, book.variants[1]!];
      expect(wb.setParam(a.id, 'load_w', 150).ok).toBe(true);
      expect(wb.setParam(b.id, 'load_w', 40).ok).toBe(true);
      const edited: Book = {
        ...book,
        buildLines: book.buildLines.map((l) => (l.id === line.id ? next : l)),
        variants: book.variants.map((v) => (v.id === a.id ? { ...v, params: { ...v.params, load_w: 150 } } : v.id === b.id ? { ...v, params: { ...v.params, load_w: 40 } } : v)),
      };
      const fresh = FamilyWorkbook.open(edited);
      try {
        expect(wb.resolve()).toEqual(fresh.resolve());
        expect(wb.results()).toEqual(fresh.results());
      } finally {
        fresh.close();
      }
    } finally {
      wb.close();
    }
  });

  it('refuses a rule that does not compile and a negative quantity, changing nothing', () => {
    const book = family(12);
    const line = roleLine(book);
    expect(agreesAfter(book, () => ({ appliesWhen: 'load_w >= (' }), () => line)).toBe(false);
    expect(agreesAfter(book, () => ({ qtyRule: '-2' }), () => line)).toBe(false);
  });
});
