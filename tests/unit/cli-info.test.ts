// The `info` and `demo` commands: counts and summary of a Book file, refusal of bad files with their problems,
// and writing the demo Book without overwriting an existing file by accident.
import { mkdtempSync, readFileSync, rmSync, writeFileSync, existsSync, readdirSync, truncateSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { main } from '../../src/cli/main.ts';
import type { CliIo } from '../../src/cli/command.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { parseBookFile, serializeBook } from '../../src/io/book-file.ts';
import { COLLECTIONS } from '../../src/domain/book.ts';
import { MAINS_CAUTION_LINE } from '../../src/domain/mains-caution.ts';
import { sampleBook } from '../fixtures/sample-book.ts';

const dir = mkdtempSync(join(tmpdir(), 'rungbook-cli-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

async function run(...argv: string[]): Promise<{ code: number; out: string; err: string }> {
  let out = '';
  let err = '';
  const io: CliIo = { out: (t) => void (out += t + '\n'), err: (t) => void (err += t + '\n') };
  const code = await main(argv, io);
  return { code, out, err };
}

describe('rungbook info', () => {
  it('prints counts and a summary of a good file', async () => {
    const file = join(dir, 'sample.rungbook.json');
    writeFileSync(file, serializeBook(sampleBook(), { savedAt: '2025-03-01T12:00:00.000Z' }));
    const { code, out, err } = await run('info', file);
    expect(err).toBe('');
    expect(code).toBe(0);
    expect(out).toContain('book            Sample regulators\n');
    expect(out).toContain('company         Kestrel Test Works\n');
    expect(out).toContain('saved           2025-03-01T12:00:00.000Z\n');
    expect(out).toContain('base currency   EUR\n');
    expect(out).toContain('currencies      EUR (base), USD at 0.92 EUR\n');
    expect(out).toContain('variant codes   KT3-60-CD, KT5-100-TR\n');
    for (const [label, n] of [['parts', 3], ['suppliers', 2], ['quotes', 2], ['variants', 2], ['build lines', 2], ['checks', 2], ['runs', 2], ['orders', 1], ['stock moves', 6]] as const) {
      expect(out).toMatch(new RegExp(`^${label} +${n}$`, 'm'));
    }
    // The one caution text (domain/mains-caution.ts), as the app and the run files carry it.
    expect(out).toContain(MAINS_CAUTION_LINE);
  });

  it('prints the same summary as JSON with --json', async () => {
    const file = join(dir, 'sample-json.rungbook.json');
    writeFileSync(file, serializeBook(sampleBook(), { savedAt: '2025-03-01T12:00:00.000Z' }));
    const sample = sampleBook();
    const { code, out } = await run('info', file, '--json');
    expect(code).toBe(0);
    expect(JSON.parse(out)).toMatchObject({
      bookName: 'Sample regulators',
      baseCurrency: 'EUR',
      rates: { EUR: 1, USD: 0.92 },
      variantCodes: ['KT3-60-CD', 'KT5-100-TR'],
      // Every collection of the every-field sample, counted from the sample itself as it grows.
      counts: Object.fromEntries(COLLECTIONS.map((c) => [c, sample[c].length])),
    });
  });

  it('exits 1 with the problems of a bad file, each with its path', async () => {
    const json = JSON.parse(serializeBook(sampleBook()));
    json.quotes[0].partId = 'part_gone';
    json.quotes[1].breaks = [{ qty: 10, price: 1 }, { qty: 5, price: 2 }];
    const file = join(dir, 'bad.rungbook.json');
    writeFileSync(file, JSON.stringify(json));
    const { code, out, err } = await run('info', file);
    expect(code).toBe(1);
    expect(out).toBe('');
    expect(err).toBe(
      `rungbook info: ${file} cannot be used as a Book file:\n` +
        '  quotes[0].partId: refers to part "part_gone", which is not in the file\n' +
        '  quotes[1].breaks[1].qty: price breaks must rise in quantity: 5 comes after 10\n',
    );
  });

  it('exits 1 for a missing file, a file that is not UTF-8, and a truncated file', async () => {
    expect((await run('info', join(dir, 'nothing.json'))).err).toMatch(/no such file/);
    const latin = join(dir, 'latin1.json');
    writeFileSync(latin, Buffer.from([0x7b, 0x22, 0xe9, 0x22, 0x7d]));
    const l = await run('info', latin);
    expect(l.code).toBe(1);
    expect(l.err).toMatch(/not UTF-8 text/);
    const cut = join(dir, 'cut.json');
    writeFileSync(cut, serializeBook(sampleBook()).slice(0, 100));
    expect((await run('info', cut)).err).toMatch(/ends too early at line \d+, column \d+/);
  });

  it('refuses an oversized file from its size alone', async () => {
    const big = join(dir, 'big.json');
    // a sparse file: 300 MB by its size, nothing written
    writeFileSync(big, '');
    truncateSync(big, 300 * 1024 * 1024);
    const r = await run('info', big);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/300\.0 MB \(314,572,800 bytes\); a Book file may be at most 256 MB/);
  });

  it('asks for exactly one file', async () => {
    expect((await run('info')).code).toBe(2);
    expect((await run('info', 'a', 'b')).err).toMatch(/exactly one Book file/);
  });
});

describe('rungbook demo', () => {
  it('writes the demo Book with the built-in checks, readable by info', async () => {
    const file = join(dir, 'demo.rungbook.json');
    const { code, out } = await run('demo', '--out', file);
    expect(code).toBe(0);
    const demo = demoBook();
    expect(out).toContain(`wrote ${file}: ${demo.parts.length} parts`);
    const read = parseBookFile(readFileSync(file, 'utf8'));
    expect(read.ok).toBe(true);
    if (!read.ok) return;
    expect(read.book.parts).toEqual(demo.parts);
    expect(read.book.variants).toEqual(demo.variants);
    expect(read.book.checks.filter((c) => c.builtIn).length).toBeGreaterThan(0);
    const info = await run('info', file);
    expect(info.code).toBe(0);
    expect(info.out).toContain(demo.variants.map((v) => v.code).join(', '));
    // no temporary file left beside it
    expect(readdirSync(dir).filter((n) => n.endsWith('.tmp'))).toEqual([]);
  });

  it('refuses to overwrite an existing file unless --force', async () => {
    const file = join(dir, 'keep.rungbook.json');
    writeFileSync(file, 'my own notes');
    const r = await run('demo', '--out', file);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/already exists; give --force/);
    expect(readFileSync(file, 'utf8')).toBe('my own notes');
    expect((await run('demo', '--out', file, '--force')).code).toBe(0);
    expect(parseBookFile(readFileSync(file, 'utf8')).ok).toBe(true);
  });

  it('needs --out', async () => {
    const r = await run('demo');
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/--out FILE/);
    expect(existsSync(join(dir, 'undefined'))).toBe(false);
  });
});
