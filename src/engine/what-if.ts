// What-if costing for the Compare page: a private costing workbook of the chosen variants (and the quotes of the
// parts they buy, so it opens in a moment however large the family), with edits tried on it that never reach the
// Book — a quote price, an exchange rate, a cost setting. It runs where the live figures run (the figures worker),
// and answers with the figures the page asked for: unit costs and, where wanted, costed BOMs.
import type { Book, CurrencyCode } from '../domain/book.ts';
import type { CostedBom, ResolvedLine, Result } from '../domain/costing.ts';
import { CostingWorkbook } from './costing.ts';

/** The cost settings a what-if may change (those the costing workbook takes live). */
export type WhatIfSetting = Parameters<CostingWorkbook['setCostSetting']>[0];

/** Edits tried on the Compare page without saving; each holds its latest value. */
export interface WhatIf {
  /** `${quoteId}#${breakIndex}` → price in the quote's currency. */
  prices: Map<string, number>;
  rates: Map<CurrencyCode, number>;
  settings: Map<WhatIfSetting, number>;
  /** Run sizes compared instead of the Book's; undefined = the Book's. */
  runSizes: number[] | undefined;
}

export function emptyWhatIf(): WhatIf {
  return { prices: new Map(), rates: new Map(), settings: new Map(), runSizes: undefined };
}

/** The key of a what-if field on the page: `price:<quote>#<break>`, `rate:<currency>` or the setting's name. */
export const whatIfField = {
  price: (key: string): string => `price:${key}`,
  rate: (currency: string): string => `rate:${currency}`,
  setting: (name: WhatIfSetting): string => name,
};

/** An edit the workbook refused, by the field it was typed in. */
export interface Refused {
  field: string;
  error: string;
}

/**
 * Applies every what-if edit to a workbook (the setters hold the latest value, so applying twice is harmless).
 * `holds` says which quotes the workbook was opened with; price edits of other quotes cannot move its variants.
 */
export function applyWhatIf(wb: CostingWorkbook, w: WhatIf, holds: (quoteId: string) => boolean = () => true): Refused[] {
  const refused: Refused[] = [];
  for (const [key, price] of w.prices) {
    const [quoteId, at] = key.split('#');
    if (!holds(quoteId!)) continue;
    const r = wb.setQuotePrice(quoteId!, Number(at), price);
    if (!r.ok) refused.push({ field: whatIfField.price(key), error: r.error });
  }
  for (const [c, rate] of w.rates) {
    const r = wb.setRate(c, rate);
    if (!r.ok) refused.push({ field: whatIfField.rate(c), error: r.error });
  }
  for (const [name, value] of w.settings) {
    const r = wb.setCostSetting(name, value);
    if (!r.ok) refused.push({ field: whatIfField.setting(name), error: r.error });
  }
  return refused;
}

/** A figure the page wants: a variant's unit cost at a run size, with its costed BOM when `bom`. */
export interface WhatIfWant {
  variantId: string;
  run: number;
  bom: boolean;
}

export interface WhatIfFigure {
  variantId: string;
  run: number;
  /** NaN when it cannot be had; `problem` says why. */
  value: number;
  problem?: string;
  bom?: Result<CostedBom>;
}

export interface WhatIfAnswer {
  refused: Refused[];
  figures: WhatIfFigure[];
}

/** The costed BOM, or why it is incomplete (a cost that leaves lines out is not a cost). */
function completeBom(wb: CostingWorkbook, variantId: string, run: number): Result<CostedBom> {
  const r = wb.costedBom(variantId, run);
  if (r.ok && !r.value.complete) {
    const p = r.value.problems[0]!;
    return { ok: false, error: `${p.designators || p.lineId || ''}: ${p.message}` };
  }
  return r;
}

/** The what-if workbook, opened again only when the Book or the chosen variants change or an edit is taken back. */
export class WhatIfCosts {
  private wb: Result<CostingWorkbook> | undefined;
  private book: Book | undefined;
  private chosen = '';
  private applied: WhatIf = emptyWhatIf();
  private holds = new Set<string>();

  answer(book: Book, lines: ReadonlyMap<string, readonly ResolvedLine[]>, chosen: readonly string[], w: WhatIf, wants: readonly WhatIfWant[]): WhatIfAnswer {
    const key = chosen.join('\u0001');
    const takenBack =
      [...this.applied.prices.keys()].some((k) => !w.prices.has(k)) ||
      [...this.applied.rates.keys()].some((k) => !w.rates.has(k)) ||
      [...this.applied.settings.keys()].some((k) => !w.settings.has(k));
    if (!this.wb || book !== this.book || key !== this.chosen || takenBack) this.open(book, lines, chosen);
    this.applied = w;
    const refused = this.wb!.ok ? applyWhatIf(this.wb!.value, w, (id) => this.holds.has(id)) : [];
    const figures = wants.map((want) => this.figure(want));
    return { refused, figures };
  }

  close(): void {
    if (this.wb?.ok) this.wb.value.close();
    this.wb = undefined;
    this.book = undefined;
  }

  private open(book: Book, lines: ReadonlyMap<string, readonly ResolvedLine[]>, chosen: readonly string[]): void {
    this.close();
    const ids = new Set(chosen);
    const variants = book.variants.filter((v) => ids.has(v.id) && lines.has(v.id));
    const parts = new Set<string>();
    const buildLines = new Map(book.buildLines.map((l) => [l.id, l] as const));
    for (const v of variants) {
      for (const l of lines.get(v.id)!) {
        if (l.partId !== undefined) parts.add(l.partId);
        // A line's approved alternates may be bought instead of its part: their quotes take part too.
        for (const id of buildLines.get(l.lineId)?.alternates ?? []) parts.add(id);
      }
    }
    const quotes = book.quotes.filter((q) => parts.has(q.partId));
    this.holds = new Set(quotes.map((q) => q.id));
    this.wb = CostingWorkbook.open({ ...book, variants, quotes }, new Map(variants.map((v) => [v.id, lines.get(v.id)!] as const)));
    this.book = book;
    this.chosen = chosen.join('\u0001');
    this.applied = emptyWhatIf();
  }

  private figure(want: WhatIfWant): WhatIfFigure {
    const { variantId, run } = want;
    const out: WhatIfFigure = { variantId, run, value: NaN };
    const wb = this.wb!;
    if (!wb.ok) {
      out.problem = wb.error;
      if (want.bom) out.bom = wb;
      return out;
    }
    const bom = want.bom || !wb.value.runSizes.includes(run) ? completeBom(wb.value, variantId, run) : undefined;
    if (wb.value.runSizes.includes(run)) {
      out.value = wb.value.unitCost(variantId, run);
      if (!Number.isFinite(out.value)) out.problem = wb.value.problem(variantId, 'unitCost', run) ?? 'cannot be computed';
    } else if (bom!.ok) out.value = bom!.value.unitCost;
    else out.problem = bom!.error;
    if (want.bom) out.bom = bom!;
    return out;
  }
}
