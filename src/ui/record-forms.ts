// Form drafts for parts, suppliers and variants, and the pure checks that turn a draft into a record or into
// messages keyed by field (shown beside that field). No DOM here, so the rules are tested in Node.
import type { Book, NotebookPage, ParamValue, Part, PartKind, Settings, Supplier, Variant } from '../domain/book.ts';
import { PART_KINDS, mpnKey } from '../domain/book.ts';
import type * as v from 'valibot';
import { LIMITS, NotebookPageSchema, PART_VALUE_UNITS, PartSchema, SupplierSchema, VariantSchema, checkWith, isCurrencyCode, isPartValueUnit } from '../domain/schema.ts';
import { MAX_STEPS, PART_RATINGS, VARIANT_PARAMS, ownValue, paramNameProblem } from '../domain/params.ts';
import { formatValue, parseValue } from '../domain/units.ts';

/** Field name → message for that field. Empty when the draft is good. */
export type FieldProblems = Record<string, string>;

export type FormResult<R> = { ok: true; record: R } | { ok: false; problems: FieldProblems };

/** Unit of a part's principal value by kind, so "330n" on a capacitor means 330 nF. */
export const KIND_VALUE_UNITS: Partial<Record<PartKind, string>> = {
  resistor: 'Ω',
  capacitor: 'F',
  inductor: 'H',
  zener: 'V',
  fuse: 'A',
  varistor: 'V',
};

/** Shows a stored number for editing: engineering notation with the unit, or a plain number when unitless. */
export function valueText(value: number | undefined, unit: string): string {
  if (value === undefined) return '';
  if (unit === '') return String(value);
  return formatValue(value, unit, 6);
}

/**
 * Reads a number field. `unit` is the expected unit ('' for a plain number); a plain-number field also takes a
 * percentage ("10 %" → 0.1), as tolerances and power factors are often written that way.
 */
export function readNumber(text: string, unit: string): { ok: true; value: number } | { ok: false; error: string } {
  const t = text.trim();
  if (unit === '') {
    const pct = /^([+-]?(?:\d+\.?\d*|\.\d+))\s*%$/.exec(t);
    if (pct) return { ok: true, value: Number(pct[1]) / 100 };
  }
  const r = parseValue(t, unit);
  return r.ok ? { ok: true, value: r.value } : { ok: false, error: r.error };
}

const CODE_RE = /^[A-Za-z0-9][A-Za-z0-9._/-]*$/;

function required(problems: FieldProblems, field: string, text: string, label: string, max: number = LIMITS.name): string {
  const t = text.trim();
  if (t === '') problems[field] = `${label} is required`;
  else limitLength(problems, field, t, max);
  return t;
}

/** Notes a text longer than the Book's limit for it (LIMITS), so the form says so beside the field. */
export function limitLength(problems: FieldProblems, field: string, text: string, max: number): void {
  if (text.length > max && problems[field] === undefined) {
    problems[field] = `Too long: ${text.length.toLocaleString('en-GB')} characters; at most ${max.toLocaleString('en-GB')} are allowed`;
  }
}

/** Most lines an address printed on an order may have. */
export const ADDRESS_LINES = 8;

/**
 * Reads an address typed over several lines (a ship-to, a supplier's address): line breaks made plain, each line's
 * ends trimmed, empty lines at the ends dropped. Control characters other than line breaks, more than
 * ADDRESS_LINES lines or more than `max` characters give a problem beside the field.
 */
export function addressText(problems: FieldProblems, field: string, text: string, max: number = LIMITS.shortText): string {
  const lines = text.replace(/\r\n?/g, '\n').split('\n').map((l) => l.trim());
  while (lines.length > 0 && lines[0] === '') lines.shift();
  while (lines.length > 0 && lines[lines.length - 1] === '') lines.pop();
  const out = lines.join('\n');
  const control = /[\u0000-\u0009\u000B-\u001F\u007F]/.exec(out);
  if (control) problems[field] = `Holds a control character (U+${control[0].charCodeAt(0).toString(16).toUpperCase().padStart(4, '0')}); type the address as plain lines`;
  else if (lines.length > ADDRESS_LINES) problems[field] = `${lines.length} lines; an address may have at most ${ADDRESS_LINES}`;
  else limitLength(problems, field, out, max);
  return out;
}

/** The form field a schema problem belongs to: `ratings.v_max` → `rating:v_max`, `params.x` → `param:x`, else its first name. */
function formField(path: string): string {
  const [head = '', key] = path.split(/[.[\]"]+/).filter((x) => x !== '');
  if (key !== undefined && (head === 'ratings' || head === 'params')) return `${head === 'ratings' ? 'rating' : 'param'}:${key}`;
  return head || 'record';
}

/**
 * The last check of every form: the record as it would be saved, through the Book schema that reads it back. A
 * record the Book file reader would refuse is never saved; each problem is keyed by its form field.
 */
export function schemaFormResult<S extends v.GenericSchema, R>(
  schema: S,
  record: R,
  fieldOf: (path: string) => string = formField,
): FormResult<R> {
  const checked = checkWith(schema, record);
  if (checked.ok) return { ok: true, record };
  const problems: FieldProblems = {};
  // The id and revision are the caller's to give, not a field of the form.
  for (const p of checked.problems) if (p.path !== 'id' && p.path !== 'rev') problems[fieldOf(p.path)] ??= p.message;
  return Object.keys(problems).length ? { ok: false, problems } : { ok: true, record };
}

/**
 * Why a notebook page may not be saved as it is (a title, heading, text or cell beyond the Book's limits), in one
 * sentence naming the place, or undefined. The notebook page checks every change with it before saving.
 */
export function notebookPageProblem(page: NotebookPage): string | undefined {
  const checked = checkWith(NotebookPageSchema, page);
  if (checked.ok) return undefined;
  const p = checked.problems[0]!;
  const m = /^sections\[(\d+)\](?:\.(\w+))?(?:\[(\d+)\])?/.exec(p.path);
  const where = m
    ? `Section ${Number(m[1]) + 1}${m[2] === 'grid' && m[3] !== undefined ? `, grid row ${Number(m[3]) + 1}` : m[2] ? ` ${m[2]}` : ''}`
    : `The page ${p.path || 'record'}`;
  return `${where}: ${p.message}. Nothing was saved.`;
}

// ---------------------------------------------------------------------------------------------------------------
// Parts

export interface PartDraft {
  mpn: string;
  maker: string;
  description: string;
  kind: string;
  value: string;
  package: string;
  placements: string;
  notes: string;
  /** Rating name → text, for the ratings of PART_RATINGS. */
  ratings: Record<string, string>;
}

export function partDraft(part?: Part): PartDraft {
  const ratings: Record<string, string> = {};
  for (const r of PART_RATINGS) ratings[r.name] = valueText(part?.ratings[r.name], r.unit);
  return {
    mpn: part?.mpn ?? '',
    maker: part?.maker ?? '',
    description: part?.description ?? '',
    kind: part?.kind ?? '',
    value: part?.value === undefined ? '' : valueText(part.value, part.unit ?? ''),
    package: part?.package ?? '',
    placements: part?.placements === undefined ? '' : String(part.placements),
    notes: part?.notes ?? '',
    ratings,
  };
}

/** Validates a part draft against the Book; `editing` is the stored part being edited, absent for a new one. */
export function validatePart(draft: PartDraft, book: Book, editing?: Part, newId?: () => string): FormResult<Part> {
  const problems: FieldProblems = {};
  const mpn = required(problems, 'mpn', draft.mpn, 'Maker part number');
  if (mpn) {
    const key = mpnKey(mpn);
    const clash = book.parts.find((p) => p.id !== editing?.id && mpnKey(p.mpn) === key);
    if (clash) problems.mpn = `${clash.mpn} is already in the Book (part numbers are compared without case, spaces or dashes)`;
  }
  const maker = required(problems, 'maker', draft.maker, 'Maker');
  const description = required(problems, 'description', draft.description, 'Description', LIMITS.description);
  limitLength(problems, 'package', draft.package.trim(), LIMITS.name);
  limitLength(problems, 'notes', draft.notes.trim(), LIMITS.notes);
  const kind = draft.kind.trim();
  if (!(PART_KINDS as readonly string[]).includes(kind)) problems.kind = 'Choose a kind';

  let value: number | undefined;
  let unit: Part['unit'];
  if (draft.value.trim() !== '') {
    const expected = KIND_VALUE_UNITS[kind as PartKind];
    const r = parseValue(draft.value, expected);
    if (!r.ok) problems.value = r.error;
    else if (r.unit === '') problems.value = 'Give the unit too, for example 12 V or 2 A';
    else if (!isPartValueUnit(r.unit)) problems.value = `A part's value is in one of ${PART_VALUE_UNITS.join(', ')}, not ${r.unit}`;
    else {
      value = r.value;
      unit = r.unit;
    }
  }

  const ratings: Record<string, number> = {};
  // Ratings outside our list (from a file or an import) are kept as they were.
  for (const [name, v] of Object.entries(editing?.ratings ?? {})) {
    if (!PART_RATINGS.some((r) => r.name === name)) ratings[name] = v;
  }
  for (const r of PART_RATINGS) {
    const text = draft.ratings[r.name] ?? '';
    if (text.trim() === '') continue;
    const read = readNumber(text, r.unit);
    if (!read.ok) problems[`rating:${r.name}`] = read.error;
    else ratings[r.name] = read.value;
  }

  let placements: number | undefined;
  if (draft.placements.trim() !== '') {
    const n = Number(draft.placements.trim());
    if (!Number.isInteger(n) || n < 0) problems.placements = 'A whole number, 0 or more';
    else placements = n;
  }

  if (Object.keys(problems).length > 0) return { ok: false, problems };
  const record: Part = {
    id: editing?.id ?? (newId ?? (() => ''))(),
    rev: editing?.rev ?? 0,
    mpn,
    maker,
    description,
    kind: kind as PartKind,
    ratings,
    package: draft.package.trim(),
  };
  if (value !== undefined) {
    record.value = value;
    record.unit = unit;
  }
  if (placements !== undefined) record.placements = placements;
  if (draft.notes.trim() !== '') record.notes = draft.notes.trim();
  return schemaFormResult(PartSchema, record);
}

// ---------------------------------------------------------------------------------------------------------------
// Suppliers

export interface SupplierDraft {
  name: string;
  currency: string;
  /** Units of the Book's base currency for one unit of `currency`. */
  rate: string;
  notes: string;
  /** The supplier's order address, several lines; printed on our orders to them. */
  address: string;
  paymentTerms: string;
  // Landed cost (domain/landed.ts): amounts per order with their currency, and percentages of the goods' value.
  freightPerOrder: string;
  freightCurrency: string;
  freightPct: string;
  dutyPct: string;
  chargesPerOrder: string;
  chargesCurrency: string;
  chargesPct: string;
}

const numText = (n: number | undefined): string => (n === undefined ? '' : String(n));

export function supplierDraft(settings: Settings, supplier?: Supplier): SupplierDraft {
  const currency = supplier?.currency ?? settings.baseCurrency;
  const rate = settings.rates[currency];
  return {
    name: supplier?.name ?? '',
    currency,
    rate: currency === settings.baseCurrency ? '1' : rate === undefined ? '' : String(rate),
    notes: supplier?.notes ?? '',
    address: supplier?.address ?? '',
    paymentTerms: supplier?.paymentTerms ?? '',
    freightPerOrder: numText(supplier?.freightPerOrder?.amount),
    freightCurrency: supplier?.freightPerOrder?.currency ?? '',
    freightPct: numText(supplier?.freightPct),
    dutyPct: numText(supplier?.dutyPct),
    chargesPerOrder: numText(supplier?.chargesPerOrder?.amount),
    chargesCurrency: supplier?.chargesPerOrder?.currency ?? '',
    chargesPct: numText(supplier?.chargesPct),
  };
}

/** Reads an optional number field of the landed terms: empty is none; else a number from 0 to `max`. */
function optionalAmount(problems: FieldProblems, field: string, text: string, max: number, what: string): number | undefined {
  const t = text.trim().replace(/\s*%$/, '').replace(',', '.');
  if (t === '') return undefined;
  const n = /^\d+(?:\.\d+)?$/.test(t) ? Number(t) : NaN;
  if (!Number.isFinite(n)) problems[field] = `${what}: a number ≥ 0, or empty for none; not “${text.trim()}”`;
  else if (n > max) problems[field] = `${what}: at most ${max.toLocaleString('en-GB')}`;
  else return n;
  return undefined;
}

/**
 * The landed terms of a supplier draft: an amount per order takes its currency (default `fallback`), which the
 * Book must have a rate for (or the rate this same form gives for the supplier's currency).
 */
function landedTerms(draft: SupplierDraft, book: Book, problems: FieldProblems, supplierCurrency: string, newRate: boolean): Partial<Supplier> {
  const out: Partial<Supplier> = {};
  const rated = (c: string): boolean => c === book.settings.baseCurrency || book.settings.rates[c] !== undefined || (newRate && c === supplierCurrency);
  const perOrder = (amountField: 'freightPerOrder' | 'chargesPerOrder', currencyField: 'freightCurrency' | 'chargesCurrency', fallback: string, what: string) => {
    const amount = optionalAmount(problems, amountField, draft[amountField], LIMITS.price, what);
    if (amount === undefined || amount === 0) return undefined;
    const c = draft[currencyField].trim().toUpperCase() || fallback;
    if (!isCurrencyCode(c)) problems[currencyField] = 'Three letters, as in ISO 4217 (EUR, USD, GBP…)';
    else if (!rated(c)) problems[currencyField] = `The Book has no rate for ${c}; add it in the settings first`;
    else return { amount, currency: c };
    return undefined;
  };
  const freight = perOrder('freightPerOrder', 'freightCurrency', supplierCurrency, 'Freight per order');
  const charges = perOrder('chargesPerOrder', 'chargesCurrency', book.settings.baseCurrency, 'Charges per order');
  const pct = (f: 'freightPct' | 'dutyPct' | 'chargesPct', what: string) => optionalAmount(problems, f, draft[f], LIMITS.landedPct, what);
  const freightPct = pct('freightPct', 'Freight %');
  const dutyPct = pct('dutyPct', 'Duty %');
  const chargesPct = pct('chargesPct', 'Charges %');
  if (freight) out.freightPerOrder = freight;
  if (freightPct !== undefined) out.freightPct = freightPct;
  if (dutyPct !== undefined) out.dutyPct = dutyPct;
  if (charges) out.chargesPerOrder = charges;
  if (chargesPct !== undefined) out.chargesPct = chargesPct;
  return out;
}

export interface SupplierResult {
  record: Supplier;
  /** New settings when the exchange rate is new or changed; absent when the settings stay as they are. */
  settings?: Settings;
}

export function validateSupplier(
  draft: SupplierDraft,
  book: Book,
  editing?: Supplier,
  newId?: () => string,
): FormResult<SupplierResult> {
  const problems: FieldProblems = {};
  const name = required(problems, 'name', draft.name, 'Name');
  if (name) {
    const clash = book.suppliers.find((s) => s.id !== editing?.id && s.name.trim().toLowerCase() === name.toLowerCase());
    if (clash) problems.name = `A supplier named ${clash.name} is already in the Book`;
  }
  limitLength(problems, 'notes', draft.notes.trim(), LIMITS.notes);
  const address = addressText(problems, 'address', draft.address);
  const paymentTerms = draft.paymentTerms.trim();
  if (/[\r\n]/.test(paymentTerms)) problems.paymentTerms = 'One line, as it is printed on the order (for example “30 days net”)';
  else limitLength(problems, 'paymentTerms', paymentTerms, LIMITS.name);
  const currency = draft.currency.trim().toUpperCase();
  if (!isCurrencyCode(currency)) problems.currency = 'Three letters, as in ISO 4217 (EUR, USD, GBP…)';
  const base = book.settings.baseCurrency;
  let rate: number | undefined;
  if (isCurrencyCode(currency) && currency !== base) {
    const t = draft.rate.trim();
    const n = t === '' ? NaN : Number(t);
    if (t === '') problems.rate = `Give how many ${base} one ${currency} is worth`;
    else if (!Number.isFinite(n) || n <= 0) problems.rate = `A positive number of ${base} for one ${currency}`;
    else if (n > LIMITS.rate) problems.rate = `At most ${LIMITS.rate.toLocaleString('en-GB')} ${base} for one ${currency}`;
    else rate = n;
  }
  const landed = landedTerms(draft, book, problems, currency, rate !== undefined);
  if (Object.keys(problems).length > 0) return { ok: false, problems };
  const record: Supplier = {
    id: editing?.id ?? (newId ?? (() => ''))(),
    rev: editing?.rev ?? 0,
    name,
    currency,
    notes: draft.notes.trim(),
    ...landed,
  };
  if (address !== '') record.address = address;
  if (paymentTerms !== '') record.paymentTerms = paymentTerms;
  if (editing?.mapping) record.mapping = editing.mapping;
  const checked = schemaFormResult(SupplierSchema, record);
  if (!checked.ok) return checked;
  const result: SupplierResult = { record };
  if (rate !== undefined && book.settings.rates[currency] !== rate) {
    result.settings = { ...book.settings, rates: { ...book.settings.rates, [currency]: rate } };
  }
  return { ok: true, record: result };
}

// ---------------------------------------------------------------------------------------------------------------
// Variants

export interface VariantDraft {
  code: string;
  name: string;
  notes: string;
  /** Parameter name → text; an empty text removes the parameter. */
  params: Record<string, string>;
  /** A parameter of the Book's own to add. */
  newParamName: string;
  newParamValue: string;
}

/** Parameters shown as columns and form fields: the standard ones in their order, then the Book's own. */
export function paramNames(book: Book): string[] {
  const names: string[] = VARIANT_PARAMS.map((p) => p.name);
  const seen = new Set(names);
  for (const v of book.variants) {
    for (const name of Object.keys(v.params)) {
      if (!seen.has(name)) {
        seen.add(name);
        names.push(name);
      }
    }
  }
  // Ladder resistors beyond r_s1 are standard too; list the ones in use right after r_s1.
  const ladder = names.filter((n) => /^r_s[2-9]$/.test(n)).sort();
  const rest = names.filter((n) => !/^r_s[2-9]$/.test(n));
  const at = rest.indexOf('r_s1') + 1;
  return [...rest.slice(0, at), ...ladder, ...rest.slice(at)];
}

/** The unit and kind of a parameter: standard ones from VARIANT_PARAMS, ladder resistors as ohms, else by value. */
export function paramInfo(name: string, sample?: ParamValue): { unit: string; kind: 'number' | 'text' } {
  const std = VARIANT_PARAMS.find((p) => p.name === name);
  if (std) return { unit: std.unit, kind: std.kind };
  if (/^r_s[1-9]$/.test(name)) return { unit: 'Ω', kind: 'number' };
  return { unit: '', kind: typeof sample === 'string' ? 'text' : 'number' };
}

export function paramText(name: string, value: ParamValue | undefined): string {
  if (value === undefined) return '';
  if (typeof value === 'string') return value;
  return valueText(value, paramInfo(name, value).unit);
}

export function variantDraft(book: Book, variant?: Variant): VariantDraft {
  const params: Record<string, string> = {};
  for (const name of paramNames(book)) params[name] = paramText(name, ownValue(variant?.params, name));
  return {
    code: variant?.code ?? '',
    name: variant?.name ?? '',
    notes: variant?.notes ?? '',
    params,
    newParamName: '',
    newParamValue: '',
  };
}

/** A parameter value typed by hand: a number where it reads as one, else text (refused if it looks numeric). */
function readOwnParam(text: string): { ok: true; value: ParamValue } | { ok: false; error: string } {
  const t = text.trim();
  if (/^[+\-−.]?\d/.test(t)) {
    const r = readNumber(t, '');
    if (r.ok) return r;
    const withUnit = parseValue(t);
    return withUnit.ok ? { ok: true, value: withUnit.value } : { ok: false, error: withUnit.error };
  }
  return { ok: true, value: t };
}

export function validateVariant(draft: VariantDraft, book: Book, editing?: Variant, newId?: () => string): FormResult<Variant> {
  const problems: FieldProblems = {};
  const code = required(problems, 'code', draft.code, 'Code');
  if (code) {
    if (!CODE_RE.test(code) || code.length > 32) {
      problems.code = 'Letters, digits and . _ / - only, no spaces, at most 32 characters';
    } else {
      const clash = book.variants.find((v) => v.id !== editing?.id && v.code.toLowerCase() === code.toLowerCase());
      if (clash) problems.code = `The code ${clash.code} is already used by ${clash.name || 'another variant'}`;
    }
  }
  const name = required(problems, 'name', draft.name, 'Name');
  limitLength(problems, 'notes', draft.notes.trim(), LIMITS.notes);

  const params: Record<string, ParamValue> = {};
  for (const [pname, text] of Object.entries(draft.params)) {
    const t = text.trim();
    if (t === '') continue;
    const info = paramInfo(pname, ownValue(editing?.params, pname));
    if (info.kind === 'text') {
      params[pname] = t;
      continue;
    }
    const own = !VARIANT_PARAMS.some((p) => p.name === pname) && !/^r_s[1-9]$/.test(pname);
    const r = own ? readOwnParam(t) : readNumber(t, info.unit);
    if (!r.ok) {
      problems[`param:${pname}`] = r.error;
      continue;
    }
    params[pname] = r.value;
  }
  const steps = params.steps;
  if (typeof steps === 'number' && (!Number.isInteger(steps) || steps < 1 || steps > MAX_STEPS)) {
    problems['param:steps'] = `A whole number from 1 to ${MAX_STEPS}`;
  }
  for (const f of ['mains_tol', 'c_drop_tol'] as const) {
    const v = params[f];
    if (typeof v === 'number' && (v < 0 || v >= 1)) problems[`param:${f}`] = 'A fraction from 0 to below 1 (0.1 or 10 %)';
  }
  const pf = params.pf;
  if (typeof pf === 'number' && (pf <= 0 || pf > 1)) problems['param:pf'] = 'A power factor above 0, at most 1';
  for (const f of ['load_w', 'mains_v', 'mains_hz'] as const) {
    const v = params[f];
    if (typeof v === 'number' && v <= 0) problems[`param:${f}`] = 'Must be above zero';
  }

  const newName = draft.newParamName.trim();
  const newText = draft.newParamValue.trim();
  if (newName !== '' || newText !== '') {
    const nameProblem = paramNameProblem(newName);
    if (nameProblem !== undefined) {
      problems.newParamName = nameProblem;
    } else if (Object.hasOwn(draft.params, newName)) {
      problems.newParamName = `${newName} is already a parameter; fill in its own field`;
    } else if (newText === '') {
      problems.newParamValue = 'Give a value for the new parameter';
    } else {
      const r = readOwnParam(newText);
      if (!r.ok) problems.newParamValue = r.error;
      else params[newName] = r.value;
    }
  }

  if (Object.keys(problems).length > 0) return { ok: false, problems };
  const record: Variant = {
    id: editing?.id ?? (newId ?? (() => ''))(),
    rev: editing?.rev ?? 0,
    code,
    name,
    params,
  };
  if (draft.notes.trim() !== '') record.notes = draft.notes.trim();
  // A parameter typed as a new one is keyed by its own field.
  return schemaFormResult(VariantSchema, record, (path) => {
    const f = formField(path);
    return f === `param:${newName}` && newName !== '' ? 'newParamValue' : f;
  });
}

// ---------------------------------------------------------------------------------------------------------------
// What stops a delete

/** Records that refer to a part, supplier or variant; a delete is refused while any remain. */
export function partUsers(book: Book, partId: string): string | undefined {
  const quotes = book.quotes.filter((q) => q.partId === partId).length;
  const lines = book.buildLines.filter((l) => l.partId === partId).length;
  const moves = book.stockMoves.filter((m) => m.partId === partId).length;
  const orders = book.orders.filter((o) => o.lines.some((l) => l.partId === partId)).length;
  return usersText([
    [quotes, 'quote'],
    [lines, 'build line'],
    [moves, 'stock movement'],
    [orders, 'order'],
  ]);
}

export function supplierUsers(book: Book, supplierId: string): string | undefined {
  const quotes = book.quotes.filter((q) => q.supplierId === supplierId).length;
  const lines = book.buildLines.filter((l) => l.pinnedSupplierId === supplierId).length;
  const batches = book.importBatches.filter((b) => b.supplierId === supplierId).length;
  const orders = book.orders.filter((o) => o.supplierId === supplierId).length;
  return usersText([
    [quotes, 'quote'],
    [lines, 'build line pinned to it'],
    [batches, 'import batch'],
    [orders, 'order'],
  ]);
}

export function variantUsers(book: Book, variantId: string): string | undefined {
  return usersText([[book.runs.filter((r) => r.variantId === variantId).length, 'run']]);
}

/** A run whose parts were issued keeps its movements: deleting it would leave them pointing at nothing. */
export function runUsers(book: Book, runId: string): string | undefined {
  return usersText([[book.stockMoves.filter((m) => m.runId === runId).length, 'stock movement']]);
}

function usersText(counts: [number, string][]): string | undefined {
  const parts = counts.filter(([n]) => n > 0).map(([n, what]) => `${n} ${plural(what, n)}`);
  return parts.length ? `Still used by ${parts.join(' and ')}; remove or change those first.` : undefined;
}

function plural(what: string, n: number): string {
  if (n === 1) return what;
  if (what === 'import batch') return 'import batches';
  if (what === 'build line pinned to it') return 'build lines pinned to it';
  return `${what}s`;
}
