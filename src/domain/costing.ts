// Run costing rules, pure and exact: need and buy quantities, all-units price breaks, the best buy from one quote,
// the choice among quotes, and the costed BOM of one variant at one run size. The engine workbook reuses the kernels.
//
// Money rules (one rule everywhere, so the app, the CLI and the engine agree to the cent):
// - A line's extended cost is rounded to cents in the quote's currency, then converted and rounded to cents again
//   in the base currency (extendedBase). Run material = the sum of the lines' extendedBase (integer cents, so
//   totals always equal the sum of their lines).
// - The run pays for what it buys (cash view): material per unit = run material / run size. Leftover stock (buy − need)
//   is shown with its value at the price paid, but is not credited back.
// - Per-unit figures (material, labour, test, overhead, unit cost, price) are rounded to 4 decimals, and the unit
//   cost is the exact sum of its four rounded parts.
// - Rounding is half away from zero, with a tolerance of 1e-7 of the last digit that absorbs binary float error
//   (1.005 × 100 is 100.49999999999999 in doubles, and 1.005 must round to 1.01).
import type { Book, BuildLine, CurrencyCode, Part, PriceBreak, Quote, Settings, Supplier, Variant } from './book.ts';
import { PART_CHOICE, approvedParts } from './alternates.ts';
import { daysAfter, isIsoDate, todayIso } from './dates.ts';
import { usedDesignators } from './designators.ts';
import { allocateCents, landedChoiceCents, landedLineCents, landedRates, perOrderCents } from './landed.ts';
import type { LandedRates } from './landed.ts';
import { roundHalfUp } from './money.ts';
import type { CostedBom, CostedLine, CostProblem } from './schema.ts';
export type { CostedBom, CostedLine, CostProblem } from './schema.ts';

export type Result<T> = { ok: true; value: T } | { ok: false; error: string };

function ok<T>(value: T): Result<T> {
  return { ok: true, value };
}
function fail<T>(error: string): Result<T> {
  return { ok: false, error };
}

// ---------------------------------------------------------------------------------------------------------------
// Rounding

export { roundHalfUp };

/** An amount of money as integer cents. */
export function toCents(amount: number): number {
  return roundHalfUp(amount * 100);
}

/** An amount rounded to cents. */
export function roundMoney(amount: number): number {
  return toCents(amount) / 100;
}

/** A per-unit figure as integer ten-thousandths. */
export function toTenThousandths(amount: number): number {
  return roundHalfUp(amount * 10_000);
}

/** A per-unit figure rounded to 4 decimals. */
export function roundUnit(amount: number): number {
  return toTenThousandths(amount) / 10_000;
}

/** Per-unit share of a run amount given in cents, rounded to 4 decimals. */
export function perUnitFromCents(cents: number, run: number): number {
  return roundHalfUp((cents * 100) / run) / 10_000;
}

// ---------------------------------------------------------------------------------------------------------------
// Quantities and prices

/**
 * ceil(perUnit · run · (1 + attrition)) without trusting the last bits of the product: a product within 1e-9
 * (relative above 1) of a whole number is that number. 100 × 1.1 is 110.00000000000001 in doubles; the need is 110.
 * Preconditions as in `needQty`.
 */
export function needQtyUnchecked(perUnit: number, run: number, attrition: number): number {
  return ceilNeed(perUnit * run * (1 + attrition));
}

/** Rounds an unrounded need up to whole parts; within 1e-9 (relative above 1) of a whole number is that number. */
export function ceilNeed(x: number): number {
  const n = Math.round(x);
  if (Math.abs(x - n) <= 1e-9 * Math.max(1, Math.abs(x))) return n;
  return Math.ceil(x);
}

/** Parts needed for a run: per unit × run × (1 + attrition), rounded up to whole parts. */
export function needQty(perUnit: number, run: number, attrition: number): Result<number> {
  if (!Number.isFinite(perUnit) || perUnit < 0) return fail(`quantity per unit must be a number ≥ 0, got ${perUnit}`);
  if (!Number.isInteger(run) || run < 1) return fail(`run size must be a whole number ≥ 1, got ${run}`);
  if (!Number.isFinite(attrition) || attrition < 0 || attrition >= 1) {
    return fail(`attrition must be a fraction from 0 up to (not including) 1, got ${attrition}`);
  }
  return ok(needQtyUnchecked(perUnit, run, attrition));
}

/** ceil(max(need, moq) / pack) · pack; nothing is bought when nothing is needed. Preconditions as in `buyQty`. */
export function buyQtyUnchecked(need: number, moq: number, pack: number): number {
  if (need <= 0) return 0;
  return Math.ceil(Math.max(need, moq) / pack) * pack;
}

/** Quantity to order: at least the need and the MOQ, in whole packs. A need of 0 buys nothing. */
export function buyQty(need: number, moq: number, pack: number): Result<number> {
  if (!Number.isInteger(need) || need < 0) return fail(`need must be a whole number ≥ 0, got ${need}`);
  if (!Number.isInteger(moq) || moq < 0) return fail(`MOQ must be a whole number ≥ 0, got ${moq}`);
  if (!Number.isInteger(pack) || pack < 1) return fail(`pack quantity must be a whole number ≥ 1, got ${pack}`);
  return ok(buyQtyUnchecked(need, moq, pack));
}

/** Why a list of price breaks is unusable, or undefined when it is fine (ascending whole quantities, prices ≥ 0). */
export function breaksProblem(breaks: readonly PriceBreak[]): string | undefined {
  if (breaks.length === 0) return 'has no price breaks';
  let last = 0;
  for (const b of breaks) {
    if (!Number.isInteger(b.qty) || b.qty < 1) return `has a break quantity that is not a whole number ≥ 1 (${b.qty})`;
    if (b.qty <= last) return `has break quantities that do not rise (${last} then ${b.qty})`;
    if (!Number.isFinite(b.price) || b.price < 0) return `has a break price that is not a number ≥ 0 (${b.price})`;
    last = b.qty;
  }
  return undefined;
}

/** Index of the highest break ≤ qty, or −1 below the lowest break. Breaks must be valid. */
export function breakIndexUnchecked(qtys: ArrayLike<number>, count: number, qty: number): number {
  for (let i = count - 1; i >= 0; i--) if (qtys[i]! <= qty) return i;
  return -1;
}

/** All-units price break: the break whose quantity is the highest not above `qty`. Below the lowest break: an error. */
export function breakPrice(breaks: readonly PriceBreak[], qty: number): Result<PriceBreak> {
  const bad = breaksProblem(breaks);
  if (bad) return fail(`the quote ${bad}`);
  if (!Number.isFinite(qty) || qty < 0) return fail(`quantity must be a number ≥ 0, got ${qty}`);
  const i = breakIndexUnchecked(
    breaks.map((b) => b.qty),
    breaks.length,
    qty,
  );
  if (i < 0) return fail(`${qty} is below the lowest price break (${breaks[0]!.qty})`);
  return ok(breaks[i]!);
}

/** The order from one quote for one need. `extended` is buy × unit price rounded to cents, in the quote's currency. */
export interface BuyChoice {
  buy: number;
  breakIndex: number;
  breakQty: number;
  unitPrice: number;
  extended: number;
  leftover: number;
}

/**
 * Best order from one quote (preconditions: need ≥ 1 whole, moq ≥ 0 whole, pack ≥ 1 whole, breaks valid).
 * Candidates: the plain buy quantity, and each higher break's quantity rounded up to whole packs (buying up).
 * The lowest extended cost in cents wins; on a tie the smaller quantity. Returns extended in integer cents.
 */
export function bestBuyUnchecked(
  need: number,
  moq: number,
  pack: number,
  qtys: ArrayLike<number>,
  prices: ArrayLike<number>,
  count: number,
): { buy: number; breakIndex: number; cents: number } | undefined {
  const base = buyQtyUnchecked(need, moq, pack);
  let bestBuy = 0;
  let bestIndex = -1;
  let bestCents = Infinity;
  const consider = (qty: number): void => {
    const i = breakIndexUnchecked(qtys, count, qty);
    if (i < 0) return;
    const cents = toCents(qty * prices[i]!);
    if (cents < bestCents || (cents === bestCents && qty < bestBuy)) {
      bestCents = cents;
      bestBuy = qty;
      bestIndex = i;
    }
  };
  consider(base);
  for (let i = 0; i < count; i++) {
    const q = qtys[i]!;
    if (q > base) consider(Math.ceil(q / pack) * pack);
  }
  return bestIndex < 0 ? undefined : { buy: bestBuy, breakIndex: bestIndex, cents: bestCents };
}

/** The terms of a quote that decide an order: MOQ, pack and price breaks. */
export interface QuoteTerms {
  moq: number;
  pack: number;
  breaks: readonly PriceBreak[];
}

/** Best order from one quote for `need` parts, buying up to a higher break where that costs less in total. */
export function bestBuy(quote: QuoteTerms, need: number): Result<BuyChoice> {
  const bad = breaksProblem(quote.breaks);
  if (bad) return fail(`the quote ${bad}`);
  const checked = buyQty(need, quote.moq, quote.pack);
  if (!checked.ok) return checked;
  if (need === 0) return ok({ buy: 0, breakIndex: -1, breakQty: 0, unitPrice: 0, extended: 0, leftover: 0 });
  const qtys = quote.breaks.map((b) => b.qty);
  const prices = quote.breaks.map((b) => b.price);
  const best = bestBuyUnchecked(need, quote.moq, quote.pack, qtys, prices, qtys.length);
  if (!best) return fail(`no order quantity reaches the lowest price break (${qtys[0]})`);
  const brk = quote.breaks[best.breakIndex]!;
  return ok({
    buy: best.buy,
    breakIndex: best.breakIndex,
    breakQty: brk.qty,
    unitPrice: brk.price,
    extended: best.cents / 100,
    leftover: best.buy - need,
  });
}

/** Converts quote-currency cents to base-currency cents (rate = base units per quote unit). */
export function baseCents(cents: number, rate: number): number {
  return roundHalfUp(cents * rate);
}

// ---------------------------------------------------------------------------------------------------------------
// Book-level preparation

/** One build line resolved for one variant, as the family resolver gives it and costing reads it. */
export interface ResolvedLine {
  lineId: string;
  partId?: string;
  qtyPerUnit: number;
  applies: boolean;
  /** Why the line could not be resolved for this variant. */
  error?: string;
}

/** A quote with what costing needs to know about it at the costing date. */
export interface PreparedQuote {
  quote: Quote;
  supplier: Supplier | undefined;
  /** Base currency per unit of the quote's currency; undefined when the Book has no rate for it. */
  rate: number | undefined;
  /** Why the quote cannot be used; undefined when it can. */
  unusable?: string;
  /** The landed-cost percentages that fall to us on this quote (domain/landed.ts). */
  landed: LandedRates;
}

export interface CostingContext {
  book: Book;
  settings: Settings;
  /** ISO date deciding expiry. */
  date: string;
  base: CurrencyCode;
  parts: Map<string, Part>;
  suppliers: Map<string, Supplier>;
  lines: Map<string, BuildLine>;
  quotesByPart: Map<string, PreparedQuote[]>;
}

/** Why the Book's cost settings are unusable, or undefined. */
export function settingsProblem(s: Settings): string | undefined {
  const nonNeg: [string, number][] = [
    ['labour rate per hour', s.labourRatePerHour],
    ['labour minutes per unit', s.labourMinutesPerUnit],
    ['labour minutes per placement', s.labourMinutesPerPlacement],
    ['test cost per unit', s.testCostPerUnit],
    ['overhead %', s.overheadPct],
    ['margin %', s.marginPct],
  ];
  for (const [name, v] of nonNeg) if (typeof v !== 'number' || !Number.isFinite(v) || v < 0) return `${name} must be a number ≥ 0, got ${v}`;
  if (s.marginPct >= 100) return `margin % must be below 100 (price = cost / (1 − margin)), got ${s.marginPct}`;
  for (const [code, rate] of Object.entries(s.rates)) {
    if (typeof rate !== 'number' || !Number.isFinite(rate) || rate <= 0) return `exchange rate for ${code} must be a number > 0, got ${rate}`;
  }
  for (const [kind, a] of Object.entries(s.attrition)) {
    if (typeof a !== 'number' || !Number.isFinite(a) || a < 0 || a >= 1) return `attrition for ${kind} must be a fraction from 0 up to 1, got ${a}`;
  }
  return undefined;
}

/** Base-currency value of one unit of `currency`, or undefined when the Book has no rate for it. */
export function rateOf(settings: Settings, currency: CurrencyCode): number | undefined {
  if (currency === settings.baseCurrency) return 1;
  return settings.rates[currency];
}

/** Why a quote cannot be used at `date`, or undefined. */
export function quoteProblem(q: Quote, date: string, rate: number | undefined): string | undefined {
  if (q.supersededBy !== undefined) return `superseded by quote ${q.supersededBy}`;
  if (q.expires !== undefined && q.expires < date) return `expired ${q.expires}`;
  const bad = breaksProblem(q.breaks);
  if (bad) return bad;
  if (!Number.isInteger(q.moq) || q.moq < 0) return `has an MOQ that is not a whole number ≥ 0 (${q.moq})`;
  if (!Number.isInteger(q.pack) || q.pack < 1) return `has a pack quantity that is not a whole number ≥ 1 (${q.pack})`;
  if (rate === undefined) return `is in ${q.currency}, which has no exchange rate in the Book`;
  return undefined;
}

/** The date a Book is costed at unless one is asked for: its settings' costing date, else today. */
export function costingDateOf(settings: Book['settings']): string {
  return settings.costingDate ?? todayIso();
}

/** Indexes a Book for costing at a date (default: costingDateOf). Bad settings give an error. */
export function prepareCosting(book: Book, options: { date?: string } = {}): Result<CostingContext> {
  const settings = book.settings;
  const bad = settingsProblem(settings);
  if (bad) return fail(`cost settings: ${bad}`);
  const date = options.date ?? costingDateOf(settings);
  if (!isIsoDate(date)) return fail(`costing date must be YYYY-MM-DD, got ${date}`);
  const parts = new Map(book.parts.map((p) => [p.id, p] as const));
  const suppliers = new Map(book.suppliers.map((s) => [s.id, s] as const));
  const lines = new Map(book.buildLines.map((l) => [l.id, l] as const));
  const quotesByPart = new Map<string, PreparedQuote[]>();
  for (const q of book.quotes) {
    const rate = rateOf(settings, q.currency);
    const supplier = suppliers.get(q.supplierId);
    const prepared: PreparedQuote = { quote: q, supplier, rate, landed: landedRates(supplier, q.incoterm) };
    const problem = quoteProblem(q, date, rate);
    if (problem) prepared.unusable = problem;
    const list = quotesByPart.get(q.partId);
    if (list) list.push(prepared);
    else quotesByPart.set(q.partId, [prepared]);
  }
  return ok({ book, settings, date, base: settings.baseCurrency, parts, suppliers, lines, quotesByPart });
}

/** Attrition for a line: its own, else the Book's default for the part kind, else the Book's default. */
export function attritionFor(ctx: CostingContext, line: BuildLine | undefined, part: Part): number {
  return line?.attrition ?? ctx.settings.attrition[part.kind] ?? ctx.settings.attrition['default'] ?? 0;
}

// ---------------------------------------------------------------------------------------------------------------
// Demands: what one variant must buy for one run, lines of the same part (and pinned supplier) merged

export interface Demand {
  partId: string;
  pinnedSupplierId: string | undefined;
  /** Which approved part was chosen and why (the first of the merged lines that chose among several). */
  partChoice: { reason: string; approved: number };
  /** Set when the part was chosen for a quote in time: only quotes whose lead time reaches this date are used. */
  inTimeBy?: string;
  lineIds: string[];
  designators: string[];
  qtyPerUnit: number;
  /**
   * Parts needed: the merged lines' unrounded needs (per unit × run × (1 + the line's attrition)) summed, then
   * rounded up once, so a part on two lines needs NEED_QTY of its summed per-unit quantity, not two round-ups.
   */
  need: number;
}

/**
 * What a run knows that decides which approved part can be had: its date wanted (a quote is in time when the
 * costing date plus its lead days falls on or before it) and the stock on hand by part id.
 */
export interface SupplyOptions {
  dateWanted?: string | undefined;
  onHand?: ReadonlyMap<string, number> | undefined;
}

/** The quotes of a part that arrive by `by` (all of them when there is no date). */
function inTime(quotes: readonly PreparedQuote[], date: string, by: string | undefined): PreparedQuote[] {
  if (by === undefined) return [...quotes];
  return quotes.filter((p) => {
    const arrives = daysAfter(date, p.quote.leadDays);
    return arrives !== undefined && arrives <= by;
  });
}

/** One approved part as a candidate for a line: its landed cost when it can be had in time, else undefined. */
interface Candidate {
  partId: string;
  /** Landed cost in base cents of the cheapest usable quote that is in time (any usable quote when in stock). */
  cents: number | undefined;
  /** Landed cost of the cheapest usable quote, in time or not. */
  anyCents: number | undefined;
  fromStock: boolean;
}

function landedCost(quotes: readonly PreparedQuote[], need: number): number | undefined {
  const c = chooseQuote(quotes, need, '');
  return c.ok ? landedChoiceCents(toCents(c.value.extendedBase), c.value.prepared.landed) : undefined;
}

/** The candidate with the lowest cost under `key`; ties go to the better ranked (earlier) part. */
function cheapest(candidates: readonly Candidate[], key: 'cents' | 'anyCents'): Candidate | undefined {
  let best: Candidate | undefined;
  for (const c of candidates) {
    const cents = c[key];
    if (cents !== undefined && (best === undefined || cents < best[key]!)) best = c;
  }
  return best;
}

/**
 * Which of a line's approved parts to buy for a run: the pinned part when one is pinned; else the cheapest (landed)
 * approved part that can be had in time — a usable quote whose lead time reaches the date wanted, or stock on hand
 * covering the need (then priced at its cheapest quote) — ties to the better ranked; else, none being in time, the
 * cheapest with any usable quote; else the line's own part. `raw` is the line's quantity for the run before
 * attrition (per unit × run). `inTimeBy` tells the costing to buy from quotes in time only.
 */
export function choosePart(
  ctx: CostingContext,
  line: BuildLine,
  raw: number,
  options: SupplyOptions = {},
): { partId: string; reason: string; approved: number; inTimeBy?: string } {
  const approved = approvedParts(line).filter((id) => ctx.parts.has(id));
  const own = line.partId!;
  if (approved.length <= 1) return { partId: own, reason: PART_CHOICE.single, approved: Math.max(1, approved.length) };
  const n = approved.length;
  if (line.pinnedPartId !== undefined && approved.includes(line.pinnedPartId)) return { partId: line.pinnedPartId, reason: PART_CHOICE.pinned, approved: n };
  const by = options.dateWanted !== undefined && isIsoDate(options.dateWanted) ? options.dateWanted : undefined;
  const candidates: Candidate[] = approved.map((partId) => {
    const need = ceilNeed(raw * (1 + attritionFor(ctx, line, ctx.parts.get(partId)!)));
    const quotes = candidateQuotes(ctx, partId, line.pinnedSupplierId);
    const fromStock = need > 0 && (options.onHand?.get(partId) ?? 0) >= need;
    const anyCents = landedCost(quotes, need);
    const cents = by === undefined || fromStock ? anyCents : landedCost(inTime(quotes, ctx.date, by), need);
    return { partId, cents, anyCents, fromStock };
  });
  const best = cheapest(candidates, 'cents');
  if (best) {
    const timely = candidates.filter((c) => c.cents !== undefined).length;
    const reason =
      timely > 1 ? PART_CHOICE.cheapest : best.fromStock && by !== undefined ? PART_CHOICE.fromStock : by === undefined ? PART_CHOICE.onlyQuoted : PART_CHOICE.onlyInTime;
    return { partId: best.partId, reason, approved: n, ...(by !== undefined && !best.fromStock ? { inTimeBy: by } : {}) };
  }
  const any = cheapest(candidates, 'anyCents');
  if (any) return { partId: any.partId, reason: PART_CHOICE.noneInTime, approved: n };
  return { partId: own, reason: PART_CHOICE.noQuote, approved: n };
}

/**
 * The parts one variant needs for a run, in build-line order; unusable lines come back as problems. A line with
 * approved alternates buys the part `choosePart` picks for it.
 */
export function variantDemands(
  ctx: CostingContext,
  lines: readonly ResolvedLine[],
  run: number,
  options: SupplyOptions = {},
): { demands: Demand[]; problems: CostProblem[] } {
  const problems: CostProblem[] = [];
  const byKey = new Map<string, Demand>();
  const unrounded = new Map<Demand, number>();
  const ordered = lines
    .map((r) => ({ r, line: ctx.lines.get(r.lineId) }))
    .sort((a, b) => (a.line?.position ?? 0) - (b.line?.position ?? 0));
  for (const { r, line } of ordered) {
    const designators = line?.designators ?? '';
    if (r.error !== undefined) {
      problems.push({ lineId: r.lineId, designators, message: r.error });
      continue;
    }
    if (!r.applies) continue;
    if (!Number.isFinite(r.qtyPerUnit) || r.qtyPerUnit < 0) {
      problems.push({ lineId: r.lineId, designators, message: `quantity per unit is not a number ≥ 0 (${r.qtyPerUnit})` });
      continue;
    }
    if (r.qtyPerUnit === 0) continue;
    let part = r.partId === undefined ? undefined : ctx.parts.get(r.partId);
    if (!part) {
      problems.push({ lineId: r.lineId, designators, message: r.partId ? `part ${r.partId} is not in the Book` : 'the line has no part' });
      continue;
    }
    let choice: { reason: string; approved: number; inTimeBy?: string } = { reason: PART_CHOICE.single, approved: 1 };
    if (line && line.partId === part.id && (line.alternates ?? []).length > 0) {
      const c = choosePart(ctx, line, r.qtyPerUnit * run, options);
      part = ctx.parts.get(c.partId)!;
      choice = c;
    }
    const raw = r.qtyPerUnit * run * (1 + attritionFor(ctx, line, part));
    const pin = line?.pinnedSupplierId;
    const key = `${part.id}\u0000${pin ?? ''}`;
    const d = byKey.get(key);
    // The line names the family's positions; this variant fills as many as it takes.
    const placed = usedDesignators(designators, r.qtyPerUnit);
    if (d) {
      d.lineIds.push(r.lineId);
      if (placed) d.designators.push(placed);
      d.qtyPerUnit += r.qtyPerUnit;
      unrounded.set(d, unrounded.get(d)! + raw);
      if (d.partChoice.approved === 1 && choice.approved > 1) d.partChoice = { reason: choice.reason, approved: choice.approved };
      // Merged lines buy in one order: the tightest date wanted of those that chose for time holds for all.
      if (choice.inTimeBy !== undefined) d.inTimeBy = choice.inTimeBy;
    } else {
      const fresh: Demand = {
        partId: part.id,
        pinnedSupplierId: pin,
        partChoice: { reason: choice.reason, approved: choice.approved },
        ...(choice.inTimeBy === undefined ? {} : { inTimeBy: choice.inTimeBy }),
        lineIds: [r.lineId],
        designators: placed ? [placed] : [],
        qtyPerUnit: r.qtyPerUnit,
        need: 0,
      };
      byKey.set(key, fresh);
      unrounded.set(fresh, raw);
    }
  }
  for (const [d, raw] of unrounded) d.need = ceilNeed(raw);
  return { demands: [...byKey.values()], problems };
}

/** Placements per unit for labour: each applied line's quantity × its part's placements (default 1 per piece). */
export function placementsPerUnit(ctx: CostingContext, lines: readonly ResolvedLine[]): number {
  let n = 0;
  for (const r of lines) {
    if (!r.applies || r.error !== undefined || !(r.qtyPerUnit > 0)) continue;
    const part = r.partId === undefined ? undefined : ctx.parts.get(r.partId);
    n += r.qtyPerUnit * (part?.placements ?? 1);
  }
  return n;
}

/** The quotes that may serve a demand: those of its part, and of the pinned supplier when one is pinned. */
export function candidateQuotes(ctx: CostingContext, partId: string, pinnedSupplierId: string | undefined): PreparedQuote[] {
  const all = ctx.quotesByPart.get(partId) ?? [];
  return pinnedSupplierId === undefined ? all : all.filter((p) => p.quote.supplierId === pinnedSupplierId);
}

/** The chosen order for a demand, with the quote it comes from. */
export interface QuoteChoice {
  prepared: PreparedQuote;
  buy: BuyChoice;
  /** Extended cost converted to the base currency and rounded to cents. */
  extendedBase: number;
  rate: number;
}

/**
 * Lowest extended base-currency cost over the usable quotes (ties: shorter lead time, then quote id).
 * No usable quote gives an error naming why each quote was set aside.
 */
export function chooseQuote(quotes: readonly PreparedQuote[], need: number, what: string): Result<QuoteChoice> {
  let best: QuoteChoice | undefined;
  let bestCents = Infinity;
  const reasons: string[] = [];
  for (const p of quotes) {
    if (p.unusable !== undefined || p.rate === undefined) {
      reasons.push(`quote ${p.quote.id} ${p.unusable ?? 'has no exchange rate'}`);
      continue;
    }
    const b = bestBuy(p.quote, need);
    if (!b.ok) {
      reasons.push(`quote ${p.quote.id}: ${b.error}`);
      continue;
    }
    const goods = baseCents(toCents(b.value.extended), p.rate);
    // The percentage landed costs belong to the line, so they take part in the choice (domain/landed.ts).
    const cents = landedChoiceCents(goods, p.landed);
    const better =
      cents < bestCents ||
      (cents === bestCents &&
        best !== undefined &&
        (p.quote.leadDays < best.prepared.quote.leadDays ||
          (p.quote.leadDays === best.prepared.quote.leadDays && p.quote.id < best.prepared.quote.id)));
    if (better) {
      bestCents = cents;
      best = { prepared: p, buy: b.value, extendedBase: goods / 100, rate: p.rate };
    }
  }
  if (best) return ok(best);
  if (quotes.length === 0) return fail(`no quote for ${what}`);
  return fail(`no usable quote for ${what}: ${reasons.join('; ')}`);
}

// ---------------------------------------------------------------------------------------------------------------
// The costed BOM



/** Labour per unit: (minutes per unit + minutes per placement × placements) / 60 × hourly rate, 4 decimals. */
export function labourPerUnit(settings: Settings, placements: number): number {
  return labourUnit(settings.labourRatePerHour, settings.labourMinutesPerUnit, settings.labourMinutesPerPlacement, placements);
}

/** The labour kernel: (minutesPerUnit + minutesPerPlacement × placements) / 60 × ratePerHour, 4 decimals. */
export function labourUnit(ratePerHour: number, minutesPerUnit: number, minutesPerPlacement: number, placements: number): number {
  return roundUnit(((minutesPerUnit + minutesPerPlacement * placements) / 60) * ratePerHour);
}

/**
 * Overhead per unit as a percentage of direct labour cost (the labour-cost base of cost-accounting texts;
 * overhead rate = budgeted overhead / budgeted labour), 4 decimals.
 */
export function overheadPerUnit(labour: number, overheadPct: number): number {
  return roundUnit((labour * overheadPct) / 100);
}

/** Standard cost per unit = material + labour + test + overhead, summed exactly at 4 decimals. */
export function unitCostOf(material: number, labour: number, test: number, overhead: number): number {
  return (toTenThousandths(material) + toTenThousandths(labour) + toTenThousandths(test) + toTenThousandths(overhead)) / 10_000;
}

/** Selling price for a gross margin on price: price = cost / (1 − margin), 4 decimals. Margin must be below 100 %. */
export function priceFor(unitCost: number, marginPct: number): number {
  return roundUnit(unitCost / (1 - marginPct / 100));
}

/**
 * Adds each supplier's amounts per order to its lines' freight and charges, shared by goods value (domain/landed.ts).
 * An amount in a currency the Book has no rate for is a problem on the supplier's first line.
 */
export function shareOrderAmounts(ctx: CostingContext, lines: CostedLine[]): CostProblem[] {
  const problems: CostProblem[] = [];
  const bySupplier = new Map<string, number[]>();
  lines.forEach((l, i) => {
    const list = bySupplier.get(l.supplierId);
    if (list) list.push(i);
    else bySupplier.set(l.supplierId, [i]);
  });
  for (const [supplierId, at] of bySupplier) {
    const s = ctx.suppliers.get(supplierId);
    if (!s) continue;
    const rated = (what: 'freight' | 'charges', amount: typeof s.freightPerOrder): number => {
      const cents = perOrderCents(amount, amount ? rateOf(ctx.settings, amount.currency) : undefined);
      if (cents !== undefined) return cents;
      const first = lines[at[0]!]!;
      problems.push({ lineId: first.lineId, designators: first.designators, partId: first.partId, message: `${s.name}'s ${what} per order is in ${amount!.currency}, which has no exchange rate in the Book` });
      return 0;
    };
    const quoteOf = (i: number): PreparedQuote | undefined => ctx.quotesByPart.get(lines[i]!.partId)?.find((p) => p.quote.id === lines[i]!.quoteId);
    const carried = at.filter((i) => quoteOf(i)?.landed.carriage === true);
    const freight = carried.length > 0 ? rated('freight', s.freightPerOrder) : 0;
    const charges = rated('charges', s.chargesPerOrder);
    const add = (idx: number[], total: number, field: 'freight' | 'charges'): void => {
      if (total === 0) return;
      allocateCents(total, idx.map((i) => toCents(lines[i]!.extendedBase))).forEach((c, k) => {
        const l = lines[idx[k]!]!;
        l[field] = (toCents(l[field] ?? 0) + c) / 100;
      });
    };
    add(carried, freight, 'freight');
    add(at, charges, 'charges');
  }
  return problems;
}

/**
 * Costs one variant for one run from its resolved lines; `supply` (the run's date wanted, stock on hand) decides
 * which approved parts can be had in time. Bad input (run size, unknown variant) gives an error.
 */
export function costVariantRun(
  ctx: CostingContext,
  variant: Variant,
  lines: readonly ResolvedLine[],
  run: number,
  supply: SupplyOptions = {},
): Result<CostedBom> {
  if (!Number.isInteger(run) || run < 1) return fail(`run size must be a whole number ≥ 1, got ${run}`);
  const { demands, problems } = variantDemands(ctx, lines, run, supply);
  const out: CostedLine[] = [];
  let materialCents = 0;
  let leftoverCents = 0;
  for (const d of demands) {
    const part = ctx.parts.get(d.partId)!;
    const designators = d.designators.join(', ');
    const pinName = d.pinnedSupplierId ? ` from pinned supplier ${ctx.suppliers.get(d.pinnedSupplierId)?.name ?? d.pinnedSupplierId}` : '';
    const quotes = candidateQuotes(ctx, d.partId, d.pinnedSupplierId);
    const choice = chooseQuote(d.inTimeBy === undefined ? quotes : inTime(quotes, ctx.date, d.inTimeBy), d.need, `${part.mpn}${pinName}`);
    if (!choice.ok) {
      problems.push({ lineId: d.lineIds[0]!, designators, partId: d.partId, message: choice.error });
      continue;
    }
    const { prepared, buy, extendedBase, rate } = choice.value;
    const q = prepared.quote;
    const leftoverValue = baseCents(toCents(buy.leftover * buy.unitPrice), rate) / 100;
    leftoverCents += toCents(leftoverValue);
    const landed = landedLineCents(toCents(extendedBase), prepared.landed);
    out.push({
      lineId: d.lineIds[0]!,
      lineIds: d.lineIds,
      designators,
      partId: d.partId,
      mpn: part.mpn,
      description: part.description,
      qtyPerUnit: d.qtyPerUnit,
      need: d.need,
      buy: buy.buy,
      supplierId: q.supplierId,
      supplier: prepared.supplier?.name ?? q.supplierId,
      supplierCode: q.supplierCode,
      quoteId: q.id,
      moq: q.moq,
      pack: q.pack,
      leadDays: q.leadDays,
      breakQty: buy.breakQty,
      unitPrice: buy.unitPrice,
      currency: q.currency,
      extended: buy.extended,
      extendedBase,
      leftover: buy.leftover,
      leftoverValue,
      ...(q.incoterm === undefined ? {} : { incoterm: q.incoterm }),
      freight: landed.freight / 100,
      duty: landed.duty / 100,
      charges: landed.charges / 100,
      partChoice: d.partChoice,
    });
  }
  problems.push(...shareOrderAmounts(ctx, out));
  let landedCents = 0;
  for (const l of out) {
    const landed = toCents(l.freight ?? 0) + toCents(l.duty ?? 0) + toCents(l.charges ?? 0);
    landedCents += landed;
    materialCents += toCents(l.extendedBase) + landed;
  }
  const s = ctx.settings;
  const placements = placementsPerUnit(ctx, lines);
  const material = perUnitFromCents(materialCents, run);
  const labour = labourPerUnit(s, placements);
  const test = roundUnit(s.testCostPerUnit);
  const overhead = overheadPerUnit(labour, s.overheadPct);
  const unitCost = unitCostOf(material, labour, test, overhead);
  const conversionCents = roundHalfUp(
    ((toTenThousandths(labour) + toTenThousandths(test) + toTenThousandths(overhead)) * run) / 100,
  );
  return ok({
    variantId: variant.id,
    variant: variant.code,
    run,
    currency: ctx.base,
    date: ctx.date,
    lines: out,
    placements,
    material,
    labour,
    test,
    overhead,
    unitCost,
    price: priceFor(unitCost, s.marginPct),
    materialRun: materialCents / 100,
    landedRun: landedCents / 100,
    runTotal: (materialCents + conversionCents) / 100,
    leftoverValue: leftoverCents / 100,
    complete: problems.length === 0,
    problems,
  });
}
