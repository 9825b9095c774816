// Power-stage and heat functions: load current, conduction and bridge losses, snubber dissipation, the thermal chain.
import { buildPlugin, defineFunction, fnError } from './define.ts';
import type { FunctionSpec } from './define.ts';
import { ErrorType } from 'hyperformula';

const LOAD_AMPS = defineFunction({
  name: 'LOAD_AMPS',
  area: 'power',
  returns: 'A',
  doc: 'RMS current of a load: p / (v · pf) (basic circuit theory, from memory).',
  args: [
    { name: 'p', unit: 'W', rule: 'nonNegative' },
    { name: 'v', unit: 'V', rule: 'positive' },
    { name: 'pf', unit: '', rule: 'pf' },
  ],
  compute: (p: number, v: number, pf: number) => p / (v * pf),
});

const COND_LOSS = defineFunction({
  name: 'COND_LOSS',
  area: 'power',
  returns: 'W',
  doc: 'Conduction loss i_rms² · r_on (use r_on at the working temperature: it roughly doubles from 25 °C to 125 °C: rule of thumb, from memory).',
  args: [
    { name: 'i_rms', unit: 'A' },
    { name: 'r_on', unit: 'Ω', rule: 'nonNegative' },
  ],
  compute: (i: number, r: number) => i * i * r,
});

const BRIDGE_LOSS = defineFunction({
  name: 'BRIDGE_LOSS',
  area: 'power',
  returns: 'W',
  doc: 'Diode bridge loss 2 · v_f · i_avg (two diodes conduct at a time; i_avg = 0.9003 · i_rms for a sine; basic circuit theory, from memory).',
  args: [
    { name: 'i_avg', unit: 'A', rule: 'nonNegative' },
    { name: 'v_f', unit: 'V', rule: 'nonNegative' },
  ],
  compute: (i: number, vf: number) => 2 * vf * i,
});

const SNUB_WATTS = defineFunction({
  name: 'SNUB_WATTS',
  area: 'power',
  returns: 'W',
  doc: 'RC snubber resistor dissipation c · v² · f (pass the peak voltage for the conservative figure; basic circuit theory, from memory).',
  args: [
    { name: 'c', unit: 'F', rule: 'nonNegative' },
    { name: 'v', unit: 'V' },
    { name: 'f', unit: 'Hz', rule: 'nonNegative' },
  ],
  compute: (c: number, v: number, f: number) => c * v * v * f,
});

const JUNCTION_C = defineFunction({
  name: 'JUNCTION_C',
  area: 'power',
  returns: '°C',
  doc: 'Junction temperature t_amb + p · rth_total, rth_total being junction-to-ambient (case + interface + heatsink; power electronics textbooks, from memory).',
  args: [
    { name: 'p', unit: 'W', rule: 'nonNegative' },
    { name: 't_amb', unit: '°C' },
    { name: 'rth_total', unit: 'K/W', rule: 'nonNegative' },
  ],
  compute: (p: number, tAmb: number, rth: number) => tAmb + p * rth,
});

const SINK_RTH_MAX = defineFunction({
  name: 'SINK_RTH_MAX',
  area: 'power',
  returns: 'K/W',
  doc:
    'Largest heatsink thermal resistance keeping the junction at or below tj_max: (tj_max − t_amb)/p − rth_jc − rth_cs; ' +
    'a negative result means no heatsink is enough (power electronics textbooks, from memory).',
  args: [
    { name: 'p', unit: 'W', rule: 'nonNegative' },
    { name: 'tj_max', unit: '°C' },
    { name: 't_amb', unit: '°C' },
    { name: 'rth_jc', unit: 'K/W', rule: 'nonNegative' },
    { name: 'rth_cs', unit: 'K/W', rule: 'nonNegative' },
  ],
  compute(p: number, tjMax: number, tAmb: number, rthJc: number, rthCs: number) {
    if (p === 0) return fnError('SINK_RTH_MAX', ErrorType.DIV_BY_ZERO, 'p is 0 W: with nothing to dissipate any heatsink will do');
    return (tjMax - tAmb) / p - rthJc - rthCs;
  },
});

export const POWER_FUNCTIONS: readonly FunctionSpec[] = [
  LOAD_AMPS,
  COND_LOSS,
  BRIDGE_LOSS,
  SNUB_WATTS,
  JUNCTION_C,
  SINK_RTH_MAX,
];

export const PowerPlugin = buildPlugin('power', POWER_FUNCTIONS);
