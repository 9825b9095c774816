// The family table's layout plan: which columns, memos and constants hold each parameter, role name, build-rule part
// and check part, worked out from the Book alone before any engine exists (family-workbook.ts writes it into one).
//
// Columns are every variant parameter, the role names (`<role>_<rating>`, `<role>_value`) some check reads, every
// check value (so checks may read each other by name), then the check limits that read check values. Formulas that
// read only parameters and role names (every build rule, most applies rules and limits) go to a memo instead (see
// Memo). A rule that is a plain number stays that number, one that is a single name reads that name's column, and
// identical formulas share one cell.
import type { RawCellContent } from 'hyperformula';
import type { Book, BuildLine, Check } from '../domain/book.ts';
import type { CheckValue } from '../domain/check-status.ts';
import { PART_RATINGS } from '../domain/params.ts';
import { columnLetters } from './cells.ts';
import { guardFormula } from './formula-guard.ts';
import { constantNumber, formulaNames, nameKey, rewriteFormula, soleName } from './formula-names.ts';
import { normalizeFormula } from './formula-syntax.ts';

/** Stands for the row number in a formula's text until the formula is written to a row (see atRow). */
const ROW_MARK = '\u0001';

/**
 * Where a compiled rule or check part is read for a row: a constant that needs no cell, a memo (below), or a column
 * of the family table (its own formula, one shared with an identical formula, or the column of the one name it
 * is). `names` are the names the formula reads.
 */
export interface FormulaCell {
  col: number;
  names: string[];
  constant?: number;
  /** Index of the memo that holds this formula's value. */
  memo?: number;
  /** A check value's own formula, cut at the row number. */
  pieces?: string[];
}

/** A placed cell read for one row: its value, or why there is none (family-workbook.ts reads them). */
export type CellRead = { ok: true; value: CheckValue } | { ok: false; error: string };
export type ReadCell = (row: number, fc: FormulaCell) => CellRead;

/**
 * A formula that reads variant parameters only (every build rule, most applies rules) is evaluated once per
 * distinct set of the parameters it reads, not once per variant: a ladder rule reading r_s1 has a handful of
 * distinct inputs however many variants there are. Each distinct input is one row of the memo sheet: the formula
 * in column A, its inputs from column B on. The plan leaves `entries` and `rowEntry` empty for the workbook to fill.
 */
export interface Memo {
  /** Parameter and role names the formula reads, in the order of its input columns. */
  inputs: string[];
  /** Whether a role name is among the inputs: then its entries wait for the lines to be resolved. */
  roles: boolean;
  /** The formula as written on the memo sheet, cut at the row number. */
  pieces: string[];
  /** Input key → memo sheet row. */
  entries: Map<string, number>;
  /** Family row → memo sheet row. */
  rowEntry: Int32Array;
  /** No rule reads it any more (the rule was edited in place): a parameter edit adds no entries for it. */
  retired?: boolean;
}

/** A formula column: its text cut at the row number, so each row's copy is a join. */
export interface FormulaColumn {
  col: number;
  pieces: string[];
}

export interface LineCells {
  line: BuildLine;
  applies?: FormulaCell;
  qty?: FormulaCell;
  qtyConst?: number;
  part?: FormulaCell;
  /** Problems shared by every variant (a rule that does not compile). */
  problems: string[];
}

export type CheckPart = 'value' | 'applies' | 'limit' | 'low' | 'high';

export interface CheckCells {
  check: Check;
  /** Column of the check's name, absent when the name clashes with another name. */
  col?: number;
  cells: Partial<Record<CheckPart, FormulaCell>>;
  /** Why the check cannot be evaluated at all (same for every variant). */
  problem?: string;
}

export interface FamilyLayout {
  /** Name key → column, for parameters, role names and check names. */
  cols: Map<string, number>;
  paramKeys: Set<string>;
  /** Role names that have a column: those some check reads (the others only feed the resolution). */
  roleKeys: string[];
  roleKeySet: Set<string>;
  /** Every `<role>_<rating>` the Book's lines and parts could give, with or without a column. */
  possibleRoleKeys: Set<string>;
  /** First role name column; parameters take the columns before it. */
  roleStart: number;
  /** First check value column. */
  checkStart: number;
  width: number;
  /** One per build line, in `position` order. */
  lineCells: LineCells[];
  /** One per check, in the order of the checks. */
  checkCells: CheckCells[];
  checkByName: Map<string, CheckCells>;
  memos: Memo[];
  /** Build-rule formulas that got a column rather than a memo. */
  ruleColumns: FormulaColumn[];
  /** Check applies and limit formulas that got a column. */
  checkColumns: FormulaColumn[];
}

type Compiled = { ok: true; text: string; names: string[] } | { ok: false; error: string };
export type Placed = { ok: true; cell: FormulaCell } | { ok: false; error: string };

/** A formula's text for row r (0-based) of its sheet. */
export function atRow(pieces: readonly string[], r: number): string {
  return pieces.join(String(r + 1));
}

/** What a check's value column holds in row r. */
export function valueContent(fc: FormulaCell, r: number): RawCellContent {
  return fc.constant ?? atRow(fc.pieces!, r);
}

function sortedLines(book: Book): BuildLine[] {
  return [...book.buildLines].sort((a, b) => a.position - b.position || a.id.localeCompare(b.id));
}

function compile(formula: string, lookup: (key: string) => string | undefined): Compiled {
  // Rules and checks from a Book file or a form never reach the engine when they are too long, too deep or range
  // over too many cells: such a formula could freeze the page or overflow the engine's stack.
  const guard = guardFormula(formula);
  if (!guard.ok) return { ok: false, error: guard.refusal.message };
  const names = formulaNames(formula);
  if (!names.ok) return { ok: false, error: names.error };
  // Names nobody has become NA() so an applies rule or an untaken IF branch still decides; the result then
  // explains the name (the workbook's missingNames).
  // Numbers come out as the engine prints them, so a formula copied down the table is found again (its fillDown).
  const r = rewriteFormula(normalizeFormula(formula), lookup, 'NA()');
  if (!r.ok) return { ok: false, error: r.error };
  return { ok: true, text: r.formula, names: names.names };
}

/** The cell reference of a name's column in the current row, or undefined when the name has no column. */
function ref(layout: FamilyLayout, key: string): string | undefined {
  const col = layout.cols.get(key);
  return col === undefined ? undefined : `${columnLetters(col)}${ROW_MARK}`;
}

/** A check's value cell: its own column (other checks read it by name), holding the number or the formula. */
export function valueCell(layout: FamilyLayout, formula: string, col: number): Placed {
  const constant = constantNumber(formula);
  if (constant !== undefined) return { ok: true, cell: { col, names: [], constant } };
  const c = compile(formula, (key) => ref(layout, key));
  if (!c.ok) return c;
  return { ok: true, cell: { col, names: c.names, pieces: c.text.split(ROW_MARK) } };
}

/** Where the formulas placed so far went, so identical formulas share one column or memo. */
interface Placing {
  layout: FamilyLayout;
  /** Compiled text → column. */
  shared: Map<string, number>;
  /** Inputs and memo text → memo. */
  memoIndex: Map<string, number>;
  nextCol: () => number;
}

/**
 * Places a rule or check part: a plain number stays a constant, a single known name reads its own column, a
 * formula that reads parameters only goes to a memo, and any other formula gets a column — the same column (or
 * memo) as an identical formula placed before.
 */
function place(p: Placing, formula: string, lookup: (key: string) => string | undefined, out: FormulaColumn[]): Placed {
  const layout = p.layout;
  const constant = constantNumber(formula);
  if (constant !== undefined) return { ok: true, cell: { col: -1, names: [], constant } };
  const c = compile(formula, lookup);
  if (!c.ok) return c;
  const name = soleName(formula);
  if (name !== undefined && lookup(name) !== undefined) return { ok: true, cell: { col: layout.cols.get(name)!, names: c.names } };
  // Names the lookup does not know read as NA() in either layout; any other name must be a parameter or a role
  // name (known once the lines are resolved), not a check.
  if (c.names.every((k) => lookup(k) === undefined || layout.paramKeys.has(k) || layout.roleKeySet.has(k))) {
    const inputs = c.names.filter((k) => lookup(k) !== undefined);
    const m = compile(formula, (k) => {
      const i = inputs.indexOf(k);
      return i < 0 ? undefined : `${columnLetters(i + 1)}${ROW_MARK}`;
    });
    if (!m.ok) return m;
    const key = `${inputs.join(',')}|${m.text}`;
    let memo = p.memoIndex.get(key);
    if (memo === undefined) {
      memo = layout.memos.length;
      p.memoIndex.set(key, memo);
      const roles = inputs.some((k) => layout.roleKeySet.has(k));
      layout.memos.push({ inputs, roles, pieces: m.text.split(ROW_MARK), entries: new Map(), rowEntry: new Int32Array(0) });
    }
    return { ok: true, cell: { col: -1, names: c.names, memo } };
  }
  let col = p.shared.get(c.text);
  if (col === undefined) {
    col = p.nextCol();
    p.shared.set(c.text, col);
    out.push({ col, pieces: c.text.split(ROW_MARK) });
  }
  return { ok: true, cell: { col, names: c.names } };
}

/** How a build rule reads names: parameters only, as role and check names depend on the lines themselves. */
function buildRuleRef(layout: FamilyLayout): (key: string) => string | undefined {
  return (key) => (layout.paramKeys.has(key) ? ref(layout, key) : undefined);
}

/**
 * A build rule placed on its own, for an edit made in place (FamilyWorkbook.setLineTerms): a constant, a parameter's
 * column, or a new memo added to the layout (its entries for the workbook to fill); why it does not compile; or
 * undefined where it would need a column of the table (build rules read parameters only, so it never does today).
 */
export function placeBuildRule(layout: FamilyLayout, formula: string): Placed | undefined {
  const columns: FormulaColumn[] = [];
  const placed = place({ layout, shared: new Map(), memoIndex: new Map(), nextCol: () => -1 }, formula, buildRuleRef(layout), columns);
  return columns.length > 0 ? undefined : placed;
}

/** What a role name stands for: the rating (or `value`) of the part a line with that role gives. */
export interface RoleName {
  role: string;
  rating: string;
}

/**
 * Every `<role>_<rating>` and `<role>_value` the Book's lines and parts could give, by name key, with the role and
 * rating it reads; a variant parameter of the same name hides it (`paramKeys`).
 */
export function roleNames(book: Book, paramKeys: ReadonlySet<string>): Map<string, RoleName> {
  const ratings = new Set<string>(PART_RATINGS.map((r) => r.name));
  for (const p of book.parts) for (const k of Object.keys(p.ratings)) ratings.add(nameKey(k));
  ratings.add('value');
  const out = new Map<string, RoleName>();
  for (const line of sortedLines(book)) {
    const role = line.role ? nameKey(line.role) : '';
    if (role === '') continue;
    for (const rating of ratings) {
      const key = `${role}_${rating}`;
      if (!paramKeys.has(key) && !out.has(key)) out.set(key, { role, rating });
    }
  }
  return out;
}

/** Lays out the Book's family with these checks. */
export function planFamily(book: Book, checks: readonly Check[]): FamilyLayout {
  const layout: FamilyLayout = {
    cols: new Map(),
    paramKeys: new Set(),
    roleKeys: [],
    roleKeySet: new Set(),
    possibleRoleKeys: new Set(),
    roleStart: 0,
    checkStart: 0,
    width: 0,
    lineCells: [],
    checkCells: [],
    checkByName: new Map(),
    memos: [],
    ruleColumns: [],
    checkColumns: [],
  };
  let next = 0;
  const placing: Placing = { layout, shared: new Map(), memoIndex: new Map(), nextCol: () => next++ };
  for (const v of book.variants) {
    for (const name of Object.keys(v.params)) {
      const key = nameKey(name);
      if (layout.cols.has(key)) continue;
      layout.cols.set(key, next++);
      layout.paramKeys.add(key);
    }
  }
  const anyRef = (key: string): string | undefined => ref(layout, key);

  const lines = sortedLines(book);
  layout.lineCells = lines.map((line) => {
    const lc: LineCells = { line, problems: [] };
    const cell = (what: string, formula: string): FormulaCell | undefined => {
      const c = place(placing, formula, buildRuleRef(layout), layout.ruleColumns);
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

  for (const key of roleNames(book, layout.paramKeys).keys()) layout.possibleRoleKeys.add(key);
  // A role name gets a column only when some check reads it; the rest are many (every rating of every role) and
  // would only hold #N/A or a number nobody reads.
  const read = new Set<string>();
  for (const check of checks) {
    for (const f of [check.formula, check.appliesWhen, check.rule.limit, check.rule.low, check.rule.high]) {
      if (f === undefined) continue;
      const n = formulaNames(f);
      if (n.ok) for (const key of n.names) read.add(key);
    }
  }
  layout.roleStart = next;
  for (const key of layout.possibleRoleKeys) {
    if (!read.has(key)) continue;
    layout.cols.set(key, next++);
    layout.roleKeys.push(key);
  }
  layout.roleKeySet = new Set(layout.roleKeys);
  layout.checkStart = next;
  layout.checkCells = checks.map((check) => {
    const cc: CheckCells = { check, cells: {} };
    const key = nameKey(check.name);
    if (!/^[a-z_][a-z0-9_]*$/.test(key)) cc.problem = `check name "${check.name}" must be letters, digits and _`;
    else if (layout.paramKeys.has(key)) cc.problem = `check name ${check.name} is also a variant parameter; rename the check`;
    else if (layout.cols.has(key) || layout.possibleRoleKeys.has(key)) cc.problem = `check name ${check.name} is used twice or is a part rating name`;
    else {
      cc.col = next++;
      layout.cols.set(key, cc.col);
      layout.checkByName.set(key, cc);
    }
    return cc;
  });
  for (const cc of layout.checkCells) {
    if (cc.problem !== undefined || cc.col === undefined) continue;
    const v = valueCell(layout, cc.check.formula, cc.col);
    if (!v.ok) cc.problem = v.error;
    else cc.cells.value = v.cell;
  }
  for (const cc of layout.checkCells) {
    if (cc.problem !== undefined) continue;
    const parts: [CheckPart, string | undefined][] = [
      ['applies', cc.check.appliesWhen.trim() === '' ? undefined : cc.check.appliesWhen],
      ['limit', cc.check.rule.limit],
      ['low', cc.check.rule.low],
      ['high', cc.check.rule.high],
    ];
    for (const [part, formula] of parts) {
      if (formula === undefined) continue;
      const c = place(placing, formula, anyRef, layout.checkColumns);
      if (!c.ok) {
        cc.problem = `${part === 'applies' ? 'applies' : 'rule'}: ${c.error}`;
        break;
      }
      cc.cells[part] = c.cell;
    }
  }
  layout.width = next;
  return layout;
}
