// Registration and help: every Rungbook function resolves by name in a fresh engine, its help matches what the
// engine was told, and no result ever shows NaN or Infinity as a number.
// Also: changes made in one evaluation (changeInOne), as the engine batch makes them without its undo entry.
import { describe, expect, it } from 'vitest';
import { DetailedCellError, HyperFormula } from 'hyperformula';
import enUS from 'hyperformula/i18n/languages/enUS';
import { changeInOne, createEngine, registerRungbookFunctions } from '../../src/engine/create.ts';
import { FUNCTION_AREAS, FUNCTION_DOCS, FUNCTION_PLUGINS, functionDoc, functionSignature } from '../../src/engine/functions/index.ts';

/** The function names the README lists under Formulas. */
const REQUIRED = [
  'MAINS_PEAK', 'XCAP_AMPS', 'XCAP_FOR', 'BLEED_TIME', 'DIVIDER_OUT', 'ASTABLE_HIGH', 'ASTABLE_LOW', 'ASTABLE_HZ',
  'ASTABLE_DUTY', 'RC_REACH', 'COND_LOSS', 'BRIDGE_LOSS', 'SNUB_WATTS', 'JUNCTION_C', 'SINK_RTH_MAX', 'E_NEAR',
  'E_UP', 'E_DOWN', 'RKM', 'RKM_TEXT', 'NEED_QTY', 'BUY_QTY', 'BREAK_PRICE', 'CTL_NODE', 'DROP_DC', 'ZENER_WORST',
  'LOAD_AMPS',
  // Triac stage, transformer supply and surge (src/engine/functions/triac.ts, transformer.ts, surge.ts).
  'PHASE_VRMS', 'TRIAC_LOSS', 'GATE_COLD', 'GATE_AMPS', 'COMMUTATION_DIDT', 'RECT_TROUGH', 'XFMR_VA', 'REG_LOSS',
  'VDR_CLAMP', 'VDR_SURGE_AMPS', 'VDR_ENERGY',
  // Book functions for notebook pages (src/engine/functions/book.ts).
  'VAR', 'CHECK', 'CHECK_STATUS', 'PART_PRICE', 'PART_COST',
];

/** A call with only the required arguments, each a plain sample of its kind. */
function sampleCall(name: string): string {
  const doc = functionDoc(name)!;
  const spec = FUNCTION_PLUGINS.flatMap((p) => p.specs).find((s) => s.name === name)!;
  const args = doc.args
    .filter((a) => !a.optional)
    .map((_, i) => {
      const kind = spec.args[i]!.kind ?? 'number';
      return kind === 'text' ? '"4k7"' : kind === 'flag' ? 'TRUE()' : kind === 'range' ? '{1,2}' : '1';
    });
  return `=${name}(${args.join(', ')})`;
}

describe('function registration', () => {
  it('documents every required function exactly once', () => {
    const names = FUNCTION_DOCS.map((d) => d.name);
    expect(new Set(names).size).toBe(names.length);
    expect([...names].sort()).toEqual([...REQUIRED].sort());
  });

  it('every documented function evaluates by name in a fresh engine (our code runs: no #NAME?)', () => {
    const hf = createEngine();
    const sheet = hf.getSheetId(hf.addSheet('fresh'))!;
    for (const { name } of FUNCTION_DOCS) {
      const formula = sampleCall(name);
      const v = hf.calculateFormula(formula, sheet);
      if (v instanceof DetailedCellError) {
        // An error is fine only when it is one of ours (so the function was found and ran), never #NAME?.
        expect(v.value, `${formula}: ${v.message}`).not.toBe('#NAME?');
        expect(v.message, formula).toMatch(new RegExp(`^${name}: `));
      } else {
        expect(['number', 'string', 'boolean'], formula).toContain(typeof v);
      }
    }
    hf.destroy();
  });

  it('the engine knows every name in its default language', () => {
    registerRungbookFunctions();
    const known = HyperFormula.getRegisteredFunctionNames('enGB');
    for (const { name } of FUNCTION_DOCS) expect(known).toContain(name);
  });

  it('registering again is harmless, and a language registered later gets the names too', () => {
    registerRungbookFunctions();
    registerRungbookFunctions();
    if (!HyperFormula.getRegisteredLanguagesCodes().includes('enUS')) HyperFormula.registerLanguage('enUS', enUS);
    registerRungbookFunctions();
    const hf = createEngine({ language: 'enUS' });
    const sheet = hf.getSheetId(hf.addSheet('us'))!;
    expect(hf.calculateFormula('=E_NEAR(5000, 24)', sheet)).toBe(5100);
    hf.destroy();
  });

  it('recalculates a cell when its input changes', () => {
    const hf = createEngine();
    const sheet = hf.getSheetId(hf.addSheet('cells'))!;
    hf.setSheetContent(sheet, [[0.47e-6, '=XCAP_AMPS(A1, 230, 50)']]);
    const before = hf.getCellValue({ sheet, row: 0, col: 1 }) as number;
    hf.setCellContents({ sheet, row: 0, col: 0 }, 0.94e-6);
    const after = hf.getCellValue({ sheet, row: 0, col: 1 }) as number;
    expect(after / before).toBeCloseTo(2, 10); // I = 2πfCV is linear in C
    hf.destroy();
  });
});

describe('function help', () => {
  it('each function has a doc line, an area, a result unit, and argument names', () => {
    for (const d of FUNCTION_DOCS) {
      expect(d.doc.length, d.name).toBeGreaterThan(20);
      expect(FUNCTION_AREAS).toContain(d.area);
      expect(typeof d.returns).toBe('string');
      for (const a of d.args) expect(a.name).toMatch(/^[a-z][a-z0-9_]*$/);
    }
  });
  it('matches the arguments the engine was told: count and which are optional', () => {
    for (const { plugin, specs } of FUNCTION_PLUGINS) {
      for (const spec of specs) {
        const params = plugin.implementedFunctions[spec.name]!.parameters!;
        const doc = functionDoc(spec.name)!;
        expect(params.length, spec.name).toBe(doc.args.length);
        params.forEach((p, i) => {
          const optional = p.optionalArg === true || p.defaultValue !== undefined;
          expect(optional, `${spec.name} argument ${i + 1}`).toBe(doc.args[i]!.optional === true);
        });
        // Optional arguments only at the end, as the engine fills them positionally.
        const firstOptional = doc.args.findIndex((a) => a.optional);
        if (firstOptional >= 0) expect(doc.args.slice(firstOptional).every((a) => a.optional), spec.name).toBe(true);
      }
    }
  });
  it('writes a signature line with units and optional arguments in brackets', () => {
    expect(functionSignature(functionDoc('mains_peak')!)).toBe('MAINS_PEAK(v_rms V, [tol]) → V');
    expect(functionSignature(functionDoc('XCAP_AMPS')!)).toBe('XCAP_AMPS(c F, v_rms V, f Hz) → A');
  });
});

describe('never NaN or Infinity as a number', () => {
  it('an overflowing result is #NUM! with a message', () => {
    const hf = createEngine();
    const sheet = hf.getSheetId(hf.addSheet('inf'))!;
    const v = hf.calculateFormula('=XCAP_FOR(1, 1e-300, 1e-300)', sheet);
    expect(v).toBeInstanceOf(DetailedCellError);
    expect((v as DetailedCellError).message).toMatch(/XCAP_FOR: the result is not a finite number/);
    hf.destroy();
  });
});

describe('changes made in one evaluation', () => {
  it('give the changed values the engine batch gives, evaluate once, and keep no undo history', () => {
    const sheets = { s: [[1, '=A1*2', '=B1+1']] };
    const ours = createEngine({}, sheets);
    const theirs = createEngine({}, sheets);
    const edits = (hf: HyperFormula) => () => {
      hf.setCellContents({ sheet: 0, row: 0, col: 0 }, 5);
      hf.setCellContents({ sheet: 0, row: 1, col: 0 }, [['=C1*10', 7]]);
    };
    let evaluations = 0;
    ours.on('valuesUpdated', () => evaluations++);
    const changes = changeInOne(ours, edits(ours));
    const expected = theirs.batch(edits(theirs));
    const values = (list: typeof changes) => list.map((c) => JSON.stringify(c)).sort();
    expect(values(changes)).toEqual(values(expected));
    expect(ours.getSheetValues(0)).toEqual([[5, 10, 11], [110, 7]]);
    expect(evaluations).toBe(1);
    expect(ours.isThereSomethingToUndo()).toBe(false);
    ours.destroy();
    theirs.destroy();
  });

  it('evaluates again and passes the error on when a change throws', () => {
    const hf = createEngine({}, { s: [[1, '=A1*2']] });
    expect(() =>
      changeInOne(hf, () => {
        hf.setCellContents({ sheet: 0, row: 0, col: 0 }, 4);
        throw new Error('refused');
      }),
    ).toThrow('refused');
    expect(hf.isEvaluationSuspended()).toBe(false);
    expect(hf.getCellValue({ sheet: 0, row: 0, col: 1 })).toBe(8);
    hf.destroy();
  });
});
