// Three-way merge of one record, field by field: the record as the user saw it (base), as the user left it (mine) and
// as it is stored now (theirs). This is the merge rule of version control systems, applied to the fields of a record
// (common practice). A field only one side changed takes that side's value; a field both sides changed alike is
// kept; a field both changed differently is a conflict, reported with its path and never decided silently.
// Pure (no DOM, no storage), so it is tested in Node.

/** Where a field sits in a record: object keys and array indexes, outermost first (["sections", 0, "heading"]). */
export type FieldPath = readonly (string | number)[];

/** A field both sides changed to different values. `undefined` means the field is absent on that side. */
export interface FieldConflict {
  path: FieldPath;
  base: unknown;
  mine: unknown;
  theirs: unknown;
}

export type MergeResult<T> =
  | {
      ok: true;
      merged: T;
      /** Fields the user changed that were applied over the stored record. */
      mine: FieldPath[];
      /** Fields changed in the stored record since base, kept in the merge. */
      theirs: FieldPath[];
    }
  | { ok: false; conflicts: FieldConflict[] };

type Plain = Record<string, unknown>;

function isPlain(v: unknown): v is Plain {
  if (v === null || typeof v !== 'object' || Array.isArray(v)) return false;
  const proto = Object.getPrototypeOf(v) as unknown;
  return proto === Object.prototype || proto === null;
}

/** Same value, objects compared key by key whatever their key order; an absent key equals an undefined one. */
export function sameValue(a: unknown, b: unknown): boolean {
  if (Object.is(a, b)) return true;
  if (Array.isArray(a) && Array.isArray(b)) return a.length === b.length && a.every((x, i) => sameValue(x, b[i]));
  if (isPlain(a) && isPlain(b)) {
    const keys = new Set([...Object.keys(a), ...Object.keys(b)]);
    for (const k of keys) if (!sameValue(a[k], b[k])) return false;
    return true;
  }
  return false;
}

interface Outcome {
  value: unknown;
  mine: FieldPath[];
  theirs: FieldPath[];
  conflicts: FieldConflict[];
}

/** The innermost fields in which `b` differs from `a` (a list that changed length counts as one field). */
function changedPaths(a: unknown, b: unknown, path: FieldPath): FieldPath[] {
  if (sameValue(a, b)) return [];
  if (isPlain(a) && isPlain(b)) {
    return [...new Set([...Object.keys(a), ...Object.keys(b)])].flatMap((k) => changedPaths(a[k], b[k], [...path, k]));
  }
  if (Array.isArray(a) && Array.isArray(b) && a.length === b.length) return a.flatMap((x, i) => changedPaths(x, b[i], [...path, i]));
  return [path];
}

function mergeValue(base: unknown, mine: unknown, theirs: unknown, path: FieldPath): Outcome {
  const none = { mine: [], theirs: [], conflicts: [] };
  if (sameValue(mine, theirs)) return { value: theirs, ...none };
  if (sameValue(base, mine)) return { value: theirs, ...none, theirs: changedPaths(base, theirs, path) };
  if (sameValue(base, theirs)) return { value: mine, ...none, mine: changedPaths(base, mine, path) };
  // Both changed the field: look inside when all three have the same shape, so different parts of it can merge.
  if (isPlain(base) && isPlain(mine) && isPlain(theirs)) {
    const out: Plain = Object.create(Object.getPrototypeOf(theirs) as object | null) as Plain;
    const acc: Outcome = { value: out, mine: [], theirs: [], conflicts: [] };
    const keys = [...new Set([...Object.keys(theirs), ...Object.keys(mine), ...Object.keys(base)])];
    for (const k of keys) {
      const r = mergeValue(base[k], mine[k], theirs[k], [...path, k]);
      if (r.value !== undefined) out[k] = r.value;
      acc.mine.push(...r.mine);
      acc.theirs.push(...r.theirs);
      acc.conflicts.push(...r.conflicts);
    }
    return acc;
  }
  // Lists merge place by place only while neither side added or removed entries; otherwise a change of length
  // (a row added here, a cell edited there) would shift what each place means.
  if (Array.isArray(base) && Array.isArray(mine) && Array.isArray(theirs) && base.length === mine.length && base.length === theirs.length) {
    const out: unknown[] = [];
    const acc: Outcome = { value: out, mine: [], theirs: [], conflicts: [] };
    base.forEach((b, i) => {
      const r = mergeValue(b, mine[i], theirs[i], [...path, i]);
      out.push(r.value);
      acc.mine.push(...r.mine);
      acc.theirs.push(...r.theirs);
      acc.conflicts.push(...r.conflicts);
    });
    return acc;
  }
  return { value: theirs, ...none, conflicts: [{ path, base, mine, theirs }] };
}

/**
 * Merges the user's edit of a record (`mine`, made from `base`) into the record as stored now (`theirs`). Fields in
 * `ignore` (the revision, by default) are not merged: the result carries theirs. Either every change of both sides is
 * kept, or nothing is merged and every field changed on both sides is named.
 */
export function mergeRecord<T>(base: T, mine: T, theirs: T, ignore: readonly string[] = ['rev']): MergeResult<T> {
  const strip = (v: T): unknown => {
    if (!isPlain(v)) return v;
    const copy: Plain = { ...v };
    for (const k of ignore) delete copy[k];
    return copy;
  };
  const r = mergeValue(strip(base), strip(mine), strip(theirs), []);
  if (r.conflicts.length > 0) return { ok: false, conflicts: r.conflicts };
  let merged = r.value as T;
  if (isPlain(theirs) && isPlain(merged)) {
    const kept: Plain = { ...merged };
    for (const k of ignore) if (k in theirs) kept[k] = theirs[k];
    merged = kept as T;
  }
  return { ok: true, merged, mine: r.mine, theirs: r.theirs };
}
