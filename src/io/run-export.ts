// The files a production run leaves Rungbook as: the costed BOM and the purchase list, as rows and CSV text. The app's
// Export and Runs pages and the CLI's `cost --csv` and `buy --csv` all take their bytes from here, written by the one
// CSV writer (csv-write.ts: quoting, formula-injection neutralising, delimiter, decimal and byte-order-mark choices),
// so the same run and the same settings give the same file wherever it is made.
//
// Rounding (the costing module's one rule, domain/costing.ts): amounts are cents, per-unit figures 4 decimals, both
// written from integer cents / ten-thousandths so the digits are exact; unit prices are written as quoted. The run
// material row is the sum of the landed base-currency column (goods + freight + duty + charges, domain/landed.ts), the leftover value row the sum of its column, the
// unit cost the sum of the four per-unit rows, and the run total the run material plus the run's labour, test and
// overhead row: every total equals the sum of the rows it is made of, to the cent.
//
// Layout (both files): three blocks, one empty record between them, every record as wide as the widest (RFC 4180 §2):
// a head naming the file, the run, its variant and quantity, the freeze date and the rates (label, value); the table
// (a header row, then one row per line); and the totals (label, value). A spreadsheet shows each block under the last
// with a blank row between; a program takes the table as the records between the first two empty ones, and no total
// is ever read as a line.
import type { Book, Part, Run } from '../domain/book.ts';
import type { CostedBom, Result } from '../domain/costing.ts';
import { toCents, toTenThousandths } from '../domain/costing.ts';
import { readSnapshot } from '../domain/freeze.ts';
import { onHandByPart } from '../domain/stock.ts';
import type { FrozenSnapshot } from '../domain/freeze.ts';
import type { PurchaseList } from '../domain/purchase.ts';
import { MAINS_CAUTION, MAINS_CAUTION_LABEL } from '../domain/mains-caution.ts';
import { formatValue } from '../domain/units.ts';
import { CostingWorkbook, resolutionFromFamily } from '../engine/costing.ts';
import { resolveFamily } from '../engine/family.ts';
import { DEFAULT_EXPORT_OPTIONS, NUMBER_KINDS, blockRows, exportOptionsProblem, exportText } from './csv-write.ts';
import type { ExportCell, ExportOptions, NumberCell } from './csv-write.ts';

// The export pages and commands take the choices and the number writing from here with the rows they shape.
export {
  DECIMAL_STYLES,
  DEFAULT_EXPORT_OPTIONS,
  DELIMITERS,
  NUMBER_KINDS,
  exportBytes,
  exportField,
  exportOptionsProblem,
  exportText,
  numberText,
  parseExportOptions,
} from './csv-write.ts';
export type { DecimalStyle, DelimiterName, ExportCell, ExportOptions, NumberCell, NumberKind } from './csv-write.ts';

const qty = (n: number): NumberCell => ({ n, kind: NUMBER_KINDS.qty });
const money = (n: number): NumberCell => ({ n, kind: NUMBER_KINDS.money });
const unit = (n: number): NumberCell => ({ n, kind: NUMBER_KINDS.unit });
const price = (n: number): NumberCell => ({ n, kind: NUMBER_KINDS.price });

// ---------------------------------------------------------------------------------------------------------------
// Costing a run

/** A run's costing and what an export needs beside it. */
export interface RunCosting {
  bom: CostedBom;
  /** Margin the price row is computed with. */
  marginPct: number;
  /** The parts the lines refer to (from the Book, or from the frozen snapshot). */
  parts: readonly Part[];
  /** Set when the costing is a frozen run's snapshot. */
  frozen?: { at: string; snapshot: FrozenSnapshot };
  /** Units of the base currency for one unit of each currency, as costed (the snapshot's when frozen). */
  rates?: Readonly<Record<string, number>>;
}

/**
 * Costs one variant for a run of `quantity` with today's quotes (or those valid at `date`): the family resolver
 * gives the variant's lines, the costing workbook the figures, exactly as every other screen and the CLI cost them.
 */
export function costVariant(
  book: Book,
  variantId: string,
  quantity: number,
  options: { date?: string; dateWanted?: string; onHand?: ReadonlyMap<string, number> } = {},
): Result<RunCosting> {
  const variant = book.variants.find((v) => v.id === variantId);
  if (!variant) return { ok: false, error: `no variant with id ${variantId} in the Book` };
  if (!Number.isSafeInteger(quantity) || quantity < 1) return { ok: false, error: `run quantity must be a whole number ≥ 1, got ${quantity}` };
  // Only this variant and this run size are compiled; lines, parts and quotes stay whole.
  const subject: Book = { ...book, variants: [variant], settings: { ...book.settings, runSizes: [quantity] } };
  const opened = CostingWorkbook.open(subject, resolutionFromFamily(resolveFamily(subject)), options.date === undefined ? {} : { date: options.date });
  if (!opened.ok) return opened;
  const wb = opened.value;
  try {
    const bom = wb.costedBom(variant.id, quantity, { dateWanted: options.dateWanted, onHand: options.onHand });
    if (!bom.ok) return bom;
    return { ok: true, value: { bom: bom.value, marginPct: book.settings.marginPct, parts: book.parts, rates: book.settings.rates } };
  } finally {
    wb.close();
  }
}

/** A frozen run's costing, read from its snapshot. */
export function frozenCosting(run: Run): Result<RunCosting> {
  if (!run.frozen) return { ok: false, error: `run ${run.name} is not frozen` };
  const s = readSnapshot(run.frozen);
  if (!s.ok) return s;
  const snapshot = s.value;
  return {
    ok: true,
    value: { bom: snapshot.bom, marginPct: snapshot.settings.marginPct, parts: snapshot.parts, frozen: { at: run.frozen.at, snapshot }, rates: snapshot.settings.rates },
  };
}

/** The costing a run's exports use: its frozen snapshot when it is frozen (unless `fresh`), else today's. */
export function runCosting(book: Book, run: Run, options: { fresh?: boolean; date?: string } = {}): Result<RunCosting> {
  if (run.frozen && !options.fresh) return frozenCosting(run);
  return costVariant(book, run.variantId, run.quantity, { ...runSupply(book, run), ...(options.date === undefined ? {} : { date: options.date }) });
}

/** What decides a run's approved alternates: its date wanted, and the stock on hand. */
export function runSupply(book: Book, run: Run): { dateWanted: string; onHand: Map<string, number> } {
  return { dateWanted: run.dateWanted, onHand: onHandByPart(book.stockMoves) };
}

// ---------------------------------------------------------------------------------------------------------------
// Head of a run file

/** What a run file says of itself beyond its costing: the name of the Run of the Book it was made for, if any. */
export interface RunFileAbout {
  run?: string | undefined;
}

/** Finds the Run of the Book a variant and quantity stand for (the first with both), for its name in the file's head. */
export function runAbout(book: Book, variantId: string, quantity: number): RunFileAbout {
  return { run: book.runs.find((r) => r.variantId === variantId && r.quantity === quantity)?.name };
}

/**
 * The head block of a run file: what it is, the mains caution in full (a costed BOM or purchase list travels without
 * the app around it), the run, variant and quantity, the freeze, the quotes' date and the rates.
 */
export function runFileHead(what: string, c: RunCosting, about: RunFileAbout): ExportCell[][] {
  const bom = c.bom;
  const rows: ExportCell[][] = [
    ['file', what],
    [MAINS_CAUTION_LABEL, MAINS_CAUTION],
    ['run', about.run ?? ''],
    ['variant', bom.variant],
    ['quantity', qty(bom.run)],
    ['frozen', c.frozen ? c.frozen.at : 'no: costed with the quotes of the day'],
    ['quotes valid on', bom.date],
    ['base currency', bom.currency],
  ];
  // The rates of the currencies the lines are priced in.
  const used = [...new Set(bom.lines.map((l) => l.currency))].filter((cur) => cur !== bom.currency).sort();
  for (const cur of used) {
    const rate = c.rates?.[cur];
    rows.push([`rate ${cur} (${bom.currency} for one ${cur})`, rate === undefined ? '' : price(rate)]);
  }
  return rows;
}

// ---------------------------------------------------------------------------------------------------------------
// Costed BOM

/** How the part of a line reads: kind, principal value and package ("resistor 47 kΩ 0603"). */
export function partLabel(part: Part | undefined): string {
  if (!part) return '';
  const value = part.value === undefined ? '' : formatValue(part.value, part.unit ?? '');
  return [part.kind, value, part.package].filter((s) => s !== '').join(' ');
}

/** Column names of the costed BOM (the base-currency columns carry the currency code). */
export function costedBomHeader(currency: string): string[] {
  return [
    'designators',
    'mpn',
    'description',
    'need',
    'buy',
    'qty_per_unit',
    'part',
    'maker',
    'supplier',
    'supplier_code',
    'break_qty',
    'unit_price',
    'currency',
    'extended',
    `extended_${currency}`,
    'incoterm',
    `freight_${currency}`,
    `duty_${currency}`,
    `charges_${currency}`,
    `landed_${currency}`,
    'leftover',
    `leftover_value_${currency}`,
    'part_choice',
    'approved_parts',
  ];
}

/** Index of the landed base-currency amount column (goods + freight + duty + charges): its sum is the run material total. */
export const COSTED_TOTAL_COLUMN = 19;
export const COSTED_LEFTOVER_COLUMN = 21;

/** A line's landed amount in cents: its goods in the base currency plus freight, duty and charges (0 where a costing frozen before landed cost has none). */
function landedLineCents(l: CostedBom['lines'][number]): number {
  return toCents(l.extendedBase) + toCents(l.freight ?? 0) + toCents(l.duty ?? 0) + toCents(l.charges ?? 0);
}

/** Labels of the totals rows, in file order, for a base currency and margin. */
export function costedTotalLabels(currency: string, marginPct: number) {
  return {
    material: `material per unit (${currency})`,
    labour: `labour per unit (${currency})`,
    test: `test per unit (${currency})`,
    overhead: `overhead per unit (${currency})`,
    unitCost: `unit cost (${currency})`,
    price: `price at ${marginPct} % margin (${currency})`,
    materialRun: `run material (${currency})`,
    landedRun: `of which landed cost: freight, duty, charges (${currency})`,
    conversionRun: `run labour, test and overhead (${currency})`,
    runTotal: `run total (${currency})`,
    leftoverValue: `leftover stock value (${currency})`,
  } as const;
}

/** The costed BOM as rows: the head block, the table (header, one row per build line, lines not priced), the totals. */
export function costedBomRows(c: RunCosting, about: RunFileAbout = {}): ExportCell[][] {
  const { bom } = c;
  const head = costedBomHeader(bom.currency);
  const parts = new Map(c.parts.map((p) => [p.id, p] as const));
  const rows: ExportCell[][] = [head];
  for (const l of bom.lines) {
    const part = parts.get(l.partId);
    rows.push([
      l.designators,
      l.mpn,
      l.description,
      qty(l.need),
      qty(l.buy),
      qty(l.qtyPerUnit),
      partLabel(part),
      part?.maker ?? '',
      l.supplier,
      l.supplierCode,
      qty(l.breakQty),
      price(l.unitPrice),
      l.currency,
      money(l.extended),
      money(l.extendedBase),
      l.incoterm ?? '',
      money(l.freight ?? 0),
      money(l.duty ?? 0),
      money(l.charges ?? 0),
      money(landedLineCents(l) / 100),
      qty(l.leftover),
      money(l.leftoverValue),
      // Why this approved part was bought; "single approved source" marks a line with nothing to fall back on.
      l.partChoice?.reason ?? '',
      l.partChoice === undefined ? undefined : qty(l.partChoice.approved),
    ]);
  }
  for (const p of bom.problems) {
    const row: ExportCell[] = new Array<ExportCell>(head.length).fill(undefined);
    row[0] = p.designators ?? '';
    row[2] = `NOT PRICED: ${p.message}`;
    rows.push(row);
  }
  const labels = costedTotalLabels(bom.currency, c.marginPct);
  const materialCents = bom.lines.reduce((s, l) => s + landedLineCents(l), 0);
  const leftoverCents = bom.lines.reduce((s, l) => s + toCents(l.leftoverValue), 0);
  const conversionCents = toCents(bom.runTotal) - toCents(bom.materialRun);
  const totals: ExportCell[][] = [];
  const total = (label: string, value: NumberCell): void => {
    totals.push([label, value]);
  };
  total(labels.material, unit(bom.material));
  total(labels.labour, unit(bom.labour));
  total(labels.test, unit(bom.test));
  total(labels.overhead, unit(bom.overhead));
  total(labels.unitCost, unit((toTenThousandths(bom.material) + toTenThousandths(bom.labour) + toTenThousandths(bom.test) + toTenThousandths(bom.overhead)) / 10_000));
  total(labels.price, unit(bom.price));
  // Written from the lines' own cents, so a reader summing the landed column gets the same figure.
  total(labels.materialRun, money(materialCents / 100));
  total(labels.conversionRun, money(conversionCents / 100));
  total(labels.runTotal, money((materialCents + conversionCents) / 100));
  total(labels.leftoverValue, money(leftoverCents / 100));
  return blockRows([runFileHead('costed BOM', c, about), rows, totals]);
}

/** The costed BOM CSV text (byte-order mark included when chosen). Clashing choices give a message. */
export function costedBomCsv(c: RunCosting, o: ExportOptions = DEFAULT_EXPORT_OPTIONS, about: RunFileAbout = {}): Result<string> {
  const bad = exportOptionsProblem(o);
  if (bad) return { ok: false, error: bad };
  return { ok: true, value: exportText(costedBomRows(c, about), o) };
}

// ---------------------------------------------------------------------------------------------------------------
// Purchase list

export function purchaseListHeader(currency: string): string[] {
  return [
    'supplier',
    'supplier_code',
    'mpn',
    'description',
    'designators',
    'need',
    'packs',
    'pack',
    'order_qty',
    'moq',
    'unit_price',
    'currency',
    'line_price',
    `line_price_${currency}`,
    'lead_days',
    'latest_order_date',
    'order_reason',
  ];
}

/** Labels of the purchase list's totals: each supplier's order in its currency and in the base, and all suppliers. */
export function purchaseTotalLabels(base: string) {
  return {
    order: (supplier: string, currency: string) => `total ${supplier} (${currency})`,
    orderBase: (supplier: string) => `total ${supplier} (${base})`,
    all: `all suppliers (${base})`,
  } as const;
}

/**
 * The purchase list as rows: the head block, the table (header, one row per order line, suppliers together) and the
 * totals (each supplier's order, all suppliers), made from the run's costing and its list.
 */
export function purchaseListRows(c: RunCosting, list: PurchaseList, about: RunFileAbout = {}): ExportCell[][] {
  const rows: ExportCell[][] = [purchaseListHeader(list.currency)];
  for (const o of list.orders) {
    for (const p of o.lines) {
      const l = p.line;
      rows.push([
        o.supplier,
        l.supplierCode,
        l.mpn,
        l.description,
        l.designators,
        qty(l.need),
        qty(p.packs),
        qty(l.pack),
        qty(l.buy),
        qty(l.moq),
        price(l.unitPrice),
        l.currency,
        money(l.extended),
        money(l.extendedBase),
        qty(l.leadDays),
        p.latestOrderDate ?? '',
        p.reason,
      ]);
    }
  }
  const labels = purchaseTotalLabels(list.currency);
  const totals: ExportCell[][] = [];
  for (const o of list.orders) {
    totals.push([labels.order(o.supplier, o.currency), money(o.total)]);
    totals.push([labels.orderBase(o.supplier), money(o.totalBase)]);
  }
  totals.push([labels.all, money(list.totalBase)]);
  const head = runFileHead('purchase list', c, about);
  if (list.dateWanted !== undefined) head.push(['date wanted', list.dateWanted]);
  return blockRows([head, rows, totals]);
}

/** The purchase list CSV text (byte-order mark included when chosen). Clashing choices give a message. */
export function purchaseListCsv(c: RunCosting, list: PurchaseList, o: ExportOptions = DEFAULT_EXPORT_OPTIONS, about: RunFileAbout = {}): Result<string> {
  const bad = exportOptionsProblem(o);
  if (bad) return { ok: false, error: bad };
  return { ok: true, value: exportText(purchaseListRows(c, list, about), o) };
}

// ---------------------------------------------------------------------------------------------------------------
// File names

/** A piece of a file name: letters, digits, dots and dashes only, at most 60 characters. */
export function fileSlug(text: string): string {
  return (
    text
      .normalize('NFKD')
      .replace(/[^\w.-]+/g, '-')
      .replace(/^-+|-+$/g, '')
      .slice(0, 60) || 'rungbook'
  );
}

/** File name of a run export: variant, quantity and what the file holds ("FR4-60-CD-2000-costed-bom.csv"). */
export function runExportFileName(variantCode: string, quantity: number, what: 'costed-bom' | 'purchase-list'): string {
  return `${fileSlug(variantCode)}-${quantity}-${what}.csv`;
}
