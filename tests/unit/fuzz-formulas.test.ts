// Hostile typing, generated: random text and random formula-shaped text through the guard and the engine, and random
// text as engineering values. Every answer is a value or a clear message; nothing throws.
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import { parseValue } from '../../src/domain/units.ts';
import { createEngine } from '../../src/engine/create.ts';
import { evaluateFormula, guardFormula } from '../../src/engine/formula-guard.ts';
import type { EvaluateResult } from '../../src/engine/formula-guard.ts';

const hf = createEngine();
const sheet = hf.getSheetId(hf.addSheet('fuzz'))!;
// A few filled cells so references read numbers, text and an error as well as blanks.
hf.setCellContents({ sheet, row: 0, col: 0 }, [
  [4700, 0.47e-6, 'text', '=1/0'],
  [230, 50, -1, 0],
]);
afterAll(() => hf.destroy());

function clearAnswer(r: EvaluateResult): boolean {
  if (r.ok) return r.value !== undefined;
  return typeof r.error === 'string' && r.error.trim().length > 0;
}

/** Pieces people type in formulas, including the dangerous ones, so generated text is often nearly a formula. */
const piece = fc.oneof(
  fc.constantFrom(
    '(', ')', '{', '}', ',', ';', '"', "'", '+', '-', '*', '/', '^', '&', '%', '=', '<', '>', '<=', '<>', ':', '!', ' ', '$',
    'A1', 'B2', 'A1:D2', 'A:A', '1:1', 'A1:XFD1048576', 'ZZZ1', 'Sheet1!A1', 'fuzz!A1:B2', '#DIV/0!', '#N/A',
    'SUM(', 'IF(', 'MAINS_PEAK(', 'XCAP_AMPS(', 'E_NEAR(', 'RKM("', 'RKM_TEXT(', 'BREAK_PRICE(', 'NEED_QTY(', 'BUY_QTY(',
    'OFFSET(', 'SEQUENCE(', 'REPT(', 'INDEX(', 'MATCH(', 'TRUE', 'FALSE', 'NA()', 'load_w',
    '0', '1', '-1', '1e308', '1e-320', '4.7e3', '0.1', '1e', '.5', '12,5', '∞', 'NaN', '\u0000', '\u202e', '𝟙',
  ),
  fc.string({ maxLength: 4 }),
  fc.integer({ min: -1_000_000, max: 1_000_000 }).map(String),
  fc.double({ noNaN: false }).map(String),
);
const formulaText = fc.array(piece, { maxLength: 40 }).map((ps) => `=${ps.join('')}`);

describe('formula text never escapes as an exception', () => {
  it('the guard answers any text with a formula or a refusal with a message', () => {
    fc.assert(
      fc.property(fc.oneof(fc.string({ maxLength: 300 }), fc.string({ unit: 'binary', maxLength: 300 }), formulaText), (text) => {
        const g = guardFormula(text);
        if (g.ok) expect(g.formula.startsWith('=')).toBe(true);
        else expect(g.refusal.message.length).toBeGreaterThan(0);
      }),
      { numRuns: 2000 },
    );
  });

  it('random text through guard and engine gives a value or a message', () => {
    fc.assert(
      fc.property(fc.string({ maxLength: 200 }), (text) => {
        expect(clearAnswer(evaluateFormula(hf, text, sheet))).toBe(true);
      }),
      { numRuns: 500 },
    );
  });

  it('formula-shaped text through guard and engine gives a value or a message', () => {
    fc.assert(
      fc.property(formulaText, (text) => {
        expect(clearAnswer(evaluateFormula(hf, text, sheet))).toBe(true);
      }),
      { numRuns: 1500 },
    );
  });

  it('well-formed calls of our functions with any numbers give a finite number or an error message, never NaN', () => {
    const fn = fc.constantFrom('MAINS_PEAK', 'XCAP_AMPS', 'XCAP_FOR', 'BLEED_TIME', 'ASTABLE_DUTY', 'RC_REACH', 'E_NEAR', 'NEED_QTY', 'BUY_QTY');
    const num = fc.oneof(fc.double({ noNaN: true, noDefaultInfinity: true }), fc.integer(), fc.constantFrom(0, -0, 1e-300, 1e300));
    fc.assert(
      fc.property(fn, fc.array(num, { minLength: 1, maxLength: 5 }), (name, args) => {
        const text = `=${name}(${args.map((a) => (Object.is(a, -0) ? '-0' : String(a))).join(',')})`;
        const r = evaluateFormula(hf, text, sheet);
        expect(clearAnswer(r)).toBe(true);
        if (r.ok && typeof r.value === 'number') expect(Number.isFinite(r.value)).toBe(true);
      }),
      { numRuns: 800 },
    );
  });
});

describe('values typed as text never escape as an exception', () => {
  it('parseValue answers any text with a finite number and a unit, or a message', () => {
    const unit = fc.constantFrom(undefined, 'Ω', 'F', 'V', 'A', 'W', 'Hz', 'H', 'ohm', '', 'furlong');
    const valueLike = fc
      .tuple(fc.constantFrom('', '-', '+', '\u2212'), fc.oneof(fc.double().map(String), fc.nat().map(String)), fc.constantFrom('', ' ', 'k', 'M', 'G', 'm', 'u', 'µ', 'n', 'p', 'R', 'K', 'kΩ', ' nF', 'V', 'mA', 'e999', 'k7', 'n2'), fc.string({ maxLength: 3 }))
      .map((parts) => parts.join(''));
    fc.assert(
      fc.property(fc.oneof(fc.string({ maxLength: 60 }), fc.string({ unit: 'binary', maxLength: 60 }), valueLike), unit, (text, expected) => {
        const r = parseValue(text, expected);
        if (r.ok) {
          expect(Number.isFinite(r.value)).toBe(true);
          expect(typeof r.unit).toBe('string');
        } else {
          expect(r.error.trim().length).toBeGreaterThan(0);
        }
      }),
      { numRuns: 3000 },
    );
  });
});
