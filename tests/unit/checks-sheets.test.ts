// The check sheet format: entries, comments, continued lines, rules, and line-numbered errors; the built-in
// sheets load and merge into a Book without touching the user's own checks.
import { describe, expect, it } from 'vitest';
import { emptyBook } from '../../src/domain/book.ts';
import type { Check } from '../../src/domain/book.ts';
import { addBuiltInChecks, builtInChecks, formatRule, parseCheckSheet, parseRule } from '../../src/engine/check-sheets.ts';
import { loadBuiltInChecks, readSheetTexts } from '../../src/cli/check-sheets-fs.ts';

const GOOD = `# a comment
name: peak
title: Mains peak
group: mains voltage
formula: =MAINS_PEAK(mains_v,
    mains_tol)
unit: V
rule: max switch_v_max * 0.8 margin 10%
applies: stage="mosfet"
note: IEC 60038.

# second entry
name: window
title: PWM window
group: control
formula: f_pwm
rule: between f_pwm_min and f_pwm_max
note: common practice
`;

describe('parseCheckSheet', () => {
  it('reads entries with comments and continued lines', () => {
    const r = parseCheckSheet(GOOD, 'test.checks');
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.checks).toEqual([
      {
        name: 'peak',
        title: 'Mains peak',
        group: 'mains voltage',
        formula: 'MAINS_PEAK(mains_v, mains_tol)',
        unit: 'V',
        rule: { kind: 'max', limit: 'switch_v_max * 0.8', margin: 0.1 },
        appliesWhen: 'stage="mosfet"',
        note: 'IEC 60038.',
        line: 2,
        source: 'test.checks',
      },
      {
        name: 'window',
        title: 'PWM window',
        group: 'control',
        formula: 'f_pwm',
        unit: '',
        rule: { kind: 'between', low: 'f_pwm_min', high: 'f_pwm_max' },
        appliesWhen: '',
        note: 'common practice',
        line: 13,
        source: 'test.checks',
      },
    ]);
  });

  it('reports every problem with its line number and returns no checks', () => {
    const text = [
      'name: a', // 1
      'title: A', // 2
      'group: g', // 3
      'formula: 1', // 4
      'rule: maximum 3', // 5
      'note: n', // 6
      'colour: red', // 7
      '', // 8
      '  stray continuation', // 9
      'name: b', // 10
      'title: B', // 11
      'title: again', // 12
      'formula: IF(x="open, 1, 2)', // 13
      'rule: true', // 14
      '', // 15
      'name: Bad Name', // 16
      'title: C', // 17
      'group: g', // 18
      'formula: 1', // 19
      'rule: min', // 20
      'note: n', // 21
      'just words', // 22
    ].join('\n');
    const r = parseCheckSheet(text, 's.checks');
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.problems.map((p) => [p.line, p.message])).toEqual([
      [7, 'unknown key "colour" (keys: name, title, group, formula, unit, rule, applies, note)'],
      [9, 'an indented line continues a value, but no "key: value" line comes before it'],
      [12, '"title" is given twice in the entry that starts on line 10'],
      [22, 'expected "key: value", found "just words"'],
      [5, 'rule: a rule starts with max, min, between or true, not "maximum"'],
      [10, 'the entry that starts on line 10 needs "group:"'],
      [10, 'the entry that starts on line 10 needs "note:"'],
      [16, 'check name "Bad Name" must be lower-case letters, digits and _ and start with a letter'],
    ]);
    expect(r.problems.every((p) => p.source === 's.checks')).toBe(true);
  });

  it('reports an unclosed string and a bad rule limit at the line of the key', () => {
    const text = 'name: a\ntitle: A\ngroup: g\nformula: IF(x="open, 1, 2)\nrule: min\nnote: n\n\nname: a\ntitle: A\ngroup: g\nformula: 1\nrule: true\nnote: n\n';
    const r = parseCheckSheet(text);
    expect(r.ok ? [] : r.problems.map((p) => [p.line, p.message])).toEqual([
      [4, 'formula: text starting at character 6 has no closing quote'],
      [5, 'rule: a "min" rule needs a limit, for example "min 100"'],
      [8, 'check name "a" is already used on line 1'],
    ]);
  });
});

describe('parseRule and formatRule', () => {
  it('reads each rule kind and the margin as a fraction or a percentage', () => {
    expect(parseRule('max 100')).toEqual({ ok: true, rule: { kind: 'max', limit: '100' } });
    expect(parseRule('MIN i_logic margin 0.1')).toEqual({ ok: true, rule: { kind: 'min', limit: 'i_logic', margin: 0.1 } });
    expect(parseRule('between 0 and vcc margin 5%')).toEqual({ ok: true, rule: { kind: 'between', low: '0', high: 'vcc', margin: 0.05 } });
    expect(parseRule('true')).toEqual({ ok: true, rule: { kind: 'true' } });
  });

  it('refuses malformed rules with a message', () => {
    expect(parseRule('between 1').ok).toBe(false);
    expect(parseRule('max 1 margin 150%')).toEqual({ ok: false, error: 'margin "margin 150%" must be from 0 up to (not including) 100 %' });
    expect(parseRule('true 3').ok).toBe(false);
    expect(parseRule('max 1 margin lots').ok).toBe(false);
  });

  it('writes rules back in the sheet syntax', () => {
    for (const text of ['max switch_v_max * 0.8 margin 10%', 'between f_pwm_min and f_pwm_max margin 5%', 'true', 'min 0.05']) {
      const r = parseRule(text);
      expect(r.ok && formatRule(r.rule)).toBe(text);
    }
  });
});

describe('built-in sheets', () => {
  it('load from sheets/ with every check cited and grouped', () => {
    const checks = loadBuiltInChecks();
    expect(checks.length).toBeGreaterThanOrEqual(30);
    for (const c of checks) {
      expect(c.builtIn).toBe(true);
      expect(c.id).toBe(`check_${c.name}`);
      expect(c.note.length).toBeGreaterThan(20);
      expect(c.group).not.toBe('');
    }
    expect(Object.keys(readSheetTexts())).toEqual([
      '10-mains.checks', '20-power.checks', '30-supply.checks', '40-control.checks', '50-triac.checks', '60-transformer.checks',
      '70-surge.checks',
    ]);
  });

  it('throw with file and line when a shipped sheet is broken', () => {
    expect(() => builtInChecks({ 'x.checks': 'name: a\nbogus: 1\n' })).toThrow(/x\.checks:2: unknown key "bogus"/);
    expect(() => builtInChecks({ 'a.checks': GOOD, 'b.checks': GOOD })).toThrow(/check name "peak" is also used in a\.checks line 2/);
  });

  it('merge into a Book without replacing the user\'s edited or own checks', () => {
    const builtIns = loadBuiltInChecks();
    const edited: Check = { ...builtIns.find((c) => c.name === 'load_i')!, formula: 'load_w / mains_v', rev: 4 };
    const own: Check = { ...edited, id: 'check_mine', name: 'my_check', builtIn: false };
    const book = { ...emptyBook(), checks: [edited, own] };
    const merged = addBuiltInChecks(book, builtIns);
    expect(merged.checks.length).toBe(builtIns.length + 1);
    expect(merged.checks.find((c) => c.name === 'load_i')).toBe(edited);
    expect(book.checks.length).toBe(2);
    expect(addBuiltInChecks(merged, builtIns).checks.length).toBe(merged.checks.length);
  });
});
