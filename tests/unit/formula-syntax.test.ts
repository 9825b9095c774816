// One formula syntax everywhere: the same formula typed into `rungbook eval`, a notebook cell, a check formula, a
// build rule or a guarded formula gives the same value — exponents in either case, bare TRUE and FALSE — because
// every path passes the text through normalizeFormula (engine/formula-syntax.ts).
import { describe, expect, it } from 'vitest';
import { emptyBook } from '../../src/domain/book.ts';
import type { Book, Check } from '../../src/domain/book.ts';
import { createEngine } from '../../src/engine/create.ts';
import { evaluateChecks, resolveFamily } from '../../src/engine/family.ts';
import { evaluateFormula, guardFormula } from '../../src/engine/formula-guard.ts';
import { normalizeFormula } from '../../src/engine/formula-syntax.ts';
import { evaluateNotebookPage } from '../../src/engine/notebook.ts';
import { runCli } from './cli-helpers.ts';

function check(formula: string): Check {
  return { id: 'c_x', rev: 1, name: 'x', title: 'x', formula, unit: '', rule: { kind: 'true' }, appliesWhen: '', note: 'test', builtIn: false, group: 'test' };
}

function bookWith(formula: string, qtyRule = '1'): Book {
  return {
    ...emptyBook(),
    parts: [{ id: 'p1', rev: 1, mpn: 'P-1', maker: 'm', description: 'd', kind: 'other', ratings: {}, package: '', placements: 0 }],
    variants: [{ id: 'v1', rev: 1, code: 'V1', name: 'V1', params: { mains_v: 230 } }],
    buildLines: [{ id: 'l1', rev: 1, position: 1, designators: 'X1', qtyRule, appliesWhen: '', category: 'hardware', partId: 'p1' }],
    checks: [check(formula)],
  };
}

/** The value of `formula` in each place a person can type it. */
async function everywhere(formula: string): Promise<Record<string, unknown>> {
  const cli = await runCli(['eval', formula]);
  const cliValue = cli.code === 0 ? (cli.out === 'TRUE' ? true : cli.out === 'FALSE' ? false : Number(cli.out)) : `error: ${cli.err}`;
  const book = bookWith(formula);
  const cell = evaluateNotebookPage(book, { id: 'pg', rev: 1, title: 't', position: 0, sections: [{ heading: 'h', text: '', grid: [[`=${formula}`]] }] })
    .sections[0]!.grid[0]![0]!;
  const hf = createEngine({ smartRounding: false });
  const sheet = hf.getSheetId(hf.addSheet('s'))!;
  const guarded = evaluateFormula(hf, formula, sheet);
  hf.destroy();
  const result = evaluateChecks(book)[0]!;
  return {
    eval: cliValue,
    notebook: cell.error ?? cell.value,
    check: result.value ?? result.message,
    guarded: guarded.ok ? guarded.value : guarded.error,
  };
}

describe('normalizeFormula, the one normalising step', () => {
  it('writes exponents and TRUE/FALSE the engine’s way and leaves everything else as typed', () => {
    expect(normalizeFormula('=XCAP_AMPS(680E-9, 240, 50)')).toBe('=XCAP_AMPS(6.8e-7, 240, 50)');
    expect(normalizeFormula('IF(true, 1.5E3, FALSE)')).toBe('IF(TRUE(), 1500, FALSE())');
    // Whole numbers may belong to a reference; text and quoted sheet names are never touched.
    expect(normalizeFormula("=SUM($A$1:B3, 1:3, Section2!C4) & \"1E3 TRUE\" & 'TRUE 1.50'!A1")).toBe(
      "=SUM($A$1:B3, 1:3, Section2!C4) & \"1E3 TRUE\" & 'TRUE 1.50'!A1",
    );
    expect(normalizeFormula('=TRUE()')).toBe('=TRUE()');
    // An open quote is left for the guard to explain.
    expect(normalizeFormula('=LEN("abc')).toBe('=LEN("abc');
  });

  it('is what the guard hands the engine', () => {
    expect(guardFormula('0.47E-6 * 2')).toEqual({ ok: true, formula: '=4.7e-7 * 2' });
  });
});

describe('the same formula gives the same value in every place', () => {
  it('XCAP_AMPS(0.47E-6, 230, 50) = 33.96 mA (capacitive dropper, basic circuit theory, from memory; published worked examples agree)', async () => {
    const v = await everywhere('XCAP_AMPS(0.47E-6, 230, 50)');
    for (const [where, x] of Object.entries(v)) {
      expect(typeof x, where).toBe('number');
      expect(x as number, where).toBeCloseTo(0.03396, 5);
    }
  });

  it('XCAP_AMPS(680E-9, 240, 50): 2π · 50 · 680 nF · 240 V = 51.27 mA (worked by hand) in eval, notebook, check and guard alike', async () => {
    const v = await everywhere('XCAP_AMPS(680E-9,240,50)');
    const want = 2 * Math.PI * 50 * 680e-9 * 240;
    expect(want).toBeCloseTo(0.05127, 5);
    for (const [where, x] of Object.entries(v)) expect(x, where).toBeCloseTo(want, 12);
  });

  it('reads bare TRUE and FALSE as the logical values', async () => {
    expect(await everywhere('AND(TRUE, NOT(FALSE))')).toEqual({ eval: true, notebook: true, check: true, guarded: true });
    expect(await everywhere('IF(FALSE, 1, 2.5E0)')).toEqual({ eval: 2.5, notebook: 2.5, check: 2.5, guarded: 2.5 });
  });

  it('gives a build rule the same reading: quantity IF(TRUE, 2E0, 1) is 2, and a check reading mains_v with 1E0 agrees', () => {
    const book = bookWith('mains_v * 1E0', 'IF(TRUE, 2E0, 1)');
    expect(resolveFamily(book).variants[0]!.lines[0]).toMatchObject({ qtyPerUnit: 2, applies: true });
    expect(evaluateChecks(book)[0]!.value).toBe(230);
  });
});
