// The fields our orders to suppliers print: the ship-to address and our firm on the Settings form, a supplier's
// address and payment terms on the Suppliers form. Good input is kept line for line; bad input is named beside its
// field and nothing is saved.
import { describe, expect, it } from 'vitest';
import { demoBook } from '../../src/domain/demo-book.ts';
import { checkBook } from '../../src/domain/schema.ts';
import { settingsDraft, validateSettings } from '../../src/ui/build-costing.ts';
import { ADDRESS_LINES, supplierDraft, validateSupplier } from '../../src/ui/record-forms.ts';

const ids = (): string => 'sup_new';

describe('ship-to address and our firm on the Settings form', () => {
  it('keeps a multi-line ship-to as lines, trimmed, CRLF made plain, and our firm’s name', () => {
    const book = demoBook();
    const d = { ...settingsDraft(book), company: '  Fennick Works ', shipTo: '\r\n Goods in, dock 2 \r\nUnit 9\rWeir Row\n\n' };
    const r = validateSettings(d, book);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.record.shipTo).toBe('Goods in, dock 2\nUnit 9\nWeir Row');
    expect(r.record.company).toBe('Fennick Works');
    expect(checkBook({ ...book, settings: r.record }).ok).toBe(true);
  });

  it('drops an emptied ship-to', () => {
    const book = demoBook();
    const r = validateSettings({ ...settingsDraft(book), shipTo: ' \n ' }, book);
    expect(r.ok && r.record.shipTo).toBe(undefined);
  });

  it('names a control character, too many lines, too long a text or a two-line firm beside the field and gives no settings', () => {
    const book = demoBook();
    const cases: [Partial<ReturnType<typeof settingsDraft>>, string, RegExp][] = [
      [{ shipTo: 'Goods in\u0007\nUnit 9' }, 'shipTo', /control character \(U\+0007\)/],
      [{ shipTo: Array.from({ length: ADDRESS_LINES + 1 }, (_, i) => `line ${i + 1}`).join('\n') }, 'shipTo', new RegExp(`at most ${ADDRESS_LINES}`)],
      [{ shipTo: 'x'.repeat(501) }, 'shipTo', /Too long: 501 characters; at most 500/],
      [{ company: 'Fennick\nWorks' }, 'company', /one line/],
    ];
    for (const [patch, field, message] of cases) {
      const r = validateSettings({ ...settingsDraft(book), ...patch }, book);
      expect(r.ok).toBe(false);
      if (!r.ok) expect(r.problems[field]).toMatch(message);
    }
  });
});

describe('a supplier’s address and payment terms on the Suppliers form', () => {
  it('keeps them, and keeps them when the supplier is edited for something else', () => {
    const book = demoBook();
    const kelvaro = book.suppliers.find((s) => s.id === 'sup_kelvaro')!;
    const edited = validateSupplier({ ...supplierDraft(book.settings, kelvaro), notes: 'ships from a new warehouse' }, book, kelvaro, ids);
    expect(edited.ok).toBe(true);
    if (!edited.ok) return;
    expect(edited.record.record.address).toBe(kelvaro.address);
    expect(edited.record.record.paymentTerms).toBe(kelvaro.paymentTerms);

    const fresh = validateSupplier({ ...supplierDraft(book.settings), name: 'Weir Row Fixings', address: 'Weir Row Fixings\r\n 3 Weir Row \r\n', paymentTerms: ' 60 days net ' }, book, undefined, ids);
    expect(fresh.ok).toBe(true);
    if (!fresh.ok) return;
    expect(fresh.record.record.address).toBe('Weir Row Fixings\n3 Weir Row');
    expect(fresh.record.record.paymentTerms).toBe('60 days net');
  });

  it('names a bad address or payment terms beside the field and gives no record', () => {
    const book = demoBook();
    const cases: [Partial<ReturnType<typeof supplierDraft>>, string, RegExp][] = [
      [{ address: 'Quay\u0000Street' }, 'address', /control character \(U\+0000\)/],
      [{ address: 'a\n'.repeat(ADDRESS_LINES + 2) }, 'address', /at most/],
      [{ paymentTerms: '30 days\nnet' }, 'paymentTerms', /One line/],
      [{ paymentTerms: 't'.repeat(201) }, 'paymentTerms', /at most 200/],
    ];
    for (const [patch, field, message] of cases) {
      const r = validateSupplier({ ...supplierDraft(book.settings), name: 'Weir Row Fixings', ...patch }, book, undefined, ids);
      expect(r.ok).toBe(false);
      if (!r.ok) expect(r.problems[field]).toMatch(message);
    }
  });
});
