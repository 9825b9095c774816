// Text that cannot grow without bound: the engine's own functions that can lengthen text (CONCATENATE, SUBSTITUTE,
// REPLACE, TEXTJOIN) and its "&" operator, replaced by versions that give #VALUE! past MAX_TEXT_LENGTH instead of
// building text until memory runs out (thirty nested SUBSTITUTEs once took 4 GB and two minutes).
import { CellError, EmptyValue, ErrorType, FunctionArgumentType, FunctionPlugin, SimpleRangeValue } from 'hyperformula';
import type { FunctionPluginDefinition, HyperFormula, ImplementedFunctions } from 'hyperformula';
import { plainNumber } from './define.ts';

/** Longest text a formula may produce: the cell text limit of common spreadsheets (common practice). */
export const MAX_TEXT_LENGTH = 32_767;

function grouped(n: number): string {
  return String(n).replace(/\B(?=(\d{3})+(?!\d))/g, ',');
}

/** The error a too-long result becomes, naming what made it. */
export function textTooLong(what: string, length: number): CellError {
  return new CellError(
    ErrorType.VALUE,
    `${what}: the result would be ${grouped(length)} characters long; text in a formula stops at ${grouped(MAX_TEXT_LENGTH)} characters`,
  );
}

/** A scalar as text, the way the engine turns values into text ("&", CONCATENATE). */
function asText(v: unknown): string | CellError {
  if (v instanceof CellError) return v;
  if (typeof v === 'string') return v;
  if (v === EmptyValue || v === undefined || v === null) return '';
  if (typeof v === 'boolean') return v ? 'TRUE' : 'FALSE';
  const n = plainNumber(v);
  return n === undefined ? String(v) : n.toString();
}

function escapeRegExp(text: string): string {
  return text.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
}

type RunFunction = FunctionPlugin['runFunction'];
type PluginCall = { args: Parameters<RunFunction>[0] };
type PluginState = Parameters<RunFunction>[1];

const STRING = { argumentType: FunctionArgumentType.STRING };
const NUMBER = { argumentType: FunctionArgumentType.NUMBER };

/** The engine's own argument declarations for these functions (HyperFormula 3.5 TextPlugin), unchanged. */
const IMPLEMENTED: ImplementedFunctions = {
  CONCATENATE: { method: 'concatenate', parameters: [STRING], repeatLastArgs: 1, expandRanges: true },
  SUBSTITUTE: { method: 'substitute', parameters: [STRING, STRING, STRING, { ...NUMBER, optionalArg: true }] },
  REPLACE: { method: 'replace', parameters: [STRING, NUMBER, NUMBER, STRING] },
  TEXTJOIN: {
    method: 'textjoin',
    repeatLastArgs: 1,
    parameters: [{ argumentType: FunctionArgumentType.ANY }, { argumentType: FunctionArgumentType.BOOLEAN }, { argumentType: FunctionArgumentType.ANY }],
  },
};

/** Every value of a scalar or range argument as text, or the first error among them. */
function texts(arg: unknown): string[] | CellError {
  const values = arg instanceof SimpleRangeValue ? arg.valuesFromTopLeftCorner() : [arg];
  const out: string[] = [];
  for (const v of values) {
    const t = asText(v);
    if (t instanceof CellError) return t;
    out.push(t);
  }
  return out;
}

/** The engine's text functions that can lengthen text, with the same arguments and results up to MAX_TEXT_LENGTH. */
export class BoundedTextPlugin extends FunctionPlugin {
  static override implementedFunctions = IMPLEMENTED;

  concatenate(ast: PluginCall, state: PluginState) {
    return this.runFunction(ast.args, state, this.metadata('CONCATENATE'), (...parts: string[]) => {
      let length = 0;
      for (const p of parts) length += p.length;
      return length > MAX_TEXT_LENGTH ? textTooLong('CONCATENATE', length) : ''.concat(...parts);
    });
  }

  substitute(ast: PluginCall, state: PluginState) {
    return this.runFunction(ast.args, state, this.metadata('SUBSTITUTE'), (text: string, search: string, replacement: string, occurrence?: number) => {
      const pattern = new RegExp(escapeRegExp(search), 'g');
      if (occurrence === undefined) {
        // The length is known before any text is built: every match grows the text by the same amount.
        const matches = text.match(pattern)?.length ?? 0;
        const length = text.length + matches * (replacement.length - search.length);
        return length > MAX_TEXT_LENGTH ? textTooLong('SUBSTITUTE', length) : text.replace(pattern, () => replacement);
      }
      if (occurrence < 1) return new CellError(ErrorType.VALUE, 'SUBSTITUTE: occurrence must be 1 or more');
      let match: RegExpExecArray | null;
      let i = 0;
      while ((match = pattern.exec(text)) !== null) {
        if (occurrence === ++i) {
          const length = text.length - match[0].length + replacement.length;
          if (length > MAX_TEXT_LENGTH) return textTooLong('SUBSTITUTE', length);
          return text.substring(0, match.index) + replacement + text.substring(pattern.lastIndex);
        }
        if (match[0] === '') pattern.lastIndex++;
      }
      return text;
    });
  }

  replace(ast: PluginCall, state: PluginState) {
    return this.runFunction(ast.args, state, this.metadata('REPLACE'), (text: string, start: number, count: number, newText: string) => {
      if (start < 1) return new CellError(ErrorType.VALUE, 'REPLACE: start must be 1 or more');
      if (count < 0) return new CellError(ErrorType.VALUE, 'REPLACE: the number of characters must be 0 or more');
      const head = text.substring(0, start - 1);
      const tail = text.substring(start + count - 1);
      const length = head.length + newText.length + tail.length;
      return length > MAX_TEXT_LENGTH ? textTooLong('REPLACE', length) : head + newText + tail;
    });
  }

  textjoin(ast: PluginCall, state: PluginState) {
    return this.runFunction(ast.args, state, this.metadata('TEXTJOIN'), (delimiterArg: unknown, ignoreEmpty: boolean, ...textArgs: unknown[]) => {
      const delimiters = texts(delimiterArg);
      if (delimiters instanceof CellError) return delimiters;
      const parts: string[] = [];
      let length = 0;
      for (const arg of textArgs) {
        const some = texts(arg);
        if (some instanceof CellError) return some;
        for (const t of some) {
          if (ignoreEmpty && t === '') continue;
          length += t.length + (parts.length > 0 ? (delimiters[(parts.length - 1) % delimiters.length] ?? '').length : 0);
          if (length > MAX_TEXT_LENGTH) return textTooLong('TEXTJOIN', length);
          parts.push(t);
        }
      }
      return parts.reduce((acc, part, i) => (i === 0 ? part : acc + (delimiters[(i - 1) % delimiters.length] ?? '') + part), '');
    });
  }
}
Object.defineProperty(BoundedTextPlugin, 'name', { value: 'Rungbook_text_bounds_plugin' });

/** Plugins that replace engine functions of the same name; registered after the engine's own, with no new names. */
export const ENGINE_OVERRIDES: readonly FunctionPluginDefinition[] = [BoundedTextPlugin];

/**
 * Bounds the "&" operator of one engine. The engine has no plugin hook for operators, so its arithmetic helper's
 * concatenation (used by "&" on single values and on each element of an array) is wrapped on this instance: past
 * MAX_TEXT_LENGTH the result is an error value, which the engine then carries like any other.
 */
export function boundTextOperator(hf: HyperFormula): void {
  const helper = hf.evaluator.interpreter.arithmeticHelper;
  const concat = helper.concat;
  helper.concat = (left: string, right: string): string => {
    const length = left.length + right.length;
    // The engine stores whatever this returns as the operator's value; an error value is what it expects for failure.
    return length > MAX_TEXT_LENGTH ? (textTooLong('&', length) as unknown as string) : concat(left, right);
  };
}
