// Check judging: turns one variant's evaluated check cells (applies, value, limits) into a CheckResult. The
// pass / margin / fail judgement itself is domain/check-status.ts's `judge`; this adds n/a, errors and the limit text.
import type { Check, CheckRule, Variant } from '../domain/book.ts';
import { CHECK_STATUS, judge } from '../domain/check-status.ts';
import type { CheckStatus, CheckValue, RuleLimits } from '../domain/check-status.ts';
import { significant } from '../domain/format.ts';
import type { CheckCells, ReadCell } from './family-layout.ts';

export interface CheckResult {
  variantId: string;
  variantCode: string;
  checkId: string;
  checkName: string;
  /** The check formula's value; null when it could not be computed or the check does not apply. */
  value: CheckValue;
  unit: string;
  status: CheckStatus;
  /** The rule with its limits evaluated for this variant, for example "≤ 357.8" or "1000 … 25000". */
  limit: string;
  limits: RuleLimits;
  message: string;
  /**
   * When the check reads the part of a line with approved alternates: the approved part that gives this result,
   * the worst of the `judged` approved parts (see family-workbook.ts).
   */
  approvedPart?: { lineId: string; partId: string; mpn: string; judged: number };
}

const LIMIT_PARTS = ['limit', 'low', 'high'] as const;

function checkResult(
  v: Variant,
  check: Check,
  value: CheckValue,
  status: CheckStatus,
  message: string,
  limits: RuleLimits = {},
  limit = '',
): CheckResult {
  return { variantId: v.id, variantCode: v.code, checkId: check.id, checkName: check.name, unit: check.unit, limits, limit, value, status, message };
}

function limitText(rule: CheckRule, limits: RuleLimits): string {
  const f = (n: number | undefined): string => (n === undefined ? '?' : significant(n));
  switch (rule.kind) {
    case 'max':
      return `≤ ${f(limits.limit)}`;
    case 'min':
      return `≥ ${f(limits.limit)}`;
    case 'between':
      return `${f(limits.low)} … ${f(limits.high)}`;
    default:
      return 'TRUE';
  }
}

/** Judges check `cc` on variant `v`, row `r` of the family table, reading its cells through `read`. */
export function judgeCheck(v: Variant, r: number, cc: CheckCells, read: ReadCell): CheckResult {
  // No closures or spreads here: this runs for every variant and check when a large family opens.
  const check = cc.check;
  if (cc.problem !== undefined) return checkResult(v, check, null, CHECK_STATUS.error, cc.problem);
  if (cc.cells.applies) {
    const a = read(r, cc.cells.applies);
    if (!a.ok) return checkResult(v, check, null, CHECK_STATUS.error, `applies: ${a.error}`);
    const applies = typeof a.value === 'boolean' ? a.value : typeof a.value === 'number' ? a.value !== 0 : null;
    if (applies === null) {
      return checkResult(v, check, null, CHECK_STATUS.error, `applies gave ${a.value === null ? 'nothing' : `text "${a.value}"`}, not TRUE or FALSE`);
    }
    if (!applies) return checkResult(v, check, null, CHECK_STATUS.na, 'does not apply to this variant');
  }
  const val = read(r, cc.cells.value!);
  if (!val.ok) return checkResult(v, check, null, CHECK_STATUS.error, val.error);
  const limits: RuleLimits = {};
  for (const part of LIMIT_PARTS) {
    const fc = cc.cells[part];
    if (!fc) continue;
    const l = read(r, fc);
    if (!l.ok) return checkResult(v, check, val.value, CHECK_STATUS.error, `rule ${part}: ${l.error}`);
    if (typeof l.value !== 'number') return checkResult(v, check, val.value, CHECK_STATUS.error, `rule ${part} gave ${String(l.value)}, not a number`);
    limits[part] = l.value;
  }
  const j = judge(val.value, check.rule, limits);
  return checkResult(v, check, val.value, j.status, j.message, limits, limitText(check.rule, limits));
}
