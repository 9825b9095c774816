// The `.rungbook.json` Book file: our own versioned format. Writing is stable (fixed key order, 2-space indent);
// reading validates everything first and returns either a restored Book or the first problems, each with its path.
import {
  BOOK_FORMAT,
  BOOK_VERSION,
  CHECK_RULE_KINDS,
  COLLECTIONS,
  COST_CATEGORIES,
  defaultSettings,
  PART_KINDS,
} from '../domain/book.ts';
import type {
  Book,
  BuildLine,
  Check,
  CollectionName,
  ColumnMapping,
  ImportBatch,
  NotebookPage,
  NotebookSection,
  ParamValue,
  Part,
  PriceBreak,
  Quote,
  Run,
  Settings,
  Supplier,
  Variant,
} from '../domain/book.ts';

export const BOOK_FILE_EXTENSION = '.rungbook.json';
/** Largest Book file accepted. A Book of a few thousand quotes is well under 5 MB. */
export const MAX_BOOK_FILE_BYTES = 20 * 1024 * 1024;
/** How many problems a rejected file reports (the rest are counted). */
export const MAX_REPORTED_PROBLEMS = 20;
/** Unit symbols a part's principal value may carry. */
export const PART_VALUE_UNITS = ['Ω', 'F', 'V', 'H', 'A', 'W', 'Hz', 's', 'K/W', '°C'] as const;

export interface BookFileProblem {
  /** Where in the file: `quotes[3].breaks[1].qty`; empty for the file as a whole. */
  path: string;
  message: string;
}

export type BookFileResult =
  | { ok: true; book: Book; savedAt?: string }
  | { ok: false; problems: BookFileProblem[]; /** All problems found, of which the first are listed. */ total: number };

// ---------------------------------------------------------------------------------------------------------------
// Writing

/** The Book as file text: top-level keys in a fixed order, record keys `id`, `rev` first and the rest sorted. */
export function serializeBook(book: Book, opts: { savedAt?: string } = {}): string {
  const top: Record<string, unknown> = {
    format: BOOK_FORMAT,
    version: BOOK_VERSION,
    savedAt: opts.savedAt ?? new Date().toISOString(),
    settings: ordered(book.settings),
  };
  for (const c of COLLECTIONS) top[c] = book[c].map(ordered);
  return JSON.stringify(top, null, 2) + '\n';
}

const FIRST_KEYS = ['id', 'rev'];

function ordered(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(ordered);
  if (typeof value !== 'object' || value === null) return value;
  const obj = value as Record<string, unknown>;
  const keys = Object.keys(obj)
    .filter((k) => obj[k] !== undefined)
    .sort((a, b) => {
      const ia = FIRST_KEYS.indexOf(a);
      const ib = FIRST_KEYS.indexOf(b);
      if (ia >= 0 || ib >= 0) return (ia < 0 ? 99 : ia) - (ib < 0 ? 99 : ib);
      return a < b ? -1 : a > b ? 1 : 0;
    });
  const out: Record<string, unknown> = {};
  for (const k of keys) out[k] = ordered(obj[k]);
  return out;
}

/** Suggested file name for a Book: its name reduced to safe characters. */
export function bookFileName(book: Book): string {
  const base = book.settings.bookName.trim().toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '');
  return `${base || 'book'}${BOOK_FILE_EXTENSION}`;
}

// ---------------------------------------------------------------------------------------------------------------
// Reading

/** A size check to run before reading a file at all (the CLI and the app know the size up front). */
export function bookFileSizeProblem(bytes: number): BookFileProblem | undefined {
  if (bytes <= MAX_BOOK_FILE_BYTES) return undefined;
  return {
    path: '',
    message: `the file is ${(bytes / 1024 / 1024).toFixed(1)} MB; a Book file may be at most ${MAX_BOOK_FILE_BYTES / 1024 / 1024} MB, so this is not a Book file`,
  };
}

/** Reads Book file text. Never throws: any input gives a Book or a list of problems. */
export function parseBookFile(text: string): BookFileResult {
  if (typeof text !== 'string') return fail([{ path: '', message: 'the file could not be read as text' }]);
  // A UTF-16 code unit is at least one byte in the file, so more units than the byte limit means too many bytes.
  const tooBig = text.length > MAX_BOOK_FILE_BYTES ? bookFileSizeProblem(text.length) : undefined;
  if (tooBig) return fail([tooBig]);
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const start = body.search(/\S/);
  if (start < 0) return fail([{ path: '', message: 'the file is empty' }]);
  if (body[start] !== '{') {
    return fail([{ path: '', message: 'this is not a Rungbook Book file: a Book file is a JSON object, starting with "{"' }]);
  }
  let raw: unknown;
  try {
    raw = JSON.parse(body);
  } catch {
    return fail([jsonProblem(body)]);
  }
  return restoreBook(raw);
}

function fail(problems: BookFileProblem[], total = problems.length): BookFileResult {
  return { ok: false, problems: problems.slice(0, MAX_REPORTED_PROBLEMS), total };
}

/** Validates parsed JSON and restores it into a Book, filling defaults for optional fields. */
export function restoreBook(raw: unknown): BookFileResult {
  if (!isObject(raw)) return fail([{ path: '', message: 'this is not a Rungbook Book file: it is not a JSON object' }]);
  if (raw.format !== BOOK_FORMAT) {
    const found = raw.format === undefined ? 'has no "format" marker' : `has "format": ${short(raw.format)}`;
    return fail([{ path: 'format', message: `this is not a Rungbook Book file: it ${found}, expected "${BOOK_FORMAT}"` }]);
  }
  const version = raw.version;
  if (typeof version !== 'number' || !Number.isInteger(version) || version < 1) {
    return fail([{ path: 'version', message: `the Book file version must be a whole number from 1, not ${short(version)}` }]);
  }
  if (version > BOOK_VERSION) {
    return fail([
      {
        path: 'version',
        message: `this Book file was written by a newer Rungbook (version ${version}); this one reads up to ${BOOK_VERSION}`,
      },
    ]);
  }

  const ctx = new Problems();
  const top = new Reader(ctx, raw, '');
  const savedAt = top.optTime('savedAt');
  const settings = restoreSettings(ctx, raw.settings);
  const book: Book = {
    format: BOOK_FORMAT,
    version: BOOK_VERSION,
    settings,
    parts: list(ctx, raw, 'parts', restorePart),
    suppliers: list(ctx, raw, 'suppliers', restoreSupplier),
    quotes: list(ctx, raw, 'quotes', restoreQuote),
    variants: list(ctx, raw, 'variants', restoreVariant),
    buildLines: list(ctx, raw, 'buildLines', restoreBuildLine),
    checks: list(ctx, raw, 'checks', restoreCheck),
    runs: list(ctx, raw, 'runs', restoreRun),
    importBatches: list(ctx, raw, 'importBatches', restoreBatch),
    pages: list(ctx, raw, 'pages', restorePage),
  };
  crossCheck(ctx, book);
  if (ctx.total > 0) return fail(ctx.list, ctx.total);
  return savedAt === undefined ? { ok: true, book } : { ok: true, book, savedAt };
}

// ---------------------------------------------------------------------------------------------------------------
// Problems and field readers

class Problems {
  readonly list: BookFileProblem[] = [];
  total = 0;
  add(path: string, message: string): void {
    this.total++;
    if (this.list.length < MAX_REPORTED_PROBLEMS) this.list.push({ path, message });
  }
}

function isObject(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

function kindOf(v: unknown): string {
  if (v === null) return 'null';
  if (Array.isArray(v)) return 'a list';
  switch (typeof v) {
    case 'string':
      return 'text';
    case 'number':
      return 'a number';
    case 'boolean':
      return 'true/false';
    case 'object':
      return 'an object';
    default:
      return typeof v;
  }
}

/** A value quoted for a message, cut short so a huge value cannot flood the report. */
function short(v: unknown): string {
  let s: string;
  try {
    s = JSON.stringify(v) ?? String(v);
  } catch {
    s = String(v);
  }
  return s.length > 40 ? `${s.slice(0, 37)}…` : s;
}

const IDENT = /^[A-Za-z_$][A-Za-z0-9_$]*$/;
function join(path: string, key: string | number): string {
  if (typeof key === 'number') return `${path}[${key}]`;
  if (!IDENT.test(key)) return `${path}[${JSON.stringify(key)}]`;
  return path ? `${path}.${key}` : key;
}

const CURRENCY = /^[A-Z]{3}$/;
const DATE = /^(\d{4})-(\d{2})-(\d{2})$/;
const TIME = /^(\d{4})-(\d{2})-(\d{2})(?:T(\d{2}):(\d{2})(?::(\d{2})(?:\.\d{1,9})?)?(?:Z|[+-]\d{2}:\d{2})?)?$/;

function validDay(y: number, m: number, d: number): boolean {
  if (m < 1 || m > 12 || d < 1) return false;
  const days = [31, y % 4 === 0 && (y % 100 !== 0 || y % 400 === 0) ? 29 : 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];
  return d <= days[m - 1]!;
}

export function isIsoDate(s: string): boolean {
  const m = DATE.exec(s);
  return m !== null && validDay(+m[1]!, +m[2]!, +m[3]!);
}

export function isIsoTime(s: string): boolean {
  const m = TIME.exec(s);
  if (!m || !validDay(+m[1]!, +m[2]!, +m[3]!)) return false;
  if (m[4] !== undefined && (+m[4] > 23 || +m[5]! > 59 || (m[6] !== undefined && +m[6] > 59))) return false;
  return true;
}

interface NumRule {
  min?: number;
  /** Value must be above `min`, not equal to it. */
  above?: boolean;
  /** Value must be below this. */
  below?: number;
  integer?: boolean;
}

function numProblem(v: number, rule: NumRule): string | undefined {
  if (rule.integer && !Number.isInteger(v)) return `must be a whole number, not ${v}`;
  if (rule.min !== undefined && (rule.above ? v <= rule.min : v < rule.min)) {
    return rule.above ? `must be more than ${rule.min}, not ${v}` : `must be ${rule.min} or more, not ${v}`;
  }
  if (rule.below !== undefined && v >= rule.below) return `must be less than ${rule.below}, not ${v}`;
  return undefined;
}

/** Reads typed fields of one JSON object, recording a problem for each field that is missing or wrong. */
class Reader {
  constructor(
    readonly ctx: Problems,
    readonly obj: Record<string, unknown>,
    readonly path: string,
  ) {}

  at(key: string): string {
    return join(this.path, key);
  }

  private missing(key: string): undefined {
    this.ctx.add(this.at(key), 'is missing');
    return undefined;
  }

  private wrong(key: string, want: string): undefined {
    this.ctx.add(this.at(key), `must be ${want}, not ${kindOf(this.obj[key])}`);
    return undefined;
  }

  /** Text; required unless a fallback is given. `nonEmpty` refuses "". */
  text(key: string, fallback?: string, nonEmpty = false): string | undefined {
    const v = this.obj[key];
    if (v === undefined) return fallback ?? this.missing(key);
    if (typeof v !== 'string') return this.wrong(key, 'text');
    if (nonEmpty && v.trim() === '') {
      this.ctx.add(this.at(key), 'must not be empty');
      return undefined;
    }
    return v;
  }

  optText(key: string): string | undefined {
    return this.obj[key] === undefined ? undefined : this.text(key);
  }

  id(): string {
    return this.text('id', undefined, true) ?? '';
  }

  num(key: string, rule: NumRule = {}, fallback?: number): number | undefined {
    const v = this.obj[key];
    if (v === undefined) return fallback ?? this.missing(key);
    // JSON has no NaN or Infinity, but a number too large for a double parses as Infinity.
    if (typeof v !== 'number' || !Number.isFinite(v)) return this.wrong(key, 'a finite number');
    const p = numProblem(v, rule);
    if (p) {
      this.ctx.add(this.at(key), p);
      return undefined;
    }
    return v;
  }

  optNum(key: string, rule: NumRule = {}): number | undefined {
    return this.obj[key] === undefined ? undefined : this.num(key, rule);
  }

  rev(): number {
    return this.num('rev', { min: 0, integer: true }, 1) ?? 0;
  }

  bool(key: string, fallback: boolean): boolean {
    const v = this.obj[key];
    if (v === undefined) return fallback;
    if (typeof v !== 'boolean') return this.wrong(key, 'true or false') ?? fallback;
    return v;
  }

  optBool(key: string): boolean | undefined {
    return this.obj[key] === undefined ? undefined : this.bool(key, false);
  }

  oneOf<T extends string>(key: string, allowed: readonly T[], fallback?: T): T | undefined {
    const v = this.text(key, fallback);
    if (v === undefined) return undefined;
    if (!(allowed as readonly string[]).includes(v)) {
      this.ctx.add(this.at(key), `must be one of ${allowed.join(', ')}; ${short(v)} is not known`);
      return undefined;
    }
    return v as T;
  }

  currency(key: string): string | undefined {
    const v = this.text(key);
    if (v !== undefined && !CURRENCY.test(v)) {
      this.ctx.add(this.at(key), `must be a currency code of three capital letters (ISO 4217), not ${short(v)}`);
      return undefined;
    }
    return v;
  }

  date(key: string): string | undefined {
    const v = this.text(key);
    if (v !== undefined && !isIsoDate(v)) {
      this.ctx.add(this.at(key), `must be a date written YYYY-MM-DD, not ${short(v)}`);
      return undefined;
    }
    return v;
  }

  optDate(key: string): string | undefined {
    return this.obj[key] === undefined ? undefined : this.date(key);
  }

  time(key: string): string | undefined {
    const v = this.text(key);
    if (v !== undefined && !isIsoTime(v)) {
      this.ctx.add(this.at(key), `must be an ISO date and time (YYYY-MM-DDTHH:MM:SSZ), not ${short(v)}`);
      return undefined;
    }
    return v;
  }

  optTime(key: string): string | undefined {
    return this.obj[key] === undefined ? undefined : this.time(key);
  }

  object(key: string, required: boolean): Reader | undefined {
    const v = this.obj[key];
    if (v === undefined) return required ? this.missing(key) : undefined;
    if (!isObject(v)) return this.wrong(key, 'an object');
    return new Reader(this.ctx, v, this.at(key));
  }

  array(key: string): unknown[] | undefined {
    const v = this.obj[key];
    if (v === undefined) return undefined;
    if (!Array.isArray(v)) return this.wrong(key, 'a list');
    return v;
  }

  /** An object of finite numbers keyed by name. */
  numberMap(key: string, rule: NumRule = {}, keyCheck?: (k: string) => string | undefined): Record<string, number> {
    const r = this.object(key, false);
    const out: Record<string, number> = {};
    if (!r) return out;
    for (const k of Object.keys(r.obj)) {
      const keyProblem = keyCheck?.(k);
      if (keyProblem) {
        this.ctx.add(r.at(k), keyProblem);
        continue;
      }
      const v = r.num(k, rule);
      if (v !== undefined) out[k] = v;
    }
    return out;
  }

  textList(key: string): string[] {
    const arr = this.array(key) ?? [];
    const out: string[] = [];
    arr.forEach((v, i) => {
      if (typeof v === 'string') out.push(v);
      else this.ctx.add(`${this.at(key)}[${i}]`, `must be text, not ${kindOf(v)}`);
    });
    return out;
  }
}

function list<T>(ctx: Problems, raw: Record<string, unknown>, key: CollectionName, restore: (r: Reader, i: number) => T): T[] {
  const v = raw[key];
  if (v === undefined) return [];
  if (!Array.isArray(v)) {
    ctx.add(key, `must be a list, not ${kindOf(v)}`);
    return [];
  }
  const out: T[] = [];
  v.forEach((item, i) => {
    const path = `${key}[${i}]`;
    if (!isObject(item)) ctx.add(path, `must be an object, not ${kindOf(item)}`);
    else out.push(restore(new Reader(ctx, item, path), i));
  });
  return out;
}

/** Sets `key` on `target` only when the value is present, so absent optional fields stay absent. */
function setIf<T extends object, K extends keyof T>(target: T, key: K, value: T[K] | undefined): void {
  if (value !== undefined) target[key] = value;
}

// ---------------------------------------------------------------------------------------------------------------
// Record kinds

function restoreSettings(ctx: Problems, raw: unknown): Settings {
  const d = defaultSettings();
  if (raw === undefined) return d;
  if (!isObject(raw)) {
    ctx.add('settings', `must be an object, not ${kindOf(raw)}`);
    return d;
  }
  const r = new Reader(ctx, raw, 'settings');
  if (raw.id !== undefined && raw.id !== 'settings') ctx.add('settings.id', `must be "settings", not ${short(raw.id)}`);
  const base = r.obj.baseCurrency === undefined ? d.baseCurrency : r.currency('baseCurrency') ?? d.baseCurrency;
  const rates = r.obj.rates === undefined ? { ...d.rates } : r.numberMap('rates', { min: 0, above: true }, currencyKeyProblem);
  if (rates[base] === undefined) rates[base] = 1;
  else if (rates[base] !== 1) ctx.add(join('settings.rates', base), `the base currency's rate must be 1, not ${rates[base]}`);
  const runSizes: number[] = [];
  (r.array('runSizes') ?? d.runSizes).forEach((v, i) => {
    const p = typeof v === 'number' && Number.isFinite(v) ? numProblem(v, { min: 0, above: true, integer: true }) : `must be a number, not ${kindOf(v)}`;
    if (p) ctx.add(`settings.runSizes[${i}]`, p);
    else runSizes.push(v as number);
  });
  const settings: Settings = {
    id: 'settings',
    rev: r.rev(),
    bookName: r.text('bookName', d.bookName) ?? d.bookName,
    company: r.text('company', d.company) ?? '',
    baseCurrency: base,
    rates,
    runSizes,
    labourRatePerHour: r.num('labourRatePerHour', { min: 0 }, 0) ?? 0,
    labourMinutesPerUnit: r.num('labourMinutesPerUnit', { min: 0 }, 0) ?? 0,
    labourMinutesPerPlacement: r.num('labourMinutesPerPlacement', { min: 0 }, 0) ?? 0,
    testCostPerUnit: r.num('testCostPerUnit', { min: 0 }, 0) ?? 0,
    overheadPct: r.num('overheadPct', { min: 0 }, 0) ?? 0,
    marginPct: r.num('marginPct', { min: 0, below: 100 }, 0) ?? 0,
    attrition: r.obj.attrition === undefined ? { ...d.attrition } : r.numberMap('attrition', { min: 0, below: 1 }),
  };
  setIf(settings, 'costingDate', r.optDate('costingDate'));
  setIf(settings, 'lastExportAt', r.optTime('lastExportAt'));
  setIf(settings, 'editsSinceExport', r.optNum('editsSinceExport', { min: 0, integer: true }));
  return settings;
}

function currencyKeyProblem(k: string): string | undefined {
  return CURRENCY.test(k) ? undefined : `a rate must be keyed by a currency code of three capital letters (ISO 4217), not ${short(k)}`;
}

function restorePart(r: Reader): Part {
  const part: Part = {
    id: r.id(),
    rev: r.rev(),
    mpn: r.text('mpn', undefined, true) ?? '',
    maker: r.text('maker', '') ?? '',
    description: r.text('description', '') ?? '',
    kind: r.oneOf('kind', PART_KINDS, 'other') ?? 'other',
    ratings: r.numberMap('ratings'),
    package: r.text('package', '') ?? '',
  };
  setIf(part, 'value', r.optNum('value'));
  if (r.obj.unit !== undefined) setIf(part, 'unit', r.oneOf('unit', PART_VALUE_UNITS));
  setIf(part, 'placements', r.optNum('placements', { min: 0, integer: true }));
  setIf(part, 'notes', r.optText('notes'));
  return part;
}

function restoreSupplier(r: Reader): Supplier {
  const supplier: Supplier = {
    id: r.id(),
    rev: r.rev(),
    name: r.text('name', undefined, true) ?? '',
    currency: r.currency('currency') ?? '',
    notes: r.text('notes', '') ?? '',
  };
  const m = r.object('mapping', false);
  if (m) {
    const columns: Record<string, string> = {};
    const cols = m.object('columns', true);
    if (cols) for (const k of Object.keys(cols.obj)) setIf(columns, k, cols.text(k));
    const mapping: ColumnMapping = { columns, layout: m.oneOf('layout', ['wide', 'long'] as const) ?? 'long' };
    if (m.obj.decimal !== undefined) setIf(mapping, 'decimal', m.oneOf('decimal', ['.', ','] as const));
    if (m.obj.priceUnit !== undefined) setIf(mapping, 'priceUnit', m.oneOf('priceUnit', ['unit', 'per100', 'per1000', 'pack'] as const));
    supplier.mapping = mapping;
  }
  return supplier;
}

function restoreBreaks(r: Reader): PriceBreak[] {
  const arr = r.array('breaks');
  if (arr === undefined) {
    if (r.obj.breaks === undefined) r.ctx.add(r.at('breaks'), 'is missing');
    return [];
  }
  if (arr.length === 0) r.ctx.add(r.at('breaks'), 'must hold at least one price break');
  const out: PriceBreak[] = [];
  let lastQty: number | undefined;
  arr.forEach((b, i) => {
    const path = `${r.at('breaks')}[${i}]`;
    if (!isObject(b)) {
      r.ctx.add(path, `must be an object with qty and price, not ${kindOf(b)}`);
      return;
    }
    const br = new Reader(r.ctx, b, path);
    const qty = br.num('qty', { min: 0, above: true });
    const price = br.num('price', { min: 0 });
    if (qty !== undefined && lastQty !== undefined && qty <= lastQty) {
      r.ctx.add(br.at('qty'), `price breaks must rise in quantity: ${qty} comes after ${lastQty}`);
    }
    if (qty !== undefined) lastQty = qty;
    if (qty !== undefined && price !== undefined) out.push({ qty, price });
  });
  return out;
}

function restoreQuote(r: Reader): Quote {
  const quote: Quote = {
    id: r.id(),
    rev: r.rev(),
    partId: r.text('partId', undefined, true) ?? '',
    supplierId: r.text('supplierId', undefined, true) ?? '',
    supplierCode: r.text('supplierCode', '') ?? '',
    currency: r.currency('currency') ?? '',
    breaks: restoreBreaks(r),
    moq: r.num('moq', { min: 0, above: true }, 1) ?? 1,
    pack: r.num('pack', { min: 0, above: true }, 1) ?? 1,
    leadDays: r.num('leadDays', { min: 0 }, 0) ?? 0,
    date: r.date('date') ?? '',
    source: r.text('source', 'manual') ?? '',
  };
  setIf(quote, 'expires', r.optDate('expires'));
  setIf(quote, 'batchId', r.optText('batchId'));
  setIf(quote, 'supersededBy', r.optText('supersededBy'));
  return quote;
}

function restoreVariant(r: Reader): Variant {
  const params: Record<string, ParamValue> = {};
  const p = r.object('params', false);
  if (p) {
    for (const [k, v] of Object.entries(p.obj)) {
      if (typeof v === 'string' || (typeof v === 'number' && Number.isFinite(v))) params[k] = v;
      else r.ctx.add(p.at(k), `must be a finite number or text, not ${kindOf(v)}`);
    }
  }
  const variant: Variant = {
    id: r.id(),
    rev: r.rev(),
    code: r.text('code', undefined, true) ?? '',
    name: r.text('name', '') ?? '',
    params,
  };
  setIf(variant, 'notes', r.optText('notes'));
  return variant;
}

function restoreBuildLine(r: Reader, i: number): BuildLine {
  const line: BuildLine = {
    id: r.id(),
    rev: r.rev(),
    position: r.num('position', {}, i + 1) ?? i + 1,
    designators: r.text('designators', '') ?? '',
    qtyRule: r.text('qtyRule', '1', true) ?? '1',
    appliesWhen: r.text('appliesWhen', '') ?? '',
    category: r.oneOf('category', COST_CATEGORIES, 'electronics') ?? 'electronics',
  };
  setIf(line, 'partId', r.optText('partId'));
  setIf(line, 'partRule', r.optText('partRule'));
  setIf(line, 'role', r.optText('role'));
  setIf(line, 'attrition', r.optNum('attrition', { min: 0, below: 1 }));
  setIf(line, 'notes', r.optText('notes'));
  if (line.partId === undefined && !line.partRule && r.obj.partId === undefined && r.obj.partRule === undefined) {
    r.ctx.add(r.at('partId'), 'a build line needs a part (partId) or a rule choosing it (partRule)');
  }
  return line;
}

function restoreCheck(r: Reader): Check {
  const name = r.text('name', undefined, true) ?? '';
  const ruleReader = r.object('rule', true);
  const rule: Check['rule'] = { kind: 'true' };
  if (ruleReader) {
    rule.kind = ruleReader.oneOf('kind', CHECK_RULE_KINDS) ?? 'true';
    setIf(rule, 'limit', ruleReader.optText('limit'));
    setIf(rule, 'low', ruleReader.optText('low'));
    setIf(rule, 'high', ruleReader.optText('high'));
    setIf(rule, 'margin', ruleReader.optNum('margin', { min: 0 }));
  }
  return {
    id: r.id(),
    rev: r.rev(),
    name,
    title: r.text('title', name) ?? '',
    formula: r.text('formula', undefined, true) ?? '',
    unit: r.text('unit', '') ?? '',
    rule,
    appliesWhen: r.text('appliesWhen', '') ?? '',
    note: r.text('note', '') ?? '',
    builtIn: r.bool('builtIn', false),
    group: r.text('group', '') ?? '',
  };
}

function restoreRun(r: Reader): Run {
  const run: Run = {
    id: r.id(),
    rev: r.rev(),
    name: r.text('name', '') ?? '',
    variantId: r.text('variantId', undefined, true) ?? '',
    quantity: r.num('quantity', { min: 0, above: true, integer: true }) ?? 0,
    dateWanted: r.date('dateWanted') ?? '',
    notes: r.text('notes', '') ?? '',
  };
  const f = r.object('frozen', false);
  if (f) {
    const at = f.time('at');
    if (f.obj.snapshot === undefined) f.ctx.add(f.at('snapshot'), 'is missing');
    if (at !== undefined) run.frozen = { at, snapshot: f.obj.snapshot };
  }
  return run;
}

function restoreBatch(r: Reader): ImportBatch {
  const batch: ImportBatch = {
    id: r.id(),
    rev: r.rev(),
    fileName: r.text('fileName', undefined, true) ?? '',
    hash: r.text('hash', '') ?? '',
    supplierId: r.text('supplierId', undefined, true) ?? '',
    rows: r.num('rows', { min: 0, integer: true }, 0) ?? 0,
    at: r.time('at') ?? '',
    created: r.textList('created'),
    superseded: r.textList('superseded'),
  };
  setIf(batch, 'undone', r.optBool('undone'));
  return batch;
}

function restorePage(r: Reader, i: number): NotebookPage {
  const sections: NotebookSection[] = [];
  (r.array('sections') ?? []).forEach((s, si) => {
    const path = `${r.at('sections')}[${si}]`;
    if (!isObject(s)) {
      r.ctx.add(path, `must be an object, not ${kindOf(s)}`);
      return;
    }
    const sr = new Reader(r.ctx, s, path);
    const grid: string[][] = [];
    (sr.array('grid') ?? []).forEach((row, ri) => {
      const rowPath = `${sr.at('grid')}[${ri}]`;
      if (!Array.isArray(row)) {
        r.ctx.add(rowPath, `must be a list of cells, not ${kindOf(row)}`);
        return;
      }
      grid.push(
        row.map((cell: unknown, ci) => {
          if (typeof cell === 'string') return cell;
          r.ctx.add(`${rowPath}[${ci}]`, `a cell must be text, not ${kindOf(cell)}`);
          return '';
        }),
      );
    });
    sections.push({ heading: sr.text('heading', '') ?? '', text: sr.text('text', '') ?? '', grid });
  });
  return { id: r.id(), rev: r.rev(), title: r.text('title', '') ?? '', position: r.num('position', {}, i + 1) ?? i + 1, sections };
}

// ---------------------------------------------------------------------------------------------------------------
// Rules between records

function crossCheck(ctx: Problems, book: Book): void {
  const ids = {} as Record<CollectionName, Set<string>>;
  for (const c of COLLECTIONS) {
    const first = new Map<string, number>();
    (book[c] as { id: string }[]).forEach((r, i) => {
      if (r.id === '') return;
      const at = first.get(r.id);
      if (at !== undefined) ctx.add(`${c}[${i}].id`, `the id ${short(r.id)} is used twice (also at ${c}[${at}])`);
      else first.set(r.id, i);
    });
    ids[c] = new Set(first.keys());
  }
  const ref = (path: string, id: string, target: CollectionName, what: string): void => {
    if (id !== '' && !ids[target].has(id)) ctx.add(path, `refers to ${what} ${short(id)}, which is not in the file`);
  };
  const rated = (path: string, code: string): void => {
    if (code !== '' && book.settings.rates[code] === undefined) {
      ctx.add(path, `currency ${code} has no exchange rate in settings.rates`);
    }
  };
  book.suppliers.forEach((s, i) => rated(`suppliers[${i}].currency`, s.currency));
  book.quotes.forEach((q, i) => {
    ref(`quotes[${i}].partId`, q.partId, 'parts', 'part');
    ref(`quotes[${i}].supplierId`, q.supplierId, 'suppliers', 'supplier');
    rated(`quotes[${i}].currency`, q.currency);
  });
  book.buildLines.forEach((l, i) => {
    if (l.partId !== undefined) ref(`buildLines[${i}].partId`, l.partId, 'parts', 'part');
  });
  book.runs.forEach((r, i) => ref(`runs[${i}].variantId`, r.variantId, 'variants', 'variant'));
  book.importBatches.forEach((b, i) => ref(`importBatches[${i}].supplierId`, b.supplierId, 'suppliers', 'supplier'));

  const codes = new Map<string, number>();
  book.variants.forEach((v, i) => {
    if (v.code === '') return;
    const at = codes.get(v.code);
    if (at !== undefined) ctx.add(`variants[${i}].code`, `the variant code ${short(v.code)} is used twice (also at variants[${at}])`);
    else codes.set(v.code, i);
  });
}

// ---------------------------------------------------------------------------------------------------------------
// Where JSON text goes wrong. JSON.parse does not say where in every engine, so on failure this strict scanner
// walks the text once more to find the first bad character (iteratively, so deep nesting cannot overflow).

function jsonProblem(text: string): BookFileProblem {
  const { offset, reason, truncated } = jsonErrorAt(text);
  const { line, column } = lineColumn(text, offset);
  const where = `line ${line}, column ${column} (character ${offset + 1})`;
  return {
    path: '',
    message: truncated
      ? `the file ends too early at ${where}: the JSON is cut off (truncated file?)`
      : `the file is not valid JSON at ${where}: ${reason}`,
  };
}

function lineColumn(text: string, offset: number): { line: number; column: number } {
  let line = 1;
  let lineStart = 0;
  for (let i = text.indexOf('\n'); i >= 0 && i < offset; i = text.indexOf('\n', i + 1)) {
    line++;
    lineStart = i + 1;
  }
  return { line, column: offset - lineStart + 1 };
}

const NUMBER = /-?(?:0|[1-9]\d*)(?:\.\d+)?(?:[eE][+-]?\d+)?/y;
const WS = /[ \t\n\r]*/y;

export function jsonErrorAt(text: string): { offset: number; reason: string; truncated: boolean } {
  let i = 0;
  const stack: string[] = [];
  const n = text.length;
  const skip = (): void => {
    WS.lastIndex = i;
    WS.exec(text);
    i = WS.lastIndex;
  };
  const end = (): { offset: number; reason: string; truncated: boolean } => ({ offset: n, reason: 'unexpected end of text', truncated: true });
  const bad = (reason: string): { offset: number; reason: string; truncated: boolean } => ({ offset: i, reason, truncated: false });
  /** Scans a string starting at the quote at i; returns an error or undefined with i after the closing quote. */
  const string = (): { offset: number; reason: string; truncated: boolean } | undefined => {
    i++;
    for (;;) {
      if (i >= n) return end();
      const c = text.charCodeAt(i);
      if (c === 0x22) {
        i++;
        return undefined;
      }
      if (c < 0x20) return bad('a control character (such as a line break) inside text must be escaped');
      if (c === 0x5c) {
        const e = text[i + 1];
        if (e === undefined) return end();
        if (e === 'u') {
          if (i + 6 > n) return end();
          if (!/^[0-9a-fA-F]{4}$/.test(text.slice(i + 2, i + 6))) return bad('\\u must be followed by four hex digits');
          i += 6;
        } else if ('"\\/bfnrt'.includes(e)) {
          i += 2;
        } else {
          return bad(`\\${e} is not a JSON escape`);
        }
      } else {
        i++;
      }
    }
  };
  type Mode = 'value' | 'after' | 'key';
  let mode: Mode = 'value';
  for (;;) {
    skip();
    if (mode === 'value') {
      if (i >= n) return end();
      const c = text[i]!;
      if (c === '{') {
        stack.push('}');
        i++;
        skip();
        if (text[i] === '}') {
          stack.pop();
          i++;
          mode = 'after';
        } else mode = 'key';
      } else if (c === '[') {
        stack.push(']');
        i++;
        skip();
        if (text[i] === ']') {
          stack.pop();
          i++;
          mode = 'after';
        }
      } else if (c === '"') {
        const e = string();
        if (e) return e;
        mode = 'after';
      } else if (c === '-' || (c >= '0' && c <= '9')) {
        NUMBER.lastIndex = i;
        if (!NUMBER.exec(text)) return i + 1 >= n ? end() : bad('a number is malformed');
        i = NUMBER.lastIndex;
        // A number cut off inside its fraction or exponent ("4.", "4.7e-") is a truncated file, not a bad character.
        if (/^(?:\.|(?:\.\d+)?[eE][+-]?)$/.test(text.slice(i))) return end();
        if (i >= n && stack.length) return end();
        mode = 'after';
      } else {
        const word = ['true', 'false', 'null'].find((w) => w[0] === c);
        if (!word) return bad(`unexpected character ${JSON.stringify(c)} where a value should be`);
        const got = text.slice(i, i + word.length);
        if (got !== word) return word.startsWith(got) && i + got.length >= n ? end() : bad(`expected ${word}`);
        i += word.length;
        mode = 'after';
      }
    } else if (mode === 'key') {
      if (i >= n) return end();
      if (text[i] !== '"') return bad(`expected a property name in double quotes, found ${JSON.stringify(text[i])}`);
      const e = string();
      if (e) return e;
      skip();
      if (i >= n) return end();
      if (text[i] !== ':') return bad(`expected ":" after a property name, found ${JSON.stringify(text[i])}`);
      i++;
      mode = 'value';
    } else {
      if (stack.length === 0) {
        // A complete value was read; anything but whitespace after it is extra.
        return i < n ? bad('unexpected text after the end of the JSON object') : { offset: i, reason: 'unknown problem', truncated: false };
      }
      if (i >= n) return end();
      const close = stack[stack.length - 1]!;
      if (text[i] === ',') {
        i++;
        mode = close === '}' ? 'key' : 'value';
      } else if (text[i] === close) {
        stack.pop();
        i++;
      } else {
        return bad(`expected "," or "${close}", found ${JSON.stringify(text[i])}`);
      }
    }
  }
}
