// Checks every row of a price file and turns the good ones into offers (one future quote each), before anything is
// written. `analysePriceFile` is the whole read side: bytes → text → table → mapping → offers and problems. It needs
// no Book, only the currencies the Book can convert, so it runs unchanged in a Web Worker and in Node.
import type { ColumnMapping, PriceBreak } from '../domain/book.ts';
import { mpnKey } from '../domain/book.ts';
import { LIMITS, isCurrencyCode } from '../domain/schema.ts';
import type { EncodingChoice } from './price-decode.ts';
import {
  dateOrderVote,
  decimalVote,
  parseDate,
  parseLeadDays,
  parseNumber,
  parsePriceUnit,
  parseQty,
  resolveMapping,
  splitMoney,
} from './price-map.ts';
import type { DateOrder, Decimal, LeadUnit, PriceField, PriceProblem, PriceUnit, ResolvedMapping } from './price-map.ts';
import { DELIMITER_NAMES, readTableBytes } from './price-read.ts';
import type { DecodeNotes, Delimiter, ReadOptions, TableRow } from './price-read.ts';

/** One supplier offer read from the file: everything a Quote needs except the part, supplier and ids. */
export interface PriceOffer {
  /** First file line of the offer (long layout: its first break row). */
  line: number;
  /** Matching key: maker part number normalised, or the supplier code. */
  key: string;
  mpn: string;
  supplierCode: string;
  description: string;
  maker: string;
  currency: string;
  breaks: PriceBreak[];
  moq: number;
  pack: number;
  leadDays: number;
  date: string;
  expires?: string;
}

export interface AnalyseOptions {
  /** How to read the bytes (default: find out). */
  encoding?: EncodingChoice;
  /** Saved or confirmed mapping; its headers win over guesses. */
  mapping?: ColumnMapping;
  /** Overrides the decimal mark decided from the data. */
  decimal?: Decimal;
  dateOrder?: DateOrder;
  /** Overrides the price unit found in headers or the mapping. */
  priceUnit?: PriceUnit;
  /** Unit of bare lead time numbers when the header does not say. */
  leadUnit?: LeadUnit;
  delimiter?: Delimiter;
  /** Currency of prices that name none: the supplier's. */
  defaultCurrency: string;
  /** Currencies the Book has rates for; any other is refused. */
  knownCurrencies: readonly string[];
  /** Quote date used when the file gives none (YYYY-MM-DD). */
  today: string;
  /** Mapping keys the person set to "not used": never guessed from header words. */
  unused?: readonly string[];
}

export interface PriceAnalysis extends DecodeNotes {
  /** False when the file could not be read at all (empty, binary, no header): there is nothing to preview. */
  readable: boolean;
  delimiter?: Delimiter;
  delimiterName?: string;
  headerLine: number;
  headers: string[];
  layout: 'wide' | 'long';
  /** Columns as resolved, to show for confirmation and to remember on the supplier. */
  mapping: ColumnMapping;
  decimal: Decimal;
  /** Why that decimal mark: shown to the user. */
  decimalReason: string;
  dateOrder: DateOrder;
  /** Data rows read (blank and comment lines not counted). */
  dataRows: number;
  /** Offers from rows without problems. */
  offers: PriceOffer[];
  /** Offers left out because one of their rows has a problem. */
  rejectedOffers: number;
  problems: PriceProblem[];
  notes: string[];
  /** SHA-256 of the file bytes, lower-case hex. */
  hash: string;
  bytes: number;
}

export async function sha256Hex(bytes: Uint8Array): Promise<string> {
  const digest = await globalThis.crypto.subtle.digest('SHA-256', bytes as Uint8Array<ArrayBuffer>);
  const out: string[] = [];
  for (const b of new Uint8Array(digest)) out.push(b.toString(16).padStart(2, '0'));
  return out.join('');
}

function emptyAnalysis(hash: string, bytes: number, problems: PriceProblem[]): PriceAnalysis {
  return {
    readable: false,
    headerLine: 0,
    headers: [],
    layout: 'long',
    mapping: { columns: {}, layout: 'long' },
    decimal: '.',
    decimalReason: '',
    dateOrder: 'dmy',
    dataRows: 0,
    offers: [],
    rejectedOffers: 0,
    problems,
    notes: [],
    hash,
    bytes,
  };
}

/** Reads and checks a price file. Progress is reported in rows read (reading is most of the time). */
export async function analysePriceFile(
  bytes: Uint8Array,
  options: AnalyseOptions,
  onRows?: (rows: number) => void,
): Promise<PriceAnalysis> {
  const hash = await sha256Hex(bytes);
  const readOptions: ReadOptions = {};
  if (options.mapping) readOptions.mapping = options.mapping;
  if (options.delimiter) readOptions.delimiter = options.delimiter;
  if (onRows) readOptions.onRows = onRows;
  const { read, notes: decodeNotes } = readTableBytes(bytes, options.encoding, readOptions);
  if (!read.ok) return { ...emptyAnalysis(hash, bytes.length, read.problems), ...decodeNotes };
  const t = read.table;
  const map = resolveMapping(t.headers, t.headerLine, options.mapping, options.unused);
  // Until the columns are settled (no price or part column, an ambiguous duplicate), checking rows would only
  // repeat the same complaint on every line: report the mapping problems alone.
  const mappingBlocked = map.problems.length > 0;
  const checked = checkRows(mappingBlocked ? [] : t.rows, t.headers, map, options, t.delimiter);
  const problems = [...t.problems, ...map.problems, ...checked.problems].sort((a, b) => a.row - b.row);
  // A row that could not be split right (too many cells) must not yield an offer even under "valid rows only".
  const badLines = new Set(t.problems.map((p) => p.row));
  const offers = badLines.size === 0 ? checked.offers : checked.offers.filter((_, i) => !checked.offerLines[i]!.some((l) => badLines.has(l)));
  const mapping: ColumnMapping = { ...map.saved, decimal: checked.decimal };
  return {
    readable: true,
    ...decodeNotes,
    delimiter: t.delimiter,
    delimiterName: DELIMITER_NAMES[t.delimiter],
    headerLine: t.headerLine,
    headers: t.headers,
    layout: map.layout,
    mapping,
    decimal: checked.decimal,
    decimalReason: checked.decimalReason,
    dateOrder: checked.dateOrder,
    dataRows: t.rows.length,
    offers,
    rejectedOffers: checked.rejected + (checked.offers.length - offers.length),
    problems,
    notes: [...t.notes, ...map.notes, ...checked.notes],
    hash,
    bytes: bytes.length,
  };
}

/** Text fields of an offer and the Book's limit for each. */
const TEXT_LIMITS = [
  ['mpn', LIMITS.name],
  ['supplierCode', LIMITS.name],
  ['maker', LIMITS.name],
  ['description', LIMITS.description],
] as const;

interface Checked {
  offers: PriceOffer[];
  /** The file lines of each offer, by its place in `offers`. */
  offerLines: number[][];
  rejected: number;
  problems: PriceProblem[];
  notes: string[];
  decimal: Decimal;
  decimalReason: string;
  dateOrder: DateOrder;
}

/** The file's decimal mark: as chosen, else by the number cells that can only be read one way, else by the saved mapping or the delimiter. */
export function decideDecimal(rows: TableRow[], cols: number[], options: Pick<AnalyseOptions, 'decimal' | 'mapping'>, delimiter: Delimiter): { decimal: Decimal; reason: string; note?: string } {
  if (options.decimal) return { decimal: options.decimal, reason: `decimal ${options.decimal === ',' ? 'comma' : 'point'} as you chose` };
  let point = 0;
  let comma = 0;
  for (const r of rows) {
    for (const c of cols) {
      const cell = r.cells[c];
      if (!cell) continue;
      const v = decimalVote(splitMoney(cell).text);
      if (v === '.') point++;
      else if (v === ',') comma++;
    }
  }
  const name = (d: Decimal): string => (d === ',' ? 'comma' : 'point');
  if (point || comma) {
    const decimal: Decimal = comma > point ? ',' : '.';
    const other = decimal === ',' ? point : comma;
    const out: { decimal: Decimal; reason: string; note?: string } = {
      decimal,
      reason: `decimal ${name(decimal)}: ${Math.max(point, comma)} number cell(s) can only be read that way`,
    };
    if (other) out.note = `${other} number cell(s) look like decimal ${name(decimal === ',' ? '.' : ',')} instead; they are checked as decimal ${name(decimal)}`;
    return out;
  }
  if (options.mapping?.decimal) return { decimal: options.mapping.decimal, reason: `decimal ${name(options.mapping.decimal)} from the supplier's saved mapping (the numbers alone do not tell)` };
  if (delimiter === ';') return { decimal: ',', reason: 'decimal comma: the numbers alone do not tell, and semicolon-separated files usually use it' };
  return { decimal: '.', reason: 'decimal point: the numbers alone do not tell' };
}

function decideDateOrder(rows: TableRow[], cols: number[], options: AnalyseOptions): { order: DateOrder; note?: string } {
  if (options.dateOrder) return { order: options.dateOrder };
  let dmy = 0;
  let mdy = 0;
  let slashed = 0;
  for (const r of rows) {
    for (const c of cols) {
      const cell = r.cells[c];
      if (!cell) continue;
      if (/^\s*\d{1,2}[/-]\d{1,2}[/-]\d{4}\s*$/.test(cell)) slashed++;
      const v = dateOrderVote(cell);
      if (v === 'dmy') dmy++;
      else if (v === 'mdy') mdy++;
    }
  }
  if (mdy > dmy) return { order: 'mdy', note: 'dates with slashes read as month/day/year' };
  if (dmy > 0) return { order: 'dmy', note: 'dates with slashes read as day/month/year' };
  if (slashed) return { order: 'dmy', note: 'dates with slashes read as day/month/year (the file does not settle it; choose the order if that is wrong)' };
  return { order: 'dmy' };
}

const UNIT_DIVISOR: Record<Exclude<PriceUnit, 'pack'>, number> = { unit: 1, per100: 100, per1000: 1000 };

/** Rounds away binary noise from a division (0.0123 rather than 0.012300000000000002). */
function tidy(n: number): number {
  return Number(n.toPrecision(12));
}

function checkRows(rows: TableRow[], headers: string[], map: ResolvedMapping, options: AnalyseOptions, delimiter: Delimiter): Checked {
  const f = map.fields;
  const problems: PriceProblem[] = [];
  const notes: string[] = [];
  const numberCols = [
    ...[f.qty, f.price, f.moq, f.pack].filter((c): c is number => c !== undefined),
    ...map.breaks.flatMap((b) => (b.qtyCol === undefined ? [b.priceCol] : [b.qtyCol, b.priceCol])),
  ];
  const dec = decideDecimal(rows, numberCols, options, delimiter);
  if (dec.note) notes.push(dec.note);
  const dateCols = [f.date, f.expires].filter((c): c is number => c !== undefined);
  const dates = decideDateOrder(rows, dateCols, options);
  if (dates.note) notes.push(dates.note);
  const decimal = dec.decimal;
  const known = new Set(options.knownCurrencies);
  const fixedUnit = options.priceUnit ?? map.priceUnit;
  const leadUnit = map.leadUnit ?? options.leadUnit;

  const cell = (r: TableRow, col: number | undefined): string => (col === undefined ? '' : (r.cells[col] ?? '').trim());
  const problem = (r: TableRow, col: number | undefined, reason: string): false => {
    problems.push({ row: r.line, column: col === undefined ? '' : headers[col]!, value: col === undefined ? '' : cell(r, col).slice(0, 200), reason });
    return false;
  };

  /** Fields every row of an offer shares (long layout: they must agree). */
  interface Common {
    mpn: string;
    supplierCode: string;
    description: string;
    maker: string;
    currency?: string;
    moq?: number;
    pack?: number;
    leadDays?: number;
    date?: string;
    expires?: string;
    unit: PriceUnit;
  }

  const readCommon = (r: TableRow): Common | undefined => {
    let ok = true;
    const c: Common = {
      mpn: cell(r, f.mpn),
      supplierCode: cell(r, f.supplierCode),
      description: cell(r, f.description),
      maker: cell(r, f.maker),
      unit: fixedUnit ?? 'unit',
    };
    if (c.mpn === '' && c.supplierCode === '') ok = problem(r, f.mpn ?? f.supplierCode, 'no maker part number or supplier code on this row');
    // The Book's own limits: an offer the Book file reader would refuse is never imported.
    for (const [field, max] of TEXT_LIMITS) {
      if (c[field].length > max) ok = problem(r, f[field], `is ${c[field].length.toLocaleString('en-GB')} characters long; at most ${max.toLocaleString('en-GB')} are allowed`);
    }
    if (f.currency !== undefined && cell(r, f.currency) !== '') {
      const raw = cell(r, f.currency);
      const code = ({ '€': 'EUR', $: 'USD', '£': 'GBP' } as Record<string, string>)[raw] ?? raw.toUpperCase();
      if (!isCurrencyCode(code)) ok = problem(r, f.currency, 'not an ISO 4217 currency code (three letters such as EUR) or a € $ £ sign');
      else c.currency = code;
    }
    if (f.moq !== undefined && cell(r, f.moq) !== '') {
      const n = parseQty(cell(r, f.moq), decimal);
      if (n === undefined || !Number.isInteger(n) || n <= 0) ok = problem(r, f.moq, 'MOQ must be a whole number above zero');
      else if (n > LIMITS.quantity) ok = problem(r, f.moq, `MOQ must be at most ${LIMITS.quantity.toLocaleString('en-GB')}`);
      else c.moq = n;
    }
    if (f.pack !== undefined && cell(r, f.pack) !== '') {
      const n = parseQty(cell(r, f.pack), decimal);
      if (n === undefined || !Number.isInteger(n) || n <= 0) ok = problem(r, f.pack, 'pack quantity must be a whole number above zero');
      else if (n > LIMITS.quantity) ok = problem(r, f.pack, `pack quantity must be at most ${LIMITS.quantity.toLocaleString('en-GB')}`);
      else c.pack = n;
    }
    if (f.leadTime !== undefined && cell(r, f.leadTime) !== '') {
      const n = parseLeadDays(cell(r, f.leadTime), decimal, leadUnit);
      if (n === undefined || n < 0) ok = problem(r, f.leadTime, "lead time must be a number of days or weeks ('28', '28 days', '4 wk')");
      else if (n > LIMITS.leadDays) ok = problem(r, f.leadTime, `lead time must be at most ${LIMITS.leadDays.toLocaleString('en-GB')} days`);
      else c.leadDays = n;
    }
    if (f.date !== undefined && cell(r, f.date) !== '') {
      const d = parseDate(cell(r, f.date), dates.order);
      if (!d) ok = problem(r, f.date, 'not a date: use YYYY-MM-DD (or DD.MM.YYYY)');
      else c.date = d;
    }
    if (f.expires !== undefined && cell(r, f.expires) !== '') {
      const d = parseDate(cell(r, f.expires), dates.order);
      if (!d) ok = problem(r, f.expires, 'not a date: use YYYY-MM-DD (or DD.MM.YYYY)');
      else c.expires = d;
    }
    if (f.priceUnit !== undefined && cell(r, f.priceUnit) !== '' && !options.priceUnit) {
      const u = parsePriceUnit(cell(r, f.priceUnit));
      if (!u) ok = problem(r, f.priceUnit, "price unit must be 1, 100, 1000 or 'pack'");
      else c.unit = u;
    }
    return ok ? c : undefined;
  };

  /** Reads one price cell to a unit price in a currency; undefined (with a problem) when it cannot. */
  const readPrice = (r: TableRow, col: number, c: Common): { price: number; currency: string } | undefined => {
    const raw = cell(r, col);
    if (raw === '') return void problem(r, col, 'price is missing');
    const money = splitMoney(raw);
    if (money.conflict) return void problem(r, col, `the cell names two currencies (${money.conflict})`);
    const n = parseNumber(money.text, decimal);
    if (n === undefined) return void problem(r, col, `price is not a number (read with decimal ${decimal === ',' ? 'comma' : 'point'})`);
    if (n <= 0) return void problem(r, col, 'price must be above zero');
    const currency = c.currency ?? money.currency ?? map.headerCurrency ?? options.defaultCurrency;
    if (c.currency && money.currency && c.currency !== money.currency) {
      return void problem(r, col, `the price is marked ${money.currency} but the currency column says ${c.currency}`);
    }
    if (!known.has(currency)) {
      return void problem(r, col, `unknown currency ${currency}: the Book has exchange rates for ${[...known].sort().join(', ') || 'none'}; add a rate first`);
    }
    let price: number;
    if (c.unit === 'pack') {
      if (c.pack === undefined) return void problem(r, col, 'prices are per pack but the row gives no pack quantity');
      price = tidy(n / c.pack);
    } else price = UNIT_DIVISOR[c.unit] === 1 ? n : tidy(n / UNIT_DIVISOR[c.unit]);
    if (!(price <= LIMITS.price)) return void problem(r, col, `a unit price must be at most ${LIMITS.price.toLocaleString('en-GB')}, not ${price}`);
    return { price, currency };
  };

  const readBreakQty = (r: TableRow, col: number): number | undefined => {
    const raw = cell(r, col);
    if (raw === '') return void problem(r, col, 'break quantity is missing');
    const n = parseQty(raw, decimal);
    if (n === undefined) return void problem(r, col, 'break quantity is not a number');
    if (n <= 0) return void problem(r, col, 'break quantity must be above zero');
    if (!Number.isInteger(n)) return void problem(r, col, 'break quantity must be a whole number');
    if (n > LIMITS.quantity) return void problem(r, col, `break quantity must be at most ${LIMITS.quantity.toLocaleString('en-GB')}`);
    return n;
  };

  const offers: PriceOffer[] = [];
  const offerLines: number[][] = [];
  let rejected = 0;

  const finish = (c: Common, key: string, breaks: PriceBreak[], currencies: string[], line: number, lines: number[], r: TableRow, firstCol: number | undefined): boolean => {
    if (breaks.length === 0) return problem(r, firstCol, 'no price break on this row');
    if (breaks.length > LIMITS.breaks) return problem(r, firstCol, `${breaks.length} price breaks for one part; a quote may have at most ${LIMITS.breaks}`);
    // Nearly always one currency: the list of distinct ones is only built when two differ.
    const distinct = currencies.every((x) => x === currencies[0]) ? currencies.slice(0, 1) : [...new Set(currencies)];
    if (distinct.length > 1) return problem(r, firstCol, `price breaks of one part in different currencies (${distinct.join(', ')})`);
    if (c.date && c.expires && c.expires < c.date) return problem(r, f.expires, `expires (${c.expires}) before the quote date (${c.date})`);
    const offer: PriceOffer = {
      line,
      key,
      mpn: c.mpn,
      supplierCode: c.supplierCode,
      description: c.description,
      maker: c.maker,
      currency: distinct[0]!,
      breaks,
      moq: c.moq ?? breaks[0]!.qty,
      pack: c.pack ?? 1,
      leadDays: c.leadDays ?? 0,
      date: c.date ?? options.today,
    };
    if (c.expires) offer.expires = c.expires;
    offers.push(offer);
    offerLines.push(lines);
    return true;
  };

  if (map.layout === 'wide') {
    const seen = new Map<string, number>();
    for (const r of rows) {
      const c = readCommon(r);
      let ok = c !== undefined;
      const breaks: PriceBreak[] = [];
      const currencies: string[] = [];
      let prev: { qty: number; col: number } | undefined;
      for (const b of map.breaks) {
        const qtyRaw = b.qtyCol === undefined ? '' : cell(r, b.qtyCol);
        const priceRaw = cell(r, b.priceCol);
        if (qtyRaw === '' && priceRaw === '') continue;
        if (b.qtyCol !== undefined && qtyRaw === '') {
          ok = problem(r, b.qtyCol, 'price without a break quantity');
          continue;
        }
        const qty = b.fixedQty ?? readBreakQty(r, b.qtyCol!);
        const p = c ? readPrice(r, b.priceCol, c) : undefined;
        if (qty === undefined || !p) {
          ok = false;
          continue;
        }
        const qtyCol = b.qtyCol ?? b.priceCol;
        if (prev && qty === prev.qty) ok = problem(r, qtyCol, `break quantity ${qty} is given twice`);
        else if (prev && qty < prev.qty) ok = problem(r, qtyCol, `break quantity ${qty} is below the previous break (${prev.qty}): breaks out of order`);
        prev = { qty, col: qtyCol };
        breaks.push({ qty, price: p.price });
        currencies.push(p.currency);
      }
      if (ok && c) {
        const key = c.mpn ? `mpn:${mpnKey(c.mpn)}` : `code:${c.supplierCode.toUpperCase()}`;
        const earlier = seen.get(key);
        if (earlier !== undefined) {
          ok = problem(r, f.mpn ?? f.supplierCode, `the same part is already on line ${earlier}`);
        } else {
          seen.set(key, r.line);
          ok = finish(c, key, breaks, currencies, r.line, [r.line], r, map.breaks[0]?.qtyCol ?? map.breaks[0]?.priceCol);
        }
      }
      if (!ok) rejected++;
    }
  } else {
    // Long layout: one row per break; rows of the same part (by maker part number, else supplier code) form one quote.
    interface Group {
      key: string;
      first: TableRow;
      common?: Common;
      rows: { r: TableRow; qty: number; price: number; currency: string; moq: number | undefined }[];
      ok: boolean;
    }
    const groups = new Map<string, Group>();
    const order: Group[] = [];
    const raisedBreaks: string[] = [];
    const mergedBreaks: string[] = [];
    for (const r of rows) {
      const c = readCommon(r);
      const key = cell(r, f.mpn) ? `mpn:${mpnKey(cell(r, f.mpn))}` : `code:${cell(r, f.supplierCode).toUpperCase()}`;
      let g = groups.get(key);
      if (!g) {
        g = { key, first: r, rows: [], ok: true };
        if (c) g.common = c;
        groups.set(key, g);
        order.push(g);
      }
      if (!c) {
        g.ok = false;
        continue;
      }
      if (!g.common) g.common = c;
      else if (g.ok) {
        const shared = g.common;
        const part = cell(g.first, f.mpn) || cell(g.first, f.supplierCode);
        const agree = (field: PriceField, a: unknown, b: unknown): void => {
          if (b === undefined || a === b) return;
          if (a === undefined) return;
          g!.ok = problem(r, f[field], `differs from line ${g!.first.line} for the same part ${part} (${String(a)})`);
        };
        // An MOQ may differ from row to row: distributor files often give one per price break (see below).
        agree('pack', shared.pack, c.pack);
        agree('leadTime', shared.leadDays, c.leadDays);
        agree('date', shared.date, c.date);
        agree('expires', shared.expires, c.expires);
        if (shared.pack === undefined) shared.pack = c.pack;
        if (shared.leadDays === undefined) shared.leadDays = c.leadDays;
        if (shared.date === undefined) shared.date = c.date;
        if (shared.expires === undefined) shared.expires = c.expires;
        if (!shared.description) shared.description = c.description;
        if (!shared.supplierCode) shared.supplierCode = c.supplierCode;
        if (!shared.maker) shared.maker = c.maker;
      }
      const qty = f.qty === undefined ? (c.moq ?? 1) : readBreakQty(r, f.qty);
      const p = readPrice(r, f.price!, c);
      if (qty === undefined || !p) {
        g.ok = false;
        continue;
      }
      g.rows.push({ r, qty, price: p.price, currency: p.currency, moq: c.moq });
    }
    for (const g of order) {
      if (!g.ok || !g.common) {
        rejected++;
        continue;
      }
      const breaks: PriceBreak[] = [];
      let ok = true;
      for (let i = 0; i < g.rows.length; i++) {
        const x = g.rows[i]!;
        const prev = g.rows[i - 1];
        if (prev && x.qty === prev.qty) ok = problem(x.r, f.qty, `break quantity ${x.qty} is given twice for this part (also line ${prev.r.line})`);
        else if (prev && x.qty < prev.qty) ok = problem(x.r, f.qty, `break quantity ${x.qty} is below the previous break (${prev.qty}, line ${prev.r.line}): breaks out of order`);
        breaks.push({ qty: x.qty, price: x.price });
      }
      const lines = g.rows.map((x) => x.r.line);
      if (ok && g.rows.length > 0) {
        const part = cell(g.first, f.mpn) || cell(g.first, f.supplierCode);
        const perBreak = perBreakMoq(part, g.rows);
        breaks.splice(0, breaks.length, ...perBreak.breaks);
        g.common.moq = perBreak.moq;
        raisedBreaks.push(...perBreak.raised);
        mergedBreaks.push(...perBreak.merged);
      }
      if (!ok || !finish(g.common, g.key, breaks, g.rows.map((x) => x.currency), g.first.line, lines, g.rows[0]?.r ?? g.first, f.price)) rejected++;
    }
    const listed = (items: readonly string[]): string => `${items.slice(0, NOTE_ITEMS).join('; ')}${items.length > NOTE_ITEMS ? `; and ${items.length - NOTE_ITEMS} more` : ''}`;
    if (raisedBreaks.length > 0) {
      notes.push(`${raisedBreaks.length} price break(s) start at their own MOQ, above the break quantity the file gives: ${listed(raisedBreaks)}`);
    }
    if (mergedBreaks.length > 0) {
      notes.push(`${mergedBreaks.length} price break(s) then fell on the quantity of another break of the same part; the cheaper price is kept: ${listed(mergedBreaks)}`);
    }
  }
  return { offers, offerLines, rejected, problems, notes, decimal, decimalReason: dec.reason, dateOrder: dates.order };
}

/** How many parts or breaks a note names before it says "and n more". */
const NOTE_ITEMS = 5;

/**
 * The breaks and MOQ of a long-layout quote. When every row of the part that gives an MOQ gives the same one, it is the
 * quote's MOQ and the breaks stay as the file gives them. When the rows give different MOQs, the file gives one per
 * price break (common practice in distributor files: each break sells from its own minimum), and a break whose MOQ is
 * above its quantity cannot be bought below that MOQ, so it starts there: its quantity is raised to the MOQ. The
 * breaks are then put in quantity order; two that fall on one quantity keep the cheaper price. The quote's MOQ is the
 * MOQ of its smallest break (undefined when that row gives none, and the quote takes its first break's quantity).
 * Rows are in rising quantity order, as the caller has checked.
 */
export function perBreakMoq(
  part: string,
  rows: readonly { r: { line: number }; qty: number; price: number; moq: number | undefined }[],
): { breaks: PriceBreak[]; moq: number | undefined; raised: string[]; merged: string[] } {
  const raised: string[] = [];
  const merged: string[] = [];
  const given = [...new Set(rows.map((x) => x.moq).filter((m) => m !== undefined))];
  if (given.length <= 1) return { breaks: rows.map((x) => ({ qty: x.qty, price: x.price })), moq: given[0], raised, merged };
  const starts = rows.map((x) => {
    if (x.moq !== undefined && x.moq > x.qty) {
      raised.push(`${part}, break at ${x.qty} (line ${x.r.line}) starts at its MOQ ${x.moq}`);
      return { qty: x.moq, price: x.price, moq: x.moq as number | undefined, line: x.r.line };
    }
    return { qty: x.qty, price: x.price, moq: x.moq, line: x.r.line };
  });
  starts.sort((a, b) => a.qty - b.qty || a.line - b.line);
  const kept: typeof starts = [];
  for (const b of starts) {
    const same = kept.at(-1);
    if (same && same.qty === b.qty) {
      const [keep, drop] = b.price < same.price ? [b, same] : [same, b];
      merged.push(`${part}, lines ${same.line} and ${b.line} both at ${b.qty}: kept ${keep.price} (line ${keep.line}), left out ${drop.price}`);
      kept[kept.length - 1] = keep;
    } else kept.push(b);
  }
  return { breaks: kept.map((b) => ({ qty: b.qty, price: b.price })), moq: kept[0]!.moq, raised, merged };
}
