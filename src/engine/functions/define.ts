// How Rungbook's formula functions are declared: one spec per function (arguments with units and rules, a doc
// line, the computation) turned into a HyperFormula function plugin per area. Argument checks live here, once.
import { CellError, EmptyValue, ErrorType, FunctionArgumentType, FunctionPlugin, SimpleRangeValue } from 'hyperformula';
import type { FunctionArgument, FunctionPluginDefinition, ImplementedFunctions } from 'hyperformula';
import { parseValue } from '../../domain/units.ts';

export const FUNCTION_AREAS = ['values', 'supply', 'timing', 'power', 'triac', 'transformer', 'surge', 'purchasing', 'book'] as const;
export type FunctionArea = (typeof FUNCTION_AREAS)[number];

/**
 * Checks on a number argument, each with the words its message uses.
 * 'any' takes every finite number; 'tol' is a tolerance as a fraction from 0 to 0.5 (0.1 for ±10 %: a value past
 * 0.5 is almost always a percentage typed as a number, 10 for 10 %); 'pf' is a power factor in (0, 1].
 */
export const ARG_RULES = {
  any: '',
  positive: 'must be greater than 0',
  nonNegative: 'must be 0 or more',
  tol: 'must be a fraction from 0 to 0.5 (0.1 or 10% for ±10 %)',
  pf: 'must be above 0 and at most 1',
} as const;
export type ArgRule = keyof typeof ARG_RULES;

function passes(rule: ArgRule, x: number): boolean {
  switch (rule) {
    case 'any':
      return true;
    case 'positive':
      return x > 0;
    case 'nonNegative':
      return x >= 0;
    case 'tol':
      return x >= 0 && x <= 0.5;
    case 'pf':
      return x > 0 && x <= 1;
  }
}

/** What an argument holds: a number (SI units, text like "4.7k" accepted), text, TRUE/FALSE, or a cell range. */
export type ArgKind = 'number' | 'text' | 'flag' | 'range';

export interface ArgSpec {
  name: string;
  /** SI unit symbol of a number argument ('' for a plain number); for other kinds, a word shown in help. */
  unit: string;
  kind?: ArgKind;
  rule?: ArgRule;
  optional?: boolean;
  /** Value used when an optional argument is left out; without one the computation receives `undefined`. */
  default?: number | string | boolean;
  /** Why the rule holds, added to its refusal ("RA = 0 shorts the discharge pin to the supply"). */
  why?: string;
  /** A number argument that, when above 0, may not exceed another one, named, with the reason given when it does. */
  notAbove?: { arg: string; why: string };
}

/** What a computation may return: a value, or an error value carrying its message. */
export type FnResult = number | string | boolean | CellError;

export interface FunctionSpec {
  name: string;
  area: FunctionArea;
  /** Unit of the result ('' for a plain number, 'text' for text). */
  returns: string;
  /** One line shown in the app while the formula is typed. */
  doc: string;
  args: readonly ArgSpec[];
  /**
   * Receives the arguments in order, already checked: numbers are finite and meet their rule, flags are booleans,
   * text is a string, ranges are SimpleRangeValue; an optional argument left out is its default or undefined.
   */
  compute: (...args: never[]) => FnResult;
}

/** Error value with our message, prefixed by the function name so a cell error says where it came from. */
export function fnError(fn: string, type: ErrorType, message: string): CellError {
  return new CellError(type, `${fn}: ${message}`);
}

/** Shorthands for the two error kinds most functions return. */
export function numError(fn: string, message: string): CellError {
  return fnError(fn, ErrorType.NUM, message);
}
export function valueError(fn: string, message: string): CellError {
  return fnError(fn, ErrorType.VALUE, message);
}

/** The plain number inside an engine value (dates, percentages and currency amounts carry it in `val`). */
export function plainNumber(x: unknown): number | undefined {
  if (typeof x === 'number') return x;
  if (typeof x === 'object' && x !== null && 'val' in x && typeof x.val === 'number') return x.val;
  return undefined;
}

function describe(x: unknown): string {
  if (typeof x === 'string') return `"${x}"`;
  if (typeof x === 'boolean') return x ? 'TRUE' : 'FALSE';
  return String(x);
}

function argLabel(arg: ArgSpec): string {
  return arg.unit && (arg.kind ?? 'number') === 'number' ? `${arg.name} (${arg.unit})` : arg.name;
}

/** Checks and converts one argument; returns the value for the computation or an error value. */
function checkArg(spec: FunctionSpec, arg: ArgSpec, raw: unknown): unknown {
  if (raw instanceof CellError) return raw;
  const kind = arg.kind ?? 'number';
  if (raw === undefined || raw === EmptyValue) {
    if (arg.optional) return arg.default;
    return valueError(spec.name, `${argLabel(arg)} is empty`);
  }
  if (kind === 'range') {
    return raw instanceof SimpleRangeValue ? raw : valueError(spec.name, `${arg.name} must be a range of cells`);
  }
  if (kind === 'flag') {
    return typeof raw === 'boolean' ? raw : valueError(spec.name, `${arg.name} must be TRUE or FALSE, got ${describe(raw)}`);
  }
  if (kind === 'text') return typeof raw === 'string' ? raw : String(plainNumber(raw) ?? raw);
  let x = plainNumber(raw);
  if (x === undefined && typeof raw === 'string') {
    // Text such as "0.47 uF" or "4k7" in a number argument is read as an engineering value in the argument's unit.
    const parsed = parseValue(raw, arg.unit);
    if (!parsed.ok) return valueError(spec.name, `${arg.name}: ${parsed.error}`);
    x = parsed.value;
  }
  if (x === undefined) return valueError(spec.name, `${argLabel(arg)} must be a number, got ${describe(raw)}`);
  if (!Number.isFinite(x)) return numError(spec.name, `${argLabel(arg)} is not a finite number`);
  const rule = arg.rule ?? 'any';
  if (!passes(rule, x)) return numError(spec.name, `${argLabel(arg)} ${ARG_RULES[rule]}, got ${x}${arg.why ? `: ${arg.why}` : ''}`);
  return x;
}

/** The first `notAbove` rule the checked arguments break, as an error value; undefined when none is broken. */
function relationError(spec: FunctionSpec, values: readonly unknown[]): CellError | undefined {
  for (let i = 0; i < spec.args.length; i++) {
    const arg = spec.args[i]!;
    if (!arg.notAbove) continue;
    const j = spec.args.findIndex((a) => a.name === arg.notAbove!.arg);
    const x = values[i];
    const limit = values[j];
    if (typeof x === 'number' && typeof limit === 'number' && x > 0 && x > limit) {
      return numError(spec.name, `${argLabel(arg)} ${x} exceeds ${argLabel(spec.args[j]!)} ${limit}: ${arg.notAbove.why}`);
    }
  }
  return undefined;
}

/** Checks every argument, runs the computation, and refuses a non-finite result. Never throws for bad input. */
export function callSpec(spec: FunctionSpec, raw: readonly unknown[]): FnResult {
  const values: unknown[] = [];
  for (let i = 0; i < spec.args.length; i++) {
    const v = checkArg(spec, spec.args[i]!, raw[i]);
    if (v instanceof CellError) return v;
    values.push(v);
  }
  const broken = relationError(spec, values);
  if (broken) return broken;
  const out = (spec.compute as (...a: unknown[]) => FnResult)(...values);
  if (typeof out === 'number' && !Number.isFinite(out)) {
    return numError(spec.name, 'the result is not a finite number; check the arguments');
  }
  return out;
}

function engineArgument(arg: ArgSpec): FunctionArgument {
  const kind = arg.kind ?? 'number';
  // Numbers are taken as SCALAR so that text like "4.7k" reaches checkArg and every message names the argument.
  const argumentType =
    kind === 'range'
      ? FunctionArgumentType.RANGE
      : kind === 'flag'
        ? FunctionArgumentType.BOOLEAN
        : kind === 'text'
          ? FunctionArgumentType.STRING
          : FunctionArgumentType.SCALAR;
  const out: FunctionArgument = { argumentType };
  if (arg.optional) {
    if (arg.default !== undefined) {
      out.defaultValue = arg.default;
      out.emptyAsDefault = true;
    } else {
      out.optionalArg = true;
    }
  }
  return out;
}

/** Engine-side parameters of one plugin, keyed by function name (the name is also the method name). */
export function implementedFunctions(specs: readonly FunctionSpec[]): ImplementedFunctions {
  const out: ImplementedFunctions = {};
  for (const spec of specs) out[spec.name] = { method: spec.name, parameters: spec.args.map(engineArgument) };
  return out;
}

type RunFunction = FunctionPlugin['runFunction'];
/** The engine's call shapes for a plugin method, taken from runFunction since the package does not export them. */
type PluginCall = { args: Parameters<RunFunction>[0] };
type PluginState = Parameters<RunFunction>[1];

/** Base of our plugins: lets the generated methods reach the engine's argument evaluation. */
abstract class RungbookPlugin extends FunctionPlugin {
  evaluateSpec(spec: FunctionSpec, ast: PluginCall, state: PluginState) {
    return this.runFunction(ast.args, state, this.metadata(spec.name), (...raw: unknown[]) => callSpec(spec, raw));
  }
}

/** Builds the function plugin of one area: a class whose methods are named like the functions they compute. */
export function buildPlugin(area: FunctionArea, specs: readonly FunctionSpec[]): FunctionPluginDefinition {
  const implemented = implementedFunctions(specs);
  class AreaPlugin extends RungbookPlugin {
    static override implementedFunctions = implemented;
  }
  for (const spec of specs) {
    if (spec.area !== area) throw new Error(`${spec.name} is declared in area ${spec.area}, not ${area}`);
    for (const a of spec.args) {
      if (a.notAbove && !spec.args.some((b) => b.name === a.notAbove!.arg)) throw new Error(`${spec.name}: ${a.name} is bounded by unknown argument ${a.notAbove.arg}`);
    }
    Object.defineProperty(AreaPlugin.prototype, spec.name, {
      value(this: RungbookPlugin, ast: PluginCall, state: PluginState) {
        return this.evaluateSpec(spec, ast, state);
      },
    });
  }
  Object.defineProperty(AreaPlugin, 'name', { value: `Rungbook_${area}_plugin` });
  return AreaPlugin;
}

/** Declares one function; `compute` is typed by the caller to match its argument kinds. */
export function defineFunction<A extends unknown[]>(
  spec: Omit<FunctionSpec, 'compute'> & { compute: (...args: A) => FnResult },
): FunctionSpec {
  return spec as unknown as FunctionSpec;
}
