// Every costing function resolves by name in an engine and gives the worked costing values (operations-management and cost-accounting texts, from memory).
import { describe, expect, it } from 'vitest';
import type { HyperFormula } from 'hyperformula';
import { COSTING_FUNCTION_DOCS, CostingPlugin } from '../../src/engine/costing-functions.ts';
import { createEngine } from '../../src/engine/create.ts';

function engine(): HyperFormula {
  return createEngine(
    { smartRounding: false },
    {
      // The all-units worked example as one quote row: rate 1, MOQ 1, pack 10, no landed cost (freight, duty and
      // charges 0 %), supplier token −1, lead 0, rank 0, then break qty/price pairs. The second row is the same offer
      // with freight 5 %, duty 3.5 % and charges 1 % falling to us, from supplier 2 with the carriage ours (token 5).
      Quotes: [
        [1, 1, 10, 0, 0, 0, -1, 0, 0, 1, 0.3, 100, 0.2, 500, 0.15, 1000, 0.12, 2500, 0.09],
        [1, 1, 10, 5, 3.5, 1, 5, 0, 0, 1, 0.3, 100, 0.2, 500, 0.15, 1000, 0.12, 2500, 0.09],
      ],
      // Amounts per order in base cents (freight, charges) of suppliers 0, 1 and 2.
      Suppliers: [
        [1500, 0],
        [0, 250],
        [4000, 300],
      ],
      // Standard-cost example settings: 15.00/h, 7.2 min (0.12 h) per unit, no placement minutes, no test, 100 %, 20 %.
      Settings: [[15, 7.2, 0, 0, 100, 20]],
    },
  );
}

describe('costing functions', () => {
  it('has a doc line for every function and every documented function exists', () => {
    expect(Object.keys(COSTING_FUNCTION_DOCS).sort()).toEqual(Object.keys(CostingPlugin.implementedFunctions).sort());
  });

  it('resolves every function by name and gives the worked values', () => {
    const hf = engine();
    const sheet = hf.getSheetId('Quotes')!;
    const calc = (f: string): unknown => hf.calculateFormula(f, sheet);
    // All-units buy-up (operations-management texts, from memory): need 909, pack 10 → 1000 × 0.12 = 120.00 beats 910 × 0.15 = 136.50 → 12000 cents.
    expect(calc('=COST_BEST(909, Quotes!A1:S1)')).toBe(12000);
    // Landed (by hand): 12000 goods + 5 % freight 600 + 3.5 % duty 420 + 1 % charges 120 = 13140 cents.
    expect(calc('=COST_BEST(909, Quotes!A2:S2)')).toBe(13140);
    // Of the two rows the one without landed cost is cheaper; its supplier token is −1.
    expect(calc('=COST_BEST_SUPPLIER(909, Quotes!A1:S2)')).toBe(-1);
    expect(calc('=COST_BEST_SUPPLIER(909, Quotes!A2:S2)')).toBe(5);
    // Rows in more than one range (a quote added since the workbook opened) are chosen among as one list.
    expect(calc('=COST_BEST(909, Quotes!A2:S2, Quotes!A1:S1)')).toBe(12000);
    expect(calc('=COST_BEST_SUPPLIER(909, Quotes!A2:S2, Quotes!A1:S1)')).toBe(-1);
    expect(calc('=COST_SUPPLIERS("3", "2 5", -1, "3")')).toBe('2 3 5');
    // Tokens 2 and 3 are supplier 1 (carriage ours on one purchase), 4 is supplier 2 without carriage:
    // supplier 1 freight 0 + charges 250, supplier 2 charges 300 only → 550 cents.
    expect(calc('=COST_ORDERS(Suppliers!A1:B3, "2 3", 4)')).toBe(550);
    expect(calc('=COST_ORDERS(Suppliers!A1:B3, 5, 1)')).toBe(4000 + 300 + 1500);
    // 25.00 at 1.17 base per unit → 2925 cents (by hand).
    expect(calc('=COST_ORDER_CENTS(25, 1.17)')).toBe(2925);
    // Standard cost (cost-accounting texts, from memory): material 1850.00 over 1000 units = 1.85; labour 0.12 h × 15.00 = 1.80; overhead 1.80.
    expect(calc('=COST_MATERIAL(1000, 185000)')).toBe(1.85);
    expect(calc('=COST_LABOUR(0, 15, 7.2, 0)')).toBe(1.8);
    expect(calc('=COST_OVERHEAD(1.8, 100)')).toBe(1.8);
    expect(calc('=COST_UNIT(1.85, 1.8, 0, 1.8)')).toBe(5.45);
    expect(calc('=COST_RUN(1000, 0, Settings!A1:F1, 185000)')).toBe(5.45);
    // Gross margin on price: 5.45 / (1 − 0.20) = 6.8125 (common practice).
    expect(calc('=COST_PRICE(5.45, 20)')).toBe(6.8125);
    // Half away from zero at 4 decimals: 1.00005 → 1.0001 (by hand).
    expect(calc('=COST_ROUND_UNIT(1.00005)')).toBe(1.0001);
    hf.destroy();
  });

  it('gives error values with a message for bad arguments, never a number', () => {
    const hf = engine();
    const sheet = hf.getSheetId('Quotes')!;
    const err = (f: string): string => {
      const v = hf.calculateFormula(f, sheet) as { type?: string; message?: string };
      expect(typeof v).toBe('object');
      return v.message ?? '';
    };
    expect(err('=COST_PROBLEM("no usable quote for X")')).toBe('no usable quote for X');
    expect(err('=COST_PRICE(5, 100)')).toMatch(/below 100/);
    expect(err('=COST_BEST(9.5, Quotes!A1:S1)')).toMatch(/whole number/);
    expect(err('=COST_ORDER_CENTS(25, 0)')).toMatch(/no exchange rate/);
    expect(err('=COST_BEST(5, Settings!A1:F1)')).toMatch(/no usable quote|bad breaks/);
    hf.destroy();
  });
});
