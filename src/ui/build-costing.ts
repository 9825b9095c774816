// Costing figures the Compare and Rates pages draw, pure (no DOM, no Lit, so Node runs them too): cost split by
// category, the build lines that make two variants differ, run sizes for curves, what-if edits applied to a scratch
// workbook and the Book change that keeps them, and cost settings drafts with their checks.
import type { Book, CostCategory, Quote, Settings } from '../domain/book.ts';
import { COST_CATEGORIES, PART_KINDS } from '../domain/book.ts';
import type { BookChange } from '../domain/book-ops.ts';
import { perUnitFromCents, toCents, toTenThousandths } from '../domain/costing.ts';
import type { CostedBom, ResolvedLine, Result } from '../domain/costing.ts';
import { isIsoDate } from '../domain/dates.ts';
import { LIMITS, isCurrencyCode } from '../domain/schema.ts';
import type { WhatIf } from '../engine/what-if.ts';
import type { FamilyResolution } from '../engine/family.ts';
import { addressText, limitLength } from './record-forms.ts';
import type { FieldProblems, FormResult } from './record-forms.ts';

// ---------------------------------------------------------------------------------------------------------------
// Figures for the pages

/** Parts of a unit cost: the material categories, then the conversion costs. */
export const SPLIT_KEYS = [...COST_CATEGORIES, 'labour', 'test', 'overhead'] as const;
export type SplitKey = (typeof SPLIT_KEYS)[number];
export type CostSplit = Record<SplitKey, number>;

/**
 * A unit cost split by category. Material per category is the category's purchases (base-currency cents) over the run
 * size; the rounding remainder against the costed material goes to the largest category, so the parts add up to the
 * unit cost exactly. Lines of one part bought together count under the first line's category.
 */
export function categorySplit(book: Book, bom: CostedBom): CostSplit {
  const category = new Map(book.buildLines.map((l) => [l.id, l.category] as const));
  const cents = new Map<CostCategory, number>(COST_CATEGORIES.map((c) => [c, 0] as const));
  for (const l of bom.lines) {
    const c = category.get(l.lineIds[0] ?? l.lineId) ?? 'electronics';
    cents.set(c, cents.get(c)! + toCents(l.extendedBase));
  }
  const split = { labour: bom.labour, test: bom.test, overhead: bom.overhead } as CostSplit;
  let sum = 0;
  let largest: CostCategory = COST_CATEGORIES[0];
  for (const c of COST_CATEGORIES) {
    split[c] = perUnitFromCents(cents.get(c)!, bom.run);
    sum += toTenThousandths(split[c]);
    if (split[c] > split[largest]) largest = c;
  }
  split[largest] = (toTenThousandths(split[largest]) + toTenThousandths(bom.material) - sum) / 10_000;
  return split;
}

/** Run sizes for cost curves: the 1-1.5-2-3-5-7 steps of each decade from `low` to `high`, both included. */
export function curveRunSizes(low = 100, high = 20_000): number[] {
  const out = new Set<number>([low, high]);
  for (let decade = 1; decade <= high; decade *= 10) {
    for (const m of [1, 1.5, 2, 3, 5, 7]) {
      const n = Math.round(m * decade);
      if (n > low && n < high) out.add(n);
    }
  }
  return [...out].sort((a, b) => a - b);
}

/** One build line as it differs between two variants, with its effect on the unit cost (B − A). */
export interface LineDifference {
  lineId: string;
  designators: string;
  /** "mpn × qty" or "" where the line does not apply. */
  a: string;
  b: string;
  /** Per-unit cost of the line in each variant, base currency. */
  costA: number;
  costB: number;
  effect: number;
}

export interface VariantDifference {
  lines: LineDifference[];
  /** Material difference not explained by the listed lines (shared lines bought at other quantities or breaks). */
  sharedLines: number;
  labour: number;
  test: number;
  overhead: number;
  /** unitCost B − unitCost A. */
  total: number;
}

/** Per-unit cost of each build line in a costed BOM: a merged purchase is shared by quantity among its lines. */
function lineCosts(bom: CostedBom, qty: (lineId: string) => number): Map<string, number> {
  const out = new Map<string, number>();
  for (const l of bom.lines) {
    for (const id of l.lineIds) {
      const share = l.qtyPerUnit > 0 ? qty(id) / l.qtyPerUnit : 0;
      out.set(id, (l.extendedBase * share) / bom.run);
    }
  }
  return out;
}

/**
 * The build lines that make variant B differ from variant A (applies in one only, or another part or quantity), each
 * with its cost effect at the costed BOMs' run size, and the rest of the unit cost difference in named parts.
 */
export function variantDifference(book: Book, family: FamilyResolution, a: CostedBom, b: CostedBom): VariantDifference {
  const ra = family.variants.find((v) => v.variantId === a.variantId);
  const rb = family.variants.find((v) => v.variantId === b.variantId);
  const mpn = new Map(book.parts.map((p) => [p.id, p.mpn] as const));
  const lineById = new Map(book.buildLines.map((l) => [l.id, l] as const));
  const byA = new Map((ra?.lines ?? []).map((l) => [l.lineId, l] as const));
  const byB = new Map((rb?.lines ?? []).map((l) => [l.lineId, l] as const));
  const costA = lineCosts(a, (id) => byA.get(id)?.qtyPerUnit ?? 0);
  const costB = lineCosts(b, (id) => byB.get(id)?.qtyPerUnit ?? 0);
  const shown = (l: ResolvedLine | undefined): string =>
    !l || !l.applies || !(l.qtyPerUnit > 0) ? '' : `${l.partId ? (mpn.get(l.partId) ?? l.partId) : '(no part)'} × ${Number(l.qtyPerUnit.toPrecision(6))}`;
  const lines: LineDifference[] = [];
  const ids = [...new Set([...byA.keys(), ...byB.keys()])].sort(
    (x, y) => (lineById.get(x)?.position ?? 0) - (lineById.get(y)?.position ?? 0) || x.localeCompare(y),
  );
  let explained = 0;
  for (const id of ids) {
    const sa = shown(byA.get(id));
    const sb = shown(byB.get(id));
    if (sa === sb) continue;
    const ca = costA.get(id) ?? 0;
    const cb = costB.get(id) ?? 0;
    explained += cb - ca;
    lines.push({ lineId: id, designators: lineById.get(id)?.designators ?? id, a: sa, b: sb, costA: ca, costB: cb, effect: cb - ca });
  }
  return {
    lines,
    sharedLines: b.material - a.material - explained,
    labour: b.labour - a.labour,
    test: b.test - a.test,
    overhead: b.overhead - a.overhead,
    total: b.unitCost - a.unitCost,
  };
}

// ---------------------------------------------------------------------------------------------------------------
// What-if edits

export const COST_SETTINGS = [
  { name: 'labourRatePerHour', label: 'labour rate per hour', unit: 'money' },
  { name: 'labourMinutesPerUnit', label: 'labour minutes per unit', unit: 'min' },
  { name: 'labourMinutesPerPlacement', label: 'labour minutes per placement', unit: 'min' },
  { name: 'testCostPerUnit', label: 'test cost per unit', unit: 'money' },
  { name: 'overheadPct', label: 'overhead % of labour', unit: '%' },
  { name: 'marginPct', label: 'margin % of price', unit: '%' },
] as const;
export type CostSettingName = (typeof COST_SETTINGS)[number]['name'];

export { emptyWhatIf } from '../engine/what-if.ts';
export type { WhatIf } from '../engine/what-if.ts';

export function whatIfCount(w: WhatIf): number {
  return w.prices.size + w.rates.size + w.settings.size + (w.runSizes ? 1 : 0);
}

/** The Book change that keeps the what-if edits: changed quotes at the revision they were read, and the settings. */
export function keepWhatIf(book: Book, w: WhatIf): BookChange {
  const quotes = new Map<string, Quote>();
  for (const [key, price] of w.prices) {
    const [quoteId, at] = key.split('#');
    const held = quotes.get(quoteId!) ?? book.quotes.find((q) => q.id === quoteId);
    if (!held) continue;
    const breaks = held.breaks.map((b, i) => (i === Number(at) ? { ...b, price } : b));
    quotes.set(held.id, { ...held, breaks });
  }
  const change: BookChange = {};
  if (quotes.size > 0) change.put = { quotes: [...quotes.values()] };
  if (w.rates.size > 0 || w.settings.size > 0 || w.runSizes) {
    const s: Settings = { ...book.settings, rates: { ...book.settings.rates } };
    for (const [c, rate] of w.rates) s.rates[c] = rate;
    for (const [name, value] of w.settings) s[name] = value;
    if (w.runSizes) s.runSizes = [...w.runSizes];
    change.settings = s;
  }
  return change;
}

/** Reads a list of run sizes ("500, 2 000, 10000"): whole numbers ≥ 1, no repeats, at most 8, sorted. */
export function readRunSizes(text: string): Result<number[]> {
  const items = text
    .split(/[,;]/)
    .map((s) => s.replace(/[\s_']/g, ''))
    .filter((s) => s !== '');
  if (items.length === 0) return { ok: false, error: 'give at least one run size, for example 500, 2000, 10000' };
  if (items.length > 8) return { ok: false, error: `at most 8 run sizes are costed together, got ${items.length}` };
  const out: number[] = [];
  for (const s of items) {
    const n = Number(s);
    if (!/^\d+$/.test(s) || !Number.isSafeInteger(n) || n < 1) return { ok: false, error: `“${s}” is not a whole number of units ≥ 1` };
    if (out.includes(n)) return { ok: false, error: `${n} is listed twice` };
    out.push(n);
  }
  return { ok: true, value: out.sort((a, b) => a - b) };
}

// ---------------------------------------------------------------------------------------------------------------
// Cost settings drafts (the Rates page)

export interface SettingsDraft {
  baseCurrency: string;
  /** Currency → rate as typed. */
  rates: Record<string, string>;
  newCurrency: string;
  newRate: string;
  runSizes: string;
  labourRatePerHour: string;
  labourMinutesPerUnit: string;
  labourMinutesPerPlacement: string;
  testCostPerUnit: string;
  overheadPct: string;
  marginPct: string;
  /** Part kind (or 'default') → percent as typed. */
  attrition: Record<string, string>;
  costingDate: string;
  /** Our firm's name and the delivery address, as printed on our orders to suppliers. */
  company: string;
  shipTo: string;
}


/** Currencies a Book uses: base, rates, suppliers and quotes, base first then by code. */
export function currenciesInUse(book: Book): string[] {
  const set = new Set<string>([...Object.keys(book.settings.rates), ...book.suppliers.map((s) => s.currency), ...book.quotes.map((q) => q.currency)]);
  set.delete(book.settings.baseCurrency);
  return [book.settings.baseCurrency, ...[...set].sort()];
}

function pct(fraction: number | undefined): string {
  return fraction === undefined ? '' : String(Number((fraction * 100).toPrecision(6)));
}

export function settingsDraft(book: Book): SettingsDraft {
  const s = book.settings;
  const rates: Record<string, string> = {};
  for (const c of currenciesInUse(book)) rates[c] = c === s.baseCurrency ? '1' : s.rates[c] === undefined ? '' : String(s.rates[c]);
  const attrition: Record<string, string> = { default: pct(s.attrition['default']) };
  for (const k of PART_KINDS) attrition[k] = pct(s.attrition[k]);
  return {
    baseCurrency: s.baseCurrency,
    rates,
    newCurrency: '',
    newRate: '',
    runSizes: s.runSizes.join(', '),
    labourRatePerHour: String(s.labourRatePerHour),
    labourMinutesPerUnit: String(s.labourMinutesPerUnit),
    labourMinutesPerPlacement: String(s.labourMinutesPerPlacement),
    testCostPerUnit: String(s.testCostPerUnit),
    overheadPct: String(s.overheadPct),
    marginPct: String(s.marginPct),
    attrition,
    costingDate: s.costingDate ?? '',
    company: s.company,
    shipTo: s.shipTo ?? '',
  };
}

/** Checks a settings draft; gives the new settings (same rev as read) or messages keyed by field. */
export function validateSettings(d: SettingsDraft, book: Book): FormResult<Settings> {
  const problems: FieldProblems = {};
  const base = d.baseCurrency.trim().toUpperCase();
  if (!isCurrencyCode(base)) problems.baseCurrency = 'three capital letters, as in ISO 4217 (EUR, USD, GBP…)';
  const rates: Record<string, number> = {};
  if (isCurrencyCode(base)) rates[base] = 1;
  const used = new Set([...book.suppliers.map((s) => s.currency), ...book.quotes.map((q) => q.currency)]);
  for (const [c, text] of Object.entries(d.rates)) {
    if (c === base) continue;
    const t = text.trim();
    if (t === '') {
      if (used.has(c)) problems[`rate:${c}`] = `suppliers or quotes are in ${c}; give how many ${base} one ${c} is worth`;
      continue;
    }
    const n = Number(t);
    if (!Number.isFinite(n) || n <= 0) problems[`rate:${c}`] = `a number above 0: ${base} for one ${c}`;
    else rates[c] = n;
  }
  const nc = d.newCurrency.trim().toUpperCase();
  if (nc !== '' || d.newRate.trim() !== '') {
    const n = Number(d.newRate.trim());
    if (!isCurrencyCode(nc)) problems.newCurrency = 'three capital letters, as in ISO 4217';
    else if (nc in d.rates) problems.newCurrency = `${nc} is listed already; change its rate above`;
    else if (d.newRate.trim() === '' || !Number.isFinite(n) || n <= 0) problems.newRate = `a number above 0: ${base} for one ${nc}`;
    else rates[nc] = n;
  }
  const runs = readRunSizes(d.runSizes);
  if (!runs.ok) problems.runSizes = runs.error;

  const numbers: Partial<Record<CostSettingName, number>> = {};
  for (const { name, label } of COST_SETTINGS) {
    const t = d[name].trim().replace(/\s*%$/, '');
    const n = t === '' ? NaN : Number(t);
    if (!Number.isFinite(n) || n < 0) problems[name] = `${label}: a number, 0 or more`;
    else if (name === 'marginPct' && n >= 100) problems[name] = 'below 100 (price = cost / (1 − margin))';
    else if (name === 'overheadPct' && n > 10_000) problems[name] = 'at most 10 000 %';
    else numbers[name] = n;
  }

  const attrition: Record<string, number> = {};
  for (const [kind, text] of Object.entries(d.attrition)) {
    const t = text.trim().replace(/\s*%$/, '');
    if (t === '') {
      if (kind === 'default') problems['attrition:default'] = 'give a default, for example 1 %';
      continue;
    }
    const n = Number(t);
    if (!Number.isFinite(n) || n < 0 || n >= 100) problems[`attrition:${kind}`] = 'a percentage from 0 up to (not including) 100';
    else attrition[kind] = Number((n / 100).toPrecision(12));
  }

  const date = d.costingDate.trim();
  if (date !== '' && !isIsoDate(date)) problems.costingDate = 'a date as YYYY-MM-DD, or blank for today';
  const company = d.company.trim();
  if (/[\r\n]/.test(company)) problems.company = 'one line: the firm’s name as printed on orders';
  else limitLength(problems, 'company', company, LIMITS.name);
  const shipTo = addressText(problems, 'shipTo', d.shipTo);

  if (Object.keys(problems).length > 0) return { ok: false, problems };
  const record: Settings = {
    ...book.settings,
    baseCurrency: base,
    rates,
    runSizes: runs.ok ? runs.value : book.settings.runSizes,
    labourRatePerHour: numbers.labourRatePerHour!,
    labourMinutesPerUnit: numbers.labourMinutesPerUnit!,
    labourMinutesPerPlacement: numbers.labourMinutesPerPlacement!,
    testCostPerUnit: numbers.testCostPerUnit!,
    overheadPct: numbers.overheadPct!,
    marginPct: numbers.marginPct!,
    attrition,
    company,
  };
  if (shipTo === '') delete record.shipTo;
  else record.shipTo = shipTo;
  if (date === '') delete record.costingDate;
  else record.costingDate = date;
  return { ok: true, record };
}
