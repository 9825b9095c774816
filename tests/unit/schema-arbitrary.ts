// Turns the Book's valibot schema objects into fast-check arbitraries by walking them at runtime (object entries,
// optional keys, picklists, literals, unions, arrays, strings with their length and pattern rules, numbers kept to
// what the schema accepts, the keyed maps of user names), and lists the optional fields a schema declares, so a
// fixture can be checked to set each of them. Only the shapes the Book schema uses are handled.
import fc from 'fast-check';
import * as v from 'valibot';
import { isIsoDate, isIsoTime } from '../../src/domain/dates.ts';
import { RESERVED_NAMES, isCurrencyCode } from '../../src/domain/schema.ts';

/** A schema or pipe action as seen at runtime. */
export interface Node {
  kind: string;
  type: string;
  pipe?: readonly Node[];
  entries?: Record<string, Node>;
  wrapped?: Node;
  options?: readonly unknown[];
  item?: Node;
  literal?: unknown;
  requirement?: unknown;
}

/** The schemas and actions of a (possibly nested) pipe, flattened in order. */
export function flatten(schema: Node): { schemas: Node[]; actions: Node[] } {
  if (!schema.pipe) return { schemas: [schema], actions: [] };
  const schemas: Node[] = [];
  const actions: Node[] = [];
  for (const item of schema.pipe) {
    if (item.kind === 'schema') {
      const inner = flatten(item);
      schemas.push(...inner.schemas);
      actions.push(...inner.actions);
    } else actions.push(item);
  }
  return { schemas, actions };
}

/** The schema that gives a pipe its shape: the last one that is not a bare `custom` guard. */
export function main(schema: Node): Node {
  const { schemas } = flatten(schema);
  return [...schemas].reverse().find((s) => s.type !== 'custom') ?? schemas[0]!;
}

/** A keyed map of user names: a `custom` object guard whose pipe rebuilds the map (raw_transform). */
function isKeyedMap(schema: Node): boolean {
  const { schemas, actions } = flatten(schema);
  return schemas.every((s) => s.type === 'custom') && actions.some((a) => a.type === 'raw_transform');
}

const TEXT_MAX = 10;
const LIST_MAX = 3;

/** Characters that stress a text round trip: quotes, escapes, line breaks, NUL, non-Latin, astral, lone surrogates. */
const UNIT = fc.oneof(
  { weight: 6, arbitrary: fc.constantFrom('a', 'Z', '0', ' ', '_', '-') },
  { weight: 2, arbitrary: fc.constantFrom('"', '\\', '\n', '\t', '\u0000', '\u2028', 'Ω', 'µ', '°', '€', '😀', '\ud800', '\udfff') },
  { weight: 2, arbitrary: fc.integer({ min: 0, max: 0x10ffff }).map((cp) => String.fromCodePoint(cp)) },
);

export const shortText = (maxLength = TEXT_MAX): fc.Arbitrary<string> => fc.string({ unit: UNIT, maxLength });

const isoDate = fc
  .date({ min: new Date('1990-01-01T00:00:00Z'), max: new Date('2099-12-31T23:59:59Z'), noInvalidDate: true })
  .map((d) => d.toISOString().slice(0, 10));
const isoTime = fc.date({ min: new Date('1990-01-01T00:00:00Z'), max: new Date('2099-12-31T23:59:59Z'), noInvalidDate: true }).map((d) => d.toISOString());

/** Numbers of every kind the Book holds (counts, fractions, prices, SI values); each field keeps those it accepts. */
const NUMBER = fc
  .oneof(
    fc.integer({ min: 1, max: 1000 }),
    fc.integer({ min: -1000, max: 1000 }),
    fc.double({ min: 0, max: 1, maxExcluded: true, noNaN: true }),
    fc.double({ min: -1e6, max: 1e6, noNaN: true, noDefaultInfinity: true }),
    fc.constantFrom(1e-12, 0.47e-6, 47_000, 1e9, 1e15, 0.1 + 0.2),
  )
  // A negative zero is written to JSON as 0; no Book quantity means anything by its sign at zero.
  .map((x) => x + 0);

const currencyCode = fc.stringMatching(/^[A-Z]{3}$/);

/**
 * Text kept by a field's checks. fast-check draws again until a value passes, so a check that odd text seldom passes
 * (three capital letters, a date) would draw thousands of times per value: such a check needs a generator of its
 * own above, and the walker says so when it meets one rather than slowing every property to a crawl.
 */
function keptOften(base: fc.Arbitrary<string>, checks: readonly ((x: string) => boolean)[]): fc.Arbitrary<string> {
  const passes = (x: string): boolean => checks.every((c) => c(x));
  const kept = fc.sample(base, { numRuns: 200, seed: 1 }).filter(passes).length;
  if (kept < 40) throw new Error(`the schema walker needs a generator for text checked by ${checks.map((c) => c.name || 'a check').join(', ')}: only ${kept} of 200 drawn texts pass`);
  return base.filter(passes);
}

/** A name that may key a user's map: short identifiers, currency codes, and odd text; never a reserved name. */
const KEY = fc
  .oneof(fc.stringMatching(/^[a-z_][a-z0-9_]{0,7}$/), fc.stringMatching(/^[A-Z]{3}$/), shortText(6).filter((k) => k !== ''))
  .filter((k) => !RESERVED_NAMES.has(k));

const cache = new WeakMap<Node, fc.Arbitrary<unknown>>();

/** An arbitrary of inputs shaped by `schema`; most pass it, and a final check keeps those that do. */
export function arbitraryOf(schema: Node): fc.Arbitrary<unknown> {
  let arb = cache.get(schema);
  if (!arb) {
    arb = build(schema);
    cache.set(schema, arb);
  }
  return arb;
}

function build(schema: Node): fc.Arbitrary<unknown> {
  const whole = schema as unknown as v.GenericSchema;
  if (isKeyedMap(schema)) {
    const value = fc.oneof(NUMBER, shortText());
    // Entries are kept one by one where the map takes them (its names and values have their own rules).
    return fc
      .dictionary(KEY, value, { maxKeys: LIST_MAX, noNullPrototype: true })
      .map((d) => Object.fromEntries(Object.entries(d).filter(([k, x]) => v.is(whole, { [k]: x }))));
  }
  const { actions } = flatten(schema);
  const s = main(schema);
  const maxLength = actions.find((a) => a.type === 'max_length')?.requirement as number | undefined;
  switch (s.type) {
    case 'object': {
      const entries = s.entries!;
      const model: Record<string, fc.Arbitrary<unknown>> = {};
      const requiredKeys: string[] = [];
      for (const [k, e] of Object.entries(entries)) {
        if (e.type === 'optional') model[k] = arbitraryOf(e.wrapped!);
        else {
          model[k] = arbitraryOf(e);
          requiredKeys.push(k);
        }
      }
      return fc.record(model, { requiredKeys, noNullPrototype: true });
    }
    case 'optional':
      return fc.option(arbitraryOf(s.wrapped!), { nil: undefined });
    case 'array':
      return fc.array(arbitraryOf(s.item!), { maxLength: Math.min(maxLength ?? LIST_MAX, LIST_MAX) });
    case 'string': {
      const pattern = actions.find((a) => a.type === 'regex')?.requirement as RegExp | undefined;
      if (pattern) return fc.stringMatching(pattern);
      const checks = actions.filter((a) => a.type === 'check').map((a) => a.requirement as (x: string) => boolean);
      if (checks.includes(isIsoDate)) return isoDate;
      if (checks.includes(isIsoTime)) return isoTime;
      if (checks.includes(isCurrencyCode)) return currencyCode;
      const base = shortText(Math.min(maxLength ?? TEXT_MAX, TEXT_MAX));
      return checks.length ? keptOften(base, checks) : base;
    }
    case 'number':
      return NUMBER.filter((x) => v.is(whole, x));
    case 'boolean':
      return fc.boolean();
    case 'picklist':
      return fc.constantFrom(...(s.options as unknown[]));
    case 'literal':
      return fc.constant(s.literal);
    case 'union':
      return fc.oneof(...(s.options as Node[]).map(arbitraryOf));
    default:
      throw new Error(`the schema walker does not know a "${s.type}" schema`);
  }
}

/**
 * Every optional field a schema declares, as a path (`runs[].frozen.snapshot.quotes[].batchId`), with whether some
 * value in `data` sets it. Keyed maps and unions are leaves.
 */
export function optionalFieldsSet(schema: Node, data: unknown, path = '', out = new Map<string, boolean>()): Map<string, boolean> {
  if (isKeyedMap(schema)) return out;
  const s = main(schema);
  if (s.type === 'optional') return optionalFieldsSet(s.wrapped!, data, path, out);
  if (s.type === 'array') {
    const items = Array.isArray(data) ? data : [];
    if (items.length === 0) optionalFieldsSet(s.item!, undefined, `${path}[]`, out);
    for (const x of items) optionalFieldsSet(s.item!, x, `${path}[]`, out);
    return out;
  }
  if (s.type === 'object') {
    const obj = (typeof data === 'object' && data !== null ? data : {}) as Record<string, unknown>;
    for (const [k, e] of Object.entries(s.entries!)) {
      const at = path ? `${path}.${k}` : k;
      if (e.type === 'optional') out.set(at, (out.get(at) ?? false) || obj[k] !== undefined);
      optionalFieldsSet(e, obj[k], at, out);
    }
  }
  return out;
}
