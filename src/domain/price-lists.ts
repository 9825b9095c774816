// Customer price lists: the price of each variant at each run size on each list. A list prices the unit cost (base
// currency, as costed) at its own margin or markup, converts it to its own currency at the Book's rate, then rounds.
//
// Margin and markup (common practice): a gross margin is a share of the price, price = cost / (1 − margin); a markup
// is a share of the cost, price = cost × (1 + markup). The same price can be said either way: a 25 % markup is a
// 20 % margin. The price is worked at full precision and rounded once, in the list's currency: to the cent (half away
// from zero), or to a whole number of the list's steps (nearest, halves away from zero; or up).
import type { Book, CurrencyCode, PriceList, Settings } from './book.ts';
import { rateOf } from './costing.ts';
import type { Result } from './costing.ts';
import { roundHalfUp } from './money.ts';
import { checkWith, PriceListSchema } from './schema.ts';
import { sortVariants } from './variant-order.ts';

/** The price at a margin on price or a markup on cost, unrounded, in the cost's currency. */
export function pricedAt(unitCost: number, basis: PriceList['basis'], pct: number): number {
  return basis === 'markup' ? unitCost * (1 + pct / 100) : unitCost / (1 - pct / 100);
}

/** An amount rounded by a list's rule: to a whole number of steps (nearest or up), or to the cent. */
export function roundPrice(amount: number, rounding: PriceList['rounding']): number {
  if (!rounding) return roundHalfUp(amount * 100) / 100;
  const steps = amount / rounding.step;
  // A quotient within 1e-9 of a whole number is that number, so 1.10 / 0.05 = 22.000000000000004 stays 22 steps.
  const near = Math.round(steps);
  const k = rounding.mode === 'up' ? (Math.abs(steps - near) <= 1e-9 * Math.max(1, Math.abs(steps)) ? near : Math.ceil(steps)) : roundHalfUp(steps);
  // k steps, written without the float noise of the product (0.05 × 23 = 1.1500000000000001).
  return Number((k * rounding.step).toPrecision(12));
}

/** A variant's price on a list from its unit cost in the base currency; `rate` = base units per unit of the list's currency. */
export function listPrice(unitCost: number, list: PriceList, rate: number | undefined): Result<number> {
  if (!Number.isFinite(unitCost)) return { ok: false, error: 'the unit cost cannot be computed' };
  if (rate === undefined || !(rate > 0)) return { ok: false, error: `${list.currency} has no exchange rate in the Book` };
  if (list.basis === 'margin' && list.pct >= 100) return { ok: false, error: `a margin must be below 100 %, not ${list.pct}` };
  return { ok: true, value: roundPrice(pricedAt(unitCost, list.basis, list.pct) / rate, list.rounding) };
}

/** A unit cost as the costing gives it: per variant and run size, base currency; NaN with `error` when it cannot be had. */
export interface CostCell {
  variantId: string;
  variant: string;
  run: number;
  unitCost: number;
  error?: string;
}

export interface PriceCell {
  run: number;
  unitCost: number;
  /** Undefined when the price cannot be had; `error` says why. */
  price: number | undefined;
  error?: string;
}

export interface PriceRow {
  variantId: string;
  variant: string;
  name: string;
  cells: PriceCell[];
}

export interface PriceTable {
  list: PriceList;
  base: CurrencyCode;
  runs: number[];
  rows: PriceRow[];
}

/**
 * A list's table: one row per variant in the one order of every page (variant-order.ts, so the customer's file
 * does not follow the order records happen to be stored in), one cell per run size (the order the costs come in).
 */
export function priceTable(list: PriceList, book: Pick<Book, 'variants'> & { settings: Settings }, costs: readonly CostCell[]): PriceTable {
  const rate = rateOf(book.settings, list.currency);
  const runs = [...new Set(costs.map((c) => c.run))];
  const byVariant = new Map<string, CostCell[]>();
  for (const c of costs) {
    const list = byVariant.get(c.variantId);
    if (list) list.push(c);
    else byVariant.set(c.variantId, [c]);
  }
  const rows: PriceRow[] = [];
  for (const v of sortVariants(book.variants)) {
    const cells = (byVariant.get(v.id) ?? []).map((c): PriceCell => {
      if (!Number.isFinite(c.unitCost)) return { run: c.run, unitCost: c.unitCost, price: undefined, error: c.error ?? 'the unit cost cannot be computed' };
      const p = listPrice(c.unitCost, list, rate);
      return p.ok ? { run: c.run, unitCost: c.unitCost, price: p.value } : { run: c.run, unitCost: c.unitCost, price: undefined, error: p.error };
    });
    rows.push({ variantId: v.id, variant: v.code, name: v.name, cells });
  }
  return { list, base: book.settings.baseCurrency, runs, rows };
}

// ---------------------------------------------------------------------------------------------------------------
// The form

export interface PriceListDraft {
  name: string;
  currency: string;
  basis: string;
  pct: string;
  roundingStep: string;
  roundingMode: string;
  notes: string;
}

export type PriceListProblems = Partial<Record<keyof PriceListDraft, string>>;

export function priceListDraft(l?: PriceList): PriceListDraft {
  return l
    ? {
        name: l.name,
        currency: l.currency,
        basis: l.basis,
        pct: String(l.pct),
        roundingStep: l.rounding ? String(l.rounding.step) : '',
        roundingMode: l.rounding?.mode ?? 'nearest',
        notes: l.notes,
      }
    : { name: '', currency: '', basis: 'margin', pct: '', roundingStep: '', roundingMode: 'nearest', notes: '' };
}

const NUMBER = /^\s*\d+(?:[.,]\d+)?\s*$/;

/**
 * A draft checked against the schema and the Book: a name no other list has, a currency the Book has a rate for, a
 * margin below 100 % (or a markup within the Book's bounds), a rounding step above 0. `id` and `rev` are the record's.
 */
export function validatePriceList(
  draft: PriceListDraft,
  book: Book,
  record: { id: string; rev: number },
): { ok: true; record: PriceList } | { ok: false; problems: PriceListProblems } {
  const problems: PriceListProblems = {};
  const name = draft.name.trim();
  const currency = draft.currency.trim().toUpperCase();
  if (name !== '' && book.priceLists.some((l) => l.id !== record.id && l.name.trim().toLowerCase() === name.toLowerCase())) {
    problems.name = `another price list is already called ${name}`;
  }
  if (/^[A-Z]{3}$/.test(currency) && rateOf(book.settings, currency) === undefined) {
    problems.currency = `${currency} has no exchange rate in the Book; add it under Settings first`;
  }
  const num = (text: string): number => (NUMBER.test(text) ? Number(text.trim().replace(',', '.')) : NaN);
  const pct = num(draft.pct);
  if (draft.pct.trim() === '') problems.pct = `give the ${draft.basis === 'markup' ? 'markup' : 'margin'} in percent`;
  else if (!Number.isFinite(pct)) problems.pct = `must be a number of percent ≥ 0, not “${draft.pct.trim()}”`;
  const step = draft.roundingStep.trim() === '' ? undefined : num(draft.roundingStep);
  if (step !== undefined && !(step > 0)) problems.roundingStep = `must be an amount above 0 (0.05, 0.5, 1), or empty for the cent; not “${draft.roundingStep.trim()}”`;
  const candidate = {
    id: record.id,
    rev: record.rev,
    name,
    currency,
    basis: draft.basis,
    pct,
    ...(step !== undefined && step > 0 ? { rounding: { step, mode: draft.roundingMode } } : {}),
    notes: draft.notes,
  };
  const checked = checkWith(PriceListSchema, candidate);
  if (!checked.ok) {
    for (const p of checked.problems) {
      const field = p.path.startsWith('rounding') ? (p.path.endsWith('mode') ? 'roundingMode' : 'roundingStep') : (p.path as keyof PriceListDraft);
      if (field in draft && problems[field] === undefined) problems[field] = p.message;
    }
  }
  if (Object.keys(problems).length > 0 || !checked.ok) return { ok: false, problems: Object.keys(problems).length ? problems : { name: 'the list does not fit the Book' } };
  return { ok: true, record: checked.value };
}
