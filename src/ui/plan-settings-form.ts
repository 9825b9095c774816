// The planning and order settings as a form draft: text as typed, read back into the settings with a message per
// field that is wrong (nothing is saved then).
import type { Settings, StockValuation } from '../domain/book.ts';
import { LIMITS } from '../domain/schema.ts';

export interface PlanSettingsDraft {
  orderPrefix: string;
  nextOrderNumber: string;
  kittingDays: string;
  safetyDays: string;
  horizonDays: string;
  stockValuation: StockValuation;
}

/** The draft's settings, or a message per field that is wrong. */
export function readPlanSettings(d: PlanSettingsDraft, s: Settings): { ok: true; settings: Settings } | { ok: false; problems: Partial<Record<keyof PlanSettingsDraft, string>> } {
  const problems: Partial<Record<keyof PlanSettingsDraft, string>> = {};
  const whole = (k: keyof PlanSettingsDraft, min: number, max: number): number => {
    const t = String(d[k]).trim();
    const n = /^\d+$/.test(t) ? Number(t) : NaN;
    if (!Number.isSafeInteger(n) || n < min || n > max) problems[k] = `a whole number from ${min} to ${max.toLocaleString('en-GB')}, not “${t}”`;
    return n;
  };
  const next = whole('nextOrderNumber', 1, LIMITS.quantity);
  const kitting = whole('kittingDays', 0, LIMITS.planDays);
  const safety = whole('safetyDays', 0, LIMITS.planDays);
  const horizon = whole('horizonDays', 1, LIMITS.planDays);
  if (d.orderPrefix.length > LIMITS.name) problems.orderPrefix = `at most ${LIMITS.name} characters`;
  if (Object.keys(problems).length) return { ok: false, problems };
  return {
    ok: true,
    settings: { ...s, orderPrefix: d.orderPrefix, nextOrderNumber: next, kittingDays: kitting, safetyDays: safety, horizonDays: horizon, stockValuation: d.stockValuation },
  };
}

export function draftOf(s: Settings): PlanSettingsDraft {
  return {
    orderPrefix: s.orderPrefix,
    nextOrderNumber: String(s.nextOrderNumber),
    kittingDays: String(s.kittingDays),
    safetyDays: String(s.safetyDays),
    horizonDays: String(s.horizonDays),
    stockValuation: s.stockValuation,
  };
}
