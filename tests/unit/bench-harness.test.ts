// The benchmark's own pieces: the 50,000-row price file is the same for the same seed, import_ms says where it was
// measured, targets are inclusive and unmeasured figures are not counted as met, and bundle sizes are gzip sizes.
import { mkdtempSync, mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createHash } from 'node:crypto';
import { gunzipSync, gzipSync } from 'node:zlib';
import { afterEach, describe, expect, it } from 'vitest';
import { samplePriceFile } from '../fixtures/price-sample.ts';
import { PAIRS, TARGETS, targetsMet, withHeadlines } from '../bench/harness.ts';
import { netAgrees } from '../bench/planning-core.ts';
import { builtAssets, bundleFigures } from '../bench/bundle.ts';
import { IMPORT_SAMPLE } from '../bench/import.ts';
import { median } from '../bench/stats.ts';

const sha = (bytes: Uint8Array): string => createHash('sha256').update(bytes).digest('hex');

describe('benchmark price file', () => {
  it('is byte for byte the same for the same seed at the full 50,000 rows, and differs for another seed', () => {
    const a = samplePriceFile(IMPORT_SAMPLE);
    const b = samplePriceFile(IMPORT_SAMPLE);
    expect(sha(a.bytes)).toBe(sha(b.bytes));
    expect(JSON.stringify(a.book.quotes)).toBe(JSON.stringify(b.book.quotes));
    const text = new TextDecoder().decode(a.bytes);
    const lines = text.split('\r\n').filter((l) => l !== '');
    // One header line, then one line per part.
    expect(lines).toHaveLength(IMPORT_SAMPLE.rows + 1);
    expect(lines[0]!.split(',').filter((c) => /^Qty \d$/.test(c))).toHaveLength(IMPORT_SAMPLE.breaks);
    const c = samplePriceFile({ ...IMPORT_SAMPLE, seed: IMPORT_SAMPLE.seed + 1 });
    expect(c.bytes.length).toBeGreaterThan(0);
    expect(sha(c.bytes)).not.toBe(sha(a.bytes));
  });
});

describe('benchmark headline figures', () => {
  it('reports the browser import as import_ms when it was measured, and says so', () => {
    const f = withHeadlines({ import_node_ms: 1800, import_browser_ms: 2600 });
    expect(f['import_ms']).toBe(2600);
    expect(String(f['import_source'])).toMatch(/^browser/);
  });

  it('falls back to the Node import and says the browser figure is missing', () => {
    const f = withHeadlines({ import_node_ms: 1800, import_browser_small_ms: 900 });
    expect(f['import_ms']).toBe(1800);
    expect(String(f['import_source'])).toMatch(/^node.*not measured/);
  });

  it('leaves import_ms out when neither was measured', () => {
    expect(withHeadlines({ open_ms: 100 })).not.toHaveProperty('import_ms');
  });

  it('meets a target at exactly its maximum, misses it above, and marks unmeasured or non-finite figures null', () => {
    const open = TARGETS.find((t) => t.figure === 'open_ms')!;
    expect(targetsMet({ open_ms: open.max })['open_ms']).toBe(true);
    expect(targetsMet({ open_ms: open.max + 0.1 })['open_ms']).toBe(false);
    expect(targetsMet({})['open_ms']).toBeNull();
    expect(targetsMet({ open_ms: Number.NaN })['open_ms']).toBeNull();
    expect(targetsMet({ open_ms: 'fast' })['open_ms']).toBeNull();
  });

  it('holds the whole planning path to the plan target, and stops on a plan whose net need disagrees', () => {
    const plan = TARGETS.find((t) => t.figure === 'plan_ms')!;
    for (const figure of ['plan_full_ms', 'browser_plan_full_ms']) expect(TARGETS.find((t) => t.figure === figure)?.max).toBe(plan.max);
    expect(PAIRS.find((p) => p.name === 'plan_full_ms')).toEqual({ name: 'plan_full_ms', node: 'plan_full_ms', browser: 'browser_plan_full_ms' });
    expect(() => netAgrees("the plan's", 1200, "the plain loop's", 1201)).toThrow(/net need 1200 is not the plain loop's 1201/);
    expect(() => netAgrees("the plan's", 1200, "the plain loop's", 1200)).not.toThrow();
  });

  it('takes the median of odd and even counts', () => {
    // Definition of the median (common practice): middle value, or the mean of the two middle values.
    expect(median([5, 1, 3])).toBe(3);
    expect(median([4, 1, 3, 2])).toBe(2.5);
  });
});

describe('bundle size', () => {
  let dir: string | undefined;
  afterEach(() => {
    if (dir) rmSync(dir, { recursive: true, force: true });
    dir = undefined;
  });

  it('counts only JavaScript and CSS, with real gzip sizes, largest first', () => {
    dir = mkdtempSync(join(tmpdir(), 'rungbook-bundle-test-'));
    mkdirSync(join(dir, 'assets'));
    const big = 'export const x = "' + 'abc'.repeat(5000) + '";\n';
    writeFileSync(join(dir, 'assets', 'main.js'), big);
    writeFileSync(join(dir, 'assets', 'empty.css'), '');
    writeFileSync(join(dir, 'index.html'), '<!doctype html>');
    writeFileSync(join(dir, 'icon.png'), Buffer.alloc(4000, 1));
    const files = builtAssets(dir);
    expect(files.map((f) => f.path)).toEqual(['assets/main.js', 'assets/empty.css']);
    expect(files[0]!.bytes).toBe(Buffer.byteLength(big));
    // A repetitive text shrinks a lot, and the size is of a real gzip stream that inflates back to the file.
    expect(files[0]!.gzipBytes).toBeLessThan(files[0]!.bytes / 10);
    expect(gunzipSync(gzipSync(Buffer.from(big))).toString()).toBe(big);
    // RFC 1952: an empty member is a 10-byte header, a 2-byte empty final deflate block and an 8-byte trailer.
    expect(files[1]!.gzipBytes).toBe(20);

    const f = bundleFigures(files);
    expect(f['bundle_files']).toBe(2);
    expect(f['bundle_largest_chunk']).toBe('assets/main.js');
    expect(f['bundle_gzip_kb']).toBe(Math.round((files[0]!.gzipBytes + 20) / 100) / 10);
    expect(f['bundle_css_gzip_kb']).toBe(0);
  });

  it('reports no largest chunk for an empty build', () => {
    const f = bundleFigures([]);
    expect(f['bundle_files']).toBe(0);
    expect(f['bundle_largest_chunk']).toBeNull();
  });
});
