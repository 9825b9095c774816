// Rungbook's formula functions: the plugins to register and the help the app shows while a formula is typed.
import type { FunctionPluginDefinition } from 'hyperformula';
import type { FunctionArea, FunctionSpec } from './define.ts';
import { BOOK_FUNCTIONS, BookPlugin } from './book.ts';
import { PURCHASING_FUNCTIONS, PurchasingPlugin } from './purchasing.ts';
import { POWER_FUNCTIONS, PowerPlugin } from './power.ts';
import { SUPPLY_FUNCTIONS, SupplyPlugin } from './supply.ts';
import { SURGE_FUNCTIONS, SurgePlugin } from './surge.ts';
import { TIMING_FUNCTIONS, TimingPlugin } from './timing.ts';
import { TRANSFORMER_FUNCTIONS, TransformerPlugin } from './transformer.ts';
import { TRIAC_FUNCTIONS, TriacPlugin } from './triac.ts';
import { VALUES_FUNCTIONS, ValuesPlugin } from './values.ts';

export { FUNCTION_AREAS } from './define.ts';
export { ENGINE_OVERRIDES, MAX_TEXT_LENGTH, boundTextOperator } from './text.ts';
export type { FunctionArea, FunctionSpec } from './define.ts';

/** One plugin per area, with the specs it implements. */
export const FUNCTION_PLUGINS: readonly { area: FunctionArea; plugin: FunctionPluginDefinition; specs: readonly FunctionSpec[] }[] = [
  { area: 'values', plugin: ValuesPlugin, specs: VALUES_FUNCTIONS },
  { area: 'supply', plugin: SupplyPlugin, specs: SUPPLY_FUNCTIONS },
  { area: 'timing', plugin: TimingPlugin, specs: TIMING_FUNCTIONS },
  { area: 'power', plugin: PowerPlugin, specs: POWER_FUNCTIONS },
  { area: 'triac', plugin: TriacPlugin, specs: TRIAC_FUNCTIONS },
  { area: 'transformer', plugin: TransformerPlugin, specs: TRANSFORMER_FUNCTIONS },
  { area: 'surge', plugin: SurgePlugin, specs: SURGE_FUNCTIONS },
  { area: 'purchasing', plugin: PurchasingPlugin, specs: PURCHASING_FUNCTIONS },
  { area: 'book', plugin: BookPlugin, specs: BOOK_FUNCTIONS },
];

export interface FunctionArgDoc {
  name: string;
  /** SI unit symbol ('' for a plain number) or, for text, flag and range arguments, a word such as "text". */
  unit: string;
  optional?: boolean;
}

export interface FunctionDoc {
  name: string;
  args: readonly FunctionArgDoc[];
  /** Unit of the result ('' for a plain number, 'text' for text). */
  returns: string;
  doc: string;
  area: FunctionArea;
}

/** Help for every Rungbook function, in area order; shown by the app while a formula is typed. */
export const FUNCTION_DOCS: readonly FunctionDoc[] = FUNCTION_PLUGINS.flatMap(({ specs }) =>
  specs.map((s) => ({
    name: s.name,
    args: s.args.map((a) => (a.optional ? { name: a.name, unit: a.unit, optional: true } : { name: a.name, unit: a.unit })),
    returns: s.returns,
    doc: s.doc,
    area: s.area,
  })),
);

/** Help for one function by name (any case), or undefined. */
export function functionDoc(name: string): FunctionDoc | undefined {
  const key = name.trim().toUpperCase();
  return FUNCTION_DOCS.find((d) => d.name === key);
}

/** The signature line shown in help: `XCAP_AMPS(c F, v_rms V, f Hz) → A`. */
export function functionSignature(doc: FunctionDoc): string {
  const args = doc.args.map((a) => {
    const text = a.unit ? `${a.name} ${a.unit}` : a.name;
    return a.optional ? `[${text}]` : text;
  });
  return `${doc.name}(${args.join(', ')})${doc.returns ? ` → ${doc.returns}` : ''}`;
}
