// Engineering values: reading "4.7 kΩ", "330n", "0.47 uF", "4k7", "18 mA" into SI numbers and writing SI numbers
// back in engineering notation ("330 nF"). Pure; used by input fields, imports, the formula functions and exports.
import { parseRkm } from './rkm.ts';

export type ValueParseResult = { ok: true; value: number; unit: string } | { ok: false; error: string };

/** SI prefixes accepted on input, as powers of ten. "K" is read as kilo, as resistor values are often written. */
const PREFIXES: Readonly<Record<string, number>> = {
  p: -12,
  n: -9,
  u: -6,
  '\u00b5': -6, // micro sign
  '\u03bc': -6, // Greek small mu
  m: -3,
  k: 3,
  K: 3,
  M: 6,
  G: 9,
};

/** Prefixes used on output, smallest first; µ is the micro sign U+00B5. */
const OUTPUT_PREFIXES = [
  { exp: -12, symbol: 'p' },
  { exp: -9, symbol: 'n' },
  { exp: -6, symbol: '\u00b5' },
  { exp: -3, symbol: 'm' },
  { exp: 0, symbol: '' },
  { exp: 3, symbol: 'k' },
  { exp: 6, symbol: 'M' },
  { exp: 9, symbol: 'G' },
] as const;

/** Unit spellings accepted on input → the symbol we store and show. */
const UNIT_ALIASES: Readonly<Record<string, string>> = {
  '\u03a9': '\u03a9', // Greek capital omega
  '\u2126': '\u03a9', // ohm sign
  ohm: '\u03a9',
  ohms: '\u03a9',
  Ohm: '\u03a9',
  R: '\u03a9',
  F: 'F',
  H: 'H',
  V: 'V',
  A: 'A',
  W: 'W',
  Hz: 'Hz',
  s: 's',
  'K/W': 'K/W',
  '\u00b0C': '\u00b0C',
  '\u2103': '\u00b0C', // degree Celsius sign
};

/** Units that take no SI prefix (a "k°C" or "mK/W" would only confuse). */
const NO_PREFIX_UNITS = new Set(['\u00b0C', 'K/W']);

/** Aliases longest first, so "K/W" is tried before "W" and "ohms" before "s". */
const ALIASES_BY_LENGTH = Object.keys(UNIT_ALIASES).sort((a, b) => b.length - a.length);

/** Shown for values that are not numbers; never the bare JavaScript "NaN". */
export const NOT_A_NUMBER_MARK = '(not a number)';

/** The stored symbol for a unit spelling ("ohm" → "Ω"); unknown spellings come back unchanged. */
export function canonicalUnit(unit: string): string {
  return UNIT_ALIASES[unit.trim()] ?? unit.trim();
}

const NUMBER_RE = /^([+-]?)(\d+\.?\d*|\.\d+)(?:[eE]([+-]?\d+))?(.*)$/;

/**
 * Reads an engineering value. With `expectedUnit`, a bare number or prefix ("330n") takes that unit, and a value
 * written with another unit is refused. RKM codes ("4k7", "0R22", "2n2") are read by parseRkm and take Ω or F.
 */
export function parseValue(text: string, expectedUnit?: string): ValueParseResult {
  const expected = expectedUnit === undefined ? undefined : canonicalUnit(expectedUnit);
  const t = text.trim().replace(/^\u2212/, '-'); // accept the typographic minus sign
  if (t === '') return { ok: false, error: 'empty value' };
  const read = readPlain(t) ?? readRkm(t);
  if (!read) {
    const hint = /^\d+,\d+/.test(t) ? ' (use a point as the decimal separator)' : '';
    return {
      ok: false,
      error: `could not read "${text.trim()}" as a value${hint}; examples: 4.7k, 4k7, 330 nF, 0.47 uF, 18 mA, 1.2e3`,
    };
  }
  if ('error' in read) return { ok: false, error: read.error };
  if (!Number.isFinite(read.value)) return { ok: false, error: `"${text.trim()}" is out of range` };
  if (read.prefix !== undefined && NO_PREFIX_UNITS.has(expected ?? read.unit)) {
    // "25 K" for a temperature would read as 25 kilo-something, 25,000: a °C or K/W value is written bare.
    return {
      ok: false,
      error: `"${text.trim()}" has the SI prefix ${read.prefix} (${PREFIX_NAMES[read.prefix] ?? 'a multiplier'}), but ${expected ?? read.unit} takes no prefix; write the number alone or with ${expected ?? read.unit}`,
    };
  }
  if (expected === undefined) return { ok: true, value: read.value, unit: read.unit };
  if (read.unit === '') return { ok: true, value: read.value, unit: expected };
  if (read.unit !== expected) {
    return { ok: false, error: `"${text.trim()}" is in ${read.unit} but ${expected || 'a plain number'} was expected` };
  }
  return { ok: true, value: read.value, unit: read.unit };
}

/** A read value; `prefix` is the SI prefix written, when there was one. */
type Read = { value: number; unit: string; prefix?: string } | { error: string };

const PREFIX_NAMES: Readonly<Record<string, string>> = { p: 'pico', n: 'nano', u: 'micro', '\u00b5': 'micro', '\u03bc': 'micro', m: 'milli', k: 'kilo', K: 'kilo', M: 'mega', G: 'giga' };

/** Number with optional exponent, then optional prefix and unit: "4.7 kΩ", "330n", "1.2e3", "-5", "50Hz". */
function readPlain(t: string): Read | undefined {
  const m = NUMBER_RE.exec(t);
  if (!m) return undefined;
  const [, sign = '', digits = '', exp = '0', restRaw = ''] = m;
  const rest = restRaw.trim();
  const parts = splitPrefixUnit(rest);
  if (!parts) return undefined;
  // Compose one decimal text and let Number() round once: "4.7" with prefix k becomes exactly Number("4.7e3").
  const value = Number(`${sign}${digits}e${Number(exp) + parts.exp}`);
  return parts.prefix === undefined ? { value, unit: parts.unit } : { value, unit: parts.unit, prefix: parts.prefix };
}

/** Splits "kΩ" into a prefix exponent and unit; "" is no prefix and no unit; "R" alone is ohms ("10R"). */
function splitPrefixUnit(rest: string): { exp: number; unit: string; prefix?: string } | undefined {
  if (rest === '') return { exp: 0, unit: '' };
  for (const alias of ALIASES_BY_LENGTH) {
    if (!rest.endsWith(alias)) continue;
    const unit = UNIT_ALIASES[alias]!;
    const prefix = rest.slice(0, rest.length - alias.length).trim();
    if (prefix === '') return { exp: 0, unit };
    const exp = PREFIXES[prefix];
    if (exp !== undefined && !NO_PREFIX_UNITS.has(unit)) return { exp, unit, prefix };
  }
  const exp = PREFIXES[rest];
  return exp === undefined ? undefined : { exp, unit: '', prefix: rest };
}

/** RKM code, optionally signed and optionally followed by its unit: "4k7", "-0R22", "2n2 F", "4K7 Ω". */
function readRkm(t: string): Read | undefined {
  const sign = t.startsWith('-') ? -1 : 1;
  const body = t.replace(/^[+-]/, '');
  const candidates: { code: string; unit?: string }[] = [{ code: body }];
  for (const alias of ALIASES_BY_LENGTH) {
    if (body.endsWith(alias) && body.length > alias.length) {
      candidates.push({ code: body.slice(0, body.length - alias.length).trim(), unit: UNIT_ALIASES[alias]! });
    }
  }
  for (const c of candidates) {
    const r = parseRkm(c.code);
    if (!r.ok) continue;
    const unit = r.kind === 'resistance' ? '\u03a9' : r.kind === 'capacitance' ? 'F' : '';
    if (c.unit !== undefined && c.unit !== unit) {
      return { error: `"${t}": the RKM code ${c.code} is a ${r.kind} but the unit says ${c.unit}` };
    }
    return { value: sign * r.value, unit };
  }
  return undefined;
}

/**
 * Writes a value in engineering notation with up to `digits` significant figures (trailing zeros dropped) and the
 * prefix that puts the mantissa in [1, 1000): "4.7 kΩ", "330 nF", "18.2 mA", "325 V". One ordinary space separates
 * number and unit so the text pastes back into any field. Values beyond the p…G prefixes use exponent form
 * ("1.5e-15 F"). NaN gives NOT_A_NUMBER_MARK; infinities give "∞ Ω" / "-∞ Ω".
 */
export function formatValue(value: number, unit: string, digits = 3): string {
  const u = canonicalUnit(unit);
  const d = Number.isInteger(digits) && digits >= 1 && digits <= 15 ? digits : 3;
  if (Number.isNaN(value)) return NOT_A_NUMBER_MARK;
  if (!Number.isFinite(value)) return withUnit(value > 0 ? '\u221e' : '-\u221e', '', u);
  if (value === 0) return withUnit('0', '', u);
  if (NO_PREFIX_UNITS.has(u)) return withUnit(String(Number(value.toPrecision(d))), '', u);
  const sign = value < 0 ? '-' : '';
  let rounded = Number(Math.abs(value).toPrecision(d));
  let exp3 = Math.floor(Math.log10(rounded) / 3) * 3;
  // log10 can land a hair below an exact power of ten (log10(1e-9) is fine, but be safe at the boundaries).
  if (Number(`1e${exp3 + 3}`) <= rounded) exp3 += 3;
  if (Number(`1e${exp3}`) > rounded) exp3 -= 3;
  const prefix = OUTPUT_PREFIXES.find((p) => p.exp === exp3);
  if (!prefix) {
    rounded = Number(value.toPrecision(d));
    return withUnit(rounded.toExponential(d - 1).replace(/\.?0+e/, 'e').replace('e+', 'e'), '', u);
  }
  const mantissa = Number(shiftDecimal(rounded, -exp3).toPrecision(d));
  return withUnit(sign + String(mantissa), prefix.symbol, u);
}

function withUnit(number: string, prefix: string, unit: string): string {
  if (unit === '') return number + prefix;
  return `${number} ${prefix}${unit}`;
}

/** x · 10^e through decimal text, so the result is the double nearest the exact decimal (no 4.7 × 1e-9 drift). */
function shiftDecimal(x: number, e: number): number {
  const [mant = '0', exp = '0'] = x.toExponential().split('e');
  return Number(`${mant}e${Number(exp) + e}`);
}
