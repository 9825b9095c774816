// What a check reads for one variant, worked out from its formulas as the family table resolves them: the variant
// parameters it names, the part ratings it names as `<role>_<rating>` (the part the role's build line gives this
// variant) and, behind each of those, the parameters the line's rules read to choose that part — followed through
// the checks it names. The Checks page lists them so the value that fixes a failure can be changed where it lives.
import type { Book, BuildLine, Check, Part } from '../domain/book.ts';
import { roleNames } from './family-layout.ts';
import type { VariantResolution } from './family-lines.ts';
import { formulaNames, nameKey } from './formula-names.ts';

/** A variant parameter a check reads; `line` is the build line whose rules read it, when not the check itself. */
export interface ParamInput {
  /** As the Book spells it. */
  name: string;
  line?: BuildLine;
}

/** A part rating a check reads by its role name. */
export interface RatingInput {
  /** The name the formula uses, lower case (`bleeder_value`). */
  key: string;
  role: string;
  /** `value` for the part's own value, else the rating's name as the part spells it (or as named, when absent). */
  rating: string;
  /** The line that gives the role to this variant, and its part; absent when no line applying to it does. */
  line?: BuildLine;
  part?: Part;
}

export interface CheckInputs {
  params: ParamInput[];
  ratings: RatingInput[];
}

/**
 * The inputs of `check` for the variant `resolved` describes (its resolved lines), in order of first reading.
 * `formulaOf` gives the formula a check is evaluated with (a typed formula not yet kept, say).
 */
export function checkInputs(
  book: Book,
  check: Check,
  resolved: VariantResolution | undefined,
  formulaOf: (c: Check) => string = (c) => c.formula,
): CheckInputs {
  const paramNames = new Map<string, string>();
  for (const v of book.variants) for (const k of Object.keys(v.params)) if (!paramNames.has(nameKey(k))) paramNames.set(nameKey(k), k);
  const roles = roleNames(book, new Set(paramNames.keys()));
  const checks = new Map(book.checks.map((c) => [nameKey(c.name), c] as const));
  const lines = new Map(book.buildLines.map((l) => [l.id, l] as const));
  const parts = new Map(book.parts.map((p) => [p.id, p] as const));

  const out: CheckInputs = { params: [], ratings: [] };
  const seenParams = new Set<string>();
  const seenNames = new Set<string>();
  const addParam = (key: string, line?: BuildLine): void => {
    const name = paramNames.get(key);
    if (name === undefined || seenParams.has(key)) return;
    seenParams.add(key);
    out.params.push(line ? { name, line } : { name });
  };
  const namesOf = (texts: readonly (string | undefined)[]): string[] =>
    texts.flatMap((t) => {
      if (t === undefined || t.trim() === '') return [];
      const n = formulaNames(t);
      return n.ok ? n.names : [];
    });

  /** The line that gives `role` to this variant and its part: the first applying line of that role with a part. */
  const giving = (role: string): { line: BuildLine; part: Part | undefined } | undefined => {
    for (const r of resolved?.lines ?? []) {
      const line = lines.get(r.lineId);
      if (line?.role && nameKey(line.role) === role && r.applies && r.partId !== undefined) return { line, part: parts.get(r.partId) };
    }
    return undefined;
  };

  const visit = (c: Check): void => {
    for (const key of namesOf([formulaOf(c), c.appliesWhen, c.rule.limit, c.rule.low, c.rule.high])) {
      if (seenNames.has(key)) continue;
      seenNames.add(key);
      if (paramNames.has(key)) {
        addParam(key);
        continue;
      }
      const roleName = roles.get(key);
      if (roleName) {
        const given = giving(roleName.role);
        const line = given?.line;
        const part = given?.part;
        const rating = roleName.rating === 'value' ? 'value' : (Object.keys(part?.ratings ?? {}).find((k) => nameKey(k) === roleName.rating) ?? roleName.rating);
        out.ratings.push({ key, role: roleName.role, rating, ...(line ? { line } : {}), ...(part ? { part } : {}) });
        // The rules that choose the part (and whether the line applies): the given line's, or, when no line gives
        // the role to this variant, those of every line of that role.
        const choosers = line ? [line] : book.buildLines.filter((l) => l.role && nameKey(l.role) === roleName.role);
        for (const l of choosers) for (const k of namesOf([l.partRule, l.appliesWhen])) addParam(k, l);
        continue;
      }
      const inner = checks.get(key);
      if (inner) visit(inner);
    }
  };
  visit(check);
  return out;
}
