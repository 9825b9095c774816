// How quotes read on screen (price breaks, lead times, status in words and symbols) and the pure rules that turn a
// quote form's draft into a Quote or into messages keyed by field. No DOM here, so the rules run anywhere.
import type { Book, PriceBreak, Quote } from '../domain/book.ts';
import { isIsoDate } from '../domain/dates.ts';
import { INCOTERMS, LIMITS, QuoteSchema, isCurrencyCode } from '../domain/schema.ts';
import { parseLeadDays } from '../io/price-map.ts';
import { limitLength, schemaFormResult } from './record-forms.ts';

/** A price in the quote's currency: up to six significant figures, no trailing zeros ("0.0035", "2.2"). */
export function priceText(price: number): string {
  if (!Number.isFinite(price)) return String(price);
  return String(Number(price.toPrecision(6)));
}

/** A whole quantity with thin grouping so long break quantities stay readable ("10 000"). */
export function qtyText(qty: number): string {
  if (!Number.isInteger(qty) || Math.abs(qty) < 10_000) return String(qty);
  return String(qty).replace(/\B(?=(\d{3})+(?!\d))/g, '\u202f');
}

/** "10 @ 0.045 · 1000 @ 0.021": no-break spaces inside each break so a long list wraps only between breaks. */
export function breaksText(breaks: readonly PriceBreak[]): string {
  return breaks.map((b) => `${qtyText(b.qty)}\u00a0@\u00a0${priceText(b.price)}`).join(' · ');
}

/** Lead time in days, with weeks beside it when it is a whole number of weeks ("35 d (5 wk)"). */
export function leadText(days: number): string {
  if (days > 0 && days % 7 === 0) return `${days} d (${days / 7} wk)`;
  return `${days} d`;
}

export const QUOTE_STATES = {
  current: 'current',
  expired: 'expired',
  superseded: 'superseded',
} as const;
export type QuoteState = (typeof QUOTE_STATES)[keyof typeof QUOTE_STATES];

export interface QuoteStatus {
  state: QuoteState;
  symbol: string;
  words: string;
}

/** Superseded wins over expired: a replaced quote is out of use whatever its dates say. */
export function quoteStatus(q: Quote, date: string, replacedBy?: Quote): QuoteStatus {
  if (q.supersededBy !== undefined) {
    const by = replacedBy ? ` by the quote of ${replacedBy.date}` : '';
    return { state: QUOTE_STATES.superseded, symbol: '↷', words: `superseded${by}` };
  }
  if (q.expires !== undefined && q.expires < date) {
    return { state: QUOTE_STATES.expired, symbol: '⌛', words: `expired ${q.expires}` };
  }
  return { state: QUOTE_STATES.current, symbol: '✓', words: 'current' };
}

/** Local date and time of an ISO timestamp, to the minute ("2026-09-01 14:02"). */
export function timeText(iso: string): string {
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  const p = (n: number): string => String(n).padStart(2, '0');
  return `${d.getFullYear()}-${p(d.getMonth() + 1)}-${p(d.getDate())} ${p(d.getHours())}:${p(d.getMinutes())}`;
}

// ---------------------------------------------------------------------------------------------------------------
// The quote form

export interface BreakDraft {
  qty: string;
  price: string;
}

export interface QuoteDraft {
  partId: string;
  supplierId: string;
  supplierCode: string;
  currency: string;
  breaks: BreakDraft[];
  moq: string;
  pack: string;
  lead: string;
  date: string;
  expires: string;
  /** Incoterms 2020 code, or empty for none. */
  incoterm: string;
}

export type QuoteProblems = Record<string, string>;
export type QuoteFormResult = { ok: true; quote: Quote } | { ok: false; problems: QuoteProblems };

export function quoteDraft(q: Quote | undefined, today: string): QuoteDraft {
  if (!q) {
    return {
      partId: '',
      supplierId: '',
      supplierCode: '',
      currency: '',
      breaks: [{ qty: '1', price: '' }],
      moq: '1',
      pack: '1',
      lead: '',
      date: today,
      expires: '',
      incoterm: '',
    };
  }
  return {
    partId: q.partId,
    supplierId: q.supplierId,
    supplierCode: q.supplierCode,
    currency: q.currency,
    breaks: q.breaks.map((b) => ({ qty: String(b.qty), price: String(b.price) })),
    moq: String(q.moq),
    pack: String(q.pack),
    lead: String(q.leadDays),
    date: q.date,
    expires: q.expires ?? '',
    incoterm: q.incoterm ?? '',
  };
}

const WHOLE = /^\d+$/;
const DECIMAL = /^(?:\d+(?:\.\d*)?|\.\d+)$/;

/** Quantity cells may carry grouping spaces or commas ("10 000", "1,000"); prices use a decimal point. */
function readWhole(text: string): number | undefined {
  const t = text.trim().replace(/[\s\u202f,_]/g, '');
  return WHOLE.test(t) ? Number(t) : undefined;
}

/**
 * Checks a quote draft. Break quantities must be whole numbers of at least 1 and rise strictly from row to row; prices
 * are numbers of 0 or more (a free sample is a price too). Problems are keyed `break-qty-N` / `break-price-N` for the
 * break rows and by field name otherwise, so each message sits beside its input.
 */
export function validateQuote(draft: QuoteDraft, book: Book, editing: Quote | undefined, newId: () => string): QuoteFormResult {
  const problems: QuoteProblems = {};
  if (!editing) {
    if (!book.parts.some((p) => p.id === draft.partId)) problems.partId = 'Choose the part this quote is for';
    if (!book.suppliers.some((s) => s.id === draft.supplierId)) problems.supplierId = 'Choose the supplier who gave it';
  }
  const currency = draft.currency.trim().toUpperCase();
  const known = new Set([book.settings.baseCurrency, ...Object.keys(book.settings.rates)]);
  if (!isCurrencyCode(currency)) problems.currency = 'Three letters, as in ISO 4217 (EUR, USD, GBP…)';
  else if (!known.has(currency)) problems.currency = `The Book has no exchange rate for ${currency}; add one on the Suppliers page first`;

  const breaks: PriceBreak[] = [];
  if (draft.breaks.length === 0) problems.breaks = 'Give at least one price break';
  else if (draft.breaks.length > LIMITS.breaks) problems.breaks = `At most ${LIMITS.breaks} price breaks`;
  limitLength(problems, 'supplierCode', draft.supplierCode.trim(), LIMITS.name);
  let prev: number | undefined;
  draft.breaks.forEach((b, i) => {
    const qty = readWhole(b.qty);
    if (b.qty.trim() === '') problems[`break-qty-${i}`] = 'Give the quantity this price starts at';
    else if (qty === undefined || qty < 1) problems[`break-qty-${i}`] = 'A whole number of 1 or more';
    else if (prev !== undefined && qty <= prev) problems[`break-qty-${i}`] = `Must be above the break before it (${prev}): breaks rise`;
    if (qty !== undefined && qty >= 1) prev = prev === undefined ? qty : Math.max(prev, qty);
    const pt = b.price.trim();
    if (pt === '') problems[`break-price-${i}`] = 'Give the unit price';
    else if (!DECIMAL.test(pt)) problems[`break-price-${i}`] = pt.startsWith('-') ? 'A price cannot be negative' : 'A number with a decimal point, such as 0.045';
    if (qty !== undefined && DECIMAL.test(pt)) breaks.push({ qty, price: Number(pt) });
  });

  const moq = readWhole(draft.moq);
  if (draft.moq.trim() === '' || moq === undefined) problems.moq = 'A whole number, 0 or more';
  const pack = readWhole(draft.pack);
  if (pack === undefined || pack < 1) problems.pack = 'A whole number of 1 or more';
  const lead = draft.lead.trim() === '' ? 0 : parseLeadDays(draft.lead, '.', 'days');
  if (lead === undefined || lead < 0) problems.lead = 'Days or weeks: 28, 28 days, 4 weeks, 4w';

  const date = draft.date.trim();
  if (!isIsoDate(date)) problems.date = 'A date written YYYY-MM-DD';
  const expires = draft.expires.trim();
  if (expires !== '') {
    if (!isIsoDate(expires)) problems.expires = 'A date written YYYY-MM-DD, or blank for no expiry';
    else if (isIsoDate(date) && expires < date) problems.expires = `Before the quote date (${date})`;
  }

  const term = draft.incoterm.trim().toUpperCase();
  const incoterm = INCOTERMS.find((t) => t === term);
  if (term !== '' && incoterm === undefined) problems.incoterm = `An Incoterms 2020 code (${INCOTERMS.join(', ')}), or blank for none`;

  if (Object.keys(problems).length > 0) return { ok: false, problems };
  const quote: Quote = {
    id: editing?.id ?? newId(),
    rev: editing?.rev ?? 0,
    partId: editing?.partId ?? draft.partId,
    supplierId: editing?.supplierId ?? draft.supplierId,
    supplierCode: draft.supplierCode.trim(),
    currency,
    breaks,
    moq: moq!,
    pack: pack!,
    leadDays: lead!,
    date,
    source: editing?.source ?? 'manual',
  };
  if (expires !== '') quote.expires = expires;
  if (incoterm !== undefined) quote.incoterm = incoterm;
  if (editing?.batchId !== undefined) quote.batchId = editing.batchId;
  if (editing?.supersededBy !== undefined) quote.supersededBy = editing.supersededBy;
  // The last check: the quote as saved, through the schema the Book file reader uses, each problem by its field.
  const checked = schemaFormResult(QuoteSchema, quote, (path) => {
    const b = /^breaks\[(\d+)\]\.(qty|price)/.exec(path);
    if (b) return `break-${b[2]}-${b[1]}`;
    const head = path.split(/[.[]/)[0]!;
    return head === 'leadDays' ? 'lead' : head;
  });
  return checked.ok ? { ok: true, quote } : { ok: false, problems: checked.problems };
}
