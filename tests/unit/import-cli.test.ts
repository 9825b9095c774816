// `rungbook import`: writes the new Book on success; on any problem prints the row errors, exits non-zero and
// writes nothing.
import { mkdtempSync, readFileSync, writeFileSync, existsSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { beforeEach, describe, expect, it } from 'vitest';
import { parseBookFile, serializeBook } from '../../src/io/book-file.ts';
import { runCli } from './cli-helpers.ts';
import { testBook } from './import-helpers.ts';

let dir: string;
let bookPath: string;

beforeEach(() => {
  dir = mkdtempSync(join(tmpdir(), 'rungbook-import-'));
  bookPath = join(dir, 'test.rungbook.json');
  writeFileSync(bookPath, serializeBook(testBook(), { savedAt: '2026-11-30T00:00:00.000Z' }));
});

function cli(...argv: string[]): Promise<{ code: number; out: string; err: string }> {
  return runCli(['import', ...argv]);
}

function prices(name: string, text: string): string {
  const p = join(dir, name);
  writeFileSync(p, text);
  return p;
}

describe('rungbook import', () => {
  it('writes the new Book to --out and prints a summary', async () => {
    const file = prices('p.csv', 'MPN,Order code,Qty,Price\nQT-R10K-06,QS-1001,1,0.05\nQT-C100N-50,QS-2002,10,0.12\n');
    const out = join(dir, 'new.rungbook.json');
    const r = await cli(bookPath, file, '--supplier', 'quillmoor test supply', '--out', out);
    expect(r.err).toBe('');
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/quotes: 2 new, 1 older superseded/);
    const written = parseBookFile(readFileSync(out, 'utf8'));
    expect(written.ok).toBe(true);
    expect(written.ok && written.book.quotes.filter((q) => q.source === 'p.csv')).toHaveLength(2);
    expect(written.ok && written.book.importBatches).toHaveLength(1);
  });

  it('replaces the Book in place without --out', async () => {
    const file = prices('p.csv', 'MPN,Price\nQT-R10K-06,0.05\n');
    const r = await cli(bookPath, file, '--supplier', 'Quillmoor Test Supply');
    expect(r.code).toBe(0);
    const written = parseBookFile(readFileSync(bookPath, 'utf8'));
    expect(written.ok && written.book.importBatches).toHaveLength(1);
    expect(readdirSync(dir).some((n) => n.endsWith('.tmp'))).toBe(false);
  });

  it('prints every row error to stderr, exits 1 and leaves the Book file byte-for-byte as it was', async () => {
    const before = readFileSync(bookPath);
    const file = prices('bad.csv', 'MPN,Qty,Price\nQT-R10K-06,1,0.05\nQT-C100N-50,0,0.1\nQT-D400-1A,10,x\n');
    const out = join(dir, 'never.rungbook.json');
    const r = await cli(bookPath, file, '--supplier', 'Quillmoor Test Supply', '--out', out);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/nothing imported from bad\.csv/);
    expect(r.err).toMatch(/line 3, column "Qty", value "0": break quantity must be above zero/);
    expect(r.err).toMatch(/line 4, column "Price", value "x": price is not a number/);
    expect(existsSync(out)).toBe(false);
    expect(readFileSync(bookPath).equals(before)).toBe(true);
    expect(r.out).toBe('');
  });

  it('imports only the valid rows with --valid-rows-only and reports what it left out', async () => {
    const file = prices('bad.csv', 'MPN,Qty,Price\nQT-R10K-06,1,0.05\nQT-D400-1A,10,x\n');
    const r = await cli(bookPath, file, '--supplier', 'Quillmoor Test Supply', '--valid-rows-only');
    expect(r.code).toBe(0);
    expect(r.err).toMatch(/left out line 3/);
    expect(r.out).toMatch(/quotes: 1 new/);
  });

  it('creates parts for unknown rows only with --create-parts', async () => {
    const file = prices('new.csv', 'MPN,Description,Price\nQT-NEW-9,new part,0.5\n');
    const skipped = await cli(bookPath, file, '--supplier', 'Quillmoor Test Supply', '--out', join(dir, 'a.json'));
    expect(skipped.code).toBe(1);
    expect(skipped.err).toMatch(/nothing to import/);
    const created = await cli(bookPath, file, '--supplier', 'Quillmoor Test Supply', '--create-parts', '--out', join(dir, 'b.json'));
    expect(created.code).toBe(0);
    expect(created.out).toMatch(/1 new part/);
  });

  it('uses a --mapping file and rejects a bad one', async () => {
    const file = prices('odd.csv', 'Artikel;Preis\nQT-R10K-06;0,05\n');
    const good = join(dir, 'map.json');
    writeFileSync(good, JSON.stringify({ columns: { mpn: 'Artikel', price: 'Preis' }, layout: 'long' }));
    expect((await cli(bookPath, file, '--supplier', 'Quillmoor Test Supply', '--mapping', good, '--out', join(dir, 'c.json'))).code).toBe(0);
    const bad = join(dir, 'bad-map.json');
    writeFileSync(bad, JSON.stringify({ columns: { colour: 'Artikel' } }));
    const r = await cli(bookPath, file, '--supplier', 'Quillmoor Test Supply', '--mapping', bad);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/unknown field "colour"/);
  });

  it('detects a re-import of the same file', async () => {
    const file = prices('p.csv', 'MPN,Price\nQT-R10K-06,0.05\n');
    expect((await cli(bookPath, file, '--supplier', 'Quillmoor Test Supply')).code).toBe(0);
    const again = await cli(bookPath, file, '--supplier', 'Quillmoor Test Supply');
    expect(again.code).toBe(1);
    expect(again.err).toMatch(/already imported/);
    expect((await cli(bookPath, file, '--supplier', 'Quillmoor Test Supply', '--allow-reimport')).code).toBe(0);
  });

  it('explains usage mistakes and unreadable inputs', async () => {
    expect((await cli(bookPath)).code).toBe(2);
    expect((await cli(bookPath, 'p.csv', '--supplier', 'x', '--colour', 'red')).err).toMatch(/unknown option --colour/);
    const missing = await cli(bookPath, join(dir, 'nope.csv'), '--supplier', 'x');
    expect(missing.code).toBe(1);
    expect(missing.err).toMatch(/cannot read the price file .*ENOENT/);
    const notBook = prices('x.json', 'not json');
    const r = await cli(notBook, resolve(__dirname, '../../public/demo/kelvaro-quote-2026-08.csv'), '--supplier', 'x');
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/cannot be used as a Book file/);
  });

  it('prints help', async () => {
    const r = await cli('--help');
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/--valid-rows-only/);
  });
});
