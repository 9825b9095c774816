// Evaluates the user's own notebook pages: each section's small grid becomes one engine sheet (Section1, Section2…,
// so a cell may read another section as Section2!B3), and the book functions (VAR, CHECK, PART_PRICE…) read the Book.
import { columnLetters } from './cells.ts';
import type { CellValue } from 'hyperformula';
import { DetailedCellError } from 'hyperformula';
import type { Book, NotebookPage, ParamValue, Variant } from '../domain/book.ts';
import { mpnKey } from '../domain/book.ts';
import { candidateQuotes, chooseQuote, prepareCosting } from '../domain/costing.ts';
import type { CostingContext, Result } from '../domain/costing.ts';
import { parseValue } from '../domain/units.ts';
import { createEngine } from './create.ts';
import { evaluateChecks } from './family.ts';
import type { CheckResult } from './family.ts';
import { guardFormula } from './formula-guard.ts';
import { nameKey } from './formula-names.ts';
import type { BookFunctionContext, CheckLookup, Missing, PriceLookup } from './functions/book.ts';

/** Largest grid a section may hold; the grids are for small side calculations, not tables of data. */
export const NOTEBOOK_LIMITS = { rows: 100, cols: 26 } as const;

export interface BookContextOptions {
  /** Check results to use (for example from a live check session); evaluated from the Book when first needed. */
  checkResults?: () => readonly CheckResult[];
  /** Costing date for quote expiry, YYYY-MM-DD; default the Book's costing date, else today. */
  date?: string;
}

function findVariant(book: Book, code: string): Variant | undefined {
  const key = code.trim().toUpperCase();
  return book.variants.find((v) => v.code.toUpperCase() === key);
}

/** The Book as the book functions see it. Check results and quote preparation are computed once, on first use. */
export function bookFunctionContext(book: Book, options: BookContextOptions = {}): BookFunctionContext {
  let checks: Map<string, CheckResult> | undefined;
  let costing: Result<CostingContext> | undefined;
  const noVariant = (code: string): Missing => ({ error: `no variant with code "${code}" in the Book` });
  return {
    kind: 'rungbook-book',
    variantParam(code: string, name: string): ParamValue | Missing {
      const v = findVariant(book, code);
      if (!v) return noVariant(code);
      const key = nameKey(name.trim());
      for (const [k, val] of Object.entries(v.params)) if (nameKey(k) === key) return val;
      return { error: `variant ${v.code} has no parameter "${name}"` };
    },
    checkResult(code: string, name: string): CheckLookup | Missing {
      const v = findVariant(book, code);
      if (!v) return noVariant(code);
      const key = nameKey(name.trim());
      if (!book.checks.some((c) => nameKey(c.name) === key)) return { error: `no check named "${name}" in the Book` };
      if (!checks) {
        checks = new Map();
        for (const r of options.checkResults?.() ?? evaluateChecks(book)) checks.set(`${r.variantId}\u0000${nameKey(r.checkName)}`, r);
      }
      const r = checks.get(`${v.id}\u0000${key}`);
      if (!r) return { error: `check "${name}" has no result for ${v.code}` };
      return { value: r.value, status: r.status, unit: r.unit, message: r.message };
    },
    partPrice(mpn: string, qty: number): PriceLookup | Missing {
      const key = mpnKey(mpn);
      const part = book.parts.find((p) => mpnKey(p.mpn) === key);
      if (!part) return { error: `no part with maker part number "${mpn}" in the Book` };
      costing ??= prepareCosting(book, options.date === undefined ? {} : { date: options.date });
      if (!costing.ok) return { error: costing.error };
      const choice = chooseQuote(candidateQuotes(costing.value, part.id, undefined), qty, part.mpn);
      if (!choice.ok) return { error: choice.error };
      return {
        unitPrice: choice.value.buy.unitPrice * choice.value.rate,
        extended: choice.value.extendedBase,
        buy: choice.value.buy.buy,
      };
    },
  };
}

export const CELL_KIND = {
  empty: 'empty',
  value: 'value',
  formula: 'formula',
} as const;
export type CellKind = (typeof CELL_KIND)[keyof typeof CELL_KIND];

export interface NotebookCell {
  /** What the user wrote. */
  input: string;
  kind: CellKind;
  /** The computed value; null for an empty cell or an error. */
  value: number | string | boolean | null;
  /** Error code such as "#VALUE!", with `message` saying why. */
  error?: string;
  message?: string;
}

export interface NotebookSectionResult {
  /** Sheet name other sections use to refer to this grid (Section1, Section2…). */
  sheet: string;
  grid: NotebookCell[][];
}

export interface NotebookResult {
  sections: NotebookSectionResult[];
}

/** Name of the engine sheet holding section `index` (0-based); written in formulas as Section2!A1. */
export function sectionSheetName(index: number): string {
  return `Section${index + 1}`;
}

/** What the engine is given for a cell: a formula as written, an engineering value as its number, else text. */
export function cellInput(raw: string): number | string | null {
  const t = raw.trim();
  if (t === '') return null;
  if (t.startsWith('=')) return t;
  const v = parseValue(t);
  // A leading apostrophe keeps text as text, whatever it looks like.
  return v.ok ? v.value : `'${raw}`;
}

/**
 * Why a typed formula is not handed to the engine (too long, too deeply nested, a huge range: see formula-guard.ts),
 * or undefined for anything the engine may evaluate. Such a formula could freeze the page or overflow the stack.
 */
function refusedFormula(raw: string): string | undefined {
  const t = raw.trim();
  if (!t.startsWith('=')) return undefined;
  const g = guardFormula(t);
  return g.ok ? undefined : g.refusal.message;
}

function cellResult(input: string, v: CellValue): NotebookCell {
  const kind: CellKind = input.trim() === '' ? CELL_KIND.empty : input.trim().startsWith('=') ? CELL_KIND.formula : CELL_KIND.value;
  if (v instanceof DetailedCellError) return { input, kind, value: null, error: v.value, message: v.message || v.value };
  if (typeof v === 'number' && !Number.isFinite(v)) return { input, kind, value: null, error: '#NUM!', message: 'not a finite number' };
  return { input, kind, value: v ?? null };
}

/**
 * Evaluates every grid of a page against the Book. Never throws for what the user wrote: each bad cell carries its
 * error and message. Cells beyond NOTEBOOK_LIMITS are not evaluated and say so.
 */
export function evaluateNotebookPage(book: Book, page: NotebookPage, options: BookContextOptions = {}): NotebookResult {
  const hf = createEngine({ context: bookFunctionContext(book, options) });
  try {
    const ids = page.sections.map((s, i) => {
      if (s.grid.length === 0) return undefined;
      const name = hf.addSheet(sectionSheetName(i));
      return hf.getSheetId(name)!;
    });
    hf.batch(() => {
      page.sections.forEach((s, i) => {
        const sheet = ids[i];
        if (sheet === undefined) return;
        const rows = s.grid
          .slice(0, NOTEBOOK_LIMITS.rows)
          .map((row) => row.slice(0, NOTEBOOK_LIMITS.cols).map((raw) => (refusedFormula(raw) === undefined ? cellInput(raw) : null)));
        hf.setSheetContent(sheet, rows);
      });
    });
    const sections = page.sections.map((s, i) => {
      const sheet = ids[i];
      const grid = s.grid.map((row, r) =>
        row.map((input, c): NotebookCell => {
          if (sheet === undefined) return cellResult(input, null);
          if (r >= NOTEBOOK_LIMITS.rows || c >= NOTEBOOK_LIMITS.cols) {
            return {
              input,
              kind: CELL_KIND.value,
              value: null,
              error: '#LIMIT',
              message: `grids hold at most ${NOTEBOOK_LIMITS.rows} rows and ${NOTEBOOK_LIMITS.cols} columns`,
            };
          }
          const refused = refusedFormula(input);
          if (refused !== undefined) return { input, kind: CELL_KIND.formula, value: null, error: '#REFUSED', message: refused };
          return cellResult(input, hf.getCellValue({ sheet, row: r, col: c }));
        }),
      );
      return { sheet: sectionSheetName(i), grid };
    });
    return { sections };
  } finally {
    hf.destroy();
  }
}

/** Address of a cell as formulas write it: column letters then the 1-based row (B3). */
export function cellAddress(row: number, col: number): string {
  return `${columnLetters(col)}${row + 1}`;
}
