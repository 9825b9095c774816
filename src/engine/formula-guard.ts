// The gate every formula a person types passes before the engine sees it: refuses text that could freeze the page
// or overflow the engine's parser (overlong text, deep nesting, huge ranges, functions whose cost is known only when
// they run), and turns the engine's error values and exceptions into sentences a person can act on.
import { CellError, DetailedCellError, ErrorType } from 'hyperformula';
import type { CellValue, HyperFormula } from 'hyperformula';
import { normalizeFormula } from './formula-syntax.ts';

/**
 * Limits on a typed formula. The engine parses and evaluates recursively, so depth and operator chains use the
 * JavaScript stack: measured on this machine, about 150 nested parentheses or 2,000 chained "+" overflow it, and one
 * range of a million cells takes most of a second to gather. These limits sit well inside both.
 */
export const FORMULA_LIMITS = {
  /** Characters in the whole formula. */
  maxLength: 4000,
  /** Brackets ( ) and { } open at once. */
  maxDepth: 32,
  /** Operators (+ - * / ^ & % = < > : and comparisons) in the whole formula; a chain nests in the parse. */
  maxOperators: 200,
  /** Cells in every range of the formula together. */
  maxRangeCells: 100_000,
  /** The engine's sheet size (its defaults): a reference past it is refused with a message. */
  maxRows: 40_000,
  maxColumns: 18_278,
} as const;

export type FormulaLimits = { -readonly [K in keyof typeof FORMULA_LIMITS]: number };

/**
 * Functions whose work is set by a number inside the formula rather than by the cells it reads, so no reading of
 * the text can bound it: OFFSET(A1,0,0,40000,1000) took 24 s here, SEQUENCE(40000,18000) ran out of memory and
 * REPT builds text of any length. Nothing Rungbook computes needs them.
 */
export const UNBOUNDED_FUNCTIONS: Readonly<Record<string, string>> = {
  OFFSET: 'it builds a range whose size is known only when it runs; write the range itself, such as A1:B20',
  SEQUENCE: 'it builds an array whose size is known only when it runs; write the numbers or a range instead',
  REPT: 'it builds text of any length; write the text itself',
};

export const FORMULA_REFUSALS = {
  empty: 'empty',
  tooLong: 'too-long',
  unclosedText: 'unclosed-text',
  unbalanced: 'unbalanced',
  tooDeep: 'too-deep',
  tooManyOperators: 'too-many-operators',
  hugeRange: 'huge-range',
  offSheet: 'off-sheet',
  unboundedFunction: 'unbounded-function',
  notAFormula: 'not-a-formula',
} as const;
export type FormulaRefusalCode = (typeof FORMULA_REFUSALS)[keyof typeof FORMULA_REFUSALS];

export interface FormulaRefusal {
  code: FormulaRefusalCode;
  message: string;
  /** 1-based character position in the text as typed, where it helps to point at one. */
  at?: number;
}

/** `formula` is the text with exactly one leading "=", in the engine's syntax (normalizeFormula), ready for it. */
export type GuardResult = { ok: true; formula: string } | { ok: false; refusal: FormulaRefusal };

const OPERATOR_CHARS = new Set(['+', '-', '*', '/', '^', '&', '%', '=', '<', '>', ':']);

/** Column letters to a 1-based column number: A → 1, Z → 26, AA → 27, XFD → 16384. */
export function columnNumber(letters: string): number {
  let n = 0;
  for (const ch of letters.toUpperCase()) n = n * 26 + (ch.charCodeAt(0) - 64);
  return n;
}

function refuse(code: FormulaRefusalCode, message: string, at?: number): GuardResult {
  return { ok: false, refusal: at === undefined ? { code, message } : { code, message, at } };
}

function grouped(n: number): string {
  return String(n).replace(/\B(?=(\d{3})+(?!\d))/g, ',');
}

/**
 * The formula with every text literal and quoted sheet name blanked out (same length, so positions still match),
 * or the position of a quote that never closes.
 */
function blankQuoted(text: string): { ok: true; code: string } | { ok: false; at: number; quote: string } {
  let out = '';
  let i = 0;
  while (i < text.length) {
    const ch = text[i]!;
    if (ch !== '"' && ch !== "'") {
      out += ch;
      i++;
      continue;
    }
    let j = i + 1;
    for (;;) {
      if (j >= text.length) return { ok: false, at: i + 1, quote: ch };
      if (text[j] === ch) {
        if (text[j + 1] === ch) j += 2;
        else break;
      } else j++;
    }
    // A quoted sheet name stays a name ("_"), text becomes spaces: neither can hold a reference or an operator.
    out += (ch === '"' ? ' ' : '_').repeat(j + 1 - i);
    i = j + 1;
  }
  return { ok: true, code: out };
}

const SHEET = "(?:[A-Za-z0-9_.]+!)?";
const BEFORE = '(?<![A-Za-z0-9_.$!])';
const CELL_RANGE = new RegExp(
  `${BEFORE}${SHEET}\\$?([A-Za-z]{1,4})\\$?(\\d{1,10})\\s*:\\s*${SHEET}\\$?([A-Za-z]{1,4})\\$?(\\d{1,10})(?![A-Za-z0-9_.(!])`,
  'g',
);
const COLUMN_RANGE = new RegExp(`${BEFORE}${SHEET}\\$?([A-Za-z]{1,4})\\s*:\\s*${SHEET}\\$?([A-Za-z]{1,4})(?![A-Za-z0-9_.(!])`, 'g');
const ROW_RANGE = new RegExp(`${BEFORE}${SHEET}\\$?(\\d{1,10})\\s*:\\s*${SHEET}\\$?(\\d{1,10})(?![A-Za-z0-9_.(!eE])`, 'g');
const FUNCTION_NAME = /(?<![A-Za-z0-9_.])([A-Za-z][A-Za-z0-9_.]*)\s*\(/g;

interface RangeFound {
  text: string;
  at: number;
  cells: number;
  /** Set when a corner lies past the sheet. */
  offSheet?: string;
}

function rangesIn(code: string, limits: FormulaLimits): RangeFound[] {
  const found: RangeFound[] = [];
  const taken: [number, number][] = [];
  const free = (start: number, end: number): boolean => taken.every(([s, e]) => end <= s || start >= e);
  const offSheet = (col: number | undefined, row: number | undefined): string | undefined => {
    if (col !== undefined && col > limits.maxColumns) return `column ${grouped(col)}`;
    if (row !== undefined && (row > limits.maxRows || row < 1)) return `row ${grouped(row)}`;
    return undefined;
  };
  for (const m of code.matchAll(CELL_RANGE)) {
    const [c1, r1, c2, r2] = [columnNumber(m[1]!), Number(m[2]), columnNumber(m[3]!), Number(m[4])];
    const cells = (Math.abs(c2 - c1) + 1) * (Math.abs(r2 - r1) + 1);
    const past = offSheet(c1, r1) ?? offSheet(c2, r2);
    found.push({ text: m[0].trim(), at: m.index, cells, ...(past ? { offSheet: past } : {}) });
    taken.push([m.index, m.index + m[0].length]);
  }
  for (const m of code.matchAll(COLUMN_RANGE)) {
    if (!free(m.index, m.index + m[0].length)) continue;
    const [c1, c2] = [columnNumber(m[1]!), columnNumber(m[2]!)];
    const past = offSheet(c1, undefined) ?? offSheet(c2, undefined);
    found.push({ text: m[0].trim(), at: m.index, cells: (Math.abs(c2 - c1) + 1) * limits.maxRows, ...(past ? { offSheet: past } : {}) });
    taken.push([m.index, m.index + m[0].length]);
  }
  for (const m of code.matchAll(ROW_RANGE)) {
    if (!free(m.index, m.index + m[0].length)) continue;
    const [r1, r2] = [Number(m[1]), Number(m[2])];
    const past = offSheet(undefined, r1) ?? offSheet(undefined, r2);
    found.push({ text: m[0].trim(), at: m.index, cells: (Math.abs(r2 - r1) + 1) * limits.maxColumns, ...(past ? { offSheet: past } : {}) });
  }
  return found.sort((a, b) => a.at - b.at);
}

/**
 * Checks a typed formula (with or without its leading "=") against the limits. Pure and quick (one pass and a few
 * regular expressions over at most `maxLength` characters), so it can run on every keystroke. It does not decide
 * whether the engine can read the formula; `evaluateFormula` does that.
 */
export function guardFormula(text: string, overrides: Partial<FormulaLimits> = {}): GuardResult {
  const limits: FormulaLimits = { ...FORMULA_LIMITS, ...overrides };
  if (text.length > limits.maxLength) {
    return refuse(
      FORMULA_REFUSALS.tooLong,
      `The formula is ${grouped(text.length)} characters long; Rungbook takes formulas of at most ${grouped(limits.maxLength)}. Split it into named checks or cells.`,
    );
  }
  const lead = text.length - text.trimStart().length;
  const trimmed = text.trim();
  const hasEq = trimmed.startsWith('=');
  const body = hasEq ? trimmed.slice(1) : trimmed;
  const offset = lead + (hasEq ? 1 : 0);
  if (body.trim() === '') return refuse(FORMULA_REFUSALS.empty, 'The formula is empty.');

  const blanked = blankQuoted(body);
  if (!blanked.ok) {
    const what = blanked.quote === '"' ? 'Text' : 'A quoted sheet name';
    return refuse(FORMULA_REFUSALS.unclosedText, `${what} starting at character ${blanked.at + offset} has no closing quote.`, blanked.at + offset);
  }
  const code = blanked.code;

  const open: { ch: string; at: number }[] = [];
  let deepest = 0;
  let operators = 0;
  for (let i = 0; i < code.length; i++) {
    const ch = code[i]!;
    if (ch === '(' || ch === '{') {
      open.push({ ch, at: i });
      deepest = Math.max(deepest, open.length);
      if (open.length > limits.maxDepth) {
        return refuse(
          FORMULA_REFUSALS.tooDeep,
          `The formula nests brackets more than ${limits.maxDepth} deep (at character ${i + 1 + offset}); Rungbook stops there so the page cannot freeze. Split it into named checks.`,
          i + 1 + offset,
        );
      }
    } else if (ch === ')' || ch === '}') {
      const want = ch === ')' ? '(' : '{';
      const top = open.pop();
      if (!top || top.ch !== want) {
        return refuse(FORMULA_REFUSALS.unbalanced, `The "${ch}" at character ${i + 1 + offset} closes nothing that is open.`, i + 1 + offset);
      }
    } else if (OPERATOR_CHARS.has(ch)) {
      // A number's exponent sign (1e-7) is part of the number, not an operator.
      const isExponentSign = (ch === '+' || ch === '-') && /[0-9.][eE]$/.test(code.slice(Math.max(0, i - 2), i));
      if (!isExponentSign) operators++;
    }
  }
  if (open.length > 0) {
    const top = open[open.length - 1]!;
    const close = top.ch === '(' ? ')' : '}';
    return refuse(
      FORMULA_REFUSALS.unbalanced,
      `The "${top.ch}" at character ${top.at + 1 + offset} is never closed; add "${close}".`,
      top.at + 1 + offset,
    );
  }
  if (operators > limits.maxOperators) {
    return refuse(
      FORMULA_REFUSALS.tooManyOperators,
      `The formula has ${grouped(operators)} operators; Rungbook takes at most ${grouped(limits.maxOperators)} in one formula. Use SUM or PRODUCT over a range, or split it into named checks.`,
    );
  }

  for (const m of code.matchAll(FUNCTION_NAME)) {
    const name = m[1]!.toUpperCase();
    const why = UNBOUNDED_FUNCTIONS[name];
    if (why !== undefined) {
      return refuse(FORMULA_REFUSALS.unboundedFunction, `${name} is not available in Rungbook formulas: ${why}.`, m.index + 1 + offset);
    }
  }

  let cells = 0;
  for (const r of rangesIn(code, limits)) {
    if (r.offSheet) {
      return refuse(
        FORMULA_REFUSALS.offSheet,
        `The range ${r.text} reaches ${r.offSheet}, past the sheet: Rungbook sheets have ${grouped(limits.maxRows)} rows and ${grouped(limits.maxColumns)} columns (A to ZZZ).`,
        r.at + 1 + offset,
      );
    }
    cells += r.cells;
    if (cells > limits.maxRangeCells) {
      return refuse(
        FORMULA_REFUSALS.hugeRange,
        `The range ${r.text} brings the formula to ${grouped(cells)} cells; Rungbook reads at most ${grouped(limits.maxRangeCells)} cells in one formula so the page stays responsive. Narrow the range to the rows in use.`,
        r.at + 1 + offset,
      );
    }
  }
  return { ok: true, formula: `=${normalizeFormula(body.trim())}` };
}

/**
 * Cells in every range a formula names (0 for text that is not a formula), counted the way the guard counts them, so
 * a page of many formulas can bound the cells they read together.
 */
export function formulaRangeCells(text: string): number {
  const t = text.trim();
  if (!t.startsWith('=')) return 0;
  const blanked = blankQuoted(t.slice(1));
  if (!blanked.ok) return 0;
  return rangesIn(blanked.code, FORMULA_LIMITS).reduce((sum, r) => sum + r.cells, 0);
}

/**
 * Gives one engine a time budget, counted from now: once `ms` have passed, every formula it goes on to evaluate is an
 * error value with a message, so a page's evaluation ends soon after instead of freezing the page. The engine has no
 * option for this, so its interpreter's evaluation step is wrapped on this instance; it is checked once per formula
 * part, which costs a clock read.
 */
export function limitEvaluationTime(hf: HyperFormula, ms: number, now: () => number = () => Date.now()): void {
  const interpreter = hf.evaluator.interpreter;
  const evaluate = interpreter.evaluateAst.bind(interpreter);
  const deadline = now() + ms;
  let stopped: CellError | undefined;
  interpreter.evaluateAst = (ast, state) => {
    if (stopped === undefined && now() >= deadline) {
      stopped = new CellError(
        ErrorType.ERROR,
        `calculation stopped after ${grouped(ms)} ms so the page stays responsive; make the formulas read fewer cells or split the page`,
      );
    }
    return stopped ?? evaluate(ast, state);
  };
}

/** The engine's error kinds, in words. The engine's own message, when it has one, follows. */
const ERROR_WORDS: Readonly<Record<string, string>> = {
  CYCLE: 'circular reference: the formula depends on its own result',
  DIV_BY_ZERO: 'division by zero',
  NAME: 'unknown function or name',
  NA: 'a value is not available',
  NUM: 'a number is out of range',
  REF: 'a reference points outside the sheet',
  VALUE: 'a value has the wrong type',
  ERROR: 'the formula could not be read',
  SPILL: 'the result does not fit where it is placed',
  LIC: 'the formula engine is not licensed',
};

/** An engine error value (a cell's or a formula's) as one sentence: "#DIV/0! division by zero". */
export function describeFormulaError(e: { type: string; value?: string; message?: string }): string {
  const words = ERROR_WORDS[e.type];
  const code = e.value ?? `#${e.type}`;
  if (e.type === 'CYCLE') return words!;
  const own = e.message?.trim() ?? '';
  if (words && own) return `${code} ${words}: ${own}`;
  if (words) return `${code} ${words}`;
  return own ? `${code} ${own}` : code;
}

export type EvaluateResult =
  | { ok: true; value: CellValue | CellValue[][] }
  | { ok: false; error: string; refusal?: FormulaRefusal };

/**
 * Guards, checks and evaluates one typed formula on `sheet` of `hf`, never throwing: a refusal, unreadable text,
 * an error value and an exception inside the engine all come back as `{ ok: false, error }` with a sentence.
 */
export function evaluateFormula(hf: HyperFormula, text: string, sheet: number, overrides: Partial<FormulaLimits> = {}): EvaluateResult {
  const g = guardFormula(text, overrides);
  if (!g.ok) return { ok: false, error: g.refusal.message, refusal: g.refusal };
  try {
    if (!hf.validateFormula(g.formula)) {
      return {
        ok: false,
        error: 'The formula could not be read: check brackets, commas between arguments and quotes around text; write 4.7e3 rather than 4.7k.',
        refusal: { code: FORMULA_REFUSALS.notAFormula, message: 'not a formula' },
      };
    }
    const value = hf.calculateFormula(g.formula, sheet);
    if (value instanceof DetailedCellError) return { ok: false, error: describeFormulaError(value) };
    // The engine's result rounding turns numbers below about 1e-296 into NaN; a number that is not finite is never
    // shown as one.
    const numbers = Array.isArray(value) ? value.flat() : [value];
    if (numbers.some((v) => typeof v === 'number' && !Number.isFinite(v))) {
      return { ok: false, error: '#NUM! the result is not a finite number: a value is too large or too small for the engine (keep magnitudes between 1e-290 and 1e300)' };
    }
    return { ok: true, value };
  } catch (e) {
    return { ok: false, error: `The formula could not be evaluated: ${engineFailure(e)}` };
  }
}

/** An exception from inside the engine, in words; stack and memory failures say what to change. */
export function engineFailure(e: unknown): string {
  if (e instanceof RangeError) {
    return /call stack/i.test(e.message)
      ? 'it is nested too deeply for the engine; split it into named checks'
      : 'it produced a value too large to hold (for example text of millions of characters)';
  }
  return e instanceof Error ? e.message : String(e);
}
