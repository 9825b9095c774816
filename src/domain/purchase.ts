// The purchase list of a costed run: the costed BOM's orders grouped by supplier, with order quantities in packs and
// units, the MOQ and buy-up noted, unit and line prices, lead times and the latest date each order can be placed.
import type { CurrencyCode } from './book.ts';
import type { CostedBom, CostedLine } from './costing.ts';
import { toCents } from './costing.ts';
import { daysBefore, isIsoDate } from './dates.ts';

/** Why the order quantity is larger than the need: the MOQ, whole packs, or buying up to a cheaper break. */
export const ORDER_REASONS = { need: 'need', moq: 'moq', pack: 'pack', breakUp: 'break' } as const;
export type OrderReason = (typeof ORDER_REASONS)[keyof typeof ORDER_REASONS];

export interface PurchaseLine {
  line: CostedLine;
  /** Whole packs ordered; packs × pack = order quantity. */
  packs: number;
  /** What set the order quantity (the need itself, the MOQ, rounding to packs, or a cheaper higher break). */
  reason: OrderReason;
  /** Latest date to place the order so the parts arrive by the date wanted; undefined without a date wanted. */
  latestOrderDate: string | undefined;
  /** The latest order date is before `today`: ordering now misses the date wanted by the lead time. */
  late: boolean;
}

export interface SupplierOrder {
  supplierId: string;
  supplier: string;
  /** Quote currency of the lines (a supplier quoting in two currencies gives two orders). */
  currency: CurrencyCode;
  lines: PurchaseLine[];
  /** Sum of line prices in the quote currency, exact to the cent. */
  total: number;
  /** Sum of line prices in the base currency, exact to the cent. */
  totalBase: number;
  /** Longest lead time of the order's lines, in days. */
  leadDays: number;
  /** Earliest of the lines' latest order dates: the date the whole order must go by. */
  orderBy: string | undefined;
  late: boolean;
}

export interface PurchaseList {
  variant: string;
  run: number;
  /** Base currency of `totalBase`. */
  currency: CurrencyCode;
  dateWanted: string | undefined;
  orders: SupplierOrder[];
  totalBase: number;
  /** Lines that could not be priced and so are on no order (from the costed BOM). */
  missing: CostedBom['problems'];
}

/** What set a line's order quantity, judged from the quote terms the costing used. */
export function orderReason(l: CostedLine): OrderReason {
  if (l.buy === l.need) return ORDER_REASONS.need;
  const plain = Math.ceil(Math.max(l.need, l.moq) / l.pack) * l.pack;
  if (l.buy > plain) return ORDER_REASONS.breakUp;
  return l.moq > l.need && Math.ceil(l.moq / l.pack) * l.pack === l.buy ? ORDER_REASONS.moq : ORDER_REASONS.pack;
}

/**
 * Groups a costed BOM's lines by supplier (and quote currency): suppliers by name, lines by maker part number.
 * `dateWanted` (ISO) gives each line its latest order date = date wanted − lead days; `today` (ISO) marks lines
 * whose latest date has passed. Supplier totals are sums of integer cents, so they equal the sum of their lines.
 */
export function purchaseList(bom: CostedBom, options: { dateWanted?: string | undefined; today?: string | undefined } = {}): PurchaseList {
  const wanted = options.dateWanted !== undefined && isIsoDate(options.dateWanted) ? options.dateWanted : undefined;
  const today = options.today;
  const by = new Map<string, SupplierOrder>();
  for (const l of bom.lines) {
    const key = `${l.supplierId}\u0000${l.currency}`;
    let o = by.get(key);
    if (!o) {
      o = { supplierId: l.supplierId, supplier: l.supplier, currency: l.currency, lines: [], total: 0, totalBase: 0, leadDays: 0, orderBy: undefined, late: false };
      by.set(key, o);
    }
    const latest = wanted === undefined ? undefined : daysBefore(wanted, l.leadDays);
    o.lines.push({
      line: l,
      packs: l.pack > 0 ? l.buy / l.pack : 0,
      reason: orderReason(l),
      latestOrderDate: latest,
      late: latest !== undefined && today !== undefined && latest < today,
    });
  }
  const orders = [...by.values()].sort((a, b) => a.supplier.localeCompare(b.supplier) || a.currency.localeCompare(b.currency));
  let grand = 0;
  for (const o of orders) {
    o.lines.sort((a, b) => a.line.mpn.localeCompare(b.line.mpn) || a.line.designators.localeCompare(b.line.designators));
    let cents = 0;
    let baseCents = 0;
    for (const p of o.lines) {
      cents += toCents(p.line.extended);
      baseCents += toCents(p.line.extendedBase);
      o.leadDays = Math.max(o.leadDays, p.line.leadDays);
      if (p.latestOrderDate !== undefined && (o.orderBy === undefined || p.latestOrderDate < o.orderBy)) o.orderBy = p.latestOrderDate;
      if (p.late) o.late = true;
    }
    o.total = cents / 100;
    o.totalBase = baseCents / 100;
    grand += baseCents;
  }
  return { variant: bom.variant, run: bom.run, currency: bom.currency, dateWanted: wanted, orders, totalBase: grand / 100, missing: bom.problems };
}
