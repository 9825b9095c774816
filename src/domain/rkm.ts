// IEC 60062 RKM code: the multiplier letter stands where the decimal point would be ("4K7" = 4.7 kΩ, "2n2" = 2.2 nF),
// optionally followed by a tolerance letter ("4K7K" = 4.7 kΩ ±10 %). Pure parsing and formatting.

export type RkmKind = 'resistance' | 'capacitance' | 'unknown';

export type RkmParseResult =
  | { ok: true; value: number; kind: RkmKind; /** Fraction, 0.05 for ±5 %. */ tolerance?: number }
  | { ok: false; error: string };

export type RkmFormatResult = { ok: true; text: string } | { ok: false; error: string };

/**
 * Multiplier letters. Resistance uses capitals (R K M G T); capacitance uses small letters (p n µ m), as IEC 60062
 * writes them. Input also accepts "k" for kilo-ohm and "u"/Greek mu for micro, since they are common in practice.
 */
const MULTIPLIERS: Readonly<Record<string, { exp: number; kind: RkmKind }>> = {
  R: { exp: 0, kind: 'resistance' },
  K: { exp: 3, kind: 'resistance' },
  k: { exp: 3, kind: 'resistance' },
  M: { exp: 6, kind: 'resistance' },
  G: { exp: 9, kind: 'resistance' },
  T: { exp: 12, kind: 'resistance' },
  p: { exp: -12, kind: 'capacitance' },
  n: { exp: -9, kind: 'capacitance' },
  u: { exp: -6, kind: 'capacitance' },
  '\u00b5': { exp: -6, kind: 'capacitance' }, // micro sign
  '\u03bc': { exp: -6, kind: 'capacitance' }, // Greek small mu
  m: { exp: -3, kind: 'capacitance' },
};

/** IEC 60062 tolerance letters (capitals only, so a trailing small "m" can never be mistaken for one). */
export const RKM_TOLERANCES: Readonly<Record<string, number>> = {
  B: 0.001,
  C: 0.0025,
  D: 0.005,
  F: 0.01,
  G: 0.02,
  J: 0.05,
  K: 0.1,
  M: 0.2,
};

const RKM_RE = /^(\d*)([RKkMGTpnu\u00b5\u03bcm])(\d*)([BCDFGJKM])?$/;

/** Reads an RKM code such as "4K7", "4k7", "0R22", "R47", "2M2", "2n2", "1µ0", "4K7K". */
export function parseRkm(text: string): RkmParseResult {
  const t = text.trim();
  const m = RKM_RE.exec(t);
  if (!m) {
    return {
      ok: false,
      error: `"${text}" is not an RKM code (digits with one multiplier letter in place of the decimal point, for example 4K7, 0R22, 2n2)`,
    };
  }
  const [, before = '', letter = '', after = '', tolLetter] = m;
  if (before === '' && after === '') return { ok: false, error: `"${text}" has no digits` };
  const mult = MULTIPLIERS[letter]!;
  // Build the decimal text and let Number() round once, so "4K7" gives exactly the double nearest 4700.
  const value = Number(`${before || '0'}.${after || '0'}e${mult.exp}`);
  const result: RkmParseResult = { ok: true, value, kind: mult.kind };
  if (tolLetter !== undefined) result.tolerance = RKM_TOLERANCES[tolLetter]!;
  return result;
}

const RES_LETTERS = [
  { exp: 12, letter: 'T' },
  { exp: 9, letter: 'G' },
  { exp: 6, letter: 'M' },
  { exp: 3, letter: 'K' },
  { exp: 0, letter: 'R' },
] as const;
const CAP_LETTERS = [
  { exp: -3, letter: 'm' },
  { exp: -6, letter: '\u00b5' },
  { exp: -9, letter: 'n' },
  { exp: -12, letter: 'p' },
] as const;

/**
 * Writes a value as an RKM code with up to `digits` significant figures.
 * Convention (IEC 60062 as written in the standard): capital letters R K M G T for resistance, small p n µ m for
 * capacitance; values below one unit of the smallest letter start with the letter ("R47" = 0.47 Ω, "p47" = 0.47 pF);
 * a single leading digit keeps one digit after the letter ("1M0", "4R7"), so a code never ends in its letter unless
 * the mantissa has two or three digits ("47K", "100n").
 */
export function toRkm(value: number, kind: RkmKind, digits = 3): RkmFormatResult {
  if (kind === 'unknown') return { ok: false, error: 'say whether the value is a resistance or a capacitance' };
  if (!Number.isFinite(value)) return { ok: false, error: `${String(value)} has no RKM code` };
  if (value <= 0) return { ok: false, error: `RKM codes are for values above zero (got ${value})` };
  if (!Number.isInteger(digits) || digits < 1 || digits > 6) return { ok: false, error: 'digits must be 1 to 6' };
  const letters = kind === 'resistance' ? RES_LETTERS : CAP_LETTERS;
  const rounded = roundSig(value, digits);
  const smallest = letters[letters.length - 1]!;
  const largest = letters[0];
  if (rounded >= 1000 * 10 ** largest.exp) {
    return { ok: false, error: `${value} is too large for an RKM code of a ${kind}` };
  }
  const chosen = letters.find((l) => rounded >= 10 ** l.exp) ?? smallest;
  const mantissa = roundSig(shiftDecimal(rounded, -chosen.exp), digits);
  // Below a thousandth of the smallest letter the code would be mostly zeros (R0001); no one writes that.
  if (mantissa < 0.001) return { ok: false, error: `${value} is too small for an RKM code of a ${kind}` };
  const [intPart, fracPart = ''] = plainDecimal(mantissa).split('.');
  if (intPart === '0') return { ok: true, text: `${chosen.letter}${fracPart}` };
  const tail = fracPart === '' && intPart!.length === 1 ? '0' : fracPart;
  return { ok: true, text: `${intPart}${chosen.letter}${tail}` };
}

/** Like {@link toRkm} but returns the text directly; bad input gives a bracketed explanation instead of a code. */
export function formatRkm(value: number, kind: RkmKind, digits = 3): string {
  const r = toRkm(value, kind, digits);
  return r.ok ? r.text : `(${r.error})`;
}

/** Rounds to `digits` significant figures through decimal text, so the result is the double nearest that decimal. */
function roundSig(x: number, digits: number): number {
  return Number(x.toPrecision(digits));
}

/** Decimal text without exponent for 1e-6 ≤ |x| < 1e21 (String() switches to exponent form below 1e-6). */
function plainDecimal(x: number): string {
  const s = String(x);
  if (!/e/i.test(s)) return s;
  return x.toFixed(20).replace(/0+$/, '').replace(/\.$/, '');
}

/** x · 10^e through decimal text, so the result is the double nearest the exact decimal (no 4.7 × 1e-9 drift). */
function shiftDecimal(x: number, e: number): number {
  const [mant = '0', exp = '0'] = x.toExponential().split('e');
  return Number(`${mant}e${Number(exp) + e}`);
}
