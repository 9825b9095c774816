// The formula engine's public face: engines with Rungbook's functions, and the help for those functions.
export { createEngine, registerRungbookFunctions, ENGINE_DEFAULTS } from './create.ts';
export { FUNCTION_DOCS, FUNCTION_AREAS, functionDoc, functionSignature } from './functions/index.ts';
export type { FunctionArea, FunctionArgDoc, FunctionDoc } from './functions/index.ts';
