// What a cell edit, a paste or a clear on the family grid does to the variants, worked out before anything is saved:
// each value is read and checked exactly as the variant form does (record-forms), and a paste is refused whole with
// the row and column of the first problem. Pure (no DOM), so it is tested in Node.
import type { Book, Variant } from '../domain/book.ts';
import { MAX_STEPS, VARIANT_PARAMS, paramNameProblem } from '../domain/params.ts';
import { matchHeader, unguardText } from '../domain/tsv.ts';
import type { VariantDraft } from './record-forms.ts';
import { validateVariant } from './record-forms.ts';

/** Kinds of family grid column: the code and name, a parameter, notes, or a figure Rungbook works out. */
export const COLUMN_KINDS = { code: 'code', name: 'name', notes: 'notes', param: 'param', computed: 'computed' } as const;
export type ColumnKind = (typeof COLUMN_KINDS)[keyof typeof COLUMN_KINDS];

export interface FamilyColumn {
  /** `code`, `name`, `notes`, the parameter's name, or a computed figure's key. */
  key: string;
  kind: ColumnKind;
}

/** Most rows one paste may bring. */
export const MAX_PASTE_ROWS = 5000;

const CODE_CHARS = /^[A-Za-z0-9][A-Za-z0-9._/-]*$/;

/** Column key → cell text, with no inherited keys: a column named like an object's built-ins stays a plain entry. */
function cellTexts(): Record<string, string> {
  return Object.create(null) as Record<string, string>;
}

export type VariantEdit = { ok: true; record: Variant } | { ok: false; key: string; message: string };

/**
 * Applies cell texts (column key → text) to a variant, or makes a new one (which then needs a code; its name defaults
 * to the code). A blank parameter removes it. Values are read and checked as in the variant form.
 */
export function editVariant(book: Book, variant: Variant | undefined, texts: Readonly<Record<string, string>>, newId: () => string): VariantEdit {
  const params: Record<string, string> = {};
  for (const [k, t] of Object.entries(texts)) {
    if (k === 'code' || k === 'name' || k === 'notes') continue;
    // A name the rule refuses may still be blanked, so a Book that already holds one can be put right.
    const problem = t.trim() === '' ? undefined : paramNameProblem(k);
    if (problem !== undefined) return { ok: false, key: k, message: problem };
    params[k] = t;
  }
  const code = texts.code ?? variant?.code ?? '';
  if (!variant && code.trim() === '') return { ok: false, key: 'code', message: 'A new variant needs a code first' };
  const name = texts.name ?? variant?.name ?? '';
  const draft: VariantDraft = {
    code,
    name: !variant && name.trim() === '' ? code : name,
    notes: texts.notes ?? variant?.notes ?? '',
    params,
    newParamName: '',
    newParamValue: '',
  };
  const r = validateVariant(draft, book, variant, newId);
  if (!r.ok) {
    const [field, message] = Object.entries(r.problems)[0]!;
    return { ok: false, key: field.startsWith('param:') ? field.slice(6) : field, message };
  }
  const merged: Variant['params'] = { ...(variant?.params ?? {}) };
  for (const [k, t] of Object.entries(params)) {
    if (t.trim() === '') delete merged[k];
    else merged[k] = r.record.params[k]!;
  }
  const record: Variant = { ...r.record, params: merged };
  if (record.notes === undefined) delete record.notes;
  return { ok: true, record };
}

export interface PasteTarget {
  /** Variants in the order the grid shows them. */
  order: readonly Variant[];
  columns: readonly FamilyColumn[];
  /** Top-left cell of the selection; a row at order.length is the new-row line. */
  row: number;
  col: number;
  /** Bottom-right of the selection, so one copied value can fill a block. */
  lastRow: number;
  lastCol: number;
}

export interface PlannedChange {
  before: Variant | undefined;
  after: Variant;
}

export type PastePlan =
  | { ok: true; changes: PlannedChange[]; created: number; edited: number; header: boolean; skipped: string[] }
  | { ok: false; message: string };

/** Names a header row may use: the grid's columns and every standard parameter. */
function knownHeadings(columns: readonly FamilyColumn[]): Set<string> {
  const known = new Set(columns.map((c) => c.key.toLowerCase()));
  for (const p of VARIANT_PARAMS) known.add(p.name);
  for (let i = 1; i <= MAX_STEPS; i++) known.add(`r_s${i}`);
  known.add('notes');
  return known;
}

/**
 * Works out a paste of tab-separated rows. Without a header row the cells land from the selected cell rightwards and
 * downwards, and rows past the last variant become new variants. With a header row (names of columns or parameters)
 * cells go to the named columns; rows whose code matches a variant edit it, the others become new variants (and
 * without a code column rows land from the selected row down). Computed columns are skipped.
 */
export function planPaste(book: Book, target: PasteTarget, input: readonly (readonly string[])[], newId: () => string): PastePlan {
  const columnKind = new Map(target.columns.map((c) => [c.key.toLowerCase(), c] as const));
  let rows = input.map((r) => r.map(unguardText));
  let header: (string | undefined)[] | undefined;
  if (rows.length >= 2) header = matchHeader(rows[0]!, knownHeadings(target.columns));
  if (header) rows = rows.slice(1);
  if (rows.length > MAX_PASTE_ROWS) return { ok: false, message: `The paste has ${rows.length} rows; at most ${MAX_PASTE_ROWS} are taken at once. Nothing was pasted.` };

  const skipped = new Set<string>();
  let keys: (string | undefined)[];
  if (header) {
    keys = header.map((k) => {
      if (k === undefined) return undefined;
      const col = columnKind.get(k);
      if (col?.kind === COLUMN_KINDS.computed) {
        skipped.add(col.key);
        return undefined;
      }
      return col ? col.key : k;
    });
    const seen = new Set<string>();
    for (const k of keys) {
      if (k === undefined) continue;
      if (seen.has(k)) return { ok: false, message: `The header names ${k} twice. Nothing was pasted.` };
      seen.add(k);
    }
  } else {
    // One copied value fills the whole selection.
    if (rows.length === 1 && rows[0]!.length === 1 && (target.lastRow > target.row || target.lastCol > target.col)) {
      const v = rows[0]![0]!;
      const last = Math.min(target.lastRow, target.order.length - 1);
      rows = Array.from({ length: Math.max(1, last - target.row + 1) }, () => Array.from({ length: target.lastCol - target.col + 1 }, () => v));
    }
    const width = rows.reduce((m, r) => Math.max(m, r.length), 0);
    const room = target.columns.length - target.col;
    if (width > room) {
      return {
        ok: false,
        message: `The pasted block is ${width} columns wide but only ${room} ${room === 1 ? 'column lies' : 'columns lie'} from the selected cell to the right edge. Nothing was pasted.`,
      };
    }
    keys = Array.from({ length: width }, (_, i) => {
      const col = target.columns[target.col + i]!;
      if (col.kind === COLUMN_KINDS.computed) {
        skipped.add(col.key);
        return undefined;
      }
      return col.key;
    });
  }

  const byCode = new Map(book.variants.map((v) => [v.code.toLowerCase(), v] as const));
  const codeAt = header ? keys.indexOf('code') : -1;
  let view: Book = book;
  const planned = new Map<string, PlannedChange>();
  let created = 0;
  let edited = 0;
  for (let i = 0; i < rows.length; i++) {
    const cells = rows[i]!;
    const texts = cellTexts();
    keys.forEach((k, j) => {
      if (k !== undefined && j < cells.length) texts[k] = cells[j]!;
    });
    let variant: Variant | undefined;
    if (codeAt >= 0) {
      const code = (cells[codeAt] ?? '').trim();
      if (code === '' && Object.values(texts).every((t) => t.trim() === '')) continue;
      const found = byCode.get(code.toLowerCase());
      variant = found ? (view.variants.find((v) => v.id === found.id) ?? found) : undefined;
    } else {
      const at = target.row + i;
      variant = at < target.order.length ? target.order[at] : undefined;
      if (variant) variant = view.variants.find((v) => v.id === variant!.id) ?? variant;
      // Blank lines past the end add nothing.
      if (!variant && Object.values(texts).every((t) => t.trim() === '')) continue;
    }
    if (variant && planned.has(variant.id)) {
      return { ok: false, message: `Row ${i + 1} of the paste names ${variant.code} a second time. Nothing was pasted.` };
    }
    const r = editVariant(view, variant, texts, newId);
    if (!r.ok) {
      const who = variant ? variant.code : 'a new variant';
      const missingCode = !variant && r.key === 'code' && !('code' in texts);
      const why = missingCode ? 'a new variant needs a code; paste a code column, or start the paste in the code column' : r.message;
      return { ok: false, message: `Row ${i + 1} of the paste (${who}), ${r.key}: ${why}. Nothing was pasted.` };
    }
    const before = variant ? book.variants.find((v) => v.id === variant!.id) : undefined;
    planned.set(r.record.id, { before, after: r.record });
    if (before) edited += 1;
    else created += 1;
    const others = view.variants.filter((v) => v.id !== r.record.id);
    view = { ...view, variants: [...others, r.record] };
  }
  if (planned.size === 0) return { ok: false, message: 'Nothing to paste: the pasted rows are empty.' };
  return { ok: true, changes: [...planned.values()], created, edited, header: header !== undefined, skipped: [...skipped] };
}

/** Clearing a block: parameter cells become blank (the variant no longer sets them); code and name cannot be blank. */
export function planClear(book: Book, target: PasteTarget, newId: () => string): PastePlan {
  const cols = target.columns.slice(target.col, target.lastCol + 1);
  if (cols.some((c) => c.kind === COLUMN_KINDS.code || c.kind === COLUMN_KINDS.name)) {
    return { ok: false, message: 'A code and a name cannot be blank; select parameter cells to clear them. Nothing was changed.' };
  }
  const keys = cols.filter((c) => c.kind === COLUMN_KINDS.param || c.kind === COLUMN_KINDS.notes).map((c) => c.key);
  if (keys.length === 0) return { ok: false, message: 'Those cells are worked out by Rungbook; there is nothing to clear.' };
  const changes: PlannedChange[] = [];
  for (let r = target.row; r <= Math.min(target.lastRow, target.order.length - 1); r++) {
    const v = book.variants.find((x) => x.id === target.order[r]!.id);
    if (!v) continue;
    const texts = cellTexts();
    for (const k of keys) texts[k] = '';
    const e = editVariant(book, v, texts, newId);
    if (!e.ok) return { ok: false, message: `${v.code}, ${e.key}: ${e.message}. Nothing was changed.` };
    changes.push({ before: v, after: e.record });
  }
  return { ok: true, changes, created: 0, edited: changes.length, header: false, skipped: [] };
}

/** A code for a copy of a variant: the code with -copy, then -copy2, -copy3… until it is free (at most 32 characters). */
export function copyCode(book: Book, code: string, taken: ReadonlySet<string> = new Set()): string {
  const used = new Set([...book.variants.map((v) => v.code.toLowerCase()), ...[...taken].map((t) => t.toLowerCase())]);
  for (let n = 1; ; n++) {
    const suffix = n === 1 ? '-copy' : `-copy${n}`;
    const candidate = `${code.slice(0, 32 - suffix.length)}${suffix}`;
    if (!used.has(candidate.toLowerCase()) && CODE_CHARS.test(candidate)) return candidate;
  }
}

/**
 * New variants copied from the given ones, each with a free code, "(copy)" after its name and a note of its own
 * saying what it was copied from: the original's notes describe the original, not the copy.
 */
export function duplicateVariants(book: Book, sources: readonly Variant[], newId: () => string): Variant[] {
  const taken = new Set<string>();
  return sources.map((v) => {
    const code = copyCode(book, v.code, taken);
    taken.add(code);
    const copy: Variant = { ...v, id: newId(), rev: 0, code, name: `${v.name} (copy)`, notes: `Copy of ${v.code}.`, params: { ...v.params } };
    return copy;
  });
}
