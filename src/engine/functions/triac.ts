// Triac stage functions: the RMS voltage phase-angle control delivers, on-state loss by the two-parameter model,
// gate trigger figures taken to a cold junction, gate drive current and the current slope at commutation.
import { buildPlugin, defineFunction, numError } from './define.ts';
import type { FunctionSpec } from './define.ts';

/** Mean of |i| over the RMS value for a sine: 2√2/π. */
const SINE_AVG_PER_RMS = (2 * Math.SQRT2) / Math.PI;

/** The fraction of the full RMS voltage left after firing at `alpha` rad into each half cycle. */
function phaseFraction(alpha: number): number {
  // Rounding can leave a tiny negative just below π; the true value there is 0.
  return Math.sqrt(Math.max(0, 1 - alpha / Math.PI + Math.sin(2 * alpha) / (2 * Math.PI)));
}

const PHASE_VRMS = defineFunction({
  name: 'PHASE_VRMS',
  area: 'triac',
  returns: 'V',
  doc:
    'RMS voltage a phase-angle controller passes when it fires alpha rad after each zero crossing (0 full, π off): ' +
    'v_rms · √(1 − α/π + sin 2α / (2π)), exact for a resistive load (power electronics textbooks, from memory).',
  args: [
    { name: 'v_rms', unit: 'V', rule: 'nonNegative' },
    { name: 'alpha', unit: 'rad', rule: 'nonNegative' },
  ],
  compute(v: number, alpha: number) {
    if (alpha > Math.PI) return numError('PHASE_VRMS', `alpha (rad) must be at most π (half a cycle), got ${alpha}`);
    return v * phaseFraction(alpha);
  },
});

const TRIAC_LOSS = defineFunction({
  name: 'TRIAC_LOSS',
  area: 'triac',
  returns: 'W',
  doc:
    'On-state loss of a thyristor or triac conducting a full sine of i_rms: v_t0 · I_T(AV) + r_t · i_rms², ' +
    'I_T(AV) = 0.9003 · i_rms (V_T0 and r_T as IEC 60747-6 defines them).',
  args: [
    { name: 'i_rms', unit: 'A', rule: 'nonNegative' },
    { name: 'v_t0', unit: 'V', rule: 'nonNegative' },
    { name: 'r_t', unit: 'Ω', rule: 'nonNegative' },
  ],
  compute: (i: number, vt0: number, rt: number) => vt0 * SINE_AVG_PER_RMS * i + rt * i * i,
});

const GATE_COLD = defineFunction({
  name: 'GATE_COLD',
  area: 'triac',
  returns: '',
  doc:
    'A gate trigger figure (I_GT or V_GT) rated at 25 °C taken to a colder junction t_j: x_25 scaled linearly from 1 ' +
    'at 25 °C to ratio_m40 at −40 °C, held beyond; above 25 °C the 25 °C figure stands (from memory: datasheet curves give about 2 for I_GT).',
  args: [
    { name: 'x_25', unit: '', rule: 'nonNegative' },
    { name: 't_j', unit: '°C' },
    { name: 'ratio_m40', unit: '', rule: 'positive', optional: true, default: 2 },
  ],
  compute(x: number, t: number, ratio: number) {
    if (t >= 25) return x;
    const share = Math.min(1, (25 - t) / 65);
    return x * (1 + (ratio - 1) * share);
  },
});

const GATE_AMPS = defineFunction({
  name: 'GATE_AMPS',
  area: 'triac',
  returns: 'A',
  doc: 'Gate current a driver of open-circuit voltage v_drive gives through r_g into a gate at v_gt: (v_drive − v_gt) / r_g, 0 if below (basic circuit theory, from memory).',
  args: [
    { name: 'v_drive', unit: 'V', rule: 'nonNegative' },
    { name: 'v_gt', unit: 'V', rule: 'nonNegative' },
    { name: 'r_g', unit: 'Ω', rule: 'positive' },
  ],
  compute: (v: number, vgt: number, r: number) => Math.max(0, (v - vgt) / r),
});

const COMMUTATION_DIDT = defineFunction({
  name: 'COMMUTATION_DIDT',
  area: 'triac',
  returns: 'A/s',
  doc: 'Rate at which a sine load current of i_rms at f falls through zero: 2π · f · √2 · i_rms; compare with a triac\'s (dI/dt)c (basic circuit theory, from memory).',
  args: [
    { name: 'i_rms', unit: 'A', rule: 'nonNegative' },
    { name: 'f', unit: 'Hz', rule: 'positive' },
  ],
  compute: (i: number, f: number) => 2 * Math.PI * f * Math.SQRT2 * i,
});

export const TRIAC_FUNCTIONS: readonly FunctionSpec[] = [PHASE_VRMS, TRIAC_LOSS, GATE_COLD, GATE_AMPS, COMMUTATION_DIDT];

export const TriacPlugin = buildPlugin('triac', TRIAC_FUNCTIONS);
