// The one dates module: which strings are calendar dates (Gregorian rule, ISO 8601), today in local time, and
// counting days across month ends and leap days.
import { describe, expect, it } from 'vitest';
import { daysAfter, daysBefore, isIsoDate, isIsoTime, todayIso } from '../../src/domain/dates.ts';

describe('isIsoDate follows the Gregorian leap-year rule (ISO 8601)', () => {
  it('accepts 29 February in a leap year divisible by 4', () => {
    expect(isIsoDate('2024-02-29')).toBe(true);
  });
  it('rejects 29 February in a common year and a 30 February in any year', () => {
    expect(isIsoDate('2026-02-29')).toBe(false);
    expect(isIsoDate('2026-02-30')).toBe(false);
    expect(isIsoDate('2024-02-30')).toBe(false);
  });
  it('rejects 29 February in a century year not divisible by 400, accepts it in one that is', () => {
    expect(isIsoDate('1900-02-29')).toBe(false);
    expect(isIsoDate('2100-02-29')).toBe(false);
    expect(isIsoDate('2000-02-29')).toBe(true);
  });
  it('knows the 30-day months and the shape YYYY-MM-DD', () => {
    expect(isIsoDate('2026-04-30')).toBe(true);
    expect(isIsoDate('2026-04-31')).toBe(false);
    expect(isIsoDate('2026-12-31')).toBe(true);
    expect(isIsoDate('2026-13-01')).toBe(false);
    expect(isIsoDate('2026-00-10')).toBe(false);
    expect(isIsoDate('2026-01-00')).toBe(false);
    expect(isIsoDate('2026-1-05')).toBe(false);
    expect(isIsoDate(' 2026-01-05')).toBe(false);
    expect(isIsoDate('2026-01-05T10:00')).toBe(false);
  });
});

describe('isIsoTime', () => {
  it('accepts a date, or a date with a real clock time and zone', () => {
    expect(isIsoTime('2024-02-29')).toBe(true);
    expect(isIsoTime('2026-03-01T23:59:59.123Z')).toBe(true);
    expect(isIsoTime('2026-03-01T08:30+01:00')).toBe(true);
  });
  it('rejects a day that does not exist or a clock time out of range', () => {
    expect(isIsoTime('2026-02-29T10:00Z')).toBe(false);
    expect(isIsoTime('2026-03-01T24:00Z')).toBe(false);
    expect(isIsoTime('2026-03-01T10:60Z')).toBe(false);
  });
});

describe('todayIso is the local calendar date', () => {
  it('reads the local year, month and day, not the UTC ones', () => {
    // Local 00:30 on 1 March: in any zone east of UTC the UTC date is still 28 February.
    expect(todayIso(new Date(2026, 2, 1, 0, 30))).toBe('2026-03-01');
    // Local 23:30 on 31 December: in any zone west of UTC the UTC date is already the next year.
    expect(todayIso(new Date(2026, 11, 31, 23, 30))).toBe('2026-12-31');
  });
  it('pads month and day to two digits', () => {
    expect(todayIso(new Date(2027, 0, 5, 12))).toBe('2027-01-05');
  });
  it('defaults to now', () => {
    const now = new Date();
    const expected = `${now.getFullYear()}-${String(now.getMonth() + 1).padStart(2, '0')}-${String(now.getDate()).padStart(2, '0')}`;
    expect(isIsoDate(todayIso())).toBe(true);
    expect([expected, todayIso(new Date(now.getTime() + 1000))]).toContain(todayIso());
  });
});

describe('daysBefore and daysAfter count calendar days', () => {
  it('crosses a month end and a year end', () => {
    expect(daysBefore('2026-03-01', 1)).toBe('2026-02-28');
    expect(daysBefore('2027-01-05', 10)).toBe('2026-12-26');
    expect(daysAfter('2026-01-31', 1)).toBe('2026-02-01');
  });
  it('lands on 29 February in a leap year only', () => {
    expect(daysBefore('2028-03-01', 1)).toBe('2028-02-29');
    expect(daysBefore('2000-03-01', 1)).toBe('2000-02-29');
    expect(daysBefore('1900-03-01', 1)).toBe('1900-02-28');
    expect(daysAfter('2028-02-28', 1)).toBe('2028-02-29');
    expect(daysAfter('2028-02-29', 1)).toBe('2028-03-01');
  });
  it('counts zero days as the same date and gives nothing for a bad date or a fractional count', () => {
    expect(daysBefore('2027-01-05', 0)).toBe('2027-01-05');
    expect(daysBefore('2027-02-29', 1)).toBeUndefined();
    expect(daysBefore('2027-01-05', 1.5)).toBeUndefined();
    expect(daysAfter('2026-02-30', 1)).toBeUndefined();
  });
});
