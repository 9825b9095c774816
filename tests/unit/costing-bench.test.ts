// The benchmark's fixtures are sound: the reference family generator is deterministic, and the plain TypeScript
// baseline computes the same unit costs as the engine, so engine_vs_plain compares equal work.
import { describe, expect, it } from 'vitest';
import { REFERENCE_FAMILY, referenceFamily } from '../fixtures/reference-family.ts';
import { CostingWorkbook } from '../../src/engine/costing.ts';
import { planPlain, plainUnitCosts } from '../bench/plain.ts';
import { engineUnitCosts } from '../bench/costing.ts';

describe('benchmark fixtures', () => {
  it('generates the same Book and resolution from the same seed, and a different one from another seed', () => {
    const a = referenceFamily({ variants: 50, lines: 30 });
    const b = referenceFamily({ variants: 50, lines: 30 });
    expect(JSON.stringify(a.book)).toBe(JSON.stringify(b.book));
    expect([...a.resolution]).toEqual([...b.resolution]);
    const c = referenceFamily({ variants: 50, lines: 30, seed: REFERENCE_FAMILY.seed + 1 });
    expect(JSON.stringify(c.book)).not.toBe(JSON.stringify(a.book));
  });

  it('makes the reference family at its stated size: 200 variants × 80 lines × 4 breaks × 3 run sizes', () => {
    const { book, resolution } = referenceFamily();
    expect(book.variants).toHaveLength(200);
    expect(book.buildLines).toHaveLength(80);
    expect(book.settings.runSizes).toHaveLength(3);
    expect(book.quotes.every((q) => q.breaks.length === 4)).toBe(true);
    expect([...resolution.values()].every((lines) => lines.length === 80)).toBe(true);
  });

  it('gives the plain loop the same unit costs as the engine on the reference family, to the cent', () => {
    const { book, resolution } = referenceFamily();
    const opened = CostingWorkbook.open(book, resolution);
    if (!opened.ok) throw new Error(opened.error);
    const engine = engineUnitCosts(opened.value);
    const plain = plainUnitCosts(planPlain(book, resolution), book, book.settings.rates);
    expect(engine.length).toBe(600);
    expect(plain.length).toBe(600);
    for (let i = 0; i < engine.length; i++) {
      expect(Number.isFinite(engine[i]!)).toBe(true);
      expect(Math.round(plain[i]! * 100), `unit cost ${i}`).toBe(Math.round(engine[i]! * 100));
    }
    // After a rate change both still agree (the loop reads the rates it is given).
    opened.value.setRate('USD', 1.01);
    const after = engineUnitCosts(opened.value);
    const plainAfter = plainUnitCosts(planPlain(book, resolution), book, { ...book.settings.rates, USD: 1.01 });
    expect(after.some((u, i) => u !== engine[i])).toBe(true);
    for (let i = 0; i < after.length; i++) expect(Math.round(plainAfter[i]! * 100)).toBe(Math.round(after[i]! * 100));
    opened.value.close();
  });
});
