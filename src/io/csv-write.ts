// The one CSV writer: every CSV file Rungbook makes (the app's exports and the CLI's --csv) is written here, so the
// same rows and choices give the same bytes wherever they are made.
//
// RFC 4180 §2: every record, the last too, ends in CRLF; a quoted field has its inner quotes doubled. A text field is
// quoted when it holds a quote, CR or LF, or any of the three delimiters we offer (comma, semicolon, tab) whatever this
// file's delimiter is, so a program that guesses another delimiter keeps it whole where the quote opens a cell.
// Formula injection (OWASP CSV injection guidance): a text field whose first character other than spaces is = + - @
// (or their full-width forms ＝ ＋ － ＠, which some spreadsheet programs read as the same), or which starts with tab, CR
// or NUL, gets a leading ' and is quoted, so it shows as text and never runs; so does each part of a field after an
// inner comma, semicolon, tab or line break that starts the same way, since a program splitting on that character
// would start a cell there. Numbers we write ourselves are never text: they hold only digits, a sign and our decimal
// mark and are never quoted or prefixed, so a negative number stays a number.
import type { Result } from '../domain/costing.ts';
import { toCents, toTenThousandths } from '../domain/costing.ts';

// ---------------------------------------------------------------------------------------------------------------
// Choices

export const DELIMITERS = { comma: ',', semicolon: ';', tab: '\t' } as const;
export type DelimiterName = keyof typeof DELIMITERS;
export const DECIMAL_STYLES = { point: '.', comma: ',' } as const;
export type DecimalStyle = keyof typeof DECIMAL_STYLES;

export interface ExportOptions {
  delimiter: DelimiterName;
  decimal: DecimalStyle;
  /** Start the file with a UTF-8 byte-order mark (some spreadsheet programs need it to read UTF-8). */
  bom: boolean;
}

export const DEFAULT_EXPORT_OPTIONS: ExportOptions = { delimiter: 'comma', decimal: 'point', bom: false };

/** Reads export choices given as words (CLI options, form values). Unknown words and clashes give a message. */
export function parseExportOptions(given: { delimiter?: string | undefined; decimal?: string | undefined; bom?: boolean | undefined }): Result<ExportOptions> {
  const delimiter = (given.delimiter ?? DEFAULT_EXPORT_OPTIONS.delimiter).trim().toLowerCase();
  const decimal = (given.decimal ?? DEFAULT_EXPORT_OPTIONS.decimal).trim().toLowerCase();
  if (!Object.hasOwn(DELIMITERS, delimiter)) {
    return { ok: false, error: `delimiter must be one of ${Object.keys(DELIMITERS).join(', ')}, got “${given.delimiter ?? ''}”` };
  }
  if (!Object.hasOwn(DECIMAL_STYLES, decimal)) {
    return { ok: false, error: `decimal style must be one of ${Object.keys(DECIMAL_STYLES).join(', ')}, got “${given.decimal ?? ''}”` };
  }
  const options: ExportOptions = { delimiter: delimiter as DelimiterName, decimal: decimal as DecimalStyle, bom: given.bom ?? false };
  const clash = exportOptionsProblem(options);
  return clash ? { ok: false, error: clash } : { ok: true, value: options };
}

/** Why a set of choices cannot make a readable file, or undefined. */
export function exportOptionsProblem(o: ExportOptions): string | undefined {
  if (o.decimal === 'comma' && o.delimiter === 'comma') {
    return 'with a decimal comma the delimiter cannot also be a comma: choose semicolon or tab';
  }
  return undefined;
}

// ---------------------------------------------------------------------------------------------------------------
// Cells

/** How a number is written: a whole quantity, money (2 decimals), a per-unit figure (4), or a price as quoted. */
export const NUMBER_KINDS = { qty: 'qty', money: 'money', unit: 'unit', price: 'price' } as const;
export type NumberKind = (typeof NUMBER_KINDS)[keyof typeof NUMBER_KINDS];

export interface NumberCell {
  n: number;
  kind: NumberKind;
}

/** A text cell, a number cell, or empty. */
export type ExportCell = string | NumberCell | undefined;

/** Writes integer units of 10^-dp as a decimal with exactly dp digits, from integer arithmetic only. */
function fixedFromInteger(units: number, dp: number): string {
  const sign = units < 0 ? '-' : '';
  const abs = Math.abs(units);
  const scale = 10 ** dp;
  const whole = Math.floor(abs / scale);
  const frac = String(abs - whole * scale).padStart(dp, '0');
  return `${sign}${whole}.${frac}`;
}

/** The shortest text that reads back as the same double, never in exponent form, with at least `minDp` decimals. */
function plainDecimal(n: number, minDp: number): string {
  let s = String(Math.abs(n));
  if (/e/i.test(s)) s = Math.abs(n).toFixed(12).replace(/0+$/, '').replace(/\.$/, '');
  const dp = s.includes('.') ? s.length - s.indexOf('.') - 1 : 0;
  if (dp < minDp) s += (dp === 0 ? '.' : '') + '0'.repeat(minDp - dp);
  return (n < 0 ? '-' : '') + s;
}

/**
 * A number as the file shows it, with a point; callers swap the decimal sign. Non-finite numbers are empty. Amounts
 * are written from integer cents / ten-thousandths (the costing module's rounding rule), prices as quoted.
 */
export function numberText(cell: NumberCell): string {
  const n = cell.n;
  if (!Number.isFinite(n)) return '';
  switch (cell.kind) {
    case 'qty':
      return Number.isInteger(n) ? String(n) : plainDecimal(n, 0);
    case 'money':
      return fixedFromInteger(toCents(n), 2);
    case 'unit':
      return fixedFromInteger(toTenThousandths(n), 4);
    case 'price':
      return plainDecimal(n, 2);
  }
}

// A formula trigger after any run of white space (a spreadsheet program skips it before reading a formula; \s takes in
// U+3000, the full-width space), or a cell starting with tab, CR or NUL (OWASP CSV injection guidance).
// U+FF1D U+FF0B U+FF0D U+FF20 are the full-width = + - @.
const FORMULA_START = /^\s*[=+\-@\uFF1D\uFF0B\uFF0D\uFF20]|^[\t\r\0]/;
// The same trigger just after a delimiter or line break inside the text (spaces between allowed): a program that
// splits the file on another delimiter, or ignores quotes, starts a cell there. Quoting alone keeps such a cell whole
// only where the quote opens a cell in that program's reading too, which it does not for any column but the first.
const INNER_FORMULA_START = /([,;\t\r\n])(?=[^\S\t\r\n]*[=+\-@\uFF1D\uFF0B\uFF0D\uFF20])/g;
// Quotes, line breaks and every delimiter we offer, whatever this file's delimiter is (RFC 4180 §2 for the first three).
const NEEDS_QUOTES = /[",;\t\r\n]/;

/** True when a text cell, or a part of it after a delimiter or line break, would be read as a formula. */
export function isFormulaLike(text: string): boolean {
  INNER_FORMULA_START.lastIndex = 0;
  return FORMULA_START.test(text) || INNER_FORMULA_START.test(text);
}

/**
 * One text field as it appears in the file. Each place a formula could start (the start of the text, or just after
 * an inner delimiter or line break) gets a ' before it, as the start always did; the field is then quoted when it
 * holds a quote, a line break or any delimiter.
 */
export function textField(text: string): string {
  let safe = text.replace(INNER_FORMULA_START, "$1'");
  if (FORMULA_START.test(text)) safe = `'${safe}`;
  return safe !== text || NEEDS_QUOTES.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe;
}

/** One field as it appears in the file under the given choices. */
export function exportField(cell: ExportCell, o: ExportOptions): string {
  if (cell === undefined) return '';
  if (typeof cell === 'string') return textField(cell);
  const t = numberText(cell);
  return o.decimal === 'comma' ? t.replace('.', ',') : t;
}

/** Rows to CSV text (a byte-order mark first when chosen; every record, the last too, ended by CRLF). */
export function exportText(rows: readonly (readonly ExportCell[])[], o: ExportOptions): string {
  const delimiter = DELIMITERS[o.delimiter];
  let out = o.bom ? '\uFEFF' : '';
  for (const row of rows) out += row.map((c) => exportField(c, o)).join(delimiter) + '\r\n';
  return out;
}

/** The file's bytes: the text in UTF-8 (the byte-order mark, when chosen, is EF BB BF). */
export function exportBytes(text: string): Uint8Array {
  return new TextEncoder().encode(text);
}

/**
 * Blocks of rows as one table: every row padded to the widest block's width (RFC 4180 §2: each record holds the same
 * number of fields) and one empty record between blocks, so a spreadsheet shows a blank row there and a program finds
 * each block by splitting at the records whose fields are all empty.
 */
export function blockRows(blocks: readonly (readonly (readonly ExportCell[])[])[]): ExportCell[][] {
  const width = Math.max(1, ...blocks.flatMap((b) => b.map((r) => r.length)));
  const pad = (r: readonly ExportCell[]): ExportCell[] => [...r, ...new Array<ExportCell>(width - r.length).fill(undefined)];
  const out: ExportCell[][] = [];
  blocks.forEach((b, i) => {
    if (i > 0) out.push(pad([]));
    for (const r of b) out.push(pad(r));
  });
  return out;
}
