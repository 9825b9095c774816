// Purchasing functions over the costing rules of src/domain/costing.ts, so a formula gives the same quantities and
// prices as a costed BOM: need with attrition, buy in MOQ and whole packs, all-units price breaks.
import { CellError, EmptyValue, ErrorType } from 'hyperformula';
import type { SimpleRangeValue } from 'hyperformula';
import type { PriceBreak } from '../../domain/book.ts';
import { breakPrice, buyQty, needQty } from '../../domain/costing.ts';
import { buildPlugin, defineFunction, fnError, numError, plainNumber, valueError } from './define.ts';
import type { FunctionSpec } from './define.ts';

const NEED_QTY = defineFunction({
  name: 'NEED_QTY',
  area: 'purchasing',
  returns: '',
  doc: 'Parts needed for a run: ceil(per_unit · run · (1 + attrition)), IEEE 754 float noise such as 100 × 1.1 ignored (common practice).',
  args: [
    { name: 'per_unit', unit: '' },
    { name: 'run', unit: '' },
    { name: 'attrition', unit: '' },
  ],
  compute(perUnit: number, run: number, attrition: number) {
    const r = needQty(perUnit, run, attrition);
    return r.ok ? r.value : numError('NEED_QTY', r.error);
  },
});

const BUY_QTY = defineFunction({
  name: 'BUY_QTY',
  area: 'purchasing',
  returns: '',
  doc: 'Quantity to order: ceil(max(need, moq) / pack) · pack; 0 when need is 0 (common practice).',
  args: [
    { name: 'need', unit: '' },
    { name: 'moq', unit: '' },
    { name: 'pack', unit: '' },
  ],
  compute(need: number, moq: number, pack: number) {
    const r = buyQty(need, moq, pack);
    return r.ok ? r.value : numError('BUY_QTY', r.error);
  },
});

/**
 * Reads the break quantities and prices from two ranges of the same size (a row or a column each). Pairs where both
 * cells are empty are skipped, so a fixed block of break columns can hold quotes with fewer breaks.
 */
function readBreaks(qtys: SimpleRangeValue, prices: SimpleRangeValue): PriceBreak[] | CellError {
  const q = [...qtys.valuesFromTopLeftCorner()];
  const p = [...prices.valuesFromTopLeftCorner()];
  if (q.length !== p.length) {
    return valueError('BREAK_PRICE', `break_qtys has ${q.length} cells but break_prices has ${p.length}`);
  }
  const out: PriceBreak[] = [];
  for (let i = 0; i < q.length; i++) {
    const qi = q[i];
    const pi = p[i];
    if (qi instanceof CellError) return qi;
    if (pi instanceof CellError) return pi;
    if (qi === EmptyValue && pi === EmptyValue) continue;
    const qty = plainNumber(qi);
    const price = plainNumber(pi);
    if (qty === undefined || price === undefined) {
      return valueError('BREAK_PRICE', `break ${i + 1} needs a number in both ranges`);
    }
    out.push({ qty, price });
  }
  return out;
}

const BREAK_PRICE = defineFunction({
  name: 'BREAK_PRICE',
  area: 'purchasing',
  returns: '',
  doc: 'All-units unit price at qty: the price of the highest break quantity ≤ qty; an error below the lowest break (operations-management texts, from memory).',
  args: [
    { name: 'break_qtys', unit: 'range', kind: 'range' },
    { name: 'break_prices', unit: 'range', kind: 'range' },
    { name: 'qty', unit: '', rule: 'nonNegative' },
  ],
  compute(qtys: SimpleRangeValue, prices: SimpleRangeValue, qty: number) {
    const breaks = readBreaks(qtys, prices);
    if (breaks instanceof CellError) return breaks;
    const r = breakPrice(breaks, qty);
    if (r.ok) return r.value.price;
    // Below the lowest break no price applies (#N/A); a malformed list of breaks is a value error.
    const below = breaks.length > 0 && !breaks.some((b) => b.qty <= qty) && r.error.includes('below the lowest');
    return fnError('BREAK_PRICE', below ? ErrorType.NA : ErrorType.VALUE, r.error);
  },
});

export const PURCHASING_FUNCTIONS: readonly FunctionSpec[] = [NEED_QTY, BUY_QTY, BREAK_PRICE];

export const PurchasingPlugin = buildPlugin('purchasing', PURCHASING_FUNCTIONS);
