// Reads the check sheet text format of sheets/*.checks into Check records, and the rule mini-language
// ("max switch_v_max * 0.8 margin 10%") into a CheckRule. Errors carry the line they were found on.
//
// Format: entries of `key: value` lines separated by blank lines; a line starting with "#" is a comment; a line that
// starts with spaces continues the value above it. Keys: name, title, group, formula, unit, rule, applies, note.
import type { Book, Check, CheckRule } from '../domain/book.ts';
import { formulaBody, splitAtWord, tokenizeFormula } from './formula-names.ts';

export interface SheetProblem {
  /** File name or other label of the text. */
  source: string;
  /** 1-based line number. */
  line: number;
  message: string;
}

/** A check as read from a sheet, before it gets an id. */
export type SheetCheck = Omit<Check, 'id' | 'rev' | 'builtIn'> & { line: number; source: string };

export type SheetResult = { ok: true; checks: SheetCheck[] } | { ok: false; problems: SheetProblem[] };

const KEYS = ['name', 'title', 'group', 'formula', 'unit', 'rule', 'applies', 'note'] as const;
type Key = (typeof KEYS)[number];
const REQUIRED: readonly Key[] = ['name', 'title', 'group', 'formula', 'rule', 'note'];
const NAME_RE = /^[a-z_][a-z0-9_]*$/;

export type RuleResult = { ok: true; rule: CheckRule } | { ok: false; error: string };

/**
 * Parses a rule: `max EXPR`, `min EXPR`, `between EXPR and EXPR` (each optionally followed by `margin 10%` or
 * `margin 0.1`), or `true`. Limits stay formulas so they can read the variant.
 */
export function parseRule(text: string): RuleResult {
  let rest = text.trim();
  const kindMatch = /^(max|min|between|true)\b/i.exec(rest);
  if (!kindMatch) return { ok: false, error: `a rule starts with max, min, between or true, not "${rest.split(/\s/)[0] ?? ''}"` };
  const kind = kindMatch[1]!.toLowerCase() as CheckRule['kind'];
  rest = rest.slice(kindMatch[0].length).trim();
  let margin: number | undefined;
  const marginMatch = /\bmargin\s+([0-9.]+)\s*(%?)\s*$/i.exec(rest);
  if (marginMatch) {
    const n = Number(marginMatch[1]);
    margin = marginMatch[2] === '%' ? n / 100 : n;
    if (!Number.isFinite(margin) || margin < 0 || margin >= 1) {
      return { ok: false, error: `margin "${marginMatch[0].trim()}" must be from 0 up to (not including) 100 %` };
    }
    rest = rest.slice(0, marginMatch.index).trim();
  } else if (/\bmargin\b/i.test(rest)) {
    return { ok: false, error: 'write the margin at the end as "margin 10%" or "margin 0.1"' };
  }
  const withMargin = (rule: CheckRule): RuleResult => ({ ok: true, rule: margin === undefined ? rule : { ...rule, margin } });
  if (kind === 'true') {
    if (rest !== '') return { ok: false, error: `a "true" rule takes no limit, found "${rest}"` };
    return withMargin({ kind });
  }
  const t = tokenizeFormula(rest);
  if (!t.ok) return { ok: false, error: t.error };
  if (kind === 'between') {
    const split = splitAtWord(rest, 'and');
    if (!split.ok) return { ok: false, error: split.error };
    if (split.parts.length !== 2 || !split.parts[0] || !split.parts[1]) {
      return { ok: false, error: 'write a between rule as "between LOW and HIGH"' };
    }
    return withMargin({ kind, low: split.parts[0], high: split.parts[1] });
  }
  if (rest === '') return { ok: false, error: `a "${kind}" rule needs a limit, for example "${kind} 100"` };
  return withMargin({ kind, limit: rest });
}

function marginText(m: number | undefined): string {
  if (m === undefined) return '';
  return ` margin ${Number((m * 100).toPrecision(6))}%`;
}

/** Writes a rule back in the sheet syntax (the inverse of parseRule). */
export function formatRule(rule: CheckRule): string {
  switch (rule.kind) {
    case 'true':
      return `true${marginText(rule.margin)}`;
    case 'between':
      return `between ${rule.low ?? ''} and ${rule.high ?? ''}${marginText(rule.margin)}`;
    default:
      return `${rule.kind} ${rule.limit ?? ''}${marginText(rule.margin)}`;
  }
}

interface Draft {
  line: number;
  fields: Map<Key, { value: string; line: number }>;
}

/** Parses one sheet. Every problem is listed with its line; a sheet with any problem yields no checks. */
export function parseCheckSheet(text: string, source = 'sheet'): SheetResult {
  const problems: SheetProblem[] = [];
  const add = (line: number, message: string): void => void problems.push({ source, line, message });
  const drafts: Draft[] = [];
  let current: Draft | null = null;
  let lastKey: Key | null = null;
  const lines = text.replace(/^\uFEFF/, '').split(/\r\n|\n|\r/);
  lines.forEach((raw, index) => {
    const lineNo = index + 1;
    if (raw.trim() === '') {
      current = null;
      lastKey = null;
      return;
    }
    if (raw.trimStart().startsWith('#')) return;
    if (/^\s/.test(raw)) {
      if (!current || !lastKey) {
        add(lineNo, 'an indented line continues a value, but no "key: value" line comes before it');
        return;
      }
      const field = current.fields.get(lastKey)!;
      field.value = `${field.value} ${raw.trim()}`.trim();
      return;
    }
    const m = /^([A-Za-z_]+)\s*:(.*)$/.exec(raw);
    if (!m) {
      add(lineNo, `expected "key: value", found "${raw.trim()}"`);
      return;
    }
    const key = m[1]!.toLowerCase();
    if (!(KEYS as readonly string[]).includes(key)) {
      add(lineNo, `unknown key "${m[1]}" (keys: ${KEYS.join(', ')})`);
      lastKey = null;
      return;
    }
    if (!current) {
      current = { line: lineNo, fields: new Map() };
      drafts.push(current);
    }
    const k = key as Key;
    if (current.fields.has(k)) {
      add(lineNo, `"${k}" is given twice in the entry that starts on line ${current.line}`);
      lastKey = null;
      return;
    }
    current.fields.set(k, { value: m[2]!.trim(), line: lineNo });
    lastKey = k;
  });

  const checks: SheetCheck[] = [];
  const namesSeen = new Map<string, number>();
  for (const d of drafts) {
    const get = (k: Key): string => d.fields.get(k)?.value ?? '';
    const lineOf = (k: Key): number => d.fields.get(k)?.line ?? d.line;
    let bad = false;
    for (const k of REQUIRED) {
      if (get(k) === '') {
        add(lineOf(k), `the entry that starts on line ${d.line} needs "${k}:"`);
        bad = true;
      }
    }
    if (bad) continue;
    const name = get('name');
    if (!NAME_RE.test(name)) {
      add(lineOf('name'), `check name "${name}" must be lower-case letters, digits and _ and start with a letter`);
      continue;
    }
    const earlier = namesSeen.get(name);
    if (earlier !== undefined) {
      add(lineOf('name'), `check name "${name}" is already used on line ${earlier}`);
      continue;
    }
    namesSeen.set(name, lineOf('name'));
    for (const k of ['formula', 'applies'] as const) {
      const t = tokenizeFormula(formulaBody(get(k)));
      if (!t.ok) {
        add(lineOf(k), `${k}: ${t.error}`);
        bad = true;
      }
    }
    const rule = parseRule(get('rule'));
    if (!rule.ok) {
      add(lineOf('rule'), `rule: ${rule.error}`);
      bad = true;
    }
    if (bad || !rule.ok) continue;
    checks.push({
      name,
      title: get('title'),
      group: get('group'),
      formula: formulaBody(get('formula')),
      unit: get('unit'),
      rule: rule.rule,
      appliesWhen: formulaBody(get('applies')),
      note: get('note'),
      line: d.line,
      source,
    });
  }
  return problems.length > 0 ? { ok: false, problems } : { ok: true, checks };
}

/** Turns a sheet check into a Check record with a stable id, so reloading the built-ins updates in place. */
export function checkFromSheet(c: SheetCheck, builtIn: boolean): Check {
  return {
    id: `check_${c.name}`,
    rev: 1,
    name: c.name,
    title: c.title,
    group: c.group,
    formula: c.formula,
    unit: c.unit,
    rule: c.rule,
    appliesWhen: c.appliesWhen,
    note: c.note,
    builtIn,
  };
}

/**
 * The built-in checks from the texts of sheets/ (file name → text), in file-name order. The built-in sheets ship
 * with the program, so a problem in one is a defect: it throws with every problem and its line.
 */
export function builtInChecks(texts: Record<string, string>): Check[] {
  const checks: Check[] = [];
  const problems: SheetProblem[] = [];
  const names = new Map<string, string>();
  for (const source of Object.keys(texts).sort()) {
    const r = parseCheckSheet(texts[source]!, source);
    if (!r.ok) {
      problems.push(...r.problems);
      continue;
    }
    for (const c of r.checks) {
      const other = names.get(c.name);
      if (other) problems.push({ source, line: c.line, message: `check name "${c.name}" is also used in ${other}` });
      names.set(c.name, `${source} line ${c.line}`);
      checks.push(checkFromSheet(c, true));
    }
  }
  if (problems.length > 0) {
    throw new Error(`built-in check sheets have problems:\n${problems.map((p) => `${p.source}:${p.line}: ${p.message}`).join('\n')}`);
  }
  return checks;
}

/**
 * A copy of the Book with the built-in checks added where the Book has no check of that name yet; checks the
 * user already has (edited built-ins or their own) are kept as they are. The Book passed in is not changed.
 */
export function addBuiltInChecks(book: Book, checks: readonly Check[]): Book {
  const have = new Set(book.checks.map((c) => c.name.toLowerCase()));
  const ids = new Set(book.checks.map((c) => c.id));
  const added = checks.filter((c) => !have.has(c.name.toLowerCase()) && !ids.has(c.id)).map((c) => ({ ...c, rule: { ...c.rule } }));
  return { ...book, checks: [...book.checks, ...added] };
}
