// Hostile Book files: random bytes, random JSON and randomly damaged real files never throw; a refused file always
// says why, with a path and a message.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { parseBookFile, serializeBook } from '../../src/io/book-file.ts';
import type { BookFileResult } from '../../src/io/book-file.ts';
import { sampleBook } from '../fixtures/sample-book.ts';

function wellFormedRefusal(result: BookFileResult): boolean {
  if (result.ok) return false;
  return (
    result.problems.length > 0 &&
    result.problems.length <= 20 &&
    result.total >= result.problems.length &&
    result.problems.every((p) => typeof p.path === 'string' && typeof p.message === 'string' && p.message.length > 0)
  );
}

/** Every place in a JSON value, as a list of keys from the root. */
function places(value: unknown, at: (string | number)[] = []): (string | number)[][] {
  const out: (string | number)[][] = [at];
  if (Array.isArray(value)) value.forEach((v, i) => out.push(...places(v, [...at, i])));
  else if (typeof value === 'object' && value !== null) for (const [k, v] of Object.entries(value)) out.push(...places(v, [...at, k]));
  return out;
}

function replaced(root: unknown, path: (string | number)[], value: unknown): unknown {
  if (path.length === 0) return value;
  const copy = structuredClone(root) as Record<string | number, unknown>;
  let node = copy;
  for (const k of path.slice(0, -1)) node = node[k] as Record<string | number, unknown>;
  node[path[path.length - 1]!] = value;
  return copy;
}

describe('Book file reading never throws', () => {
  it('refuses random bytes with a reason', () => {
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 2000 }), (bytes) => {
        const text = new TextDecoder().decode(bytes);
        expect(wellFormedRefusal(parseBookFile(text))).toBe(true);
      }),
      { numRuns: 300 },
    );
  });

  it('refuses random JSON with a reason', () => {
    fc.assert(
      fc.property(fc.jsonValue(), (value) => {
        expect(wellFormedRefusal(parseBookFile(JSON.stringify(value) ?? ''))).toBe(true);
      }),
      { numRuns: 300 },
    );
  });

  it('refuses random objects that carry the Book marker, with a reason', () => {
    const anyField = fc.dictionary(fc.constantFrom('settings', 'parts', 'quotes', 'variants', 'runs', 'pages', 'savedAt', 'x'), fc.jsonValue());
    fc.assert(
      fc.property(anyField, fc.constantFrom(1, 2, 0, '1'), (fields, version) => {
        const text = JSON.stringify({ ...fields, format: 'rungbook-book', version });
        const result = parseBookFile(text);
        // Only a released version (1, migrated, or 2) with fields that happen to be valid (empty lists) may be accepted.
        if (!result.ok) expect(wellFormedRefusal(result)).toBe(true);
        else expect([1, 2]).toContain(version);
      }),
      { numRuns: 300 },
    );
  });

  it('either reads or refuses a real Book file with one value replaced by random JSON', () => {
    const original = JSON.parse(serializeBook(sampleBook(), { savedAt: '2025-03-01T12:00:00.000Z' })) as unknown;
    const all = places(original).filter((p) => p.length > 0);
    fc.assert(
      fc.property(fc.constantFrom(...all), fc.jsonValue({ maxDepth: 2 }), (path, value) => {
        const result = parseBookFile(JSON.stringify(replaced(original, path, value)));
        if (!result.ok) expect(wellFormedRefusal(result)).toBe(true);
      }),
      { numRuns: 500 },
    );
  });

  it('refuses every cut-short copy of a real Book file with a truncation message', () => {
    const text = serializeBook(sampleBook(), { savedAt: '2025-03-01T12:00:00.000Z' });
    fc.assert(
      fc.property(fc.integer({ min: 1, max: text.trimEnd().length - 1 }), (cut) => {
        const result = parseBookFile(text.slice(0, cut));
        expect(result.ok).toBe(false);
        if (!result.ok) expect(result.problems[0]!.message).toMatch(/^the file ends too early at line \d+, column \d+/);
      }),
      { numRuns: 300 },
    );
  });

  it('calls a file cut inside a number (after "4." or "4.7e-") truncated, not malformed', () => {
    for (const tail of ['4.', '4.7e', '4.7e-', '-']) {
      const result = parseBookFile(`{"format": "rungbook-book", "version": ${tail}`);
      expect(result.ok).toBe(false);
      if (!result.ok) expect(result.problems[0]!.message).toMatch(/^the file ends too early/);
    }
  });

  it('refuses random text inserted into a real Book file, or reads it when it is still a valid Book', () => {
    const text = serializeBook(sampleBook(), { savedAt: '2025-03-01T12:00:00.000Z' });
    fc.assert(
      fc.property(fc.integer({ min: 0, max: text.length }), fc.string({ maxLength: 8 }), (at, junk) => {
        const result = parseBookFile(text.slice(0, at) + junk + text.slice(at));
        if (!result.ok) expect(wellFormedRefusal(result)).toBe(true);
      }),
      { numRuns: 300 },
    );
  });
});
