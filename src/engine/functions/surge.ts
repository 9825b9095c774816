// Surge and protection functions: a varistor's clamping voltage along its V–I curve, the current a surge
// generator drives into it, and the energy it absorbs.
import { buildPlugin, defineFunction, numError } from './define.ts';
import type { FunctionSpec } from './define.ts';

/** The varistor voltage is specified at 1 mA. */
const I_VARISTOR = 1e-3;

/**
 * Exponent α of the power law i = k · v^α through the two datasheet points (1 mA, v_1ma) and (i_c, v_c), or a message
 * when the points do not describe a clamp.
 */
function alphaOf(v1ma: number, vc: number, ic: number): number | string {
  if (ic <= I_VARISTOR) return `i_c must be above the 1 mA of the varistor voltage, got ${ic}`;
  if (vc <= v1ma) return `v_c must be above v_1ma (a clamp's voltage rises with current), got ${vc} ≤ ${v1ma}`;
  return Math.log(ic / I_VARISTOR) / Math.log(vc / v1ma);
}

function clampAt(v1ma: number, alpha: number, i: number): number {
  return v1ma * Math.pow(i / I_VARISTOR, 1 / alpha);
}

const vdrArgs = [
  { name: 'v_1ma', unit: 'V', rule: 'positive' },
  { name: 'v_c', unit: 'V', rule: 'positive' },
  { name: 'i_c', unit: 'A', rule: 'positive' },
] as const;

const VDR_CLAMP = defineFunction({
  name: 'VDR_CLAMP',
  area: 'surge',
  returns: 'V',
  doc:
    'Varistor voltage at current i on the power law i = k · v^α through its varistor voltage v_1ma (at 1 mA) and ' +
    'its clamping voltage v_c at i_c, both datasheet figures (from memory: the usual varistor model).',
  args: [...vdrArgs, { name: 'i', unit: 'A', rule: 'positive' }],
  compute(v1ma: number, vc: number, ic: number, i: number) {
    const alpha = alphaOf(v1ma, vc, ic);
    if (typeof alpha === 'string') return numError('VDR_CLAMP', alpha);
    return clampAt(v1ma, alpha, i);
  },
});

const VDR_SURGE_AMPS = defineFunction({
  name: 'VDR_SURGE_AMPS',
  area: 'surge',
  returns: 'A',
  doc:
    'Peak current a surge generator of open-circuit voltage v_oc behind z drives into a varistor: solves i = (v_oc − v(i)) / z ' +
    'on the power law of VDR_CLAMP (IEC 61000-4-5 combination wave: 2 Ω line to line, from memory).',
  args: [{ name: 'v_oc', unit: 'V', rule: 'positive' }, { name: 'z', unit: 'Ω', rule: 'positive' }, ...vdrArgs],
  compute(vOc: number, z: number, v1ma: number, vc: number, ic: number) {
    const alpha = alphaOf(v1ma, vc, ic);
    if (typeof alpha === 'string') return numError('VDR_SURGE_AMPS', alpha);
    // (v_oc − v(i)) / z falls as i rises, so the operating point is the one root in (0, v_oc / z]: bisect in log i.
    let lo = Math.log(1e-12);
    let hi = Math.log(vOc / z);
    for (let k = 0; k < 200; k++) {
      const mid = (lo + hi) / 2;
      const i = Math.exp(mid);
      if (i * z + clampAt(v1ma, alpha, i) > vOc) hi = mid;
      else lo = mid;
    }
    return Math.exp((lo + hi) / 2);
  },
});

const VDR_ENERGY = defineFunction({
  name: 'VDR_ENERGY',
  area: 'surge',
  returns: 'J',
  doc:
    'Energy a varistor absorbs from one surge: v · i · t, the clamping voltage and peak current held for t, the time ' +
    'to half value (20 µs for the 8/20 µs current wave of IEC 61000-4-5; the rectangle is from memory).',
  args: [
    { name: 'v', unit: 'V', rule: 'nonNegative' },
    { name: 'i', unit: 'A', rule: 'nonNegative' },
    { name: 't', unit: 's', rule: 'positive', optional: true, default: 20e-6 },
  ],
  compute: (v: number, i: number, t: number) => v * i * t,
});

export const SURGE_FUNCTIONS: readonly FunctionSpec[] = [VDR_CLAMP, VDR_SURGE_AMPS, VDR_ENERGY];

export const SurgePlugin = buildPlugin('surge', SURGE_FUNCTIONS);
