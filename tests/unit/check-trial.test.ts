// The Checks page's trials of formulas typed and not yet kept: tried on every variant in a family workbook of their
// own (where the live figures run: the figures worker, or in-process), giving exactly what a Book saved with those
// formulas gives, refusing a formula that cannot be read by its check, and leaving the live figures as they were.
import { describe, expect, it } from 'vitest';
import { demoBook } from '../../src/domain/demo-book.ts';
import type { Book } from '../../src/domain/book.ts';
import { loadBuiltInChecks } from '../../src/cli/check-sheets-fs.ts';
import { addBuiltInChecks } from '../../src/engine/check-sheets.ts';
import { CheckTrials } from '../../src/engine/check-trial.ts';
import { evaluateChecks } from '../../src/engine/family.ts';
import { FiguresHost } from '../../src/engine/figures-worker.ts';
import { CostingService } from '../../src/ui/costing-service.ts';

const book: Book = addBuiltInChecks(demoBook(), loadBuiltInChecks());

function withFormula(b: Book, checkId: string, formula: string): Book {
  return { ...b, checks: b.checks.map((c) => (c.id === checkId ? { ...c, formula } : c)) };
}

describe('trying check formulas before they are kept', () => {
  const check = book.checks.find((c) => !c.builtIn) ?? book.checks[0]!;

  it('gives every variant the results of a Book saved with the formula typed', () => {
    const trials = new CheckTrials();
    const typed = `(${check.formula})*2`;
    const a = trials.answer(book, { formulas: [{ checkId: check.id, text: typed }] });
    expect(a.refused).toEqual([]);
    expect(a.results).toEqual(evaluateChecks(withFormula(book, check.id, typed)));
    // Typed on, in the same workbook; then put back: the Book's own results again.
    const again = trials.answer(book, { formulas: [{ checkId: check.id, text: `(${check.formula})*3` }] });
    expect(again.results).toEqual(evaluateChecks(withFormula(book, check.id, `(${check.formula})*3`)));
    expect(trials.answer(book, { formulas: [] }).results).toEqual(evaluateChecks(book));
    trials.close();
  }, 90_000);

  it('refuses a formula that cannot be read, naming its check, and tries the rest with the check as it is', () => {
    const trials = new CheckTrials();
    const a = trials.answer(book, { formulas: [{ checkId: check.id, text: '=SUM(1,' }] });
    expect(a.refused).toHaveLength(1);
    expect(a.refused[0]!.checkId).toBe(check.id);
    expect(a.refused[0]!.message).not.toBe('');
    expect(a.results).toEqual(evaluateChecks(book));
    trials.close();
  }, 90_000);

  it('is answered alike by the figures worker and in-process, and leaves the live figures of the Book as saved', async () => {
    const typed = `(${check.formula})*2`;
    const host = new FiguresHost();
    host.handle({ type: 'book', seq: 1, book });
    const [m] = host.handle({ type: 'checktrial', id: 7, formulas: [{ checkId: check.id, text: typed }] });
    expect(m).toMatchObject({ type: 'checktrial', id: 7 });
    const fromWorker = (m as Extract<typeof m, { type: 'checktrial' }>).answer;
    const holder = { book };
    const costing = CostingService.for(holder);
    const inProcess = await costing.checkTrial({ formulas: [{ checkId: check.id, text: typed }] });
    expect(fromWorker.results).toEqual(inProcess.results);
    expect(inProcess.results).toEqual(evaluateChecks(withFormula(book, check.id, typed)));
    const live = evaluateChecks(book);
    for (const v of book.variants) expect(costing.checkResults(v.id)).toEqual(live.filter((r) => r.variantId === v.id));
    costing.dispose();
  }, 90_000);
});
