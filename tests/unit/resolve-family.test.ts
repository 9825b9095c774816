// Build-line resolution per variant: applies-when, quantity and part rules, role names, and clear problems.
import { describe, expect, it } from 'vitest';
import { emptyBook } from '../../src/domain/book.ts';
import type { Book, BuildLine, Part, Variant } from '../../src/domain/book.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { resolveFamily } from '../../src/engine/family.ts';
import type { VariantResolution } from '../../src/engine/family.ts';

function part(id: string, mpn: string, ratings: Record<string, number>, value?: number): Part {
  const p: Part = { id, rev: 1, mpn, maker: 'Test Works', description: id, kind: 'mosfet', ratings, package: 'TO-220' };
  if (value !== undefined) p.value = value;
  return p;
}

function line(id: string, position: number, extra: Partial<BuildLine>): BuildLine {
  return { id, rev: 1, position, designators: id.toUpperCase(), qtyRule: '1', appliesWhen: '', category: 'power', ...extra };
}

function variant(id: string, code: string, params: Variant['params']): Variant {
  return { id, rev: 1, code, name: code, params };
}

function smallBook(): Book {
  return {
    ...emptyBook(),
    parts: [
      part('p_small', 'TW-SW-2A', { i_max: 2, v_max: 600 }),
      part('p_big', 'TW-SW-6A', { i_max: 6, v_max: 800 }),
      part('p_r', 'TW-R-10K', { p_max: 0.1 }, 10000),
    ],
    variants: [
      variant('v1', 'A-40', { load_w: 40, steps: 3, stage: 'mosfet' }),
      variant('v2', 'B-150', { load_w: 150, steps: 5, stage: 'triac' }),
    ],
    buildLines: [
      line('sw', 1, { role: 'switch', partRule: 'IF(load_w>100, "TW-SW-6A", "tw sw 2a")' }),
      line('steps_r', 2, { partId: 'p_r', qtyRule: 'steps - 1', role: 'step' }),
      line('snub', 3, { partId: 'p_r', appliesWhen: 'stage="mosfet"' }),
    ],
  };
}

function byCode(res: { variants: VariantResolution[] }, code: string): VariantResolution {
  return res.variants.find((v) => v.variantCode === code)!;
}

describe('resolveFamily', () => {
  it('evaluates quantity, applies-when and part rules per variant', () => {
    const res = resolveFamily(smallBook());
    expect(res.problems).toEqual([]);
    expect(byCode(res, 'A-40').lines).toEqual([
      // Part numbers match ignoring case, spaces and dashes ("tw sw 2a" is TW-SW-2A).
      { lineId: 'sw', partId: 'p_small', qtyPerUnit: 1, applies: true },
      // steps − 1 with steps = 3.
      { lineId: 'steps_r', partId: 'p_r', qtyPerUnit: 2, applies: true },
      { lineId: 'snub', partId: 'p_r', qtyPerUnit: 1, applies: true },
    ]);
    expect(byCode(res, 'B-150').lines).toEqual([
      { lineId: 'sw', partId: 'p_big', qtyPerUnit: 1, applies: true },
      { lineId: 'steps_r', partId: 'p_r', qtyPerUnit: 4, applies: true },
      // Text parameters compare in applies-when rules: stage="mosfet" is false for the triac variant.
      { lineId: 'snub', partId: 'p_r', qtyPerUnit: 0, applies: false },
    ]);
  });

  it('names the resolved part ratings and value by role', () => {
    const res = resolveFamily(smallBook());
    expect(byCode(res, 'A-40').roleNames).toEqual({ switch_i_max: 2, switch_v_max: 600, step_p_max: 0.1, step_value: 10000 });
    expect(byCode(res, 'B-150').roleNames.switch_i_max).toBe(6);
  });

  it('lists an unknown part number, a negative quantity and an unknown name as problems', () => {
    const book = smallBook();
    book.buildLines = [
      line('sw', 1, { partRule: '"TW-NOPE"' }),
      line('neg', 2, { partId: 'p_r', qtyRule: '2 - steps' }),
      line('odd', 3, { partId: 'p_r', qtyRule: 'legs * 2' }),
      line('gone', 4, { partId: 'p_missing' }),
    ];
    book.variants = [book.variants[0]!];
    const res = resolveFamily(book);
    expect(res.problems.map((p) => [p.lineId, p.message])).toEqual([
      ['sw', 'unknown part number TW-NOPE'],
      ['neg', 'quantity per unit is negative (-1)'],
      ['odd', expect.stringMatching(/^quantity rule: unknown name legs/)],
      ['gone', 'part p_missing is not in the Book'],
    ]);
    const lines = res.variants[0]!.lines;
    expect(lines[0]).toEqual({ lineId: 'sw', qtyPerUnit: 1, applies: true, error: 'unknown part number TW-NOPE' });
    expect(lines[1]!.qtyPerUnit).toBe(0);
  });

  it('does not complain about rules of lines that do not apply', () => {
    const book = smallBook();
    // Only the mosfet variant has r_snub; the triac variant's line does not apply, so its rule is never a problem.
    book.variants[0]!.params.r_snub = 10000;
    book.buildLines.push(line('snub2', 4, { appliesWhen: 'stage="mosfet"', partRule: 'IF(r_snub=10000, "TW-R-10K", "")' }));
    const res = resolveFamily(book);
    expect(res.problems).toEqual([]);
    expect(byCode(res, 'A-40').lines[3]).toEqual({ lineId: 'snub2', partId: 'p_r', qtyPerUnit: 1, applies: true });
  });

  it('reports a second line with the same role instead of silently overriding the first', () => {
    const book = smallBook();
    book.buildLines.push(line('sw2', 5, { role: 'switch', partId: 'p_big' }));
    const res = resolveFamily(book);
    expect(res.problems.filter((p) => p.variantCode === 'A-40').map((p) => p.message)).toEqual([
      'role switch is already given by line SW; this line\'s part is not read by checks',
    ]);
    expect(byCode(res, 'A-40').roleNames.switch_i_max).toBe(2);
  });

  it('resolves every demo build line without a problem and picks parts by the variant', () => {
    const book = demoBook();
    const res = resolveFamily(book);
    expect(res.problems).toEqual([]);
    const mpn = (code: string, lineId: string): string | undefined => {
      const l = byCode(res, code).lines.find((x) => x.lineId === lineId)!;
      return book.parts.find((p) => p.id === l.partId)?.mpn;
    };
    // Demo rule: IF(load_w>100, "QX-N8006", IF(mains_v>200, "QX-N8003", IF(load_w>60, "QX-N6004", "QX-N6002"))).
    expect(mpn('FR3-40-CD', 'line_mosfet')).toBe('QX-N8003');
    expect(mpn('FR3-60-CD-U', 'line_mosfet')).toBe('QX-N6002');
    expect(mpn('FR6-75-CD-U', 'line_mosfet')).toBe('QX-N6004');
    expect(mpn('FR5-150-RT', 'line_mosfet')).toBe('QX-N8006');
    // Steering diodes: qtyRule "steps".
    expect(byCode(res, 'FR6-100-CD').lines.find((l) => l.lineId === 'line_steering')!.qtyPerUnit).toBe(6);
    // The triac variant has neither MOSFET nor bridge.
    expect(byCode(res, 'FR4-100-MT-U').lines.find((l) => l.lineId === 'line_mosfet')!.applies).toBe(false);
  });

  it('works on an empty Book', () => {
    expect(resolveFamily(emptyBook())).toEqual({ variants: [], problems: [] });
  });
});
