// The book functions (VAR, CHECK, CHECK_STATUS, PART_PRICE, PART_COST) read the open Book by name: checked against
// worked values (IEC 60038:2009, IEC 60335-1 cl. 22.5, all-units breaks) on small Books built for the test, and against plain lookups of the demo Book.
import { describe, expect, it } from 'vitest';
import { DetailedCellError } from 'hyperformula';
import type { Book, NotebookPage, Part, Quote } from '../../src/domain/book.ts';
import { emptyBook } from '../../src/domain/book.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { loadBuiltInChecks } from '../../src/cli/check-sheets-fs.ts';
import { createEngine } from '../../src/engine/create.ts';
import { functionDoc } from '../../src/engine/functions/index.ts';
import { bookFunctionContext, evaluateNotebookPage } from '../../src/engine/notebook.ts';
import type { NotebookCell } from '../../src/engine/notebook.ts';

function demoWithChecks(): Book {
  return { ...demoBook(), checks: loadBuiltInChecks() };
}

/** Evaluates one formula against a Book through a one-cell notebook page. */
function calc(book: Book, formula: string): NotebookCell {
  const page: NotebookPage = { id: 'page_t', rev: 1, title: 't', position: 0, sections: [{ heading: 'h', text: '', grid: [[formula]] }] };
  return evaluateNotebookPage(book, page, { date: '2026-06-01' }).sections[0]!.grid[0]![0]!;
}

/** A Book with one invented part and one quote, the price breaks of the all-units costing example. */
function quotedBook(overrides: Partial<Quote> = {}): Book {
  const book = emptyBook();
  const part: Part = {
    id: 'part_t', rev: 1, mpn: 'ZT-R1K-06', maker: 'Invented Test Works', description: 'test resistor', kind: 'resistor',
    ratings: {}, package: '0603',
  };
  const quote: Quote = {
    id: 'quote_t', rev: 1, partId: 'part_t', supplierId: 'sup_t', supplierCode: 'T-1', currency: 'EUR',
    breaks: [
      { qty: 1, price: 0.3 },
      { qty: 100, price: 0.2 },
      { qty: 500, price: 0.15 },
      { qty: 1000, price: 0.12 },
      { qty: 2500, price: 0.09 },
    ],
    moq: 1, pack: 10, leadDays: 5, date: '2026-01-01', source: 'manual', ...overrides,
  };
  return {
    ...book,
    settings: { ...book.settings, baseCurrency: 'EUR', rates: { EUR: 1, USD: 0.9 } },
    parts: [part],
    suppliers: [{ id: 'sup_t', rev: 1, name: 'Invented Supply', currency: quote.currency, notes: '' }],
    quotes: [quote],
  };
}

describe('VAR', () => {
  it('reads a variant parameter by code and name, numbers and text alike, in any case', () => {
    const book = demoBook();
    const v = book.variants.find((x) => x.code === 'FR5-75-CD')!;
    // Compared with a plain lookup of the same record (no engine involved).
    expect(calc(book, '=VAR("FR5-75-CD", "load_w")').value).toBe(v.params.load_w);
    expect(calc(book, '=VAR("fr5-75-cd", "LOAD_W") * 2').value).toBe((v.params.load_w as number) * 2);
    expect(calc(book, '=VAR("FR5-75-CD", "stage")').value).toBe(v.params.stage);
  });

  it('says which variant or parameter is missing', () => {
    const book = demoBook();
    expect(calc(book, '=VAR("NO-SUCH", "load_w")')).toMatchObject({ value: null, error: '#REF!', message: 'VAR: no variant with code "NO-SUCH" in the Book' });
    expect(calc(book, '=VAR("FR5-75-CD", "r_s8")').message).toBe('VAR: variant FR5-75-CD has no parameter "r_s8"');
  });

  it('gives an error value, not an exception, in an engine that has no Book', () => {
    const hf = createEngine();
    const sheet = hf.getSheetId(hf.addSheet('loose'))!;
    const v = hf.calculateFormula('=VAR("FR5-75-CD", "load_w")', sheet);
    expect(v).toBeInstanceOf(DetailedCellError);
    expect((v as DetailedCellError).message).toMatch(/^VAR: no Book is open/);
    hf.destroy();
  });
});

describe('CHECK and CHECK_STATUS', () => {
  it('give a check figure on a variant: the mains peak at +10 % is 357.8 V on 230 V and 186.7 V on 120 V', () => {
    const book = demoWithChecks();
    // IEC 60038:2009, table 1: √2 · 230 · 1.1 = 357.8 V; √2 · 120 · 1.1 = 186.7 V.
    expect(calc(book, '=CHECK("FR4-60-CD", "switch_v_stress")').value).toBeCloseTo(357.8, 1);
    expect(calc(book, '=CHECK("FR3-60-CD-U", "switch_v_stress")').value).toBeCloseTo(186.7, 1);
    expect(calc(book, '=CHECK_STATUS("FR4-60-CD", "switch_v_stress")').value).toBe('pass');
  });

  it('report the failing bleeder of FR5-75-CD: 1 MΩ on 0.47 µF is too slow to reach 34 V within 1 s', () => {
    const book = demoWithChecks();
    // IEC 60335-1 cl. 22.5, as quoted in secondary sources: 1 MΩ with 0.47 µF leaves 38.74 V after 1 s, so the check fails.
    expect(calc(book, '=CHECK_STATUS("FR5-75-CD", "bleeder_time")').value).toBe('fail');
    expect(calc(book, '=CHECK("FR5-75-CD", "bleeder_time")').value as number).toBeGreaterThan(1);
  });

  it('give #N/A for a check that does not apply, and its status says n/a', () => {
    const book = demoWithChecks();
    // FR5-150-RT has a transformer supply, so the dropper checks do not apply (demo Book notes).
    expect(calc(book, '=CHECK("FR5-150-RT", "xcap_v_stress")')).toMatchObject({ error: '#N/A', message: 'CHECK: xcap_v_stress does not apply to FR5-150-RT' });
    expect(calc(book, '=CHECK_STATUS("FR5-150-RT", "xcap_v_stress")').value).toBe('n/a');
  });

  it('name an unknown check', () => {
    expect(calc(demoWithChecks(), '=CHECK("FR4-60-CD", "nothing_here")').message).toBe('CHECK: no check named "nothing_here" in the Book');
  });

  it('use the results they are given (a live session) instead of evaluating the Book again', () => {
    const book = demoWithChecks();
    const v = book.variants[0]!;
    const ctx = bookFunctionContext(book, {
      checkResults: () => [
        { variantId: v.id, variantCode: v.code, checkId: 'x', checkName: 'switch_v_stress', value: 1, unit: 'V', status: 'fail', limit: '', limits: {}, message: 'given' },
      ],
    });
    expect(ctx.checkResult(v.code, 'switch_v_stress')).toMatchObject({ value: 1, status: 'fail' });
  });
});

describe('PART_PRICE and PART_COST', () => {
  it('buy up to a cheaper break: 909 parts in packs of 10 cost 120.00 as 1000 at 0.12, not 136.50 as 910 at 0.15', () => {
    // Operations-management texts, all-units price breaks (from memory):
    // 910 × 0.15 = 136.50 but 1000 × 0.12 = 120.00, so buy 1000.
    const book = quotedBook();
    expect(calc(book, '=PART_COST("ZT-R1K-06", 909)').value).toBeCloseTo(120, 10);
    expect(calc(book, '=PART_PRICE("ZT-R1K-06", 909)').value).toBeCloseTo(0.12, 10);
  });

  it('use the highest break not above the quantity when buying up does not pay', () => {
    // All-units rule: 150 parts → the 100 break, 0.20 each; 150 × 0.20 = 30.00 < 500 × 0.15 = 75.00.
    const book = quotedBook();
    expect(calc(book, '=PART_PRICE("ZT-R1K-06", 150)').value).toBeCloseTo(0.2, 10);
    expect(calc(book, '=PART_COST("ZT-R1K-06", 150)').value).toBeCloseTo(30, 10);
  });

  it('convert a quote in another currency at the Book’s rate', () => {
    // 1000 × 0.12 USD = 120.00 USD; at 0.9 EUR per USD that is 108.00 EUR (plain arithmetic).
    const book = quotedBook({ currency: 'USD' });
    expect(calc(book, '=PART_COST("ZT-R1K-06", 909)').value).toBeCloseTo(108, 10);
  });

  it('refuse a fractional or zero quantity and name an unknown part or an expired quote', () => {
    const book = quotedBook();
    expect(calc(book, '=PART_PRICE("ZT-R1K-06", 2.5)').message).toBe('PART_PRICE: qty must be a whole number from 1, got 2.5');
    expect(calc(book, '=PART_PRICE("ZT-R1K-06", 0)').error).toBe('#NUM!');
    expect(calc(book, '=PART_PRICE("ZZ-NONE", 10)').message).toBe('PART_PRICE: no part with maker part number "ZZ-NONE" in the Book');
    const expired = quotedBook({ expires: '2026-02-01' });
    expect(calc(expired, '=PART_COST("ZT-R1K-06", 10)').message).toMatch(/^PART_COST: no usable quote for ZT-R1K-06: .*expired 2026-02-01/);
  });
});

describe('help for the book functions', () => {
  it('documents each one with its arguments', () => {
    for (const name of ['VAR', 'CHECK', 'CHECK_STATUS', 'PART_PRICE', 'PART_COST']) {
      const d = functionDoc(name);
      expect(d?.area).toBe('book');
      expect(d?.doc.length).toBeGreaterThan(20);
      expect(d?.args.length).toBe(2);
    }
  });
});
