// The command line against hostile input: control sequences in a Book's names, a reader that closes the pipe early,
// Book files that are not UTF-8, price files that are UTF-8 but for a few lines, and an import whose new file would
// not read back. Every fixture is made here.
import { spawn } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { shown, terminalSafe } from '../../src/cli/terminal.ts';
import type { Book } from '../../src/domain/book.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { parseBookFile, serializeBook } from '../../src/io/book-file.ts';
import type * as BookFileModule from '../../src/io/book-file.ts';
import { decodePriceBytes, ENCODINGS } from '../../src/io/price-decode.ts';
import { runCosting } from '../../src/io/run-export.ts';
import { runCli, writeBook } from './cli-helpers.ts';
import { value } from './costing-fixtures.ts';
import { handlePriceWorkerRequest } from '../../src/io/price-worker.ts';
import type { PriceWorkerMessage } from '../../src/io/price-worker.ts';
import { runPriceImportInWorker } from '../../src/io/price-worker-client.ts';
import type { PriceWorkerLike } from '../../src/io/price-worker-client.ts';
import { analyse, BASE_OPTIONS, SUPPLIER_NAME, testBook } from './import-helpers.ts';

const ROOT = resolve(__dirname, '../..');
let dir = '';

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'rungbook-hostile-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** Characters a terminal obeys: C0 but tab and line feed, DEL, C1 (0x9B is a one-byte CSI), bidi formatting. */
const RAW_CONTROL = /[\u0000-\u0008\u000b-\u001f\u007f-\u009f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069\u2028\u2029]/;

// Clear the screen, set the window title, ring the bell; a C1 CSI; reverse the text after it.
const ESC_NAME = 'Works \x1b[2J\x1b]0;owned\x07';
const C1_NAME = 'Name \u009b31m red';
const BIDI_NAME = 'Acme \u202eexe.txt';

function hostileBook(): Book {
  const book = demoBook();
  book.settings.bookName = ESC_NAME;
  book.settings.company = BIDI_NAME;
  const run = book.runs[0]!;
  const variant = book.variants.find((v) => v.id === run.variantId)!;
  variant.name = `${C1_NAME}\nFR9-99 — forged line: worst pass`;
  // The first line of the run's costed BOM: its part number and its supplier's name.
  const first = value(runCosting(book, run)).bom.lines[0]!;
  book.parts.find((p) => p.id === first.partId)!.mpn = `MPN\x1b[8m-hidden\x7f`;
  book.suppliers.find((s) => s.name === first.supplier)!.name = `Supplier \u2066\u202e evil`;
  return book;
}

describe('control characters from a Book are shown, never obeyed', () => {
  let file = '';
  let book: Book;
  let args: string[] = [];

  beforeAll(() => {
    book = hostileBook();
    file = writeBook(dir, 'hostile.rungbook.json', book);
    const run = book.runs[0]!;
    args = [file, '--variant', book.variants.find((v) => v.id === run.variantId)!.code, '--run', String(run.quantity)];
  });

  it('shows each as a visible escape: \\x1b, \\x9b, \\u202e, and line breaks inside a name', () => {
    expect(shown('a\x1b[2Jb')).toBe('a\\x1b[2Jb');
    expect(shown('\u009b\x7f\u202e\u2066')).toBe('\\x9b\\x7f\\u202e\\u2066');
    expect(shown('two\nlines\tand\r')).toBe('two\\nlines\\tand\\r');
    // A command's own layout keeps its line breaks and tabs.
    expect(terminalSafe('a\tb\nc\x1b')).toBe('a\tb\nc\\x1b');
  });

  it('in info, as text and as JSON that reads back to the very names', async () => {
    const r = await runCli(['info', file]);
    expect(r.code).toBe(0);
    expect(r.out).not.toMatch(RAW_CONTROL);
    expect(r.out).toContain('book            Works \\x1b[2J\\x1b]0;owned\\x07\n');
    expect(r.out).toContain('company         Acme \\u202eexe.txt\n');
    const j = await runCli(['info', file, '--json']);
    expect(j.out).not.toMatch(RAW_CONTROL);
    expect(JSON.parse(j.out)).toMatchObject({ bookName: ESC_NAME, company: BIDI_NAME });
  });

  it('in check, cost and buy tables, where a line break in a name cannot forge a line', async () => {
    const check = await runCli(['check', file]);
    expect(check.code).toBe(0);
    const cost = await runCli(['cost', ...args]);
    const buy = await runCli(['buy', ...args]);
    for (const r of [check, cost, buy]) {
      expect(r.out + r.err).not.toMatch(RAW_CONTROL);
      expect(r.out).toContain('Name \\x9b31m red\\nFR9-99 — forged line: worst pass');
      expect(r.out.split('\n').some((l) => l.startsWith('FR9-99'))).toBe(false);
    }
    expect(cost.out).toContain('MPN\\x1b[8m-hidden\\x7f');
    expect(buy.out).toContain('Supplier \\u2066\\u202e evil');
    const json = await runCli(['check', file, '--json']);
    expect(json.out).not.toMatch(RAW_CONTROL);
    expect(JSON.parse(json.out)).toBeInstanceOf(Array);
  });

  it('in eval, for text a formula makes', async () => {
    const r = await runCli(['eval', '="x"&CHAR(27)&"[31m"&CHAR(10)&"y"']);
    expect(r.code).toBe(0);
    expect(r.out).toBe('x\\x1b[31m\\ny');
  });

  it('in import messages, for part numbers and values from the price file', async () => {
    const bookPath = join(dir, 'import-target.rungbook.json');
    writeFileSync(bookPath, serializeBook(testBook()));
    const prices = join(dir, 'hostile.csv');
    // Enough ordinary text that one escape is not taken for a binary file.
    const filler = 'Thick-film chip resistor 10 kΩ 1 % 0.1 W 0603 on a reel of 5000 and lead free';
    writeFileSync(prices, `MPN,Description,Price\nQT-R10K-06,${filler},0.05\nEVIL\x1b[31m\u202e,${filler},0.07\n`);
    const r = await runCli(['import', bookPath, prices, '--supplier', SUPPLIER_NAME, '--out', join(dir, 'import-out.rungbook.json')]);
    expect(r.code).toBe(0);
    expect(r.out + r.err).not.toMatch(RAW_CONTROL);
    expect(r.out).toContain('line 3: EVIL\\x1b[31m\\u202e');
  });
});

describe('a reader that closes the pipe early', () => {
  /** Runs the real `rungbook` with its stdout closed before it writes, as `| head` does once it has read enough. */
  function runClosed(argv: string[]): Promise<{ code: number | null; stderr: string }> {
    return new Promise((done, fail) => {
      const child = spawn(process.execPath, [join(ROOT, 'bin/rungbook.mjs'), ...argv], { cwd: ROOT, stdio: ['ignore', 'pipe', 'pipe'] });
      child.stdout.destroy();
      let stderr = '';
      child.stderr.on('data', (b: Buffer) => (stderr += b.toString()));
      child.on('error', fail);
      child.on('close', (code) => done({ code, stderr }));
    });
  }

  it('ends every command quietly with status 0, without a stack trace', async () => {
    const book = demoBook();
    const file = writeBook(dir, 'pipe.rungbook.json', book);
    const run = book.runs[0]!;
    const code = book.variants.find((v) => v.id === run.variantId)!.code;
    const commands = [
      ['info', file],
      ['check', file],
      ['cost', file, '--variant', code, '--run', String(run.quantity)],
      ['buy', file, '--variant', code, '--run', String(run.quantity), '--csv'],
      ['eval', 'MAINS_PEAK(230, 0.1)'],
      ['demo', '--out', join(dir, 'pipe-demo.rungbook.json')],
    ];
    for (const argv of commands) {
      const r = await runClosed(argv);
      expect(r.stderr, argv[0]).not.toMatch(/EPIPE|Error|    at /);
      expect(r.code, argv[0]).toBe(0);
    }
  }, 120_000);
});

describe('a Book file that is not UTF-8', () => {
  /** The demo Book saved by an older program as Windows-1252: "é" is the one byte E9 (WHATWG index-windows-1252). */
  function cp1252Book(): string {
    const book = testBook();
    book.settings.company = 'Société Quillmoor';
    const text = serializeBook(book);
    const bytes = Uint8Array.from([...text].map((c) => (c === 'é' ? 0xe9 : c.charCodeAt(0))));
    const file = join(dir, 'latin.rungbook.json');
    writeFileSync(file, bytes);
    return file;
  }

  it('is refused by every command in the same words, naming the line', async () => {
    const file = cp1252Book();
    const line = readFileSync(file).subarray(0, readFileSync(file).indexOf(0xe9)).filter((b) => b === 0x0a).length + 1;
    const prices = join(dir, 'ok.csv');
    writeFileSync(prices, 'MPN,Price\nQT-R10K-06,0.05\n');
    const runs = {
      info: await runCli(['info', file]),
      check: await runCli(['check', file]),
      cost: await runCli(['cost', file, '--variant', 'X', '--run', '1']),
      buy: await runCli(['buy', file, '--variant', 'X', '--run', '1']),
      import: await runCli(['import', file, prices, '--supplier', SUPPLIER_NAME]),
    };
    for (const [name, r] of Object.entries(runs)) {
      expect(r.code, name).not.toBe(0);
      expect(r.err, name).toContain(`rungbook ${name}: ${file} cannot be used as a Book file:\n  the file is not UTF-8 text (line ${line} is not), so it is not a Book file`);
    }
  });

  it('is left byte for byte as it was by import, with no U+FFFD written and no file left over', async () => {
    const file = cp1252Book();
    const before = readFileSync(file);
    const prices = join(dir, 'ok.csv');
    writeFileSync(prices, 'MPN,Price\nQT-R10K-06,0.05\n');
    const r = await runCli(['import', file, prices, '--supplier', SUPPLIER_NAME]);
    expect(r.code).toBe(1);
    expect(readFileSync(file).equals(before)).toBe(true);
    expect(readdirSync(dir).some((n) => n.endsWith('.tmp'))).toBe(false);
  });
});

describe('import never replaces a good Book with one it would refuse', () => {
  it('keeps the Book as it was when the new file does not read back', async () => {
    const bookPath = join(dir, 'guarded.rungbook.json');
    writeFileSync(bookPath, serializeBook(testBook()));
    const before = readFileSync(bookPath);
    const prices = join(dir, 'guarded.csv');
    writeFileSync(prices, 'MPN,Price\nQT-R10K-06,0.05\n');
    // A writer that cuts the file short, as a full disk might: the command must notice before it renames.
    vi.resetModules();
    vi.doMock('../../src/io/book-file.ts', async (importOriginal) => {
      const real = await importOriginal<typeof BookFileModule>();
      return { ...real, serializeBook: (b: Book, o?: { savedAt?: string }) => real.serializeBook(b, o).slice(0, -40) };
    });
    try {
      const { main } = await import('../../src/cli/main.ts');
      const err: string[] = [];
      const code = await main(['import', bookPath, prices, '--supplier', SUPPLIER_NAME], { out: () => undefined, err: (t) => err.push(t) });
      expect(code).toBe(1);
      expect(err.join('\n')).toMatch(/nothing written, .*guarded\.rungbook\.json is as it was: the new Book does not read back/);
    } finally {
      vi.doUnmock('../../src/io/book-file.ts');
      vi.resetModules();
    }
    expect(readFileSync(bookPath).equals(before)).toBe(true);
    expect(readdirSync(dir).some((n) => n.endsWith('.tmp'))).toBe(false);
  });
});

describe('a UTF-8 price file with a few Windows-1252 lines', () => {
  // Lines 2 and 4 are UTF-8 ("é" = C3 A9); line 3 was pasted from an older program ("é" = E9).
  const utf8 = (s: string): number[] => [...new TextEncoder().encode(s)];
  const mixed = Uint8Array.from([
    ...utf8('MPN,Description,Price\n'),
    ...utf8('QT-R10K-06,Résistance 10 kΩ,0.05\n'),
    ...utf8('NEW-1,R'), 0xe9, ...utf8('sistance neuve,0.07\n'),
    ...utf8('NEW-2,Câble – 1 m,0.20\n'),
  ]);

  it('reads each line as what it is and names the lines that are not UTF-8', () => {
    const r = decodePriceBytes(mixed);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.encoding).toBe(ENCODINGS.utf8);
    expect(r.nonUtf8Lines).toEqual([3]);
    expect(r.warning).toMatch(/UTF-8 but line 3 is not/);
    expect(r.text).toBe('MPN,Description,Price\nQT-R10K-06,Résistance 10 kΩ,0.05\nNEW-1,Résistance neuve,0.07\nNEW-2,Câble – 1 m,0.20\n');
  });

  it('is refused when read as UTF-8, naming the line, and read whole when Windows-1252 is chosen', () => {
    const asUtf8 = decodePriceBytes(mixed, 'utf-8');
    expect(asUtf8).toEqual({ ok: false, reason: expect.stringMatching(/line 3 is not valid UTF-8/) as unknown as string });
    const as1252 = decodePriceBytes(mixed, 'windows-1252');
    expect(as1252.ok && as1252.encoding).toBe(ENCODINGS.windows1252);
    // A plain Windows-1252 file is still read as one, with no warning.
    const plain = decodePriceBytes(Uint8Array.from([...utf8('MPN,Price\nR'), 0xe9, ...utf8('s,1\n')]));
    expect(plain).toEqual({ ok: true, text: 'MPN,Price\nRés,1\n', encoding: ENCODINGS.windows1252 });
  });

  it('carries the warning and the line numbers into the analysis the app shows', async () => {
    const a = await analyse(mixed);
    expect(a.encoding).toBe(ENCODINGS.utf8);
    expect(a.nonUtf8Lines).toEqual([3]);
    expect(a.encodingWarning).toMatch(/line 3/);
    const chosen = await analyse(mixed, { encoding: 'utf-8' });
    expect(chosen.readable).toBe(false);
    expect(chosen.problems[0]!.reason).toMatch(/line 3 is not valid UTF-8/);
  });

  it('reaches the app the same way: its worker honours the encoding chosen on the import page', async () => {
    const worker = (): PriceWorkerLike => {
      const w: PriceWorkerLike = {
        onmessage: null,
        onerror: null,
        postMessage(message) {
          void handlePriceWorkerRequest(structuredClone(message), (m) => w.onmessage?.({ data: structuredClone(m) } as MessageEvent<PriceWorkerMessage>));
        },
        terminate: () => undefined,
      };
      return w;
    };
    const auto = await runPriceImportInWorker(mixed.slice(), BASE_OPTIONS, undefined, undefined, worker);
    expect(auto.encodingWarning).toMatch(/line 3/);
    expect(auto.offers.map((o) => o.description)).toContain('Résistance neuve');
    const utf8Only = await runPriceImportInWorker(mixed.slice(), { ...BASE_OPTIONS, encoding: 'utf-8' }, undefined, undefined, worker);
    expect(utf8Only.readable).toBe(false);
    expect(utf8Only.problems[0]!.reason).toMatch(/line 3 is not valid UTF-8/);
  });

  it('warns in the CLI with the line, imports the right letters, and refuses under --encoding utf-8', async () => {
    const bookPath = join(dir, 'mixed.rungbook.json');
    writeFileSync(bookPath, serializeBook(testBook()));
    const prices = join(dir, 'mixed.csv');
    writeFileSync(prices, mixed);
    const out = join(dir, 'mixed-out.rungbook.json');
    const r = await runCli(['import', bookPath, prices, '--supplier', SUPPLIER_NAME, '--create-parts', '--out', out]);
    expect(r.code).toBe(0);
    expect(r.err).toMatch(/warning: mixed\.csv: the file is UTF-8 but line 3 is not/);
    const written = parseBookFile(readFileSync(out, 'utf8'));
    expect(written.ok).toBe(true);
    const descriptions = written.ok ? written.book.parts.map((p) => p.description) : [];
    expect(descriptions).toContain('Résistance neuve');
    expect(descriptions).toContain('Câble – 1 m');
    expect(descriptions.some((d) => d.includes('Ã') || d.includes('\uFFFD'))).toBe(false);

    const before = readFileSync(bookPath);
    const strict = await runCli(['import', bookPath, prices, '--supplier', SUPPLIER_NAME, '--encoding', 'utf-8']);
    expect(strict.code).toBe(1);
    expect(strict.err).toMatch(/line 3 is not valid UTF-8/);
    expect(readFileSync(bookPath).equals(before)).toBe(true);
    const bad = await runCli(['import', bookPath, prices, '--supplier', SUPPLIER_NAME, '--encoding', 'latin9']);
    expect(bad.code).toBe(2);
    expect(bad.err).toMatch(/--encoding must be "auto", "utf-8" or "windows-1252"/);
    expect(existsSync(join(dir, 'mixed.rungbook.json'))).toBe(true);
  });
});
