// The pure draft rules behind the Build page's form: attrition typed in percent, the part kept by its part number,
// the fields a build line needs, moving lines up, and each line's summary across the variants. (The page itself is driven in tests/browser/build-lines.test.ts.)
import { describe, expect, it } from 'vitest';
import { demoBook } from '../../src/domain/demo-book.ts';
import { resolveFamily } from '../../src/engine/family.ts';
import { trialOutcomes } from '../../src/engine/line-trial.ts';
import type { Book, BuildLine } from '../../src/domain/book.ts';
import { buildLineDraft, lineOutcomes, lineSummaries, moveLine, orderedLines, validateBuildLine, withLine } from '../../src/ui/build-rules.ts';
import { referenceFamily } from '../fixtures/reference-family.ts';

const demo = demoBook();

describe('build-line drafts', () => {
  it('stores attrition typed in percent as a fraction and keeps the part by its part number', () => {
    const d = { ...buildLineDraft(demo), designators: 'R1', part: 'av-r06-100r', qtyRule: '=steps', category: 'electronics', attrition: '2.5 %' };
    const r = validateBuildLine(d, demo, undefined, () => 'line_new');
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.record.attrition).toBe(0.025);
    expect(r.record.partId).toBe(demo.parts.find((p) => p.mpn === 'AV-R06-100R')!.id);
    expect(r.record.qtyRule).toBe('steps');
    expect(r.record.rev).toBe(0);
    expect(r.record.position).toBeGreaterThan(Math.max(...demo.buildLines.map((l) => l.position)));
  });

  it('needs a part or a part rule, a category, and attrition below 100 %', () => {
    const d = { ...buildLineDraft(demo), designators: 'R1', qtyRule: '1', attrition: '100', role: 'Bad Role' };
    const r = validateBuildLine(d, demo, undefined, () => 'line_new');
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(Object.keys(r.problems).sort()).toEqual(['attrition', 'category', 'part', 'role']);
  });

  it('moving the first line up changes nothing; moving the second up swaps the two', () => {
    const lines = orderedLines(demo);
    expect(moveLine(demo, lines[0]!.id, -1)).toEqual([]);
    const moved = moveLine(demo, lines[1]!.id, -1);
    expect(moved.map((l) => l.id).sort()).toEqual([lines[0]!.id, lines[1]!.id].sort());
    const pos = new Map(moved.map((l) => [l.id, l.position] as const));
    expect(pos.get(lines[1]!.id)!).toBeLessThan(pos.get(lines[0]!.id)!);
  });
});

describe('line summaries', () => {
  it('give the counts and failures the per-variant outcomes give, for lines that resolve and a line that fails for some variants', () => {
    const first = orderedLines(demo)[0]!;
    const failing = { ...first, id: 'line_fails', qtyRule: 'IF(steps > 3, nope, 1)', position: 9999 };
    const book = { ...demo, buildLines: [...demo.buildLines, failing] };
    const family = resolveFamily(book);
    const outcomes = lineOutcomes(book, family);
    const summaries = lineSummaries(book, family);
    expect([...summaries.keys()].sort()).toEqual(book.buildLines.map((l) => l.id).sort());
    for (const [id, list] of outcomes) {
      const bad = list.filter((o) => o.problem !== undefined);
      expect(summaries.get(id), id).toEqual({
        variants: list.length,
        applying: list.filter((o) => o.applies && o.problem === undefined).length,
        failing: bad.map((o) => o.variantCode),
        ...(bad.length ? { problem: bad[0]!.problem } : {}),
      });
    }
    const s = summaries.get('line_fails')!;
    expect(s.failing.length).toBeGreaterThan(0);
    expect(s.failing.length).toBeLessThan(demo.variants.length);
    expect(s.problem).toMatch(/nope/i);
  });
});

describe('a line tried before it is saved', () => {
  /** The line's outcome on every variant as the whole family resolves it with the line put in. */
  const inWholeFamily = (book: Book, line: BuildLine) => {
    const trial = withLine(book, line);
    return lineOutcomes(trial, resolveFamily(trial), new Set([line.id])).get(line.id)!;
  };

  it('resolves every line of the demo Book and of the reference family as the whole family does', () => {
    for (const book of [demo, referenceFamily().book]) {
      for (const line of book.buildLines) expect(trialOutcomes(book, line), line.id).toEqual(inWholeFamily(book, line));
    }
  });

  it('sees an earlier line of the same role take the role first, however the role is written', () => {
    const lines = orderedLines(demo);
    const switches = lines.filter((l) => l.role === 'switch');
    // The demo Book fits one of two switch lines by its power stage.
    expect(switches.length).toBe(2);
    const other = lines.find((l) => l.role !== 'switch' && l.partId !== undefined && l.appliesWhen === '')!;
    const after: BuildLine = { ...other, id: 'line_trial', role: 'Switch', appliesWhen: '', position: Math.max(...switches.map((l) => l.position)) + 1 };
    const before: BuildLine = { ...after, position: Math.min(...switches.map((l) => l.position)) - 1 };
    const late = trialOutcomes(demo, after);
    expect(late).toEqual(inWholeFamily(demo, after));
    // Every variant fits one switch line before the trial line, so the trial line's part is not read by checks.
    expect(late.every((o) => o.problem?.includes('role switch is already given by line'))).toBe(true);
    const early = trialOutcomes(demo, before);
    expect(early).toEqual(inWholeFamily(demo, before));
    expect(early.some((o) => o.problem !== undefined)).toBe(false);
  });

  it('reports a rule that fails for some variants as the whole family does', () => {
    const first = orderedLines(demo)[0]!;
    const failing: BuildLine = { ...first, qtyRule: 'IF(steps > 4, nope, 1)', appliesWhen: 'steps > 3', partRule: undefined };
    const outcomes = trialOutcomes(demo, failing);
    expect(outcomes).toEqual(inWholeFamily(demo, failing));
    expect(outcomes.some((o) => o.problem?.match(/nope/i))).toBe(true);
    expect(outcomes.some((o) => !o.applies)).toBe(true);
    expect(outcomes.some((o) => o.applies && o.problem === undefined)).toBe(true);
  });
});
