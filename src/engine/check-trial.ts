// The Checks page's trials: check formulas typed and not yet kept, tried on every variant of the Book in a family
// workbook of their own (the live figures stay those of the Book as saved). Runs where the live figures run (the
// figures worker; in-process where there are no workers), so trying a formula on a large family never holds up the
// page. The workbook is kept between trials of the same Book, so each keystroke re-evaluates one check instead of
// laying the family table out again.
import type { Book } from '../domain/book.ts';
import { FamilyWorkbook } from './family.ts';
import type { CheckResult, VariantResolution } from './family.ts';

/** The formulas typed on the Checks page and not yet kept, by check. */
export interface CheckTrialRequest {
  formulas: { checkId: string; text: string }[];
}

export interface CheckTrialAnswer {
  /** Every check on every variant with the formulas tried, variant-major, in the order of the checks. */
  results: CheckResult[];
  /** Each variant's build lines as resolved (the part each role's line gives). */
  lines: VariantResolution[];
  /** Formulas that cannot be read, by check: the check keeps its formula for the trial. */
  refused: { checkId: string; message: string }[];
}

export class CheckTrials {
  private workbook: FamilyWorkbook | undefined;
  private book: Book | undefined;
  /** Formulas set in the workbook, by check. */
  private applied = new Map<string, string>();

  answer(book: Book, request: CheckTrialRequest): CheckTrialAnswer {
    const wanted = new Map(request.formulas.map((f) => [f.checkId, f.text] as const));
    // Another Book, or a formula put back: lay the table out afresh from the Book's own formulas.
    if (!this.workbook || book !== this.book || [...this.applied.keys()].some((id) => !wanted.has(id))) {
      this.close();
      this.workbook = FamilyWorkbook.open(book);
      this.book = book;
    }
    const refused: CheckTrialAnswer['refused'] = [];
    for (const [checkId, text] of wanted) {
      if (this.applied.get(checkId) === text) continue;
      if (!book.checks.some((c) => c.id === checkId)) continue;
      const r = this.workbook.setCheckFormula(checkId, text);
      if (r.ok) this.applied.set(checkId, text);
      else refused.push({ checkId, message: r.error });
    }
    return { results: this.workbook.results(), lines: this.workbook.resolve().variants, refused };
  }

  close(): void {
    this.workbook?.close();
    this.workbook = undefined;
    this.book = undefined;
    this.applied = new Map();
  }
}
