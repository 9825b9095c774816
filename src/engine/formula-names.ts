// A small tokenizer for check and build-rule formulas: finds the names a formula uses (identifiers outside string
// literals and not followed by "(") so they can be rewritten to the cells of a variant's row in the family table.

export const TOKEN_KIND = {
  string: 'string',
  number: 'number',
  name: 'name',
  func: 'func',
  error: 'error',
  space: 'space',
  op: 'op',
} as const;
export type TokenKind = (typeof TOKEN_KIND)[keyof typeof TOKEN_KIND];

export interface Token {
  kind: TokenKind;
  text: string;
  /** Offset of the token in the formula text. */
  start: number;
}

export type TokenizeResult = { ok: true; tokens: Token[] } | { ok: false; error: string };

const NUMBER = /^(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?/;
const IDENT = /^[A-Za-z_][A-Za-z0-9_.]*/;
const ERROR_LITERAL = /^#[A-Za-z0-9/!?.]+/;
const SPACE = /^\s+/;

/** Splits a formula (with or without its leading "=") into tokens. Strings use double quotes, "" inside one. */
export function tokenizeFormula(formula: string): TokenizeResult {
  const tokens: Token[] = [];
  let i = 0;
  while (i < formula.length) {
    const rest = formula.slice(i);
    const ch = formula[i]!;
    if (ch === '"') {
      let j = i + 1;
      for (;;) {
        if (j >= formula.length) return { ok: false, error: `text starting at character ${i + 1} has no closing quote` };
        if (formula[j] === '"') {
          if (formula[j + 1] === '"') j += 2;
          else break;
        } else j++;
      }
      tokens.push({ kind: TOKEN_KIND.string, text: formula.slice(i, j + 1), start: i });
      i = j + 1;
      continue;
    }
    const m =
      (SPACE.exec(rest) && { kind: TOKEN_KIND.space, m: SPACE.exec(rest)! }) ||
      (NUMBER.exec(rest) && { kind: TOKEN_KIND.number, m: NUMBER.exec(rest)! }) ||
      (ERROR_LITERAL.exec(rest) && { kind: TOKEN_KIND.error, m: ERROR_LITERAL.exec(rest)! });
    if (m) {
      tokens.push({ kind: m.kind, text: m.m[0], start: i });
      i += m.m[0].length;
      continue;
    }
    const id = IDENT.exec(rest);
    if (id) {
      let j = i + id[0].length;
      while (j < formula.length && /\s/.test(formula[j]!)) j++;
      const kind = formula[j] === '(' ? TOKEN_KIND.func : TOKEN_KIND.name;
      tokens.push({ kind, text: id[0], start: i });
      i += id[0].length;
      continue;
    }
    const two = rest.slice(0, 2);
    const op = two === '<=' || two === '>=' || two === '<>' ? two : ch;
    tokens.push({ kind: TOKEN_KIND.op, text: op, start: i });
    i += op.length;
  }
  return { ok: true, tokens };
}

/** Drops one leading "=" and surrounding space. */
export function formulaBody(formula: string): string {
  const t = formula.trim();
  return t.startsWith('=') ? t.slice(1).trim() : t;
}

/** TRUE and FALSE: values, not names (normalizeFormula writes them as the calls the engine reads). */
const BARE_LITERALS = new Set(['true', 'false']);

/** The key a name is looked up by: names are matched without regard to case, like function names. */
export function nameKey(name: string): string {
  return name.toLowerCase();
}

/** Names a formula refers to (lower case, each once, in order of first use). TRUE and FALSE are not names. */
export function formulaNames(formula: string): { ok: true; names: string[] } | { ok: false; error: string } {
  const t = tokenizeFormula(formulaBody(formula));
  if (!t.ok) return t;
  const seen = new Set<string>();
  for (const tok of t.tokens) {
    if (tok.kind !== TOKEN_KIND.name) continue;
    const key = nameKey(tok.text);
    if (!BARE_LITERALS.has(key)) seen.add(key);
  }
  return { ok: true, names: [...seen] };
}

export type RewriteResult = { ok: true; formula: string } | { ok: false; error: string; unknown: string[] };

/**
 * Rewrites every name of a formula with `lookup(key)` (a cell address or any expression) and returns the formula
 * with its leading "="; numbers and TRUE/FALSE stay as written (normalizeFormula in formula-syntax.ts makes them
 * the engine's). Names the lookup does not know are reported together, never half-rewritten — unless `unknownAs`
 * is given, which stands in for them (an error expression, so a branch never taken still works).
 */
export function rewriteFormula(
  formula: string,
  lookup: (key: string) => string | undefined,
  unknownAs?: string,
): RewriteResult {
  const body = formulaBody(formula);
  if (body === '') return { ok: false, error: 'the formula is empty', unknown: [] };
  const t = tokenizeFormula(body);
  if (!t.ok) return { ok: false, error: t.error, unknown: [] };
  const unknown: string[] = [];
  let out = '';
  for (const tok of t.tokens) {
    if (tok.kind !== TOKEN_KIND.name) {
      out += tok.text;
      continue;
    }
    const key = nameKey(tok.text);
    if (BARE_LITERALS.has(key)) {
      out += tok.text;
      continue;
    }
    const target = lookup(key) ?? unknownAs;
    if (target === undefined) {
      if (!unknown.includes(tok.text)) unknown.push(tok.text);
      continue;
    }
    out += target;
  }
  if (unknown.length > 0) return { ok: false, error: unknown.map((n) => `unknown name ${n}`).join('; '), unknown };
  return { ok: true, formula: `=${out}` };
}

/** The number a rule is when it is a plain constant ("1", "2.5", "-1e3"); undefined for anything else. */
export function constantNumber(formula: string): number | undefined {
  const body = formulaBody(formula);
  if (!/^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/.test(body)) return undefined;
  const n = Number(body);
  return Number.isFinite(n) ? n : undefined;
}

/**
 * Splits text at a bare word (for example "and" in `between a and b`) that stands outside strings and parentheses.
 * Returns the pieces in order; one piece when the word does not occur.
 */
export function splitAtWord(text: string, word: string): { ok: true; parts: string[] } | { ok: false; error: string } {
  const t = tokenizeFormula(text);
  if (!t.ok) return t;
  const parts: string[] = [];
  let depth = 0;
  let from = 0;
  for (const tok of t.tokens) {
    if (tok.kind === TOKEN_KIND.op && tok.text === '(') depth++;
    else if (tok.kind === TOKEN_KIND.op && tok.text === ')') depth--;
    else if (depth === 0 && tok.kind === TOKEN_KIND.name && tok.text.toLowerCase() === word.toLowerCase()) {
      parts.push(text.slice(from, tok.start).trim());
      from = tok.start + tok.text.length;
    }
  }
  parts.push(text.slice(from).trim());
  return { ok: true, parts };
}

/**
 * The one name a formula consists of ("vcc", " t_bounce "), lower case; undefined when it is anything more (a
 * number, a call, an expression) or TRUE/FALSE. Lets a rule that only names a value read that value's cell.
 */
export function soleName(formula: string): string | undefined {
  const t = tokenizeFormula(formulaBody(formula));
  if (!t.ok) return undefined;
  const tokens = t.tokens.filter((tok) => tok.kind !== TOKEN_KIND.space);
  if (tokens.length !== 1 || tokens[0]!.kind !== TOKEN_KIND.name) return undefined;
  const key = nameKey(tokens[0]!.text);
  return BARE_LITERALS.has(key) ? undefined : key;
}
