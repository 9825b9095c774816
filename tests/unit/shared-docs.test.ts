// A Book's records as shared documents and back, without a server: every record of the sample Book (which sets
// every optional field) survives the trip; a document that does not fit the Book schema, names no collection or
// comes from a newer Book format is refused with its place; unchanged records are not sent back.
import { describe, expect, it } from 'vitest';
import { BOOK_VERSION, COLLECTIONS, emptyBook } from '../../src/domain/book.ts';
import type { Book } from '../../src/domain/book.ts';
import { changeForDocs, checkRecordDoc, docsForChange, placeOfDoc, recordDoc } from '../../src/store/shared-docs.ts';
import type { RecordDoc } from '../../src/store/shared-docs.ts';
import { sampleBook } from '../fixtures/sample-book.ts';

const AT = '2026-03-02T10:00:00.000Z';

describe('records as shared documents', () => {
  it('carries every record of the sample Book across and back unchanged, each under collection/id', () => {
    const book = sampleBook();
    const incoming: Parameters<typeof changeForDocs>[1][number][] = [];
    for (const c of COLLECTIONS) {
      for (const r of book[c] as readonly { id: string; rev: number }[]) {
        const doc = recordDoc(c, r, 'edna', AT);
        expect(doc._id).toBe(`${c}/${r.id}`);
        expect(doc.record).not.toHaveProperty('rev');
        const checked = checkRecordDoc(JSON.parse(JSON.stringify(doc)));
        expect(checked.ok, JSON.stringify(checked)).toBe(true);
        if (checked.ok) incoming.push({ deleted: false, checked });
      }
    }
    const settings = checkRecordDoc(recordDoc('settings', book.settings, 'edna', AT));
    expect(settings.ok).toBe(true);
    if (settings.ok) incoming.push({ deleted: false, checked: settings });
    // Into an empty Book: every record is new (rev 0), the settings keep the Book's own revision.
    const empty = emptyBook();
    const change = changeForDocs(empty, incoming)!;
    for (const c of COLLECTIONS) {
      expect((change.put?.[c] ?? []).map((r) => r.id)).toEqual(book[c].map((r) => r.id));
      for (const r of change.put?.[c] ?? []) expect(r.rev).toBe(0);
    }
    expect(change.settings).toEqual({ ...book.settings, rev: empty.settings.rev });
    // Into the Book they came from: nothing differs, nothing to save.
    expect(changeForDocs(book, incoming)).toBeUndefined();
  });

  it('refuses a document that does not fit, naming the document and the field', () => {
    const q = sampleBook().quotes[0]!;
    const doc = recordDoc('quotes', q, 'edna', AT);
    expect(checkRecordDoc({ ...doc, record: { ...doc.record, moq: -5 } })).toMatchObject({ ok: false, problems: [{ place: `quotes/${q.id} moq` }] });
    expect(checkRecordDoc({ ...doc, record: { ...doc.record, id: 'other' } })).toMatchObject({ ok: false, problems: [{ place: `quotes/${q.id} record.id` }] });
    expect(checkRecordDoc({ ...doc, _id: 'widgets/x' })).toMatchObject({ ok: false, problems: [{ place: 'widgets/x', message: expect.stringMatching(/not a record of a Book/) }] });
    expect(checkRecordDoc({ ...doc, bookVersion: BOOK_VERSION + 1 })).toMatchObject({ ok: false, problems: [{ message: expect.stringMatching(/newer Rungbook/) }] });
    expect(checkRecordDoc({ ...doc, record: 'text' })).toMatchObject({ ok: false, problems: [{ place: `quotes/${q.id} record` }] });
    expect(placeOfDoc('merges/quotes/q1')).toBeUndefined();
    expect(placeOfDoc('quotes/a/b')).toEqual({ collection: 'quotes', id: 'a/b' });
  });

  it('sends only records that changed, on the revision the shared copy holds, and deletes only what it holds', () => {
    const book: Book = sampleBook();
    const [q1, q2] = book.quotes;
    const held = new Map<string, RecordDoc>([
      [`quotes/${q1!.id}`, { ...recordDoc('quotes', q1!, 'olive', AT), _rev: '3-a' }],
      [`quotes/${q2!.id}`, { ...recordDoc('quotes', q2!, 'olive', AT), _rev: '1-b' }],
    ]);
    const docs = docsForChange(
      [
        { collection: 'quotes', record: q1! },
        { collection: 'quotes', record: { ...q2!, moq: 999 } },
      ],
      [
        { collection: 'quotes', id: q1!.id },
        { collection: 'parts', id: 'never-shared' },
      ],
      held,
      'edna',
      AT,
    );
    expect(docs.map((d) => [d._id, d._rev, d._deleted ?? false, d.by])).toEqual([
      [`quotes/${q2!.id}`, '1-b', false, 'edna'],
      [`quotes/${q1!.id}`, '3-a', true, 'edna'],
    ]);
    expect(docs[0]!.record['moq']).toBe(999);
  });
});
