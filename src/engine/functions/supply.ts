// Mains and logic-supply functions: mains peak, the capacitive dropper (X capacitor current and size, mean DC by
// charge balance, zener worst case) and the bleeder discharge time.
import { buildPlugin, defineFunction } from './define.ts';
import type { FunctionSpec } from './define.ts';

/** Peak of a sine from its RMS value. */
const SQRT2 = Math.SQRT2;

const MAINS_PEAK = defineFunction({
  name: 'MAINS_PEAK',
  area: 'supply',
  returns: 'V',
  doc: 'Peak mains voltage √2 · v_rms · (1 + tol); tol is the high tolerance as a fraction (0.1 for +10 %; IEC 60038:2009, table 1).',
  args: [
    { name: 'v_rms', unit: 'V', rule: 'nonNegative' },
    { name: 'tol', unit: '', rule: 'tol', optional: true, default: 0 },
  ],
  compute: (v: number, tol: number) => SQRT2 * v * (1 + tol),
});

const XCAP_AMPS = defineFunction({
  name: 'XCAP_AMPS',
  area: 'supply',
  returns: 'A',
  doc: 'RMS current through a series dropper capacitor with the load neglected: 2π · f · c · v_rms (basic circuit theory, from memory).',
  args: [
    { name: 'c', unit: 'F', rule: 'nonNegative' },
    { name: 'v_rms', unit: 'V', rule: 'nonNegative' },
    { name: 'f', unit: 'Hz', rule: 'positive' },
  ],
  compute: (c: number, v: number, f: number) => 2 * Math.PI * f * c * v,
});

const XCAP_FOR = defineFunction({
  name: 'XCAP_FOR',
  area: 'supply',
  returns: 'F',
  doc: 'Dropper capacitance that passes i_rms at v_rms and f: i_rms / (2π · f · v_rms) (basic circuit theory, from memory).',
  args: [
    { name: 'i_rms', unit: 'A', rule: 'nonNegative' },
    { name: 'v_rms', unit: 'V', rule: 'positive' },
    { name: 'f', unit: 'Hz', rule: 'positive' },
  ],
  compute: (i: number, v: number, f: number) => i / (2 * Math.PI * f * v),
});

const BLEED_TIME = defineFunction({
  name: 'BLEED_TIME',
  area: 'supply',
  returns: 's',
  doc: 'Time for an RC discharge from v0 to v_end: r · c · ln(v0 / v_end); 0 when v0 is already at or below v_end (basic circuit theory, from memory).',
  args: [
    { name: 'r', unit: 'Ω', rule: 'nonNegative' },
    { name: 'c', unit: 'F', rule: 'nonNegative' },
    { name: 'v0', unit: 'V', rule: 'positive' },
    { name: 'v_end', unit: 'V', rule: 'positive' },
  ],
  compute: (r: number, c: number, v0: number, vEnd: number) => (v0 <= vEnd ? 0 : r * c * Math.log(v0 / vEnd)),
});

/**
 * Mean DC current a capacitive dropper delivers into a zener-clamped rail, by charge balance: each half cycle the
 * capacitor swings between the clamp levels and the charge moved is C times that swing.
 * Full-wave (bridge): 4fC(Vpk − Vz − 2Vf). Half-wave (series diode, the zener resets the capacitor on the other half
 * cycle): fC(2Vpk − Vz − Vf). Zero when the peak cannot reach the clamp.
 */
function dropperDc(c: number, vRms: number, f: number, vz: number, vf: number, fullWave: boolean): number {
  const vpk = SQRT2 * vRms;
  const amps = fullWave ? 4 * f * c * (vpk - vz - 2 * vf) : f * c * (2 * vpk - vz - vf);
  return Math.max(0, amps);
}

const dropperArgs = [
  { name: 'c', unit: 'F', rule: 'nonNegative' },
  { name: 'v_rms', unit: 'V', rule: 'nonNegative' },
  { name: 'f', unit: 'Hz', rule: 'positive' },
  { name: 'v_z', unit: 'V', rule: 'nonNegative' },
  { name: 'v_f', unit: 'V', rule: 'nonNegative' },
  { name: 'full_wave', unit: 'TRUE/FALSE', kind: 'flag', optional: true, default: false },
] as const;

const DROP_DC = defineFunction({
  name: 'DROP_DC',
  area: 'supply',
  returns: 'A',
  doc:
    'Mean DC current from a capacitive dropper into a v_z clamp by charge balance: half-wave fC(2Vpk − v_z − v_f), ' +
    'full_wave TRUE 4fC(Vpk − v_z − 2v_f); Vpk = √2 · v_rms (basic circuit theory, from memory).',
  args: dropperArgs,
  compute: dropperDc,
});

const ZENER_WORST = defineFunction({
  name: 'ZENER_WORST',
  area: 'supply',
  returns: 'W',
  doc:
    'Zener dissipation when the logic draws nothing (pass high mains and high capacitance): the whole dropper ' +
    'current at v_z, plus, half-wave, the same mean current forward through the zener at v_f on the other half cycle (basic circuit theory, from memory).',
  args: dropperArgs,
  compute: (c: number, vRms: number, f: number, vz: number, vf: number, fullWave: boolean) => {
    const i = dropperDc(c, vRms, f, vz, vf, fullWave);
    // Half-wave: the zener also carries the reset current forward each negative half cycle, at about v_f.
    return fullWave ? i * vz : i * (vz + vf);
  },
});

export const SUPPLY_FUNCTIONS: readonly FunctionSpec[] = [
  MAINS_PEAK,
  XCAP_AMPS,
  XCAP_FOR,
  BLEED_TIME,
  DROP_DC,
  ZENER_WORST,
];

export const SupplyPlugin = buildPlugin('supply', SUPPLY_FUNCTIONS);
