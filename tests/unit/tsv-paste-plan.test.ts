// Pasting tab-separated rows into the family grid: cells land from the selected cell, rows past the end become new
// variants, a header row maps columns by name, values are read as the variant form reads them (SI prefixes and RKM
// codes), and a paste with one bad cell is refused whole with the row and column named.
import { describe, expect, it } from 'vitest';
import type { Book, Variant } from '../../src/domain/book.ts';
import { emptyBook } from '../../src/domain/book.ts';
import { parseTsv } from '../../src/domain/tsv.ts';
import { copyCode, duplicateVariants, editVariant, planClear, planPaste } from '../../src/ui/grid-edits.ts';
import type { FamilyColumn, PasteTarget } from '../../src/ui/grid-edits.ts';

function book(): Book {
  const variants: Variant[] = [
    { id: 'v_a', rev: 2, code: 'A-40', name: 'Forty', params: { steps: 3, load_w: 40, stage: 'mosfet', r_top: 10000 } },
    { id: 'v_b', rev: 1, code: 'B-60', name: 'Sixty', params: { steps: 4, load_w: 60, stage: 'triac', r_top: 4700 } },
  ];
  return { ...emptyBook(), variants };
}

const columns: FamilyColumn[] = [
  { key: 'code', kind: 'code' },
  { key: 'name', kind: 'name' },
  { key: 'steps', kind: 'param' },
  { key: 'load_w', kind: 'param' },
  { key: 'stage', kind: 'param' },
  { key: 'r_top', kind: 'param' },
  { key: 'checks', kind: 'computed' },
  { key: 'cost_500', kind: 'computed' },
];

let n = 0;
const ids = (): string => `var_new${++n}`;

function target(b: Book, row: number, col: number, lastRow = row, lastCol = col): PasteTarget {
  return { order: b.variants, columns, row, col, lastRow, lastCol };
}

function tsv(text: string): string[][] {
  const r = parseTsv(text);
  if (!r.ok) throw new Error(r.error);
  return r.rows;
}

describe('editVariant', () => {
  it('reads engineering values with SI prefixes and RKM codes as the form does', () => {
    const b = book();
    // IEC 60062 RKM: 4k7 = 4.7 kΩ; SI prefix k = 10³.
    const r = editVariant(b, b.variants[0], { r_top: '4k7', load_w: '0.075 kW' }, ids);
    expect(r.ok).toBe(true);
    if (r.ok) {
      expect(r.record.params.r_top).toBeCloseTo(4700, 9);
      expect(r.record.params.load_w).toBeCloseTo(75, 9);
      expect(r.record.params.stage).toBe('mosfet');
      expect(r.record.rev).toBe(2);
    }
  });

  it('refuses a code already used, a bad number and a step count out of range, naming the column', () => {
    const b = book();
    expect(editVariant(b, b.variants[0], { code: 'b-60' }, ids)).toMatchObject({ ok: false, key: 'code' });
    expect(editVariant(b, b.variants[0], { load_w: 'lots' }, ids)).toMatchObject({ ok: false, key: 'load_w' });
    expect(editVariant(b, b.variants[0], { steps: '9' }, ids)).toMatchObject({ ok: false, key: 'steps', message: 'A whole number from 1 to 8' });
  });

  it('removes a parameter left blank and names a new variant after its code', () => {
    const b = book();
    const cleared = editVariant(b, b.variants[0], { r_top: '' }, ids);
    expect(cleared.ok && 'r_top' in cleared.record.params).toBe(false);
    const made = editVariant(b, undefined, { code: 'C-75' }, () => 'var_c');
    expect(made).toMatchObject({ ok: true, record: { id: 'var_c', rev: 0, code: 'C-75', name: 'C-75', params: {} } });
    expect(editVariant(b, undefined, { load_w: '75' }, ids)).toMatchObject({ ok: false, key: 'code' });
  });
});

describe('planPaste', () => {
  it('edits existing rows from the selected cell and adds rows past the end, skipping computed columns', () => {
    const b = book();
    // Pasted at row 1, column load_w: B-60's load, stage and r_top change; the status and cost cells are skipped.
    const plan = planPaste(b, target(b, 1, 3), tsv('65\ttriac\t2k2\t✓ pass\t€1.00\r\n'), ids);
    expect(plan.ok).toBe(true);
    if (!plan.ok) return;
    expect(plan.edited).toBe(1);
    expect(plan.created).toBe(0);
    expect(plan.skipped).toEqual(['checks', 'cost_500']);
    expect(plan.changes[0]!.before?.id).toBe('v_b');
    expect(plan.changes[0]!.after.params).toEqual({ steps: 4, load_w: 65, stage: 'triac', r_top: 2200 });
  });

  it('adds three variants pasted from the code column onto the new-row line', () => {
    const b = book();
    const text = 'C-1\tFirst\t3\t40\tmosfet\t10k\r\nC-2\t\t4\t60 W\ttriac\t4k7\r\nC-3\tThird\t5\t75\tmosfet\t1.2e3\r\n';
    const plan = planPaste(b, target(b, 2, 0), tsv(text), ids);
    expect(plan.ok).toBe(true);
    if (!plan.ok) return;
    expect(plan.created).toBe(3);
    expect(plan.changes.map((c) => [c.before, c.after.code, c.after.name, c.after.rev])).toEqual([
      [undefined, 'C-1', 'First', 0],
      [undefined, 'C-2', 'C-2', 0],
      [undefined, 'C-3', 'Third', 0],
    ]);
    // 1.2e3 is 1200 (E notation); 10k is 10 000 (SI prefix k).
    expect(plan.changes.map((c) => c.after.params.r_top)).toEqual([10000, 4700, 1200]);
  });

  it('maps columns by a header row, matching rows to variants by code, and accepts parameters of the Book’s own', () => {
    const b = book();
    const text = 'load_w (W)\tcode\tr_gate\r\n70\tA-40\t100\r\n90\tD-90\t220\r\n';
    const plan = planPaste(b, target(b, 0, 5), tsv(text), ids);
    expect(plan.ok).toBe(true);
    if (!plan.ok) return;
    expect(plan.header).toBe(true);
    expect(plan.edited).toBe(1);
    expect(plan.created).toBe(1);
    const a = plan.changes.find((c) => c.after.code === 'A-40')!.after;
    expect(a.params).toMatchObject({ load_w: 70, r_gate: 100, steps: 3 });
    const d = plan.changes.find((c) => c.after.code === 'D-90')!.after;
    expect(d).toMatchObject({ name: 'D-90', params: { load_w: 90, r_gate: 220 } });
  });

  it('refuses the whole paste at the first bad cell, naming its row and column', () => {
    const b = book();
    const plan = planPaste(b, target(b, 2, 0), tsv('C-1\tOne\t3\r\nC-2\tTwo\t12\r\n'), ids);
    expect(plan).toEqual({ ok: false, message: 'Row 2 of the paste (a new variant), steps: A whole number from 1 to 8. Nothing was pasted.' });
    const dup = planPaste(b, target(b, 2, 0), tsv('C-1\tOne\r\nc-1\tAgain\r\n'), ids);
    expect(dup.ok).toBe(false);
    if (!dup.ok) expect(dup.message).toMatch(/^Row 2 of the paste \(a new variant\), code: The code C-1 is already used/);
    const wide = planPaste(b, target(b, 0, 6), tsv('1\t2\t3\r\n'), ids);
    expect(wide.ok).toBe(false);
    if (!wide.ok) expect(wide.message).toMatch(/3 columns wide but only 2 columns/);
    const noCode = planPaste(b, target(b, 1, 2), tsv('3\r\n4\r\n'), ids);
    expect(noCode.ok).toBe(false);
    if (!noCode.ok) expect(noCode.message).toMatch(/Row 2 of the paste \(a new variant\), code: a new variant needs a code/);
  });

  it('fills a selected block with one copied value', () => {
    const b = book();
    const plan = planPaste(b, target(b, 0, 3, 1, 3), [['50']], ids);
    expect(plan.ok && plan.changes.map((c) => c.after.params.load_w)).toEqual([50, 50]);
  });

  it('takes off the apostrophe our copies put before text that starts like a formula', () => {
    const b = book();
    const plan = planPaste(b, target(b, 0, 1), [["'=not a formula"]], ids);
    expect(plan.ok && plan.changes[0]!.after.name).toBe('=not a formula');
  });
});

describe('planClear, duplicates', () => {
  it('clears parameter cells but refuses to blank a code or a name', () => {
    const b = book();
    const plan = planClear(b, target(b, 0, 4, 1, 5), ids);
    expect(plan.ok && plan.changes.map((c) => Object.keys(c.after.params))).toEqual([
      ['steps', 'load_w'],
      ['steps', 'load_w'],
    ]);
    expect(planClear(b, target(b, 0, 0, 0, 2), ids).ok).toBe(false);
  });

  it('gives copies free codes and marks their names', () => {
    const b = book();
    expect(copyCode(b, 'A-40')).toBe('A-40-copy');
    const copies = duplicateVariants(b, [b.variants[0]!, b.variants[0]!], () => `var_${++n}`);
    expect(copies.map((c) => [c.code, c.name, c.rev])).toEqual([
      ['A-40-copy', 'Forty (copy)', 0],
      ['A-40-copy2', 'Forty (copy)', 0],
    ]);
    expect(copyCode(b, 'X'.repeat(32))).toBe(`${'X'.repeat(27)}-copy`);
  });
});
