// The Save of every record form (form-fields.ts saveRecordForm): a record deleted elsewhere is not saved again,
// problems stay beside their fields with nothing saved, a refused save keeps the form open with why, and a good save
// closes the form and gives the record back. A row's delete (deleteFromRow) is refused while records use the record,
// and says why the Book refused it.
import { describe, expect, it } from 'vitest';
import { demoBook } from '../../src/domain/demo-book.ts';
import type { BookChange } from '../../src/domain/book-ops.ts';
import type { SaveResult } from '../../src/ui/book-service.ts';
import { deleteFromRow, saveRecordForm } from '../../src/ui/form-fields.ts';
import { partUsers } from '../../src/ui/record-forms.ts';
import type { RecordFormState } from '../../src/ui/form-fields.ts';

interface Form extends RecordFormState {
  draft: { name: string };
}

const host = { updateComplete: Promise.resolve(true), renderRoot: { querySelector: () => null } as unknown as HTMLElement };

function service(answer: SaveResult): { saved: BookChange[]; save(change: BookChange): Promise<SaveResult> } {
  const saved: BookChange[] = [];
  return { saved, save: (change) => (saved.push(change), Promise.resolve(answer)) };
}

const part = { id: 'part_1', rev: 0, mpn: 'KT-1', maker: 'Invented Test Works', description: 'test part', kind: 'resistor' as const, ratings: {}, package: '0603' };

describe('a record form’s Save', () => {
  const form: Form = { draft: { name: 'KT-1' }, problems: {} };

  it('does not save a record deleted elsewhere, and says so', async () => {
    const s = service({ ok: true });
    const states: (Form | undefined)[] = [];
    const saved = await saveRecordForm(host, s, form, { goneNoun: 'part', validate: () => ({ ok: true, record: part }), change: (r) => ({ put: { parts: [r] } }), set: (n) => states.push(n) });
    expect(saved).toBeUndefined();
    expect(s.saved).toEqual([]);
    expect(states.at(-1)).toMatchObject({ saveError: 'This part was deleted elsewhere; nothing was saved.' });
  });

  it('keeps problems beside their fields and saves nothing', async () => {
    const s = service({ ok: true });
    const states: (Form | undefined)[] = [];
    const saved = await saveRecordForm(host, s, form, { goneNoun: undefined, validate: () => ({ ok: false, problems: { mpn: 'must not be empty' } }), change: (r: typeof part) => ({ put: { parts: [r] } }), set: (n) => states.push(n) });
    expect(saved).toBeUndefined();
    expect(s.saved).toEqual([]);
    expect(states.at(-1)).toMatchObject({ problems: { mpn: 'must not be empty' } });
  });

  it('keeps the form open with the Book’s reason when the save is refused', async () => {
    const s = service({ ok: false, message: 'Not saved: changed in another tab.', conflict: true });
    const states: (Form | undefined)[] = [];
    const saved = await saveRecordForm(host, s, form, { goneNoun: undefined, validate: () => ({ ok: true, record: part }), change: (r) => ({ put: { parts: [r] } }), set: (n) => states.push(n) });
    expect(saved).toBeUndefined();
    expect(s.saved).toEqual([{ put: { parts: [part] } }]);
    expect(states.at(-1)).toMatchObject({ problems: {}, saveError: 'Not saved: changed in another tab.', conflict: true });
  });

  it('closes the form and gives the record saved', async () => {
    const s = service({ ok: true });
    const states: (Form | undefined)[] = [];
    const saved = await saveRecordForm(host, s, form, { goneNoun: undefined, validate: () => ({ ok: true, record: part }), change: (r) => ({ put: { parts: [r] } }), set: (n) => states.push(n) });
    expect(saved).toBe(part);
    expect(s.saved).toEqual([{ put: { parts: [part] } }]);
    expect(states.at(-1)).toBeUndefined();
  });
});

describe('a record row’s delete', () => {
  const book = demoBook();
  const quoted = book.parts.find((p) => book.quotes.some((q) => q.partId === p.id))!;

  it('deletes nothing while records use the record, and says which', async () => {
    const s = { book, ...service({ ok: true }) };
    const problem = await deleteFromRow(s, { delete: { parts: [quoted.id] } }, (b) => partUsers(b, quoted.id));
    expect(problem).toMatch(/^Still used by \d+ quotes?/);
    expect(s.saved).toEqual([]);
  });

  it('says why the Book refused the save', async () => {
    const s = { book, ...service({ ok: false, message: 'Not saved: changed in another tab.', conflict: true }) };
    expect(await deleteFromRow(s, { delete: { priceLists: ['pl_1'] } })).toBe('Not saved: changed in another tab.');
    expect(s.saved).toEqual([{ delete: { priceLists: ['pl_1'] } }]);
  });

  it('gives no problem once deleted', async () => {
    const s = { book, ...service({ ok: true }) };
    expect(await deleteFromRow(s, { delete: { parts: ['part_unused'] } }, (b) => partUsers(b, 'part_unused'))).toBeUndefined();
    expect(s.saved).toEqual([{ delete: { parts: ['part_unused'] } }]);
  });
});
