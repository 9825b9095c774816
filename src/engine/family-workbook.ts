// The family as one open engine table: writes the layout plan (family-layout.ts) into an engine from create.ts,
// applies parameter and check edits to the rows they touch, and reads cells back for line resolution and check judging.
//
// Speed comes from doing less per cell: a missing name is the error value #N/A, not a formula; the first row's
// formulas are copied down instead of parsed again per row; results are kept per row and an edit recomputes its row
// only. A name a variant lacks reads as #N/A; when a result is an error and its formula used such a name, the result
// says "unknown name x" instead of the engine's error.
import type { CellValue, HyperFormula, RawCellContent } from 'hyperformula';
import type { Book, BuildLine, Check, ParamValue, Variant } from '../domain/book.ts';
import { STATUS_SEVERITY } from '../domain/check-status.ts';
import { changeInOne, createEngine } from './create.ts';
import { judgeCheck } from './family-checks.ts';
import type { CheckResult } from './family-checks.ts';
import { atRow, placeBuildRule, planFamily, roleNames, valueCell, valueContent } from './family-layout.ts';
import type { CellRead, CheckCells, FamilyLayout, FormulaCell, FormulaColumn, LineCells, Memo, ReadCell } from './family-layout.ts';
import { indexParts, partRoleNames, resolveVariant } from './family-lines.ts';
import type { FamilyResolution, PartIndex, VariantResolution } from './family-lines.ts';
import { runAtOnce } from '../domain/slices.ts';
import type { Sliced } from '../domain/slices.ts';
import { guardFormula } from './formula-guard.ts';
import { constantNumber, formulaNames, nameKey, tokenizeFormula, formulaBody } from './formula-names.ts';

export type EditResult = { ok: true } | { ok: false; error: string };

/** A name this variant lacks: the error value itself, so the engine parses no formula for it. */
const MISSING = '#N/A';
const SHEET = 'family';
const MEMO_SHEET = 'rules';
/** Rows resolved between two yields of a stepped compile or line edit: 200 took 11–28 ms in Node. */
export const ROWS_PER_STEP = 50;

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

/**
 * A row below the variants that repeats variant `variant` with one line's approved alternate in place of its part:
 * the checks reading that line's role are judged there too, and the worst result is the variant's.
 */
interface AltRow {
  lineId: string;
  partId: string;
  variant: number;
  /** The line's role, by name key. */
  role: string;
}

/** Every role (by name key) a check reads, through the checks it names. */
function rolesRead(cc: CheckCells, layout: FamilyLayout, roleOf: ReadonlyMap<string, string>, seen = new Set<string>()): Set<string> {
  const out = new Set<string>();
  for (const fc of Object.values(cc.cells)) {
    for (const key of fc.names) {
      const role = roleOf.get(key);
      if (role !== undefined) out.add(role);
      const inner = layout.checkByName.get(key);
      if (inner && !seen.has(key)) {
        seen.add(key);
        for (const r of rolesRead(inner, layout, roleOf, seen)) out.add(r);
      }
    }
  }
  return out;
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
  /** Set by build(), which every way of making a workbook runs first. */
  private layout!: FamilyLayout;
  private parts: PartIndex = { byId: new Map(), byKey: new Map() };
  private resolution: VariantResolution[] = [];
  /** Rows from `variants.length` on: variants again with an approved alternate swapped in (see AltRow). */
  private altRows: AltRow[] = [];
  private altResolution: VariantResolution[] = [];
  /** Per variant, its alternate rows. */
  private altRowsOf: number[][] = [];
  /** Per check, the roles it reads (only worked out when some line has approved alternates). */
  private checkRoles: Set<string>[] = [];
  /** The columns the alternate rows hold (see altColumns); undefined without alternate rows. */
  private altKeep: Set<number> | undefined;
  private memoSheet = 0;
  private memoRows = 0;
  /** Each row's check results as last read; undefined where an edit may have changed them. */
  private rowResults: (CheckResult[] | undefined)[] = [];
  private readonly readCell: ReadCell = (row, fc) => this.read(row, fc);

  private constructor(book: Book, checks: Check[]) {
    this.book = book;
    this.checks = checks;
  }

  /** Compiles the Book's family with the given checks (by default the Book's own). */
  static open(book: Book, checks: readonly Check[] = book.checks): FamilyWorkbook {
    return runAtOnce(FamilyWorkbook.openInSteps(book, checks));
  }

  /**
   * As `open`, yielding between the parts of the compile (the engine's own build is one part; the variants are
   * resolved a few dozen at a time): the figures worker pauses there while the page draws (figures-worker.ts).
   */
  static *openInSteps(book: Book, checks: readonly Check[] = book.checks): Sliced<FamilyWorkbook> {
    const wb = new FamilyWorkbook(book, [...checks]);
    try {
      yield* wb.buildSteps();
    } catch (e) {
      // A compile that fails part-way frees the engine it built; the caller never gets the workbook to close.
      wb.close();
      throw e;
    }
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

  private build(): void {
    runAtOnce(this.buildSteps());
  }

  /** Resolves every row a part at a time: the variants, then their alternate rows (which read the variants'). */
  private *resolveAll(): Sliced<void> {
    const n = this.book.variants.length;
    const resolution: VariantResolution[] = [];
    for (let r = 0; r < n; r++) {
      if (r > 0 && r % ROWS_PER_STEP === 0) yield;
      resolution.push(this.resolveRow(r));
    }
    this.resolution = resolution;
    const altResolution: VariantResolution[] = [];
    for (let i = 0; i < this.altRows.length; i++) {
      if (i > 0 && i % ROWS_PER_STEP === 0) yield;
      altResolution.push(this.resolveRow(n + i));
    }
    this.altResolution = altResolution;
  }

  private *buildSteps(): Sliced<void> {
    this.hf?.destroy();
    this.hf = null;
    this.rowResults = [];
    this.memoRows = 0;
    this.parts = indexParts(this.book.parts);
    const layout = planFamily(this.book, this.checks);
    this.layout = layout;
    const { roleStart, checkStart, width } = layout;
    this.planAlternates();
    const total = this.rowCount();
    const n = this.book.variants.length;
    // The alternate rows hold only the cells their checks read (parameters, role values, check columns).
    const altKeep = this.altRows.length > 0 ? this.altColumns() : undefined;
    this.altKeep = altKeep;

    // First pass, in one call: the parameters, and the memos of the build rules and of the check parts that read
    // parameters only, so each variant's parts are known before the checks read them.
    const paramEnd = layout.paramKeys.size;
    const rows: Row[] = [];
    for (let r = 0; r < total; r++) {
      const row: Row = new Array<RawCellContent>(roleStart).fill(null);
      this.writeParams(row, this.variantAt(r));
      if (r >= n && altKeep) for (let c = 0; c < roleStart; c++) if (!altKeep.has(c)) row[c] = null;
      if (r === 0) for (const fc of layout.ruleColumns) row[fc.col] = atRow(fc.pieces, 0);
      rows.push(row);
    }
    const memoRows: Row[] = [];
    const own = rows.map((_, r) => ownParams(this.variantAt(r)));
    for (const m of layout.memos) {
      m.rowEntry = new Int32Array(total);
      if (!m.roles) own.forEach((params, r) => (m.rowEntry[r] = this.memoEntry(m, params, memoRows)));
    }
    yield;
    // Checks read each other by name, so "&" could double text from check to check: the engine comes with it bounded.
    const hf = createEngine({}, { [SHEET]: rows, [MEMO_SHEET]: memoRows });
    this.hf = hf;
    this.sheet = hf.getSheetId(SHEET)!;
    this.memoSheet = hf.getSheetId(MEMO_SHEET)!;
    // Build rules read parameters only, so they all went to memos and this is for completeness.
    this.fillDown(layout.ruleColumns, paramEnd, roleStart);
    yield;
    yield* this.resolveAll();
    yield;

    // Second pass, in one recalculation: the memos that read role names, role values from the resolved parts,
    // and the first row's checks; then the checks are copied down.
    const roleMemoStart = this.memoRows;
    const roleMemoRows: Row[] = [];
    const roleMemos = layout.memos.filter((m) => m.roles);
    if (roleMemos.length > 0) {
      own.forEach((params, r) => {
        const inputs = this.withRoles(params, r);
        for (const m of roleMemos) m.rowEntry[r] = this.memoEntry(m, inputs, roleMemoRows);
      });
    }
    if (roleMemoRows.length > 0) hf.setCellContents({ sheet: this.memoSheet, row: roleMemoStart, col: 0 }, roleMemoRows);
    if (rows.length === 0 || width === roleStart) return;
    const block: Row[] = rows.map((_, r) => {
      const row: Row = new Array<RawCellContent>((r === 0 ? width : checkStart) - roleStart).fill(null);
      const roleNames = this.resolutionAt(r).roleNames;
      layout.roleKeys.forEach((key, i) => {
        if (r >= n && altKeep && !altKeep.has(roleStart + i)) return;
        const val = roleNames[key];
        row[i] = val === undefined ? MISSING : val;
      });
      if (r > 0) return row;
      for (const cc of layout.checkCells) {
        const fc = cc.cells.value;
        if (fc) row[fc.col - roleStart] = valueContent(fc, 0);
      }
      for (const fc of layout.checkColumns) row[fc.col - roleStart] = atRow(fc.pieces, 0);
      return row;
    });
    yield;
    hf.setCellContents({ sheet: this.sheet, row: 0, col: roleStart }, block);
    yield;
    const valueColumns = layout.checkCells.flatMap((cc) => (cc.cells.value?.pieces ? [{ col: cc.cells.value.col, pieces: cc.cells.value.pieces }] : []));
    this.fillDown([...valueColumns, ...layout.checkColumns], checkStart, width, altKeep);
  }

  /**
   * Gives every other row the first row's cells in columns [from, to); `formulas` are the formula columns among
   * them. Every formula reads its own row only, so a copy one row down is that row's formula: copying lets the
   * engine reuse the first row's parsed form instead of reading 200 or 2,000 copies of the same text. The engine
   * finds a copied formula again by its printed form, so a column whose formula prints differently from the text
   * written (spacing it drops) is written as text on every row instead. The alternate rows get only the columns
   * in `altKeep` (when given): the checks judged there and what they read.
   */
  private fillDown(formulas: readonly FormulaColumn[], from: number, to: number, altKeep?: ReadonlySet<number>): void {
    const rows = this.rowCount();
    const n = this.book.variants.length;
    if (to <= from || rows < 2) return;
    const hf = this.engine();
    const onAlt = (col: number): boolean => altKeep === undefined || altKeep.has(col);
    const byText: FormulaColumn[] = formulas.filter(
      (fc) => fc.col >= from && fc.col < to && hf.getCellFormula({ sheet: this.sheet, row: 0, col: fc.col }) !== atRow(fc.pieces, 0),
    );
    const skip = new Set(byText.map((fc) => fc.col));
    /** Contiguous runs of the columns to copy. */
    const runs = (keep: (col: number) => boolean): [number, number][] => {
      const out: [number, number][] = [];
      for (let start = from; start < to; ) {
        if (skip.has(start) || !keep(start)) {
          start++;
          continue;
        }
        let end = start;
        while (end < to && !skip.has(end) && keep(end)) end++;
        out.push([start, end]);
        start = end;
      }
      return out;
    };
    /** Doubles the filled rows [base, filledTo) of columns [start, end) down to row `last` (exclusive). */
    const double = (start: number, end: number, base: number, filledTo: number, last: number): void => {
      for (let filled = filledTo - base; base + filled < last; ) {
        const k = Math.min(filled, last - base - filled);
        hf.copy({ start: { sheet: this.sheet, row: base, col: start }, end: { sheet: this.sheet, row: base + k - 1, col: end - 1 } });
        hf.paste({ sheet: this.sheet, row: base + filled, col: start });
        filled += k;
      }
    };
    try {
      for (const [start, end] of runs(() => true)) double(start, end, 0, 1, n);
      if (rows > n) {
        for (const [start, end] of runs(onAlt)) {
          hf.copy({ start: { sheet: this.sheet, row: 0, col: start }, end: { sheet: this.sheet, row: 0, col: end - 1 } });
          hf.paste({ sheet: this.sheet, row: n, col: start });
          double(start, end, n, n + 1, rows);
        }
      }
    } catch {
      // The engine could not reuse a parsed formula after all: write every row's text.
      byText.splice(0, byText.length, ...formulas.filter((fc) => fc.col >= from && fc.col < to));
    }
    hf.clearClipboard();
    // Nothing here is undone through the engine; its undo stack would only hold the pasted blocks.
    hf.clearUndoStack();
    if (byText.length === 0) return;
    changeInOne(hf, () => {
      for (const fc of byText) {
        const column: Row[] = [];
        const last = onAlt(fc.col) ? rows : n;
        for (let r = 1; r < last; r++) column.push([atRow(fc.pieces, r)]);
        if (column.length > 0) hf.setCellContents({ sheet: this.sheet, row: 1, col: fc.col }, column);
      }
    });
  }

  /** A variant's parameters with its role values, the inputs a memo may read. */
  private withRoles(params: ReadonlyMap<string, ParamValue>, row: number): Map<string, ParamValue> {
    const inputs = new Map(params);
    for (const [k, v] of Object.entries(this.resolutionAt(row).roleNames)) inputs.set(k, v);
    return inputs;
  }

  /**
   * The memo sheet row for these parameters: an existing entry with the same inputs, or a new one — appended to
   * `pending` while the table is being built, written to the engine at once after that.
   */
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
    for (const key of this.layout.paramKeys) {
      const val = own.get(key);
      row[this.layout.cols.get(key)!] = val === undefined ? MISSING : paramCell(val);
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
      const cc = this.layout.checkByName.get(key);
      if (cc) {
        const inner = cc.cells.value;
        if (inner) out.push(...this.missingNames(row, inner.names, seen));
        continue;
      }
      const col = this.layout.cols.get(key);
      if (col === undefined) {
        out.push(key);
        continue;
      }
      const v = this.value(row, col);
      if (isEngineError(v) && v.type === 'NA' && (this.layout.paramKeys.has(key) || this.layout.roleKeySet.has(key))) out.push(key);
    }
    return out;
  }

  private unknownMessage(key: string, row: number): string {
    const code = row < this.rowCount() ? this.variantAt(row).code : '';
    if (!this.layout.cols.has(key)) return `unknown name ${key}: no variant parameter, part rating or check has that name`;
    if (this.layout.roleKeySet.has(key)) {
      return `unknown name ${key}: no build line that applies to ${code} gives a part with that role and rating`;
    }
    return `unknown name ${key}: variant ${code} has no parameter of that name`;
  }

  /** Reads a formula cell as a check value, or the error explaining why there is none. */
  private read(row: number, fc: FormulaCell): CellRead {
    if (fc.constant !== undefined) return { ok: true, value: fc.constant };
    const v =
      fc.memo === undefined
        ? this.value(row, fc.col)
        : this.engine().getCellValue({ sheet: this.memoSheet, row: this.layout.memos[fc.memo]!.rowEntry[row]!, col: 0 });
    if (isEngineError(v)) {
      const missing = this.missingNames(row, fc.names);
      if (missing.length > 0) return { ok: false, error: this.unknownMessage(missing[0]!, row) };
      return { ok: false, error: engineErrorText(v) };
    }
    if (typeof v === 'number' && !Number.isFinite(v)) return { ok: false, error: 'the result is not a finite number' };
    if (typeof v === 'number' || typeof v === 'string' || typeof v === 'boolean' || v === null) return { ok: true, value: v };
    return { ok: false, error: 'the result is a range, not one value' };
  }

  /**
   * A row's resolution. An alternate row's is its variant's with the role names of the swapped-in part in place of
   * the line's own (the variant's lines must be resolved first); unchanged when the line does not give this variant
   * its role.
   */
  private resolveRow(r: number): VariantResolution {
    const n = this.book.variants.length;
    if (r < n) return resolveVariant(this.variantAt(r), r, this.layout.lineCells, this.parts, this.readCell);
    const alt = this.altRows[r - n]!;
    const own = this.resolution[alt.variant]!;
    const line = this.book.buildLines.find((l) => l.id === alt.lineId)!;
    if (!this.givesRole(own, line)) return own;
    const given: Record<string, number> = {};
    partRoleNames(alt.role, this.parts.byId.get(line.partId!)!, given);
    const roleNames = { ...own.roleNames };
    for (const k of Object.keys(given)) delete roleNames[k];
    partRoleNames(alt.role, this.parts.byId.get(alt.partId)!, roleNames);
    return { ...own, roleNames };
  }

  /** Variants, then the alternate rows. */
  private rowCount(): number {
    return this.book.variants.length + this.altRows.length;
  }

  private variantAt(row: number): Variant {
    const n = this.book.variants.length;
    return this.book.variants[row < n ? row : this.altRows[row - n]!.variant]!;
  }

  private resolutionAt(row: number): VariantResolution {
    const n = this.book.variants.length;
    return row < n ? this.resolution[row]! : this.altResolution[row - n]!;
  }

  /**
   * Plans a row per variant and approved alternate of each fixed-part line whose role some check reads, so every
   * approved part is judged. A Book without alternates gets no extra rows and pays nothing.
   */
  private planAlternates(): void {
    this.altRows = [];
    this.altRowsOf = this.book.variants.map(() => []);
    this.checkRoles = [];
    const lines = this.alternateLines();
    if (lines.length === 0) return;
    const roleOf = this.roleOf();
    this.checkRoles = this.layout.checkCells.map((cc) => rolesRead(cc, this.layout, roleOf));
    const read = new Set(this.checkRoles.flatMap((s) => [...s]));
    const n = this.book.variants.length;
    this.book.variants.forEach((_, variant) => {
      for (const line of lines) {
        const role = nameKey(line.role!);
        if (!read.has(role)) continue;
        for (const partId of line.alternates!) {
          if (!this.parts.byId.has(partId)) continue;
          this.altRowsOf[variant]!.push(n + this.altRows.length);
          this.altRows.push({ variant, lineId: line.id, partId, role });
        }
      }
    });
  }

  /**
   * The columns the alternate rows need: the checks that read an alternate's role, the checks they read by name
   * (through any depth), the columns of their applies and limit formulas, and every parameter and role they read.
   * Build rules with a column of their own (rare: they go to memos) may read any parameter, so then all are kept.
   */
  private altColumns(): Set<number> {
    const roles = new Set(this.altRows.map((a) => a.role));
    const cols = new Set<number>();
    const seen = new Set<CheckCells>();
    const visit = (cc: CheckCells): void => {
      if (seen.has(cc)) return;
      seen.add(cc);
      if (cc.col !== undefined) cols.add(cc.col);
      for (const fc of Object.values(cc.cells)) {
        if (fc.memo === undefined && fc.constant === undefined) cols.add(fc.col);
        for (const key of fc.names) {
          const col = this.layout.cols.get(key);
          if (col !== undefined) cols.add(col);
          const inner = this.layout.checkByName.get(key);
          if (inner) visit(inner);
        }
      }
    };
    if (this.layout.ruleColumns.length > 0) for (let c = 0; c < this.layout.roleStart; c++) cols.add(c);
    this.layout.checkCells.forEach((cc, j) => {
      if ([...this.checkRoles[j]!].some((r) => roles.has(r))) visit(cc);
    });
    return cols;
  }

  /** Role name column keys → the role (name key) they read. */
  private roleOf(): Map<string, string> {
    const out = new Map<string, string>();
    for (const [key, rn] of roleNames(this.book, this.layout.paramKeys)) if (this.layout.roleKeySet.has(key)) out.set(key, rn.role);
    return out;
  }

  /** Fixed-part lines with a role and approved alternates: those whose alternates the checks may judge. */
  private alternateLines(): BuildLine[] {
    return this.layout.lineCells.map((lc) => lc.line).filter((l) => l.partId !== undefined && l.role && (l.alternates ?? []).length > 0);
  }

  /** The roles of lines with alternates that some check reads, as one text to compare. */
  private rolesJudged(): string {
    const read = new Set(this.checkRoles.flatMap((s) => [...s]));
    return [...new Set(this.alternateLines().map((l) => nameKey(l.role!)))].filter((r) => read.has(r)).sort().join(' ');
  }

  /** Does line `lineId` give its own part, and its role, to this variant (so an alternate in its place matters)? */
  private givesRole(res: VariantResolution, line: BuildLine): boolean {
    const l = res.lines.find((x) => x.lineId === line.id);
    return l !== undefined && l.applies && l.partId === line.partId && l.error === undefined;
  }

  /** Build lines resolved for every variant, as they stand now. */
  resolve(): FamilyResolution {
    const variants = this.resolution;
    return { variants, problems: variants.flatMap((v) => v.problems) };
  }

  /** Every check on every variant, variant-major, in the order of the checks. */
  results(): CheckResult[] {
    const out: CheckResult[] = [];
    const checkCells = this.layout.checkCells;
    this.book.variants.forEach((v, r) => {
      let row = this.rowResults[r];
      if (!row) {
        row = checkCells.map((cc) => judgeCheck(v, r, cc, this.readCell));
        if (this.altRowsOf[r]!.length > 0) row = this.worstApproved(v, r, row);
        this.rowResults[r] = row;
      }
      for (const result of row) out.push(result);
    });
    return out;
  }

  /**
   * Variant `v`'s results judged again with each approved alternate in its line's place, keeping for each check
   * the worst (ties keep the better-ranked part) and naming the part that gives it. Each alternate is judged with
   * the other lines at their own parts.
   */
  private worstApproved(v: Variant, r: number, own: CheckResult[]): CheckResult[] {
    const lines = new Map(this.book.buildLines.map((l) => [l.id, l] as const));
    const out = [...own];
    /** Per check: the line and part giving its result so far, and how many approved parts were judged. */
    const giving: ({ lineId: string; partId: string; count: number } | undefined)[] = own.map(() => undefined);
    for (const row of this.altRowsOf[r]!) {
      const alt = this.altRows[row - this.book.variants.length]!;
      const line = lines.get(alt.lineId)!;
      if (!this.givesRole(this.resolution[r]!, line)) continue;
      this.layout.checkCells.forEach((cc, j) => {
        if (!this.checkRoles[j]!.has(alt.role)) return;
        const g = (giving[j] ??= { lineId: line.id, partId: line.partId!, count: 1 });
        g.count++;
        const res = judgeCheck(v, row, cc, this.readCell);
        if (STATUS_SEVERITY[res.status] > STATUS_SEVERITY[out[j]!.status]) {
          out[j] = res;
          g.lineId = line.id;
          g.partId = alt.partId;
        }
      });
    }
    giving.forEach((g, j) => {
      if (!g) return;
      const part = this.parts.byId.get(g.partId)!;
      const line = lines.get(g.lineId)!;
      const where = line.designators || line.role || line.id;
      out[j] = {
        ...out[j]!,
        approvedPart: { lineId: g.lineId, partId: g.partId, mpn: part.mpn, judged: g.count },
        message: `${out[j]!.message}${out[j]!.message ? '; ' : ''}worst of ${g.count} approved parts on ${where}: ${part.mpn}`,
      };
    });
    return out;
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
    const layout = this.layout;
    if (!layout.paramKeys.has(key) && (layout.cols.has(key) || layout.possibleRoleKeys.has(key))) {
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
    if (!layout.paramKeys.has(key)) {
      this.build();
      return { ok: true };
    }
    const hf = this.engine();
    const own = ownParams(this.book.variants[row]!);
    for (const x of [row, ...this.altRowsOf[row]!]) {
      hf.setCellContents({ sheet: this.sheet, row: x, col: layout.cols.get(key)! }, [[paramCell(value)]]);
      for (const m of layout.memos) if (!m.roles && !m.retired && m.inputs.includes(key)) m.rowEntry[x] = this.memoEntry(m, own);
      this.refreshRoles(x, own);
      const inputs = this.withRoles(own, x);
      for (const m of layout.memos) if (m.roles && m.inputs.includes(key)) m.rowEntry[x] = this.memoEntry(m, inputs);
    }
    // Every formula reads its own row only, so no other variant's results can have changed.
    this.rowResults[row] = undefined;
    return { ok: true };
  }

  /**
   * Takes changed build lines in place: a constant quantity for another, the attrition, designators, category, pinned
   * part or notes (every cell of the table stays; the variants are resolved again by reading them), and an
   * applies-when, quantity or part rule given as another formula (each a constant, a parameter's column or a new memo
   * evaluated once per distinct set of the parameters it reads, never a column of the table); a line's rules changed,
   * each variant is resolved again and its role cells rewritten where its parts changed, so the checks that read them
   * judge again. Gives false, changing nothing, for any other change — the part, the role, the approved alternates,
   * the position, a rule that does not compile, a negative quantity, a line that had a problem — which lays the table
   * out again.
   */
  setLineTerms(lines: readonly BuildLine[]): boolean {
    return runAtOnce(this.setLineTermsInSteps(lines));
  }

  /** As `setLineTerms`, resolving the variants again a part at a time (see openInSteps). */
  *setLineTermsInSteps(lines: readonly BuildLine[]): Sliced<boolean> {
    const layout = this.layout;
    const cells = new Map(layout.lineCells.map((lc) => [lc.line.id, lc] as const));
    const same = <T>(a: T, b: T): boolean => JSON.stringify(a ?? null) === JSON.stringify(b ?? null);
    const memoCount = layout.memos.length;
    type Taken = { lc: LineCells; line: BuildLine; applies?: FormulaCell; qty?: FormulaCell; qtyConst?: number; part?: FormulaCell };
    const taken: Taken[] = [];
    let rulesChanged = false;
    /** A rule placed anew, or undefined when the edit cannot be made in place (`refused` then). */
    let refused = false;
    const rule = (formula: string): FormulaCell | undefined => {
      const p = placeBuildRule(layout, formula);
      if (!p || !p.ok) refused = true;
      return p?.ok ? p.cell : undefined;
    };
    for (const line of lines) {
      const lc = cells.get(line.id);
      if (!lc || lc.problems.length > 0) refused = true;
      if (refused || !lc) break;
      const old = lc.line;
      if (!same(old.partId, line.partId) || !same(old.role, line.role) || old.position !== line.position || !same(old.alternates, line.alternates)) {
        refused = true;
        break;
      }
      const t: Taken = { lc, line };
      if (lc.applies) t.applies = lc.applies;
      if (lc.qty) t.qty = lc.qty;
      if (lc.qtyConst !== undefined) t.qtyConst = lc.qtyConst;
      if (lc.part) t.part = lc.part;
      if (!same(old.appliesWhen, line.appliesWhen)) {
        rulesChanged = true;
        delete t.applies;
        if (line.appliesWhen.trim() !== '') t.applies = rule(line.appliesWhen);
      }
      if (old.qtyRule !== line.qtyRule) {
        const q = constantNumber(line.qtyRule);
        // A negative quantity is a problem of the line's (judged at layout); an empty rule one too.
        if ((q !== undefined && q < 0) || line.qtyRule.trim() === '') refused = true;
        if (lc.qtyConst === undefined || q === undefined) rulesChanged = true;
        delete t.qty;
        delete t.qtyConst;
        if (q !== undefined) t.qtyConst = q;
        else if (!refused) t.qty = rule(line.qtyRule);
      }
      if (!same(old.partRule, line.partRule)) {
        rulesChanged = true;
        delete t.part;
        if (line.partRule && line.partRule.trim() !== '') t.part = rule(line.partRule);
      }
      if (refused) break;
      taken.push(t);
    }
    if (refused) {
      // The memos placed for this edit go with it.
      layout.memos.length = memoCount;
      return false;
    }
    for (const t of taken) {
      const lc = t.lc;
      lc.line = t.line;
      for (const k of ['applies', 'qty', 'qtyConst', 'part'] as const) {
        if (t[k] === undefined) delete lc[k];
        else (lc as Record<typeof k, unknown>)[k] = t[k];
      }
    }
    const byId = new Map(lines.map((l) => [l.id, l] as const));
    this.book = { ...this.book, buildLines: this.book.buildLines.map((l) => byId.get(l.id) ?? l) };
    if (rulesChanged) {
      // The memos of the rules replaced: nothing reads them now.
      const read = new Set<number>();
      for (const lc of layout.lineCells) for (const fc of [lc.applies, lc.qty, lc.part]) if (fc?.memo !== undefined) read.add(fc.memo);
      for (const cc of layout.checkCells) for (const fc of Object.values(cc.cells)) if (fc?.memo !== undefined) read.add(fc.memo);
      layout.memos.forEach((m, i) => {
        if (!read.has(i)) m.retired = true;
      });
    }
    if (!rulesChanged) {
      yield* this.resolveAll();
      return true;
    }
    // The new memos' entries, for every row, in one evaluation.
    const total = this.rowCount();
    const own = Array.from({ length: total }, (_, r) => ownParams(this.variantAt(r)));
    const added = layout.memos.slice(memoCount);
    if (added.length > 0) {
      changeInOne(this.engine(), () => {
        for (const m of added) {
          m.rowEntry = new Int32Array(total);
          own.forEach((params, r) => (m.rowEntry[r] = this.memoEntry(m, params)));
        }
      });
    }
    yield;
    // Each row resolved again (the variants before the alternate rows, which read their variant's), its role cells
    // rewritten where its parts changed.
    for (let r = 0; r < total; r++) {
      if (r > 0 && r % ROWS_PER_STEP === 0) yield;
      this.refreshRoles(r, own[r]!);
    }
    this.rowResults = [];
    return true;
  }

  /** Re-resolves one variant's lines after an edit and rewrites its role cells and memos where they changed. */
  private refreshRoles(row: number, own: ReadonlyMap<string, ParamValue>): void {
    const before = this.resolutionAt(row).roleNames;
    const after = this.resolveRow(row);
    const n = this.book.variants.length;
    if (row < n) this.resolution[row] = after;
    else this.altResolution[row - n] = after;
    const changed = this.layout.roleKeys.filter((k) => before[k] !== after.roleNames[k]);
    if (changed.length === 0) return;
    const inputs = this.withRoles(own, row);
    for (const m of this.layout.memos) if (m.roles && !m.retired && changed.some((k) => m.inputs.includes(k))) m.rowEntry[row] = this.memoEntry(m, inputs);
    const hf = this.engine();
    changeInOne(hf, () => {
      for (const key of changed) {
        const val = after.roleNames[key];
        hf.setCellContents({ sheet: this.sheet, row, col: this.layout.cols.get(key)! }, [[val === undefined ? MISSING : val]]);
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
    const layout = this.layout;
    const cc = layout.checkCells[i]!;
    const c = cc.col === undefined ? undefined : valueCell(layout, body, cc.col);
    const names = formulaNames(body);
    // A role name no check read before has no column yet.
    const newRole = names.ok && names.names.some((k) => layout.possibleRoleKeys.has(k) && !layout.roleKeySet.has(k));
    if (cc.problem !== undefined || !c?.ok || newRole) {
      // The check could not be evaluated before, or cannot now: compile the table afresh so every part of the
      // check (applies, limits) is laid out again and the result shows the reason.
      this.build();
      return { ok: true };
    }
    cc.check = updated;
    const fc = c.cell;
    cc.cells.value = fc;
    if (this.checkRoles.length > 0) {
      // The alternate rows hold what the checks reading an alternate's role read: when the formula changes that,
      // lay the table out afresh.
      const before = { roles: this.rolesJudged(), keep: this.altKeep };
      this.checkRoles = this.layout.checkCells.map((x) => rolesRead(x, this.layout, this.roleOf()));
      const keep = this.altColumns();
      const same = (a: ReadonlySet<number> | undefined, b: ReadonlySet<number>): boolean => a !== undefined && a.size === b.size && [...b].every((x) => a.has(x));
      if (this.rolesJudged() !== before.roles || (this.altRows.length > 0 && !same(before.keep, keep))) {
        this.build();
        return { ok: true };
      }
    }
    if (this.book.variants.length > 0) {
      this.engine().setCellContents({ sheet: this.sheet, row: 0, col: fc.col }, [[valueContent(fc, 0)]]);
      this.fillDown(fc.pieces ? [{ col: fc.col, pieces: fc.pieces }] : [], fc.col, fc.col + 1, this.altKeep);
    }
    this.rowResults = [];
    return { ok: true };
  }
}
