// The CLI's `cost --csv` and `buy --csv` write the very bytes the app's export makes for the same run and choices,
// frozen runs included; CSV choices are refused without --csv or when they clash.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { main } from '../../src/cli/main.ts';
import { captureIo, writeBook } from './cli-helpers.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import type { Book } from '../../src/domain/book.ts';
import { freezeRun } from '../../src/domain/freeze.ts';
import { MAINS_CAUTION } from '../../src/domain/mains-caution.ts';
import { purchaseList } from '../../src/domain/purchase.ts';
import { costedBomCsv, exportBytes, purchaseListCsv, runCosting } from '../../src/io/run-export.ts';
import type { ExportOptions } from '../../src/io/run-export.ts';
import { value } from './costing-fixtures.ts';

let dir = '';

const CHOICES: [string[], ExportOptions][] = [
  [[], { delimiter: 'comma', decimal: 'point', bom: false }],
  [['--delimiter', 'semicolon', '--decimal', 'comma', '--bom'], { delimiter: 'semicolon', decimal: 'comma', bom: true }],
  [['--delimiter', 'tab'], { delimiter: 'tab', decimal: 'point', bom: false }],
];

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'rungbook-export-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('CLI and app export the same bytes', () => {
  it('for the demo run: costed BOM and purchase list, under each choice of delimiter, decimal and mark', async () => {
    const book = demoBook();
    const file = writeBook(dir, 'demo.rungbook.json', book);
    const run = book.runs[0]!;
    const code = book.variants.find((v) => v.id === run.variantId)!.code;
    const costing = value(runCosting(book, run));
    for (const [flags, options] of CHOICES) {
      const cost = captureIo();
      expect(await main(['cost', file, '--variant', code, '--run', String(run.quantity), '--csv', ...flags], cost)).toBe(0);
      const app = exportBytes(value(costedBomCsv(costing, options, { run: run.name })));
      expect(Buffer.from(exportBytes(cost.stdout)).equals(Buffer.from(app)), `cost ${flags.join(' ')}`).toBe(true);

      const buy = captureIo();
      expect(await main(['buy', file, '--variant', code, '--run', String(run.quantity), '--csv', ...flags], buy)).toBe(0);
      const list = exportBytes(value(purchaseListCsv(costing, purchaseList(costing.bom, { dateWanted: run.dateWanted }), options, { run: run.name })));
      expect(Buffer.from(exportBytes(buy.stdout)).equals(Buffer.from(list)), `buy ${flags.join(' ')}`).toBe(true);
      // The caution in full is a line of both files' head, as the app writes it.
      for (const out of [cost.stdout, buy.stdout]) expect(out).toContain(`mains caution${flags.includes('tab') ? '\t' : flags.includes('semicolon') ? ';' : ','}"${MAINS_CAUTION}"`);
    }
  });

  it('for a frozen run: the snapshot is written even after its quotes rise, unless --fresh', async () => {
    const book = demoBook();
    const run = book.runs[0]!;
    const code = book.variants.find((v) => v.id === run.variantId)!.code;
    const frozen = value(freezeRun(run, value(runCosting(book, run)).bom, book, new Date('2026-09-01T10:00:00Z')));
    const frozenCsv = value(costedBomCsv(value(runCosting({ ...book, runs: [frozen] }, frozen)), undefined, { run: frozen.name }));
    // Every quote doubles in price after the freeze.
    const later: Book = {
      ...book,
      runs: [frozen, ...book.runs.slice(1)],
      quotes: book.quotes.map((q) => ({ ...q, breaks: q.breaks.map((b) => ({ ...b, price: b.price * 2 })) })),
    };
    const file = writeBook(dir, 'frozen.rungbook.json', later);
    const io = captureIo();
    expect(await main(['cost', file, '--variant', code, '--run', String(run.quantity), '--csv'], io)).toBe(0);
    expect(io.stdout).toBe(frozenCsv);
    expect(io.stderr).toMatch(/is frozen \(2026-09-01T10:00:00.000Z\)/);
    expect(io.stdout).toBe(value(costedBomCsv(value(runCosting(later, frozen)), undefined, { run: frozen.name })));

    const fresh = captureIo();
    expect(await main(['cost', file, '--variant', code, '--run', String(run.quantity), '--csv', '--fresh'], fresh)).toBe(0);
    expect(fresh.stdout).not.toBe(frozenCsv);
    expect(fresh.stdout).toBe(value(costedBomCsv(value(runCosting(later, frozen, { fresh: true })), undefined, { run: frozen.name })));
  });

  it('refuses CSV choices without --csv, clashing choices and unknown words, printing nothing', async () => {
    const file = writeBook(dir, 'demo2.rungbook.json', demoBook());
    const cases: [string[], RegExp][] = [
      [['cost', file, '--variant', 'FR3-40-CD', '--run', '500', '--delimiter', 'tab'], /give them with --csv/],
      [['cost', file, '--variant', 'FR3-40-CD', '--run', '500', '--csv', '--decimal', 'comma'], /decimal comma.*semicolon or tab/],
      [['buy', file, '--variant', 'FR3-40-CD', '--run', '500', '--csv', '--delimiter', 'pipe'], /delimiter must be one of/],
      [['buy', file, '--variant', 'FR3-40-CD', '--run', '500', '--wanted', '2026-02-30'], /--wanted must be a date/],
    ];
    for (const [args, message] of cases) {
      const io = captureIo();
      expect(await main(args, io), args.join(' ')).toBe(2);
      expect(io.stderr).toMatch(message);
      expect(io.stdout).toBe('');
    }
  });
});
