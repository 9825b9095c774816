// Control-signal functions: the 555-type astable (times, frequency, duty, with the control-pin voltage form),
// RC charge time to a threshold (debounce), the resistor divider and the control-pin node it drives.
import { buildPlugin, defineFunction, numError, valueError } from './define.ts';
import type { FunctionSpec } from './define.ts';

/**
 * ln of the high-time charge ratio. The capacitor charges from V_c/2 to V_c towards V_cc, so
 * t_H = (R_A + R_B)·C·ln((V_cc − V_c/2)/(V_cc − V_c)); at the default V_c = ⅔V_cc this is ln 2.
 * Returns an error message when the pair is outside 0 < V_c < V_cc.
 */
function highLog(vcc: number | undefined, vctl: number | undefined): number | string {
  if (vcc === undefined && vctl === undefined) return Math.LN2;
  if (vcc === undefined) return 'give vcc together with vctl';
  if (!(vcc > 0)) return `vcc (V) must be greater than 0, got ${vcc}`;
  const vc = vctl ?? (2 / 3) * vcc;
  if (!(vc > 0 && vc < vcc)) return `vctl must lie between 0 and vcc (${vcc} V), got ${vc} V`;
  return Math.log((vcc - vc / 2) / (vcc - vc));
}

/**
 * RA of an astable. With RA = 0 the discharge transistor, turning on, shorts the supply through nothing (textbook
 * 555 circuit, from memory), so no real astable has it.
 */
const RA_ARG = { name: 'ra', unit: 'Ω', rule: 'positive', why: 'with RA = 0 the discharge pin shorts the supply each time it turns on' } as const;

const optionalSupply = [
  { name: 'vcc', unit: 'V', optional: true },
  { name: 'vctl', unit: 'V', optional: true },
] as const;

const ASTABLE_HIGH = defineFunction({
  name: 'ASTABLE_HIGH',
  area: 'timing',
  returns: 's',
  doc: '555-type astable high time (ra + rb) · c · ln((vcc − vctl/2)/(vcc − vctl)); ln 2 when vctl is ⅔ vcc (the default; textbook 555 formulas, from memory).',
  args: [
    RA_ARG,
    { name: 'rb', unit: 'Ω', rule: 'positive' },
    { name: 'c', unit: 'F', rule: 'positive' },
    ...optionalSupply,
  ],
  compute(ra: number, rb: number, c: number, vcc?: number, vctl?: number) {
    const k = highLog(vcc, vctl);
    return typeof k === 'string' ? numError('ASTABLE_HIGH', k) : (ra + rb) * c * k;
  },
});

const ASTABLE_LOW = defineFunction({
  name: 'ASTABLE_LOW',
  area: 'timing',
  returns: 's',
  doc: '555-type astable low time ln 2 · rb · c (the control voltage does not change it; textbook 555 formulas, from memory).',
  args: [
    { name: 'rb', unit: 'Ω', rule: 'positive' },
    { name: 'c', unit: 'F', rule: 'positive' },
  ],
  compute: (rb: number, c: number) => Math.LN2 * rb * c,
});

const ASTABLE_HZ = defineFunction({
  name: 'ASTABLE_HZ',
  area: 'timing',
  returns: 'Hz',
  doc: '555-type astable frequency 1 / (high time + low time), with the optional control voltage (textbook 555 formulas, from memory).',
  args: [
    RA_ARG,
    { name: 'rb', unit: 'Ω', rule: 'positive' },
    { name: 'c', unit: 'F', rule: 'positive' },
    ...optionalSupply,
  ],
  compute(ra: number, rb: number, c: number, vcc?: number, vctl?: number) {
    const k = highLog(vcc, vctl);
    if (typeof k === 'string') return numError('ASTABLE_HZ', k);
    return 1 / ((ra + rb) * c * k + rb * c * Math.LN2);
  },
});

const ASTABLE_DUTY = defineFunction({
  name: 'ASTABLE_DUTY',
  area: 'timing',
  returns: '',
  doc: '555-type astable duty cycle high / (high + low) as a fraction, with the optional control voltage (textbook 555 formulas, from memory).',
  args: [RA_ARG, { name: 'rb', unit: 'Ω', rule: 'positive' }, ...optionalSupply],
  compute(ra: number, rb: number, vcc?: number, vctl?: number) {
    const k = highLog(vcc, vctl);
    if (typeof k === 'string') return numError('ASTABLE_DUTY', k);
    const high = (ra + rb) * k;
    return high / (high + rb * Math.LN2);
  },
});

const RC_REACH = defineFunction({
  name: 'RC_REACH',
  area: 'timing',
  returns: 's',
  doc: 'Time for an RC charging from 0 towards v_supply to reach v_threshold: r · c · ln(v_supply / (v_supply − v_threshold)) (basic circuit theory, from memory).',
  args: [
    { name: 'r', unit: 'Ω', rule: 'nonNegative' },
    { name: 'c', unit: 'F', rule: 'nonNegative' },
    { name: 'v_supply', unit: 'V', rule: 'positive' },
    { name: 'v_threshold', unit: 'V', rule: 'nonNegative' },
  ],
  compute(r: number, c: number, vs: number, vth: number) {
    if (vth >= vs) return numError('RC_REACH', `the capacitor never reaches ${vth} V from a ${vs} V supply`);
    return r * c * Math.log(vs / (vs - vth));
  },
});

const DIVIDER_OUT = defineFunction({
  name: 'DIVIDER_OUT',
  area: 'timing',
  returns: 'V',
  doc: 'Unloaded resistor divider output (v_in − v_drop) · r_bottom / (r_top + r_bottom); v_drop is a series diode, 0 if left out (basic circuit theory, from memory).',
  args: [
    { name: 'v_in', unit: 'V' },
    { name: 'r_top', unit: 'Ω', rule: 'nonNegative' },
    { name: 'r_bottom', unit: 'Ω', rule: 'nonNegative' },
    {
      name: 'v_drop',
      unit: 'V',
      rule: 'nonNegative',
      optional: true,
      default: 0,
      notAbove: { arg: 'v_in', why: 'a diode drop above the input leaves the diode off, so the divider has no output' },
    },
  ],
  compute(vIn: number, rTop: number, rBottom: number, vDrop: number) {
    if (rTop + rBottom === 0) return numError('DIVIDER_OUT', 'r_top and r_bottom are both 0');
    return ((vIn - vDrop) * rBottom) / (rTop + rBottom);
  },
});

const CTL_NODE = defineFunction({
  name: 'CTL_NODE',
  area: 'timing',
  returns: 'V',
  doc:
    'Voltage at a 555-type control pin driven by a divider (r_top to vcc, r_bottom to ground), solving the node with ' +
    "the pin's own source v_int (⅔ vcc) behind r_int, the fitted timer's control-pin source resistance (its r_ctl rating: " +
    'about 3.33 kΩ for a bipolar part, far higher for a CMOS one, from memory; Kirchhoff’s current law).',
  args: [
    { name: 'vcc', unit: 'V', rule: 'positive' },
    { name: 'r_top', unit: 'Ω', rule: 'positive' },
    { name: 'r_bottom', unit: 'Ω', rule: 'nonNegative' },
    { name: 'r_int', unit: 'Ω', rule: 'positive', optional: true },
    { name: 'v_int', unit: 'V', optional: true },
  ],
  compute(vcc: number, rTop: number, rBottom: number, rInt?: number, vInt?: number) {
    // No default: a bipolar part's 3.33 kΩ and a CMOS part's tens of kΩ give very different voltages.
    if (rInt === undefined) {
      return valueError(
        'CTL_NODE',
        "give r_int, the timer's control-pin source resistance (its part's r_ctl rating: about 3.33 kΩ for a bipolar 555, far higher for a CMOS part)",
      );
    }
    if (rBottom === 0) return 0; // pin shorted to ground
    const vi = vInt ?? (2 / 3) * vcc;
    // Kirchhoff's current law at the pin: (vcc − V)/r_top + (0 − V)/r_bottom + (v_int − V)/r_int = 0.
    return (vcc / rTop + vi / rInt) / (1 / rTop + 1 / rBottom + 1 / rInt);
  },
});

export const TIMING_FUNCTIONS: readonly FunctionSpec[] = [
  ASTABLE_HIGH,
  ASTABLE_LOW,
  ASTABLE_HZ,
  ASTABLE_DUTY,
  RC_REACH,
  DIVIDER_OUT,
  CTL_NODE,
];

export const TimingPlugin = buildPlugin('timing', TIMING_FUNCTIONS);
