// Transformer logic-supply functions: the rectified and smoothed voltage left for the regulator, the transformer's
// load in VA, and the linear regulator's loss.
import { buildPlugin, defineFunction } from './define.ts';
import type { FunctionSpec } from './define.ts';

const RECT_TROUGH = defineFunction({
  name: 'RECT_TROUGH',
  area: 'transformer',
  returns: 'V',
  doc:
    'Lowest voltage on the smoothing capacitor after a full-wave bridge: √2 · v_ac − 2 · v_f − i_dc / (2 · f · c), ' +
    'the ripple taken as a linear discharge over a half cycle (basic circuit theory, from memory). i_dc 0 gives the peak.',
  args: [
    { name: 'v_ac', unit: 'V', rule: 'nonNegative' },
    { name: 'v_f', unit: 'V', rule: 'nonNegative' },
    { name: 'i_dc', unit: 'A', rule: 'nonNegative' },
    { name: 'f', unit: 'Hz', rule: 'positive' },
    { name: 'c', unit: 'F', rule: 'positive' },
  ],
  compute: (v: number, vf: number, i: number, f: number, c: number) => Math.SQRT2 * v - 2 * vf - i / (2 * f * c),
});

const XFMR_VA = defineFunction({
  name: 'XFMR_VA',
  area: 'transformer',
  returns: 'VA',
  doc:
    'Apparent power a transformer feeding a capacitor-input bridge carries: v_sec · i_dc · k, the secondary RMS current ' +
    'being about k = 1.8 times the DC drawn (from memory: short charging pulses).',
  args: [
    { name: 'v_sec', unit: 'V', rule: 'nonNegative' },
    { name: 'i_dc', unit: 'A', rule: 'nonNegative' },
    { name: 'k', unit: '', rule: 'positive', optional: true, default: 1.8 },
  ],
  compute: (v: number, i: number, k: number) => v * i * k,
});

const REG_LOSS = defineFunction({
  name: 'REG_LOSS',
  area: 'transformer',
  returns: 'W',
  doc: 'Linear regulator dissipation (v_in − v_out) · i, 0 when v_in is at or below v_out (basic circuit theory, from memory).',
  args: [
    { name: 'v_in', unit: 'V' },
    { name: 'v_out', unit: 'V', rule: 'nonNegative' },
    { name: 'i', unit: 'A', rule: 'nonNegative' },
  ],
  compute: (vIn: number, vOut: number, i: number) => Math.max(0, vIn - vOut) * i,
});

export const TRANSFORMER_FUNCTIONS: readonly FunctionSpec[] = [RECT_TROUGH, XFMR_VA, REG_LOSS];

export const TransformerPlugin = buildPlugin('transformer', TRANSFORMER_FUNCTIONS);
