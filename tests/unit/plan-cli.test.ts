// `rungbook plan`, `rungbook receive` and `rungbook count` through main(): the plan agrees with the domain's, orders
// placed and received move the stock and change the next plan, and bad input is refused with the file untouched.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Papa from 'papaparse';
import { main } from '../../src/cli/main.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { onHand } from '../../src/domain/stock.ts';
import { parseBookFile } from '../../src/io/book-file.ts';
import { planBook } from '../../src/io/plan-export.ts';
import { captureIo, writeBook } from './cli-helpers.ts';
import { value } from './costing-fixtures.ts';

let dir = '';
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'rungbook-plan-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** The demo's two runs (wanted 2027-03-15 and 2027-05-03) are both inside 150 days of this date. */
const TODAY = '2027-01-04';

async function cli(argv: string[]): Promise<{ code: number; out: string; err: string }> {
  const io = captureIo();
  const code = await main(argv, io);
  return { code, out: io.stdout, err: io.stderr };
}

function bookAt(path: string) {
  const r = parseBookFile(readFileSync(path, 'utf8'));
  if (!r.ok) throw new Error(JSON.stringify(r.problems));
  return r.book;
}

interface PlanJson {
  parts: { partId: string; mpn: string; net: number; grossTotal: number; onHand: number; buy?: { buy: number; net: number } }[];
  suggestions: { supplier: string; lines: { partId: string; buy: number }[] }[];
  runs: { run: { id: string }; inHorizon: boolean; limiting?: { mpn: string } }[];
}

describe('rungbook plan', () => {
  it('prints the plan of both demo runs as JSON, the same as the domain plan, never ordering less than the net need', async () => {
    const file = writeBook(dir, 'p1.rungbook.json', demoBook());
    const r = await cli(['plan', file, '--date', TODAY, '--horizon', '150', '--json']);
    expect(r.code, r.err).toBe(0);
    const json = JSON.parse(r.out) as PlanJson;
    const domain = value(planBook(demoBook(), { today: TODAY, horizonDays: 150 }));
    expect(json.runs.map((x) => x.inHorizon)).toEqual([true, true]);
    expect(json.parts.map((p) => [p.mpn, p.net])).toEqual(domain.parts.map((p) => [p.mpn, p.net]));
    // An empty store: the net need is the gross need, and every part is bought.
    for (const p of json.parts) {
      expect(p.net).toBe(p.grossTotal);
      expect(p.buy!.buy).toBeGreaterThanOrEqual(p.net);
    }
    expect(json.runs.every((x) => x.limiting !== undefined)).toBe(true);
    expect(r.err).toMatch(/Caution/);
  });

  it('prints --csv with one row per part that an RFC 4180 reader takes back', async () => {
    const file = writeBook(dir, 'p2.rungbook.json', demoBook());
    const r = await cli(['plan', file, '--date', TODAY, '--horizon', '150', '--csv']);
    expect(r.code, r.err).toBe(0);
    const rows = Papa.parse<string[]>(r.out.trimEnd(), { newline: '\r\n' }).data;
    expect(rows[0]!.slice(0, 6)).toEqual(['mpn', 'description', 'gross_need', 'on_hand', 'on_order_in_time', 'net_need']);
    const domain = value(planBook(demoBook(), { today: TODAY, horizonDays: 150 }));
    expect(rows.length - 1).toBe(domain.parts.length);
  });

  it('makes a part that no quote can be used for the limiting problem of the runs that need it, in JSON, CSV and the table alike', async () => {
    const book = demoBook();
    const domain = value(planBook(book, { today: TODAY, horizonDays: 150 }));
    // The part that limits neither run (it is in early), with every quote expired before the plan date.
    const dead = domain.parts.find((p) => domain.runs.every((r) => r.limiting?.partId !== p.partId) && p.gross.length === 2)!;
    book.quotes = book.quotes.map((q) => (q.partId === dead.partId ? { ...q, expires: '2026-12-31' } : q));
    const file = writeBook(dir, 'p-dead.rungbook.json', book);
    const names = book.runs.map((r) => r.name || r.id);

    const j = await cli(['plan', file, '--date', TODAY, '--horizon', '150', '--json']);
    expect(j.code).toBe(1);
    expect(j.err).toContain(dead.mpn);
    const json = JSON.parse(j.out) as PlanJson & { runs: { late: boolean; limiting?: { partId: string; problem?: string; inDate?: string }; problems: { partId?: string; message: string }[] }[] };
    const part = json.parts.find((p) => p.partId === dead.partId)! as PlanJson['parts'][number] & { problem?: string; gross: { inDate?: string }[] };
    expect(part.problem).toMatch(/no usable quote/);
    expect(part.gross.map((g) => g.inDate)).toEqual([undefined, undefined]);
    for (const r of json.runs) {
      expect(r.limiting).toEqual({ partId: dead.partId, mpn: dead.mpn, problem: part.problem });
      expect(r.late).toBe(true);
      expect(r.problems).toContainEqual({ partId: dead.partId, message: `cannot be bought: ${part.problem}` });
    }

    const c = await cli(['plan', file, '--date', TODAY, '--horizon', '150', '--csv']);
    expect(c.code).toBe(1);
    const rows = Papa.parse<string[]>(c.out.trimEnd(), { newline: '\r\n' }).data;
    const header = rows[0]!;
    const col = (name: string): number => header.indexOf(name);
    const row = rows.find((r) => r[0] === dead.mpn)!;
    expect(row[col('status')]).toBe('no usable quote');
    expect(row[col('limits_runs')]).toBe(names.join('; '));
    // No other part limits a run.
    expect(rows.slice(1).filter((r) => r[col('limits_runs')] !== '').map((r) => r[0])).toEqual([dead.mpn]);

    const t = await cli(['plan', file, '--date', TODAY, '--horizon', '150']);
    expect(t.code).toBe(1);
    expect(t.out.match(new RegExp(`limited by ${dead.mpn}, which cannot be bought — LATE`, 'g'))).toHaveLength(2);
  });

  it('only plans runs inside the horizon', async () => {
    const file = writeBook(dir, 'p3.rungbook.json', demoBook());
    const r = await cli(['plan', file, '--date', TODAY, '--horizon', '80', '--json']);
    expect((JSON.parse(r.out) as PlanJson).runs.map((x) => x.inHorizon)).toEqual([true, false]);
  });

  it('refuses a bad horizon, date or option mix with a message', async () => {
    const file = writeBook(dir, 'p4.rungbook.json', demoBook());
    expect(await cli(['plan', file, '--horizon', '0'])).toMatchObject({ code: 2, err: expect.stringMatching(/--horizon must be a whole number/) });
    expect(await cli(['plan', file, '--date', '2027-02-30'])).toMatchObject({ code: 2, err: expect.stringMatching(/--date must be YYYY-MM-DD/) });
    expect(await cli(['plan', file, '--json', '--csv'])).toMatchObject({ code: 2, err: expect.stringMatching(/not both/) });
    expect(await cli(['plan', file, '--out', 'x.json'])).toMatchObject({ code: 2, err: expect.stringMatching(/with --place/) });
  });
});

describe('a season on the command line: count, place, receive, plan again', () => {
  it('moves stock and changes the next plan at each step, and refuses bad receipts and counts leaving the file as it was', async () => {
    const file = writeBook(dir, 'season.rungbook.json', demoBook());
    const first = JSON.parse((await cli(['plan', file, '--date', TODAY, '--horizon', '150', '--json'])).out) as PlanJson;
    const counted = first.parts[0]!;

    // A stock count of the first part's whole gross need: its net need falls to 0.
    const countCsv = join(dir, 'count.csv');
    writeFileSync(countCsv, `mpn,counted\r\n${counted.mpn},${counted.grossTotal}\r\n`);
    const c = await cli(['count', file, countCsv, '--date', TODAY]);
    expect(c.code, c.err).toBe(0);
    expect(onHand(bookAt(file).stockMoves, counted.partId)).toBe(counted.grossTotal);
    const second = JSON.parse((await cli(['plan', file, '--date', TODAY, '--horizon', '150', '--json'])).out) as PlanJson;
    expect(second.parts.find((p) => p.partId === counted.partId)).toMatchObject({ onHand: counted.grossTotal, net: 0 });

    // Place every suggested order: the next plan suggests nothing.
    const placed = await cli(['plan', file, '--date', TODAY, '--horizon', '150', '--place']);
    expect(placed.code, placed.err).toBe(0);
    const book = bookAt(file);
    expect(book.orders.map((o) => o.number)).toEqual(second.suggestions.map((_, i) => `TAC-${i + 1}`));
    const third = JSON.parse((await cli(['plan', file, '--date', TODAY, '--horizon', '150', '--json'])).out) as PlanJson;
    expect(third.suggestions).toEqual([]);

    // Receive part of the first order's first line.
    const order = book.orders[0]!;
    const line = order.lines[0]!;
    const bytesBefore = readFileSync(file);
    const over = await cli(['receive', file, order.number, `1=${line.quantity + 1}`, '--date', '2027-01-20']);
    expect(over).toMatchObject({ code: 1, err: expect.stringMatching(/nothing written: line 1: .* more than the/) });
    expect(readFileSync(file)).toEqual(bytesBefore);
    const part = await cli(['receive', file, order.number, '1=10', '--date', '2027-01-20']);
    expect(part.code, part.err).toBe(0);
    expect(part.out).toMatch(/is part-received/);
    const after = bookAt(file);
    expect(after.orders[0]!.lines[0]!.received).toBe(10);
    expect(onHand(after.stockMoves, line.partId)).toBe((line.partId === counted.partId ? counted.grossTotal : 0) + 10);

    // A count naming a part the Book does not hold is refused whole.
    writeFileSync(countCsv, `mpn,counted\r\n${counted.mpn},5\r\nNOT-A-PART,3\r\n`);
    const bytes = readFileSync(file);
    expect(await cli(['count', file, countCsv])).toMatchObject({ code: 1, err: expect.stringMatching(/line 3: no part "NOT-A-PART"/) });
    expect(readFileSync(file)).toEqual(bytes);
    expect(await cli(['receive', file, 'NO-SUCH-ORDER', '--all'])).toMatchObject({ code: 1, err: expect.stringMatching(/no order numbered/) });
    expect(await cli(['receive', file, order.number])).toMatchObject({ code: 2, err: expect.stringMatching(/LINE=QTY pairs or --all/) });
  }, 60_000);
});
