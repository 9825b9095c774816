// The vocabulary of variant parameters and part ratings that check formulas and build rules refer to by name.
// All numbers are SI base units (V, A, W, Ω, F, s, Hz, K/W, °C) unless the entry says otherwise.
import { reservedNameProblem } from './schema.ts';

export interface NameDoc {
  name: string;
  unit: string;
  doc: string;
  kind: 'number' | 'text';
}

/** Standard variant parameters. A Book may add its own; these are the ones the built-in checks read. */
export const VARIANT_PARAMS: readonly NameDoc[] = [
  { name: 'steps', unit: '', kind: 'number', doc: 'number of speed steps (off not counted)' },
  { name: 'load_w', unit: 'W', kind: 'number', doc: 'rated fan load, input power at full speed' },
  { name: 'pf', unit: '', kind: 'number', doc: 'power factor of the fan at full speed' },
  { name: 'mains_v', unit: 'V', kind: 'number', doc: 'nominal mains voltage, RMS' },
  { name: 'mains_hz', unit: 'Hz', kind: 'number', doc: 'mains frequency' },
  { name: 'mains_tol', unit: '', kind: 'number', doc: 'mains tolerance as a fraction (0.1 = ±10 %)' },
  { name: 't_amb', unit: '°C', kind: 'number', doc: 'highest ambient temperature inside the box' },
  { name: 'selector', unit: '', kind: 'text', doc: 'speed selection: button, rotary or mcu' },
  { name: 'stage', unit: '', kind: 'text', doc: 'power stage: mosfet, triac or capacitor' },
  { name: 'supply', unit: '', kind: 'text', doc: 'logic supply: dropper, transformer or switcher' },
  { name: 'vcc', unit: 'V', kind: 'number', doc: 'logic supply voltage' },
  { name: 'i_logic', unit: 'A', kind: 'number', doc: 'current the logic draws from its supply' },
  { name: 'c_drop', unit: 'F', kind: 'number', doc: 'dropper (X) capacitor, nominal' },
  { name: 'c_drop_tol', unit: '', kind: 'number', doc: 'dropper capacitor tolerance as a fraction' },
  { name: 'r_bleed', unit: 'Ω', kind: 'number', doc: 'bleeder resistor across the dropper capacitor' },
  { name: 'v_z', unit: 'V', kind: 'number', doc: 'zener clamp voltage of the dropper supply' },
  { name: 'ra', unit: 'Ω', kind: 'number', doc: 'astable timing resistor RA' },
  { name: 'rb', unit: 'Ω', kind: 'number', doc: 'astable timing resistor RB' },
  { name: 'c_t', unit: 'F', kind: 'number', doc: 'astable timing capacitor' },
  { name: 'r_top', unit: 'Ω', kind: 'number', doc: 'top resistor of the stepped control-voltage divider' },
  { name: 'r_s1', unit: 'Ω', kind: 'number', doc: 'bottom resistor selected at step 1 (r_s2 … r_s8 likewise)' },
  { name: 'r_db', unit: 'Ω', kind: 'number', doc: 'debounce RC resistor' },
  { name: 'c_db', unit: 'F', kind: 'number', doc: 'debounce RC capacitor' },
  { name: 't_bounce', unit: 's', kind: 'number', doc: 'longest contact bounce to reject' },
  { name: 'snub_c', unit: 'F', kind: 'number', doc: 'snubber capacitor' },
  { name: 'f_pwm_min', unit: 'Hz', kind: 'number', doc: 'lowest acceptable PWM frequency' },
  { name: 'f_pwm_max', unit: 'Hz', kind: 'number', doc: 'highest acceptable PWM frequency' },
  ...[1, 2, 3, 4, 5, 6, 7, 8].map(
    (k): NameDoc => ({ name: `alpha_s${k}`, unit: 'rad', kind: 'number', doc: `triac firing angle at step ${k}, after each mains zero crossing (π is half a cycle)` }),
  ),
  { name: 'fan_v_min', unit: 'V', kind: 'number', doc: 'lowest RMS voltage at which the fan still starts and runs (from its maker)' },
  { name: 't_amb_min', unit: '°C', kind: 'number', doc: 'coldest ambient temperature the regulator must start in' },
  { name: 'gate_polarity', unit: '', kind: 'text', doc: 'triac gate drive: negative (quadrants II and III) or positive (I and IV)' },
  { name: 'surge_v', unit: 'V', kind: 'number', doc: 'surge test level line to line, open-circuit (IEC 61000-4-5: 500, 1000, 2000 or 4000 V)' },
];

/** The most steps a variant may have; ladder resistors are r_s1 … r_s{MAX_STEPS}. */
export const MAX_STEPS = 8;

/** Part rating names. A check reads a role's part rating as `<role>_<rating>`, for example `switch_v_max`. */
export const PART_RATINGS: readonly NameDoc[] = [
  { name: 'v_max', unit: 'V', kind: 'number', doc: 'highest working voltage (DC or peak; for ICs the supply maximum)' },
  { name: 'v_ac', unit: 'V', kind: 'number', doc: 'rated AC voltage, RMS (X capacitors)' },
  { name: 'i_max', unit: 'A', kind: 'number', doc: 'highest continuous current (RMS for triacs, average for bridges)' },
  { name: 'p_max', unit: 'W', kind: 'number', doc: 'rated power dissipation' },
  { name: 'rds_on', unit: 'Ω', kind: 'number', doc: 'on-resistance at 25 °C' },
  { name: 'vgs_full', unit: 'V', kind: 'number', doc: 'gate voltage at which on-resistance is specified (fully on)' },
  { name: 'vf', unit: 'V', kind: 'number', doc: 'forward voltage per diode at rated current' },
  { name: 'rth_jc', unit: 'K/W', kind: 'number', doc: 'thermal resistance junction to case' },
  { name: 'rth_cs', unit: 'K/W', kind: 'number', doc: 'thermal resistance case to sink (interface)' },
  { name: 'rth_sa', unit: 'K/W', kind: 'number', doc: 'thermal resistance sink to air (heatsinks)' },
  { name: 'tj_max', unit: '°C', kind: 'number', doc: 'highest junction temperature' },
  { name: 'tol', unit: '', kind: 'number', doc: 'value tolerance as a fraction' },
  { name: 'v_min', unit: 'V', kind: 'number', doc: 'lowest supply voltage (ICs)' },
  { name: 'r_ctl', unit: 'Ω', kind: 'number', doc: 'control-pin source resistance of a 555-type timer: its internal divider\'s upper resistor ∥ the lower two (bipolar 3 × 5 kΩ → 3.33 kΩ; CMOS parts far higher)' },
  { name: 'v_oh_drop', unit: 'V', kind: 'number', doc: 'how far a timer\'s or driver\'s output sits under its supply when high (bipolar 555 about 1.7 V, CMOS near 0)' },
  { name: 'vt0', unit: 'V', kind: 'number', doc: 'on-state threshold voltage V_T0 of a thyristor or triac (IEC 60747-6)' },
  { name: 'rt', unit: 'Ω', kind: 'number', doc: 'on-state slope resistance r_T of a thyristor or triac (IEC 60747-6)' },
  { name: 'igt', unit: 'A', kind: 'number', doc: 'largest gate trigger current at 25 °C in quadrants I, II and III' },
  { name: 'igt_q4', unit: 'A', kind: 'number', doc: 'largest gate trigger current at 25 °C in quadrant IV' },
  { name: 'vgt', unit: 'V', kind: 'number', doc: 'largest gate trigger voltage at 25 °C' },
  { name: 'il', unit: 'A', kind: 'number', doc: 'latching current of a triac' },
  { name: 'ih', unit: 'A', kind: 'number', doc: 'holding current of a triac' },
  { name: 'didt_c', unit: 'A/s', kind: 'number', doc: 'critical rate of fall of a triac\'s current at commutation, (dI/dt)c' },
  { name: 'i2t', unit: 'A²s', kind: 'number', doc: 'I²t: for fusing of a semiconductor (10 ms), or a fuse\'s clearing I²t' },
  { name: 'v_1ma', unit: 'V', kind: 'number', doc: 'varistor voltage at 1 mA' },
  { name: 'v_clamp', unit: 'V', kind: 'number', doc: 'varistor clamping voltage at its class current i_clamp (8/20 µs)' },
  { name: 'i_clamp', unit: 'A', kind: 'number', doc: 'class current at which a varistor\'s clamping voltage is given' },
  { name: 'i_surge', unit: 'A', kind: 'number', doc: 'largest single 8/20 µs surge current of a varistor' },
  { name: 'energy', unit: 'J', kind: 'number', doc: 'largest single-pulse energy of a varistor' },
  { name: 'v_pulse', unit: 'V', kind: 'number', doc: 'rated peak impulse voltage (X capacitors)' },
  { name: 'v_drop', unit: 'V', kind: 'number', doc: 'dropout voltage of a linear regulator' },
  { name: 'regulation', unit: '', kind: 'number', doc: 'rise of a transformer\'s secondary from rated load to no load, as a fraction' },
];

/** Roles a build line can give its part, read by the built-in checks. */
export const ROLES = [
  'switch', 'bridge', 'xcap', 'bleeder', 'zener', 'snubber_r', 'snubber_c', 'timer', 'heatsink', 'supply_diode',
  'gate_r', 'fuse', 'varistor', 'xfmr', 'logic_bridge', 'regulator', 'smoothing', 'logic_fuse', 'logic',
] as const;

// ---------------------------------------------------------------------------------------------------------------
// Names the user gives: parameters, part ratings, currencies and other keys of the Book's own records.

// Names every object carries built in may not key a user's record: the one rule lives with the Book schema.
export { RESERVED_NAMES, reservedNameProblem } from './schema.ts';

/** The shape of a parameter name: a lower-case letter, then lower-case letters, digits and _. */
export const PARAM_NAME_SHAPE = /^[a-z][a-z0-9_]*$/;

/**
 * Why `name` cannot be a variant parameter's name, or undefined when it can: the one rule for every way a parameter
 * is named (the variant form, a grid header, a Book file). Lower-case letters, digits and _, starting with a letter
 * (formulas use it by this name), and not a built-in name of every object.
 */
export function paramNameProblem(name: string): string | undefined {
  if (!PARAM_NAME_SHAPE.test(name)) {
    return `“${name}” is not a parameter name. Lower-case letters, digits and _, starting with a letter (formulas use it by this name)`;
  }
  return reservedNameProblem(name);
}

/**
 * The value a user-keyed record holds under `key`, or undefined: only the record's own entries count, so a key such
 * as "constructor" never finds what every object inherits.
 */
export function ownValue<T>(record: Readonly<Record<string, T>> | undefined, key: string): T | undefined {
  return record !== undefined && Object.hasOwn(record, key) ? record[key] : undefined;
}
