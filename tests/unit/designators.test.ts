// The designators a variant places: a family line's list cut to the variant's quantity (domain/designators.ts).
import { describe, expect, it } from 'vitest';
import { compactDesignators, expandDesignators, usedDesignators } from '../../src/domain/designators.ts';

describe('designators a variant places', () => {
  it('reads lists and ranges with a hyphen or an en dash', () => {
    expect(expandDesignators('D3–D8')).toEqual(['D3', 'D4', 'D5', 'D6', 'D7', 'D8']);
    expect(expandDesignators('R10-R12, C1')).toEqual(['R10', 'R11', 'R12', 'C1']);
    expect(expandDesignators('C6, C7')).toEqual(['C6', 'C7']);
    expect(expandDesignators('D3 – D5')).toEqual(['D3', 'D4', 'D5']);
    expect(expandDesignators('near the heatsink')).toBeUndefined();
    expect(expandDesignators('D8–D3')).toBeUndefined();
    expect(expandDesignators('D3–R8')).toBeUndefined();
  });

  it('writes runs of three or more as a range', () => {
    expect(compactDesignators(['D3', 'D4', 'D5', 'D6'])).toBe('D3–D6');
    expect(compactDesignators(['D3', 'D4'])).toBe('D3, D4');
    expect(compactDesignators(['R1', 'R2', 'R3', 'C1'])).toBe('R1–R3, C1');
  });

  it('keeps the first designators of a family line for a variant that takes fewer pieces', () => {
    // The demo's steering diodes: D3–D8 for six steps; a four-step variant fits D3 to D6.
    expect(usedDesignators('D3–D8', 4)).toBe('D3–D6');
    expect(usedDesignators('D3–D8', 6)).toBe('D3–D8');
    expect(usedDesignators('C6, C7', 1)).toBe('C6');
    // One name for several pieces, a fraction, or a text that is no list: left as written.
    expect(usedDesignators('HS1', 2)).toBe('HS1');
    expect(usedDesignators('D3–D8', 2.5)).toBe('D3–D8');
    expect(usedDesignators('see drawing', 1)).toBe('see drawing');
  });
});
