// The formula engine's public face: engines with Rungbook's functions, and the help for those functions.
export { createEngine, registerRungbookFunctions, ENGINE_DEFAULTS } from './create.ts';
export { FUNCTION_DOCS, FUNCTION_AREAS, functionDoc, functionSignature } from './functions/index.ts';
export type { FunctionArea, FunctionArgDoc, FunctionDoc } from './functions/index.ts';
export { FamilyWorkbook, CheckSession, resolveFamily, evaluateChecks } from './family.ts';
export type { CheckResult, EditResult, FamilyResolution, ResolveProblem, VariantResolution } from './family.ts';
export { builtInChecks, addBuiltInChecks, parseCheckSheet, parseRule, formatRule, checkFromSheet } from './sheets.ts';
export type { SheetCheck, SheetProblem, SheetResult } from './sheets.ts';
export { guardFormula, evaluateFormula, describeFormulaError, FORMULA_LIMITS, FORMULA_REFUSALS } from './formula-guard.ts';
export type { GuardResult, FormulaRefusal, FormulaLimits, EvaluateResult } from './formula-guard.ts';
export { CostingWorkbook, COST_FIELDS, fixedResolution, resolutionFromFamily } from './costing.ts';
export type { ChangedCost, CostField, CostFigure, Resolution, UnitCostRow } from './costing.ts';
export { registerCostingFunctions, COSTING_FUNCTION_DOCS } from './costing-functions.ts';
