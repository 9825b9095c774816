// Costing functions of the engine: whole-row kernels that let the costing workbook compute a unit cost with a few
// cells per variant. Each calls the same pure rule as src/domain/costing.ts, so engine and TypeScript agree exactly.
import { CellError, ErrorType, FunctionArgumentType, FunctionPlugin } from 'hyperformula';
import type { SimpleRangeValue } from 'hyperformula';
import {
  baseCents,
  bestBuyUnchecked,
  labourUnit,
  overheadPerUnit,
  perUnitFromCents,
  priceFor,
  roundUnit,
  unitCostOf,
} from '../domain/costing.ts';
import { amountBaseCents, landedChoiceCents } from '../domain/landed.ts';

/** One line of doc per function, shown in the app's function list. */
export const COSTING_FUNCTION_DOCS = {
  COST_BEST:
    'COST_BEST(need, quote_rows, …): lowest landed base-currency cost in cents of buying `need` parts from any quote row (rate, MOQ, pack, freight %, duty %, charges %, supplier token, lead days, rank, then break qty/price pairs), buying up to a higher break where cheaper',
  COST_BEST_SUPPLIER:
    'COST_BEST_SUPPLIER(need, quote_rows, …): the supplier token of the quote row COST_BEST chooses (supplier number × 2, plus 1 when the carriage is ours; −1 when the supplier charges nothing per order)',
  COST_SUPPLIERS: 'COST_SUPPLIERS(tokens, …): the distinct supplier tokens of several purchases, as text',
  COST_ORDERS:
    'COST_ORDERS(supplier_rows, tokens, …): cents charged once per order by the suppliers a run buys from: freight per order where some line leaves the carriage to us, and charges per order; supplier_rows = freight cents, charges cents',
  COST_ORDER_CENTS: 'COST_ORDER_CENTS(amount, rate): an amount per order converted to base-currency cents',
  COST_RUN:
    'COST_RUN(run, placements, settings_row, cents, …): unit cost at a run size, 4 decimals: material (cents spent / run) + labour + test + overhead, settings_row = rate/h, min/unit, min/placement, test, overhead %, margin %',
  COST_MATERIAL: 'COST_MATERIAL(run, cents, …): material per unit, 4 decimals, from the cents the run spends on each part',
  COST_LABOUR: 'COST_LABOUR(placements, rate_per_hour, minutes_per_unit, minutes_per_placement): labour per unit, 4 decimals',
  COST_OVERHEAD: 'COST_OVERHEAD(labour, overhead_pct): overhead per unit as a percentage of direct labour, 4 decimals',
  COST_ROUND_UNIT: 'COST_ROUND_UNIT(x): a per-unit amount rounded half away from zero to 4 decimals',
  COST_UNIT: 'COST_UNIT(material, labour, test, overhead): unit cost, the exact sum of the four parts at 4 decimals',
  COST_PRICE: 'COST_PRICE(unit_cost, margin_pct): price for a gross margin on price, cost / (1 − margin), 4 decimals',
  COST_PROBLEM: 'COST_PROBLEM(message): an error value carrying the message (a cost that cannot be computed)',
} as const;

function num(v: unknown): number {
  if (typeof v === 'number') return v;
  if (typeof v === 'object' && v !== null && 'val' in v && typeof (v as { val: unknown }).val === 'number') return (v as { val: number }).val;
  return NaN;
}

// Scratch arrays reused by COST_BEST: a quote row rarely has more than a handful of breaks.
let scratchQty = new Float64Array(16);
let scratchPrice = new Float64Array(16);

/**
 * Columns of a quote row before its price breaks: rate, MOQ, pack, the landed percentages that fall to us (freight,
 * duty, charges), the supplier token, lead days, and the quote's rank in id order (the ties rule of chooseQuote).
 */
export const QUOTE_ROW_HEAD = 9;

/**
 * The quote row chosen for `need` parts [rate, moq, pack, freight %, duty %, charges %, token, lead, rank, q1, p1, …]:
 * the lowest landed cents (goods plus the percentage landed costs), ties to the shorter lead time, then the lower
 * rank, as chooseQuote decides. Rows with no rate (or rate ≤ 0) are skipped.
 */
export function bestRowOverRows(need: number, rows: readonly (readonly unknown[])[]): { cents: number; token: number } | string {
  if (!Number.isInteger(need) || need < 0) return `need must be a whole number ≥ 0, got ${need}`;
  if (need === 0) return { cents: 0, token: -1 };
  let best = Infinity;
  let bestLead = Infinity;
  let bestRank = Infinity;
  let bestToken = -1;
  for (const row of rows) {
    const rate = num(row[0]);
    const moq = num(row[1]);
    const pack = num(row[2]);
    if (!(rate > 0) || !(moq >= 0) || !(pack >= 1)) continue;
    const H = QUOTE_ROW_HEAD;
    const pairs = (row.length - H) >> 1;
    if (pairs > scratchQty.length) {
      scratchQty = new Float64Array(pairs);
      scratchPrice = new Float64Array(pairs);
    }
    let n = 0;
    let valid = true;
    for (let i = 0; i < pairs; i++) {
      const q = num(row[H + 2 * i]);
      const p = num(row[H + 1 + 2 * i]);
      if (Number.isNaN(q)) break; // past the row's last break
      if (!(q >= 1) || !(p >= 0) || (n > 0 && q <= scratchQty[n - 1]!)) {
        valid = false;
        break;
      }
      scratchQty[n] = q;
      scratchPrice[n] = p;
      n++;
    }
    if (!valid || n === 0) continue;
    const b = bestBuyUnchecked(need, moq, pack, scratchQty, scratchPrice, n);
    if (!b) continue;
    const landed = { freightPct: num(row[3]) || 0, dutyPct: num(row[4]) || 0, chargesPct: num(row[5]) || 0, carriage: false };
    const cents = landedChoiceCents(baseCents(b.cents, rate), landed);
    const lead = num(row[7]) || 0;
    const rank = num(row[8]) || 0;
    if (cents < best || (cents === best && (lead < bestLead || (lead === bestLead && rank < bestRank)))) {
      best = cents;
      bestLead = lead;
      bestRank = rank;
      bestToken = num(row[6]);
    }
  }
  return best === Infinity ? 'no usable quote (every quote row lacks a rate, or has bad breaks)' : { cents: best, token: Number.isFinite(bestToken) ? bestToken : -1 };
}

/** The tokens (supplier number × 2 + carriage) in texts of tokens, distinct and ascending; negatives left out. */
export function supplierTokens(texts: readonly (string | number)[]): number[] {
  const set = new Set<number>();
  for (const t of texts) {
    for (const w of String(t).split(' ')) {
      const n = w === '' ? NaN : Number(w);
      if (Number.isInteger(n) && n >= 0) set.add(n);
    }
  }
  return [...set].sort((a, b) => a - b);
}

/**
 * Cents charged once per order by the suppliers behind `tokens`: per supplier, its freight per order (column 0 of
 * its row) when some token leaves the carriage to us, and its charges per order (column 1).
 */
export function orderCentsOverRows(rows: readonly (readonly unknown[])[], tokens: readonly number[]): number | string {
  const carriage = new Map<number, boolean>();
  for (const t of tokens) carriage.set(t >> 1, (carriage.get(t >> 1) ?? false) || (t & 1) === 1);
  let sum = 0;
  for (const [s, carried] of carriage) {
    const row = rows[s] ?? [];
    const freight = carried ? num(row[0]) : 0;
    const charges = num(row[1]);
    if (!Number.isFinite(freight) || !Number.isFinite(charges)) return `supplier ${s + 1}'s amount per order has no exchange rate`;
    sum += freight + charges;
  }
  return sum;
}

/** The whole unit cost of one variant at one run size from a Settings row and the cents of its blocks. */
export function unitCostFromRow(run: number, placements: number, row: readonly unknown[], cents: readonly number[]): number | string {
  if (!Number.isInteger(run)) return `run size must be a whole number, got ${run}`;
  const [rate, mpu, mpp, test, overheadPct] = [num(row[0]), num(row[1]), num(row[2]), num(row[3]), num(row[4])];
  for (const [name, v] of [['labour rate', rate], ['minutes per unit', mpu], ['minutes per placement', mpp], ['test cost', test], ['overhead %', overheadPct]] as const) {
    if (!(v >= 0)) return `${name} must be a number ≥ 0`;
  }
  let sum = 0;
  for (const c of cents) sum += c;
  const labour = labourUnit(rate, mpu, mpp, placements);
  return unitCostOf(perUnitFromCents(sum, run), labour, roundUnit(test), overheadPerUnit(labour, overheadPct));
}

/** The quote rows of one or more ranges (a part's rows, and rows of quotes added to it since the workbook opened). */
function rowsOf(ranges: readonly SimpleRangeValue[]): readonly (readonly unknown[])[] {
  return ranges.length === 1 ? ranges[0]!.data : ranges.flatMap((r) => r.data);
}

// The engine's internal argument types, taken from its own signature (they are not exported by name).
type RunFunction = FunctionPlugin['runFunction'];
type Ast = { args: Parameters<RunFunction>[0] };
type State = Parameters<RunFunction>[1];
type Value = ReturnType<RunFunction>;

export class CostingPlugin extends FunctionPlugin {
  static override implementedFunctions = {
    COST_BEST: {
      method: 'costBest',
      parameters: [{ argumentType: FunctionArgumentType.NUMBER }, { argumentType: FunctionArgumentType.RANGE }],
      repeatLastArgs: 1,
      vectorizationForbidden: true,
    },
    COST_BEST_SUPPLIER: {
      method: 'costBestSupplier',
      parameters: [{ argumentType: FunctionArgumentType.NUMBER }, { argumentType: FunctionArgumentType.RANGE }],
      repeatLastArgs: 1,
      vectorizationForbidden: true,
    },
    COST_SUPPLIERS: {
      method: 'costSuppliers',
      parameters: [{ argumentType: FunctionArgumentType.STRING }],
      repeatLastArgs: 1,
      vectorizationForbidden: true,
    },
    COST_ORDERS: {
      method: 'costOrders',
      parameters: [{ argumentType: FunctionArgumentType.RANGE }, { argumentType: FunctionArgumentType.STRING }],
      repeatLastArgs: 1,
      vectorizationForbidden: true,
    },
    COST_ORDER_CENTS: {
      method: 'costOrderCents',
      parameters: [{ argumentType: FunctionArgumentType.NUMBER, minValue: 0 }, { argumentType: FunctionArgumentType.NUMBER }],
    },
    COST_RUN: {
      method: 'costRun',
      parameters: [
        { argumentType: FunctionArgumentType.NUMBER, minValue: 1 },
        { argumentType: FunctionArgumentType.NUMBER, minValue: 0 },
        { argumentType: FunctionArgumentType.RANGE },
        { argumentType: FunctionArgumentType.NUMBER },
      ],
      repeatLastArgs: 1,
      vectorizationForbidden: true,
    },
    COST_MATERIAL: {
      method: 'costMaterial',
      parameters: [{ argumentType: FunctionArgumentType.NUMBER, minValue: 1 }, { argumentType: FunctionArgumentType.NUMBER }],
      repeatLastArgs: 1,
      vectorizationForbidden: true,
    },
    COST_LABOUR: {
      method: 'costLabour',
      parameters: [
        { argumentType: FunctionArgumentType.NUMBER, minValue: 0 },
        { argumentType: FunctionArgumentType.NUMBER, minValue: 0 },
        { argumentType: FunctionArgumentType.NUMBER, minValue: 0 },
        { argumentType: FunctionArgumentType.NUMBER, minValue: 0 },
      ],
    },
    COST_OVERHEAD: {
      method: 'costOverhead',
      parameters: [{ argumentType: FunctionArgumentType.NUMBER }, { argumentType: FunctionArgumentType.NUMBER, minValue: 0 }],
    },
    COST_ROUND_UNIT: { method: 'costRoundUnit', parameters: [{ argumentType: FunctionArgumentType.NUMBER }] },
    COST_UNIT: {
      method: 'costUnit',
      parameters: [
        { argumentType: FunctionArgumentType.NUMBER },
        { argumentType: FunctionArgumentType.NUMBER },
        { argumentType: FunctionArgumentType.NUMBER },
        { argumentType: FunctionArgumentType.NUMBER },
      ],
    },
    COST_PRICE: {
      method: 'costPrice',
      parameters: [{ argumentType: FunctionArgumentType.NUMBER }, { argumentType: FunctionArgumentType.NUMBER, minValue: 0 }],
    },
    COST_PROBLEM: { method: 'costProblem', parameters: [{ argumentType: FunctionArgumentType.STRING }] },
  };

  costBest(ast: Ast, state: State): Value {
    return this.runFunction(ast.args, state, this.metadata('COST_BEST'), (need: number, ...ranges: SimpleRangeValue[]) => {
      const r = bestRowOverRows(need, rowsOf(ranges));
      return typeof r === 'string' ? new CellError(ErrorType.VALUE, r) : r.cents;
    });
  }

  costBestSupplier(ast: Ast, state: State): Value {
    return this.runFunction(ast.args, state, this.metadata('COST_BEST_SUPPLIER'), (need: number, ...ranges: SimpleRangeValue[]) => {
      const r = bestRowOverRows(need, rowsOf(ranges));
      return typeof r === 'string' ? new CellError(ErrorType.VALUE, r) : r.token;
    });
  }

  costSuppliers(ast: Ast, state: State): Value {
    return this.runFunction(ast.args, state, this.metadata('COST_SUPPLIERS'), (...texts: string[]) => supplierTokens(texts).join(' '));
  }

  costOrders(ast: Ast, state: State): Value {
    return this.runFunction(ast.args, state, this.metadata('COST_ORDERS'), (range: SimpleRangeValue, ...texts: string[]) => {
      const r = orderCentsOverRows(range.data, supplierTokens(texts));
      return typeof r === 'number' ? r : new CellError(ErrorType.VALUE, r);
    });
  }

  costOrderCents(ast: Ast, state: State): Value {
    return this.runFunction(ast.args, state, this.metadata('COST_ORDER_CENTS'), (amount: number, rate: number) =>
      rate > 0 ? amountBaseCents(amount, rate) : new CellError(ErrorType.VALUE, 'the amount per order has no exchange rate'),
    );
  }

  costRun(ast: Ast, state: State): Value {
    return this.runFunction(ast.args, state, this.metadata('COST_RUN'), (run: number, placements: number, settings: SimpleRangeValue, ...cents: number[]) => {
      const unit = unitCostFromRow(run, placements, settings.data[0] ?? [], cents);
      return typeof unit === 'number' ? unit : new CellError(ErrorType.VALUE, unit);
    });
  }

  costMaterial(ast: Ast, state: State): Value {
    return this.runFunction(ast.args, state, this.metadata('COST_MATERIAL'), (run: number, ...cents: number[]) => {
      if (!Number.isInteger(run)) return new CellError(ErrorType.VALUE, `run size must be a whole number, got ${run}`);
      let sum = 0;
      for (const c of cents) sum += c;
      return perUnitFromCents(sum, run);
    });
  }

  costLabour(ast: Ast, state: State): Value {
    return this.runFunction(ast.args, state, this.metadata('COST_LABOUR'), (placements: number, rate: number, mpu: number, mpp: number) =>
      labourUnit(rate, mpu, mpp, placements),
    );
  }

  costOverhead(ast: Ast, state: State): Value {
    return this.runFunction(ast.args, state, this.metadata('COST_OVERHEAD'), (labour: number, pct: number) =>
      overheadPerUnit(labour, pct),
    );
  }

  costRoundUnit(ast: Ast, state: State): Value {
    return this.runFunction(ast.args, state, this.metadata('COST_ROUND_UNIT'), (x: number) => roundUnit(x));
  }

  costUnit(ast: Ast, state: State): Value {
    return this.runFunction(ast.args, state, this.metadata('COST_UNIT'), (m: number, l: number, t: number, o: number) =>
      unitCostOf(m, l, t, o),
    );
  }

  costPrice(ast: Ast, state: State): Value {
    return this.runFunction(ast.args, state, this.metadata('COST_PRICE'), (u: number, margin: number) =>
      margin >= 100 ? new CellError(ErrorType.VALUE, `margin % must be below 100, got ${margin}`) : priceFor(u, margin),
    );
  }

  costProblem(ast: Ast, state: State): Value {
    return this.runFunction(ast.args, state, this.metadata('COST_PROBLEM'), (message: string) => new CellError(ErrorType.VALUE, message));
  }
}

