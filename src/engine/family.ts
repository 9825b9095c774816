// Compiles a Book's family into ONE engine table — a row per variant, a column per name — so check formulas and
// build rules can say `load_w` or `switch_v_max` and mean "this variant's". Resolves build lines and evaluates checks.
//
// Layout (our engine prototypes measured it well ahead of sheet-scoped named expressions): the family sheet's columns are every
// variant parameter, the role names (`<role>_<rating>`, `<role>_value`) some check reads, every check value (so
// checks may read each other by name), then the check limits that read check values. Formulas that read only
// parameters and role names (every build rule, most applies rules and limits) are evaluated once per distinct
// input on a second, small sheet (see Memo), not once per variant. Speed also comes from doing less per cell: a
// rule that is a plain number stays that number and one that is a single name reads that name's column; identical
// formulas share one cell; a missing name is the error value #N/A, not a formula; the first row's formulas are
// copied down instead of parsed again per row; results are kept per row and an edit recomputes its row only.
// A name a variant lacks reads as #N/A; when a result is an error and its formula used such a name, the result says
// "unknown name x" instead of the engine's error.
import type { CellValue, HyperFormula, RawCellContent } from 'hyperformula';
import type { Book, BuildLine, Check, CheckRule, ParamValue, Part, Variant } from '../domain/book.ts';
import type { ResolvedLine } from '../domain/costing.ts';
import { mpnKey } from '../domain/book.ts';
import { PART_RATINGS } from '../domain/params.ts';
import { CHECK_STATUS, judge } from '../domain/check-status.ts';
import type { CheckStatus, CheckValue, RuleLimits } from '../domain/check-status.ts';
import { significant } from '../domain/format.ts';
import { createEngine } from './create.ts';
import { columnLetters } from './cells.ts';
import { guardFormula } from './formula-guard.ts';
import { constantNumber, formulaNames, nameKey, rewriteFormula, soleName, tokenizeFormula, formulaBody } from './formula-names.ts';
import { normalizeFormula } from './formula-syntax.ts';

export interface ResolveProblem {
  variantId: string;
  variantCode: string;
  lineId: string;
  message: string;
}

export interface VariantResolution {
  variantId: string;
  variantCode: string;
  /** Every build line of the Book, in `position` order; a line with a problem carries its messages as `error`. */
  lines: ResolvedLine[];
  /** Role names this variant's applying lines give (`switch_v_max`, `xcap_value`…), by lower-case name. */
  roleNames: Record<string, number>;
  problems: ResolveProblem[];
}

export interface FamilyResolution {
  /** In the Book's variant order. */
  variants: VariantResolution[];
  /** Every problem of every variant, in variant then line order. */
  problems: ResolveProblem[];
}

export interface CheckResult {
  variantId: string;
  variantCode: string;
  checkId: string;
  checkName: string;
  /** The check formula's value; null when it could not be computed or the check does not apply. */
  value: CheckValue;
  unit: string;
  status: CheckStatus;
  /** The rule with its limits evaluated for this variant, for example "≤ 357.8" or "1000 … 25000". */
  limit: string;
  limits: RuleLimits;
  message: string;
}

export type EditResult = { ok: true } | { ok: false; error: string };

/** A name this variant lacks: the error value itself, so the engine parses no formula for it. */
const MISSING = '#N/A';
const ROW_MARK = '\u0001';
const SHEET = 'family';
const MEMO_SHEET = 'rules';

/**
 * Where a compiled rule or check part is read for a row: a constant that needs no cell, a memo (below), or a column
 * of the family table (its own formula, one shared with an identical formula, or the column of the one name it
 * is). `names` are the names the formula reads.
 */
interface FormulaCell {
  col: number;
  names: string[];
  constant?: number;
  /** Index of the memo that holds this formula's value. */
  memo?: number;
  /** A check value's own formula, cut at the row number. */
  pieces?: string[];
}

/**
 * A formula that reads variant parameters only (every build rule, most applies rules) is evaluated once per
 * distinct set of the parameters it reads, not once per variant: a ladder rule reading r_s1 has a handful of
 * distinct inputs however many variants there are. Each distinct input is one row of the memo sheet: the formula
 * in column A, its inputs from column B on.
 */
interface Memo {
  /** Parameter and role names the formula reads, in the order of its input columns. */
  inputs: string[];
  /** Whether a role name is among the inputs: then its entries wait for the lines to be resolved. */
  roles: boolean;
  /** The formula as written on the memo sheet, cut at the row number. */
  pieces: string[];
  /** Input key (see inputKey) → memo sheet row. */
  entries: Map<string, number>;
  /** Family row → memo sheet row. */
  rowEntry: Int32Array;
}

/** A formula column: its text cut at the row number, so each row's copy is a join. */
interface FormulaColumn {
  col: number;
  pieces: string[];
}

type Compiled = { ok: true; text: string; names: string[] } | { ok: false; error: string };

interface LineCells {
  line: BuildLine;
  applies?: FormulaCell;
  qty?: FormulaCell;
  qtyConst?: number;
  part?: FormulaCell;
  /** Problems shared by every variant (a rule that does not compile). */
  problems: string[];
}

type CheckPart = 'value' | 'applies' | 'limit' | 'low' | 'high';

interface CheckCells {
  check: Check;
  /** Column of the check's name, absent when the name clashes with another name. */
  col?: number;
  cells: Partial<Record<CheckPart, FormulaCell>>;
  /** Why the check cannot be evaluated at all (same for every variant). */
  problem?: string;
}

type Row = RawCellContent[];

interface EngineError {
  value: string;
  message: string;
  type: string;
}

function isEngineError(v: unknown): v is EngineError {
  return typeof v === 'object' && v !== null && 'type' in v && 'value' in v;
}

function engineErrorText(e: EngineError): string {
  if (e.type === 'CYCLE') return 'circular reference: the formula depends on its own result';
  return e.message ? `${e.value} ${e.message}` : e.value;
}

function paramCell(v: ParamValue): number | string {
  // A leading apostrophe keeps text as text, whatever it looks like ("=x", "12", "TRUE").
  return typeof v === 'number' ? v : `'${v}`;
}

function atRow(pieces: readonly string[], r: number): string {
  return pieces.join(String(r + 1));
}

const LIMIT_PARTS = ['limit', 'low', 'high'] as const;

/** A variant's parameters by name key. */
function ownParams(v: Variant): Map<string, ParamValue> {
  return new Map(Object.entries(v.params).map(([k, val]) => [nameKey(k), val] as const));
}

/**
 * One string for a memo's input values: kind-tagged so the number 12 and the text "12" differ, texts with their
 * length so no text can run into the next value.
 */
function inputKey(inputs: readonly string[], params: ReadonlyMap<string, ParamValue>): string {
  let key = '';
  for (const k of inputs) {
    const v = params.get(k);
    key += v === undefined ? '-;' : typeof v === 'number' ? `n${v};` : `s${v.length}:${v}`;
  }
  return key;
}

function checkResult(
  v: Variant,
  check: Check,
  value: CheckValue,
  status: CheckStatus,
  message: string,
  limits: RuleLimits = {},
  limit = '',
): CheckResult {
  return { variantId: v.id, variantCode: v.code, checkId: check.id, checkName: check.name, unit: check.unit, limits, limit, value, status, message };
}

/** What a check's value column holds in row r. */
function valueContent(fc: FormulaCell, r: number): RawCellContent {
  return fc.constant ?? atRow(fc.pieces!, r);
}

function sortedLines(book: Book): BuildLine[] {
  return [...book.buildLines].sort((a, b) => a.position - b.position || a.id.localeCompare(b.id));
}

function limitText(rule: CheckRule, limits: RuleLimits): string {
  const f = (n: number | undefined): string => (n === undefined ? '?' : significant(n));
  switch (rule.kind) {
    case 'max':
      return `≤ ${f(limits.limit)}`;
    case 'min':
      return `≥ ${f(limits.limit)}`;
    case 'between':
      return `${f(limits.low)} … ${f(limits.high)}`;
    default:
      return 'TRUE';
  }
}

/**
 * The family as one engine table. Holds the engine open so edits re-evaluate at once; `close()` frees it.
 * Build with `FamilyWorkbook.open(book, checks)`.
 */
export class FamilyWorkbook {
  private book: Book;
  private checks: Check[];
  private hf: HyperFormula | null = null;
  private sheet = 0;
  /** Name key → column, for parameters, role names and check names. */
  private cols = new Map<string, number>();
  private paramKeys = new Set<string>();
  /** Role names that have a column: those some check reads (the others only feed the resolution). */
  private roleKeys: string[] = [];
  private roleKeySet = new Set<string>();
  /** Every `<role>_<rating>` the Book's lines and parts could give, with or without a column. */
  private possibleRoleKeys = new Set<string>();
  private roleStart = 0;
  private width = 0;
  private lineCells: LineCells[] = [];
  private checkCells: CheckCells[] = [];
  private checkByName = new Map<string, CheckCells>();
  private partsByKey = new Map<string, Part>();
  private partsById = new Map<string, Part>();
  private resolution: VariantResolution[] = [];
  private memos: Memo[] = [];
  /** Inputs and memo text → memo, so identical formulas share one. */
  private memoIndex = new Map<string, number>();
  private memoSheet = 0;
  private memoRows = 0;
  /** Each row's check results as last read; undefined where an edit may have changed them. */
  private rowResults: (CheckResult[] | undefined)[] = [];

  private constructor(book: Book, checks: Check[]) {
    this.book = book;
    this.checks = checks;
  }

  /** Compiles the Book's family with the given checks (by default the Book's own). */
  static open(book: Book, checks: readonly Check[] = book.checks): FamilyWorkbook {
    const wb = new FamilyWorkbook(book, [...checks]);
    wb.build();
    return wb;
  }

  close(): void {
    this.hf?.destroy();
    this.hf = null;
  }

  /** The Book with the edits made through this workbook (parameters and check formulas). */
  currentBook(): Book {
    return { ...this.book, checks: this.checks };
  }

  private engine(): HyperFormula {
    if (!this.hf) throw new Error('the family workbook is closed');
    return this.hf;
  }

  private compile(formula: string, lookup: (key: string) => string | undefined): Compiled {
    // Rules and checks from a Book file or a form never reach the engine when they are too long, too deep or range
    // over too many cells: such a formula could freeze the page or overflow the engine's stack.
    const guard = guardFormula(formula);
    if (!guard.ok) return { ok: false, error: guard.refusal.message };
    const names = formulaNames(formula);
    if (!names.ok) return { ok: false, error: names.error };
    // Names nobody has become NA() so an applies rule or an untaken IF branch still decides; the result then
    // explains the name (see missingNames).
    // Numbers come out as the engine prints them, so a formula copied down the table is found again (see fillDown).
    const r = rewriteFormula(normalizeFormula(formula), lookup, 'NA()');
    if (!r.ok) return { ok: false, error: r.error };
    return { ok: true, text: r.formula, names: names.names };
  }

  private ref(key: string): string | undefined {
    const col = this.cols.get(key);
    return col === undefined ? undefined : `${columnLetters(col)}${ROW_MARK}`;
  }

  /**
   * Places a rule or check part: a plain number stays a constant, a single known name reads its own column, a
   * formula that reads parameters only goes to a memo, and any other formula gets a column — the same column (or
   * memo) as an identical formula placed before (`shared`).
   */
  private place(
    formula: string,
    lookup: (key: string) => string | undefined,
    shared: Map<string, number>,
    out: FormulaColumn[],
    nextCol: () => number,
  ): { ok: true; cell: FormulaCell } | { ok: false; error: string } {
    const constant = constantNumber(formula);
    if (constant !== undefined) return { ok: true, cell: { col: -1, names: [], constant } };
    const c = this.compile(formula, lookup);
    if (!c.ok) return c;
    const name = soleName(formula);
    if (name !== undefined && lookup(name) !== undefined) return { ok: true, cell: { col: this.cols.get(name)!, names: c.names } };
    // Names the lookup does not know read as NA() in either layout; any other name must be a parameter or a role
    // name (known once the lines are resolved), not a check.
    if (c.names.every((k) => lookup(k) === undefined || this.paramKeys.has(k) || this.roleKeySet.has(k))) {
      const inputs = c.names.filter((k) => lookup(k) !== undefined);
      const m = this.compile(formula, (k) => {
        const i = inputs.indexOf(k);
        return i < 0 ? undefined : `${columnLetters(i + 1)}${ROW_MARK}`;
      });
      if (!m.ok) return m;
      const key = `${inputs.join(',')}|${m.text}`;
      let memo = this.memoIndex.get(key);
      if (memo === undefined) {
        memo = this.memos.length;
        this.memoIndex.set(key, memo);
        const roles = inputs.some((k) => this.roleKeySet.has(k));
        this.memos.push({ inputs, roles, pieces: m.text.split(ROW_MARK), entries: new Map(), rowEntry: new Int32Array(0) });
      }
      return { ok: true, cell: { col: -1, names: c.names, memo } };
    }
    let col = shared.get(c.text);
    if (col === undefined) {
      col = nextCol();
      shared.set(c.text, col);
      out.push({ col, pieces: c.text.split(ROW_MARK) });
    }
    return { ok: true, cell: { col, names: c.names } };
  }

  private build(): void {
    this.hf?.destroy();
    this.hf = null;
    this.rowResults = [];
    this.memos = [];
    this.memoIndex = new Map();
    this.memoRows = 0;
    this.cols = new Map();
    this.paramKeys = new Set();
    this.partsByKey = new Map();
    this.partsById = new Map();
    for (const p of this.book.parts) {
      this.partsById.set(p.id, p);
      this.partsByKey.set(mpnKey(p.mpn), p);
    }
    let next = 0;
    const nextCol = (): number => next++;
    for (const v of this.book.variants) {
      for (const name of Object.keys(v.params)) {
        const key = nameKey(name);
        if (this.cols.has(key)) continue;
        this.cols.set(key, next++);
        this.paramKeys.add(key);
      }
    }
    const ref = (key: string): string | undefined => this.ref(key);
    /** Compiled text → column, shared by every rule and check part with the same text. */
    const shared = new Map<string, number>();

    // Build rules read parameters only: role and check names depend on the lines themselves.
    const paramRef = (key: string): string | undefined => (this.paramKeys.has(key) ? ref(key) : undefined);
    const ruleColumns: FormulaColumn[] = [];
    const lines = sortedLines(this.book);
    this.lineCells = lines.map((line) => {
      const lc: LineCells = { line, problems: [] };
      const cell = (what: string, formula: string): FormulaCell | undefined => {
        const c = this.place(formula, paramRef, shared, ruleColumns, nextCol);
        if (!c.ok) {
          lc.problems.push(`${what}: ${c.error}`);
          return undefined;
        }
        return c.cell;
      };
      if (line.appliesWhen.trim() !== '') lc.applies = cell('applies-when rule', line.appliesWhen);
      const q = constantNumber(line.qtyRule);
      if (q !== undefined) lc.qtyConst = q;
      else if (line.qtyRule.trim() === '') lc.problems.push('quantity rule is empty');
      else lc.qty = cell('quantity rule', line.qtyRule);
      if (line.partRule && line.partRule.trim() !== '') lc.part = cell('part rule', line.partRule);
      return lc;
    });

    const ratingNames = new Set<string>(PART_RATINGS.map((r) => r.name));
    for (const p of this.book.parts) for (const k of Object.keys(p.ratings)) ratingNames.add(nameKey(k));
    ratingNames.add('value');
    const roles = [...new Set(lines.map((l) => (l.role ? nameKey(l.role) : '')).filter((r) => r !== ''))];
    this.possibleRoleKeys = new Set();
    for (const role of roles) {
      for (const rating of ratingNames) {
        const key = `${role}_${rating}`;
        if (!this.paramKeys.has(key)) this.possibleRoleKeys.add(key);
      }
    }
    // A role name gets a column only when some check reads it; the rest are many (every rating of every role) and
    // would only hold #N/A or a number nobody reads.
    const read = new Set<string>();
    for (const check of this.checks) {
      for (const f of [check.formula, check.appliesWhen, check.rule.limit, check.rule.low, check.rule.high]) {
        if (f === undefined) continue;
        const n = formulaNames(f);
        if (n.ok) for (const key of n.names) read.add(key);
      }
    }
    this.roleStart = next;
    this.roleKeys = [];
    for (const key of this.possibleRoleKeys) {
      if (!read.has(key)) continue;
      this.cols.set(key, next++);
      this.roleKeys.push(key);
    }
    this.roleKeySet = new Set(this.roleKeys);
    this.checkByName = new Map();
    this.checkCells = this.checks.map((check) => {
      const cc: CheckCells = { check, cells: {} };
      const key = nameKey(check.name);
      if (!/^[a-z_][a-z0-9_]*$/.test(key)) cc.problem = `check name "${check.name}" must be letters, digits and _`;
      else if (this.paramKeys.has(key)) cc.problem = `check name ${check.name} is also a variant parameter; rename the check`;
      else if (this.cols.has(key) || this.possibleRoleKeys.has(key)) cc.problem = `check name ${check.name} is used twice or is a part rating name`;
      else {
        cc.col = next++;
        this.cols.set(key, cc.col);
        this.checkByName.set(key, cc);
      }
      return cc;
    });
    for (const cc of this.checkCells) {
      if (cc.problem !== undefined || cc.col === undefined) continue;
      const v = this.valueCell(cc.check.formula, cc.col);
      if (!v.ok) cc.problem = v.error;
      else cc.cells.value = v.cell;
    }
    const checkColumns: FormulaColumn[] = [];
    for (const cc of this.checkCells) {
      if (cc.problem !== undefined) continue;
      const parts: [CheckPart, string | undefined][] = [
        ['applies', cc.check.appliesWhen.trim() === '' ? undefined : cc.check.appliesWhen],
        ['limit', cc.check.rule.limit],
        ['low', cc.check.rule.low],
        ['high', cc.check.rule.high],
      ];
      for (const [part, formula] of parts) {
        if (formula === undefined) continue;
        const c = this.place(formula, ref, shared, checkColumns, nextCol);
        if (!c.ok) {
          cc.problem = `${part === 'applies' ? 'applies' : 'rule'}: ${c.error}`;
          break;
        }
        cc.cells[part] = c.cell;
      }
    }
    this.width = next;

    // First pass, in one call: the parameters, and the memos of the build rules and of the check parts that read
    // parameters only, so each variant's parts are known before the checks read them.
    const paramEnd = this.paramKeys.size;
    const rows: Row[] = this.book.variants.map((v, r) => {
      const row: Row = new Array<RawCellContent>(this.roleStart).fill(null);
      this.writeParams(row, v);
      if (r === 0) for (const fc of ruleColumns) row[fc.col] = atRow(fc.pieces, 0);
      return row;
    });
    const memoRows: Row[] = [];
    const own = this.book.variants.map(ownParams);
    for (const m of this.memos) {
      m.rowEntry = new Int32Array(this.book.variants.length);
      if (!m.roles) own.forEach((params, r) => (m.rowEntry[r] = this.memoEntry(m, params, memoRows)));
    }
    // Checks read each other by name, so "&" could double text from check to check: the engine comes with it bounded.
    const hf = createEngine({}, { [SHEET]: rows, [MEMO_SHEET]: memoRows });
    this.hf = hf;
    this.sheet = hf.getSheetId(SHEET)!;
    this.memoSheet = hf.getSheetId(MEMO_SHEET)!;
    // Build rules read parameters only, so they all went to memos and this is for completeness.
    this.fillDown(ruleColumns, paramEnd, this.roleStart);
    this.resolution = this.book.variants.map((v, r) => this.resolveRow(v, r));

    // Second pass, in one recalculation: the memos that read role names, role values from the resolved parts,
    // and the first row's checks; then the checks are copied down.
    const roleMemoStart = this.memoRows;
    const roleMemoRows: Row[] = [];
    const roleMemos = this.memos.filter((m) => m.roles);
    if (roleMemos.length > 0) {
      own.forEach((params, r) => {
        const inputs = this.withRoles(params, r);
        for (const m of roleMemos) m.rowEntry[r] = this.memoEntry(m, inputs, roleMemoRows);
      });
    }
    if (roleMemoRows.length > 0) hf.setCellContents({ sheet: this.memoSheet, row: roleMemoStart, col: 0 }, roleMemoRows);
    if (rows.length === 0 || this.width === this.roleStart) return;
    const checkStart = this.roleStart + this.roleKeys.length;
    const block: Row[] = this.book.variants.map((_, r) => {
      const row: Row = new Array<RawCellContent>((r === 0 ? this.width : checkStart) - this.roleStart).fill(null);
      const roleNames = this.resolution[r]!.roleNames;
      this.roleKeys.forEach((key, i) => {
        const val = roleNames[key];
        row[i] = val === undefined ? MISSING : val;
      });
      if (r > 0) return row;
      for (const cc of this.checkCells) {
        const fc = cc.cells.value;
        if (fc) row[fc.col - this.roleStart] = valueContent(fc, 0);
      }
      for (const fc of checkColumns) row[fc.col - this.roleStart] = atRow(fc.pieces, 0);
      return row;
    });
    hf.setCellContents({ sheet: this.sheet, row: 0, col: this.roleStart }, block);
    const valueColumns = this.checkCells.flatMap((cc) => (cc.cells.value?.pieces ? [{ col: cc.cells.value.col, pieces: cc.cells.value.pieces }] : []));
    this.fillDown([...valueColumns, ...checkColumns], checkStart, this.width);
  }

  /**
   * Gives every other row the first row's cells in columns [from, to); `formulas` are the formula columns among
   * them. Every formula reads its own row only, so a copy one row down is that row's formula: copying lets the
   * engine reuse the first row's parsed form instead of reading 200 or 2,000 copies of the same text. The engine
   * finds a copied formula again by its printed form, so a column whose formula prints differently from the text
   * written (spacing it drops) is written as text on every row instead.
   */
  private fillDown(formulas: readonly FormulaColumn[], from: number, to: number): void {
    const rows = this.book.variants.length;
    if (to <= from || rows < 2) return;
    const hf = this.engine();
    const byText: FormulaColumn[] = formulas.filter(
      (fc) => fc.col >= from && fc.col < to && hf.getCellFormula({ sheet: this.sheet, row: 0, col: fc.col }) !== atRow(fc.pieces, 0),
    );
    const skip = new Set(byText.map((fc) => fc.col));
    try {
      for (let start = from; start < to; ) {
        if (skip.has(start)) {
          start++;
          continue;
        }
        let end = start;
        while (end < to && !skip.has(end)) end++;
        for (let filled = 1; filled < rows; ) {
          const n = Math.min(filled, rows - filled);
          hf.copy({ start: { sheet: this.sheet, row: 0, col: start }, end: { sheet: this.sheet, row: n - 1, col: end - 1 } });
          hf.paste({ sheet: this.sheet, row: filled, col: start });
          filled += n;
        }
        start = end;
      }
    } catch {
      // The engine could not reuse a parsed formula after all: write every row's text.
      byText.splice(0, byText.length, ...formulas.filter((fc) => fc.col >= from && fc.col < to));
    }
    hf.clearClipboard();
    // Nothing here is undone through the engine; its undo stack would only hold the pasted blocks.
    hf.clearUndoStack();
    if (byText.length === 0) return;
    hf.batch(() => {
      for (const fc of byText) {
        const column: Row[] = [];
        for (let r = 1; r < rows; r++) column.push([atRow(fc.pieces, r)]);
        hf.setCellContents({ sheet: this.sheet, row: 1, col: fc.col }, column);
      }
    });
  }

  /** A check's value cell: its own column (other checks read it by name), holding the number or the formula. */
  private valueCell(formula: string, col: number): { ok: true; cell: FormulaCell } | { ok: false; error: string } {
    const constant = constantNumber(formula);
    if (constant !== undefined) return { ok: true, cell: { col, names: [], constant } };
    const c = this.compile(formula, (key) => this.ref(key));
    if (!c.ok) return c;
    return { ok: true, cell: { col, names: c.names, pieces: c.text.split(ROW_MARK) } };
  }

  /**
   * The memo sheet row for these parameters: an existing entry with the same inputs, or a new one — appended to
   * `pending` while the table is being built, written to the engine at once after that.
   */
  /** A variant's parameters with its role values, the inputs a memo may read. */
  private withRoles(params: ReadonlyMap<string, ParamValue>, row: number): Map<string, ParamValue> {
    const inputs = new Map(params);
    for (const [k, v] of Object.entries(this.resolution[row]!.roleNames)) inputs.set(k, v);
    return inputs;
  }

  private memoEntry(m: Memo, params: ReadonlyMap<string, ParamValue>, pending?: Row[]): number {
    const key = inputKey(m.inputs, params);
    const found = m.entries.get(key);
    if (found !== undefined) return found;
    const row = this.memoRows++;
    m.entries.set(key, row);
    const content: Row = [atRow(m.pieces, row)];
    for (const k of m.inputs) {
      const val = params.get(k);
      content.push(val === undefined ? MISSING : paramCell(val));
    }
    if (pending) pending.push(content);
    else this.engine().setCellContents({ sheet: this.memoSheet, row, col: 0 }, [content]);
    return row;
  }

  private writeParams(row: Row, v: Variant): void {
    const own = ownParams(v);
    for (const key of this.paramKeys) {
      const val = own.get(key);
      row[this.cols.get(key)!] = val === undefined ? MISSING : paramCell(val);
    }
  }

  private value(row: number, col: number): CellValue {
    return this.engine().getCellValue({ sheet: this.sheet, row, col });
  }

  /** Names (transitively through check names) a formula reads that this variant lacks. */
  private missingNames(row: number, names: readonly string[], seen = new Set<string>()): string[] {
    const out: string[] = [];
    for (const key of names) {
      if (seen.has(key)) continue;
      seen.add(key);
      const cc = this.checkByName.get(key);
      if (cc) {
        const inner = cc.cells.value;
        if (inner) out.push(...this.missingNames(row, inner.names, seen));
        continue;
      }
      const col = this.cols.get(key);
      if (col === undefined) {
        out.push(key);
        continue;
      }
      const v = this.value(row, col);
      if (isEngineError(v) && v.type === 'NA' && (this.paramKeys.has(key) || this.roleKeySet.has(key))) out.push(key);
    }
    return out;
  }

  private unknownMessage(key: string, row: number): string {
    const code = this.book.variants[row]?.code ?? '';
    if (!this.cols.has(key)) return `unknown name ${key}: no variant parameter, part rating or check has that name`;
    if (this.roleKeySet.has(key)) {
      return `unknown name ${key}: no build line that applies to ${code} gives a part with that role and rating`;
    }
    return `unknown name ${key}: variant ${code} has no parameter of that name`;
  }

  /** Reads a formula cell as a check value, or the error explaining why there is none. */
  private read(row: number, fc: FormulaCell): { ok: true; value: CheckValue } | { ok: false; error: string } {
    if (fc.constant !== undefined) return { ok: true, value: fc.constant };
    const v =
      fc.memo === undefined
        ? this.value(row, fc.col)
        : this.engine().getCellValue({ sheet: this.memoSheet, row: this.memos[fc.memo]!.rowEntry[row]!, col: 0 });
    if (isEngineError(v)) {
      const missing = this.missingNames(row, fc.names);
      if (missing.length > 0) return { ok: false, error: this.unknownMessage(missing[0]!, row) };
      return { ok: false, error: engineErrorText(v) };
    }
    if (typeof v === 'number' && !Number.isFinite(v)) return { ok: false, error: 'the result is not a finite number' };
    if (typeof v === 'number' || typeof v === 'string' || typeof v === 'boolean' || v === null) return { ok: true, value: v };
    return { ok: false, error: 'the result is a range, not one value' };
  }

  private resolveRow(v: Variant, r: number): VariantResolution {
    const problems: ResolveProblem[] = [];
    const problem = (lineId: string, message: string): void =>
      void problems.push({ variantId: v.id, variantCode: v.code, lineId, message });
    const roleNames: Record<string, number> = {};
    const roleLine = new Map<string, BuildLine>();
    const lines = this.lineCells.map((lc): ResolvedLine => {
      const line = lc.line;
      let applies = true;
      if (lc.problems.length > 0) {
        for (const p of lc.problems) problem(line.id, p);
        return { lineId: line.id, partId: line.partId, qtyPerUnit: 0, applies: false };
      }
      if (lc.applies) {
        const a = this.read(r, lc.applies);
        if (!a.ok) {
          problem(line.id, `applies-when rule: ${a.error}`);
          return { lineId: line.id, qtyPerUnit: 0, applies: false };
        }
        if (typeof a.value === 'boolean') applies = a.value;
        else if (typeof a.value === 'number') applies = a.value !== 0;
        else {
          problem(line.id, `applies-when rule gave ${a.value === null ? 'nothing' : `text "${a.value}"`}, not TRUE or FALSE`);
          return { lineId: line.id, qtyPerUnit: 0, applies: false };
        }
      }
      // Lines that do not apply are not checked: their rules may read parameters only other variants have.
      const partId = this.resolvePart(lc, r, applies ? (m) => problem(line.id, m) : () => undefined);
      if (!applies) return { lineId: line.id, partId, qtyPerUnit: 0, applies };
      let qty = lc.qtyConst ?? 0;
      if (lc.qty) {
        const q = this.read(r, lc.qty);
        if (!q.ok) problem(line.id, `quantity rule: ${q.error}`);
        else if (typeof q.value !== 'number') problem(line.id, `quantity rule gave ${q.value === null ? 'nothing' : String(q.value)}, not a number`);
        else qty = q.value;
      }
      if (qty < 0) {
        problem(line.id, `quantity per unit is negative (${significant(qty)})`);
        qty = 0;
      }
      if (partId !== undefined && line.role) {
        const role = nameKey(line.role);
        const first = roleLine.get(role);
        if (first) problem(line.id, `role ${role} is already given by line ${first.designators || first.id}; this line's part is not read by checks`);
        else {
          roleLine.set(role, line);
          const part = this.partsById.get(partId)!;
          if (part.value !== undefined && Number.isFinite(part.value)) roleNames[`${role}_value`] = part.value;
          for (const [k, val] of Object.entries(part.ratings)) {
            if (Number.isFinite(val)) roleNames[`${role}_${nameKey(k)}`] = val;
          }
        }
      }
      return { lineId: line.id, partId, qtyPerUnit: qty, applies };
    });
    const errors = new Map<string, string>();
    for (const p of problems) errors.set(p.lineId, errors.has(p.lineId) ? `${errors.get(p.lineId)}; ${p.message}` : p.message);
    for (const l of lines) {
      const e = errors.get(l.lineId);
      if (e !== undefined) l.error = e;
    }
    return { variantId: v.id, variantCode: v.code, lines, roleNames, problems };
  }

  private resolvePart(lc: LineCells, r: number, problem: (m: string) => void): string | undefined {
    if (lc.part) {
      const p = this.read(r, lc.part);
      if (!p.ok) {
        problem(`part rule: ${p.error}`);
        return undefined;
      }
      if (typeof p.value !== 'string' || p.value.trim() === '') {
        problem(`part rule gave ${p.value === null || p.value === '' ? 'nothing' : String(p.value)}, not a maker part number`);
        return undefined;
      }
      const part = this.partsByKey.get(mpnKey(p.value));
      if (!part) {
        problem(`unknown part number ${p.value}`);
        return undefined;
      }
      return part.id;
    }
    if (!lc.line.partId) {
      problem('the line has neither a part nor a part rule');
      return undefined;
    }
    if (!this.partsById.has(lc.line.partId)) {
      problem(`part ${lc.line.partId} is not in the Book`);
      return undefined;
    }
    return lc.line.partId;
  }

  /** Build lines resolved for every variant, as they stand now. */
  resolve(): FamilyResolution {
    const variants = this.resolution;
    return { variants, problems: variants.flatMap((v) => v.problems) };
  }

  /** Every check on every variant, variant-major, in the order of the checks. */
  results(): CheckResult[] {
    const out: CheckResult[] = [];
    this.book.variants.forEach((v, r) => {
      let row = this.rowResults[r];
      if (!row) {
        row = this.checkCells.map((cc) => this.resultFor(v, r, cc));
        this.rowResults[r] = row;
      }
      for (const result of row) out.push(result);
    });
    return out;
  }

  private resultFor(v: Variant, r: number, cc: CheckCells): CheckResult {
    // No closures or spreads here: this runs for every variant and check when a large family opens.
    const check = cc.check;
    if (cc.problem !== undefined) return checkResult(v, check, null, CHECK_STATUS.error, cc.problem);
    if (cc.cells.applies) {
      const a = this.read(r, cc.cells.applies);
      if (!a.ok) return checkResult(v, check, null, CHECK_STATUS.error, `applies: ${a.error}`);
      const applies = typeof a.value === 'boolean' ? a.value : typeof a.value === 'number' ? a.value !== 0 : null;
      if (applies === null) {
        return checkResult(v, check, null, CHECK_STATUS.error, `applies gave ${a.value === null ? 'nothing' : `text "${a.value}"`}, not TRUE or FALSE`);
      }
      if (!applies) return checkResult(v, check, null, CHECK_STATUS.na, 'does not apply to this variant');
    }
    const val = this.read(r, cc.cells.value!);
    if (!val.ok) return checkResult(v, check, null, CHECK_STATUS.error, val.error);
    const limits: RuleLimits = {};
    for (const part of LIMIT_PARTS) {
      const fc = cc.cells[part];
      if (!fc) continue;
      const l = this.read(r, fc);
      if (!l.ok) return checkResult(v, check, val.value, CHECK_STATUS.error, `rule ${part}: ${l.error}`);
      if (typeof l.value !== 'number') return checkResult(v, check, val.value, CHECK_STATUS.error, `rule ${part} gave ${String(l.value)}, not a number`);
      limits[part] = l.value;
    }
    const j = judge(val.value, check.rule, limits);
    return checkResult(v, check, val.value, j.status, j.message, limits, limitText(check.rule, limits));
  }

  /**
   * Sets one parameter of one variant and re-evaluates. A number must be finite; text is kept as text. A name no
   * variant had before recompiles the table. Bad input changes nothing.
   */
  setParam(variantId: string, name: string, value: ParamValue): EditResult {
    const row = this.book.variants.findIndex((v) => v.id === variantId);
    if (row < 0) return { ok: false, error: `no variant with id ${variantId}` };
    const key = nameKey(name.trim());
    if (!/^[a-z_][a-z0-9_]*$/.test(key)) return { ok: false, error: `parameter name "${name}" must be letters, digits and _, starting with a letter` };
    if (typeof value === 'number' && !Number.isFinite(value)) return { ok: false, error: `value of ${name} must be a finite number` };
    if (typeof value !== 'number' && typeof value !== 'string') return { ok: false, error: `value of ${name} must be a number or text` };
    if (!this.paramKeys.has(key) && (this.cols.has(key) || this.possibleRoleKeys.has(key))) {
      return { ok: false, error: `${name} is already the name of a check or a part rating; choose another parameter name` };
    }
    const old = this.book.variants[row]!;
    const params: Record<string, ParamValue> = {};
    let replaced = false;
    for (const [k, v] of Object.entries(old.params)) {
      if (nameKey(k) === key) {
        params[k] = value;
        replaced = true;
      } else params[k] = v;
    }
    if (!replaced) params[name.trim()] = value;
    const variants = [...this.book.variants];
    variants[row] = { ...old, params };
    this.book = { ...this.book, variants };
    if (!this.paramKeys.has(key)) {
      this.build();
      return { ok: true };
    }
    const hf = this.engine();
    hf.setCellContents({ sheet: this.sheet, row, col: this.cols.get(key)! }, [[paramCell(value)]]);
    const own = ownParams(this.book.variants[row]!);
    for (const m of this.memos) if (!m.roles && m.inputs.includes(key)) m.rowEntry[row] = this.memoEntry(m, own);
    this.refreshRoles(row, own);
    const inputs = this.withRoles(own, row);
    for (const m of this.memos) if (m.roles && m.inputs.includes(key)) m.rowEntry[row] = this.memoEntry(m, inputs);
    // Every formula reads its own row only, so no other variant's results can have changed.
    this.rowResults[row] = undefined;
    return { ok: true };
  }

  /** Re-resolves one variant's lines after an edit and rewrites its role cells and memos where they changed. */
  private refreshRoles(row: number, own: ReadonlyMap<string, ParamValue>): void {
    const v = this.book.variants[row]!;
    const before = this.resolution[row]!.roleNames;
    const after = this.resolveRow(v, row);
    this.resolution[row] = after;
    const changed = this.roleKeys.filter((k) => before[k] !== after.roleNames[k]);
    if (changed.length === 0) return;
    const inputs = this.withRoles(own, row);
    for (const m of this.memos) if (m.roles && changed.some((k) => m.inputs.includes(k))) m.rowEntry[row] = this.memoEntry(m, inputs);
    const hf = this.engine();
    hf.batch(() => {
      for (const key of changed) {
        const val = after.roleNames[key];
        hf.setCellContents({ sheet: this.sheet, row, col: this.cols.get(key)! }, [[val === undefined ? MISSING : val]]);
      }
    });
  }

  /**
   * Replaces a check's formula and re-evaluates it for every variant. A formula that cannot be read (an open
   * quote) is refused and changes nothing; one naming something unknown is kept and shows "unknown name x".
   */
  setCheckFormula(checkId: string, formula: string): EditResult {
    const i = this.checks.findIndex((c) => c.id === checkId);
    if (i < 0) return { ok: false, error: `no check with id ${checkId}` };
    const body = formulaBody(formula);
    if (body === '') return { ok: false, error: 'the formula is empty' };
    const t = tokenizeFormula(body);
    if (!t.ok) return { ok: false, error: t.error };
    const guard = guardFormula(body);
    if (!guard.ok) return { ok: false, error: guard.refusal.message };
    const updated: Check = { ...this.checks[i]!, formula: body };
    this.checks = this.checks.map((c, j) => (j === i ? updated : c));
    const cc = this.checkCells[i]!;
    const c = cc.col === undefined ? undefined : this.valueCell(body, cc.col);
    const names = formulaNames(body);
    // A role name no check read before has no column yet.
    const newRole = names.ok && names.names.some((k) => this.possibleRoleKeys.has(k) && !this.roleKeySet.has(k));
    if (cc.problem !== undefined || !c?.ok || newRole) {
      // The check could not be evaluated before, or cannot now: compile the table afresh so every part of the
      // check (applies, limits) is laid out again and the result shows the reason.
      this.build();
      return { ok: true };
    }
    cc.check = updated;
    const fc = c.cell;
    cc.cells.value = fc;
    if (this.book.variants.length > 0) {
      this.engine().setCellContents({ sheet: this.sheet, row: 0, col: fc.col }, [[valueContent(fc, 0)]]);
      this.fillDown(fc.pieces ? [{ col: fc.col, pieces: fc.pieces }] : [], fc.col, fc.col + 1);
    }
    this.rowResults = [];
    return { ok: true };
  }
}

/** Resolves every build line for every variant (applies-when, quantity and part rules). */
export function resolveFamily(book: Book): FamilyResolution {
  const wb = FamilyWorkbook.open(book, []);
  try {
    return wb.resolve();
  } finally {
    wb.close();
  }
}

/** Evaluates checks (by default the Book's own) on every variant. */
export function evaluateChecks(book: Book, checks: readonly Check[] = book.checks): CheckResult[] {
  const wb = FamilyWorkbook.open(book, checks);
  try {
    return wb.results();
  } finally {
    wb.close();
  }
}
