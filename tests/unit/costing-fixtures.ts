// Small invented Books for the costing tests: one builder, so each test states only the figures it is about.
import { emptyBook } from '../../src/domain/book.ts';
import type { Book, BuildLine, Part, PriceBreak, Quote, Settings } from '../../src/domain/book.ts';
import type { Result } from '../../src/domain/costing.ts';

export interface QuoteSpec {
  id?: string;
  supplierId?: string;
  currency?: string;
  breaks: PriceBreak[];
  moq?: number;
  pack?: number;
  leadDays?: number;
  expires?: string;
  supersededBy?: string;
}

export interface LineSpec {
  id?: string;
  partId: string;
  qty: number;
  designators?: string;
  attrition?: number;
  pinnedSupplierId?: string;
}

export function part(id: string, extra: Partial<Part> = {}): Part {
  return {
    id,
    rev: 1,
    mpn: `TST-${id.toUpperCase()}`,
    maker: 'Test Works',
    description: `test part ${id}`,
    kind: 'resistor',
    ratings: {},
    package: '0603',
    ...extra,
  };
}

export function quote(partId: string, spec: QuoteSpec, n: number): Quote {
  return {
    id: spec.id ?? `q${n}`,
    rev: 1,
    partId,
    supplierId: spec.supplierId ?? 'sup_a',
    supplierCode: `SC-${partId}-${n}`,
    currency: spec.currency ?? 'EUR',
    breaks: spec.breaks,
    moq: spec.moq ?? 1,
    pack: spec.pack ?? 1,
    leadDays: spec.leadDays ?? 10,
    date: '2025-01-01',
    ...(spec.expires ? { expires: spec.expires } : {}),
    ...(spec.supersededBy ? { supersededBy: spec.supersededBy } : {}),
    source: 'manual',
  };
}

/** One variant "V1" with the given constant lines; quotes keyed by part id. */
export function smallBook(opts: {
  parts: Part[];
  quotes: Record<string, QuoteSpec[]>;
  lines: LineSpec[];
  settings?: Partial<Settings>;
}): Book {
  const book = emptyBook();
  book.settings = { ...book.settings, attrition: { default: 0 }, costingDate: '2025-06-01', ...opts.settings };
  book.parts = opts.parts;
  book.suppliers = [
    { id: 'sup_a', rev: 1, name: 'Alder Components', currency: 'EUR', notes: '' },
    { id: 'sup_b', rev: 1, name: 'Birch Electronic Supply', currency: 'USD', notes: '' },
  ];
  let n = 0;
  for (const [partId, specs] of Object.entries(opts.quotes)) for (const s of specs) book.quotes.push(quote(partId, s, ++n));
  book.variants = [{ id: 'v1', rev: 1, code: 'V1', name: 'test variant', params: {} }];
  book.buildLines = opts.lines.map(
    (l, i): BuildLine => ({
      id: l.id ?? `l${i + 1}`,
      rev: 1,
      position: i + 1,
      designators: l.designators ?? `R${i + 1}`,
      partId: l.partId,
      qtyRule: String(l.qty),
      appliesWhen: '',
      category: 'electronics',
      ...(l.attrition !== undefined ? { attrition: l.attrition } : {}),
      ...(l.pinnedSupplierId ? { pinnedSupplierId: l.pinnedSupplierId } : {}),
    }),
  );
  return book;
}

/** The value of a result the test expects to succeed; a refusal fails the test with its message. */
export function value<T>(r: Result<T>): T {
  if (!r.ok) throw new Error(`expected a value, got error: ${r.error}`);
  return r.value;
}
