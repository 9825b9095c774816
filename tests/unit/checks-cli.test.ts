// `rungbook check FILE`: table and JSON output of the demo Book's checks, --variant, --strict, and bad input.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { CheckJson } from '../../src/cli/commands/check.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { serializeBook } from '../../src/io/book-file.ts';
import { runCli } from './cli-helpers.ts';

let dir = '';
let demoFile = '';
let soundFile = '';

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'rungbook-check-'));
  demoFile = join(dir, 'demo.rungbook.json');
  writeFileSync(demoFile, serializeBook(demoBook()));
  // The demo with FR5-75-CD's bleeder fixed (470 kΩ: 0.5719 s, see checks-demo.test.ts): margins remain, no fail.
  const sound = demoBook();
  sound.variants.find((v) => v.code === 'FR5-75-CD')!.params.r_bleed = 470e3;
  soundFile = join(dir, 'sound.rungbook.json');
  writeFileSync(soundFile, serializeBook(sound));
});

afterAll(() => {
  if (dir) rmSync(dir, { recursive: true, force: true });
});

function run(...argv: string[]): Promise<{ code: number; out: string; err: string }> {
  return runCli(['check', ...argv]);
}

describe('rungbook check', () => {
  it('prints the mains caution and a table per variant with status words and symbols', async () => {
    const r = await run(demoFile, '--variant', 'FR5-75-CD');
    expect(r.code).toBe(0);
    expect(r.out.split('\n')[0]).toMatch(/^Caution: Live, non-isolated mains circuits can kill\. .*not a certification.*qualified person/);
    expect(r.out).toContain('FR5-75-CD — Five-step 75 W, push button, dropper: worst fail');
    // 1 MΩ · 0.517 µF · ln(357.8/34) = 1.217 s > 1 s (IEC 60335-1 cl. 22.5 as quoted; worked in checks-demo.test.ts).
    expect(r.out).toMatch(/bleeder_time\s+1\.217 s\s+✗ fail\s+≤ 1 s/);
    expect(r.out).toMatch(/switch_v_stress\s+357\.8 V\s+✓ pass\s+≤ 640 V/);
    expect(r.out).toMatch(/ctl_s6\s+– n\/a/);
    expect(r.out).not.toContain('FR3-40-CD');
  });

  it('prints JSON records of {variant, check, value, unit, status, rule} for every variant and check', async () => {
    const r = await run(demoFile, '--json');
    expect(r.code).toBe(0);
    const rows = JSON.parse(r.out) as CheckJson[];
    const book = demoBook();
    expect(new Set(rows.map((x) => x.variant))).toEqual(new Set(book.variants.map((v) => v.code)));
    const zener = rows.find((x) => x.variant === 'FR6-100-CD' && x.check === 'zener_worst')!;
    // 18.16 mA · 13.1 V = 0.2379 W against half of 0.5 W (worked in checks-demo.test.ts).
    expect(zener).toMatchObject({ unit: 'W', status: 'margin', rule: 'max zener_p_max / 2 margin 10%', limit: '≤ 0.25' });
    expect(zener.value).toBeCloseTo(0.2379, 4);
    // The caution goes to stderr so stdout stays valid JSON.
    expect(r.err).toContain('not a certification');
  });

  it('exits 1 with --strict when a check fails, and 0 when none does', async () => {
    const failing = await run(demoFile, '--strict', '--json');
    expect(failing.code).toBe(1);
    expect(failing.err).toMatch(/1 check result failed or could not be evaluated/);
    const sound = await run(soundFile, '--strict');
    expect(sound.code).toBe(0);
    expect(sound.out).not.toMatch(/✗ fail/);
  });

  it('refuses a missing file, a file that is not a Book, an unknown variant and unknown options', async () => {
    const missing = await run(join(dir, 'nope.rungbook.json'));
    expect(missing.code).toBe(2);
    expect(missing.err).toMatch(/cannot read .*nope\.rungbook\.json/);
    const junk = join(dir, 'junk.rungbook.json');
    writeFileSync(junk, '{"format": "something else"}');
    const bad = await run(junk);
    expect(bad.code).toBe(2);
    expect(bad.err).toMatch(/cannot be used as a Book file/);
    const variant = await run(demoFile, '--variant', 'XX-1');
    expect(variant.code).toBe(2);
    expect(variant.err).toMatch(/no variant with code XX-1; the Book has FR3-40-CD, /);
    const option = await run(demoFile, '--colour');
    expect(option.code).toBe(2);
    expect(option.err).toMatch(/unknown option --colour/);
    expect((await run()).code).toBe(2);
  });
});
