// Evaluates the user's own notebook pages: each section's small grid becomes one engine sheet (Section1, Section2…,
// so a cell may read another section as Section2!B3), and the book functions (VAR, CHECK, PART_PRICE…) read the Book.
import { columnLetters } from './cells.ts';
import type { CellValue } from 'hyperformula';
import { DetailedCellError } from 'hyperformula';
import type { Book, NotebookPage, ParamValue, Variant } from '../domain/book.ts';
import { mpnKey } from '../domain/book.ts';
import { candidateQuotes, chooseQuote, prepareCosting } from '../domain/costing.ts';
import type { CostingContext, Result } from '../domain/costing.ts';
import { LIMITS } from '../domain/schema.ts';
import { parseValue } from '../domain/units.ts';
import { changeInOne, createEngine } from './create.ts';
import { evaluateChecks } from './family.ts';
import type { CheckResult } from './family.ts';
import { engineFailure, formulaRangeCells, guardFormula, limitEvaluationTime } from './formula-guard.ts';
import { nameKey } from './formula-names.ts';
import { normalizeFormula } from './formula-syntax.ts';
import type { BookFunctionContext, CheckLookup, Missing, PriceLookup } from './functions/book.ts';

/**
 * Bounds on one notebook page, set well past what a page of side calculations reaches, so that no page (typed, pasted
 * or read from a file) can freeze the app: a page of 1,200 formulas each reading 1,200 cells once took 10 s.
 */
export const NOTEBOOK_LIMITS = {
  /** Largest grid a section may hold (the Book's own limit); the grids are for side calculations, not tables of data. */
  rows: LIMITS.gridRows,
  cols: LIMITS.gridColumns,
  /** Sections with a grid on one page. */
  gridSections: 50,
  /** Cells that hold something, over every grid of the page. */
  pageCells: 5_000,
  /** Cells read by the ranges of every formula on the page together (one formula alone may read 100,000). */
  pageRangeCells: 100_000,
  /** Characters typed in one cell (the Book's own limit; computed text stops at MAX_TEXT_LENGTH in functions/text.ts). */
  cellText: LIMITS.cell,
  /** Milliseconds one calculation of the page may run before the formulas not yet done stop with an error. */
  calculationMs: 3_000,
} as const;

export interface BookContextOptions {
  /** Check results to use (for example from a live check session); evaluated from the Book when first needed. */
  checkResults?: () => readonly CheckResult[];
  /** Costing date for quote expiry, YYYY-MM-DD; default the Book's costing date, else today. */
  date?: string;
  /** Time budget of one page calculation in milliseconds; default NOTEBOOK_LIMITS.calculationMs. */
  calculationMs?: number;
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

/** What the engine is given for a cell: a formula in the engine's syntax, an engineering value as its number, else text. */
export function cellInput(raw: string): number | string | null {
  const t = raw.trim();
  if (t === '') return null;
  if (t.startsWith('=')) return normalizeFormula(t);
  const v = parseValue(t);
  // A leading apostrophe keeps text as text, whatever it looks like.
  return v.ok ? v.value : `'${raw}`;
}

/** Why a cell is not handed to the engine: its error code and a sentence. */
interface CellRefusal {
  error: string;
  message: string;
}

function grouped(n: number): string {
  return String(n).replace(/\B(?=(\d{3})+(?!\d))/g, ',');
}

/** Which sections' grids are evaluated: the first NOTEBOOK_LIMITS.gridSections of them. */
function keptGrids(page: NotebookPage): boolean[] {
  let grids = 0;
  return page.sections.map((s) => s.grid.length > 0 && ++grids <= NOTEBOOK_LIMITS.gridSections);
}

/**
 * Which cells of a page the engine is not given, in reading order (section by section, row by row): cells past a
 * grid's size, grids or filled cells past the page's limits, text too long, formulas the guard refuses (too long,
 * too deep, a huge range: see formula-guard.ts) and formulas whose ranges would take the page past its cells read.
 * Each refused cell says why in the cell; the rest of the page is evaluated as usual.
 */
function planPage(page: NotebookPage, kept: readonly boolean[]): (CellRefusal | undefined)[][][] {
  let filled = 0;
  let read = 0;
  return page.sections.map((s, i) => {
    if (s.grid.length === 0) return [];
    return s.grid.map((row, r) =>
      row.map((raw, c): CellRefusal | undefined => {
        if (!kept[i]) {
          return { error: '#LIMIT', message: `a page holds at most ${NOTEBOOK_LIMITS.gridSections} grids; move this one to another page` };
        }
        if (r >= NOTEBOOK_LIMITS.rows || c >= NOTEBOOK_LIMITS.cols) {
          return { error: '#LIMIT', message: `grids hold at most ${NOTEBOOK_LIMITS.rows} rows and ${NOTEBOOK_LIMITS.cols} columns` };
        }
        const t = raw.trim();
        if (t === '') return undefined;
        if (++filled > NOTEBOOK_LIMITS.pageCells) {
          return { error: '#LIMIT', message: `a page holds at most ${grouped(NOTEBOOK_LIMITS.pageCells)} filled cells; move some to another page` };
        }
        if (raw.length > NOTEBOOK_LIMITS.cellText) {
          return { error: '#LIMIT', message: `a cell holds at most ${grouped(NOTEBOOK_LIMITS.cellText)} characters; this one has ${grouped(raw.length)}` };
        }
        if (!t.startsWith('=')) return undefined;
        const g = guardFormula(t);
        if (!g.ok) return { error: '#REFUSED', message: g.refusal.message };
        const cells = formulaRangeCells(t);
        if (read + cells > NOTEBOOK_LIMITS.pageRangeCells) {
          return {
            error: '#LIMIT',
            message: `with this formula the page's formulas would read ${grouped(read + cells)} cells together; a page reads at most ${grouped(NOTEBOOK_LIMITS.pageRangeCells)} so it stays responsive. Narrow the ranges`,
          };
        }
        read += cells;
        return undefined;
      }),
    );
  });
}

/**
 * Why a value typed into a cell cannot be kept, or undefined: text too long, or a page already full. Formulas the
 * guard refuses are kept and say why in their cell.
 */
export function notebookCellProblem(page: NotebookPage, section: number, row: number, col: number, value: string): string | undefined {
  // What is typed is stored in the Book, so it is bounded by the Book's limit too (below the engine's text limit).
  const max = NOTEBOOK_LIMITS.cellText;
  if (value.length > max) {
    return `A cell holds at most ${grouped(max)} characters; this text has ${grouped(value.length)}. Nothing was saved.`;
  }
  if (value.trim() === '' || (page.sections[section]?.grid[row]?.[col] ?? '').trim() !== '') return undefined;
  let filled = 0;
  for (const s of page.sections) for (const r of s.grid) for (const x of r) if (x.trim() !== '') filled++;
  if (filled >= NOTEBOOK_LIMITS.pageCells) {
    return `A page holds at most ${grouped(NOTEBOOK_LIMITS.pageCells)} filled cells; start another page for more. Nothing was saved.`;
  }
  return undefined;
}

function cellKind(input: string): CellKind {
  const t = input.trim();
  return t === '' ? CELL_KIND.empty : t.startsWith('=') ? CELL_KIND.formula : CELL_KIND.value;
}

function cellResult(input: string, v: CellValue): NotebookCell {
  const kind = cellKind(input);
  if (v instanceof DetailedCellError) return { input, kind, value: null, error: v.value, message: v.message || v.value };
  if (typeof v === 'number' && !Number.isFinite(v)) return { input, kind, value: null, error: '#NUM!', message: 'not a finite number' };
  return { input, kind, value: v ?? null };
}

/** A cell of a page whose calculation failed as a whole: values as typed, formulas with the reason. */
function uncalculated(input: string, why: string): NotebookCell {
  const kind = cellKind(input);
  if (kind === CELL_KIND.formula) return { input, kind, value: null, error: '#ERROR!', message: why };
  const v = cellInput(input);
  return { input, kind, value: typeof v === 'string' ? v.slice(1) : v };
}

/**
 * Evaluates every grid of a page against the Book. Never throws for what the user wrote: each bad cell carries its
 * error and message. Cells beyond NOTEBOOK_LIMITS are not evaluated and say so, and the calculation has a time
 * budget after which the formulas not yet done stop with an error.
 */
export function evaluateNotebookPage(book: Book, page: NotebookPage, options: BookContextOptions = {}): NotebookResult {
  const kept = keptGrids(page);
  const plan = planPage(page, kept);
  const hf = createEngine({ context: bookFunctionContext(book, options) });
  try {
    let failure: string | undefined;
    let ids: (number | undefined)[] = [];
    try {
      ids = page.sections.map((_, i) => {
        if (!kept[i]) return undefined;
        const name = hf.addSheet(sectionSheetName(i));
        return hf.getSheetId(name)!;
      });
      limitEvaluationTime(hf, options.calculationMs ?? NOTEBOOK_LIMITS.calculationMs);
      changeInOne(hf, () => {
        page.sections.forEach((s, i) => {
          const sheet = ids[i];
          if (sheet === undefined) return;
          const rows = s.grid
            .slice(0, NOTEBOOK_LIMITS.rows)
            .map((row, r) => row.slice(0, NOTEBOOK_LIMITS.cols).map((raw, c) => (plan[i]![r]![c] === undefined ? cellInput(raw) : null)));
          hf.setSheetContent(sheet, rows);
        });
      });
    } catch (e) {
      // Whatever the engine throws (a stack or memory failure it did not turn into an error value) stays on this page.
      failure = `the page could not be calculated: ${engineFailure(e)}`;
    }
    const sections = page.sections.map((s, i) => {
      const sheet = ids[i];
      const grid = s.grid.map((row, r) =>
        row.map((input, c): NotebookCell => {
          const refused = plan[i]![r]![c];
          if (refused !== undefined) return { input, kind: cellKind(input), value: null, ...refused };
          if (failure !== undefined) return uncalculated(input, failure);
          if (sheet === undefined) return cellResult(input, null);
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
