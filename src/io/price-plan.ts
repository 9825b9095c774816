// Turns checked offers into one all-or-nothing change: offers matched to parts (maker part number, else the
// supplier's own code from earlier quotes), new quotes, the quotes they supersede, new parts where the user chose so,
// the import batch, and the supplier with its remembered mapping. Nothing here writes; the caller applies the change.
import type { Book, ImportBatch, Part, Quote, Supplier } from '../domain/book.ts';
import { mpnKey } from '../domain/book.ts';
import { currentQuoteIndex, findReimport, supersede } from '../domain/quotes.ts';
import type { BookChange } from '../domain/book-ops.ts';
import { ITEMS_PER_LOOK, runAtOnce, runInSlices, whenIdle } from '../domain/slices.ts';
import type { Sliced } from '../domain/slices.ts';
import type { PriceProblem } from './price-map.ts';
import type { PriceAnalysis, PriceOffer } from './price-validate.ts';

export const UNMATCHED_DECISIONS = ['create', 'skip'] as const;
export type UnmatchedDecision = (typeof UNMATCHED_DECISIONS)[number];

export interface PlanOptions {
  supplierId: string;
  fileName: string;
  /** Time of the import, ISO 8601. */
  at: string;
  /** What to do with each unmatched offer, by its key (PriceOffer.key). */
  decisions?: Record<string, UnmatchedDecision>;
  /** Decision for unmatched offers not in `decisions`; default skip. */
  createParts?: boolean;
  /** Import the offers without problems even though some rows have problems. An explicit choice, never a default. */
  validRowsOnly?: boolean;
  /** Import a file already imported for this supplier (same content hash, batch not undone). */
  allowReimport?: boolean;
  /** Remember the resolved column mapping on the supplier (default true). */
  rememberMapping?: boolean;
}

export interface UnmatchedOffer {
  key: string;
  line: number;
  mpn: string;
  supplierCode: string;
  description: string;
  decision: UnmatchedDecision;
  /** Why a "create" could not be honoured (no maker part number to name the part by). */
  note?: string;
}

export interface ImportPlan {
  ok: boolean;
  /** The change to apply in one transaction; present only when ok. */
  change?: BookChange;
  /** Why there is no plan, in one sentence. */
  reason?: string;
  problems: PriceProblem[];
  unmatched: UnmatchedOffer[];
  matchedByMpn: number;
  matchedByCode: number;
  newQuotes: number;
  supersededQuotes: number;
  newParts: number;
  skippedOffers: number;
  /**
   * Superseded quotes that had a pack or MOQ above 1 while the file has no column for it: their successors fall back
   * to pack 1 or the first break, so the person is told before importing.
   */
  lostPackOrMoq: number;
  reimportOf?: ImportBatch;
  batchId?: string;
}

/**
 * Record ids like newId's, drawn from one block of random bytes at a time: one crypto call per id costs more than the
 * rest of planning a 50,000-row file. Twelve base-36 digits keep collisions negligible at that size.
 */
const BASE36 = '0123456789abcdefghijklmnopqrstuvwxyz';

function idMaker(): (prefix: string) => string {
  const ID_DIGITS = 12;
  let pool = new Uint8Array(0);
  let at = 0;
  const codes: number[] = [];
  return (prefix) => {
    if (at + ID_DIGITS > pool.length) {
      pool = new Uint8Array(ID_DIGITS * 4096);
      globalThis.crypto.getRandomValues(pool);
      at = 0;
    }
    codes.length = 0;
    for (let i = 0; i < prefix.length; i++) codes.push(prefix.charCodeAt(i));
    codes.push(95); // '_'
    for (let i = 0; i < ID_DIGITS; i++) codes.push(BASE36.charCodeAt(pool[at++]! % 36));
    // One flat string: an id joined piece by piece is a chain of pieces, which every copy into storage (each quote,
    // the import batch naming all 75,000) must first join, on the page's thread.
    return String.fromCharCode(...codes);
  };
}

/** Parts by normalised maker part number and by this supplier's order codes, for matching many offers quickly. */
function* matchIndex(book: Book, supplierId: string): Sliced<{ byMpn: Map<string, Part>; byCode: Map<string, Part> }> {
  const byMpn = new Map<string, Part>();
  const partById = new Map<string, Part>();
  let n = 0;
  for (const p of book.parts) {
    const k = mpnKey(p.mpn);
    if (k && !byMpn.has(k)) byMpn.set(k, p);
    partById.set(p.id, p);
    if (++n % ITEMS_PER_LOOK === 0) yield;
  }
  const byCode = new Map<string, Part>();
  // Later quotes win, so a code reused for another part follows the newest quote.
  for (const q of book.quotes) {
    if (++n % ITEMS_PER_LOOK === 0) yield;
    if (q.supplierId !== supplierId || !q.supplierCode) continue;
    const part = partById.get(q.partId);
    if (part) byCode.set(q.supplierCode.trim().toUpperCase(), part);
  }
  return { byMpn, byCode };
}

/**
 * currentQuoteIndex a part of the quotes at a time (a Book of 25,000 quotes held the page for 20-50 ms): each part's
 * lists are added to the whole index in order, so it is the very index of all the quotes at once.
 */
function* currentQuoteIndexSteps(quotes: readonly Quote[]): Sliced<Map<string, Quote[]>> {
  const index = new Map<string, Quote[]>();
  const PART = ITEMS_PER_LOOK * 4;
  for (let i = 0; i < quotes.length; i += PART) {
    for (const [k, list] of currentQuoteIndex(quotes.slice(i, i + PART))) {
      const held = index.get(k);
      if (held) for (const q of list) held.push(q);
      else index.set(k, list);
    }
    yield;
  }
  return index;
}

function newPart(o: PriceOffer, newId: (prefix: string) => string): Part {
  return {
    id: newId('part'),
    rev: 0,
    mpn: o.mpn,
    maker: o.maker,
    description: o.description,
    kind: 'other',
    ratings: {},
    package: '',
  };
}

/** A plan that imports nothing (yet): no change, every count 0. */
export function noPlan(problems: PriceProblem[] = [], reason?: string): ImportPlan {
  const plan: ImportPlan = {
    ok: false,
    problems,
    unmatched: [],
    matchedByMpn: 0,
    matchedByCode: 0,
    newQuotes: 0,
    supersededQuotes: 0,
    newParts: 0,
    skippedOffers: 0,
    lostPackOrMoq: 0,
  };
  if (reason !== undefined) plan.reason = reason;
  return plan;
}

/** The import plan, worked out at once (the command line, tests). */
export function planImport(book: Book, analysis: PriceAnalysis, options: PlanOptions): ImportPlan {
  return runAtOnce(planSteps(book, analysis, options));
}

/**
 * The page's time per slice of planning. The plan follows the read, which made the 50,000 offers on the page's thread:
 * the collector then copies them in pauses of 20–45 ms that land in a slice, and a slice of the usual 12 ms with such
 * a pause made a task over 50 ms in five imports of eight in Chromium here (one in eight with 6 ms slices).
 */
const PLAN_SLICE_MS = 6;

/**
 * The import plan, worked out a slice at a time so the page draws and answers meanwhile. It starts when the page is
 * next idle (100 ms at most), where the browser may fit a collection of what the read left before the first slice.
 */
export async function planImportInSlices(book: Book, analysis: PriceAnalysis, options: PlanOptions, signal?: AbortSignal): Promise<ImportPlan> {
  await whenIdle(100);
  signal?.throwIfAborted();
  return runInSlices(planSteps(book, analysis, options), signal ? { signal, budgetMs: PLAN_SLICE_MS } : { budgetMs: PLAN_SLICE_MS });
}

function* planSteps(book: Book, analysis: PriceAnalysis, options: PlanOptions): Sliced<ImportPlan> {
  const plan = noPlan([...analysis.problems]);
  const supplier = book.suppliers.find((s) => s.id === options.supplierId);
  if (!supplier) return { ...plan, reason: `no supplier with id ${options.supplierId} in the Book` };
  if (!analysis.readable) return { ...plan, reason: analysis.problems[0]?.reason ?? 'the file could not be read' };

  const reimport = findReimport(book, analysis.hash, supplier.id);
  if (reimport) plan.reimportOf = reimport;

  const newId = idMaker();
  const { byMpn, byCode } = yield* matchIndex(book, supplier.id);
  const claimed = new Map<string, PriceOffer>();
  const quotedTwice = new Set<string>();
  const matched: { offer: PriceOffer; part: Part }[] = [];
  const created: Part[] = [];
  let n = 0;
  for (const o of analysis.offers) {
    if (++n % ITEMS_PER_LOOK === 0) yield;
    // Offer keys are 'mpn:' + mpnKey(mpn) whenever the row has a maker part number.
    let part = o.mpn ? byMpn.get(o.key.slice(4)) : undefined;
    if (part) plan.matchedByMpn++;
    else if (o.supplierCode) {
      part = byCode.get(o.supplierCode.toUpperCase());
      if (part) plan.matchedByCode++;
    }
    if (!part) {
      const decision = options.decisions?.[o.key] ?? (options.createParts ? 'create' : 'skip');
      const u: UnmatchedOffer = { key: o.key, line: o.line, mpn: o.mpn, supplierCode: o.supplierCode, description: o.description, decision };
      plan.unmatched.push(u);
      if (decision === 'create' && !o.mpn) {
        u.decision = 'skip';
        u.note = 'a new part needs a maker part number; this row has only a supplier code';
      }
      if (u.decision === 'skip') {
        plan.skippedOffers++;
        continue;
      }
      part = newPart(o, newId);
      created.push(part);
      byMpn.set(o.key.slice(4), part);
    }
    const earlier = claimed.get(part.id);
    if (earlier) {
      quotedTwice.add(part.id);
      plan.problems.push({
        row: o.line,
        column: '',
        value: o.mpn || o.supplierCode,
        reason: `line ${earlier.line} already gives prices for part ${part.mpn}; one file may quote a part once`,
      });
      continue;
    }
    claimed.set(part.id, o);
    matched.push({ offer: o, part });
  }
  plan.problems.sort((a, b) => a.row - b.row);

  if (plan.problems.length > 0 && !options.validRowsOnly) {
    return {
      ...plan,
      reason: `${plan.problems.length} problem(s) found; nothing is imported unless every row is valid (or you choose to import only the valid rows)`,
    };
  }
  if (reimport && !options.allowReimport) {
    return { ...plan, reason: `this file was already imported for ${supplier.name} on ${reimport.at} (${reimport.fileName}); undo that import or choose to import it again` };
  }
  // With "valid rows only", a part quoted twice keeps neither offer: which one is right is the user's call.
  const chosen = matched.filter((m) => !quotedTwice.has(m.part.id));
  if (chosen.length === 0) return { ...plan, reason: 'nothing to import: no row was matched to a part or chosen to create one' };

  const batchId = newId('batch');
  yield;
  const index = yield* currentQuoteIndexSteps(book.quotes);
  yield;
  const quotes: Quote[] = [];
  const old: Quote[] = [];
  const noPack = analysis.mapping.columns['pack'] === undefined;
  const noMoq = analysis.mapping.columns['moq'] === undefined;
  let lostPackOrMoq = 0;
  for (const { offer, part } of chosen) {
    if (++n % ITEMS_PER_LOOK === 0) yield;
    const q: Quote = {
      id: newId('quote'),
      rev: 0,
      partId: part.id,
      supplierId: supplier.id,
      supplierCode: offer.supplierCode,
      currency: offer.currency,
      breaks: offer.breaks,
      moq: offer.moq,
      pack: offer.pack,
      leadDays: offer.leadDays,
      date: offer.date,
      source: options.fileName,
      batchId,
    };
    if (offer.expires) q.expires = offer.expires;
    quotes.push(q);
    const replaced = supersede(index, q);
    old.push(...replaced);
    if (replaced.some((r) => (noPack && r.pack > 1 && q.pack !== r.pack) || (noMoq && r.moq > 1 && q.moq !== r.moq))) lostPackOrMoq++;
  }
  // Each step below goes over every quote or part once: a slice apart, so together they do not hold the page.
  yield;
  const batch: ImportBatch = {
    id: batchId,
    rev: 0,
    fileName: options.fileName,
    hash: analysis.hash,
    supplierId: supplier.id,
    rows: analysis.dataRows,
    at: options.at,
    created: quotes.map((q) => q.id),
    superseded: old.map((q) => q.id),
  };
  yield;
  const suppliers: Supplier[] = options.rememberMapping === false ? [] : [{ ...supplier, mapping: analysis.mapping }];
  const usedParts = new Set(chosen.map((m) => m.part.id));
  yield;
  const parts = created.filter((p) => usedParts.has(p.id));
  const change: BookChange = {
    put: { parts, suppliers, quotes: [...old, ...quotes], importBatches: [batch] },
  };
  return {
    ...plan,
    ok: true,
    change,
    batchId,
    newQuotes: quotes.length,
    supersededQuotes: old.length,
    newParts: parts.length,
    lostPackOrMoq,
  };
}
