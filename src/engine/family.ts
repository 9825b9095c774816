// The family table's public face: compiles a Book's family into ONE engine table — a row per variant, a column per
// name — so check formulas and build rules can say `load_w` or `switch_v_max` and mean "this variant's".
//
// By job: family-layout.ts plans the columns and memos (our engine prototypes measured this layout well ahead of
// sheet-scoped named expressions), family-workbook.ts owns the engine and its edits, family-lines.ts resolves build
// lines and family-checks.ts judges checks.
import type { Book, Check } from '../domain/book.ts';
import type { CheckResult } from './family-checks.ts';
import type { FamilyResolution } from './family-lines.ts';
import { runAtOnce } from '../domain/slices.ts';
import type { Sliced } from '../domain/slices.ts';
import { FamilyWorkbook } from './family-workbook.ts';

export { FamilyWorkbook } from './family-workbook.ts';
export type { EditResult } from './family-workbook.ts';
export type { CheckResult } from './family-checks.ts';
export type { FamilyResolution, ResolveProblem, VariantResolution } from './family-lines.ts';

/** Resolves every build line for every variant (applies-when, quantity and part rules). */
export function resolveFamily(book: Book): FamilyResolution {
  return runAtOnce(resolveFamilyInSteps(book));
}

/** As `resolveFamily`, yielding between the parts of the compile (see FamilyWorkbook.openInSteps). */
export function* resolveFamilyInSteps(book: Book): Sliced<FamilyResolution> {
  const wb = yield* FamilyWorkbook.openInSteps(book, []);
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
