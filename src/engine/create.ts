// Builds formula engines with Rungbook's functions. Every engine in the app, the CLI and the tests comes from here,
// so no engine can exist before our function names are registered.
import { HyperFormula } from 'hyperformula';
import type { ConfigParams } from 'hyperformula';
import { ENGINE_OVERRIDES, FUNCTION_PLUGINS, boundTextOperator } from './functions/index.ts';

/** Languages whose function names we have added, so later calls only extend languages registered since. */
const translated = new Set<string>();
let registered = false;

/**
 * Registers every Rungbook function plugin with HyperFormula, with its English names in every registered language
 * (a function without a name in the engine's language silently evaluates to #NAME?). Safe to call any number of
 * times; call it again after registering another language to give that language our names too.
 */
export function registerRungbookFunctions(): void {
  const languages = HyperFormula.getRegisteredLanguagesCodes().filter((code) => !translated.has(code));
  if (registered && languages.length === 0) return;
  for (const { plugin } of FUNCTION_PLUGINS) {
    const names: Record<string, string> = {};
    for (const name of Object.keys(plugin.implementedFunctions)) names[name] = name;
    // Registering a plugin again replaces its own entries, so this also adds names for newly registered languages.
    HyperFormula.registerFunctionPlugin(plugin, Object.fromEntries(languages.map((code) => [code, names])));
  }
  // Bounded versions of the engine's own text functions keep their names, so they need no translations.
  if (!registered) for (const plugin of ENGINE_OVERRIDES) HyperFormula.registerFunctionPlugin(plugin);
  for (const code of languages) translated.add(code);
  registered = true;
}

/**
 * Settings every Rungbook engine uses. The engine's defaults are kept (language enGB, comma argument separator,
 * point as decimal, 14-significant-digit result rounding that hides float noise such as 100 × 1.1) except:
 * - licenseKey 'gpl-v3': Rungbook is GPL-3.0 software, which is the free licence the engine offers.
 */
export const ENGINE_DEFAULTS: Partial<ConfigParams> = {
  licenseKey: 'gpl-v3',
};

/** A new empty engine with Rungbook's functions; `config` overrides the defaults above. */
export function createEngine(config: Partial<ConfigParams> = {}): HyperFormula {
  registerRungbookFunctions();
  const hf = HyperFormula.buildEmpty({ ...ENGINE_DEFAULTS, ...config });
  boundTextOperator(hf);
  return hf;
}
