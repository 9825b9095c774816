// The three-way merge of one record (common practice in version control, applied field by field): a field one side
// changed takes that side's value, a field both changed differently is a conflict named by its path, and the
// revision is never merged but taken from the stored record.
import { describe, expect, it } from 'vitest';
import { mergeRecord, sameValue } from '../../src/domain/merge.ts';

interface Page {
  id: string;
  rev: number;
  title: string;
  sections: { heading: string; text: string; grid: string[][] }[];
}

const base: Page = {
  id: 'p1',
  rev: 3,
  title: 'Snubber',
  sections: [
    { heading: 'Notes', text: 'first', grid: [] },
    { heading: 'Calculation', text: '', grid: [['1', '2'], ['3', '4']] },
  ],
};

function edit(p: Page, f: (copy: Page) => void): Page {
  const copy = structuredClone(p);
  f(copy);
  return copy;
}

describe('three-way merge of a record', () => {
  it('keeps both edits when each side changed a different field of the same section', () => {
    const theirs = edit(base, (p) => {
      p.rev = 4;
      p.sections[0]!.heading = 'Their heading';
    });
    const mine = edit(base, (p) => (p.sections[0]!.text = 'my text'));
    const r = mergeRecord(base, mine, theirs);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.merged.sections[0]).toEqual({ heading: 'Their heading', text: 'my text', grid: [] });
    expect(r.merged.rev).toBe(4);
    expect(r.mine).toEqual([['sections', 0, 'text']]);
    expect(r.theirs).toEqual([['sections', 0, 'heading']]);
  });

  it('merges grid cells one by one', () => {
    const theirs = edit(base, (p) => (p.sections[1]!.grid[0]![0] = '=A2*2'));
    const mine = edit(base, (p) => (p.sections[1]!.grid[1]![1] = '40'));
    const r = mergeRecord(base, mine, theirs);
    expect(r.ok && r.merged.sections[1]!.grid).toEqual([['=A2*2', '2'], ['3', '40']]);
  });

  it('refuses, naming the field and both values, when both sides changed the same field differently', () => {
    const theirs = edit(base, (p) => (p.sections[1]!.grid[0]![1] = '5'));
    const mine = edit(base, (p) => {
      p.sections[1]!.grid[0]![1] = '7';
      p.title = 'Mine';
    });
    const r = mergeRecord(base, mine, theirs);
    expect(r).toEqual({ ok: false, conflicts: [{ path: ['sections', 1, 'grid', 0, 1], base: '2', mine: '7', theirs: '5' }] });
  });

  it('takes a change both sides made alike without a conflict', () => {
    const both = edit(base, (p) => (p.title = 'Same'));
    const r = mergeRecord(base, both, { ...both, rev: 9 });
    expect(r.ok && r.merged).toEqual({ ...both, rev: 9 });
  });

  it('treats a list that changed length on both sides as one field', () => {
    const theirs = edit(base, (p) => p.sections[1]!.grid.push(['', '']));
    const mine = edit(base, (p) => (p.sections[1]!.grid[0]![0] = 'x'));
    const r = mergeRecord(base, mine, theirs);
    expect(!r.ok && r.conflicts.map((c) => c.path)).toEqual([['sections', 1, 'grid']]);
    // A length change on one side only is that side's change.
    const only = mergeRecord(base, base, theirs);
    expect(only.ok && only.merged.sections[1]!.grid.length).toBe(3);
  });

  it('merges keyed parameters: added, removed and edited on different keys', () => {
    type V = { id: string; rev: number; params: Record<string, number | string> };
    const b: V = { id: 'v', rev: 1, params: { load_w: 40, vf: 3, r1: 4700 } };
    const theirs: V = { id: 'v', rev: 2, params: { load_w: 60, vf: 3, r1: 4700, c1: 1e-7 } };
    const mine: V = { id: 'v', rev: 1, params: { load_w: 40, vf: 3 } };
    const r = mergeRecord(b, mine, theirs);
    expect(r.ok && r.merged).toEqual({ id: 'v', rev: 2, params: { load_w: 60, vf: 3, c1: 1e-7 } });
    expect(r.ok && r.mine).toEqual([['params', 'r1']]);
    expect(r.ok && r.theirs).toEqual([['params', 'load_w'], ['params', 'c1']]);
    // Changes made on one side only are named field by field, not as the whole object that holds them.
    const oneSide = mergeRecord(b, { ...b, params: { ...b.params, vf: 4 } }, { ...b, rev: 2, name: 'x' } as V);
    expect(oneSide.ok && oneSide.mine).toEqual([['params', 'vf']]);
    expect(oneSide.ok && oneSide.theirs).toEqual([['name']]);
    const clash = mergeRecord(b, { ...mine, params: { ...b.params, vf: 7 } }, { ...theirs, params: { ...b.params, vf: 5 } });
    expect(clash).toEqual({ ok: false, conflicts: [{ path: ['params', 'vf'], base: 3, mine: 7, theirs: 5 }] });
  });

  it('reports a field removed on one side and changed on the other as a conflict', () => {
    const b = { id: 'x', rev: 1, notes: 'a' };
    const r = mergeRecord<{ id: string; rev: number; notes?: string }>(b, { id: 'x', rev: 1 }, { ...b, rev: 2, notes: 'b' });
    expect(r).toEqual({ ok: false, conflicts: [{ path: ['notes'], base: 'a', mine: undefined, theirs: 'b' }] });
  });

  it('compares objects whatever their key order', () => {
    expect(sameValue({ a: 1, b: [1, { c: 2 }] }, { b: [1, { c: 2 }], a: 1 })).toBe(true);
    expect(sameValue({ a: 1 }, { a: 1, b: undefined })).toBe(true);
    expect(sameValue([1, 2], [2, 1])).toBe(false);
  });
});
