// The Build page's approved alternates, as a draft: approving a part of the Book, ranking, pinning, and every bad
// input refused with its reason beside the field and nothing changed.
import { describe, expect, it } from 'vitest';
import { sampleBook } from '../fixtures/sample-book.ts';
import { alternateProblem, buildLineDraft, validateBuildLine } from '../../src/ui/build-rules.ts';

const book = sampleBook();
const line1 = book.buildLines.find((l) => l.id === 'line_1')!;
const line2 = book.buildLines.find((l) => l.id === 'line_2')!;

describe('approved alternates on the Build page form', () => {
  it('reads a line with alternates and a pinned part back into the same line', () => {
    const d = buildLineDraft(book, line1);
    expect(d.alternates).toEqual(['LP-47K-0603']);
    expect(d.pinnedPart).toBe('KT-R0603-473');
    const v = validateBuildLine(d, book, line1, () => 'unused');
    expect(v.ok && v.record).toMatchObject({ partId: 'part_r47k', alternates: ['part_zr47k'], pinnedPartId: 'part_r47k' });
  });

  it('refuses an alternate on a rule line, the own part, a repeat, an unknown part, and an empty entry', () => {
    const d = { ...buildLineDraft(book, line1), alternates: [] };
    expect(alternateProblem('lp-47k-0603', d, book)).toBeUndefined();
    expect(alternateProblem('KT-R0603-473', d, book)).toBe("KT-R0603-473 is the line's own part; an alternate is another part");
    expect(alternateProblem('LP-47K-0603', { ...d, alternates: ['LP-47K-0603'] }, book)).toBe('LP-47K-0603 is approved on this line already');
    expect(alternateProblem('NO-SUCH-PART', d, book)).toBe('no part NO-SUCH-PART in the Book; add it on the Parts page first');
    expect(alternateProblem('  ', d, book)).toBe('type the maker part number of a part of the Book to approve');
    const rule = buildLineDraft(book, line2);
    expect(rule.partRule).not.toBe('');
    expect(alternateProblem('LP-47K-0603', rule, book)).toMatch(/^a line whose part rule picks the part has no approved alternates/);
  });

  it('saves nothing when the draft holds a bad alternate or pins a part that is not approved', () => {
    const d = buildLineDraft(book, line1);
    const repeat = validateBuildLine({ ...d, alternates: ['LP-47K-0603', 'lp-47k-0603'] }, book, line1, () => 'x');
    expect(repeat).toEqual({ ok: false, problems: { alternates: 'LP-47K-0603 is approved on this line already' } });
    const own = validateBuildLine({ ...d, alternates: ['KT-R0603-473'], pinnedPart: '' }, book, line1, () => 'x');
    expect(!own.ok && own.problems['alternates']).toMatch(/the line's own part/);
    const pin = validateBuildLine({ ...d, alternates: [], pinnedPart: 'LP-47K-0603' }, book, line1, () => 'x');
    expect(pin).toEqual({ ok: false, problems: { pinnedPart: "LP-47K-0603 is not approved on this line: pin the line's part or one of its alternates" } });
    const onRule = validateBuildLine({ ...buildLineDraft(book, line2), alternates: ['LP-47K-0603'] }, book, line2, () => 'x');
    expect(!onRule.ok && Object.keys(onRule.problems)).toEqual(['alternates']);
  });

  it('keeps the rank as ordered and drops the fields when nothing is approved', () => {
    const d = buildLineDraft(book, line1);
    const none = validateBuildLine({ ...d, alternates: [], pinnedPart: '' }, book, line1, () => 'x');
    expect(none.ok && 'alternates' in none.record).toBe(false);
    expect(none.ok && 'pinnedPartId' in none.record).toBe(false);
  });
});
