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

/** One line of doc per function, shown in the app's function list. */
export const COSTING_FUNCTION_DOCS = {
  COST_BEST:
    'COST_BEST(need, quote_rows): lowest base-currency cost in cents of buying `need` parts from any quote row (rate, MOQ, pack, then break qty/price pairs), buying up to a higher break where cheaper',
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

/** Best cents over quote rows [rate, moq, pack, q1, p1, q2, p2, …]; rows with no rate (or rate ≤ 0) are skipped. */
export function bestCentsOverRows(need: number, rows: readonly (readonly unknown[])[]): number | string {
  if (!Number.isInteger(need) || need < 0) return `need must be a whole number ≥ 0, got ${need}`;
  if (need === 0) return 0;
  let best = Infinity;
  for (const row of rows) {
    const rate = num(row[0]);
    const moq = num(row[1]);
    const pack = num(row[2]);
    if (!(rate > 0) || !(moq >= 0) || !(pack >= 1)) continue;
    const pairs = (row.length - 3) >> 1;
    if (pairs > scratchQty.length) {
      scratchQty = new Float64Array(pairs);
      scratchPrice = new Float64Array(pairs);
    }
    let n = 0;
    let valid = true;
    for (let i = 0; i < pairs; i++) {
      const q = num(row[3 + 2 * i]);
      const p = num(row[4 + 2 * i]);
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
    const cents = baseCents(b.cents, rate);
    if (cents < best) best = cents;
  }
  return best === Infinity ? 'no usable quote (every quote row lacks a rate, or has bad breaks)' : best;
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
      vectorizationForbidden: true,
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
    return this.runFunction(ast.args, state, this.metadata('COST_BEST'), (need: number, range: SimpleRangeValue) => {
      const r = bestCentsOverRows(need, range.data);
      return typeof r === 'number' ? r : new CellError(ErrorType.VALUE, r);
    });
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

