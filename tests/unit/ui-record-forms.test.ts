// The rules behind the Parts, Suppliers and Family forms: required fields, uniqueness, engineering values with
// units, currency codes with rates, and deletes refused while other records still refer to the one deleted.
import { describe, expect, it } from 'vitest';
import { emptyBook } from '../../src/domain/book.ts';
import type { Book, Part, Supplier, Variant } from '../../src/domain/book.ts';
import {
  partDraft,
  partUsers,
  readNumber,
  supplierDraft,
  supplierUsers,
  validatePart,
  validateSupplier,
  validateVariant,
  valueText,
  variantDraft,
  variantUsers,
} from '../../src/ui/record-forms.ts';

function book(): Book {
  const b = emptyBook();
  const part: Part = {
    id: 'part_a',
    rev: 3,
    mpn: 'QX-100-4K7',
    maker: 'Invented Ohmworks',
    description: 'resistor 4.7 kΩ 0.25 W',
    kind: 'resistor',
    value: 4700,
    unit: 'Ω',
    ratings: { p_max: 0.25, custom_rating: 7 },
    package: 'axial',
  };
  const supplier: Supplier = { id: 'sup_a', rev: 1, name: 'Harbour Components', currency: 'USD', notes: '' };
  const variant: Variant = { id: 'var_a', rev: 2, code: 'FR3-60', name: 'Three-step 60 W', params: { steps: 3, mains_v: 230 } };
  b.parts.push(part);
  b.suppliers.push(supplier);
  b.variants.push(variant);
  b.settings.rates = { EUR: 1, USD: 0.9 };
  return b;
}

let n = 0;
const ids = () => `new_${++n}`;

describe('part form', () => {
  it('names every missing required field and builds no record', () => {
    const r = validatePart(partDraft(), book(), undefined, ids);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(Object.keys(r.problems).sort()).toEqual(['description', 'kind', 'maker', 'mpn']);
    expect(r.problems.mpn).toMatch(/required/);
  });

  it('refuses a maker part number already in the Book, ignoring case, spaces and dashes', () => {
    const d = { ...partDraft(), mpn: 'qx 100 4k7', maker: 'M', description: 'd', kind: 'resistor' };
    const r = validatePart(d, book(), undefined, ids);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.problems.mpn).toMatch(/QX-100-4K7 is already in the Book/);
  });

  it('lets a part keep its own part number when edited', () => {
    const b = book();
    const d = { ...partDraft(b.parts[0]), description: 'changed' };
    const r = validatePart(d, b, b.parts[0], ids);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.record.id).toBe('part_a');
    expect(r.record.rev).toBe(3); // the revision it was read at; the store raises it
    expect(r.record.description).toBe('changed');
    // A rating outside our list survives the edit.
    expect(r.record.ratings.custom_rating).toBe(7);
  });

  it('reads an RKM code as the value of a resistor', () => {
    // IEC 60062 RKM code: "4K7" = 4.7 kΩ (IEC 60062).
    const d = { ...partDraft(), mpn: 'R-NEW', maker: 'M', description: 'd', kind: 'resistor', value: '4k7' };
    const r = validatePart(d, book(), undefined, ids);
    expect(r.ok).toBe(true);
    if (r.ok) {
      expect(r.record.value).toBe(4700);
      expect(r.record.unit).toBe('Ω');
      expect(r.record.rev).toBe(0); // a new record starts at revision 0
    }
  });

  it('takes the capacitor unit for a bare prefixed value', () => {
    // SI prefix n = 10^-9 (SI Brochure, 9th edition, table 7): 330n on a capacitor is 330 × 10^-9 F.
    const d = { ...partDraft(), mpn: 'C-NEW', maker: 'M', description: 'd', kind: 'capacitor', value: '330n' };
    const r = validatePart(d, book(), undefined, ids);
    expect(r.ok).toBe(true);
    if (r.ok) {
      expect(r.record.value).toBeCloseTo(330e-9, 18);
      expect(r.record.unit).toBe('F');
    }
  });

  it('refuses a value in the wrong unit for the kind, beside the value field', () => {
    const d = { ...partDraft(), mpn: 'C-NEW', maker: 'M', description: 'd', kind: 'capacitor', value: '10 V' };
    const r = validatePart(d, book(), undefined, ids);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.problems.value).toMatch(/in V but F was expected/);
  });

  it('asks for a unit where the kind has none of its own', () => {
    const d = { ...partDraft(), mpn: 'Q-NEW', maker: 'M', description: 'd', kind: 'mosfet', value: '600' };
    const r = validatePart(d, book(), undefined, ids);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.problems.value).toMatch(/unit/);
  });

  it('reads ratings in their units and marks an unreadable one by its name', () => {
    // 600 V and 250 mW: SI prefix m = 10^-3 (SI Brochure, table 7); 5 % = 0.05 (definition of per cent).
    const d = {
      ...partDraft(),
      mpn: 'Q-NEW',
      maker: 'M',
      description: 'd',
      kind: 'mosfet',
      ratings: { ...partDraft().ratings, v_max: '600 V', p_max: '250 mW', tol: '5 %', i_max: 'lots' },
    };
    const bad = validatePart(d, book(), undefined, ids);
    expect(bad.ok).toBe(false);
    if (!bad.ok) expect(Object.keys(bad.problems)).toEqual(['rating:i_max']);
    const good = validatePart({ ...d, ratings: { ...d.ratings, i_max: '2 A' } }, book(), undefined, ids);
    expect(good.ok).toBe(true);
    if (good.ok) {
      expect(good.record.ratings).toEqual({ v_max: 600, p_max: 0.25, tol: 0.05, i_max: 2 });
    }
  });

  it('wants placements as a whole number', () => {
    const d = { ...partDraft(), mpn: 'X', maker: 'M', description: 'd', kind: 'other', placements: '1.5' };
    const r = validatePart(d, book(), undefined, ids);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.problems.placements).toMatch(/whole number/);
  });

  it('shows a stored value back in engineering notation that reads back to the same number', () => {
    // 0.47 µF written in engineering notation is 470 nF (SI prefixes, SI Brochure table 7).
    expect(valueText(0.47e-6, 'F')).toBe('470 nF');
    const back = readNumber(valueText(0.47e-6, 'F'), 'F');
    expect(back.ok && back.value).toBeCloseTo(0.47e-6, 18);
    expect(valueText(0.1, '')).toBe('0.1');
  });
});

describe('supplier form', () => {
  it('requires a name that is not already used, ignoring case', () => {
    const b = book();
    const r = validateSupplier({ ...supplierDraft(b.settings), name: ' harbour components ' }, b, undefined, ids);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.problems.name).toMatch(/already in the Book/);
    const empty = validateSupplier(supplierDraft(b.settings), b, undefined, ids);
    expect(!empty.ok && empty.problems.name).toMatch(/required/);
  });

  it('wants a three-letter currency code', () => {
    // ISO 4217 alphabetic codes are three letters.
    const b = book();
    const r = validateSupplier({ ...supplierDraft(b.settings), name: 'New', currency: 'EURO', rate: '1', notes: '' }, b, undefined, ids);
    expect(!r.ok && r.problems.currency).toMatch(/Three letters/);
  });

  it('needs a positive rate for a currency other than the Book’s own and stores it in the settings', () => {
    const b = book();
    const missing = validateSupplier({ ...supplierDraft(b.settings), name: 'New', currency: 'gbp', rate: '', notes: '' }, b, undefined, ids);
    expect(!missing.ok && missing.problems.rate).toMatch(/how many EUR one GBP/);
    const negative = validateSupplier({ ...supplierDraft(b.settings), name: 'New', currency: 'GBP', rate: '-2', notes: '' }, b, undefined, ids);
    expect(!negative.ok && negative.problems.rate).toMatch(/positive/);
    const r = validateSupplier({ ...supplierDraft(b.settings), name: 'New', currency: 'gbp', rate: '1.17', notes: '' }, b, undefined, ids);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.record.record.currency).toBe('GBP');
    expect(r.record.settings?.rates).toEqual({ EUR: 1, USD: 0.9, GBP: 1.17 });
    expect(r.record.settings?.rev).toBe(b.settings.rev);
  });

  it('leaves the settings alone when the rate is unchanged or the currency is the Book’s own', () => {
    const b = book();
    const same = validateSupplier({ ...supplierDraft(b.settings), name: 'New', currency: 'USD', rate: '0.9', notes: '' }, b, undefined, ids);
    expect(same.ok && same.record.settings).toBeUndefined();
    const base = validateSupplier({ ...supplierDraft(b.settings), name: 'New', currency: 'EUR', rate: '', notes: '' }, b, undefined, ids);
    expect(base.ok && base.record.settings).toBeUndefined();
  });
});

describe('supplier form: landed terms', () => {
  it('keeps amounts per order with their currency and the percentages, and leaves empty fields out', () => {
    const b = book();
    const d = { ...supplierDraft(b.settings), name: 'New', currency: 'USD', rate: '0.9' };
    const r = validateSupplier({ ...d, freightPerOrder: '40', freightPct: '2,5 %', dutyPct: '3.5', chargesPerOrder: '15', chargesCurrency: 'eur', chargesPct: '' }, b, undefined, ids);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    const s = r.record.record;
    // The freight's currency defaults to the supplier's, the charges' to the Book's own.
    expect([s.freightPerOrder, s.freightPct, s.dutyPct, s.chargesPerOrder, s.chargesPct]).toEqual([
      { amount: 40, currency: 'USD' },
      2.5,
      3.5,
      { amount: 15, currency: 'EUR' },
      undefined,
    ]);
    // Back into a draft and saved again, the same terms.
    const again = validateSupplier(supplierDraft(b.settings, s), b, s, ids);
    expect(again.ok && again.record.record).toEqual(s);
    const plain = validateSupplier(d, b, undefined, ids);
    expect(plain.ok && 'freightPct' in plain.record.record).toBe(false);
  });

  it('names a bad amount, an unrated currency and a share out of bounds beside its field, and saves nothing', () => {
    const b = book();
    const d = { ...supplierDraft(b.settings), name: 'New', currency: 'EUR' };
    const r = validateSupplier({ ...d, freightPerOrder: 'ten', chargesPerOrder: '5', chargesCurrency: 'CHF', dutyPct: '2000', freightPct: '-1' }, b, undefined, ids);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.problems.freightPerOrder).toMatch(/Freight per order: a number ≥ 0/);
    expect(r.problems.chargesCurrency).toMatch(/no rate for CHF/);
    expect(r.problems.dutyPct).toMatch(/Duty %: at most 1,000/);
    expect(r.problems.freightPct).toMatch(/Freight %: a number ≥ 0/);
  });
});

describe('variant form', () => {
  it('refuses a code already used by another variant, ignoring case, and a code with spaces', () => {
    const b = book();
    const dup = validateVariant({ ...variantDraft(b), code: 'fr3-60', name: 'x' }, b, undefined, ids);
    expect(!dup.ok && dup.problems.code).toMatch(/already used/);
    const spaced = validateVariant({ ...variantDraft(b), code: 'FR 3', name: 'x' }, b, undefined, ids);
    expect(!spaced.ok && spaced.problems.code).toMatch(/no spaces/);
  });

  it('reads parameters in their own units and percentages as fractions', () => {
    // 0.47 uF = 470 × 10^-9 F (SI prefixes); 10 % = 0.1 (definition of per cent).
    const b = book();
    const d = variantDraft(b);
    d.code = 'FR5-75';
    d.name = 'Five-step 75 W';
    d.params = { ...d.params, steps: '5', load_w: '75 W', mains_v: '230', mains_tol: '10 %', c_drop: '0.47 uF', stage: 'mosfet' };
    const r = validateVariant(d, b, undefined, ids);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.record.params).toEqual({ steps: 5, load_w: 75, mains_v: 230, mains_tol: 0.1, c_drop: 0.47e-6, stage: 'mosfet' });
  });

  it('marks a parameter in the wrong unit and a step count out of range beside their fields', () => {
    const b = book();
    const d = variantDraft(b);
    d.code = 'FR9';
    d.name = 'Nine';
    d.params = { ...d.params, steps: '9', mains_v: '230 A' };
    const r = validateVariant(d, b, undefined, ids);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.problems['param:steps']).toMatch(/1 to 8/);
    expect(r.problems['param:mains_v']).toMatch(/in A but V was expected/);
  });

  it('adds a parameter of the Book’s own by name, and refuses a name formulas could not use', () => {
    const b = book();
    const d = { ...variantDraft(b, b.variants[0]), newParamName: 'r_gate', newParamValue: '100' };
    const r = validateVariant(d, b, b.variants[0], ids);
    expect(r.ok && r.record.params.r_gate).toBe(100);
    const bad = validateVariant({ ...d, newParamName: 'Gate R' }, b, b.variants[0], ids);
    expect(!bad.ok && bad.problems.newParamName).toMatch(/Lower-case/);
  });

  it('removes a parameter left blank', () => {
    const b = book();
    const d = variantDraft(b, b.variants[0]);
    d.params = { ...d.params, mains_v: '' };
    const r = validateVariant(d, b, b.variants[0], ids);
    expect(r.ok && r.record.params).toEqual({ steps: 3 });
  });
});

describe('deletes', () => {
  it('are refused while quotes, build lines or runs still refer to the record', () => {
    const b = book();
    expect(partUsers(b, 'part_a')).toBeUndefined();
    b.quotes.push({
      id: 'q1',
      rev: 1,
      partId: 'part_a',
      supplierId: 'sup_a',
      supplierCode: 'X',
      currency: 'USD',
      breaks: [{ qty: 1, price: 0.1 }],
      moq: 1,
      pack: 1,
      leadDays: 5,
      date: '2024-01-01',
      source: 'manual',
    });
    b.runs.push({ id: 'run1', rev: 1, name: 'first', variantId: 'var_a', quantity: 100, dateWanted: '2024-02-01', notes: '' });
    expect(partUsers(b, 'part_a')).toBe('Still used by 1 quote; remove or change those first.');
    expect(supplierUsers(b, 'sup_a')).toMatch(/1 quote/);
    expect(variantUsers(b, 'var_a')).toMatch(/1 run/);
  });
});
