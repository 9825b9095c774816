// Status of one check on one variant, its symbol and word, and the pure pass / margin / fail judgement of a
// CheckRule (src/domain/book.ts) once the value and its limits are numbers.
import type { CheckRule } from './book.ts';
import { significant } from './format.ts';

export const CHECK_STATUS = {
  pass: 'pass',
  margin: 'margin',
  fail: 'fail',
  na: 'n/a',
  error: 'error',
} as const;
export type CheckStatus = (typeof CHECK_STATUS)[keyof typeof CHECK_STATUS];

/** Symbols shown beside the status word, so status never depends on colour alone. */
export const STATUS_SYMBOL: Record<CheckStatus, string> = {
  pass: '✓',
  margin: '~',
  fail: '✗',
  'n/a': '–',
  error: '!',
};

/**
 * Worst-of order for summaries. `n/a` ranks below `pass` so a check that does not apply never hides a pass;
 * `error` ranks above `fail` because an unanswered check may hide anything.
 */
export const STATUS_SEVERITY: Record<CheckStatus, number> = {
  'n/a': 0,
  pass: 1,
  margin: 2,
  fail: 3,
  error: 4,
};

/** The worst status in a list; `n/a` for an empty list. */
export function worstOf(statuses: Iterable<CheckStatus>): CheckStatus {
  let worst: CheckStatus = CHECK_STATUS.na;
  for (const s of statuses) if (STATUS_SEVERITY[s] > STATUS_SEVERITY[worst]) worst = s;
  return worst;
}

/** A check's value as the engine gives it: a number, text, a truth value, or nothing. */
export type CheckValue = number | string | boolean | null;

/** Evaluated limits of a rule: `limit` for max/min, `low` and `high` for between. */
export interface RuleLimits {
  limit?: number;
  low?: number;
  high?: number;
}

export interface Judgement {
  status: CheckStatus;
  message: string;
}

function badLimit(what: string, v: number | undefined): Judgement | null {
  if (v === undefined) return { status: CHECK_STATUS.error, message: `the rule has no ${what}` };
  if (!Number.isFinite(v)) return { status: CHECK_STATUS.error, message: `the rule's ${what} is not a finite number` };
  return null;
}

/** Is `value` on the safe side of `limit` by more than the margin band, inside the band, or past it? */
function side(value: number, limit: number, margin: number, upper: boolean): CheckStatus {
  const band = Math.abs(limit) * margin;
  if (upper) {
    if (value > limit) return CHECK_STATUS.fail;
    return value > limit - band ? CHECK_STATUS.margin : CHECK_STATUS.pass;
  }
  if (value < limit) return CHECK_STATUS.fail;
  return value < limit + band ? CHECK_STATUS.margin : CHECK_STATUS.pass;
}

/**
 * Judges a value against a rule. `max`: value ≤ limit passes unless it lies within margin·|limit| of the limit
 * (then `margin`); above the limit fails. `min` mirrors it. `between` applies both sides. `true` passes on TRUE or a
 * non-zero number. Text where a number is needed, or a missing limit, gives `error` with a message.
 */
export function judge(value: CheckValue, rule: CheckRule, limits: RuleLimits): Judgement {
  const margin = rule.margin ?? 0;
  if (!(margin >= 0 && margin < 1)) {
    return { status: CHECK_STATUS.error, message: `margin ${margin} must be a fraction from 0 up to (not including) 1` };
  }
  if (rule.kind === 'true') {
    if (typeof value === 'boolean' || (typeof value === 'number' && Number.isFinite(value))) {
      return value ? { status: CHECK_STATUS.pass, message: 'true' } : { status: CHECK_STATUS.fail, message: 'false' };
    }
    return { status: CHECK_STATUS.error, message: `expected TRUE or FALSE, got ${describe(value)}` };
  }
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    return { status: CHECK_STATUS.error, message: `expected a number, got ${describe(value)}` };
  }
  if (rule.kind === 'max' || rule.kind === 'min') {
    const bad = badLimit('limit', limits.limit);
    if (bad) return bad;
    const limit = limits.limit!;
    const status = side(value, limit, margin, rule.kind === 'max');
    const word = rule.kind === 'max' ? 'at most' : 'at least';
    return { status, message: `${significant(value)} against ${word} ${significant(limit)}` };
  }
  const badLow = badLimit('low limit', limits.low) ?? badLimit('high limit', limits.high);
  if (badLow) return badLow;
  const low = limits.low!;
  const high = limits.high!;
  if (low > high) return { status: CHECK_STATUS.error, message: `low limit ${significant(low)} is above high limit ${significant(high)}` };
  const a = side(value, low, margin, false);
  const b = side(value, high, margin, true);
  const status = STATUS_SEVERITY[a] >= STATUS_SEVERITY[b] ? a : b;
  return { status, message: `${significant(value)} against ${significant(low)} … ${significant(high)}` };
}

function describe(value: CheckValue): string {
  if (value === null) return 'nothing';
  if (typeof value === 'string') return `text "${value}"`;
  if (typeof value === 'number') return String(value);
  return value ? 'TRUE' : 'FALSE';
}
