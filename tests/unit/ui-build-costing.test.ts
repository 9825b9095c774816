// The pure checks behind the Rates page's form: the settings draft read back unchanged, run-size lists, and a new
// currency with its rate. (The page itself is driven in tests/browser/compare-rates.test.ts.)
import { describe, expect, it } from 'vitest';
import { demoBook } from '../../src/domain/demo-book.ts';
import { readRunSizes, settingsDraft, validateSettings } from '../../src/ui/build-costing.ts';

const demo = demoBook();

describe('settings drafts', () => {
  it('reads percentages as typed and keeps the demo settings unchanged when nothing is edited', () => {
    const r = validateSettings(settingsDraft(demo), demo);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.record.rates).toEqual(demo.settings.rates);
    expect(r.record.attrition).toEqual(demo.settings.attrition);
    expect(r.record.runSizes).toEqual(demo.settings.runSizes);
    expect(r.record.rev).toBe(demo.settings.rev);
  });

  it('takes run sizes with thousands spaces, sorts them and refuses repeats, fractions and empty lists', () => {
    expect(readRunSizes('10 000, 500; 2000')).toEqual({ ok: true, value: [500, 2000, 10000] });
    expect(readRunSizes('500, 500').ok).toBe(false);
    expect(readRunSizes('2.5').ok).toBe(false);
    expect(readRunSizes(' , ').ok).toBe(false);
    expect(readRunSizes('0').ok).toBe(false);
  });

  it('adds a currency with its rate and refuses one without', () => {
    const d = { ...settingsDraft(demo), newCurrency: 'chf', newRate: '1.04' };
    const r = validateSettings(d, demo);
    expect(r.ok && r.record.rates['CHF']).toBe(1.04);
    const bad = validateSettings({ ...d, newRate: '' }, demo);
    expect(bad.ok ? [] : Object.keys(bad.problems)).toEqual(['newRate']);
  });
});
