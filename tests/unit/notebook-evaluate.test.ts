// Notebook pages: each section's grid is evaluated with references inside the grid and across sections, engineering
// values typed as numbers, text kept as text, and every bad cell carrying its own error without stopping the rest.
import { describe, expect, it } from 'vitest';
import type { Book, NotebookPage, NotebookSection } from '../../src/domain/book.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { CELL_KIND, NOTEBOOK_LIMITS, cellAddress, cellInput, evaluateNotebookPage, sectionSheetName } from '../../src/engine/notebook.ts';

function page(...sections: NotebookSection[]): NotebookPage {
  return { id: 'page_t', rev: 1, title: 'test', position: 0, sections };
}
const grid = (heading: string, rows: string[][]): NotebookSection => ({ heading, text: '', grid: rows });

describe('evaluating a notebook page', () => {
  const book: Book = demoBook();

  it('computes a dropper current from values typed with units, referring to cells by address', () => {
    const p = page(grid('dropper', [['0.47 uF', '230 V', '50', '=XCAP_AMPS(A1, B1, C1)', '=2*PI()*C1*A1*B1']]));
    const row = evaluateNotebookPage(book, p).sections[0]!.grid[0]!;
    // Capacitive dropper (basic circuit theory, from memory): 0.47 µF at 230 V / 50 Hz draws 33.96 mA.
    expect(row[3]!.value).toBeCloseTo(0.03396, 5);
    // Worked by hand in the grid itself: 2π · 50 · 0.47e-6 · 230 = 0.033960 A.
    expect(row[4]!.value).toBeCloseTo(0.03396, 5);
    expect(row[0]).toMatchObject({ kind: CELL_KIND.value, value: 0.47e-6 });
  });

  it('lets one section read another by its sheet name, and recalculates from the Book it is given', () => {
    const p = page(
      grid('inputs', [['=VAR("FR4-60-CD", "load_w")']]),
      { heading: 'words only', text: 'no grid here', grid: [] },
      grid('result', [['=Section1!A1 / 230 / 0.9']]),
    );
    // Load current I = P/(V·PF) (basic circuit theory, from memory: 60 W at 230 V, PF 0.9 → 0.2899 A).
    expect(evaluateNotebookPage(book, p).sections[2]!.grid[0]![0]!.value).toBeCloseTo(0.2899, 4);
    const heavier = structuredClone(book);
    heavier.variants.find((v) => v.code === 'FR4-60-CD')!.params.load_w = 120;
    // Twice the load, twice the current: 120/(230 · 0.9) = 0.5797 A.
    expect(evaluateNotebookPage(heavier, p).sections[2]!.grid[0]![0]!.value).toBeCloseTo(0.5797, 4);
    expect(sectionSheetName(2)).toBe('Section3');
  });

  it('keeps text as text, leaves empty cells empty and gives each bad cell its own message', () => {
    const p = page(grid('mixed', [['label', '', '=1/0', '=E_NEAR(-1, 12)', '=A1 & " ok"', '=SUM(']]));
    const row = evaluateNotebookPage(book, p).sections[0]!.grid[0]!;
    expect(row[0]).toMatchObject({ kind: 'value', value: 'label' });
    expect(row[1]).toMatchObject({ kind: 'empty', value: null });
    expect(row[2]).toMatchObject({ value: null, error: '#DIV/0!' });
    expect(row[3]!.message).toBe('E_NEAR: value must be greater than 0, got -1');
    expect(row[4]!.value).toBe('label ok');
    expect(row[5]!.error).toBeDefined();
  });

  it('does not evaluate cells beyond the grid limits and says why', () => {
    const wide = [Array.from({ length: NOTEBOOK_LIMITS.cols + 1 }, (_, i) => String(i))];
    const row = evaluateNotebookPage(book, page(grid('wide', wide))).sections[0]!.grid[0]!;
    expect(row[NOTEBOOK_LIMITS.cols - 1]!.value).toBe(NOTEBOOK_LIMITS.cols - 1);
    expect(row[NOTEBOOK_LIMITS.cols]).toMatchObject({ value: null, error: '#LIMIT' });
  });

  it('reads typed input: formulas as written, engineering values and RKM codes as numbers, the rest as text', () => {
    // IEC 60062 RKM: 4K7 = 4.7 kΩ; SI prefix n = 1e-9.
    expect(cellInput('4k7')).toBe(4700);
    expect(cellInput('330n')).toBeCloseTo(330e-9, 20);
    expect(cellInput(' =A1+1 ')).toBe('=A1+1');
    expect(cellInput('=cost')).toBe('=cost');
    expect(cellInput('Totals')).toBe("'Totals");
    expect(cellInput('   ')).toBeNull();
  });

  it('names cells the way formulas address them', () => {
    expect(cellAddress(0, 0)).toBe('A1');
    expect(cellAddress(2, 1)).toBe('B3');
    expect(cellAddress(9, 25)).toBe('Z10');
    expect(cellAddress(0, 26)).toBe('AA1');
  });
});
