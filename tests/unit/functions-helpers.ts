// Shared pieces of the formula-function tests: one engine sheet per file on which a formula gives its value, its
// number or its error, and the four-significant-figure agreement the published reference values call for.
import { expect } from 'vitest';
import { DetailedCellError } from 'hyperformula';
import type { RawCellContent } from 'hyperformula';
import { createEngine } from '../../src/engine/create.ts';

export interface FormulaSheet {
  /** What the formula gives, as the engine returns it. */
  value(formula: string): unknown;
  /** The formula's number; anything else fails the test with the formula named. */
  calc(formula: string): number;
  /** The formula's error value; anything else fails the test with the formula named. */
  fails(formula: string): DetailedCellError;
}

/** A fresh engine with one sheet named `name`, holding `rows` (row by row) for functions that read ranges. */
export function formulaSheet(name: string, rows?: RawCellContent[][]): FormulaSheet {
  const hf = createEngine();
  const sheet = hf.getSheetId(hf.addSheet(name))!;
  if (rows) hf.setSheetContent(sheet, rows);
  const value = (formula: string): unknown => hf.calculateFormula(formula, sheet);
  return {
    value,
    calc(formula) {
      const v = value(formula);
      if (typeof v !== 'number') throw new Error(`${formula} gave ${String(v)}`);
      return v;
    },
    fails(formula) {
      const v = value(formula);
      expect(v, formula).toBeInstanceOf(DetailedCellError);
      return v as DetailedCellError;
    },
  };
}

/** Reference values are given to 4 significant figures: agree within half a unit of the 4th figure. */
export function near4(actual: number, expected: number): void {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(0.0005 * Math.abs(expected) * 1.0001);
}
