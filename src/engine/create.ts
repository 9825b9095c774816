// Builds formula engines with Rungbook's functions. Every engine in the app, the CLI and the tests comes from here,
// so no engine can exist before our function names are registered.
import { HyperFormula } from 'hyperformula';
import type { ConfigParams, ExportedChange, Sheets } from 'hyperformula';
import { CostingPlugin } from './costing-functions.ts';
import { ENGINE_OVERRIDES, FUNCTION_PLUGINS, boundTextOperator } from './functions/index.ts';

/** Every plugin of ours with function names: the formula functions by area, then the costing workbook's kernels. */
const PLUGINS = [...FUNCTION_PLUGINS.map(({ plugin }) => plugin), CostingPlugin];

/** Languages whose function names we have added, so later calls only extend languages registered since. */
const translated = new Set<string>();
let registered = false;

/**
 * The one registration step: every Rungbook function plugin (the formula functions and the costing kernels, which a
 * user's override formula in the costing workbook may call alongside them) with its English names in every registered language
 * (a function without a name in the engine's language silently evaluates to #NAME?). Safe to call any number of
 * times; call it again after registering another language to give that language our names too.
 */
export function registerRungbookFunctions(): void {
  const languages = HyperFormula.getRegisteredLanguagesCodes().filter((code) => !translated.has(code));
  if (registered && languages.length === 0) return;
  for (const plugin of PLUGINS) {
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
 * - undoLimit 0: no engine's own undo history. The app keeps its own undo, of Book changes; an engine is rebuilt or
 *   edited forward from the Book.
 */
const ENGINE_DEFAULTS: Partial<ConfigParams> = {
  licenseKey: 'gpl-v3',
  undoLimit: 0,
};

/**
 * A new engine with Rungbook's functions and a bounded text operator, empty or holding `sheets` (built in one pass,
 * far quicker than adding them to an empty engine); `config` overrides the defaults above.
 */
export function createEngine(config: Partial<ConfigParams> = {}, sheets?: Sheets): HyperFormula {
  registerRungbookFunctions();
  const settings = { ...ENGINE_DEFAULTS, ...config };
  const hf = sheets === undefined ? HyperFormula.buildEmpty(settings) : HyperFormula.buildFromSheets(sheets, settings);
  boundTextOperator(hf);
  return hf;
}

/**
 * Makes `changes` with evaluation held until all are made, then evaluates once and gives what changed: the engine's
 * own batch, without its undo entry. The engine's batch gathers every change into one undo entry and, at each change,
 * walks that whole entry again (its redo clean-up), so a batch of n changes costs n² walks: a fifth of a quantity edit
 * on a 200-variant family went there. Our engines keep no undo history (undoLimit 0 above).
 */
export function changeInOne(hf: HyperFormula, changes: () => void): ExportedChange[] {
  hf.suspendEvaluation();
  try {
    changes();
  } catch (e) {
    hf.resumeEvaluation();
    throw e;
  }
  return hf.resumeEvaluation();
}
