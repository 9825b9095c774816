// The one formula syntax: every formula a person writes (eval, notebook cells, check formulas, build rules, cost
// overrides) passes through `normalizeFormula` before the engine reads it, so each place reads the same text the same way.
import { TOKEN_KIND, nameKey, tokenizeFormula } from './formula-names.ts';

/** Bare words the engine knows only as calls: TRUE and FALSE are written TRUE() and FALSE() for it. */
const BARE_LITERALS = new Set(['true', 'false']);

/**
 * The formula as the engine reads it, otherwise unchanged (spacing, names, text, a leading "=" or none):
 * - a number with a decimal point or an exponent is written the way the engine prints it (680E-9 → 6.8e-7,
 *   0.47e-6 → 4.7e-7, 1.50 → 1.5): the engine reads an exponent only with a small "e", and a formula copied down a
 *   table is found again by its printed form;
 * - a bare TRUE or FALSE becomes TRUE() or FALSE(), which the engine reads (bare, it looks for a name).
 * Whole numbers stay as written, since they may be part of a cell reference ($A$1, 1:3); text in double quotes and
 * quoted sheet names are left alone. Text that cannot be split into tokens (an open quote) comes back unchanged for
 * the guard or the engine to explain.
 */
export function normalizeFormula(formula: string): string {
  const t = tokenizeFormula(formula);
  if (!t.ok) return formula;
  let out = '';
  let inSheetName = false;
  for (const tok of t.tokens) {
    if (tok.kind === TOKEN_KIND.op && tok.text === "'") inSheetName = !inSheetName;
    if (inSheetName) out += tok.text;
    else if (tok.kind === TOKEN_KIND.number && /[.eE]/.test(tok.text)) {
      const n = Number(tok.text);
      out += Number.isFinite(n) ? String(n) : tok.text;
    } else if (tok.kind === TOKEN_KIND.name && BARE_LITERALS.has(nameKey(tok.text))) out += `${tok.text.toUpperCase()}()`;
    else out += tok.text;
  }
  return out;
}
