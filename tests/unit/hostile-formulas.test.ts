// Hostile formulas and names from an outside probe: text that doubles until memory runs out, pages of formulas that
// read millions of cells, and parameter names that are object-prototype names. Each is refused or bounded, with a
// message where the input was, and nothing else changes.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { emptyBook } from '../../src/domain/book.ts';
import type { Book, Check, NotebookPage, NotebookSection, Variant } from '../../src/domain/book.ts';
import { RESERVED_NAMES, ownValue, paramNameProblem, reservedNameProblem } from '../../src/domain/params.ts';
import { matchHeader, parseTsv } from '../../src/domain/tsv.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { createEngine } from '../../src/engine/create.ts';
import { evaluateChecks } from '../../src/engine/family.ts';
import { evaluateFormula, guardFormula } from '../../src/engine/formula-guard.ts';
import { MAX_TEXT_LENGTH } from '../../src/engine/functions/text.ts';
import { NOTEBOOK_LIMITS, evaluateNotebookPage, notebookCellProblem } from '../../src/engine/notebook.ts';
import { planClear, planPaste } from '../../src/ui/grid-edits.ts';
import type { FamilyColumn, PasteTarget } from '../../src/ui/grid-edits.ts';
import { validateVariant, variantDraft } from '../../src/ui/record-forms.ts';
import { runCli, writeBook } from './cli-helpers.ts';

/** The probe's formula: thirty SUBSTITUTEs, each doubling "xx" (2^31 characters at the end), in 634 characters. */
const DOUBLING_SUBSTITUTE = (() => {
  let f = '"xx"';
  for (let i = 0; i < 30; i++) f = `SUBSTITUTE(${f},"x","xx")`;
  return f;
})();

function page(...sections: NotebookSection[]): NotebookPage {
  return { id: 'page_probe', rev: 1, title: 'probe', position: 0, sections };
}
const grid = (rows: string[][]): NotebookSection => ({ heading: 'grid', text: '', grid: rows });

function check(name: string, formula: string): Check {
  return { id: `c_${name}`, rev: 1, name, title: name, formula, unit: '', rule: { kind: 'max', limit: '1' }, appliesWhen: '', note: 'probe', builtIn: false, group: 'probe' };
}

function checkBook(checks: Check[]): Book {
  return { ...emptyBook(), variants: [{ id: 'v1', rev: 1, code: 'D-230', name: 'D-230', params: { mains_v: 230 } }], checks };
}

let dir = '';
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'rungbook-hostile-'));
});
afterAll(() => {
  if (dir) rmSync(dir, { recursive: true, force: true });
});

describe('text that grows without bound stops at the common spreadsheet cell limit', () => {
  it('the probe formula passes the guard yet ends as #VALUE! with a message, quickly', () => {
    expect(guardFormula(DOUBLING_SUBSTITUTE).ok).toBe(true);
    const hf = createEngine();
    const sheet = hf.getSheetId(hf.addSheet('probe'))!;
    const started = Date.now();
    const r = evaluateFormula(hf, DOUBLING_SUBSTITUTE, sheet);
    expect(Date.now() - started).toBeLessThan(5_000);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error).toMatch(/^#VALUE! .*SUBSTITUTE: the result would be 32,768 characters long; text in a formula stops at 32,767/);
    hf.destroy();
  });

  it('each function that can lengthen text, and "&", gives #VALUE! past 32,767 characters and the exact text up to it', () => {
    const hf = createEngine();
    const sheet = hf.getSheetId(hf.addSheet('probe'))!;
    // A1 holds exactly the limit; B1 one character.
    hf.setSheetContent(sheet, [["'" + 'a'.repeat(MAX_TEXT_LENGTH), 'b']]);
    const tooLong: Record<string, string> = {
      '=A1&B1': '&',
      '=CONCATENATE(A1,B1)': 'CONCATENATE',
      '=SUBSTITUTE(A1,"a","aa")': 'SUBSTITUTE',
      '=SUBSTITUTE(A1,"a","aa",7)': 'SUBSTITUTE',
      '=REPLACE(A1,1,0,B1)': 'REPLACE',
      '=TEXTJOIN("-",TRUE(),A1,B1)': 'TEXTJOIN',
      '=SUBSTITUTE("abc","","x")&A1': '&',
    };
    for (const [formula, fn] of Object.entries(tooLong)) {
      const v = hf.calculateFormula(formula, sheet) as { value?: string; message?: string };
      expect(v.value, formula).toBe('#VALUE!');
      expect(v.message, formula).toMatch(new RegExp(`^${fn.replace('&', '&')}: the result would be [\\d,]+ characters long`));
    }
    // Up to the limit, and for ordinary text, the functions give what the engine always gave.
    expect(hf.calculateFormula('=LEN(A1&"")', sheet)).toBe(MAX_TEXT_LENGTH);
    expect(hf.calculateFormula('=LEN(SUBSTITUTE(A1,"a","b"))', sheet)).toBe(MAX_TEXT_LENGTH);
    expect(hf.calculateFormula('=SUBSTITUTE("a.b.c",".","-")', sheet)).toBe('a-b-c');
    expect(hf.calculateFormula('=SUBSTITUTE("a.b.c",".","-",2)', sheet)).toBe('a.b-c');
    // The replacement is taken literally: "$&" is two characters, not "the match".
    expect(hf.calculateFormula('=SUBSTITUTE("a$b","$","$&")', sheet)).toBe('a$&b');
    expect(hf.calculateFormula('=CONCATENATE("R", 4, "k", TRUE())', sheet)).toBe('R4kTRUE');
    expect(hf.calculateFormula('=REPLACE("abcdef",2,3,"X")', sheet)).toBe('aXef');
    expect(hf.calculateFormula('=TEXTJOIN("-",TRUE(),"a","","b",1)', sheet)).toBe('a-b-1');
    expect(hf.calculateFormula('=TEXTJOIN("-",FALSE(),"a","","b")', sheet)).toBe('a--b');
    hf.destroy();
  });

  it('rungbook eval prints the message and exits 1 instead of running out of memory', async () => {
    const started = Date.now();
    const r = await runCli(['eval', DOUBLING_SUBSTITUTE]);
    expect(Date.now() - started).toBeLessThan(10_000);
    expect(r.code).toBe(1);
    expect(r.err).toBe('#VALUE!: SUBSTITUTE: the result would be 32,768 characters long; text in a formula stops at 32,767 characters');
    expect(r.out).toBe('');
  });

  it('rungbook check reports a doubling check as an error and goes on with the rest', async () => {
    // Checks read each other by name, so "&" can double text from one check to the next.
    const chain = [check('t0', '"xx"'), ...Array.from({ length: 40 }, (_, i) => check(`t${i + 1}`, `t${i} & t${i}`))];
    const book = checkBook([check('subst', DOUBLING_SUBSTITUTE), ...chain, check('peak', 'MAINS_PEAK(mains_v, 0.1)')]);
    const started = Date.now();
    const results = evaluateChecks(book);
    expect(Date.now() - started).toBeLessThan(20_000);
    const by = (name: string) => results.find((r) => r.checkName === name)!;
    expect(by('subst')).toMatchObject({ status: 'error' });
    expect(by('subst').message).toContain('SUBSTITUTE: the result would be 32,768 characters long');
    expect(by('t15').message).toContain('&: the result would be 32,768 characters long');
    expect(by('t40').status).toBe('error');
    // √2 · 253 V = 357.8 V (IEC 60038:2009, table 1, +10 %): the sound check beside them is untouched.
    expect(by('peak').value as number).toBeCloseTo(357.8, 1);

    const file = writeBook(dir, 'doubling.rungbook.json', book);
    const r = await runCli(['check', file, '--json']);
    expect(Date.now() - started).toBeLessThan(40_000);
    const rows = JSON.parse(r.out) as { check: string; status: string; message?: string }[];
    expect(rows.find((x) => x.check === 'subst')!.status).toBe('error');
    expect(rows.find((x) => x.check === 't40')!.status).toBe('error');
  });
});

describe('a notebook page cannot blank itself or freeze the app', () => {
  const book = demoBook();

  it('cells that each double the one above end as an error in the cell, the rest of the page evaluated', () => {
    const rows = [['xx'], ...Array.from({ length: 40 }, (_, i) => [`=A${i + 1}&A${i + 1}`])];
    const result = evaluateNotebookPage(book, page(grid(rows), grid([['=1+1']])));
    const cells = result.sections[0]!.grid;
    // 2 · 2^13 = 16,384 characters in A14; A15 would be 32,768.
    expect((cells[13]![0]!.value as string).length).toBe(16_384);
    expect(cells[14]![0]).toMatchObject({ value: null, error: '#VALUE!' });
    expect(cells[14]![0]!.message).toContain('32,767');
    expect(cells[40]![0]!.error).toBe('#VALUE!');
    expect(result.sections[1]!.grid[0]![0]!.value).toBe(2);
  });

  it('a page of 60 × 20 SUMPRODUCT(LEN(…)) cells over a full grid is refused past the page’s cells read, quickly', () => {
    const data = Array.from({ length: 60 }, () => Array.from({ length: 20 }, () => 'abcdefghij'));
    const heavy = Array.from({ length: 60 }, () => Array.from({ length: 20 }, () => '=SUMPRODUCT(LEN(Section1!A1:T60))'));
    const started = Date.now();
    const result = evaluateNotebookPage(book, page(grid(data), grid(heavy)));
    expect(Date.now() - started).toBeLessThan(5_000);
    const cells = result.sections[1]!.grid.flat();
    // 1,200 cells each: 83 formulas fit in 100,000 cells read; the rest say why.
    expect(cells.filter((c) => c.error !== '#LIMIT')).toHaveLength(Math.floor(NOTEBOOK_LIMITS.pageRangeCells / 1_200));
    const refused = cells.filter((c) => c.error === '#LIMIT');
    expect(refused).toHaveLength(1_200 - 83);
    expect(refused[0]!.message).toMatch(/would read 100,800 cells together; a page reads at most 100,000/);
  });

  it('stops a calculation that runs past its time budget with an error in each cell not yet done', () => {
    const result = evaluateNotebookPage(book, page(grid([['1', '=A1+1', '=B1*2']])), { calculationMs: 0 });
    const row = result.sections[0]!.grid[0]!;
    expect(row[0]!.value).toBe(1);
    for (const c of row.slice(1)) {
      expect(c.error).toBe('#ERROR!');
      expect(c.message).toMatch(/calculation stopped after 0 ms/);
    }
  });

  it('an exception inside the engine leaves every cell with its input and each formula with the reason', () => {
    // A Book whose variants cannot be read makes VAR throw inside the engine's calculation.
    const broken = { ...book } as Book;
    Object.defineProperty(broken, 'variants', {
      get() {
        throw new RangeError('Invalid string length');
      },
    });
    const result = evaluateNotebookPage(broken, page(grid([['230 V', '=VAR("FR4-60-CD", "load_w")', 'words']])));
    const row = result.sections[0]!.grid[0]!;
    expect(row[0]!.value).toBe(230);
    expect(row[1]).toMatchObject({ value: null, error: '#ERROR!' });
    expect(row[1]!.message).toMatch(/^the page could not be calculated: it produced a value too large to hold/);
    expect(row[2]!.value).toBe('words');
  });

  it('refuses pages past their filled cells, grids and text length with a message in the cell', () => {
    const long = 'x'.repeat(NOTEBOOK_LIMITS.cellText + 1);
    const full = Array.from({ length: 100 }, () => Array.from({ length: 26 }, () => '1'));
    const grids = Array.from({ length: NOTEBOOK_LIMITS.gridSections + 1 }, () => grid([['2']]));
    const result = evaluateNotebookPage(book, page(grid([[long]]), grid(full), grid(full), ...grids));
    expect(result.sections[0]!.grid[0]![0]).toMatchObject({ error: '#LIMIT', value: null });
    expect(result.sections[0]!.grid[0]![0]!.message).toContain(`at most ${NOTEBOOK_LIMITS.cellText.toLocaleString('en-GB')} characters`);
    // 1 + 2,600 + 2,399 cells fill the page; the 5,001st is refused.
    expect(result.sections[2]!.grid[92]![6]!.value).toBe(1);
    expect(result.sections[2]!.grid[92]![7]).toMatchObject({ error: '#LIMIT' });
    expect(result.sections[2]!.grid[92]![7]!.message).toContain('at most 5,000 filled cells');
    expect(result.sections.at(-1)!.grid[0]![0]!.message).toContain(`at most ${NOTEBOOK_LIMITS.gridSections} grids`);

    const small = page(grid([['1', '']]));
    expect(notebookCellProblem(small, 0, 0, 1, long)).toMatch(new RegExp(`at most ${NOTEBOOK_LIMITS.cellText.toLocaleString('en-GB')} characters.*Nothing was saved`));
    expect(notebookCellProblem(small, 0, 0, 1, '=A1*2')).toBeUndefined();
    const crowded = page(grid(full), grid(full), { heading: 'g', text: '', grid: [Array.from({ length: 26 }, () => '1').concat('')] });
    const filled = 2 * 2_600 + 26;
    expect(filled).toBeGreaterThan(NOTEBOOK_LIMITS.pageCells);
    expect(notebookCellProblem(crowded, 2, 0, 26, '5')).toMatch(/at most 5,000 filled cells/);
    // Changing a filled cell of a full page is still fine.
    expect(notebookCellProblem(crowded, 0, 0, 0, '5')).toBeUndefined();
  });
});

describe('parameter names that every object has built in', () => {
  const PROTOTYPE_NAMES = ['constructor', 'toString', '__proto__', 'hasOwnProperty', 'valueOf', 'prototype', 'isPrototypeOf', 'toLocaleString'];

  function familyBook(): Book {
    const variants: Variant[] = [
      { id: 'v_a', rev: 1, code: 'A-40', name: 'Forty', params: { steps: 3, load_w: 40 } },
      { id: 'v_b', rev: 1, code: 'B-60', name: 'Sixty', params: { steps: 4, load_w: 60 } },
    ];
    return { ...emptyBook(), variants };
  }
  const columns: FamilyColumn[] = [
    { key: 'code', kind: 'code' },
    { key: 'name', kind: 'name' },
    { key: 'steps', kind: 'param' },
    { key: 'load_w', kind: 'param' },
  ];
  const target = (b: Book, row: number, col: number): PasteTarget => ({ order: b.variants, columns, row, col, lastRow: row, lastCol: col });
  const rows = (text: string): string[][] => {
    const r = parseTsv(text);
    if (!r.ok) throw new Error(r.error);
    return r.rows;
  };
  const ids = (): string => 'var_new';

  it('one rule names every refusal: shape, and the built-in names of every object', () => {
    for (const name of PROTOTYPE_NAMES) expect(paramNameProblem(name), name).toBeDefined();
    expect(paramNameProblem('constructor')).toBe('“constructor” is a name every object has built in; choose another');
    expect(paramNameProblem('prototype')).toContain('built in');
    expect(paramNameProblem('Load W')).toBe('“Load W” is not a parameter name. Lower-case letters, digits and _, starting with a letter (formulas use it by this name)');
    for (const name of ['load_w', 'r_s1', 'my_param2', 'constructor_v']) expect(paramNameProblem(name), name).toBeUndefined();
    for (const name of Object.getOwnPropertyNames(Object.prototype)) expect(RESERVED_NAMES.has(name), name).toBe(true);
    expect(reservedNameProblem('EUR')).toBeUndefined();
    expect(reservedNameProblem('__proto__')).toContain('built in');
  });

  it('a lookup finds only what the record itself holds', () => {
    const params: Record<string, number> = { load_w: 40 };
    for (const name of PROTOTYPE_NAMES) expect(ownValue(params, name), name).toBeUndefined();
    expect(ownValue(params, 'load_w')).toBe(40);
    expect(ownValue(undefined, 'load_w')).toBeUndefined();
  });

  it('a pasted header naming constructor is refused whole with the rule’s message, and nothing changes', () => {
    const b = familyBook();
    const before = structuredClone(b);
    const plan = planPaste(b, target(b, 0, 0), rows('code\tconstructor\r\nA-40\t5\r\n'), ids);
    expect(plan).toEqual({ ok: false, message: 'Row 1 of the paste (A-40), constructor: “constructor” is a name every object has built in; choose another. Nothing was pasted.' });
    expect(b).toEqual(before);
    // A header cell with a capital letter is no parameter name, so the row reads as data and lands in code and name.
    expect(matchHeader(['code', 'toString'], new Set(['code']))).toEqual(['code', 'tostring']);
  });

  it('the variant form refuses a new parameter named constructor', () => {
    const b = familyBook();
    const draft = { ...variantDraft(b, b.variants[0]), newParamName: 'constructor', newParamValue: '5' };
    const r = validateVariant(draft, b, b.variants[0], ids);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.problems.newParamName).toBe('“constructor” is a name every object has built in; choose another');
  });

  it('a Book already holding a constructor parameter reads as blank where a variant lacks it, and the column can be cleared', () => {
    const b = familyBook();
    b.variants[0] = { ...b.variants[0]!, params: { ...b.variants[0]!.params, constructor: 5 } };
    // The other variant has no such parameter: its field is blank, not the text of a function.
    expect(variantDraft(b, b.variants[1]).params.constructor).toBe('');
    expect(variantDraft(b, b.variants[0]).params.constructor).toBe('5');
    const draft = variantDraft(b, b.variants[1]);
    expect(validateVariant(draft, b, b.variants[1], ids)).toMatchObject({ ok: true, record: { params: { steps: 4, load_w: 60 } } });
    const wide: PasteTarget = { order: b.variants, columns: [...columns, { key: 'constructor', kind: 'param' }], row: 0, col: 4, lastRow: 1, lastCol: 4 };
    const cleared = planClear(b, wide, ids);
    expect(cleared.ok).toBe(true);
    if (cleared.ok) for (const c of cleared.changes) expect(Object.hasOwn(c.after.params, 'constructor')).toBe(false);
  });
});
