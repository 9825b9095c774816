// How numbers are written for people to read, in the app, the CLI and the engine's messages: one locale, grouped
// counts, fixed decimals, money with or without its currency, and short figures for messages.
import { roundHalfUp } from './money.ts';

/** The one locale for figures shown to people (grouping with commas, a decimal point, £ and US$ as written in the UK). */
export const LOCALE = 'en-GB';

// One formatter per shape, made once: Number#toLocaleString builds a new formatter on every call, which costs the
// page tens of milliseconds on a table of a few thousand figures.
const GROUPED = new Intl.NumberFormat(LOCALE);
const FIXED = new Map<number, Intl.NumberFormat>();

/** A count or other whole number with grouping: 12,500. */
export function grouped(n: number): string {
  return GROUPED.format(n);
}

/** A figure with grouping and exactly `digits` decimals: 1,234.50. */
export function fixed(n: number, digits: number): string {
  let f = FIXED.get(digits);
  if (!f) FIXED.set(digits, (f = new Intl.NumberFormat(LOCALE, { minimumFractionDigits: digits, maximumFractionDigits: digits })));
  return f.format(n);
}

/**
 * What a money figure stands for, which alone decides how many decimals it shows: the one money rule for every page,
 * the printed run sheet and the CLI's tables (a page names the kind; it never picks digits itself).
 *
 * - `partPrice`: a part's price or cost per piece, or a part's share of one finished unit. A cheap part costs less than
 *   a cent (a resistor at 0.0042), so it keeps sub-cent digits: at least 2 decimals, at most 4 (1.50, 0.0042).
 * - `unitCost`: a variant's (an assembled unit's) cost per unit and the figures it is made of (material, labour,
 *   test and overhead per unit, the price at a margin): to the cent.
 * - `total`: every total and extended amount (a line, an order, a supplier, a run, stock, a difference): to the cent.
 */
export const MONEY_KINDS = {
  partPrice: { min: 2, max: 4 },
  unitCost: { min: 2, max: 2 },
  total: { min: 2, max: 2 },
} as const;
export type MoneyKind = keyof typeof MONEY_KINDS;

/** Decimals of a variant's unit cost and of every total. */
export const MONEY_DIGITS = MONEY_KINDS.total.max;

const MONEY_FORMATS = new Map<MoneyKind, Intl.NumberFormat>();

/**
 * An amount rounded to the kind's last digit by the costing's rounding rule (half away from zero, domain/money.ts),
 * so a page shows the same digits as the costing and its files (1.005 to the cent is 1.01, not 1.00).
 */
function roundedFor(amount: number, kind: MoneyKind): number {
  const scale = 10 ** MONEY_KINDS[kind].max;
  return roundHalfUp(amount * scale) / scale;
}

/** A money figure with grouping and the kind's decimals (the currency is named in headings); — when not a number. */
export function money(amount: number, kind: MoneyKind): string {
  if (!Number.isFinite(amount)) return '—';
  let f = MONEY_FORMATS.get(kind);
  if (!f) {
    const { min, max } = MONEY_KINDS[kind];
    MONEY_FORMATS.set(kind, (f = new Intl.NumberFormat(LOCALE, { minimumFractionDigits: min, maximumFractionDigits: max })));
  }
  const r = roundedFor(amount, kind);
  return f.format(r === 0 ? 0 : r);
}

/** A money figure with the kind's decimals and no grouping, for a table a program may read back (the CLI's): 1234.50. */
export function moneyDigits(amount: number, kind: MoneyKind): string {
  if (!Number.isFinite(amount)) return '';
  const { min, max } = MONEY_KINDS[kind];
  const r = roundedFor(amount, kind);
  const s = (r === 0 ? 0 : r).toFixed(max);
  // Trailing zeros beyond the kind's least decimals go (0.0042, 1.50).
  return max > min ? s.replace(new RegExp(`(\\.\\d{${min}}\\d*?)0+$`), '$1') : s;
}

/** A signed money figure for differences: "+0.12", "−0.05", "0.00" (a part's: "+0.0042"). */
export function signedMoney(amount: number, kind: MoneyKind): string {
  if (!Number.isFinite(amount)) return '—';
  const r = roundedFor(amount, kind);
  if (r === 0) return money(0, kind);
  return `${r > 0 ? '+' : '−'}${money(Math.abs(r), kind)}`;
}

/** Each currency and kind's format, with the texts it already wrote by the rounded amount. */
const currencyFormats = new Map<string, { format: Intl.NumberFormat; texts: Map<number, string> }>();
/**
 * Texts kept per currency and kind. The Family grid writes every unit cost again each time it is drawn (800 figures
 * for 200 variants at four run sizes, about 7 ms of a grid edit in Chromium), mostly the same amounts as before.
 */
export const MONEY_TEXTS_KEPT = 10_000;

/** Money with its currency sign, grouped, the kind's decimals: €1,234.50. A code the platform does not know is left out. */
export function currencyMoney(amount: number, currency: string, kind: MoneyKind): string {
  const key = `${currency} ${kind}`;
  let held = currencyFormats.get(key);
  if (!held) {
    const decimals = { minimumFractionDigits: MONEY_KINDS[kind].min, maximumFractionDigits: MONEY_KINDS[kind].max };
    let format: Intl.NumberFormat;
    try {
      format = new Intl.NumberFormat(LOCALE, { style: 'currency', currency, ...decimals });
    } catch {
      format = new Intl.NumberFormat(LOCALE, decimals);
    }
    currencyFormats.set(key, (held = { format, texts: new Map() }));
  }
  const r = roundedFor(amount, kind);
  // Zero is written at once: a kept text could not tell 0 from -0 (a Map holds them as one key).
  if (r === 0) return held.format.format(r);
  let text = held.texts.get(r);
  if (text === undefined) {
    text = held.format.format(r);
    if (held.texts.size >= MONEY_TEXTS_KEPT) held.texts.clear();
    held.texts.set(r, text);
  }
  return text;
}

/** A number in a message: whole numbers as they are, others to `digits` significant digits without trailing zeros. */
export function significant(n: number, digits = 4): string {
  return Number.isInteger(n) ? String(n) : String(Number(n.toPrecision(digits)));
}
