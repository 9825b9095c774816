// The pass / margin / fail judgement of a CheckRule and the worst-of order used in summaries.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { CHECK_STATUS, STATUS_SEVERITY, STATUS_SYMBOL, judge, worstOf } from '../../src/domain/check-status.ts';

describe('judge', () => {
  it('max: 80 % voltage derating of a 600 V switch at 230 V +10 % (IEC 60038:2009 table 1, common-practice derating: 357.8 V against 480 V)', () => {
    // 480 V limit with a 10 % band: pass up to 432 V, margin from there to 480 V, fail above.
    expect(judge(357.8, { kind: 'max', limit: 'x', margin: 0.1 }, { limit: 480 }).status).toBe('pass');
    expect(judge(447.2, { kind: 'max', limit: 'x', margin: 0.1 }, { limit: 480 }).status).toBe('margin');
    expect(judge(480, { kind: 'max', limit: 'x', margin: 0.1 }, { limit: 480 }).status).toBe('margin');
    expect(judge(480.1, { kind: 'max', limit: 'x', margin: 0.1 }, { limit: 480 }).status).toBe('fail');
  });

  it('min mirrors max: dropper current against the logic demand', () => {
    const rule = { kind: 'min', limit: 'i_logic', margin: 0.1 } as const;
    expect(judge(0.012, rule, { limit: 0.01 }).status).toBe('pass');
    expect(judge(0.0107, rule, { limit: 0.01 }).status).toBe('margin');
    expect(judge(0.0099, rule, { limit: 0.01 }).status).toBe('fail');
  });

  it('between applies both sides, each with its own band', () => {
    const rule = { kind: 'between', low: 'a', high: 'b', margin: 0.05 } as const;
    expect(judge(2000, rule, { low: 500, high: 5000 }).status).toBe('pass');
    expect(judge(510, rule, { low: 500, high: 5000 }).status).toBe('margin');
    expect(judge(4900, rule, { low: 500, high: 5000 }).status).toBe('margin');
    expect(judge(499, rule, { low: 500, high: 5000 }).status).toBe('fail');
    expect(judge(1, rule, { low: 5, high: 2 })).toEqual({ status: 'error', message: 'low limit 5 is above high limit 2' });
  });

  it('true passes on TRUE or a non-zero number and fails on FALSE or 0', () => {
    expect(judge(true, { kind: 'true' }, {}).status).toBe('pass');
    expect(judge(1, { kind: 'true' }, {}).status).toBe('pass');
    expect(judge(false, { kind: 'true' }, {}).status).toBe('fail');
    expect(judge(0, { kind: 'true' }, {}).status).toBe('fail');
    expect(judge('yes', { kind: 'true' }, {})).toEqual({ status: 'error', message: 'expected TRUE or FALSE, got text "yes"' });
  });

  it('gives error with a message for text values, missing limits and bad margins', () => {
    expect(judge('x', { kind: 'max', limit: '1' }, { limit: 1 })).toEqual({ status: 'error', message: 'expected a number, got text "x"' });
    expect(judge(1, { kind: 'max', limit: '1' }, {})).toEqual({ status: 'error', message: 'the rule has no limit' });
    expect(judge(1, { kind: 'max', limit: '1' }, { limit: Number.POSITIVE_INFINITY }).status).toBe('error');
    expect(judge(1, { kind: 'max', limit: '1', margin: 1.5 }, { limit: 2 }).status).toBe('error');
    expect(judge(null, { kind: 'min', limit: '1' }, { limit: 1 }).status).toBe('error');
  });

  it('never passes a value beyond a max limit, whatever the margin (property)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: -1e6, max: 1e6, noNaN: true }),
        fc.double({ min: -1e6, max: 1e6, noNaN: true }),
        fc.double({ min: 0, max: 0.99, noNaN: true }),
        (value, limit, margin) => {
          const s = judge(value, { kind: 'max', limit: 'l', margin }, { limit }).status;
          if (value > limit) expect(s).toBe('fail');
          else expect(['pass', 'margin']).toContain(s);
        },
      ),
    );
  });
});

describe('status words and worst-of', () => {
  it('has a distinct symbol for every status so colour is never alone', () => {
    const symbols = Object.values(CHECK_STATUS).map((s) => STATUS_SYMBOL[s]);
    expect(new Set(symbols).size).toBe(symbols.length);
    expect(CHECK_STATUS.na).toBe('n/a');
  });

  it('orders n/a < pass < margin < fail < error', () => {
    expect(worstOf([])).toBe('n/a');
    expect(worstOf(['n/a', 'pass'])).toBe('pass');
    expect(worstOf(['pass', 'margin', 'n/a'])).toBe('margin');
    expect(worstOf(['margin', 'fail', 'pass'])).toBe('fail');
    expect(worstOf(['fail', 'error'])).toBe('error');
    expect(STATUS_SEVERITY['n/a']).toBeLessThan(STATUS_SEVERITY.pass);
  });
});
