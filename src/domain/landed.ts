// Landed cost: what a purchase costs on top of the goods (freight, import duty, payment and bank charges), and which
// of those costs fall to us, the buyer, under a quote's delivery term (Incoterms 2020).
// Landed cost is part of the material cost of a unit: the cost of purchase includes import duties, transport and
// handling (IAS 2, Inventories, paragraph 11; from memory).
//
// Rules (one rule everywhere, so the app, the CLI and the engine agree to the cent):
// - The percentages apply to the line's goods value in the base currency (its extendedBase, integer cents); freight,
//   duty and charges are each rounded to cents on their own (half away from zero).
// - Duty is reckoned on the goods' value alone. That is the US customs basis (FOB); EU customs adds the carriage to
//   the border (CIF basis) (both from memory): a Book whose duty follows the CIF basis sets its duty % a little higher.
// - Amounts per order (freight per order, charges per order) are converted to the base currency (rounded to cents)
//   and charged once per supplier a run buys from. They are shared among that supplier's lines by goods value, the
//   largest remainder taking the odd cents, so the shares add up to the amount exactly (ties go to the earlier line).
//   Freight per order is shared among the lines whose term leaves the carriage to us, and charged only when one does.
// - Choosing between quotes weighs each quote's percentage costs (they belong to the line), not the amounts per
//   order, which the order as a whole bears whatever is on it.
import { roundHalfUp } from './money.ts';
import type { Incoterm, PerOrder, Supplier } from './schema.ts';

/** The four families of Incoterms 2020, by the letter the terms begin with. */
export type IncotermGroup = 'E' | 'F' | 'C' | 'D';

export interface BuyerShare {
  group: IncotermGroup;
  /** The main carriage to us is ours to pay (the freight figures of the supplier apply). */
  carriage: boolean;
  /** Import clearance and duty are ours to pay (the duty % of the supplier applies). */
  duty: boolean;
}

/**
 * Which of the landed costs fall to the buyer under each Incoterms 2020 rule (ICC, Incoterms 2020; from memory of
 * the rules' A/B obligations, not the ICC text itself):
 * - EXW: the buyer collects at the seller's premises and pays all carriage, export and import clearance and duty.
 * - FCA, FAS, FOB: the seller delivers, export-cleared, to the buyer's carrier (FAS alongside, FOB on board the
 *   ship); the main carriage and import duty are the buyer's.
 * - CPT, CIP, CFR, CIF: the seller pays the main carriage to the named place or port (CIP and CIF add insurance);
 *   the buyer pays import duty. Carriage onward from a named port is left out: the supplier's freight figures are
 *   taken to be the main carriage.
 * - DAP, DPU: the seller delivers at the named place (DPU unloaded); the buyer pays import clearance and duty.
 * - DDP: the seller delivers with import duty paid; the buyer adds neither.
 * Payment and bank charges are not an Incoterms matter (the rules do not deal with payment; Incoterms 2020
 * introduction, from memory): they fall to the buyer under every term.
 */
export const INCOTERM_BUYER_SHARE: Readonly<Record<Incoterm, BuyerShare>> = {
  EXW: { group: 'E', carriage: true, duty: true },
  FCA: { group: 'F', carriage: true, duty: true },
  FAS: { group: 'F', carriage: true, duty: true },
  FOB: { group: 'F', carriage: true, duty: true },
  CPT: { group: 'C', carriage: false, duty: true },
  CIP: { group: 'C', carriage: false, duty: true },
  CFR: { group: 'C', carriage: false, duty: true },
  CIF: { group: 'C', carriage: false, duty: true },
  DAP: { group: 'D', carriage: false, duty: true },
  DPU: { group: 'D', carriage: false, duty: true },
  DDP: { group: 'D', carriage: false, duty: false },
};

/** With no term on a quote, the supplier's landed costs are taken as ours, all of them. */
const NO_TERM: BuyerShare = { group: 'E', carriage: true, duty: true };

/** What a quote's term leaves to us. */
export function buyerShare(term: Incoterm | undefined): BuyerShare {
  return term === undefined ? NO_TERM : INCOTERM_BUYER_SHARE[term];
}

/** The percentages that apply to a line bought on one quote (0 where the term leaves a cost to the seller). */
export interface LandedRates {
  freightPct: number;
  dutyPct: number;
  chargesPct: number;
  /** The carriage is ours: the supplier's freight per order applies to this line. */
  carriage: boolean;
}

export const NO_LANDED: LandedRates = { freightPct: 0, dutyPct: 0, chargesPct: 0, carriage: false };

/** The landed rates of a quote from `supplier` on `term`. */
export function landedRates(supplier: Supplier | undefined, term: Incoterm | undefined): LandedRates {
  if (!supplier) return NO_LANDED;
  const share = buyerShare(term);
  return {
    freightPct: share.carriage ? (supplier.freightPct ?? 0) : 0,
    dutyPct: share.duty ? (supplier.dutyPct ?? 0) : 0,
    chargesPct: supplier.chargesPct ?? 0,
    carriage: share.carriage,
  };
}

/** A percentage of an amount in cents, rounded to cents. */
export function pctCents(cents: number, pct: number): number {
  return pct === 0 ? 0 : roundHalfUp((cents * pct) / 100);
}

export interface LandedCents {
  freight: number;
  duty: number;
  charges: number;
}

/** The percentage part of a line's landed cost, in cents, from its goods value in base-currency cents. */
export function landedLineCents(goodsCents: number, r: LandedRates): LandedCents {
  return { freight: pctCents(goodsCents, r.freightPct), duty: pctCents(goodsCents, r.dutyPct), charges: pctCents(goodsCents, r.chargesPct) };
}

/** Goods plus the percentage part of the landed cost, in cents: what the choice between quotes compares. */
export function landedChoiceCents(goodsCents: number, r: LandedRates): number {
  const l = landedLineCents(goodsCents, r);
  return goodsCents + l.freight + l.duty + l.charges;
}

/**
 * Shares `total` cents among lines in proportion to `weights` (largest remainder: each takes the floor of its
 * share, the cents left over go to the largest remainders, ties to the earlier line), so the shares add up to
 * `total` exactly. Weights that are all 0 share it equally.
 */
export function allocateCents(total: number, weights: readonly number[]): number[] {
  if (weights.length === 0) return [];
  const sum = weights.reduce((s, w) => s + w, 0);
  const w = sum > 0 ? weights : weights.map(() => 1);
  const wsum = sum > 0 ? sum : weights.length;
  const shares = w.map((x) => Math.floor((total * x) / wsum));
  let left = total - shares.reduce((s, x) => s + x, 0);
  const order = w.map((x, i) => ({ i, rem: (total * x) % wsum })).sort((a, b) => b.rem - a.rem || a.i - b.i);
  for (let k = 0; left > 0; k = (k + 1) % order.length, left--) shares[order[k]!.i]! += 1;
  return shares;
}

/** An amount in base-currency cents: rounded to cents in its own currency, converted, rounded to cents again. */
export function amountBaseCents(amount: number, rate: number): number {
  return roundHalfUp(roundHalfUp(amount * 100) * rate);
}

/** An amount per order in base-currency cents (rate = base units per unit of its currency); undefined without a rate. */
export function perOrderCents(amount: PerOrder | undefined, rate: number | undefined): number | undefined {
  if (!amount || amount.amount === 0) return 0;
  if (rate === undefined) return undefined;
  return amountBaseCents(amount.amount, rate);
}

/** True when the supplier charges anything once per order. */
export function hasPerOrder(s: Supplier): boolean {
  return (s.freightPerOrder?.amount ?? 0) > 0 || (s.chargesPerOrder?.amount ?? 0) > 0;
}
