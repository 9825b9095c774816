// The planning settings form: typed text read back into the settings, or a message per wrong field and no settings.
import { describe, expect, it } from 'vitest';
import { defaultSettings } from '../../src/domain/book.ts';
import { draftOf, readPlanSettings } from '../../src/ui/plan-settings-form.ts';

describe('planning settings form', () => {
  it('reads a good draft into the settings, leaving the rest of them as they were', () => {
    const s = defaultSettings();
    const r = readPlanSettings({ ...draftOf(s), orderPrefix: 'PO/', nextOrderNumber: '120', kittingDays: '3', safetyDays: '0', horizonDays: '60', stockValuation: 'quote' }, s);
    expect(r).toEqual({ ok: true, settings: { ...s, orderPrefix: 'PO/', nextOrderNumber: 120, kittingDays: 3, safetyDays: 0, horizonDays: 60, stockValuation: 'quote' } });
  });

  it('names each wrong field and gives no settings', () => {
    const s = defaultSettings();
    const r = readPlanSettings({ ...draftOf(s), nextOrderNumber: '0', kittingDays: '2.5', horizonDays: 'soon' }, s);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(Object.keys(r.problems).sort()).toEqual(['horizonDays', 'kittingDays', 'nextOrderNumber']);
  });
});
