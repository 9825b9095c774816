// Functions that read the open Book by name — a variant's parameter, a check's result, a part's price at a quantity —
// for the user's notebook pages. The Book reaches them through the engine's `context` setting (see engine/notebook.ts);
// an engine built without one gives every call an error value saying so.
import { ErrorType, FunctionPlugin } from 'hyperformula';
import type { FunctionPluginDefinition } from 'hyperformula';
import type { ParamValue } from '../../domain/book.ts';
import type { CheckStatus, CheckValue } from '../../domain/check-status.ts';
import { callSpec, defineFunction, fnError, implementedFunctions, valueError } from './define.ts';
import type { FnResult, FunctionSpec } from './define.ts';

/** A lookup that failed, with the reason shown in the cell's error message. */
export interface Missing {
  error: string;
}

export interface CheckLookup {
  value: CheckValue;
  status: CheckStatus;
  unit: string;
  message: string;
}

export interface PriceLookup {
  /** Unit price of the chosen break, in the Book's base currency. */
  unitPrice: number;
  /** Cost of the whole order in the base currency, rounded to cents. */
  extended: number;
  /** Parts ordered: at least the quantity asked, a whole number of packs, at least the MOQ. */
  buy: number;
}

/** What the book functions ask of the Book. Built by `bookFunctionContext` in engine/notebook.ts. */
export interface BookFunctionContext {
  readonly kind: 'rungbook-book';
  variantParam(code: string, name: string): ParamValue | Missing;
  checkResult(code: string, name: string): CheckLookup | Missing;
  partPrice(mpn: string, qty: number): PriceLookup | Missing;
}

function isContext(x: unknown): x is BookFunctionContext {
  return typeof x === 'object' && x !== null && (x as { kind?: unknown }).kind === 'rungbook-book';
}

function missing<T extends object>(r: T | Missing | ParamValue): r is Missing {
  return typeof r === 'object' && r !== null && 'error' in r;
}

const NO_BOOK = 'no Book is open here; book functions work on notebook pages';

/** The computations, given the Book; the spec's own `compute` is used only when no Book is open. */
const BOOK_IMPL: Record<string, (ctx: BookFunctionContext, ...args: never[]) => FnResult> = {
  VAR(ctx, code: string, name: string) {
    const r = ctx.variantParam(code, name);
    if (missing(r)) return fnError('VAR', ErrorType.REF, r.error);
    return r;
  },
  CHECK(ctx, code: string, name: string) {
    const r = ctx.checkResult(code, name);
    if (missing(r)) return fnError('CHECK', ErrorType.REF, r.error);
    if (r.status === 'n/a') return fnError('CHECK', ErrorType.NA, `${name} does not apply to ${code}`);
    if (r.status === 'error' || r.value === null) return valueError('CHECK', `${name} on ${code}: ${r.message || 'no value'}`);
    return r.value;
  },
  CHECK_STATUS(ctx, code: string, name: string) {
    const r = ctx.checkResult(code, name);
    if (missing(r)) return fnError('CHECK_STATUS', ErrorType.REF, r.error);
    return r.status;
  },
  PART_PRICE(ctx, mpn: string, qty: number) {
    if (!Number.isInteger(qty) || qty < 1) return valueError('PART_PRICE', `qty must be a whole number from 1, got ${qty}`);
    const r = ctx.partPrice(mpn, qty);
    if (missing(r)) return fnError('PART_PRICE', ErrorType.NA, r.error);
    return r.unitPrice;
  },
  PART_COST(ctx, mpn: string, qty: number) {
    if (!Number.isInteger(qty) || qty < 1) return valueError('PART_COST', `qty must be a whole number from 1, got ${qty}`);
    const r = ctx.partPrice(mpn, qty);
    if (missing(r)) return fnError('PART_COST', ErrorType.NA, r.error);
    return r.extended;
  },
};

function noBook(name: string): () => FnResult {
  return () => valueError(name, NO_BOOK);
}

const VAR = defineFunction({
  name: 'VAR',
  area: 'book',
  returns: '',
  doc: 'A variant parameter by code and name: VAR("FR4-60-CD", "load_w"); text parameters come back as text.',
  args: [
    { name: 'variant', unit: 'text', kind: 'text' },
    { name: 'name', unit: 'text', kind: 'text' },
  ],
  compute: noBook('VAR'),
});

const CHECK = defineFunction({
  name: 'CHECK',
  area: 'book',
  returns: '',
  doc: 'The figure of a check on a variant, in the check’s unit: CHECK("FR4-60-CD", "mains_peak"); #N/A where it does not apply.',
  args: [
    { name: 'variant', unit: 'text', kind: 'text' },
    { name: 'check', unit: 'text', kind: 'text' },
  ],
  compute: noBook('CHECK'),
});

const CHECK_STATUS = defineFunction({
  name: 'CHECK_STATUS',
  area: 'book',
  returns: 'text',
  doc: 'The status word of a check on a variant: "pass", "margin", "fail", "n/a" or "error".',
  args: [
    { name: 'variant', unit: 'text', kind: 'text' },
    { name: 'check', unit: 'text', kind: 'text' },
  ],
  compute: noBook('CHECK_STATUS'),
});

const PART_PRICE = defineFunction({
  name: 'PART_PRICE',
  area: 'book',
  returns: 'base currency',
  doc: 'Unit price in the Book’s currency of the cheapest current quote for qty of a part (MOQ, packs, all-units breaks: operations-management texts, from memory).',
  args: [
    { name: 'mpn', unit: 'text', kind: 'text' },
    { name: 'qty', unit: '', rule: 'positive' },
  ],
  compute: noBook('PART_PRICE'),
});

const PART_COST = defineFunction({
  name: 'PART_COST',
  area: 'book',
  returns: 'base currency',
  doc: 'Cost in the Book’s currency of the cheapest order covering qty of a part, buying up to a better break if cheaper (all-units breaks: operations-management texts, from memory).',
  args: [
    { name: 'mpn', unit: 'text', kind: 'text' },
    { name: 'qty', unit: '', rule: 'positive' },
  ],
  compute: noBook('PART_COST'),
});

export const BOOK_FUNCTIONS: readonly FunctionSpec[] = [VAR, CHECK, CHECK_STATUS, PART_PRICE, PART_COST];

type RunFunction = FunctionPlugin['runFunction'];
type PluginCall = { args: Parameters<RunFunction>[0] };
type PluginState = Parameters<RunFunction>[1];

/** The plugin reads the Book from the engine's context, so its methods are written here rather than generated. */
class BookPluginBase extends FunctionPlugin {
  static override implementedFunctions = implementedFunctions(BOOK_FUNCTIONS);

  protected callBook(spec: FunctionSpec, ast: PluginCall, state: PluginState) {
    const ctx = this.config.context;
    const impl = BOOK_IMPL[spec.name];
    const run: FunctionSpec =
      isContext(ctx) && impl ? { ...spec, compute: ((...a: never[]) => impl(ctx, ...a)) as FunctionSpec['compute'] } : spec;
    return this.runFunction(ast.args, state, this.metadata(spec.name), (...raw: unknown[]) => callSpec(run, raw));
  }
}

for (const spec of BOOK_FUNCTIONS) {
  Object.defineProperty(BookPluginBase.prototype, spec.name, {
    value(this: BookPluginBase, ast: PluginCall, state: PluginState) {
      return this.callBook(spec, ast, state);
    },
  });
}
Object.defineProperty(BookPluginBase, 'name', { value: 'Rungbook_book_plugin' });

export const BookPlugin: FunctionPluginDefinition = BookPluginBase;
