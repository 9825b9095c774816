// Preferred values and codes in formulas: IEC 60063 E-series nearest / up / down, IEC 60062 RKM code both ways.
import { eDown, eNear, eUp } from '../../domain/eseries.ts';
import type { ESeriesResult } from '../../domain/eseries.ts';
import { parseRkm, toRkm } from '../../domain/rkm.ts';
import { buildPlugin, defineFunction, numError, valueError } from './define.ts';
import type { FunctionSpec } from './define.ts';

const seriesArgs = [
  { name: 'value', unit: '', rule: 'positive' },
  { name: 'series', unit: '' },
] as const;

function seriesResult(fn: string, r: ESeriesResult) {
  return r.ok ? r.value : numError(fn, r.error);
}

const E_NEAR = defineFunction({
  name: 'E_NEAR',
  area: 'values',
  returns: '',
  doc: 'Nearest IEC 60063 preferred value on a log scale; series is 3, 6, 12, 24, 48, 96 or 192. Keeps the unit of value.',
  args: seriesArgs,
  compute: (value: number, n: number) => seriesResult('E_NEAR', eNear(value, n)),
});

const E_UP = defineFunction({
  name: 'E_UP',
  area: 'values',
  returns: '',
  doc: 'Smallest IEC 60063 preferred value at or above value (a preferred value is its own E_UP).',
  args: seriesArgs,
  compute: (value: number, n: number) => seriesResult('E_UP', eUp(value, n)),
});

const E_DOWN = defineFunction({
  name: 'E_DOWN',
  area: 'values',
  returns: '',
  doc: 'Largest IEC 60063 preferred value at or below value (a preferred value is its own E_DOWN).',
  args: seriesArgs,
  compute: (value: number, n: number) => seriesResult('E_DOWN', eDown(value, n)),
});

const RKM = defineFunction({
  name: 'RKM',
  area: 'values',
  returns: '',
  doc: 'Value of an IEC 60062 RKM code: "4k7" → 4700, "0R22" → 0.22, "2n2" → 2.2e-9 (any tolerance letter is ignored).',
  args: [{ name: 'text', unit: 'text', kind: 'text' }],
  compute(text: string) {
    const r = parseRkm(text);
    return r.ok ? r.value : valueError('RKM', r.error);
  },
});

const RKM_TEXT = defineFunction({
  name: 'RKM_TEXT',
  area: 'values',
  returns: 'text',
  doc: 'IEC 60062 RKM code of a value to 3 figures: 4700 → "4K7", 0.47 → "R47"; kind "C" for capacitance → "2n2".',
  args: [
    { name: 'value', unit: '', rule: 'positive' },
    { name: 'kind', unit: '"R" or "C"', kind: 'text', optional: true, default: 'R' },
  ],
  compute(value: number, kind: string) {
    const k = kind.trim().toLowerCase();
    const rkmKind = ['r', 'resistance', 'ohm', 'ω'].includes(k) // 'ω' is 'Ω' lower-cased
      ? 'resistance'
      : ['c', 'capacitance', 'f'].includes(k)
        ? 'capacitance'
        : undefined;
    if (!rkmKind) return valueError('RKM_TEXT', `kind must be "R" (resistance) or "C" (capacitance), got "${kind}"`);
    const r = toRkm(value, rkmKind);
    return r.ok ? r.text : numError('RKM_TEXT', r.error);
  },
});

export const VALUES_FUNCTIONS: readonly FunctionSpec[] = [E_NEAR, E_UP, E_DOWN, RKM, RKM_TEXT];

export const ValuesPlugin = buildPlugin('values', VALUES_FUNCTIONS);
