// The undo stack of record edits: each step undoes and redoes as one Book change, a new step forgets what was
// undone, and a step whose records changed elsewhere is refused with a message and changes nothing.
import { describe, expect, it } from 'vitest';
import type { Book, Variant } from '../../src/domain/book.ts';
import { emptyBook } from '../../src/domain/book.ts';
import { applyChange } from '../../src/domain/book-ops.ts';
import type { BookChange } from '../../src/domain/book-ops.ts';
import { UndoStack, sameRecord, stepChange } from '../../src/ui/undo.ts';
import type { UndoStep } from '../../src/ui/undo.ts';

function variant(id: string, code: string, params: Variant['params'] = {}): Variant {
  return { id, rev: 0, code, name: `Variant ${code}`, params };
}

function apply(book: Book, change: BookChange): Book {
  const r = applyChange(book, change);
  if (!r.ok) throw new Error(`revision conflict on ${r.conflict.recordId}`);
  return r.book;
}

/** Saves a step forward the way a page does: a change from `before` to `after`, then remembers it. */
function saveStep(book: Book, stack: UndoStack<Variant>, step: UndoStep<Variant>): Book {
  const plan = stepChange(book, 'variants', step, 'redo', (v) => v.code);
  if (!plan.ok) throw new Error(plan.message);
  const next = apply(book, plan.change);
  stack.record(step);
  return next;
}

function undo(book: Book, stack: UndoStack<Variant>, direction: 'undo' | 'redo'): Book {
  const step = stack.peek(direction)!;
  const plan = stepChange(book, 'variants', step, direction, (v) => v.code);
  if (!plan.ok) throw new Error(plan.message);
  stack.settle(direction);
  return apply(book, plan.change);
}

const codes = (b: Book): string[] => b.variants.map((v) => `${v.code}:${String(v.params.load_w ?? '')}`).sort();

describe('UndoStack with stepChange', () => {
  it('undoes and redoes an edit, a paste of three new variants and a delete, each as one change', () => {
    const a = variant('v_a', 'A', { load_w: 40 });
    let book: Book = { ...emptyBook(), variants: [{ ...a, rev: 1 }] };
    const stack = new UndoStack<Variant>();

    const held = book.variants[0]!;
    book = saveStep(book, stack, { label: 'edit load_w of A', changes: [{ id: a.id, before: held, after: { ...held, params: { load_w: 60 } } }] });
    const pasted = [variant('v_b', 'B'), variant('v_c', 'C'), variant('v_d', 'D')];
    book = saveStep(book, stack, { label: 'paste 3 rows', changes: pasted.map((v) => ({ id: v.id, before: undefined, after: v })) });
    expect(codes(book)).toEqual(['A:60', 'B:', 'C:', 'D:']);
    const c = book.variants.find((v) => v.id === 'v_c')!;
    book = saveStep(book, stack, { label: 'delete C', changes: [{ id: c.id, before: c, after: undefined }] });
    expect(codes(book)).toEqual(['A:60', 'B:', 'D:']);
    expect(stack.size).toEqual({ undo: 3, redo: 0 });

    book = undo(book, stack, 'undo');
    expect(codes(book)).toEqual(['A:60', 'B:', 'C:', 'D:']);
    book = undo(book, stack, 'undo');
    expect(codes(book)).toEqual(['A:60']);
    book = undo(book, stack, 'undo');
    expect(codes(book)).toEqual(['A:40']);
    expect(stack.canUndo()).toBe(false);

    book = undo(book, stack, 'redo');
    book = undo(book, stack, 'redo');
    expect(codes(book)).toEqual(['A:60', 'B:', 'C:', 'D:']);
    expect(stack.peek('redo')?.label).toBe('delete C');
    expect(stack.peek('undo')?.label).toBe('paste 3 rows');
  });

  it('forgets the undone steps when a new step is recorded', () => {
    let book: Book = { ...emptyBook(), variants: [{ ...variant('v_a', 'A', { load_w: 40 }), rev: 1 }] };
    const stack = new UndoStack<Variant>();
    const at = (b: Book) => b.variants[0]!;
    book = saveStep(book, stack, { label: 'first', changes: [{ id: 'v_a', before: at(book), after: { ...at(book), params: { load_w: 50 } } }] });
    book = undo(book, stack, 'undo');
    expect(stack.canRedo()).toBe(true);
    book = saveStep(book, stack, { label: 'second', changes: [{ id: 'v_a', before: at(book), after: { ...at(book), params: { load_w: 70 } } }] });
    expect(stack.canRedo()).toBe(false);
    expect(codes(book)).toEqual(['A:70']);
  });

  it('keeps no step that changes nothing and at most its limit of steps', () => {
    const stack = new UndoStack<Variant>(2);
    const a = variant('v_a', 'A');
    stack.record({ label: 'nothing', changes: [{ id: a.id, before: { ...a, rev: 3 }, after: { ...a, rev: 4 } }] });
    expect(stack.canUndo()).toBe(false);
    for (const n of [1, 2, 3]) stack.record({ label: `step ${n}`, changes: [{ id: a.id, before: a, after: { ...a, name: `n${n}` } }] });
    expect(stack.size.undo).toBe(2);
    expect(stack.peek('undo')?.label).toBe('step 3');
  });

  it('refuses to undo a step whose record was changed since, naming it, and leaves the stack as it was', () => {
    let book: Book = { ...emptyBook(), variants: [{ ...variant('v_a', 'A', { load_w: 40 }), rev: 1 }] };
    const stack = new UndoStack<Variant>();
    const held = book.variants[0]!;
    book = saveStep(book, stack, { label: 'edit load_w of A', changes: [{ id: 'v_a', before: held, after: { ...held, params: { load_w: 60 } } }] });
    // Another page (or tab) edits the same variant.
    const now = book.variants[0]!;
    book = apply(book, { put: { variants: [{ ...now, name: 'renamed elsewhere' }] } });
    const plan = stepChange(book, 'variants', stack.peek('undo')!, 'undo', (v) => v.code);
    expect(plan.ok).toBe(false);
    if (!plan.ok) expect(plan.message).toBe('“edit load_w of A” cannot be undone: A was changed since. Nothing was changed.');
    expect(stack.size).toEqual({ undo: 1, redo: 0 });

    // A record deleted elsewhere is named too.
    book = apply(book, { delete: { variants: ['v_a'] } });
    const gone = stepChange(book, 'variants', stack.peek('undo')!, 'undo', (v) => v.code);
    expect(gone.ok).toBe(false);
    if (!gone.ok) expect(gone.message).toMatch(/A was deleted since/);
  });

  it('compares records by content, not by key order or revision', () => {
    const a: Variant = { id: 'x', rev: 1, code: 'A', name: 'n', params: { steps: 3, load_w: 40 } };
    const b: Variant = { params: { load_w: 40, steps: 3 }, name: 'n', code: 'A', rev: 7, id: 'x' };
    expect(sameRecord(a, b)).toBe(true);
    expect(sameRecord(a, { ...b, params: { load_w: 41, steps: 3 } })).toBe(false);
    expect(sameRecord(a, undefined)).toBe(false);
    expect(sameRecord<Variant>(undefined, undefined)).toBe(true);
  });
});
