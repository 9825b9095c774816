// Maps a supplier price file's columns to quote fields: header words with English synonyms, the supplier's saved
// mapping, wide (several quantity/price pairs per row) or long (one row per break) layouts; plus the cell readers
// for numbers (decimal comma or point, decided once per file), currencies, lead times and dates.
import type { ColumnMapping } from '../domain/book.ts';
import { isIsoDate } from '../domain/dates.ts';

export const PRICE_FIELDS = [
  'mpn',
  'supplierCode',
  'description',
  'maker',
  'qty',
  'price',
  'currency',
  'moq',
  'pack',
  'leadTime',
  'date',
  'expires',
  'priceUnit',
] as const;
export type PriceField = (typeof PRICE_FIELDS)[number];

export type PriceUnit = NonNullable<ColumnMapping['priceUnit']>;
export type Decimal = '.' | ',';
export type DateOrder = 'dmy' | 'mdy';
export type LeadUnit = 'days' | 'weeks';

/** One problem found in a file, located for the user: 1-based file line, column header, cell text, reason. */
export interface PriceProblem {
  row: number;
  column: string;
  value: string;
  reason: string;
}

/**
 * Header words for each field, normalised (lower case, punctuation as spaces). A header matches a field when it equals
 * one of these or contains one as whole words; the longest match wins, so "supplier part number" beats "part number".
 */
const SYNONYMS: Record<PriceField, readonly string[]> = {
  mpn: [
    'mpn', 'maker part number', 'maker part no', 'maker pn', 'maker part', 'manufacturer part number',
    'manufacturer part no', 'manufacturer part', 'manufacturer pn', 'mfr part', 'mfr part number', 'mfr part no',
    'mfr pn', 'mfg part', 'mfg part number', 'mfg part no', 'part number', 'part no', 'part', 'p n', 'pn',
  ],
  supplierCode: [
    'supplier code', 'supplier part number', 'supplier part no', 'supplier part', 'supplier pn', 'order code',
    'order no', 'order number', 'ordering code', 'sku', 'stock no', 'stock number', 'stock code', 'our code',
    'catalogue no', 'catalogue number', 'catalog no', 'catalog number', 'item code', 'item no', 'vendor code',
    'vendor part number', 'our ref', 'our reference', 'ref', 'reference', 'supplier ref', 'supplier reference',
  ],
  description: ['description', 'desc', 'item description', 'product description', 'details', 'item', 'product name'],
  maker: ['maker', 'manufacturer', 'mfr', 'mfg', 'make', 'brand', 'manufacturer name'],
  qty: [
    'qty', 'quantity', 'break', 'from', 'break qty', 'qty break', 'price break', 'quantity break', 'from qty',
    'qty from', 'quantity from', 'break quantity',
  ],
  price: ['price', 'unit price', 'each', 'price each', 'cost', 'unit cost', 'net price', 'price per unit'],
  currency: ['currency', 'curr', 'ccy', 'currency code', 'cur'],
  moq: [
    'moq', 'minimum order', 'min order', 'minimum order qty', 'minimum order quantity', 'min order qty',
    'min order quantity', 'minimum qty', 'min qty', 'minimum quantity',
  ],
  pack: [
    'pack', 'pack qty', 'pack size', 'pack quantity', 'multiple', 'order multiple', 'reel', 'reel qty', 'reel size',
    'packaging qty', 'spq', 'pkg qty', 'package qty', 'increment', 'order increment',
  ],
  leadTime: ['lead time', 'leadtime', 'lead', 'lt', 'lead days', 'lead weeks', 'delivery time', 'lead time days', 'lead time weeks'],
  date: ['quote date', 'valid from', 'date', 'quoted', 'price date', 'quotation date', 'effective date', 'effective'],
  expires: ['valid until', 'expires', 'expiry', 'expiry date', 'valid to', 'valid through', 'expiration', 'expiration date', 'valid till'],
  priceUnit: ['price unit', 'price per', 'per', 'unit of price', 'pricing unit'],
};

const SYMBOL_CURRENCY: Record<string, string> = { '€': 'EUR', $: 'USD', '£': 'GBP' };

/** Hints a header carries besides its field: a unit for lead time, a currency or a price unit for prices. */
export interface HeaderHints {
  leadUnit?: LeadUnit;
  currency?: string;
  priceUnit?: PriceUnit;
}

export function headerHints(header: string): HeaderHints {
  const h = header.toLowerCase();
  const hints: HeaderHints = {};
  if (/\bweeks?\b|\bwks?\b/.test(h)) hints.leadUnit = 'weeks';
  else if (/\bdays?\b/.test(h)) hints.leadUnit = 'days';
  if (/(?:\bper|\/)\s*(?:1[,.\s]?000|1k|thousand|mille)\b/.test(h)) hints.priceUnit = 'per1000';
  else if (/(?:\bper|\/)\s*(?:100|hundred)\b/.test(h)) hints.priceUnit = 'per100';
  else if (/(?:\bper|\/)\s*(?:pack|reel|pkg|package|bag|box)\b/.test(h)) hints.priceUnit = 'pack';
  else if (/(?:\bper|\/)\s*(?:unit|piece|pc|pcs|each|ea)\b/.test(h)) hints.priceUnit = 'unit';
  const sym = /[€$£]/.exec(header);
  if (sym) hints.currency = SYMBOL_CURRENCY[sym[0]];
  const code = /(?:^|[\s(\[/])([A-Z]{3})(?=$|[\s)\]/])/.exec(header);
  if (code && !NOT_CURRENCY.has(code[1]!)) hints.currency = code[1];
  return hints;
}

/** Upper-case header words that are not currency codes. */
const NOT_CURRENCY = new Set(['MOQ', 'SKU', 'MPN', 'QTY', 'MFR', 'MFG', 'PCS', 'SPQ', 'EAN', 'UPC', 'REF', 'LTD', 'PER', 'NET']);

/** Lower case, hints (bracketed text, currency, "per 100") removed, punctuation turned to spaces. */
export function normaliseHeader(header: string): string {
  return header
    .toLowerCase()
    .replace(/\([^)]*\)|\[[^\]]*\]/g, ' ')
    .replace(/(?:\bper|\/)\s*(?:1[,.\s]?000|1k|thousand|mille|100|hundred|pack|reel|unit|piece|pcs|pc|each|ea)\b/g, ' ')
    .replace(/[€$£]/g, ' ')
    .replace(/[^a-z0-9+]+/g, ' ')
    .trim();
}

function stripCurrencyWords(norm: string, header: string): string {
  const code = /(?:^|[\s(\[/])([A-Z]{3})(?=$|[\s)\]/])/.exec(header);
  if (!code || NOT_CURRENCY.has(code[1]!)) return norm;
  return norm.replace(new RegExp(`\\b${code[1]!.toLowerCase()}\\b`), ' ').replace(/\s+/g, ' ').trim();
}

/**
 * Guesses fields from header words: a header matches a field when it equals one of the field's words or contains one
 * as whole words (lower case, punctuation as spaces, bracketed hints and currency codes set aside). Price files and
 * stock counts each have their own words.
 */
export interface HeaderWords<F extends string> {
  /** The field a header names, if any. */
  guess(header: string): F | undefined;
  /** 2 for an exact word, 1 for a header that merely contains one, 0 otherwise: finds the header row. */
  score(cell: string): number;
}

export function headerWords<F extends string>(fields: readonly F[], words: Record<F, readonly string[]>): HeaderWords<F> {
  const list = fields.flatMap((field) => words[field].map((w) => ({ field, words: w }))).sort((a, b) => b.words.length - a.words.length);
  const exact = new Set(list.map((s) => s.words));
  const guess = (header: string): F | undefined => {
    const norm = stripCurrencyWords(normaliseHeader(header), header);
    if (norm === '') return undefined;
    for (const s of list) if (norm === s.words) return s.field;
    // English headers put the thing named last ("Price list date" is a date, "Part description" a description), so a
    // synonym that ends the header wins over a longer one inside it.
    const padded = ` ${norm} `;
    let best: { field: F; atEnd: boolean; length: number } | undefined;
    for (const s of list) {
      if (!padded.includes(` ${s.words} `)) continue;
      const atEnd = padded.endsWith(` ${s.words} `);
      if (!best || (atEnd && !best.atEnd) || (atEnd === best.atEnd && s.words.length > best.length)) {
        best = { field: s.field, atEnd, length: s.words.length };
      }
    }
    return best?.field;
  };
  const score = (cell: string): number => {
    const t = cell.trim();
    if (t === '' || t.length > 60) return 0;
    const norm = stripCurrencyWords(normaliseHeader(t), t);
    if (norm === '') return 0;
    if (exact.has(norm)) return 2;
    return guess(t) !== undefined ? 1 : 0;
  };
  return { guess, score };
}

const PRICE_WORDS_GUESS = headerWords(PRICE_FIELDS, SYNONYMS);

/** The price field a header names, if any. */
export function guessField(header: string): PriceField | undefined {
  return PRICE_WORDS_GUESS.guess(header);
}

/** A wide-layout column: quantity or price of break N, or a price column whose header is the quantity ("100+"). */
export type BreakHeader = { kind: 'qty' | 'price'; index: number } | { kind: 'fixed'; qty: number };

const QTY_WORDS = '(?:qty|quantity|break|from|qty break|break qty|quantity break|price break qty)';
const PRICE_WORDS = '(?:price|unit price|price each|each|cost|unit cost|net price|price break|break price)';

export function breakHeader(header: string): BreakHeader | undefined {
  const norm = stripCurrencyWords(normaliseHeader(header), header);
  let m = new RegExp(`^${QTY_WORDS}\\s*(\\d{1,2})$`).exec(norm);
  if (m) return { kind: 'qty', index: Number(m[1]) };
  m = new RegExp(`^${PRICE_WORDS}\\s*(\\d{1,2})$`).exec(norm);
  if (m) return { kind: 'price', index: Number(m[1]) };
  // "100+", ">= 1000", "≥250", "from 1,000+", "price 100+", "@ 500": the header is the break quantity.
  const raw = header
    .toLowerCase()
    .replace(/\([^)]*\)|\[[^\]]*\]/g, ' ')
    .replace(/[€$£]/g, ' ')
    .trim();
  m = /^(?:(?:unit\s+)?price\s*|qty\s*)?(?:(>=|≥|@|from\s)\s*)?(\d{1,3}(?:[,.' ]\d{3})*|\d+)\s*(?:pcs|pc|units?)?\s*(\+)?\s*(?:pcs|pc|units?)?$/.exec(raw);
  if (m && (m[1] || m[3])) {
    const qty = Number(m[2]!.replace(/[,.' ]/g, ''));
    if (qty > 0) return { kind: 'fixed', qty };
  }
  return undefined;
}

/**
 * How strongly a cell reads like a column header, used to find the header row among leading lines: 2 for an exact
 * synonym or a break column, 1 for a header that merely contains a synonym, 0 otherwise.
 */
export function headerWordScore(cell: string): number {
  const t = cell.trim();
  if (t === '' || t.length > 60) return 0;
  if (breakHeader(t) !== undefined) return 2;
  return PRICE_WORDS_GUESS.score(t);
}

/** Where each field and each price break sits in the file, after guesses and the saved mapping. */
export interface ResolvedMapping {
  layout: 'wide' | 'long';
  fields: Partial<Record<PriceField, number>>;
  /** Wide layout: break columns in order of quantity column (or fixed quantity). */
  breaks: { qtyCol?: number; priceCol: number; fixedQty?: number }[];
  /** Lead time unit from the lead time header ("Lead time (weeks)"); cells with their own unit win. */
  leadUnit?: LeadUnit;
  headerCurrency?: string;
  priceUnit?: PriceUnit;
  /** The mapping to remember on the supplier. */
  saved: ColumnMapping;
  notes: string[];
  problems: PriceProblem[];
}

function keyOfColumn(key: string): { field: PriceField } | BreakHeader | undefined {
  if ((PRICE_FIELDS as readonly string[]).includes(key)) return { field: key as PriceField };
  let m = /^qty(\d{1,2})$/.exec(key);
  if (m) return { kind: 'qty', index: Number(m[1]) };
  m = /^price(\d{1,2})$/.exec(key);
  if (m) return { kind: 'price', index: Number(m[1]) };
  m = /^price@(\d+)$/.exec(key);
  if (m && Number(m[1]) > 0) return { kind: 'fixed', qty: Number(m[1]) };
  return undefined;
}

/** Validates a mapping read from outside (a `--mapping` file, a stored supplier); problems name the bad entry. */
export function parseColumnMapping(json: unknown): { ok: true; mapping: ColumnMapping } | { ok: false; reason: string } {
  if (typeof json !== 'object' || json === null || Array.isArray(json)) {
    return { ok: false, reason: 'a column mapping must be an object with "columns" and "layout"' };
  }
  const o = json as Record<string, unknown>;
  const cols = o['columns'];
  if (typeof cols !== 'object' || cols === null || Array.isArray(cols)) {
    return { ok: false, reason: '"columns" must be an object of field name to column header' };
  }
  const columns: Record<string, string> = {};
  for (const [k, v] of Object.entries(cols)) {
    if (!keyOfColumn(k)) {
      return {
        ok: false,
        reason: `unknown field "${k}" in columns; use ${PRICE_FIELDS.join(', ')}, qtyN/priceN for breaks or price@QTY`,
      };
    }
    if (typeof v !== 'string' || v.trim() === '') return { ok: false, reason: `column header for "${k}" must be non-empty text` };
    columns[k] = v;
  }
  const layout = o['layout'] ?? 'long';
  if (layout !== 'wide' && layout !== 'long') return { ok: false, reason: '"layout" must be "wide" or "long"' };
  const mapping: ColumnMapping = { columns, layout };
  if (o['decimal'] !== undefined) {
    if (o['decimal'] !== '.' && o['decimal'] !== ',') return { ok: false, reason: '"decimal" must be "." or ","' };
    mapping.decimal = o['decimal'];
  }
  if (o['priceUnit'] !== undefined) {
    const u = o['priceUnit'];
    if (u !== 'unit' && u !== 'per100' && u !== 'per1000' && u !== 'pack') {
      return { ok: false, reason: '"priceUnit" must be "unit", "per100", "per1000" or "pack"' };
    }
    mapping.priceUnit = u;
  }
  return { ok: true, mapping };
}

/**
 * Resolves columns: entries of the given mapping whose header is in the file come first, then header guesses fill
 * the rest. Duplicate headers are reported; a duplicate that a field depends on blocks the import.
 */
export function resolveMapping(headers: string[], headerLine: number, given?: ColumnMapping, unused: readonly string[] = []): ResolvedMapping {
  const notes: string[] = [];
  const problems: PriceProblem[] = [];
  const fields: Partial<Record<PriceField, number>> = {};
  const qtyByIndex = new Map<number, number>();
  const priceByIndex = new Map<number, number>();
  const fixed: { col: number; qty: number }[] = [];
  const used = new Set<number>();
  const lower = headers.map((h) => h.trim().toLowerCase());

  const seen = new Map<string, number>();
  const duplicated = new Set<number>();
  lower.forEach((h, i) => {
    if (h === '') return;
    const first = seen.get(h);
    if (first === undefined) seen.set(h, i);
    else {
      duplicated.add(first);
      duplicated.add(i);
    }
  });

  const assign = (col: number, what: { field: PriceField } | BreakHeader): void => {
    if ('field' in what) {
      if (fields[what.field] === undefined) fields[what.field] = col;
      else return;
    } else if (what.kind === 'fixed') {
      const qty = what.qty;
      if (fixed.some((f) => f.qty === qty)) return;
      fixed.push({ col, qty });
    } else {
      const byIndex = what.kind === 'qty' ? qtyByIndex : priceByIndex;
      if (byIndex.has(what.index)) return;
      byIndex.set(what.index, col);
    }
    used.add(col);
  };

  if (given) {
    for (const [key, header] of Object.entries(given.columns)) {
      const what = keyOfColumn(key);
      const col = lower.indexOf(header.trim().toLowerCase());
      if (!what) notes.push(`saved mapping entry "${key}" is not a known field; ignored`);
      else if (col < 0) notes.push(`saved mapping expects a column "${header}" for ${key}; the file has none, so it was guessed`);
      else assign(col, what);
    }
  }
  // A key set to "not used" stays so: its header words are not guessed again.
  const notUsed = new Set(unused);
  headers.forEach((h, col) => {
    if (used.has(col) || h.trim() === '') return;
    const b = breakHeader(h);
    if (b) {
      const keys = b.kind === 'fixed' ? [`price@${b.qty}`] : b.kind === 'price' ? [`price${b.index}`, `price@${b.index}`] : [`qty${b.index}`];
      if (!keys.some((k) => notUsed.has(k))) assign(col, b);
      return;
    }
    const f = guessField(h);
    if (f && !notUsed.has(f)) assign(col, { field: f });
  });

  // "Price 3" without a "Qty 3" beside it names the break quantity itself.
  for (const [index, col] of [...priceByIndex]) {
    if (!qtyByIndex.has(index)) {
      priceByIndex.delete(index);
      if (!fixed.some((f) => f.qty === index)) fixed.push({ col, qty: index });
    }
  }
  for (const [index, col] of qtyByIndex) {
    if (!priceByIndex.has(index)) {
      problems.push({ row: headerLine, column: headers[col]!, value: headers[col]!, reason: `quantity column for break ${index} has no matching price column` });
    }
  }

  const breaks: ResolvedMapping['breaks'] = [
    ...[...priceByIndex.keys()].sort((a, b) => a - b).map((i) => ({ qtyCol: qtyByIndex.get(i)!, priceCol: priceByIndex.get(i)! })),
    ...fixed.sort((a, b) => a.qty - b.qty).map((f) => ({ priceCol: f.col, fixedQty: f.qty })),
  ];
  const layout: 'wide' | 'long' = breaks.length > 0 ? 'wide' : 'long';
  if (layout === 'wide' && fields.price !== undefined) {
    notes.push(`column "${headers[fields.price]}" ignored: prices are read from the break columns`);
    delete fields.price;
  }
  if (layout === 'wide' && fields.qty !== undefined) {
    notes.push(`column "${headers[fields.qty]}" ignored: quantities are read from the break columns`);
    delete fields.qty;
  }

  if (layout === 'long' && fields.price === undefined) {
    problems.push({
      row: headerLine,
      column: '',
      value: headers.join(' | ').slice(0, 200),
      reason: "no price column found: expected a header such as 'Price', 'Unit price', 'Price 1' or '100+'",
    });
  }
  if (fields.mpn === undefined && fields.supplierCode === undefined) {
    problems.push({
      row: headerLine,
      column: '',
      value: headers.join(' | ').slice(0, 200),
      reason: "no part column found: expected a header such as 'MPN', 'Manufacturer part no', 'Order code' or 'SKU'",
    });
  }
  if (layout === 'long' && fields.qty === undefined && fields.price !== undefined) {
    notes.push('no quantity column: each row is one price from its MOQ (or from 1 when there is no MOQ)');
  }

  const mappedCols = new Set<number>([...Object.values(fields), ...breaks.flatMap((b) => (b.qtyCol === undefined ? [b.priceCol] : [b.qtyCol, b.priceCol]))]);
  for (const col of duplicated) {
    if (mappedCols.has(col)) {
      problems.push({ row: headerLine, column: headers[col]!, value: headers[col]!, reason: 'duplicate column header: two columns carry this name, so it is unclear which one to read' });
    }
  }
  const unmappedDupes = [...new Set([...duplicated].filter((c) => !mappedCols.has(c)).map((c) => headers[c]!))];
  if (unmappedDupes.length) notes.push(`duplicate column headers not used by the import: ${unmappedDupes.join(', ')}`);

  const columns: Record<string, string> = {};
  for (const f of PRICE_FIELDS) if (fields[f] !== undefined) columns[f] = headers[fields[f]!]!;
  for (const [i, col] of priceByIndex) {
    columns[`qty${i}`] = headers[qtyByIndex.get(i)!]!;
    columns[`price${i}`] = headers[col]!;
  }
  for (const f of fixed) columns[`price@${f.qty}`] = headers[f.col]!;

  const resolved: ResolvedMapping = { layout, fields, breaks, saved: { columns, layout }, notes, problems };
  if (fields.leadTime !== undefined) {
    const u = headerHints(headers[fields.leadTime]!).leadUnit;
    if (u) resolved.leadUnit = u;
  }
  const priceHeaders = layout === 'wide' ? breaks.map((b) => headers[b.priceCol]!) : fields.price !== undefined ? [headers[fields.price]!] : [];
  for (const h of priceHeaders) {
    const hints = headerHints(h);
    if (hints.currency && !resolved.headerCurrency) resolved.headerCurrency = hints.currency;
    if (hints.priceUnit && !resolved.priceUnit) resolved.priceUnit = hints.priceUnit;
  }
  if (given?.priceUnit) resolved.priceUnit = given.priceUnit;
  if (given?.decimal) resolved.saved.decimal = given.decimal;
  if (resolved.priceUnit) resolved.saved.priceUnit = resolved.priceUnit;
  return resolved;
}

// ---- cell readers ------------------------------------------------------------------------------------------------

const GROUP_SPACE = /[\s\u00a0\u202f']/g;

/** Reads a number with the file's decimal mark; thousands separators must group by three. */
const PLAIN: Record<Decimal, RegExp> = { '.': /^\d+(?:\.\d+)?$/, ',': /^\d+(?:,\d+)?$/ };

export function parseNumber(raw: string, decimal: Decimal): number | undefined {
  // Most cells are plain ("12", "0.125"): read them without the general path's string rewriting.
  if (PLAIN[decimal].test(raw)) return Number(decimal === '.' ? raw : raw.replace(',', '.'));
  const group = decimal === '.' ? ',' : '.';
  let s = raw.trim().replace(GROUP_SPACE, group);
  if (s === '') return undefined;
  let sign = '';
  if (s[0] === '-' || s[0] === '+') {
    sign = s[0] === '-' ? '-' : '';
    s = s.slice(1);
  }
  const parts = s.split(decimal);
  if (parts.length > 2) return undefined;
  let int = parts[0]!;
  const frac = parts[1];
  if (int.includes(group)) {
    if (!GROUPED[decimal].test(int)) return undefined;
    int = int.split(group).join('');
  }
  if (!/^\d*$/.test(int)) return undefined;
  if (frac !== undefined && !/^\d+$/.test(frac)) return undefined;
  if (int === '' && frac === undefined) return undefined;
  const n = Number(`${sign}${int || '0'}${frac !== undefined ? '.' + frac : ''}`);
  return Number.isFinite(n) ? n : undefined;
}

const GROUPED: Record<Decimal, RegExp> = { '.': /^\d{1,3}(?:,\d{3})+$/, ',': /^\d{1,3}(?:\.\d{3})+$/ };

/**
 * Which decimal mark one numeric cell implies, if it settles the question at all: "0,5" and "1.234,5" say comma,
 * "12.50" and "1,234.5" say point, "1,234" could be either. A character scan, as it runs on every number cell.
 */
export function decimalVote(raw: string): Decimal | undefined {
  let len = 0;
  let digits = 0;
  let dots = 0;
  let commas = 0;
  let lastDot = -1;
  let lastComma = -1;
  let firstSep = -1;
  let firstDigit = -1;
  for (let i = 0; i < raw.length; i++) {
    const c = raw.charCodeAt(i);
    if (c >= 48 && c <= 57) {
      if (firstDigit < 0) firstDigit = c;
      digits++;
    } else if (c === 46 || c === 44) {
      if (c === 46) {
        dots++;
        lastDot = len;
      } else {
        commas++;
        lastComma = len;
      }
      if (firstSep < 0) firstSep = len;
    } else if (c === 32 || c === 0xa0 || c === 0x202f || c === 39 || c === 43 || c === 45 || c === 9) continue;
    else return undefined;
    len++;
  }
  if (digits === 0 || (dots === 0 && commas === 0)) return undefined;
  if (dots > 0 && commas > 0) return lastDot > lastComma ? '.' : ',';
  const sep: Decimal = dots > 0 ? '.' : ',';
  if (dots + commas > 1) return sep === '.' ? ',' : '.'; // "1.234.567": a repeated mark groups thousands
  const intLen = firstSep;
  const fracLen = len - firstSep - 1;
  if (fracLen !== 3 || intLen === 0 || intLen > 3 || (intLen === 1 && firstDigit === 48)) return sep;
  return undefined;
}

export interface CellMoney {
  text: string;
  currency?: string;
  conflict?: string;
}

function isDigit(c: number): boolean {
  return c >= 48 && c <= 57;
}

/** Splits a price cell into its number text and a currency given as a symbol or an ISO 4217 code before or after. */
export function splitMoney(raw: string): CellMoney {
  let s = raw.trim();
  if (s.length === 0 || (isDigit(s.charCodeAt(0)) && isDigit(s.charCodeAt(s.length - 1)))) return { text: s };
  const found: string[] = [];
  const lead = /^([€$£]|[A-Za-z]{3}(?=[\s\d.,+-]))\s*/.exec(s);
  if (lead) {
    found.push(SYMBOL_CURRENCY[lead[1]!] ?? lead[1]!.toUpperCase());
    s = s.slice(lead[0].length);
  }
  const trail = /\s*([€$£]|(?<=[\s\d])[A-Za-z]{3})$/.exec(s);
  if (trail) {
    found.push(SYMBOL_CURRENCY[trail[1]!] ?? trail[1]!.toUpperCase());
    s = s.slice(0, s.length - trail[0].length);
  }
  const out: CellMoney = { text: s.trim() };
  if (found.length) out.currency = found[0]!;
  if (found.length === 2 && found[0] !== found[1]) out.conflict = `${found[0]} and ${found[1]}`;
  return out;
}

/** Reads a quantity cell: a whole number, allowing "100+" or ">= 100" as written in break columns. */
const WHOLE = /^\d+$/;

export function parseQty(raw: string, decimal: Decimal): number | undefined {
  if (WHOLE.test(raw)) return Number(raw);
  const s = raw.trim().replace(/^(?:>=|≥|from\s)\s*/i, '').replace(/\s*\+$/, '').replace(/\s*(?:pcs|pc|units?)$/i, '');
  return parseNumber(s, decimal);
}

/** Lead time in days from "28", "28 days", "4 wk", "4 weeks", "4w"; a bare number uses the header's unit. */
export function parseLeadDays(raw: string, decimal: Decimal, headerUnit: LeadUnit | undefined): number | undefined {
  const m = /^\s*([\d.,]+)\s*(days?|d|weeks?|wks?|wk|w)?\.?\s*$/i.exec(raw);
  if (!m) return undefined;
  const n = parseNumber(m[1]!, decimal);
  if (n === undefined) return undefined;
  const unit = m[2] ? (/^w/i.test(m[2]) ? 'weeks' : 'days') : (headerUnit ?? 'days');
  return Math.round(unit === 'weeks' ? n * 7 : n);
}

/** Price unit from a "price per" cell: 1, 100, 1000, "pack". */
export function parsePriceUnit(raw: string): PriceUnit | undefined {
  const s = raw.trim().toLowerCase().replace(/^(?:per|\/)\s*/, '');
  if (s === '' || s === '1' || s === 'unit' || s === 'each' || s === 'ea' || s === 'pc' || s === 'pcs' || s === 'piece') return 'unit';
  if (s === '100' || s === 'hundred') return 'per100';
  if (s === '1000' || s === '1,000' || s === '1.000' || s === '1k' || s === 'thousand') return 'per1000';
  if (s === 'pack' || s === 'reel' || s === 'pkg' || s === 'package' || s === 'box' || s === 'bag') return 'pack';
  return undefined;
}

const DATE_ISO = /^(\d{4})[-/](\d{1,2})[-/](\d{1,2})(?:[T ][\d:.]+Z?)?$/;
const DATE_DOTTED = /^(\d{1,2})\.(\d{1,2})\.(\d{4})$/;
const DATE_SLASHED = /^(\d{1,2})[/-](\d{1,2})[/-](\d{4})$/;

function isoDate(y: number, m: number, d: number): string | undefined {
  if (y < 1900 || y > 2999) return undefined;
  const iso = `${String(y).padStart(4, '0')}-${String(m).padStart(2, '0')}-${String(d).padStart(2, '0')}`;
  return isIsoDate(iso) ? iso : undefined;
}

/** Reads a date as YYYY-MM-DD; day.month.year with dots; day and month with slashes in the file's order. */
export function parseDate(raw: string, order: DateOrder): string | undefined {
  const s = raw.trim();
  let m = DATE_ISO.exec(s);
  if (m) return isoDate(Number(m[1]), Number(m[2]), Number(m[3]));
  m = DATE_DOTTED.exec(s);
  if (m) return isoDate(Number(m[3]), Number(m[2]), Number(m[1]));
  m = DATE_SLASHED.exec(s);
  if (m) {
    const [a, b] = [Number(m[1]), Number(m[2])];
    return order === 'dmy' ? isoDate(Number(m[3]), b, a) : isoDate(Number(m[3]), a, b);
  }
  return undefined;
}

/** Which day/month order a slashed date implies, when one of its first two numbers is above 12. */
export function dateOrderVote(raw: string): DateOrder | undefined {
  const m = DATE_SLASHED.exec(raw.trim());
  if (!m) return undefined;
  const [a, b] = [Number(m[1]), Number(m[2])];
  if (a > 12 && b <= 12) return 'dmy';
  if (b > 12 && a <= 12) return 'mdy';
  return undefined;
}

