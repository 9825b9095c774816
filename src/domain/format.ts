// How numbers are written for people to read, in the app, the CLI and the engine's messages: one locale, grouped
// counts, fixed decimals, money with or without its currency, and short figures for messages.

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
 * Decimals of money on every page: unit costs, prices, totals and the differences between them, to the cent (as the
 * Family page, the Runs page's totals and the charts show them).
 */
export const MONEY_DIGITS = 2;
/**
 * Decimals of a part's cost per finished unit, the one place money keeps more: a cheap part (a resistor at 0.0012 a
 * unit) would read 0.00 to the cent.
 */
export const PART_UNIT_DIGITS = 4;

/** A money figure with grouping and a fixed number of decimals (the currency is named in headings); — when not a number. */
export function money(amount: number, digits = MONEY_DIGITS): string {
  if (!Number.isFinite(amount)) return '—';
  return fixed(amount, digits);
}

/** A signed money figure for differences: "+0.12", "−0.05", "0.00" (with `digits` 4: "+0.1234"). */
export function signedMoney(amount: number, digits = MONEY_DIGITS): string {
  const r = Number(amount.toFixed(digits));
  if (r === 0) return money(0, digits);
  return `${r > 0 ? '+' : '−'}${money(Math.abs(r), digits)}`;
}

const currencyFormats = new Map<string, Intl.NumberFormat>();

/** Money with its currency sign, grouped, `digits` decimals: €1,234.50. A code the platform does not know is left out. */
export function currencyMoney(amount: number, currency: string, digits = 2): string {
  const key = `${currency} ${digits}`;
  let f = currencyFormats.get(key);
  if (!f) {
    const decimals = { minimumFractionDigits: digits, maximumFractionDigits: digits };
    try {
      f = new Intl.NumberFormat(LOCALE, { style: 'currency', currency, ...decimals });
    } catch {
      f = new Intl.NumberFormat(LOCALE, decimals);
    }
    currencyFormats.set(key, f);
  }
  return f.format(amount);
}

/** A number in a message: whole numbers as they are, others to `digits` significant digits without trailing zeros. */
export function significant(n: number, digits = 4): string {
  return Number.isInteger(n) ? String(n) : String(Number(n.toPrecision(digits)));
}
