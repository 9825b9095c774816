// The command line with approved alternates: `rungbook check` reports the worst approved part of a line and names
// it; `rungbook cost` says which approved part each line buys and why, and marks single sources.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { CheckJson } from '../../src/cli/commands/check.ts';
import type { Book } from '../../src/domain/book.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { runCli, writeBook } from './cli-helpers.ts';

let dir = '';
let file = '';

/** The demo Book whose snubber resistor line (R2, 2 W) approves a 1 W second source, quoted cheaper but slower. */
function withWeakAlternate(): Book {
  const b = demoBook();
  const own = b.parts.find((p) => p.id === 'part_r_snub_100r')!;
  b.parts.push({ ...own, id: 'part_r_snub_1w', mpn: 'ZX-MO1W-100R', maker: 'Zephyr Resistive', description: 'Metal oxide resistor 100 Ω 1 W', ratings: { ...own.ratings, p_max: 1 } });
  const q = b.quotes.find((x) => x.partId === 'part_r_snub_100r')!;
  b.quotes.push({ ...q, id: 'quote_zx_1w', partId: 'part_r_snub_1w', supplierCode: 'HV-ZX1W', breaks: [{ qty: 10, price: 0.05 }], leadDays: 20 });
  b.buildLines = b.buildLines.map((l) => (l.id === 'line_snub_r' ? { ...l, alternates: ['part_r_snub_1w'] } : l));
  return b;
}

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'rungbook-alternates-'));
  file = writeBook(dir, 'alt.rungbook.json', withWeakAlternate());
});

afterAll(() => {
  if (dir) rmSync(dir, { recursive: true, force: true });
});

describe('rungbook check with approved alternates', () => {
  it('judges the 1 W second source and fails the snubber loss check, naming it', async () => {
    const r = await runCli(['check', file, '--variant', 'FR6-100-CD', '--json']);
    expect(r.code).toBe(0);
    const rows = JSON.parse(r.out) as CheckJson[];
    const snub = rows.find((x) => x.check === 'snubber_r_loss')!;
    // 2.2 nF · 357.8² · 2830 Hz = 0.7971 W (sheets/20-power.checks: P = C·V²·f, basic circuit theory, from memory)
    // against half of the 1 W part's rating (common practice) → fail.
    expect(snub.status).toBe('fail');
    expect(snub.approvedPart).toEqual({ line: 'line_snub_r', part: 'part_r_snub_1w', mpn: 'ZX-MO1W-100R', judged: 2 });
    expect(rows.find((x) => x.check === 'load_i')!.approvedPart).toBeNull();
    const table = await runCli(['check', file, '--variant', 'FR6-100-CD']);
    expect(table.out).toMatch(/snubber_r_loss .*✗ fail.*\[worst of 2 approved parts: ZX-MO1W-100R\]/);
  });
});

describe('rungbook cost with approved alternates', () => {
  it('buys the cheaper second source when it arrives in time and says why; the other lines are single sources', async () => {
    // The spring run of FR4-60-CD (2,000, wanted 2027-03-15) is planned: from the costing date 2026-10-01 the 20-day
    // second source arrives in time; 2,040 (2 % attrition) × €0.05 beats the own part's €0.062 break.
    const r = await runCli(['cost', file, '--variant', 'FR4-60-CD', '--run', '2000', '--json']);
    const bom = JSON.parse(r.out) as { lines: { designators: string; mpn: string; partChoice: { reason: string; approved: number } | null }[] };
    const r2 = bom.lines.find((l) => l.designators === 'R2')!;
    expect(r2.mpn).toBe('ZX-MO1W-100R');
    expect(r2.partChoice).toEqual({ reason: 'cheapest approved', approved: 2 });
    expect(bom.lines.find((l) => l.designators === 'Q1')!.partChoice).toEqual({ reason: 'single approved source', approved: 1 });
    const table = await runCli(['cost', file, '--variant', 'FR4-60-CD', '--run', '2000']);
    expect(table.out).toMatch(/R2 .*ZX-MO1W-100R.*cheapest approved \(2 approved\)/);
    expect(table.out).toMatch(/Q1 .*single source/);
  });
});
