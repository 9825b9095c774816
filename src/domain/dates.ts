// Calendar dates and times as the Book writes them (ISO 8601 calendar dates, RFC 3339 times): the one place that
// says what a valid date is, what "today" means and how days are counted.

const DATE = /^(\d{4})-(\d{2})-(\d{2})$/;
const TIME = /^(\d{4})-(\d{2})-(\d{2})(?:T(\d{2}):(\d{2})(?::(\d{2})(?:\.\d{1,9})?)?(?:Z|[+-]\d{2}:\d{2})?)?$/;
const DAY_MS = 86_400_000;

/** Gregorian calendar rule (ISO 8601): leap years divisible by 4, except centuries not divisible by 400. */
function validDay(y: number, m: number, d: number): boolean {
  if (m < 1 || m > 12 || d < 1) return false;
  const days = [31, y % 4 === 0 && (y % 100 !== 0 || y % 400 === 0) ? 29 : 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];
  return d <= days[m - 1]!;
}

/** True for a real calendar date written YYYY-MM-DD (2026-02-30 is not one). */
export function isIsoDate(s: string): boolean {
  const m = DATE.exec(s);
  return m !== null && validDay(+m[1]!, +m[2]!, +m[3]!);
}

/** True for a date, or a date and time (YYYY-MM-DDTHH:MM[:SS[.fff]][Z|±HH:MM]) with a real day and clock time. */
export function isIsoTime(s: string): boolean {
  const m = TIME.exec(s);
  if (!m || !validDay(+m[1]!, +m[2]!, +m[3]!)) return false;
  if (m[4] !== undefined && (+m[4] > 23 || +m[5]! > 59 || (m[6] !== undefined && +m[6] > 59))) return false;
  return true;
}

/**
 * Today as an ISO date. One rule everywhere: the calendar date where the person is (local time), since that is the
 * date they read on their wall calendar and write on a quote.
 */
export function todayIso(now: Date = new Date()): string {
  const p = (n: number): string => String(n).padStart(2, '0');
  return `${now.getFullYear()}-${p(now.getMonth() + 1)}-${p(now.getDate())}`;
}

/** A moment (an ISO timestamp) as the person reads it: their local date and time to the minute; the text itself if it is not one. */
export function localMoment(iso: string): string {
  const t = new Date(iso);
  if (Number.isNaN(t.getTime())) return iso;
  const p = (n: number): string => String(n).padStart(2, '0');
  return `${todayIso(t)} ${p(t.getHours())}:${p(t.getMinutes())}`;
}

/** date − days as an ISO date, in calendar days (counted in UTC, so no daylight-saving step). Undefined for a bad date. */
export function daysBefore(date: string, days: number): string | undefined {
  if (!isIsoDate(date) || !Number.isInteger(days)) return undefined;
  const d = new Date(Date.parse(`${date}T00:00:00Z`) - days * DAY_MS);
  return Number.isNaN(d.getTime()) ? undefined : d.toISOString().slice(0, 10);
}

/** date + days as an ISO date. Undefined for a bad date. */
export function daysAfter(date: string, days: number): string | undefined {
  return daysBefore(date, -days);
}
