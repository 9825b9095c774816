// The project stands alone: its code, tests, sheets and pages cite published sources by name (or say "common
// practice" / "from memory"), never a document or path outside the repository. SOURCES.md lists those sources.
import { describe, expect, it } from 'vitest';
import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { dirname, join, relative, resolve, sep } from 'node:path';
import { parseCheckSheet } from '../../src/engine/check-sheets.ts';
import { readSheetTexts } from '../../src/cli/check-sheets-fs.ts';
import { FUNCTION_DOCS } from '../../src/engine/functions/index.ts';

const ROOT = resolve(__dirname, '../..');
const SCANNED_DIRS = ['src', 'tests', 'sheets', 'bin'];
const SCANNED_FILES = ['README.md', 'CHANGELOG.md', 'SOURCES.md'];

/** A published source by name: a standard with its number, an RFC, IEEE 754, OWASP guidance, ANSI C84.1, Incoterms. */
const NAMED_SOURCE = /\b(?:IEC|CISPR|ISO) \d{3,5}(?:-\d+)*\b|\bRFC \d{3,5}\b|\bIEEE 754\b|\bOWASP\b|\bANSI C84\.1\b|\bIncoterms 20\d\d\b/;
/** What the project says where no published source stands behind a value. */
const HONEST_LABEL = /\bcommon practice\b|\bfrom memory\b/i;
/** Book lookups read the open Book; they state no engineering or costing rule, so they cite nothing. */
const LOOKUPS = new Set(['VAR', 'CHECK', 'CHECK_STATUS']);

function walk(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const p = join(dir, name);
    return statSync(p).isDirectory() ? walk(p) : [p];
  });
}

/** Every text file the rule covers (binary fixtures, recognised by a NUL byte, are skipped). */
function scannedTexts(): { file: string; text: string }[] {
  const paths = [
    ...SCANNED_DIRS.flatMap((d) => walk(join(ROOT, d))),
    ...SCANNED_FILES.map((f) => join(ROOT, f)).filter((p) => existsSync(p)),
  ];
  return paths
    .map((p) => ({ file: relative(ROOT, p), buf: readFileSync(p) }))
    .filter(({ buf }) => !buf.includes(0))
    .map(({ file, buf }) => ({ file, text: buf.toString('utf8') }));
}

/** The problems of one file's text: outside documents, outside paths. */
function outsideReferences(file: string, text: string): string[] {
  const found: string[] = [];
  // Any Markdown document named must be one of ours, at the path given or at the top level.
  for (const m of text.matchAll(/[\w./-]*\b[\w-]+\.md\b/g)) {
    const name = m[0];
    const candidates = [resolve(ROOT, dirname(file), name), resolve(ROOT, name), join(ROOT, name.split('/').pop()!)];
    if (!candidates.some((p) => p.startsWith(ROOT + sep) && existsSync(p))) found.push(`names ${name}, not in the repository`);
  }
  // The design notes' reference list, cited by its bare name.
  if (new RegExp('\\bREFER' + 'ENCES\\b').test(text)) found.push('cites the outside reference list');
  // Relative paths that climb out of the repository, and the outside shared folder or absolute home paths.
  for (const m of text.matchAll(/(?:\.\.\/)+[\w.-]*/g)) {
    const target = resolve(ROOT, dirname(file), m[0]);
    if (target !== ROOT && !target.startsWith(ROOT + sep)) found.push(`points outside the repository: ${m[0]}`);
  }
  if (new RegExp('(?:\\.\\./)+' + 'shared\\b').test(text)) found.push('points at a shared folder outside the repository');
  if (/(?:^|[\s'"`(])\/(?:work|home|Users|mnt)\/[\w.-]/m.test(text)) found.push('names an absolute path on a machine');
  return found;
}

describe('the project stands alone', () => {
  const texts = scannedTexts();

  it('scans the code, tests, sheets and pages', () => {
    const files = texts.map((t) => t.file);
    expect(files).toContain('README.md');
    expect(files).toContain(join('sheets', '10-mains.checks'));
    expect(files).toContain(join('tests', 'unit', 'sources-cited.test.ts'));
    expect(files.filter((f) => f.startsWith(`src${sep}`)).length).toBeGreaterThan(20);
  });

  it('names no document or path outside the repository', () => {
    const problems = texts.flatMap(({ file, text }) => outsideReferences(file, text).map((p) => `${file}: ${p}`));
    expect(problems).toEqual([]);
  });

  it('catches the kinds of outside citation it is for', () => {
    const outside = ['DESIGN', 'md'].join('.');
    expect(outsideReferences('tests/unit/x.test.ts', `// as measured in ${outside}`)).toHaveLength(1);
    expect(outsideReferences('README.md', `see [notes](../${'shared'}/notes.txt)`).length).toBeGreaterThan(0);
    expect(outsideReferences('tests/unit/x.test.ts', `// (${'REFER' + 'ENCES'}, Costing)`)).toHaveLength(1);
    expect(outsideReferences('README.md', 'See SOURCES.md and `../../src/engine`.')).toEqual(['points outside the repository: ../../src']);
    expect(outsideReferences('tests/unit/x.test.ts', "import { a } from '../../src/engine/check-sheets.ts'; // IEC 60038")).toEqual([]);
  });
});

describe('every rule names its source', () => {
  it('every built-in check note names a published source or says "common practice" or "from memory"', () => {
    const uncited: string[] = [];
    let count = 0;
    for (const [name, text] of Object.entries(readSheetTexts())) {
      const parsed = parseCheckSheet(text, name);
      expect(parsed.ok, name).toBe(true);
      if (!parsed.ok) continue;
      for (const c of parsed.checks) {
        count += 1;
        if (!NAMED_SOURCE.test(c.note) && !HONEST_LABEL.test(c.note)) uncited.push(`${c.source}:${c.line} ${c.name}`);
      }
    }
    expect(count).toBeGreaterThanOrEqual(30);
    expect(uncited).toEqual([]);
  });

  it('every formula function\'s doc line names a source or says "common practice" or "from memory" (Book lookups aside)', () => {
    const uncited = FUNCTION_DOCS.filter((d) => !LOOKUPS.has(d.name))
      .filter((d) => !NAMED_SOURCE.test(d.doc) && !HONEST_LABEL.test(d.doc))
      .map((d) => d.name);
    expect(uncited).toEqual([]);
  });

  it('tells a named source from a vague one', () => {
    expect(NAMED_SOURCE.test('IEC 60038:2009, table 1')).toBe(true);
    expect(NAMED_SOURCE.test('IEC 60335-1 clause 22.5')).toBe(true);
    expect(NAMED_SOURCE.test('RFC 4180 §2')).toBe(true);
    expect(NAMED_SOURCE.test('textbook formulas')).toBe(false);
    expect(HONEST_LABEL.test('power electronics textbooks, from memory')).toBe(true);
    expect(HONEST_LABEL.test('common guidance')).toBe(false);
  });

  it('SOURCES.md accounts for every built-in check', () => {
    const page = readFileSync(join(ROOT, 'SOURCES.md'), 'utf8');
    const missing = Object.entries(readSheetTexts()).flatMap(([name, text]) => {
      const parsed = parseCheckSheet(text, name);
      return parsed.ok ? parsed.checks.map((c) => c.name).filter((n) => !page.includes(`\`${n}\``)) : [name];
    });
    expect(missing).toEqual([]);
  });
});
