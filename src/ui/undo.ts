// Undo and redo for record edits made on a page: each step remembers every record it touched as it was before and
// after, and turns into ONE BookChange when undone or redone. Pure (no DOM), so it is tested in Node.
import type { Book, CollectionName, CollectionRecord } from '../domain/book.ts';
import type { BookChange } from '../domain/book-ops.ts';

/** One record as a step found it and left it; undefined means absent (added by the step, or deleted by it). */
export interface RecordChange<R> {
  id: string;
  before: R | undefined;
  after: R | undefined;
}

export interface UndoStep<R> {
  /** What the step did, in words for the Undo and Redo buttons ("edit load_w of FR3-40-CD"). */
  label: string;
  changes: RecordChange<R>[];
  /** The collection of the records, for a stack whose steps touch more than one. */
  collection?: CollectionName;
}

export const DIRECTIONS = { undo: 'undo', redo: 'redo' } as const;
export type Direction = (typeof DIRECTIONS)[keyof typeof DIRECTIONS];

export type StepPlan = { ok: true; change: BookChange } | { ok: false; message: string };

/** Two undo stacks (done and undone) with a limit; recording a new step forgets what was undone. */
export class UndoStack<R extends { rev: number }> {
  private done: UndoStep<R>[] = [];
  private undone: UndoStep<R>[] = [];

  constructor(private readonly limit = 200) {}

  /** Remembers a step that was just saved. A step that changes nothing is not kept. */
  record(step: UndoStep<R>): void {
    const changes = step.changes.filter((c) => !sameRecord(c.before, c.after));
    if (changes.length === 0) return;
    this.done.push({ ...step, changes });
    if (this.done.length > this.limit) this.done.splice(0, this.done.length - this.limit);
    this.undone = [];
  }

  /** The step the next undo (or redo) would apply. */
  peek(direction: Direction): UndoStep<R> | undefined {
    const list = direction === DIRECTIONS.undo ? this.done : this.undone;
    return list[list.length - 1];
  }

  canUndo(): boolean {
    return this.done.length > 0;
  }

  canRedo(): boolean {
    return this.undone.length > 0;
  }

  /** Call once the step from `peek(direction)` was saved: it moves to the other stack. */
  settle(direction: Direction): void {
    const from = direction === DIRECTIONS.undo ? this.done : this.undone;
    const to = direction === DIRECTIONS.undo ? this.undone : this.done;
    const step = from.pop();
    if (step) to.push(step);
  }

  /** Forgets a step that can no longer be applied (its records changed elsewhere). */
  drop(direction: Direction): void {
    (direction === DIRECTIONS.undo ? this.done : this.undone).pop();
  }

  clear(): void {
    this.done = [];
    this.undone = [];
  }

  get size(): { undo: number; redo: number } {
    return { undo: this.done.length, redo: this.undone.length };
  }
}

/** JSON with keys in sorted order, so two copies of a record compare equal however their keys were written. */
function stableJson(value: unknown): string {
  return JSON.stringify(value, (_k, v: unknown) => {
    if (v && typeof v === 'object' && !Array.isArray(v)) {
      const out: Record<string, unknown> = {};
      for (const k of Object.keys(v).sort()) out[k] = (v as Record<string, unknown>)[k];
      return out;
    }
    return v;
  });
}

/** Same content apart from the revision (which rises on every save, including the step's own). */
export function sameRecord<R extends { rev: number }>(a: R | undefined, b: R | undefined): boolean {
  if (a === undefined || b === undefined) return a === b;
  return stableJson({ ...a, rev: 0 }) === stableJson({ ...b, rev: 0 });
}

/**
 * The Book change that applies a step backwards (undo) or forwards (redo) to the Book as it is now. Every record must
 * still be as the step left it; if one was changed since (on another page or in another tab) nothing is applied and
 * the message names it. Records are written from their current revision; a record brought back carries rev 0.
 */
export function stepChange<C extends CollectionName>(
  book: Book,
  collection: C,
  step: UndoStep<CollectionRecord<C>>,
  direction: Direction,
  describe: (r: CollectionRecord<C>) => string = (r) => r.id,
): StepPlan {
  const held = new Map<string, CollectionRecord<C>>();
  for (const r of book[collection] as readonly CollectionRecord<C>[]) held.set(r.id, r);
  const puts: CollectionRecord<C>[] = [];
  const deletes: string[] = [];
  const verb = direction === DIRECTIONS.undo ? 'undone' : 'redone';
  for (const c of step.changes) {
    const from = direction === DIRECTIONS.undo ? c.after : c.before;
    const to = direction === DIRECTIONS.undo ? c.before : c.after;
    const now = held.get(c.id);
    if (!sameRecord(now, from)) {
      const who = describe((now ?? from ?? to)!);
      const what = now === undefined ? 'was deleted since' : from === undefined ? 'exists again since' : 'was changed since';
      return { ok: false, message: `“${step.label}” cannot be ${verb}: ${who} ${what}. Nothing was changed.` };
    }
    if (to === undefined) deletes.push(c.id);
    else puts.push({ ...to, rev: now?.rev ?? 0 });
  }
  const change: BookChange = {};
  if (puts.length) change.put = { [collection]: puts } as BookChange['put'];
  if (deletes.length) change.delete = { [collection]: deletes } as BookChange['delete'];
  return { ok: true, change };
}
