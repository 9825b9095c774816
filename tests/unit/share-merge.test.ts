// Two people's versions of one record of a shared Book merged field by field against the version both started from
// (the three-way merge of version control systems, applied to fields: common practice): one-sided changes merged and
// noted by whom, a field both changed kept for a person with both values, nothing lost.
import { describe, expect, it } from 'vitest';
import { chooseValue, mergeAllVersions, mergeVersions, stillOpen } from '../../src/domain/share-merge.ts';
import type { SharedVersion } from '../../src/domain/share-merge.ts';
import { sampleBook } from '../fixtures/sample-book.ts';

const { rev: _rev, ...quote } = sampleBook().quotes[0]!;
const base: Record<string, unknown> = { ...quote };

function version(record: Record<string, unknown>, by: string, at: string, rev: string): SharedVersion {
  return { record, by, at, rev };
}

describe('merging two versions of a shared record', () => {
  it('takes each field changed on one side only, and says from whom', () => {
    const kept = version({ ...base, moq: 500 }, 'edna', '2026-03-02T10:00:00.000Z', '3-b');
    const other = version({ ...base, leadDays: 42 }, 'bruno', '2026-03-02T09:00:00.000Z', '3-a');
    const r = mergeVersions(base, kept, other);
    expect(r.open).toEqual([]);
    expect(r.record).toEqual({ ...base, moq: 500, leadDays: 42 });
    expect(r.taken).toEqual([
      { path: ['moq'], from: 'edna', at: '2026-03-02T10:00:00.000Z' },
      { path: ['leadDays'], from: 'bruno', at: '2026-03-02T09:00:00.000Z' },
    ]);
  });

  it('keeps a field both changed for a person, with both values, who and when, and still merges the rest', () => {
    const kept = version({ ...base, moq: 222, supplierCode: 'ZX-222' }, 'edna', '2026-03-02T10:00:00.000Z', '3-b');
    const other = version({ ...base, moq: 111, leadDays: 30 }, 'bruno', '2026-03-02T09:30:00.000Z', '3-a');
    const r = mergeVersions(base, kept, other);
    expect(r.record).toEqual({ ...base, moq: 222, supplierCode: 'ZX-222', leadDays: 30 });
    expect(r.open).toEqual([
      {
        path: ['moq'],
        base: base['moq'],
        choices: [
          { value: 222, by: 'edna', at: '2026-03-02T10:00:00.000Z', rev: '3-b' },
          { value: 111, by: 'bruno', at: '2026-03-02T09:30:00.000Z', rev: '3-a' },
        ],
      },
    ]);
    expect(r.taken.map((t) => [t.path.join('.'), t.from])).toEqual([
      ['supplierCode', 'edna'],
      ['leadDays', 'bruno'],
    ]);
    // The person picks the other value: the record takes it, and the field is no longer open at its first value.
    const chosen = chooseValue(r.record, r.open[0]!, 111);
    expect(chosen['moq']).toBe(111);
    expect(stillOpen(r.record, r.open[0]!)).toBe(true);
    expect(stillOpen(chosen, r.open[0]!)).toBe(false);
  });

  it('merges inside a field (different price breaks of one list) and leaves a field both set alike alone', () => {
    const breaks = quote.breaks;
    expect(breaks.length).toBeGreaterThan(1);
    const kept = version({ ...base, breaks: breaks.map((b, i) => (i === 0 ? { ...b, qty: b.qty + 1 } : b)), moq: 7 }, 'edna', 't2', '3-b');
    const other = version({ ...base, breaks: breaks.map((b, i) => (i === 1 ? { ...b, qty: b.qty + 5 } : b)), moq: 7 }, 'bruno', 't1', '3-a');
    const r = mergeVersions(base, kept, other);
    expect(r.open).toEqual([]);
    expect((r.record['breaks'] as typeof breaks).map((b) => b.qty)).toEqual([breaks[0]!.qty + 1, breaks[1]!.qty + 5, ...breaks.slice(2).map((b) => b.qty)]);
    expect(r.taken.map((t) => t.path)).toEqual([['breaks', 0, 'qty'], ['breaks', 1, 'qty']]);
  });

  it('without the version both started from, puts every field the two hold differently before a person', () => {
    const kept = version({ ...base, moq: 5, supplierCode: 'ZX-A' }, 'edna', 't2', '2-b');
    const other = version({ ...base, moq: 6 }, 'bruno', 't1', '2-a');
    const r = mergeVersions(undefined, kept, other);
    expect(r.open.map((f) => [f.path.join('.'), f.base, f.choices.map((c) => c.value)])).toEqual([
      ['supplierCode', undefined, ['ZX-A', quote.supplierCode]],
      ['moq', undefined, [5, 6]],
    ]);
    expect(r.record).toEqual({ ...base, moq: 5, supplierCode: 'ZX-A' });
    expect(r.taken).toEqual([]);
  });

  it('merges three versions in turn', () => {
    const kept = version({ ...base, moq: 1 }, 'edna', 't3', '2-c');
    const r = mergeAllVersions(kept, [
      { version: version({ ...base, leadDays: 9 }, 'bruno', 't1', '2-a'), base },
      { version: version({ ...base, moq: 2 }, 'olive', 't2', '2-b'), base },
    ]);
    expect(r.record).toEqual({ ...base, moq: 1, leadDays: 9 });
    expect(r.open.map((f) => f.choices.map((c) => `${c.by}=${String(c.value)}`))).toEqual([['edna=1', 'olive=2']]);
  });
});
