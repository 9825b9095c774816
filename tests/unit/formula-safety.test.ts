// Formula safety: overlong text, deep nesting, long operator chains, huge ranges and functions of unbounded cost are
// refused with a message before the engine sees them; division by zero and circular references come back as error
// values with words; nothing a person types makes the engine throw out of evaluateFormula.
import { afterAll, describe, expect, it } from 'vitest';
import type { Check } from '../../src/domain/book.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { createEngine } from '../../src/engine/create.ts';
import { evaluateChecks } from '../../src/engine/family.ts';
import { evaluateNotebookPage } from '../../src/engine/notebook.ts';
import {
  FORMULA_LIMITS,
  FORMULA_REFUSALS,
  columnNumber,
  describeFormulaError,
  evaluateFormula,
  guardFormula,
} from '../../src/engine/formula-guard.ts';
import type { GuardResult } from '../../src/engine/formula-guard.ts';

const hf = createEngine();
const sheet = hf.getSheetId(hf.addSheet('safety'))!;
afterAll(() => hf.destroy());

function refusal(r: GuardResult): { code: string; message: string; at?: number } {
  if (r.ok) throw new Error(`expected a refusal, got ${r.formula}`);
  return r.refusal;
}

function nested(depth: number): string {
  return `=${'('.repeat(depth)}1${')'.repeat(depth)}`;
}

describe('guardFormula lets ordinary formulas through', () => {
  it('adds exactly one leading "=" and trims the text', () => {
    expect(guardFormula('  MAINS_PEAK(230, 0.1) ')).toEqual({ ok: true, formula: '=MAINS_PEAK(230, 0.1)' });
    expect(guardFormula('=SUM(A1:B20)')).toEqual({ ok: true, formula: '=SUM(A1:B20)' });
  });

  it('takes a formula at each limit: 32 brackets deep, 200 operators, 100,000 range cells, 4,000 characters', () => {
    expect(guardFormula(nested(FORMULA_LIMITS.maxDepth)).ok).toBe(true);
    expect(guardFormula(`=1${'+1'.repeat(FORMULA_LIMITS.maxOperators)}`).ok).toBe(true);
    // Column A to CV is 100 columns (C = 3, V = 22: 3·26 + 22 = 100); 100 × 1000 rows = 100,000 cells.
    expect(columnNumber('CV')).toBe(100);
    expect(guardFormula('=SUM(A1:CV1000)').ok).toBe(true);
    const long = `="${'x'.repeat(FORMULA_LIMITS.maxLength - 3)}"`;
    expect(long.length).toBe(FORMULA_LIMITS.maxLength);
    expect(guardFormula(long).ok).toBe(true);
  });

  it('does not count exponent signs as operators or ranges written inside text', () => {
    expect(guardFormula('=1e-7+2.5E+3', { maxOperators: 1 }).ok).toBe(true);
    expect(guardFormula('=LEN("A1:ZZZ40000 and OFFSET(A1,0,0,9,9)")').ok).toBe(true);
    // A name that merely contains a refused function's name is someone's own name, not that function.
    expect(guardFormula('=MYOFFSET(1)').ok).toBe(true);
  });

  it('the heaviest formula inside the limits evaluates without the engine throwing', () => {
    // 32 brackets deep, each level a chain of operators, 200 operators in all: the worst the limits allow.
    const perLevel = Math.floor(FORMULA_LIMITS.maxOperators / FORMULA_LIMITS.maxDepth);
    let f = '1';
    for (let d = 0; d < FORMULA_LIMITS.maxDepth; d++) f = `(${f}${'+1'.repeat(perLevel)})`;
    const operators = perLevel * FORMULA_LIMITS.maxDepth;
    expect(operators).toBeLessThanOrEqual(FORMULA_LIMITS.maxOperators);
    // 1 plus one for every "+1": worked by counting.
    expect(evaluateFormula(hf, `=${f}`, sheet)).toEqual({ ok: true, value: 1 + operators });
  });
});

describe('guardFormula refuses what could freeze the page, with a message', () => {
  it('refuses 500 nested parentheses, which overflow the engine when handed to it directly', () => {
    const text = nested(500);
    // The engine's recursive parser overflows the JavaScript stack: that is why the guard exists.
    expect(() => hf.calculateFormula(text, sheet)).toThrow(RangeError);
    const r = refusal(guardFormula(text));
    expect(r.code).toBe(FORMULA_REFUSALS.tooDeep);
    expect(r.message).toMatch(/more than 32 deep \(at character 34\)/);
    expect(r.at).toBe(34);
    const e = evaluateFormula(hf, text, sheet);
    expect(e.ok).toBe(false);
  });

  it('refuses a chain of 2,000 operators, which also overflows the engine', () => {
    const text = `=${'-'.repeat(2000)}1`;
    expect(() => hf.calculateFormula(text, sheet)).toThrow(RangeError);
    const r = refusal(guardFormula(text));
    expect(r.code).toBe(FORMULA_REFUSALS.tooManyOperators);
    expect(r.message).toContain('2,000 operators');
    expect(refusal(guardFormula(`=1${'+1'.repeat(1000)}`)).message).toContain('1,000 operators');
  });

  it('refuses A1:XFD1048576 as reaching past the sheet', () => {
    // XFD is column 16,384 (24·676 + 6·26 + 4), inside the 18,278 columns; row 1,048,576 is past the 40,000 rows.
    expect(columnNumber('XFD')).toBe(16_384);
    const r = refusal(guardFormula('=SUM(A1:XFD1048576)'));
    expect(r.code).toBe(FORMULA_REFUSALS.offSheet);
    expect(r.message).toBe(
      'The range A1:XFD1048576 reaches row 1,048,576, past the sheet: Rungbook sheets have 40,000 rows and 18,278 columns (A to ZZZ).',
    );
    expect(r.at).toBe(6);
    expect(refusal(guardFormula('=SUM(A1:ZZZZ2)')).message).toContain('column 475,254');
  });

  it('refuses ranges inside the sheet that are too large to read at once', () => {
    // A1:Z40000 is 26 columns × 40,000 rows = 1,040,000 cells.
    const r = refusal(guardFormula('=SUM(A1:Z40000)'));
    expect(r.code).toBe(FORMULA_REFUSALS.hugeRange);
    expect(r.message).toContain('1,040,000 cells');
    // Whole columns count every row: A:C is 3 × 40,000 = 120,000; whole rows count every column: 1:6 is 6 × 18,278.
    expect(refusal(guardFormula('=SUM(A:C)')).message).toContain('120,000 cells');
    expect(refusal(guardFormula('=SUM(1:6)')).message).toContain('109,668 cells');
    expect(guardFormula('=SUM(A:A)').ok).toBe(true);
    // Sheet names, quoted sheet names and $ anchors do not hide a range; reversed corners count the same.
    expect(refusal(guardFormula("=SUM('my sheet'!$A$1:$Z$40000)")).code).toBe(FORMULA_REFUSALS.hugeRange);
    expect(refusal(guardFormula('=SUM(other!Z40000:A1)')).code).toBe(FORMULA_REFUSALS.hugeRange);
    // Several ranges are added up: 60,000 + 60,000 cells.
    expect(refusal(guardFormula('=SUM(A1:A60000)')).code).toBe(FORMULA_REFUSALS.offSheet);
    expect(refusal(guardFormula('=SUM(A1:B30000)+SUM(C1:D30000)')).message).toContain('120,000 cells');
  });

  it('refuses functions whose cost is set by a number inside the formula', () => {
    for (const [text, name] of [
      ['=SUM(OFFSET(A1,0,0,40000,1000))', 'OFFSET'],
      ['=sum(sequence(40000, 18000))', 'SEQUENCE'],
      ['=LEN(Rept("x", 1e9))', 'REPT'],
    ] as const) {
      const r = refusal(guardFormula(text));
      expect(r.code).toBe(FORMULA_REFUSALS.unboundedFunction);
      expect(r.message).toMatch(new RegExp(`^${name} is not available in Rungbook formulas: `));
    }
  });

  it('refuses overlong text before reading it', () => {
    const r = refusal(guardFormula(`="${'x'.repeat(100_000)}"`));
    expect(r.code).toBe(FORMULA_REFUSALS.tooLong);
    expect(r.message).toContain('100,003 characters long');
  });

  it('points at brackets and quotes that do not pair up', () => {
    expect(refusal(guardFormula('=SUM(1,2')).message).toBe('The "(" at character 5 is never closed; add ")".');
    expect(refusal(guardFormula('=1)')).message).toBe('The ")" at character 3 closes nothing that is open.');
    expect(refusal(guardFormula('=SUM({1,2)}')).code).toBe(FORMULA_REFUSALS.unbalanced);
    expect(refusal(guardFormula('=LEN("abc)')).message).toBe('Text starting at character 6 has no closing quote.');
    expect(refusal(guardFormula('  =  ')).code).toBe(FORMULA_REFUSALS.empty);
  });
});

describe('evaluateFormula gives error values with words, never an exception', () => {
  it('division by zero is an error with words', () => {
    expect(evaluateFormula(hf, '=1/0', sheet)).toEqual({ ok: false, error: '#DIV/0! division by zero' });
  });

  it('text the engine cannot read is refused with advice', () => {
    const r = evaluateFormula(hf, '=1+*2', sheet);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error).toMatch(/could not be read/);
  });

  it('a stack overflow inside the engine becomes a message when the limits are lifted', () => {
    const r = evaluateFormula(hf, nested(500), sheet, { maxDepth: 10_000 });
    expect(r).toEqual({ ok: false, error: 'The formula could not be evaluated: it is nested too deeply for the engine; split it into named checks' });
  });

  it('our own functions still answer through the guard', () => {
    // 0.47 µF at 230 V / 50 Hz: I = 2π·50·0.47e-6·230 = 33.96 mA (capacitive dropper, basic circuit theory, from memory).
    const r = evaluateFormula(hf, 'XCAP_AMPS(0.47e-6, 230, 50)', sheet);
    expect(r.ok).toBe(true);
    if (r.ok) expect(r.value as number).toBeCloseTo(0.03396, 5);
  });

  it('a circular reference between cells reads as a circular reference', () => {
    const engine = createEngine();
    const s = engine.getSheetId(engine.addSheet('loop'))!;
    engine.setCellContents({ sheet: s, row: 0, col: 0 }, [['=B1', '=A1+1']]);
    const v = engine.getCellValue({ sheet: s, row: 0, col: 0 });
    expect(typeof v === 'object' && v !== null && 'type' in v).toBe(true);
    expect(describeFormulaError(v as { type: string; value: string; message: string })).toBe(
      'circular reference: the formula depends on its own result',
    );
    engine.destroy();
  });

  it('two checks that read each other by name report a circular reference instead of a value', () => {
    const book = demoBook();
    const base: Omit<Check, 'id' | 'name' | 'formula'> = {
      rev: 0,
      title: 'loop',
      unit: '',
      rule: { kind: 'true' },
      appliesWhen: '',
      note: '',
      builtIn: false,
      group: 'test',
    };
    const checks: Check[] = [
      { ...base, id: 'c-loop-a', name: 'loop_a', formula: 'loop_b + 1' },
      { ...base, id: 'c-loop-b', name: 'loop_b', formula: 'loop_a * 2' },
    ];
    const results = evaluateChecks(book, checks);
    expect(results.length).toBe(2 * book.variants.length);
    for (const r of results) {
      expect(r.value).toBeNull();
      expect(r.message).toContain('circular reference');
    }
  });

  it('describes every engine error kind with its code', () => {
    expect(describeFormulaError({ type: 'NUM', value: '#NUM!', message: 'capacitance must be positive' })).toBe(
      '#NUM! a number is out of range: capacitance must be positive',
    );
    expect(describeFormulaError({ type: 'NAME', value: '#NAME?' })).toBe('#NAME? unknown function or name');
    expect(describeFormulaError({ type: 'NEW_KIND', value: '#NEW!', message: '' })).toBe('#NEW!');
  });
});

describe('evaluateFormula never shows a number that is not finite', () => {
  it('a tiny number the engine rounds to NaN comes back as an error with words', () => {
    // 1e-300 is a normal IEEE 754 double (the smallest normal is about 2.2e-308), so the right answer is 1e-300;
    // the engine's display rounding turns it into NaN, which must not be shown as a number.
    const r = evaluateFormula(hf, '=1e-300', sheet);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error).toMatch(/^#NUM! the result is not a finite number/);
  });
});

describe('notebook grids pass every typed formula through the guard', () => {
  it('refused formulas show their reason in the cell while the rest of the page evaluates', () => {
    const book = demoBook();
    const page = {
      id: 'page_safety',
      rev: 0,
      title: 'safety',
      position: 0,
      sections: [
        {
          heading: 'typed by a person',
          text: '',
          grid: [
            ['=SUM(A1:XFD1048576)', nested(500), '=1/0'],
            ['=SUM(Section1!A1:Z40000)', '=OFFSET(A1,0,0,40000,1000)', '=2+3'],
          ],
        },
      ],
    };
    const result = evaluateNotebookPage(book, page);
    const [row1, row2] = result.sections[0]!.grid;
    expect(row1![0]).toMatchObject({ kind: 'formula', value: null, error: '#REFUSED' });
    expect(row1![0]!.message).toContain('past the sheet');
    expect(row1![1]!.message).toContain('more than 32 deep');
    // Division by zero is not refused: it is the engine's own error value.
    expect(row1![2]).toMatchObject({ value: null, error: '#DIV/0!' });
    expect(row2![0]!.message).toContain('1,040,000 cells');
    expect(row2![1]!.message).toMatch(/^OFFSET is not available/);
    expect(row2![2]).toMatchObject({ kind: 'formula', value: 5 });
  });
});
