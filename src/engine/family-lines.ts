// Line resolution: turns one variant's evaluated build-rule cells (applies-when, quantity, part) into its resolved
// build lines, the role names its parts give the checks, and the problems found on the way.
import type { BuildLine, Part, Variant } from '../domain/book.ts';
import { mpnKey } from '../domain/book.ts';
import type { ResolvedLine } from '../domain/costing.ts';
import { significant } from '../domain/format.ts';
import type { LineCells, ReadCell } from './family-layout.ts';
import { nameKey } from './formula-names.ts';

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

/** The Book's parts by id and by maker part number key, as line and part rules name them. */
export interface PartIndex {
  byId: Map<string, Part>;
  byKey: Map<string, Part>;
}

export function indexParts(parts: readonly Part[]): PartIndex {
  const index: PartIndex = { byId: new Map(), byKey: new Map() };
  for (const p of parts) {
    index.byId.set(p.id, p);
    index.byKey.set(mpnKey(p.mpn), p);
  }
  return index;
}

/** The role names a part gives through a line of role `role` (a name key): its value and each rating. */
export function partRoleNames(role: string, part: Part, into: Record<string, number>): void {
  if (part.value !== undefined && Number.isFinite(part.value)) into[`${role}_value`] = part.value;
  for (const [k, val] of Object.entries(part.ratings)) {
    if (Number.isFinite(val)) into[`${role}_${nameKey(k)}`] = val;
  }
}

/** Resolves every build line for variant `v`, row `r` of the family table, reading its cells through `read`. */
export function resolveVariant(v: Variant, r: number, lineCells: readonly LineCells[], parts: PartIndex, read: ReadCell): VariantResolution {
  const problems: ResolveProblem[] = [];
  const problem = (lineId: string, message: string): void =>
    void problems.push({ variantId: v.id, variantCode: v.code, lineId, message });
  const roleNames: Record<string, number> = {};
  const roleLine = new Map<string, BuildLine>();
  const lines = lineCells.map((lc): ResolvedLine => {
    const line = lc.line;
    let applies = true;
    if (lc.problems.length > 0) {
      for (const p of lc.problems) problem(line.id, p);
      return { lineId: line.id, partId: line.partId, qtyPerUnit: 0, applies: false };
    }
    if (lc.applies) {
      const a = read(r, lc.applies);
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
    const partId = resolvePart(lc, r, parts, read, applies ? (m) => problem(line.id, m) : () => undefined);
    if (!applies) return { lineId: line.id, partId, qtyPerUnit: 0, applies };
    let qty = lc.qtyConst ?? 0;
    if (lc.qty) {
      const q = read(r, lc.qty);
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
        partRoleNames(role, parts.byId.get(partId)!, roleNames);
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

/** The part a line gives in row r: its part rule's maker part number, or its fixed part. */
function resolvePart(lc: LineCells, r: number, parts: PartIndex, read: ReadCell, problem: (m: string) => void): string | undefined {
  if (lc.part) {
    const p = read(r, lc.part);
    if (!p.ok) {
      problem(`part rule: ${p.error}`);
      return undefined;
    }
    if (typeof p.value !== 'string' || p.value.trim() === '') {
      problem(`part rule gave ${p.value === null || p.value === '' ? 'nothing' : String(p.value)}, not a maker part number`);
      return undefined;
    }
    const part = parts.byKey.get(mpnKey(p.value));
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
  if (!parts.byId.has(lc.line.partId)) {
    problem(`part ${lc.line.partId} is not in the Book`);
    return undefined;
  }
  return lc.line.partId;
}
