// `rungbook eval`: prints a formula's value at full precision, or an error value with its message and exit status 1.
import { describe, expect, it } from 'vitest';
import { main } from '../../src/cli/main.ts';
import { runCli } from './cli-helpers.ts';

function run(...argv: string[]): Promise<{ code: number; out: string; err: string }> {
  return runCli(['eval', ...argv]);
}

describe('rungbook eval', () => {
  it('prints a number at full precision: MAINS_PEAK(230, 0.1) = 357.8 V (IEC 60038:2009 table 1, +10 %)', async () => {
    const r = await run('MAINS_PEAK(230, 0.1)');
    expect(r.code).toBe(0);
    expect(r.err).toBe('');
    // Full precision: the printed text reads back as exactly the double √2 · 230 · 1.1.
    expect(Number(r.out)).toBe(Math.SQRT2 * 230 * (1 + 0.1));
    expect(Number(r.out)).toBeCloseTo(357.8, 1);
  });
  it('accepts the leading "=" or not', async () => {
    const a = await run('=XCAP_AMPS(0.47e-6, 230, 50)');
    const b = await run('XCAP_AMPS(0.47e-6, 230, 50)');
    expect(a.code).toBe(0);
    expect(a.out).toBe(b.out);
    expect(Number(a.out)).toBeCloseTo(33.96e-3, 5); // 2π · 50 · 0.47 µF · 230 V (basic circuit theory, from memory)
  });
  it('shows every digit of the double, not the engine display rounding: 100 * 1.1', async () => {
    expect((await run('100 * 1.1')).out).toBe('110.00000000000001'); // IEEE 754 binary64: the costing float trap
    expect((await run('NEED_QTY(1, 100, 0.1)')).out).toBe('110');
  });
  it('prints text as is and logical values as TRUE/FALSE', async () => {
    expect((await run('RKM_TEXT(4700)')).out).toBe('4K7');
    expect((await run('E_NEAR(5000, 12) = 4700')).out).toBe('TRUE');
    expect((await run('E_NEAR(5000, 24) = 4700')).out).toBe('FALSE');
  });
  it('joins several words into one formula, so a leading minus works unquoted', async () => {
    const r = await run('-5', '+', '1');
    expect(r.code).toBe(0);
    expect(r.out).toBe('-4');
  });
  it('prints an array result as tab-separated rows', async () => {
    expect((await run('{1,2;3,4}')).out).toBe('1\t2\n3\t4');
  });
  it('prints an error value and its message to stderr with exit status 1', async () => {
    const r = await run('XCAP_AMPS(-1e-6, 230, 50)');
    expect(r.code).toBe(1);
    expect(r.out).toBe('');
    expect(r.err).toBe('#NUM!: XCAP_AMPS: c (F) must be 0 or more, got -0.000001');
  });
  it('reports the engine\'s own errors too', async () => {
    const r = await run('1/0');
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/^#DIV\/0!/);
    expect((await run('NO_SUCH_FUNCTION(1)')).err).toMatch(/^#NAME\?: /);
  });
  it('refuses text that is not a formula with a clear message and status 1', async () => {
    const r = await run('MAINS_PEAK(230');
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/cannot read "=MAINS_PEAK\(230" as a formula/);
  });
  it('asks for a formula when none is given (status 2), and shows help with the mains caution', async () => {
    const none = await run();
    expect(none.code).toBe(2);
    expect(none.err).toMatch(/give a formula/);
    const help = await run('--help');
    expect(help.code).toBe(0);
    expect(help.out).toMatch(/usage: rungbook eval/);
    expect(help.out).toMatch(/not a certification/);
  });
});

describe('rungbook eval refuses formulas that could freeze the engine', () => {
  it('refuses a range over the whole sheet with a message and status 1', async () => {
    const out: string[] = [];
    const err: string[] = [];
    const code = await main(['eval', 'SUM(A1:XFD1048576)'], { out: (t) => out.push(t), err: (t) => err.push(t) });
    expect(code).toBe(1);
    expect(out).toEqual([]);
    expect(err.join('\n')).toMatch(/range/i);
  });

  it('refuses 500 nested brackets with a message instead of overflowing the stack', async () => {
    const err: string[] = [];
    const code = await main(['eval', '('.repeat(500) + '1' + ')'.repeat(500)], { out: () => undefined, err: (t) => err.push(t) });
    expect(code).toBe(1);
    expect(err.join('\n')).toMatch(/nest|deep/i);
  });
});
