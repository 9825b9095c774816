// Production run records: the checks that turn a form draft into a Run, freezing a run's costing (a snapshot that
// keeps the prices, quotes and rates it was costed with), reading a snapshot back, and comparing a frozen costing
// with a fresh one ("what would change if re-costed today"), line by line and in the totals.
import type { Book, FrozenRun, Run, Settings } from './book.ts';
import type { CostedBom, CostedLine, Result } from './costing.ts';
import { toCents, toTenThousandths } from './costing.ts';
import { isIsoDate } from './dates.ts';
import { checkWith, FrozenSnapshotSchema, LIMITS, SNAPSHOT_FORMAT, SNAPSHOT_VERSION } from './schema.ts';
import type { FrozenSettings, FrozenSnapshot } from './schema.ts';
import { grouped } from './format.ts';

// ---------------------------------------------------------------------------------------------------------------
// Run drafts

export interface RunDraft {
  name: string;
  variantId: string;
  quantity: string;
  dateWanted: string;
  notes: string;
}

/** Field name → message for that field. Empty when the draft is good. */
export type RunProblems = Partial<Record<keyof RunDraft, string>>;

export type RunFormResult = { ok: true; record: Run } | { ok: false; problems: RunProblems };

/** Largest run accepted: far above any run of a small maker, low enough that every figure stays exact. */
export const MAX_RUN_QUANTITY = LIMITS.runQuantity;
/** A run's texts are bounded by the Book's limits, so the form never saves what the Book file reader refuses. */
const MAX_NAME = LIMITS.name;
const MAX_NOTES = LIMITS.notes;

export function runDraft(run?: Run): RunDraft {
  return run
    ? { name: run.name, variantId: run.variantId, quantity: String(run.quantity), dateWanted: run.dateWanted, notes: run.notes }
    : { name: '', variantId: '', quantity: '', dateWanted: '', notes: '' };
}

/**
 * Checks a run draft against the Book. A frozen run keeps its variant and quantity (its snapshot was costed for
 * them): changing either is refused until the run is unfrozen. `newId` names a new run.
 */
export function validateRun(draft: RunDraft, book: Book, editing?: Run, newId?: () => string): RunFormResult {
  const problems: RunProblems = {};
  const name = draft.name.trim();
  if (name === '') problems.name = 'name is required';
  else if (name.length > MAX_NAME) problems.name = `name is ${grouped(name.length)} characters long; at most ${grouped(MAX_NAME)} are allowed`;
  else if (book.runs.some((r) => r.id !== editing?.id && r.name.trim().toLowerCase() === name.toLowerCase())) {
    problems.name = `another run is already called ${name}`;
  }
  const variant = book.variants.find((v) => v.id === draft.variantId);
  if (draft.variantId === '') problems.variantId = 'choose the variant to build';
  else if (!variant) problems.variantId = 'that variant is no longer in the Book';
  const qtyText = draft.quantity.trim().replace(/[\s\u202f_]/g, '');
  const quantity = /^\d+$/.test(qtyText) ? Number(qtyText) : NaN;
  if (draft.quantity.trim() === '') problems.quantity = 'quantity is required';
  else if (!Number.isSafeInteger(quantity) || quantity < 1) problems.quantity = `quantity must be a whole number of units ≥ 1, got “${draft.quantity.trim()}”`;
  else if (quantity > MAX_RUN_QUANTITY) problems.quantity = `quantity must be at most ${grouped(MAX_RUN_QUANTITY)}`;
  const date = draft.dateWanted.trim();
  if (date === '') problems.dateWanted = 'date wanted is required';
  else if (!isIsoDate(date)) problems.dateWanted = `date wanted must be a calendar date YYYY-MM-DD, got “${date}”`;
  if (draft.notes.trim().length > MAX_NOTES) problems.notes = `notes are ${grouped(draft.notes.trim().length)} characters long; at most ${grouped(MAX_NOTES)} are allowed`;
  if (editing?.frozen) {
    if (!problems.variantId && draft.variantId !== editing.variantId) problems.variantId = 'this run is frozen: unfreeze it before changing the variant';
    if (!problems.quantity && quantity !== editing.quantity) problems.quantity = 'this run is frozen: unfreeze it before changing the quantity';
  }
  if (Object.keys(problems).length > 0) return { ok: false, problems };
  const record: Run = {
    id: editing?.id ?? (newId ? newId() : `run_${Date.now().toString(36)}`),
    rev: editing?.rev ?? 0,
    name,
    variantId: draft.variantId,
    quantity,
    dateWanted: date,
    notes: draft.notes.trim(),
  };
  if (editing?.frozen) record.frozen = editing.frozen;
  // Editing a built run keeps it built; its parts were issued on that date.
  if (editing?.status !== undefined) record.status = editing.status;
  if (editing?.builtDate !== undefined) record.builtDate = editing.builtDate;
  return { ok: true, record };
}

// ---------------------------------------------------------------------------------------------------------------
// Snapshots

export { SNAPSHOT_FORMAT, SNAPSHOT_VERSION } from './schema.ts';
export type { FrozenSettings, FrozenSnapshot } from './schema.ts';

function frozenSettings(s: Settings): FrozenSettings {
  return {
    baseCurrency: s.baseCurrency,
    rates: { ...s.rates },
    labourRatePerHour: s.labourRatePerHour,
    labourMinutesPerUnit: s.labourMinutesPerUnit,
    labourMinutesPerPlacement: s.labourMinutesPerPlacement,
    testCostPerUnit: s.testCostPerUnit,
    overheadPct: s.overheadPct,
    marginPct: s.marginPct,
  };
}

/** A deep copy through JSON: the snapshot must not share objects with the live Book. */
function copy<T>(x: T): T {
  return JSON.parse(JSON.stringify(x)) as T;
}

/**
 * The run with its costing frozen. Refused when the costing is for another variant or quantity, or when some line
 * could not be priced (a frozen costing with holes would be mistaken for a whole one later).
 */
export function freezeRun(run: Run, bom: CostedBom, book: Book, at: Date = new Date()): Result<Run> {
  if (run.frozen) return { ok: false, error: `run ${run.name} is already frozen (since ${run.frozen.at}); unfreeze it first` };
  if (bom.variantId !== run.variantId || bom.run !== run.quantity) {
    return { ok: false, error: `the costing is for ${bom.variant} × ${bom.run}, not for this run's variant and quantity` };
  }
  if (!bom.complete) {
    const n = bom.problems.length;
    return { ok: false, error: `${n} line${n === 1 ? '' : 's'} could not be priced, so the costing is not frozen: ${bom.problems[0]?.message ?? ''}` };
  }
  const used = new Set(bom.lines.map((l) => l.quoteId));
  const usedParts = new Set(bom.lines.map((l) => l.partId));
  const snapshot: FrozenSnapshot = {
    format: SNAPSHOT_FORMAT,
    version: SNAPSHOT_VERSION,
    bom: copy(bom),
    quotes: copy(book.quotes.filter((q) => used.has(q.id))),
    parts: copy(book.parts.filter((p) => usedParts.has(p.id))),
    settings: frozenSettings(book.settings),
  };
  // A snapshot the Book file reader would refuse (figures beyond LIMITS.money at extreme rates) is never saved.
  const checked = checkWith(FrozenSnapshotSchema, snapshot);
  if (!checked.ok) {
    const p = checked.problems[0]!;
    return { ok: false, error: `the costing is beyond what a Book keeps, so it is not frozen: ${p.path ? `${p.path} ` : ''}${p.message}` };
  }
  return { ok: true, value: { ...run, frozen: { at: at.toISOString(), snapshot } } };
}

/** The run without its frozen costing: it is costed from today's quotes again. */
export function unfreezeRun(run: Run): Run {
  const { frozen: _frozen, ...rest } = run;
  return rest;
}

/**
 * Reads a frozen run's snapshot (it comes from storage or a Book file, so it is checked, not trusted). A snapshot
 * this version cannot read gives an error naming the first bad field; nothing is guessed.
 */
export function readSnapshot(frozen: FrozenRun): Result<FrozenSnapshot> {
  const r = checkWith(FrozenSnapshotSchema, frozen.snapshot);
  if (r.ok) return { ok: true, value: r.value };
  const p = r.problems[0]!;
  return { ok: false, error: `the frozen costing cannot be read: ${p.path ? `${p.path} ` : ''}${p.message}` };
}

// ---------------------------------------------------------------------------------------------------------------
// Frozen against fresh

export const LINE_CHANGE = { same: 'same', changed: 'changed', added: 'added', removed: 'removed' } as const;
export type LineChangeKind = (typeof LINE_CHANGE)[keyof typeof LINE_CHANGE];

/** Fields of a costed line whose change is reported. */
export const COMPARED_LINE_FIELDS = ['need', 'buy', 'supplier', 'supplierCode', 'breakQty', 'unitPrice', 'currency', 'extendedBase', 'leadDays'] as const;
export type ComparedLineField = (typeof COMPARED_LINE_FIELDS)[number];

export interface LineChange {
  kind: LineChangeKind;
  designators: string;
  mpn: string;
  frozen: CostedLine | undefined;
  fresh: CostedLine | undefined;
  /** Fields that differ, for a changed line. */
  fields: ComparedLineField[];
  /** fresh − frozen extended cost in the base currency, exact to the cent (a missing side counts as 0). */
  deltaBase: number;
}

/** Totals compared: per-unit figures at 4 decimals, run amounts at 2. */
export const COMPARED_TOTALS = ['material', 'labour', 'test', 'overhead', 'unitCost', 'price', 'materialRun', 'runTotal', 'leftoverValue'] as const;
export type ComparedTotal = (typeof COMPARED_TOTALS)[number];
const RUN_AMOUNTS: ReadonlySet<ComparedTotal> = new Set(['materialRun', 'runTotal', 'leftoverValue']);

export interface TotalChange {
  field: ComparedTotal;
  frozen: number;
  fresh: number;
  /** fresh − frozen, exact at the figure's own precision. */
  delta: number;
}

export interface CostingComparison {
  lines: LineChange[];
  totals: TotalChange[];
  /** Lines that cannot be priced today (the fresh costing's problems). */
  freshProblems: CostedBom['problems'];
  /** True when nothing differs: every line the same and every total equal. */
  unchanged: boolean;
  /** A different base currency makes money deltas meaningless; they are then not computed. */
  currencyChanged: boolean;
}

function lineKey(l: CostedLine): string {
  return `${l.partId}\u0000${[...l.lineIds].sort().join(',')}`;
}

function sameValue(a: CostedLine, b: CostedLine, f: ComparedLineField): boolean {
  if (f === 'extendedBase' || f === 'unitPrice') return toTenThousandths(a[f] * 100) === toTenThousandths(b[f] * 100);
  return a[f] === b[f];
}

/**
 * What would change if the frozen costing were made again today: lines matched by part and build lines (a line
 * that changed part shows as removed and added), every total with its difference.
 */
export function compareCostings(frozen: CostedBom, fresh: CostedBom): CostingComparison {
  const currencyChanged = frozen.currency !== fresh.currency;
  const freshByKey = new Map(fresh.lines.map((l) => [lineKey(l), l] as const));
  const seen = new Set<string>();
  const lines: LineChange[] = [];
  for (const a of frozen.lines) {
    const key = lineKey(a);
    const b = freshByKey.get(key);
    if (!b) {
      lines.push({ kind: LINE_CHANGE.removed, designators: a.designators, mpn: a.mpn, frozen: a, fresh: undefined, fields: [], deltaBase: -a.extendedBase });
      continue;
    }
    seen.add(key);
    const fields = COMPARED_LINE_FIELDS.filter((f) => !sameValue(a, b, f));
    lines.push({
      kind: fields.length ? LINE_CHANGE.changed : LINE_CHANGE.same,
      designators: b.designators,
      mpn: b.mpn,
      frozen: a,
      fresh: b,
      fields,
      deltaBase: (toCents(b.extendedBase) - toCents(a.extendedBase)) / 100,
    });
  }
  for (const b of fresh.lines) {
    if (seen.has(lineKey(b))) continue;
    lines.push({ kind: LINE_CHANGE.added, designators: b.designators, mpn: b.mpn, frozen: undefined, fresh: b, fields: [], deltaBase: b.extendedBase });
  }
  const totals = COMPARED_TOTALS.map((field): TotalChange => {
    const x = frozen[field];
    const y = fresh[field];
    const delta = RUN_AMOUNTS.has(field) ? (toCents(y) - toCents(x)) / 100 : (toTenThousandths(y) - toTenThousandths(x)) / 10_000;
    return { field, frozen: x, fresh: y, delta: currencyChanged ? NaN : delta };
  });
  const unchanged =
    !currencyChanged && fresh.problems.length === 0 && lines.every((l) => l.kind === LINE_CHANGE.same) && totals.every((t) => t.delta === 0);
  return { lines, totals, freshProblems: fresh.problems, unchanged, currencyChanged };
}
